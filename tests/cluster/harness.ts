/**
 * The cluster tests' shared set-up: a migrated and seeded SQLite file, redis-server, three nodes and
 * nginx (server/cluster/local.ts), and classes playing through nginx with scripted stages and pads
 * that reconnect by themselves as the real pages do (server/scripted-rooms.ts). Every wait is bounded.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, expect } from "vitest";
import { closeDb, migrateDb, openDb, type Db } from "~/db/client.server";
import { answers, roomLeases } from "~/db/schema";
import { ERROR_CODES, type ErrorCode, type ServerMessage } from "~/game/protocol";
import { seedDemo } from "../../server/seed";
import { startCluster, type LocalCluster, type NodeProc } from "../../server/cluster/local";
import { joinPlayer, openStage, openTestRoom, spotOf, untilShown, type ScriptedSocket } from "../../server/scripted-rooms";

export const SECRET = "cluster-test-secret-0123456789abcdef0123";
/** Longest wait for any one message or answer; the fail-over itself must fit well inside. */
export const WAIT_MS = 30_000;
export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
/** Prompts in each test room. */
export const PROMPTS = 4;

export interface TestCluster {
  cluster: LocalCluster;
  db: Db;
  close(): Promise<void>;
}

async function openCluster(): Promise<TestCluster> {
  const dir = mkdtempSync(join(tmpdir(), "fretcall-cluster-"));
  const databaseUrl = `file:${join(dir, "cluster.db")}`;
  const db = await openDb(databaseUrl);
  await migrateDb(db);
  await seedDemo(db);
  try {
    // Mail is captured (no SMTP on a test machine); the nodes' logs are kept only for errors.
    const cluster = await startCluster({ nodes: 3, databaseUrl, secret: SECRET, dir, quiet: true, env: { MAIL_CAPTURE: "1", MAIL_DIR: join(dir, "mail"), LOG_LEVEL: "warn" } });
    return {
      cluster,
      db,
      async close() {
        await cluster.stop();
        await closeDb(db);
        rmSync(dir, { recursive: true, force: true });
      },
    };
  } catch (error) {
    await closeDb(db);
    throw error;
  }
}

/** The test file's own cluster with its classes in their lobbies: started before its tests, stopped after. */
export function classesOnCluster(rooms: number, padsEach: number) {
  const ctx = {} as { t: TestCluster; classes: Class[] };
  beforeAll(async () => {
    ctx.t = await openCluster();
    ctx.classes = await openClasses(ctx.t, rooms, padsEach);
  });
  afterAll(async () => {
    if (ctx.classes) closeClasses(ctx.classes);
    await ctx.t?.close();
  });
  return ctx;
}

export interface Pad {
  pad: ScriptedSocket;
  playerId: string;
}

export interface Class {
  room: Awaited<ReturnType<typeof openTestRoom>>;
  stage: ScriptedSocket;
  pads: Pad[];
}

/** An acknowledged answer: the pad's own record of what the server promised to keep. */
export interface Ack {
  roomId: string;
  playerId: string;
  promptIndex: number;
  points: number;
  /** The player's score after it. */
  total: number;
}

/** Classes of `padsEach` pads, each in the lobby of its own room, every socket through nginx. */
async function openClasses(t: TestCluster, rooms: number, padsEach: number): Promise<Class[]> {
  const url = t.cluster.url;
  return Promise.all(
    Array.from({ length: rooms }, async () => {
      const room = await openTestRoom(t.db, { prompts: PROMPTS, answerMs: 20_000, countdownMs: 300 });
      const stage = await openStage(url, SECRET, room, undefined, { reconnect: true });
      const pads: Pad[] = [];
      for (let i = 1; i <= padsEach; i++) {
        const { pad, you } = await joinPlayer(url, room.code, `P${i}`, undefined, { reconnect: true });
        pads.push({ pad, playerId: you.playerId });
      }
      return { room, stage, pads };
    }),
  );
}

/** The node holding the room (its fence row names it). */
export async function ownerOf(db: Db, roomId: string): Promise<string | undefined> {
  const [row] = await db.select({ nodeId: roomLeases.nodeId }).from(roomLeases).where(eq(roomLeases.roomId, roomId));
  return row?.nodeId;
}

export function nodeNamed(t: TestCluster, nodeId: string): NodeProc {
  return t.cluster.nodes.find((n) => n.nodeId === nodeId)!;
}

/** The room's phase as the socket last heard it. */
function phaseOf(socket: ScriptedSocket) {
  const last = [...socket.messages].reverse().find((m): m is Extract<ServerMessage, { phase: unknown }> => "phase" in m);
  return last?.phase;
}

/**
 * The teacher at the stage: a room rebuilt on another node comes back paused (the restart path),
 * and the teacher resumes it. Returns a stop function.
 */
export function teacherResumes(classes: Class[]) {
  const resumedAt = new Map<Class, number>();
  const timer = setInterval(() => {
    for (const c of classes) {
      if (phaseOf(c.stage) !== "paused" || (resumedAt.get(c) ?? -1) >= c.stage.messages.length) continue;
      resumedAt.set(c, c.stage.messages.length);
      c.stage.send({ type: "host", action: "resume" });
    }
  }, 200);
  return () => clearInterval(timer);
}

/** The id of the prompt the pads were shown at that index. */
export function lastPrompt(c: Class, index: number) {
  const m = c.pads[0]!.pad.messages.find((x) => x.type === "prompt" && x.index === index);
  return m?.type === "prompt" ? m.promptId : undefined;
}

