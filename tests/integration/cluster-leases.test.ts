// Two nodes in one process share one SQLite file and one redis-server (started here on a free
// port): a room is served only by the node holding its lease; a node whose lease lapsed cannot
// write for the room again and sends its sockets to the new owner (1012); a socket that reaches the
// wrong node is forwarded to the owner; Redis restarting mid-round loses nothing.
import { randomBytes } from "node:crypto";
import { and, eq } from "drizzle-orm";
import type { Redis } from "ioredis";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { answers, roomEvents, roomLeases } from "~/db/schema";
import { PROTOCOL_VERSION } from "~/game/protocol";
import type { Effect } from "~/game/room";
import { isFenced, RoomLog } from "~/rooms/store.server";
import { leaseKey, parseLease } from "../../server/cluster/leases";
import { closeRedis, connectRedis, redisReady } from "../../server/cluster/redis";
import { startRedisServer, type RedisServer } from "../../server/cluster/redis-server";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket, spotOf, untilShown } from "../../server/scripted-rooms";
import { seedDemo } from "../../server/seed";
import { startTestServer, type TestServer } from "./harness";

const SECRET = randomBytes(24).toString("hex");
let redis: RedisServer;
let admin: Redis;
let a: TestServer;
let b: TestServer;

beforeAll(async () => {
  redis = await startRedisServer();
  const quiet = { info: () => {}, warn: () => {} };
  admin = connectRedis(redis.url, "shared", quiet);
  await redisReady(admin);
  a = await startTestServer({ REDIS_URL: redis.url, NODE_ID: "node-a", SESSION_SECRET: SECRET });
  b = await startTestServer({ REDIS_URL: redis.url, NODE_ID: "node-b", SESSION_SECRET: SECRET });
  await seedDemo(a.services.db);
});
afterAll(async () => {
  await a?.close();
  await b?.close();
  await closeRedis(admin);
  await redis?.stop();
});

const lease = async (roomId: string) => parseLease(await admin.get(leaseKey(roomId)));
const storedAnswers = async (roomId: string) =>
  (await b.services.db.select().from(answers).where(eq(answers.roomId, roomId))).map((r) => `${r.playerId}:${r.promptIndex}`).sort();
/** A tick record, the least a step writes. */
const tick = (): Effect[] => [{ kind: "store-event", record: { env: { now: Date.now(), leadMs: 0 }, event: { type: "tick" } } }];

describe("the fence check inside every room write", () => {
  it("refuses a batch for a room whose fence moved on, keeps nothing of it, and still writes the other rooms", async () => {
    const db = a.services.db;
    const [stale, fresh] = [await openTestRoom(db), await openTestRoom(db)];
    expect(await a.hub.store.advanceFence(stale.id, 0, "node-a")).toBe(true);
    expect(await a.hub.store.advanceFence(stale.id, 1, "node-b")).toBe(true);
    // Raising from a fence that is no longer the room's does nothing.
    expect(await a.hub.store.advanceFence(stale.id, 1, "node-a")).toBe(false);
    expect(await a.hub.store.fenceOf(stale.id)).toBe(2);
    expect(await a.hub.store.advanceFence(fresh.id, 0, "node-a")).toBe(true);

    // Both go in one group commit: the stale room's write fails it, the fresh room's goes again alone.
    const staleLog = new RoomLog(stale.id, 0, 1);
    const [refused, written] = await Promise.all([a.hub.store.write(staleLog, tick(), null), a.hub.store.write(new RoomLog(fresh.id, 0, 1), tick(), null)]);
    expect(isFenced(refused)).toBe(true);
    expect(written).toBeNull();
    expect(staleLog.broken).toBe(true);
    const events = async (roomId: string) => (await db.select().from(roomEvents).where(eq(roomEvents.roomId, roomId))).length;
    expect([await events(stale.id), await events(fresh.id)]).toEqual([0, 1]);
    // A room with no fence row is refused as well: a fenced write needs its room taken first.
    const untaken = await openTestRoom(db);
    expect(isFenced(await a.hub.store.write(new RoomLog(untaken.id, 0, 1), tick(), null))).toBe(true);
  });
});

