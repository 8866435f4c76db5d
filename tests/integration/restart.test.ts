// The server process is killed (SIGKILL, no goodbye) mid-round and started again on the same
// database: every acknowledged answer must be there, and the phones take their seats back.
import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, openDb } from "~/db/client.server";
import { answers } from "~/db/schema";
import { PROTOCOL_VERSION } from "~/game/protocol";
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

describe("kill and restart mid-round", () => {
  it("keeps every acknowledged answer and resumes with scores intact", async () => {
    const db = await openDb(process.env.DATABASE_URL!);
    await seedDemo(db);
    const room = await openTestRoom(db, { prompts: 4, answerMs: 3_000 });
    const port = await freePort();
    const url = `http://localhost:${port}`;
    let child = await boot(port);
    children.push(child);

    const stage = await openStage(url, SECRET, room);
    const players = await Promise.all(["Ines", "Jo", "Kit", "Lou", "Max"].map((n) => joinPlayer(url, room.code, n)));
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
