import { describe, expect, it } from "vitest";
import { createLimits, firstRefusal, peek, take, waitWords } from "./rate-limit.server";

describe("limits", () => {
  it("allows the limit, then refuses with the wait in seconds and a sentence", async () => {
    const { reset } = createLimits();
    for (let i = 0; i < 3; i++) expect(await take(reset.account, "kit@example.org")).toBeUndefined();
    const refused = await take(reset.account, "kit@example.org");
    expect(refused?.retryAfter).toBeGreaterThan(3500);
    expect(refused?.message).toMatch(/^Too many reset requests for this address\. Try again in 60 minutes\.$/);
    expect(await take(reset.account, "other@example.org")).toBeUndefined();
  });
  it("peek counts nothing", async () => {
    const { signIn } = createLimits();
    for (let i = 0; i < 10; i++) expect(await peek(signIn.pair, "k")).toBeUndefined();
    for (let i = 0; i < 5; i++) await take(signIn.pair, "k");
    expect(await peek(signIn.pair, "k")).toMatchObject({ retryAfter: expect.any(Number) });
  });
  it("firstRefusal counts every check and gives the first refusal", async () => {
    const { seats } = createLimits();
    for (let i = 0; i < 5; i++) await take(seats.socket, "s");
    const refused = await firstRefusal([take(seats.socket, "s"), take(seats.address, "a")]);
    expect(refused?.message).toMatch(/^This phone joined too often/);
    expect((await seats.address.limiter.get("a"))?.consumedPoints).toBe(1);
  });
  it.each([
    [1, "1 second"],
    [45, "45 seconds"],
    [60, "1 minute"],
    [61, "2 minutes"],
    [900, "15 minutes"],
  ])("%i s → %s", (seconds, words) => expect(waitWords(seconds)).toBe(words));
});
