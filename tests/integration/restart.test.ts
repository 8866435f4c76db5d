// The server process is killed (SIGKILL, no goodbye) or stopped (SIGTERM) mid-round and started
// again on the same database: every acknowledged answer must be there, every answer sent while it
// stopped gets a reply, and the phones take their seats back and send what they kept.
import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, openDb } from "~/db/client.server";
import { answers } from "~/db/schema";
import { ERROR_CODES, PROTOCOL_VERSION, type ServerMessage } from "~/game/protocol";
import { LATE_GRACE_MS } from "~/game/room";
import { seedDemo } from "../../server/seed";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket, spotOf, untilShown } from "../../server/scripted-rooms";

const SECRET = "restart-test-secret-0123456789abcdef0123";

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });

async function boot(port: number): Promise<ChildProcess> {
  // Node itself with the tsx loader: no npx in between, so start-up is quicker and steadier.
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    env: {
      ...process.env,
      NODE_ENV: "production",
      PORT: String(port),
      HOST: "127.0.0.1",
      SESSION_SECRET: SECRET,
      SMTP_URL: "smtp://127.0.0.1:9",
    },
    stdio: ["ignore", "ignore", "inherit"],
    // Its own process group, so a kill reaches everything it started.
    detached: true,
  });
  // Start-up on a busy machine can take several seconds.
  for (let i = 0; i < 300; i++) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}/healthz`)).ok) return child;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("server did not start");
}

const children: ChildProcess[] = [];
const killGroup = (child: ChildProcess, signal: NodeJS.Signals) => {
  try {
    process.kill(-child.pid!, signal);
  } catch {
    // already gone
  }
};
afterAll(() => {
  for (const c of children) killGroup(c, "SIGKILL");
});

/** A seeded database, a room in it, a server process on a free port, its stage and players joined. */
async function openRound(settings: { prompts: number; answerMs: number }, names: string[]) {
  const db = await openDb(process.env.DATABASE_URL!);
  await seedDemo(db);
  const room = await openTestRoom(db, settings);
  const port = await freePort();
  const url = `http://localhost:${port}`;
  const child = await boot(port);
  children.push(child);
  const stage = await openStage(url, SECRET, room);
  const players = await Promise.all(names.map((n) => joinPlayer(url, room.code, n)));
  return { db, room, port, url, child, stage, players };
}

describe("kill and restart mid-round", () => {
  it("keeps every acknowledged answer and resumes with scores intact", async () => {
    const opened = await openRound({ prompts: 4, answerMs: 3_000 }, ["Ines", "Jo", "Kit", "Lou", "Max"]);
    const { db, room, port, url, stage, players } = opened;
    let child = opened.child;
    stage.send({ type: "host", action: "start" });
    const acked: string[] = [];
    const totals = new Map<string, number>();
    const first = await stage.next("prompt", (m) => m.index === 0);
    await untilShown(first.showAt);
    for (const { pad, you } of players) {
      pad.send({ type: "answer", promptId: first.promptId, spot: spotOf(room.config.prompts[0]!.home), tapAt: Date.now() });
      const ack = await pad.next("answer-ack", (m) => m.promptId === first.promptId);
      if (ack.accepted) {
        acked.push(`${you.playerId}:0`);
        totals.set(you.playerId, ack.total);
      }
    }
    await stage.next("reveal");
    stage.send({ type: "host", action: "next" });
    const second = await stage.next("prompt", (m) => m.index === 1);
    await untilShown(second.showAt);
    // Two players answer the second prompt, then the process dies without warning.
    for (const { pad, you } of players.slice(0, 2)) {
      pad.send({ type: "answer", promptId: second.promptId, spot: spotOf(room.config.prompts[1]!.home), tapAt: Date.now() });
      const ack = await pad.next("answer-ack", (m) => m.promptId === second.promptId);
      if (ack.accepted) {
        acked.push(`${you.playerId}:1`);
        totals.set(you.playerId, ack.total);
      }
    }
    const exited = new Promise((r) => child.once("exit", r));
    killGroup(child, "SIGKILL");
    await exited;
    // Stay down past the prompt's deadline: time the server was away must not close the prompt.
    await untilShown(second.deadline + LATE_GRACE_MS);

    const stored = await db.select().from(answers).where(eq(answers.roomId, room.id));
    expect(stored.map((a) => `${a.playerId}:${a.promptIndex}`).sort()).toEqual([...acked].sort());

    child = await boot(port);
    children.push(child);
    const stage2 = await openStage(url, SECRET, room);
    expect((await stage2.next("welcome")).phase).toBe("paused");
    for (const { you } of players) {
      const pad = await ScriptedSocket.open(url);
      pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code, seatToken: you.seatToken });
      expect((await pad.next("welcome", (m) => m.you !== null)).you!.playerId).toBe(you.playerId);
    }
    stage2.send({ type: "host", action: "resume" });
    const resumed = await stage2.next("prompt", (m) => m.index === 1);
    expect(resumed.promptId).toBe(second.promptId);
    // Almost all the answer time is still there (only what passed before the last answer is spent).
    expect(resumed.deadline - resumed.showAt).toBeGreaterThan(room.config.answerMs - 1_000);
    const standings = await (async () => {
      stage2.send({ type: "host", action: "end" });
      return stage2.next("standings", (m) => m.final);
    })();
    for (const row of standings.points) expect(row.points).toBe(totals.get(row.playerId) ?? 0);
    killGroup(child, "SIGTERM");
    await closeDb(db);
  }, 60_000);
});

