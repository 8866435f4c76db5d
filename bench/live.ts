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
/** Taps come over this long after the note shows, as a class's do; the last prompt is a burst (all at once) to find the capacity. */
const TAPS_OVER_MS = 2_000;

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

/** One prompt on one side: fan-out times (host action → pad), then ack times (answer → its ack), taps after `delays`. */
interface Side {
  prompt(index: number, delays: number[], into: Samples): Promise<void>;
  close(): Promise<void>;
}

interface Samples {
  fanout: number[];
  ack: number[];
  /** Ack times and span of the burst prompt. */
  burst: number[];
  burstMs: number;
}

const newSamples = (): Samples => ({ fanout: [], ack: [], burst: [], burstMs: 0 });

/** Same tap times for both sides (mulberry32, fixed seed); all zero for the burst. */
function tapDelays(n: number, index: number, burst: boolean): number[] {
  let a = 0x9e3779b9 ^ index;
  const rand = () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return Array.from({ length: n }, () => (burst ? 0 : rand() * TAPS_OVER_MS));
}

/** Runs `tap` for each item after its delay; resolves with the time from the start to the last reply. */
async function tapAll<T>(items: T[], delays: number[], tap: (item: T) => Promise<void>): Promise<number> {
  const t0 = performance.now();
  await Promise.all(
    items.map(async (item, i) => {
      if (delays[i]! > 0) await sleep(delays[i]!);
      await tap(item);
    }),
  );
  return performance.now() - t0;
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

  const side: Side = {
    async prompt(index, delays, into) {
      const from = joined.map(({ stage, pads }) => ({ stage: stage.messages.length, pads: pads.map((p) => p.messages.length) }));
      const sentAt = performance.now();
      for (const { stage, room } of joined) {
        stage.send({ type: "host", action: index === 0 ? "start" : "next" });
        if (index > 0 && index % room.config.standingsEvery === 0) stage.send({ type: "host", action: "next" });
      }
      const pads = joined.flatMap(({ pads, room }, r) => pads.map((pad, k) => ({ pad, room, from: from[r]!.pads[k]! })));
      const prompts = await Promise.all(
        pads.map(async ({ pad, from }) => {
          const m = await pad.next("prompt", (x) => x.index === index, from, WAIT_MS);
          into.fanout.push(performance.now() - sentAt);
          return m;
        }),
      );
      await untilShown(Math.max(...prompts.map((m) => m.showAt)));
      const acks = delays.every((d) => d === 0) ? into.burst : into.ack;
      const span = await tapAll(
        pads.map((p, i) => ({ ...p, prompt: prompts[i]! })),
        delays,
        async ({ pad, room, prompt }) => {
          const before = pad.messages.length;
          const at = performance.now();
          pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[index]!.home), tapAt: Date.now() });
          const a = await pad.next("answer-ack", (m) => m.promptId === prompt.promptId, before, WAIT_MS);
          acks.push(performance.now() - at);
          if (a.accepted) accepted++;
        },
      );
      if (acks === into.burst) into.burstMs = span;
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
    return { stored: row!.n, distinct: row!.distinct, expected: roomsN * playersN * promptsN, accepted, memPerPlayerKiB };
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
    async prompt(i, delays, into) {
      const sentAt = performance.now();
      const arrived = rooms.flatMap(({ players }) => players.map((ws) => nextFrame(ws).then(() => into.fanout.push(performance.now() - sentAt))));
      for (const { host } of rooms) host.send(prompt(i));
      await Promise.all(arrived);
      const acks = delays.every((d) => d === 0) ? into.burst : into.ack;
      const span = await tapAll(
        rooms.flatMap(({ players }) => players),
        delays,
        async (ws) => {
          const at = performance.now();
          const echoed = nextFrame(ws);
          ws.send(answer(i));
          await echoed;
          acks.push(performance.now() - at);
        },
      );
      if (acks === into.burst) into.burstMs = span;
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
  const fc = newSamples();
  const bare = newSamples();
  for (let i = 0; i < promptsN; i++) {
    const delays = tapDelays(roomsN * playersN, i, i === promptsN - 1);
    await f.side.prompt(i, delays, fc);
    await base.prompt(i, delays, bare);
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
  console.log(`  answer ack        p50 ${fmt(row.ackP50)}   p99 ${fmt(row.ackP99)}   (taps spread over ${TAPS_OVER_MS / 1000} s; incl. the SQLite write)`);
  console.log(`  baseline fan-out  p50 ${fmt(row.baseFanoutP50)}   p99 ${fmt(row.baseFanoutP99)}   (bare ws broadcast, same sockets)`);
  console.log(`  baseline echo     p50 ${fmt(row.baseAckP50)}   p99 ${fmt(row.baseAckP99)}   (bare ws echo, same taps)`);
  console.log(`  p99 ratio         fan-out ${(row.fanoutP99 / row.baseFanoutP99).toFixed(2)}×, ack ${(row.ackP99 / row.baseAckP99).toFixed(2)}× of baseline`);
  console.log(
    `  answers           ${db.accepted} acknowledged, ${db.stored} stored of ${db.expected} (lost ${db.expected - db.distinct}, duplicated ${db.stored - db.distinct})`,
  );
  console.log(
    `  burst (last prompt, every pad at once)   ${(fc.burst.length / (fc.burstMs / 1000)).toFixed(0)} answers/s stored and acknowledged; ack p99 ${fmt(pct(fc.burst, 99))} (bare ws echo ${fmt(pct(bare.burst, 99))})`,
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