describe("two nodes, one room", () => {
  it("a node whose lease lapsed is fenced at its next write; its sockets reconnect, through it, to the new owner; nothing is lost or doubled", async () => {
    const room = await openTestRoom(a.services.db, { prompts: 3, answerMs: 20_000 });
    const stage = await openStage(a.url, SECRET, room);
    const players = await Promise.all(["Ana", "Ben", "Cy"].map((n) => joinPlayer(a.url, room.code, n)));
    expect(await lease(room.id)).toMatchObject({ nodeId: "node-a", fence: 1, address: `127.0.0.1:${a.port}` });

    // Prompt 0: every answer acknowledged by A.
    const acked: string[] = [];
    const totals = new Map<string, number>();
    stage.send({ type: "host", action: "start" });
    const first = await stage.next("prompt", (m) => m.index === 0 && m.phase === "prompt");
    await untilShown(first.showAt);
    for (const { pad, you } of players) {
      pad.send({ type: "answer", promptId: first.promptId, spot: spotOf(room.config.prompts[0]!.home), tapAt: Date.now() });
      const ack = await pad.next("answer-ack", (m) => m.promptId === first.promptId);
      if (!ack.accepted) throw new Error(`refused: ${ack.message}`);
      acked.push(`${you.playerId}:0`);
      totals.set(you.playerId, ack.total);
    }
    await stage.next("reveal");
    stage.send({ type: "host", action: "next" });
    const second = await stage.next("prompt", (m) => m.index === 1 && m.phase === "prompt");
    await untilShown(second.showAt);

    // A stops renewing (as a paused node would); once its lease lapses, B takes the room for a stage that says hello there.
    a.hub.leases!.stopRenewing();
    await expect.poll(() => lease(room.id), { timeout: 5_000, interval: 100 }).toBeNull();
    const stageB = await openStage(b.url, SECRET, room);
    expect(await lease(room.id)).toMatchObject({ nodeId: "node-b", fence: 2 });
    const [fenceRow] = await a.services.db.select().from(roomLeases).where(eq(roomLeases.roomId, room.id));
    expect(fenceRow).toMatchObject({ fence: 2, nodeId: "node-b" });

    // A pad still on A answers: A's write is refused by the fence, so no ack, and every socket of the room on A is told to reconnect.
    const [late, ...others] = players;
    late!.pad.send({ type: "answer", promptId: second.promptId, spot: spotOf(room.config.prompts[1]!.home), tapAt: Date.now() });
    expect((await late!.pad.waitClose()).code).toBe(1012);
    for (const { pad } of others) expect((await pad.waitClose()).code).toBe(1012);
    expect((await stage.waitClose()).code).toBe(1012);
    expect(late!.pad.messages.some((m) => m.type === "answer-ack" && m.promptId === second.promptId)).toBe(false);
    expect(await storedAnswers(room.id)).toEqual([...acked].sort());

    // The pads come back the way they came (A's address): A forwards them to B, where their seats and points are.
    const pads = await Promise.all(
      players.map(async ({ you }) => {
        const pad = await ScriptedSocket.open(a.url, a.url, {}, undefined, room.code);
        pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code, seatToken: you.seatToken });
        expect((await pad.next("welcome", (m) => m.you !== null)).you!.playerId).toBe(you.playerId);
        await pad.next("roster");
        return { pad, you };
      }),
    );
    for (const { you } of players) {
      expect(await b.hub.seatClock(room.code, you.playerId)).toBeDefined();
      expect(await a.hub.seatClock(room.code, you.playerId)).toBeUndefined();
    }

    // B serves the rest of the round: the late pad answers again, everyone answers the last prompt.
    stageB.send({ type: "host", action: "resume" });
    const resumed = await stageB.next("prompt", (m) => m.index === 1 && m.phase === "prompt");
    expect(resumed.promptId).toBe(second.promptId);
    await untilShown(resumed.showAt);
    for (const { pad, you } of pads) {
      const from = pad.messages.length;
      pad.send({ type: "answer", promptId: resumed.promptId, spot: spotOf(room.config.prompts[1]!.home), tapAt: Date.now() });
      const ack = await pad.next("answer-ack", (m) => m.promptId === resumed.promptId, from);
      if (!ack.accepted) throw new Error(`refused: ${ack.message}`);
      acked.push(`${you.playerId}:1`);
      totals.set(you.playerId, ack.total);
    }
    stageB.send({ type: "host", action: "end" });
    const standings = await stageB.next("standings", (m) => m.final);
    for (const row of standings.points) expect(row.points).toBe(totals.get(row.playerId));
    expect(await storedAnswers(room.id)).toEqual([...acked].sort());
    // The room ended on B, which let its lease go at once.
    await expect.poll(() => lease(room.id)).toBeNull();
    a.hub.leases!.startRenewing();
  });

  it("a node that finds its lease taken when its renewals resume drops the room and closes its sockets with 1012", async () => {
    const room = await openTestRoom(a.services.db);
    const stage = await openStage(a.url, SECRET, room);
    const { pad } = await joinPlayer(a.url, room.code, "Dee");
    a.hub.leases!.stopRenewing();
    await expect.poll(() => lease(room.id), { timeout: 5_000, interval: 100 }).toBeNull();
    const stageB = await openStage(b.url, SECRET, room);
    a.hub.leases!.startRenewing();
    expect((await stage.waitClose()).code).toBe(1012);
    expect((await pad.waitClose()).code).toBe(1012);
    expect(a.hub.leases!.holds(room.id)).toBe(false);
    expect(await lease(room.id)).toMatchObject({ nodeId: "node-b", fence: 2 });
    stageB.send({ type: "host", action: "end" });
    await stageB.next("standings", (m) => m.final);
  });
});

