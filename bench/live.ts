/**
 * Live-round load: N rooms × M scripted players over real WebSockets against the production
 * server (its own process), then the same prompt fan-out through a bare `ws` broadcast server
 * as a baseline, in the same run. Prints figures; asserts nothing.
 *
 *   npx tsx bench/live.ts [rooms=50] [players=40] [prompts=5]
 *   npx tsx bench/live.ts --scale        # grow players per room until p99 passes 100 ms
 */
import { execSync, spawn } from "node:child_process";
import { mkdtempSync, readFileSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { count } from "drizzle-orm";
import { WebSocketServer, WebSocket } from "ws";
import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { answers } from "~/db/schema";
import { seedDemo } from "../server/seed";
import { joinPlayer, openStage, openTestRoom, spotOf, untilShown } from "../tests/integration/rooms";
import type { TestSocket } from "../tests/integration/socket";

const SECRET = "bench-secret-0123456789abcdef0123456789";

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });

function pct(values: number[], p: number) {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? NaN;
}
const fmt = (v: number) => `${v.toFixed(1)} ms`;
const rssKiB = (pid: number) => Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, "utf8"))![1]);

async function bootServer(databaseUrl: string) {
  const port = await freePort();
  const child = spawn("npx", ["tsx", "server/index.ts"], {
    env: { ...process.env, NODE_ENV: "production", PORT: String(port), HOST: "127.0.0.1", SESSION_SECRET: SECRET, SMTP_URL: "smtp://127.0.0.1:9", DATABASE_URL: databaseUrl },
    stdio: ["ignore", "ignore", "inherit"],
    detached: true,
  });
  for (let i = 0; i < 200; i++) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}/healthz`)).ok) break;
    } catch {
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  return { url: `http://localhost:${port}`, child, serverPid: listeningPid(port) };
}

/** npx → tsx → node: the server is the process that listens on the port (ss names it). */
function listeningPid(port: number): number {
  const out = execSync(`ss -ltnpH 'sport = :${port}'`, { encoding: "utf8" });
  return Number(/pid=(\d+)/.exec(out)?.[1] ?? 0);
}

interface Figures {
  fanout: number[];
  ack: number[];
  answersPerSecond: number;
  stored: number;
  expected: number;
  memPerPlayerKiB: number;
}

async function runFretcall(roomsN: number, playersN: number, promptsN: number): Promise<Figures> {
  const dir = mkdtempSync(join(tmpdir(), "fretcall-bench-"));
  const databaseUrl = `file:${join(dir, "bench.db")}`;
  const db = await openDb(databaseUrl);
  await migrateDb(db);
  await seedDemo(db);
  const server = await bootServer(databaseUrl);
  const rssBefore = rssKiB(server.serverPid);
  const roomsList = await Promise.all(Array.from({ length: roomsN }, () => openTestRoom(db, { prompts: promptsN, answerMs: 20_000, countdownMs: 0 })));
  const stages: TestSocket[] = [];
  const pads: TestSocket[][] = [];
  for (const room of roomsList) {
    stages.push(await openStage(server.url, SECRET, room));
    const joined: TestSocket[] = [];
    for (let i = 0; i < playersN; i += 20) {
      const batch = await Promise.all(Array.from({ length: Math.min(20, playersN - i) }, (_, k) => joinPlayer(server.url, room.code, `P${i + k + 1}`)));
      joined.push(...batch.map((b) => b.pad));
    }
    pads.push(joined);
  }
  await new Promise((r) => setTimeout(r, 500));
  const memPerPlayerKiB = (rssKiB(server.serverPid) - rssBefore) / (roomsN * playersN);

  const fanout: number[] = [];
  const ack: number[] = [];
  let answered = 0;
  let answeringMs = 0;
  for (let index = 0; index < promptsN; index++) {
    const sentAt = Date.now();
    const from = pads.map((room) => room.map((p) => p.messages.length));
    const stageFrom = stages.map((s) => s.messages.length);
    stages.forEach((s, r) => {
      const wantsStandings = index > 0 && index % roomsList[r]!.config.standingsEvery === 0;
      s.send({ type: "host", action: index === 0 ? "start" : "next" });
      if (wantsStandings) s.send({ type: "host", action: "next" });
    });
    const prompts = await Promise.all(
      pads.map((room, r) =>
        Promise.all(
          room.map(async (p, k) => {
            const m = await p.next("prompt", (x) => x.index === index, from[r]![k], 60_000);
            fanout.push(Date.now() - sentAt);
            return m;
          }),
        ),
      ),
    );
    await untilShown(Math.max(...prompts.flat().map((m) => m.showAt)));
    const t0 = Date.now();
    await Promise.all(
      pads.map((room, r) =>
        Promise.all(
          room.map(async (p, k) => {
            const prompt = prompts[r]![k]!;
            const before = p.messages.length;
            const at = Date.now();
            p.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(roomsList[r]!.config.prompts[index]!.home), tapAt: at });
            const a = await p.next("answer-ack", (m) => m.promptId === prompt.promptId, before, 60_000);
            ack.push(Date.now() - at);
            if (a.accepted) answered++;
          }),
        ),
      ),
    );
    answeringMs += Date.now() - t0;
    await Promise.all(stages.map((s, r) => s.next("reveal", () => true, stageFrom[r], 60_000)));
  }
  for (const room of pads) for (const p of room) p.close();
  for (const s of stages) s.close();
  const exited = new Promise((r) => server.child.once("exit", r));
  process.kill(-server.child.pid!, "SIGTERM");
  await exited;
  const [{ n }] = (await db.select({ n: count() }).from(answers)) as [{ n: number }];
  await closeDb(db);
  return { fanout, ack, answersPerSecond: answered / (answeringMs / 1000), stored: n, expected: roomsN * playersN * promptsN, memPerPlayerKiB };
}

