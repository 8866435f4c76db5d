import { describe, expect, it } from "vitest";
import { Listeners, memoryLocks, memoryRoundNews } from "./shared.server";

describe("Listeners", () => {
  it("says when a key gets its first listener and loses its last", () => {
    const l = new Listeners();
    const events: string[] = [];
    const [a, b] = [() => events.push("a"), () => events.push("b")];
    l.add("k", a, () => events.push("first"));
    l.add("k", b, () => events.push("first"));
    l.call("k");
    l.remove("k", a, () => events.push("last"));
    l.remove("k", a, () => events.push("last")); // not there any more: nothing happens
    l.call("k");
    l.remove("k", b, () => events.push("last"));
    l.call("k");
    expect(events).toEqual(["first", "a", "b", "b", "last"]);
  });
});

describe("one-process round news", () => {
  it("calls the round's listeners, not other rounds', until they stop", () => {
    const news = memoryRoundNews();
    const heard: string[] = [];
    const stop = news.listen("r1", () => heard.push("r1"));
    news.listen("r2", () => heard.push("r2"));
    news.changed("r1");
    stop();
    news.changed("r1");
    expect(heard).toEqual(["r1"]);
  });
});

describe("one-process locks", () => {
  it("skips work of a busy name, runs others, and frees the name after a failure", async () => {
    const locks = memoryLocks();
    let release!: () => void;
    const first = locks.ifFree("sweep", () => new Promise<void>((r) => (release = r)));
    expect(await locks.ifFree("sweep", async () => expect.unreachable())).toBe(false);
    expect(await locks.ifFree("other", async () => {})).toBe(true);
    release();
    expect(await first).toBe(true);
    await expect(locks.ifFree("sweep", () => Promise.reject(new Error("boom")))).rejects.toThrow("boom");
    expect(await locks.ifFree("sweep", async () => {})).toBe(true);
  });

  it("runs work of one name in turn, in the order asked", async () => {
    const locks = memoryLocks();
    const order: number[] = [];
    const slow = (n: number, ms: number) => locks.inTurn("migrate", () => new Promise<number>((r) => setTimeout(() => (order.push(n), r(n)), ms)));
    expect(await Promise.all([slow(1, 30), slow(2, 0), slow(3, 10)])).toEqual([1, 2, 3]);
    expect(order).toEqual([1, 2, 3]);
  });
});