/** The answers a pad's socket received since message `from`. */
const acksSince = (pad: ScriptedSocket, from: number) =>
  pad.messages.slice(from).filter((m): m is Extract<ServerMessage, { type: "answer-ack" }> => m.type === "answer-ack");

/** A pad back on a new socket with its seat token, once its catch-up (which ends with the roster) is in. */
async function reseat(url: string, code: string, seatToken: string) {
  const pad = await ScriptedSocket.open(url);
  pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code, seatToken });
  await pad.next("welcome", (m) => m.you !== null);
  await pad.next("roster");
  return pad;
}

describe("a graceful stop (SIGTERM) mid-prompt", () => {
  it("replies to every answer that reaches it while stopping, and a resent answer is stored once after the restart", async () => {
    const opened = await openRound({ prompts: 2, answerMs: 20_000 }, ["Ada", "Bo", "Cas", "Dee", "Eli", "Fen"]);
    const { db, room, port, url, stage, players } = opened;
    let child = opened.child;
    stage.send({ type: "host", action: "start" });
    const prompt = await stage.next("prompt");
    await untilShown(prompt.showAt);
    const answer = { type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[0]!.home) };
    const from = players.map(({ pad }) => pad.messages.length);
    const [early, late] = [players.slice(0, 3), players.slice(3)];

    // Three answers are on their way as the server is told to stop…
    for (const { pad } of early) pad.send({ ...answer, tapAt: Date.now() });
    const exited = new Promise((r) => child.once("exit", r));
    killGroup(child, "SIGTERM");
    // …every socket hears that it is stopping, and three more answers arrive after that.
    for (const { pad } of players) await pad.next("error", (m) => m.code === ERROR_CODES.stopping);
    for (const { pad } of late) pad.send({ ...answer, tapAt: Date.now() });
    for (const { pad } of players) expect((await pad.waitClose(10_000)).code).toBe(1001);
    await exited;

    const replies = players.map(({ pad }, i) => acksSince(pad, from[i]!));
    for (const r of replies) expect(r).toHaveLength(1);
    for (const [r] of replies.slice(0, 3)) expect(r!.accepted || r!.code === ERROR_CODES.stopping).toBe(true);
    for (const [r] of replies.slice(3)) expect(r).toMatchObject({ accepted: false, code: ERROR_CODES.stopping, message: expect.stringMatching(/again/) });
    const acked = players.filter((_, i) => replies[i]![0]!.accepted).map((p) => p.you.playerId);
    const storedIds = async () => (await db.select().from(answers).where(eq(answers.roomId, room.id))).map((a) => a.playerId).sort();
    expect(await storedIds()).toEqual([...acked].sort());

    // Back up: every pad sends its answer again, as a pad that never got (or lost) the reply does.
    child = await boot(port);
    children.push(child);
    const stage2 = await openStage(url, SECRET, room);
    const pads = await Promise.all(players.map(({ you }) => reseat(url, room.code, you.seatToken)));
    const sent = pads.map((pad) => pad.messages.length);
    for (const pad of pads) pad.send({ ...answer, tapAt: Date.now() });
    const again = await Promise.all(pads.map((pad, i) => pad.next("answer-ack", () => true, sent[i])));
    players.forEach(({ you }, i) => {
      // A stored answer gets its ack again; the others wait, as the room came back paused.
      if (acked.includes(you.playerId)) expect(again[i]).toMatchObject({ accepted: true, promptId: prompt.promptId });
      else expect(again[i]).toMatchObject({ accepted: false, code: ERROR_CODES.paused });
    });
    stage2.send({ type: "host", action: "resume" });
    const resumed = await stage2.next("prompt", (m) => m.phase === "prompt");
    await untilShown(resumed.showAt);
    const waiting = pads.filter((_, i) => !again[i]!.accepted);
    const marks = waiting.map((pad) => pad.messages.length);
    for (const pad of waiting) pad.send({ ...answer, tapAt: Date.now() });
    for (const [i, pad] of waiting.entries()) expect(await pad.next("answer-ack", () => true, marks[i])).toMatchObject({ accepted: true });
    // Each pad's answer is stored exactly once.
    expect(await storedIds()).toEqual(players.map((p) => p.you.playerId).sort());
    killGroup(child, "SIGTERM");
    await closeDb(db);
  }, 90_000);
});