/**
 * The stage starts the round, or moves on once the last prompt's reveal is up; resolves with the
 * prompt's id once every pad has it.
 */
export async function nextPrompt(c: Class, index: number, lastPromptId?: string) {
  if (lastPromptId) await c.stage.next("reveal", (m) => m.promptId === lastPromptId, 0, WAIT_MS);
  const from = c.pads.map((p) => p.pad.messages.length);
  c.stage.send({ type: "host", action: index === 0 ? "start" : "next" });
  const prompts = await Promise.all(c.pads.map((p, k) => p.pad.next("prompt", (m) => m.index === index, from[k], WAIT_MS)));
  return prompts[0]!.promptId;
}

/** Refusals a pad meets while its room moves (paused by the restart, a new countdown, a seat not yet back): it tries again. */
const RETRIED: ErrorCode[] = [ERROR_CODES.paused, ERROR_CODES.notOpen, ERROR_CODES.notJoined, ERROR_CODES.stopping];

/**
 * A pad's tap, sent again until the server answers it, as the real pad's queue does after a lost
 * connection (app/live/answerQueue.ts): a refusal while the room is paused, not yet open or not yet
 * joined on a new node is tried again once the prompt shows. Resolves with the ack.
 */
export async function answerUntilAcked(c: Class, p: Pad, index: number, promptId: string) {
  const until = Date.now() + WAIT_MS;
  const spot = spotOf(c.room.config.prompts[index]!.home);
  let refusal = "";
  while (Date.now() < until) {
    const from = p.pad.messages.length;
    p.pad.send({ type: "answer", promptId, spot, tapAt: Date.now() });
    const ack = await p.pad.next("answer-ack", (m) => m.promptId === promptId, from, 2_000).catch(() => null);
    if (ack?.accepted) return ack;
    if (ack && !RETRIED.includes(ack.code)) throw new Error(`answer refused: ${ack.code} ${ack.message}`);
    refusal = ack ? ack.code : "no reply";
    // The prompt as last sent (again after a resume): wait for its note to show.
    const prompt = [...p.pad.messages].reverse().find((m) => m.type === "prompt" && m.promptId === promptId);
    await (prompt?.type === "prompt" && prompt.showAt > Date.now() ? untilShown(prompt.showAt) : sleep(250));
  }
  throw new Error(`no ack within ${WAIT_MS / 1000} s (last: ${refusal})`);
}

/** Every pad of the class answers the prompt's home spot; each ack is recorded as it comes. */
export async function answerAll(c: Class, index: number, promptId: string, acks: Ack[], pads = c.pads) {
  await Promise.all(
    pads.map(async (p) => {
      const ack = await answerUntilAcked(c, p, index, promptId);
      acks.push({ roomId: c.room.id, playerId: p.playerId, promptIndex: index, points: ack.points, total: ack.total });
    }),
  );
}

/** Every class plays its first prompt; returns the acks so far and each room's owner then. */
export async function playFirstPrompt(t: TestCluster, classes: Class[]) {
  const acks: Ack[] = [];
  await Promise.all(classes.map(async (c) => answerAll(c, 0, await nextPrompt(c, 0), acks)));
  const owners = await Promise.all(classes.map((c) => ownerOf(t.db, c.room.id)));
  return { acks, owners };
}

/** Every class plays its prompts `from`… to the last, every pad answering each. */
export async function playOn(classes: Class[], from: number, acks: Ack[]) {
  for (let index = from; index < PROMPTS; index++) {
    await Promise.all(classes.map(async (c) => answerAll(c, index, await nextPrompt(c, index, lastPrompt(c, index - 1)), acks)));
  }
}

/** Nothing lost: an ack for every pad and prompt, each stored exactly once, and the scores they add up to. */
export async function expectEverythingKept(db: Db, classes: Class[], acks: Ack[]) {
  expect(acks).toHaveLength(classes.length * classes[0]!.pads.length * PROMPTS);
  await expectStoredOnce(db, classes, acks);
  expectScoresKept(acks);
}

/** Every acknowledged answer is stored exactly once, and nothing else is stored. */
async function expectStoredOnce(db: Db, classes: Class[], acks: Ack[]) {
  const rows = await db
    .select({ roomId: answers.roomId, playerId: answers.playerId, promptIndex: answers.promptIndex })
    .from(answers)
    .where(
      inArray(
        answers.roomId,
        classes.map((c) => c.room.id),
      ),
    );
  const key = (a: Pick<Ack, "roomId" | "playerId" | "promptIndex">) => `${a.roomId}/${a.playerId}/${a.promptIndex}`;
  const stored = rows.map(key).sort();
  const acked = [...new Set(acks.map(key))].sort();
  expect(stored.length, "rows stored").toBe(acked.length);
  expect(stored).toEqual(acked);
}

/** Scores intact: each player's last acknowledged total is the sum of the points of all its acks. */
function expectScoresKept(acks: Ack[]) {
  const players = new Map<string, Ack[]>();
  for (const a of acks) players.set(a.playerId, [...(players.get(a.playerId) ?? []), a]);
  for (const [playerId, mine] of players) {
    const last = mine.reduce((a, b) => (b.promptIndex > a.promptIndex ? b : a));
    expect(last.total, `score of ${playerId}`).toBe(mine.reduce((sum, a) => sum + a.points, 0));
  }
}

function closeClasses(classes: Class[]) {
  for (const c of classes) for (const s of [c.stage, ...c.pads.map((p) => p.pad)]) s.close();
}
