import type { Redis } from "ioredis";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { leaseKey, leaseValue, Leases, parseLease, RoomElsewhere, type FenceStore } from "./leases";
import { closeRedis, connectRedis, redisReady } from "./redis";
import { startRedisServer, type RedisServer } from "./redis-server";

const quiet = { info: () => {}, warn: () => {} };
let redis: RedisServer;
let admin: Redis;
beforeAll(async () => {
  redis = await startRedisServer();
  admin = connectRedis(redis.url, "shared", quiet);
  await redisReady(admin);
});
afterAll(async () => {
  admin.disconnect();
  await redis.stop();
});

/** The database's fences, as RoomStore keeps them: raised only from the value the caller read. */
class Fences implements FenceStore {
  readonly byRoom = new Map<string, number>();
  async fenceOf(roomId: string) {
    return this.byRoom.get(roomId) ?? 0;
  }
  async advanceFence(roomId: string, seen: number) {
    if ((this.byRoom.get(roomId) ?? 0) !== seen) return false;
    this.byRoom.set(roomId, seen + 1);
    return true;
  }
}

const TTL = 400;
const RENEW = 100;
const open: { leases: Leases; client: Redis }[] = [];
/** A node: its own Redis client and leases with a short TTL, over the shared fences. */
async function node(nodeId: string, fences: Fences) {
  const client = connectRedis(redis.url, "leases", quiet);
  await redisReady(client);
  const leases = new Leases(client, { nodeId, address: `127.0.0.1:${nodeId.length + 4000}` }, fences, quiet, TTL, RENEW);
  const lost: string[] = [];
  leases.onLost = (roomId) => lost.push(roomId);
  open.push({ leases, client });
  return { leases, lost };
}
afterEach(async () => {
  for (const { leases, client } of open.splice(0)) {
    leases.stopRenewing();
    await closeRedis(client);
  }
  await admin.flushall();
});
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe("lease values", () => {
  it.each([
    ["node-a|7|10.0.0.5:3000", { nodeId: "node-a", fence: 7, address: "10.0.0.5:3000" }],
    ["n|1|[::1]:4000", { nodeId: "n", fence: 1, address: "[::1]:4000" }],
    ["n|x|host:1", null],
    ["n|1", null],
    [null, null],
  ])("%s → %o", (value, owner) => {
    expect(parseLease(value)).toEqual(owner);
    if (owner) expect(leaseValue(owner)).toBe(value);
  });
});

describe("Leases", () => {
  it("one node takes a room and raises its fence; another is told who has it", async () => {
    const fences = new Fences();
    const a = await node("a", fences);
    const b = await node("bb", fences);
    expect(await a.leases.claim("r1")).toBe(1);
    expect(await admin.get(leaseKey("r1"))).toBe("a|1|127.0.0.1:4001");
    expect(await admin.pttl(leaseKey("r1"))).toBeGreaterThan(0);
    const refused = await b.leases.claim("r1").catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(RoomElsewhere);
    expect(refused).toMatchObject({ closeCode: 1012, owner: { nodeId: "a", fence: 1, address: "127.0.0.1:4001" } });
    // Asking again costs nothing and changes nothing.
    expect(await a.leases.claim("r1")).toBe(1);
    expect(fences.byRoom.get("r1")).toBe(1);
  });

  it("renewals keep the lease for as long as the node lives; without them it lapses and the next node gets the next fence", async () => {
    const fences = new Fences();
    const a = await node("a", fences);
    const b = await node("bb", fences);
    await a.leases.claim("r1");
    await sleep(TTL * 3);
    expect(parseLease(await admin.get(leaseKey("r1")))?.nodeId).toBe("a");

    a.leases.stopRenewing();
    await sleep(TTL + 100);
    expect(await admin.get(leaseKey("r1"))).toBeNull();
    expect(await b.leases.claim("r1")).toBe(2);
    // A comes back (its pause is over): its next renewal finds the room taken and gives it up.
    a.leases.startRenewing();
    await expect.poll(() => a.lost, { timeout: 2_000 }).toEqual(["r1"]);
    expect(a.leases.holds("r1")).toBe(false);
    expect(await admin.get(leaseKey("r1"))).toBe("bb|2|127.0.0.1:4002");
  });

  it("a release frees the room at once, and only the holder's release does", async () => {
    const fences = new Fences();
    const a = await node("a", fences);
    const b = await node("bb", fences);
    await a.leases.claim("r1");
    await b.leases.release("r1");
    expect(await admin.exists(leaseKey("r1"))).toBe(1);
    await a.leases.release("r1");
    expect(await admin.exists(leaseKey("r1"))).toBe(0);
    expect(await b.leases.claim("r1")).toBe(2);
    await b.leases.close();
    expect(await admin.exists(leaseKey("r1"))).toBe(0);
  });

  it("a node that read an old fence gives up the lease instead of raising the fence", async () => {
    const fences = new Fences();
    const a = await node("a", fences);
    // Another node raises the fence between A's read and A's lease, every time.
    fences.fenceOf = async (roomId) => {
      const seen = fences.byRoom.get(roomId) ?? 0;
      fences.byRoom.set(roomId, seen + 1);
      return seen;
    };
    await expect(a.leases.claim("r1")).rejects.toMatchObject({ closeCode: 1012 });
    expect(await admin.exists(leaseKey("r1"))).toBe(0);
    expect(a.leases.holds("r1")).toBe(false);
  });

  it("a database that cannot raise the fence leaves the room free and the client asked to try again", async () => {
    const fences = new Fences();
    const a = await node("a", fences);
    fences.advanceFence = async () => {
      throw new Error("SQLITE_BUSY: database is locked");
    };
    await expect(a.leases.claim("r1")).rejects.toMatchObject({ closeCode: 1013, message: expect.stringMatching(/SQLITE_BUSY/) });
    expect(await admin.exists(leaseKey("r1"))).toBe(0);
    expect(a.leases.holds("r1")).toBe(false);
  });

  it("Redis restarting: the owner keeps its rooms while it is away and sets its leases again when it is back", async () => {
    const fences = new Fences();
    const a = await node("a", fences);
    const b = await node("bb", fences);
    await a.leases.claim("r1");
    await a.leases.claim("r2");
    await redis.stop();
    await sleep(TTL * 2);
    expect(a.lost).toEqual([]);
    // Nobody can take a room while Redis cannot say who has it.
    await expect(b.leases.claim("r3")).rejects.toMatchObject({ closeCode: 1013 });
    // Meanwhile another node raised r2's fence (it took r2 through a Redis that lost the key).
    fences.byRoom.set("r2", 2);
    await redis.start();
    await expect.poll(async () => admin.get(leaseKey("r1")).catch(() => null), { timeout: 5_000 }).toBe("a|1|127.0.0.1:4001");
    await expect.poll(() => a.lost, { timeout: 2_000 }).toEqual(["r2"]);
    expect(await admin.get(leaseKey("r2"))).toBeNull();
    expect(a.leases.holds("r1")).toBe(true);
  });
});
