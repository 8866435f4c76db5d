// What several nodes share through Redis (server/cluster/shared.ts), each "node" here being its own
// pair of connections to one private redis-server, as two processes would have.
import type { Redis } from "ioredis";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomBytes } from "node:crypto";
import { readdirSync } from "node:fs";
import { createLimits, peek, take, type Limits } from "~/auth/rate-limit.server";
import { closeDb, migrateDb, MIGRATIONS_FOLDER, openDb } from "~/db/client.server";
import { memoryShared, type Shared } from "~/cluster/shared.server";
import { connectRedis, redisReady } from "../../server/cluster/redis";
import { startRedisServer, type RedisServer } from "../../server/cluster/redis-server";
import { redisShared } from "../../server/cluster/shared";
import { admitSocket, rememberSocket, seatRefusal } from "../../server/seat-limits";
import type { WebSocket } from "ws";

let redis: RedisServer;
const quiet = { info: () => {}, warn: () => {} };
const nodes: { shared: Shared; limits: Limits; clients: Redis[] }[] = [];
const node = (i: number) => nodes[i]!;

beforeAll(async () => {
  redis = await startRedisServer();
  for (let i = 0; i < 2; i++) {
    const clients = [connectRedis(redis.url, "shared", quiet), connectRedis(redis.url, "subscriber", quiet)] as const;
    await Promise.all(clients.map((c) => redisReady(c)));
    const shared = redisShared(...clients);
    nodes.push({ shared, limits: createLimits(shared.limiter), clients: [...clients] });
  }
});
afterAll(async () => {
  await Promise.all(nodes.map((n) => n.shared.close()));
  await redis.stop();
});

const connected = () => until(() => nodes.every((n) => n.clients.every((c) => c.status === "ready")), 10_000);
const until = async (what: () => boolean, ms = 3_000) => {
  const deadline = Date.now() + ms;
  while (!what() && Date.now() < deadline) await new Promise((r) => setTimeout(r, 10));
  return what();
};

describe("rate limits shared by the nodes", () => {
  it("counts failed sign-ins made on either node toward one limit", async () => {
    const key = `pair-${Date.now()}`;
    // 5 failures per account and address (app/auth/rate-limit.server.ts), spread over both nodes.
    for (let i = 0; i < 5; i++) expect(await take(node(i % 2).limits.signIn.pair, key)).toBeUndefined();
    for (const n of [0, 1]) expect((await peek(node(n).limits.signIn.pair, key))?.message).toMatch(/^Too many failed sign-ins for this account from here\. Try again in 15 minutes\.$/);
    // A successful sign-in on one node forgives the pair on both.
    await node(1).limits.signIn.pair.limiter.delete(key);
    expect(await peek(node(0).limits.signIn.pair, key)).toBeUndefined();
  });

  it("shares the seat and connection limits of one address", async () => {
    const address = `198.51.100.${Date.now() % 200}`;
    // 200 seats per address in 10 minutes: 100 sockets on each node, two joins each.
    for (let i = 0; i < 200; i++) {
      const ws = {} as WebSocket;
      rememberSocket(ws, node(i % 2).limits, address);
      expect(await seatRefusal(ws)).toBeUndefined();
    }
    const late = {} as WebSocket;
    rememberSocket(late, node(0).limits, address);
    expect((await seatRefusal(late))?.message).toMatch(/^Too many phones joined from this network/);
    // 300 new connections per address a minute.
    for (let i = 0; i < 300; i++) expect(await admitSocket(node(i % 2).limits, address)).toBeUndefined();
    expect((await admitSocket(node(1).limits, address))?.message).toMatch(/^Too many connections from this network/);
  });

  it("keeps one process's limits in memory without Redis, each process counting alone", async () => {
    const [a, b] = [createLimits(memoryShared().limiter), createLimits(memoryShared().limiter)];
    for (let i = 0; i < 5; i++) await take(a.signIn.pair, "k");
    expect(await peek(a.signIn.pair, "k")).toBeDefined();
    expect(await peek(b.signIn.pair, "k")).toBeUndefined();
  });
});

