/**
 * Live-round load: N rooms × M scripted players over real WebSockets against the production
 * server (its own process group, its own SQLite file), then the same traffic through a bare `ws`
 * server (also its own process) as a baseline, in the same run. Loopback only; every wait is
 * bounded and the run stops itself. Prints figures; asserts nothing. This process is the load
 * generator and shares the machine's cores with the server it measures.
 *
 *   npx tsx bench/live.ts [rooms=50] [players=40] [prompts=5]
 *   npx tsx bench/live.ts --scale        # 10, 25, 50, 100 … rooms of 40 until a p99 passes 100 ms
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { performance } from "node:perf_hooks";
import { count, inArray, sql } from "drizzle-orm";
import { WebSocket, WebSocketServer } from "ws";
import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { answers } from "~/db/schema";
import { seedDemo } from "../server/seed";
import { joinPlayer, openStage, openTestRoom, spotOf, untilShown } from "../tests/integration/rooms";

const SECRET = "bench-secret-0123456789abcdef0123456789";
const LOOPBACK = "127.0.0.1";
/** Longest wait for any one message; a run that stalls fails instead of hanging. */
const WAIT_MS = 60_000;
/** Rooms joining at once while setting up (set-up is not measured). */
const JOIN_ROOMS_AT_ONCE = 10;

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = createServer().listen(0, LOOPBACK, () => {
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
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

// ---- child processes -----------------------------------------------------------------------

const children = new Set<ChildProcess>();
const killGroup = (child: ChildProcess, signal: NodeJS.Signals) => {
  try {
    process.kill(-child.pid!, signal);
  } catch {
    // already gone
  }
};

/** Node with the tsx loader, in its own process group so a kill reaches all of it. */
function spawnNode(args: string[], env: Record<string, string>) {
  const child = spawn(process.execPath, ["--import", "tsx", ...args], { env: { ...process.env, ...env }, stdio: ["ignore", "ignore", "inherit"], detached: true });
  children.add(child);
  child.once("exit", () => children.delete(child));
  return child;
}

async function stop(child: ChildProcess) {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((r) => child.once("exit", r));
  killGroup(child, "SIGTERM");
  // A graceful stop flushes the database; one that hangs is killed.
  if ((await Promise.race([exited.then(() => true), sleep(15_000).then(() => false)])) === false) killGroup(child, "SIGKILL");
  await exited;
}

/** Any HTTP answer means the port is up (the bare ws server answers plain HTTP with 426). */
async function waitListening(url: string, ok = (res: Response) => res.ok) {
  const until = Date.now() + 30_000;
  while (Date.now() < until) {
    try {
      if (ok(await fetch(url))) return;
    } catch {
      // not listening yet
    }
    await sleep(100);
  }
  throw new Error(`${url} did not come up within 30 s`);
}

// ---- the two sides ------------------------------------------------------------------------

/** One prompt on one side: fan-out times (host action → pad), then ack times (answer → its ack). */
interface Side {
  prompt(index: number, fanout: number[], ack: number[]): Promise<void>;
  close(): Promise<void>;
}

/** Resolves in batches of `size`, so set-up does not open thousands of sockets in one burst. */
async function inBatches<T, R>(items: T[], size: number, run: (item: T) => Promise<R>): Promise<R[]> {
  const out: R[] = [];
  for (let i = 0; i < items.length; i += size) out.push(...(await Promise.all(items.slice(i, i + size).map(run))));
  return out;
}

async function fretcall(roomsN: number, playersN: number, promptsN: number) {
  const dir = mkdtempSync(join(tmpdir(), "fretcall-bench-"));
  const databaseUrl = `file:${join(dir, "bench.db")}`;
  const db = await openDb(databaseUrl);
  await migrateDb(db);
  await seedDemo(db);
  const port = await freePort();
  const url = `http://${LOOPBACK}:${port}`;
  const server = spawnNode(["server/index.ts"], {
    NODE_ENV: "production",
    PORT: String(port),
    HOST: LOOPBACK,
    SESSION_SECRET: SECRET,
    SMTP_URL: `smtp://${LOOPBACK}:9`,
    DATABASE_URL: databaseUrl,
  });
  await waitListening(`${url}/healthz`);
  const rssBefore = rssKiB(server.pid!);
  const rooms = await Promise.all(Array.from({ length: roomsN }, () => openTestRoom(db, { prompts: promptsN, answerMs: 20_000, countdownMs: 0 })));
  const joined = await inBatches(rooms, JOIN_ROOMS_AT_ONCE, async (room) => {
    const stage = await openStage(url, SECRET, room);
    const pads = await inBatches(
      Array.from({ length: playersN }, (_, i) => `P${i + 1}`),
      20,
      async (name) => (await joinPlayer(url, room.code, name)).pad,
    );
    return { room, stage, pads };
  });
  await sleep(500);
  const memPerPlayerKiB = (rssKiB(server.pid!) - rssBefore) / (roomsN * playersN);
  let accepted = 0;
  let answeringMs = 0;

  const side: Side = {
    async prompt(index, fanout, ack) {
      const from = joined.map(({ stage, pads }) => ({ stage: stage.messages.length, pads: pads.map((p) => p.messages.length) }));
      const sentAt = performance.now();
      for (const { stage, room } of joined) {
        stage.send({ type: "host", action: index === 0 ? "start" : "next" });
        if (index > 0 && index % room.config.standingsEvery === 0) stage.send({ type: "host", action: "next" });
      }
      const prompts = await Promise.all(
        joined.map(({ pads }, r) =>
          Promise.all(
            pads.map(async (p, k) => {
              const m = await p.next("prompt", (x) => x.index === index, from[r]!.pads[k], WAIT_MS);
              fanout.push(performance.now() - sentAt);
              return m;
            }),
          ),
        ),
      );
      await untilShown(Math.max(...prompts.flat().map((m) => m.showAt)));
      const t0 = performance.now();
      await Promise.all(
        joined.flatMap(({ pads, room }, r) =>
          pads.map(async (p, k) => {
            const prompt = prompts[r]![k]!;
            const before = p.messages.length;
            const at = performance.now();
            p.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[index]!.home), tapAt: Date.now() });
            const a = await p.next("answer-ack", (m) => m.promptId === prompt.promptId, before, WAIT_MS);
            ack.push(performance.now() - at);
            if (a.accepted) accepted++;
          }),
        ),
      );
      answeringMs += performance.now() - t0;
      await Promise.all(joined.map(({ stage }, r) => stage.next("reveal", () => true, from[r]!.stage, WAIT_MS)));
    },
    async close() {
      for (const { stage, pads } of joined) for (const s of [stage, ...pads]) s.close();
      await stop(server);
    },
  };

  /** After close: what the database holds. Player ids are unique across rooms, so (player, prompt) names one expected answer. */
  const stored = async () => {
    const [row] = await db
      .select({ n: count(), distinct: sql<number>`count(distinct ${answers.playerId} || ':' || ${answers.promptIndex})` })
      .from(answers)
      .where(inArray(answers.roomId, rooms.map((r) => r.id)));
    await closeDb(db);
    rmSync(dir, { recursive: true, force: true });
    return { stored: row!.n, distinct: row!.distinct, expected: roomsN * playersN * promptsN, accepted, answersPerSecond: accepted / (answeringMs / 1000), memPerPlayerKiB };
  };
  return { side, stored };
}

