import { describe, expect, it } from "vitest";
import { sessionState, TOUCH_EVERY_MS } from "./session.server";

const T = 1_767_225_600_000;
const row = (lastSeen: number, expires: number, idleExpires: number) => ({
  lastSeenAt: new Date(lastSeen),
  expiresAt: new Date(expires),
  idleExpiresAt: new Date(idleExpires),
});

describe("sessionState", () => {
  it.each([
    ["seen just now", row(T, T + 1000, T + 1000), T, "live"],
    ["seen a moment under a minute ago", row(T - TOUCH_EVERY_MS + 1, T + 1000, T + 1000), T, "live"],
    ["seen a minute ago: last-seen moves", row(T - TOUCH_EVERY_MS, T + 1000, T + 1000), T, "touch"],
    ["at the idle limit", row(T - TOUCH_EVERY_MS, T + 1000, T), T, "expired"],
    ["at the absolute limit, though active", row(T, T, T + 1000), T, "expired"],
  ] as const)("%s → %s", (_, stored, now, state) => {
    expect(sessionState(stored, now)).toBe(state);
  });
});