describe("a tap queued through a restart", () => {
  it("is stored if its prompt is still open, and refused as too late, with the reason, once it has closed", async () => {
    const opened = await openRound({ prompts: 3, answerMs: 20_000 }, ["Ana", "Ben", "Cy"]);
    const { db, room, port, url, stage } = opened;
    const [ana, ben, cy] = opened.players;
    let child = opened.child;
    stage.send({ type: "host", action: "start" });
    const prompt = await stage.next("prompt");
    await untilShown(prompt.showAt);
    const home = spotOf(room.config.prompts[0]!.home);
    cy!.pad.send({ type: "answer", promptId: prompt.promptId, spot: home, tapAt: Date.now() });
    expect(await cy!.pad.next("answer-ack")).toMatchObject({ accepted: true });
    // The server dies; Ana and Ben tap meanwhile, and their pads keep the taps.
    const exited = new Promise((r) => child.once("exit", r));
    killGroup(child, "SIGKILL");
    await exited;
    const tapped = { type: "answer", promptId: prompt.promptId, spot: home, tapAt: Date.now() };

    child = await boot(port);
    children.push(child);
    const stage2 = await openStage(url, SECRET, room);
    // Ana is back first: the room is paused, so her tap waits and goes in once the prompt is open again.
    const anaPad = await reseat(url, room.code, ana!.you.seatToken);
    anaPad.send(tapped);
    expect(await anaPad.next("answer-ack")).toMatchObject({ accepted: false, code: ERROR_CODES.paused });
    stage2.send({ type: "host", action: "resume" });
    const reopened = await stage2.next("prompt", (m) => m.phase === "prompt");
    await untilShown(reopened.showAt);
    const mark = anaPad.messages.length;
    anaPad.send(tapped);
    expect(await anaPad.next("answer-ack", () => true, mark)).toMatchObject({ accepted: true, promptId: prompt.promptId, diagnosis: { kind: "home-spot" } });

    // Ben comes back after the teacher closed the prompt: too late, and why.
    stage2.send({ type: "host", action: "skip" });
    await stage2.next("reveal");
    const benPad = await reseat(url, room.code, ben!.you.seatToken);
    benPad.send(tapped);
    expect(await benPad.next("answer-ack")).toMatchObject({ accepted: false, code: ERROR_CODES.tooLate, message: expect.stringMatching(/answer was shown/) });
    stage2.send({ type: "host", action: "next" });
    await benPad.next("prompt", (m) => m.index === 1);
    let from = benPad.messages.length;
    benPad.send(tapped);
    expect(await benPad.next("answer-ack", () => true, from)).toMatchObject({ accepted: false, code: ERROR_CODES.tooLate, message: expect.stringMatching(/moved on/) });
    from = benPad.messages.length;
    benPad.send({ ...tapped, promptId: "p9" });
    expect(await benPad.next("answer-ack", () => true, from)).toMatchObject({ accepted: false, code: ERROR_CODES.wrongPrompt, message: expect.stringMatching(/no prompt "p9"/) });

    const stored = await db.select().from(answers).where(eq(answers.roomId, room.id));
    expect(stored.map((a) => a.playerId).sort()).toEqual([ana!.you.playerId, cy!.you.playerId].sort());
    killGroup(child, "SIGTERM");
    await closeDb(db);
  }, 90_000);
});