describe("round news", () => {
  it("reaches a listener on the other node, once per change, until it stops listening", async () => {
    const heard = { a: 0, b: 0 };
    const stopA = node(0).shared.rounds.listen("room-1", () => heard.a++);
    const stopB = node(1).shared.rounds.listen("room-1", () => heard.b++);
    const other = node(1).shared.rounds.listen("room-2", () => expect.unreachable("news of another round"));
    // The subscription is on its way; news published before it lands would be missed.
    await new Promise((r) => setTimeout(r, 100));
    node(0).shared.rounds.changed("room-1");
    expect(await until(() => heard.a === 1 && heard.b === 1)).toBe(true);
    stopB();
    await new Promise((r) => setTimeout(r, 100));
    node(0).shared.rounds.changed("room-1");
    expect(await until(() => heard.a === 2)).toBe(true);
    await new Promise((r) => setTimeout(r, 100));
    expect(heard).toEqual({ a: 2, b: 1 });
    stopA();
    other();
  });
});

describe("locks", () => {
  it("lets one node at a time do work of one name", async () => {
    let release!: () => void;
    const held = new Promise<void>((r) => (release = r));
    const first = node(0).shared.locks.ifFree("sweep-test", () => held);
    await new Promise((r) => setTimeout(r, 50));
    expect(await node(1).shared.locks.ifFree("sweep-test", async () => expect.unreachable("ran beside the holder"))).toBe(false);
    const order: string[] = [];
    const waiting = node(1).shared.locks.inTurn("sweep-test", async () => void order.push("second"));
    await new Promise((r) => setTimeout(r, 300));
    order.push("first");
    release();
    expect(await first).toBe(true);
    await waiting;
    expect(order).toEqual(["first", "second"]);
    expect(await node(0).shared.locks.ifFree("sweep-test", async () => {})).toBe(true);
  });
});

describe("nodes starting together", () => {
  it("migrate one at a time: every migration applied once, neither node failing", async () => {
    const url = `file:tests/.tmp/fresh-${randomBytes(4).toString("hex")}.db`;
    const dbs = await Promise.all([openDb(url), openDb(url)]);
    await Promise.all(dbs.map((db, i) => node(i).shared.locks.inTurn("migrate", () => migrateDb(db))));
    const applied = await dbs[0]!.$client.execute("SELECT hash FROM __drizzle_migrations");
    const files = readdirSync(MIGRATIONS_FOLDER).filter((f) => f.endsWith(".sql"));
    expect(applied.rows).toHaveLength(files.length);
    expect(new Set(applied.rows.map((r) => r.hash)).size).toBe(files.length);
    await Promise.all(dbs.map(closeDb));
  });
});

describe("Redis away", () => {
  it("answers rate limits from each node's memory at once, skips locked work, and carries on when Redis is back", async () => {
    let heard = 0;
    const stop = node(1).shared.rounds.listen("room-3", () => heard++);
    await redis.stop();
    expect(await until(() => nodes.every((n) => n.clients.every((c) => c.status !== "ready")))).toBe(true);
    const started = Date.now();
    expect(await take(node(0).limits.signUp, "203.0.113.9")).toBeUndefined();
    expect(Date.now() - started).toBeLessThan(1_000);
    expect(await node(0).shared.locks.ifFree("sweep-test", async () => expect.unreachable("ran without the lock"))).toBe(false);
    node(0).shared.rounds.changed("room-1");
    await redis.start();
    // ioredis reconnects by itself within its retry delay.
    expect(await connected()).toBe(true);
    const key = `back-${Date.now()}`;
    for (let i = 0; i < 5; i++) await take(node(i % 2).limits.signIn.pair, key);
    expect(await peek(node(1).limits.signIn.pair, key)).toBeDefined();
    // The news lost while Redis was away stays lost (watchers poll too); the subscription came back.
    expect(heard).toBe(0);
    node(0).shared.rounds.changed("room-3");
    expect(await until(() => heard === 1)).toBe(true);
    stop();
  });
});