/** The least a hub can do: a host's frame goes to its room's players, a player's frame comes back as its "ack". */
function bareServer(port: number) {
  const wss = new WebSocketServer({ port, host: LOOPBACK });
  const players = new Map<string, Set<WebSocket>>();
  wss.on("connection", (ws, req) => {
    const q = new URL(req.url!, `http://${LOOPBACK}`).searchParams;
    const room = q.get("room")!;
    const host = q.get("role") === "host";
    if (!host) {
      if (!players.has(room)) players.set(room, new Set());
      players.get(room)!.add(ws);
    }
    ws.on("message", (data: Buffer) => {
      if (host) for (const p of players.get(room) ?? []) p.send(data, { binary: false });
      else ws.send(data, { binary: false });
    });
  });
  process.once("SIGTERM", () => process.exit(0));
}

/** Next frame on a raw socket, parsed as the pads parse theirs. */
function nextFrame(ws: WebSocket) {
  return new Promise<unknown>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error("baseline: no frame in time")), WAIT_MS);
    ws.once("message", (data) => {
      clearTimeout(timer);
      resolve(JSON.parse(String(data)));
    });
  });
}

async function baseline(roomsN: number, playersN: number, promptsN: number): Promise<Side> {
  const port = await freePort();
  const server = spawnNode(["bench/live.ts", "--bare-ws", String(port)], {});
  await waitListening(`http://${LOOPBACK}:${port}/`, () => true);
  const open = (room: number, role: "host" | "player") =>
    new Promise<WebSocket>((resolve, reject) => {
      const ws = new WebSocket(`ws://${LOOPBACK}:${port}/?room=${room}&role=${role}`);
      ws.once("open", () => resolve(ws));
      ws.once("error", reject);
    });
  const rooms = await inBatches(
    Array.from({ length: roomsN }, (_, r) => r),
    JOIN_ROOMS_AT_ONCE,
    async (r) => ({ host: await open(r, "host"), players: await Promise.all(Array.from({ length: playersN }, () => open(r, "player"))) }),
  );
  // Frames the size of a real prompt and answer.
  const prompt = (i: number) =>
    JSON.stringify({ type: "prompt", promptId: `p${i + 1}`, index: i, total: promptsN, mode: "sprint", written: "E5", keyFifths: 0, printedAccidental: null, ledger: false, showAt: Date.now() + 300, deadline: Date.now() + 20_300, answerMs: 20_000, spotsToFind: null });
  const answer = (i: number) => JSON.stringify({ type: "answer", promptId: `p${i + 1}`, spot: { string: 1, fret: 5 }, tapAt: Date.now() });
  return {
    async prompt(i, fanout, ack) {
      const sentAt = performance.now();
      const arrived = rooms.flatMap(({ players }) => players.map((ws) => nextFrame(ws).then(() => fanout.push(performance.now() - sentAt))));
      for (const { host } of rooms) host.send(prompt(i));
      await Promise.all(arrived);
      await Promise.all(
        rooms.flatMap(({ players }) =>
          players.map(async (ws) => {
            const at = performance.now();
            const echoed = nextFrame(ws);
            ws.send(answer(i));
            await echoed;
            ack.push(performance.now() - at);
          }),
        ),
      );
    },
    async close() {
      for (const { host, players } of rooms) for (const ws of [host, ...players]) ws.close();
      await stop(server);
    },
  };
}

