import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeRedis, connectRedis, reconnectDelayMs, redisLabel, redisReady } from "./redis";
import { startRedisServer, type RedisServer } from "./redis-server";

let redis: RedisServer;
beforeAll(async () => {
  redis = await startRedisServer();
});
afterAll(() => redis.stop());

/** A logger that keeps what it was told. */
const recorder = () => {
  const lines: string[] = [];
  return { lines, log: { info: (m: string) => lines.push(`info ${m}`), warn: (m: string) => lines.push(`warn ${m}`) } };
};

describe("connectRedis", () => {
  it("hides a password in the label and backs off to at most half a second", () => {
    expect(redisLabel("redis://:secret@10.0.0.1:6379/2")).toBe("redis://10.0.0.1:6379/2");
    expect([1, 2, 3, 4, 30].map(reconnectDelayMs)).toEqual([100, 200, 400, 500, 500]);
  });

  it("fails a lease command at once while Redis is down, logs the change once each way, and comes back", async () => {
    const { lines, log } = recorder();
    const leases = connectRedis(redis.url, "leases", log);
    const subscriber = connectRedis(redis.url, "subscriber", log);
    try {
      await redisReady(leases);
      await redisReady(subscriber);
      expect(await leases.set("k", "v")).toBe("OK");
      const heard: string[] = [];
      await subscriber.subscribe("news");
      subscriber.on("message", (_channel, message) => heard.push(message));

      await redis.stop();
      await new Promise((r) => setTimeout(r, 400));
      const started = Date.now();
      await expect(leases.get("k")).rejects.toThrow();
      expect(Date.now() - started).toBeLessThan(200);

      await redis.start();
      await redisReady(leases);
      // Subscriptions come back by themselves after the reconnect.
      const publisher = connectRedis(redis.url, "shared", log);
      await redisReady(publisher);
      await expect.poll(async () => (await publisher.publish("news", "back")) > 0, { timeout: 5_000 }).toBe(true);
      await expect.poll(() => heard).toContain("back");
      await closeRedis(publisher);

      const leaseLines = lines.filter((l) => l.includes("(leases,"));
      expect(leaseLines.map((l) => l.split(" ")[0])).toEqual(["info", "warn", "info"]);
      expect(leaseLines[1]).toMatch(/unreachable.*retrying/);
    } finally {
      await closeRedis(leases);
      await closeRedis(subscriber);
    }
  });

  it("says so when Redis never answers", async () => {
    const { log } = recorder();
    const nowhere = connectRedis("redis://127.0.0.1:1", "leases", log);
    await expect(redisReady(nowhere, 300)).rejects.toThrow(/did not answer within 300 ms/);
    await closeRedis(nowhere);
  });
});