/** Baseline: a bare ws server relaying a host's message to every socket in its room. */
async function runBaseline(roomsN: number, playersN: number, promptsN: number) {
  const port = await freePort();
  const wss = new WebSocketServer({ port, host: "127.0.0.1" });
  const members = new Map<string, Set<WebSocket>>();
  wss.on("connection", (ws, req) => {
    const room = new URL(req.url!, "http://x").searchParams.get("room")!;
    if (!members.has(room)) members.set(room, new Set());
    members.get(room)!.add(ws);
    ws.on("message", (data) => {
      const text = String(data);
      for (const peer of members.get(room)!) if (peer !== ws) peer.send(text);
    });
  });
  const open = (room: number) =>
    new Promise<WebSocket>((resolve) => {
      const ws = new WebSocket(`ws://127.0.0.1:${port}/?room=${room}`);
      ws.once("open", () => resolve(ws));
    });
  const hosts: WebSocket[] = [];
  const players: WebSocket[][] = [];
  for (let r = 0; r < roomsN; r++) {
    hosts.push(await open(r));
    players.push(await Promise.all(Array.from({ length: playersN }, () => open(r))));
  }
  const fanout: number[] = [];
  for (let i = 0; i < promptsN; i++) {
    const sentAt = Date.now();
    const arrived = players.flat().map(
      (ws) =>
        new Promise<void>((resolve) =>
          ws.once("message", () => {
            fanout.push(Date.now() - sentAt);
            resolve();
          }),
        ),
    );
    for (const h of hosts) h.send(JSON.stringify({ type: "prompt", index: i, written: "E5", showAt: sentAt + 300 }));
    await Promise.all(arrived);
  }
  for (const ws of [...hosts, ...players.flat()]) ws.close();
  wss.close();
  return fanout;
}

async function report(roomsN: number, playersN: number, promptsN: number) {
  const f = await runFretcall(roomsN, playersN, promptsN);
  const base = await runBaseline(roomsN, playersN, promptsN);
  const row = {
    rooms: roomsN,
    players: roomsN * playersN,
    fanoutP50: pct(f.fanout, 50),
    fanoutP99: pct(f.fanout, 99),
    ackP50: pct(f.ack, 50),
    ackP99: pct(f.ack, 99),
    baseP50: pct(base, 50),
    baseP99: pct(base, 99),
  };
  console.log(`\n${roomsN} rooms × ${playersN} players (${row.players} sockets), ${promptsN} prompts`);
  console.log(`  prompt fan-out   p50 ${fmt(row.fanoutP50)}   p99 ${fmt(row.fanoutP99)}   (host action → every pad, incl. the SQLite write)`);
  console.log(`  answer ack       p50 ${fmt(row.ackP50)}   p99 ${fmt(row.ackP99)}   (incl. the SQLite write)`);
  console.log(`  baseline fan-out p50 ${fmt(row.baseP50)}   p99 ${fmt(row.baseP99)}   (bare ws broadcast, same sockets)`);
  console.log(`  ratio p99 fan-out ${(row.fanoutP99 / row.baseP99).toFixed(2)}×, ack ${(row.ackP99 / row.baseP99).toFixed(2)}× of baseline`);
  console.log(`  answers stored   ${f.stored} of ${f.expected} expected (${f.stored === f.expected ? "none lost or duplicated" : "MISMATCH"}); ${f.answersPerSecond.toFixed(0)} answers/s while answering`);
  console.log(`  server memory    ${f.memPerPlayerKiB.toFixed(1)} KiB per connected player`);
  return row;
}

const args = process.argv.slice(2);
if (args.includes("--scale")) {
  for (const players of [40, 60, 80, 100, 140]) {
    const row = await report(50, players, 3);
    if (row.fanoutP99 > 100 || row.ackP99 > 100) {
      console.log(`\np99 passed 100 ms at ${row.players} players`);
      break;
    }
  }
} else {
  const [roomsN = 50, playersN = 40, promptsN = 5] = args.map(Number);
  await report(roomsN, playersN, promptsN);
}