// ---- report --------------------------------------------------------------------------------

/** Both sides are set up first, then play their prompts in turn, so both see the same machine. */
async function report(roomsN: number, playersN: number, promptsN: number) {
  const f = await fretcall(roomsN, playersN, promptsN);
  const base = await baseline(roomsN, playersN, promptsN);
  const fc = { fanout: [] as number[], ack: [] as number[] };
  const bare = { fanout: [] as number[], ack: [] as number[] };
  for (let i = 0; i < promptsN; i++) {
    await f.side.prompt(i, fc.fanout, fc.ack);
    await base.prompt(i, bare.fanout, bare.ack);
  }
  await f.side.close();
  await base.close();
  const db = await f.stored();
  const row = {
    players: roomsN * playersN,
    fanoutP50: pct(fc.fanout, 50),
    fanoutP99: pct(fc.fanout, 99),
    ackP50: pct(fc.ack, 50),
    ackP99: pct(fc.ack, 99),
    baseFanoutP50: pct(bare.fanout, 50),
    baseFanoutP99: pct(bare.fanout, 99),
    baseAckP50: pct(bare.ack, 50),
    baseAckP99: pct(bare.ack, 99),
  };
  const load = readFileSync("/proc/loadavg", "utf8").split(" ").slice(0, 3).join(" ");
  console.log(`\n${roomsN} rooms × ${playersN} players (${row.players} pads), ${promptsN} prompts; load generator on the same cores (load average ${load})`);
  console.log(`  prompt fan-out    p50 ${fmt(row.fanoutP50)}   p99 ${fmt(row.fanoutP99)}   (host action → every pad, incl. the SQLite write)`);
  console.log(`  answer ack        p50 ${fmt(row.ackP50)}   p99 ${fmt(row.ackP99)}   (every pad answers at once; incl. the SQLite write)`);
  console.log(`  baseline fan-out  p50 ${fmt(row.baseFanoutP50)}   p99 ${fmt(row.baseFanoutP99)}   (bare ws broadcast, same sockets)`);
  console.log(`  baseline echo     p50 ${fmt(row.baseAckP50)}   p99 ${fmt(row.baseAckP99)}   (bare ws echo, same burst)`);
  console.log(`  p99 ratio         fan-out ${(row.fanoutP99 / row.baseFanoutP99).toFixed(2)}×, ack ${(row.ackP99 / row.baseAckP99).toFixed(2)}× of baseline`);
  console.log(
    `  answers           ${db.accepted} acknowledged, ${db.stored} stored of ${db.expected} (lost ${db.expected - db.distinct}, duplicated ${db.stored - db.distinct}); ${db.answersPerSecond.toFixed(0)} answers/s stored while answering`,
  );
  console.log(`  server memory     ${db.memPerPlayerKiB.toFixed(1)} KiB RSS per connected player`);
  return row;
}

const args = process.argv.slice(2);
if (args[0] === "--bare-ws") bareServer(Number(args[1]));
else {
  const scale = args.includes("--scale");
  // Bounded however the server behaves: children are killed and the run ends.
  const watchdog = setTimeout(
    () => {
      console.error("bench: time limit reached, stopping");
      for (const c of children) killGroup(c, "SIGKILL");
      process.exit(2);
    },
    (scale ? 40 : 8) * 60_000,
  );
  try {
    if (scale) {
      let last: number | null = null;
      for (const roomsN of [10, 25, 50, 100, 150, 200, 300]) {
        const row = await report(roomsN, 40, 3);
        if (row.fanoutP99 > 100 || row.ackP99 > 100) {
          console.log(`\np99 passed 100 ms at ${row.players} pads${last === null ? "" : `; last size under it: ${last} pads`}`);
          break;
        }
        last = row.players;
      }
    } else {
      const [roomsN = 50, playersN = 40, promptsN = 5] = args.map(Number);
      await report(roomsN, playersN, promptsN);
    }
  } finally {
    for (const c of children) killGroup(c, "SIGKILL");
    clearTimeout(watchdog);
  }
}
