import { describe, expect, it } from "vitest";
import { RateLimiter } from "./rate-limit.server";

describe("RateLimiter", () => {
  it("allows `limit` attempts per window, then says how long to wait, then forgives", () => {
    let now = 0;
    const limiter = new RateLimiter(3, 60_000, () => now);
    expect([1, 2, 3].map(() => limiter.hit("k"))).toEqual([0, 0, 0]);
    now = 15_000;
    expect(limiter.hit("k")).toBe(45); // 60 s window opened at 0, so 45 s remain
    expect(limiter.hit("other")).toBe(0);
    now = 60_000;
    expect(limiter.hit("k")).toBe(0);
  });
  it("reset forgives at once", () => {
    const limiter = new RateLimiter(1, 60_000, () => 0);
    limiter.hit("k");
    expect(limiter.hit("k")).toBeGreaterThan(0);
    limiter.reset("k");
    expect(limiter.hit("k")).toBe(0);
  });
});