describe("Redis restarting mid-round", () => {
  it("the owner keeps serving, sets its lease again when Redis is back, and nothing is lost; a graceful stop lets the room go at once", async () => {
    const room = await openTestRoom(a.services.db, { prompts: 2, answerMs: 20_000 });
    const stage = await openStage(a.url, SECRET, room);
    const players = await Promise.all(["Eve", "Fin", "Gus", "Hal"].map((n) => joinPlayer(a.url, room.code, n)));
    const mine = await lease(room.id);
    expect(mine).toMatchObject({ nodeId: "node-a" });
    stage.send({ type: "host", action: "start" });
    const prompt = await stage.next("prompt", (m) => m.index === 0 && m.phase === "prompt");
    await untilShown(prompt.showAt);

    await redis.stop();
    // Half the class answers while Redis is away, past a whole lease time: all acknowledged.
    const acked: string[] = [];
    const answer = async ({ pad, you }: (typeof players)[number]) => {
      pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[0]!.home), tapAt: Date.now() });
      expect((await pad.next("answer-ack", (m) => m.promptId === prompt.promptId)).accepted).toBe(true);
      acked.push(`${you.playerId}:0`);
    };
    for (const p of players.slice(0, 2)) await answer(p);
    await new Promise((r) => setTimeout(r, a.hub.leases!.ttlMs + 500));
    // Nobody can take the room meanwhile: B cannot learn who has it, so its stage is asked to retry.
    const elsewhere = await ScriptedSocket.open(b.url, b.url, {}, undefined, room.code);
    elsewhere.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
    expect((await elsewhere.waitClose()).code).toBe(1013);

    await redis.start();
    await expect.poll(() => lease(room.id).catch(() => null), { timeout: 5_000, interval: 100 }).toEqual(mine);
    for (const p of players.slice(2)) await answer(p);
    expect(await storedAnswers(room.id)).toEqual([...acked].sort());
    expect(stage.closed).toBeNull();

    // A stops gracefully: its lease goes with it, so B takes the room at once (no TTL to wait) with the next fence.
    await a.close();
    a = undefined as unknown as TestServer; // closed: afterAll has nothing more to close
    expect(await admin.exists(leaseKey(room.id))).toBe(0);
    const stageB = await openStage(b.url, SECRET, room);
    expect(await lease(room.id)).toMatchObject({ nodeId: "node-b", fence: mine!.fence + 1 });
    stageB.send({ type: "host", action: "end" });
    await stageB.next("standings", (m) => m.final);
    const [row] = await b.services.db.select().from(roomLeases).where(and(eq(roomLeases.roomId, room.id), eq(roomLeases.nodeId, "node-b")));
    expect(row?.fence).toBe(mine!.fence + 1);
    expect(await storedAnswers(room.id)).toEqual([...acked].sort());
  });
});
