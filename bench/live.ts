/**
 * Live-round load: N rooms × M scripted players over real WebSockets against the production
 * server (its own process group, its own SQLite file), then the same traffic through a bare `ws`
 * server (also its own process) as a baseline, in the same run. Loopback only; every wait is
 * bounded and the run stops itself. Prints figures; asserts nothing. This process is the load
 * generator and shares the machine's cores with the server it measures.
 *
 *   npx tsx bench/live.ts [rooms=50] [players=40] [prompts=5]
 *   npx tsx bench/live.ts --scale        # 10, 25, 50, 100 … rooms of 40 until a spread p99 passes 100 ms
 *   BENCH_PROFILE=dir npx tsx bench/live.ts   # also writes CPU profiles of both servers to dir
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { performance } from "node:perf_hooks";
import { count, inArray, sql } from "drizzle-orm";
import { createClient } from "@libsql/client";
import { WebSocket, WebSocketServer } from "ws";
import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { answers } from "~/db/schema";
import { seedDemo } from "../server/seed";
import { joinPlayer, openStage, openTestRoom, spotOf, untilShown } from "../server/scripted-rooms";

const SECRET = "bench-secret-0123456789abcdef0123456789";
const LOOPBACK = "127.0.0.1";
/** Longest wait for any one message; a run that stalls fails instead of hanging. */
const WAIT_MS = 60_000;
/** Rooms joining at once while setting up (set-up is not measured). */
const JOIN_ROOMS_AT_ONCE = 10;
/**
 * Classes act on their own: host actions, and taps after the note shows, come spread over this
 * long; the last prompt is a burst (every host, then every pad, at the same instant) to find the capacity.
 */
const TAPS_OVER_MS = 2_000;
const TARGET_P99_MS = 50;
/** Fretcall's p99s against the committing relay's, its burst throughput against the relay's, memory per pad. */
const TARGET_RATIO = 1.5;
const TARGET_THROUGHPUT = 0.5;
const TARGET_KIB_PER_PAD = 8;
/** --scale grows the school until a spread p99 passes this. */
const SCALE_LIMIT_MS = 100;

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
/** This process's soft limit on open files (each socket is one). */
const openFileLimit = () => Number(/Max open files\s+(\d+)/.exec(readFileSync("/proc/self/limits", "utf8"))![1]);
/** A loopback address of its own for class `r` (all of 127.0.0.0/8 reaches the server on 127.0.0.1). */
const classAddress = (r: number) => `127.1.${r >> 8}.${(r & 255) + 1}`;
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
  const child = spawn(process.execPath, [...(process.env.BENCH_PROFILE ? ["--cpu-prof", `--cpu-prof-dir=${process.env.BENCH_PROFILE}`] : []), "--import", "tsx", ...args], { env: { ...process.env, ...env }, stdio: ["ignore", "ignore", "inherit"], detached: true });
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

/**
 * One prompt on one side: each room's host acts after its delay in `hosts` and the fan-out times
 * (that room's host action → each of its pads) go to `into.fanout`; then each pad answers after its
 * delay in `taps` and the ack times (answer → its ack) go to `into.ack`.
 */
interface Side {
  prompt(index: number, hosts: number[], taps: number[], into: Phase): Promise<void>;
  close(): Promise<void>;
  /** Server RSS added per connected pad, measured once all have joined. */
  memPerPlayerKiB: number;
}

interface Phase {
  fanout: number[];
  ack: number[];
  /** From the first tap to the last ack. */
  ackSpanMs: number;
}

/** Spread: host actions and taps over TAPS_OVER_MS, as independent classes do. Burst: every one at once. */
interface Samples {
  spread: Phase;
  burst: Phase;
}

const newSamples = (): Samples => ({ spread: { fanout: [], ack: [], ackSpanMs: 0 }, burst: { fanout: [], ack: [], ackSpanMs: 0 } });

/** Same delays for both sides (mulberry32, fixed seed); all zero for the burst. */
function delaysFor(n: number, seed: number, burst: boolean): number[] {
  let a = 0x9e3779b9 ^ seed;
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
    // Each class from its own address, as from its own school: one address would hit the per-address connection limit.
    const from = classAddress(rooms.indexOf(room));
    const stage = await openStage(url, SECRET, room, from);
    const pads = await inBatches(
      Array.from({ length: playersN }, (_, i) => `P${i + 1}`),
      20,
      async (name) => (await joinPlayer(url, room.code, name, from)).pad,
    );
    return { room, stage, pads };
  });
  await sleep(500);
  const memPerPlayerKiB = (rssKiB(server.pid!) - rssBefore) / (roomsN * playersN);
  let accepted = 0;

  const side: Side = {
    memPerPlayerKiB,
    async prompt(index, hosts, taps, into) {
      const from = joined.map(({ stage, pads }) => ({ stage: stage.messages.length, pads: pads.map((p) => p.messages.length) }));
      const rooms = await Promise.all(
        joined.map(async ({ stage, pads, room }, r) => {
          if (hosts[r]! > 0) await sleep(hosts[r]!);
          const sentAt = performance.now();
          stage.send({ type: "host", action: index === 0 ? "start" : "next" });
          if (index > 0 && index % room.config.standingsEvery === 0) stage.send({ type: "host", action: "next" });
          return Promise.all(
            pads.map(async (pad, k) => {
              const prompt = await pad.next("prompt", (x) => x.index === index, from[r]!.pads[k]!, WAIT_MS);
              into.fanout.push(performance.now() - sentAt);
              return { pad, room, prompt };
            }),
          );
        }),
      );
      const pads = rooms.flat();
      await untilShown(Math.max(...pads.map((p) => p.prompt.showAt)));
      into.ackSpanMs = await tapAll(
        pads,
        taps,
        async ({ pad, room, prompt }) => {
          const before = pad.messages.length;
          const at = performance.now();
          pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[index]!.home), tapAt: Date.now() });
          const a = await pad.next("answer-ack", (m) => m.promptId === prompt.promptId, before, WAIT_MS);
          into.ack.push(performance.now() - at);
          if (a.accepted) accepted++;
        },
      );
      await Promise.all(joined.map(({ stage }, r) => stage.next("reveal", () => true, from[r]!.stage, WAIT_MS)));
      // The generator keeps no history between prompts: long-lived garbage would slow its own
      // collector and show up as latency that is not the server's.
      for (const { stage, pads } of joined) for (const s of [stage, ...pads]) s.messages.length = 0;
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
    return { stored: row!.n, distinct: row!.distinct, expected: roomsN * playersN * promptsN, accepted };
  };
  return { side, stored };
}

/**
 * The least a hub can do: a host's frame goes to its room's players, a player's frame comes back
 * as its "ack". Given a database file, each player's frame is first stored there, with the same
 * durability as Fretcall's answers (WAL, synchronous=FULL, one commit for all that arrived
 * together): the floor for an ack that survives a power cut.
 */
async function bareServer(port: number, dbFile: string | undefined) {
  const db = dbFile ? createClient({ url: `file:${dbFile}` }) : null;
  if (db) {
    for (const pragma of ["journal_mode = WAL", "synchronous = FULL"]) await db.execute(`PRAGMA ${pragma}`);
    await db.execute("CREATE TABLE frames (body TEXT NOT NULL)");
  }
  let pending: { ws: WebSocket; data: Buffer }[] = [];
  const flush = async () => {
    const frames = pending;
    pending = [];
    await db!.batch([{ sql: `INSERT INTO frames (body) VALUES ${frames.map(() => "(?)").join(", ")}`, args: frames.map((f) => f.data.toString("utf8")) }], "write");
    for (const f of frames) f.ws.send(f.data, { binary: false });
  };
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
      else if (!db) ws.send(data, { binary: false });
      else if (pending.push({ ws, data }) === 1) setImmediate(() => void flush());
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

async function baseline(roomsN: number, playersN: number, promptsN: number, dbFile?: string): Promise<Side> {
  const port = await freePort();
  const server = spawnNode(["bench/live.ts", "--bare-ws", String(port), ...(dbFile ? [dbFile] : [])], {});
  await waitListening(`http://${LOOPBACK}:${port}/`, () => true);
  const rssBefore = rssKiB(server.pid!);
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
    JSON.stringify({ type: "prompt", promptId: `p${i + 1}`, index: i, total: promptsN, mode: "sprint", showAt: Date.now() + 300, deadline: Date.now() + 20_300, answerMs: 20_000 });
  const answer = (i: number) => JSON.stringify({ type: "answer", promptId: `p${i + 1}`, spot: { string: 1, fret: 5 }, tapAt: Date.now() });
  await sleep(500);
  return {
    memPerPlayerKiB: (rssKiB(server.pid!) - rssBefore) / (roomsN * playersN),
    async prompt(i, hosts, taps, into) {
      await Promise.all(
        rooms.map(async ({ host, players }, r) => {
          if (hosts[r]! > 0) await sleep(hosts[r]!);
          const sentAt = performance.now();
          const arrived = players.map((ws) => nextFrame(ws).then(() => into.fanout.push(performance.now() - sentAt)));
          host.send(prompt(i));
          await Promise.all(arrived);
        }),
      );
      into.ackSpanMs = await tapAll(
        rooms.flatMap(({ players }) => players),
        taps,
        async (ws) => {
          const at = performance.now();
          const echoed = nextFrame(ws);
          ws.send(answer(i));
          await echoed;
          into.ack.push(performance.now() - at);
        },
      );
    },
    async close() {
      for (const { host, players } of rooms) for (const ws of [host, ...players]) ws.close();
      await stop(server);
    },
  };
}

// ---- report --------------------------------------------------------------------------------

const cell = (values: number[]) => `${fmt(pct(values, 50)).padStart(9)} ${fmt(pct(values, 99)).padStart(9)}`;

/** p50 and p99 of one figure on the three servers, and Fretcall's p99 against the committing relay's (the floor for a durable ack). */
function line(label: string, ours: number[], bare: number[], durable: number[]) {
  const row = { p99: pct(ours, 99), baseP99: pct(durable, 99) };
  const meets = row.p99 < TARGET_P99_MS && row.p99 <= TARGET_RATIO * row.baseP99;
  console.log(
    `  ${label.padEnd(16)} ${cell(ours)}   ${cell(bare)}   ${cell(durable)}   ${`${(row.p99 / row.baseP99).toFixed(2)}×`.padStart(7)}  ${meets ? "meets" : "misses"}`,
  );
  return row;
}

/** The three servers are set up first, then play each prompt in turn, so all see the same machine. */
async function report(roomsN: number, playersN: number, promptsN: number) {
  const f = await fretcall(roomsN, playersN, promptsN);
  const base = await baseline(roomsN, playersN, promptsN);
  const durableDir = mkdtempSync(join(tmpdir(), "fretcall-bench-bare-"));
  const durable = await baseline(roomsN, playersN, promptsN, join(durableDir, "frames.db"));
  const sides = [f.side, base, durable];
  const samples = sides.map(newSamples);
  for (let i = 0; i < promptsN; i++) {
    const burst = i === promptsN - 1;
    const hosts = delaysFor(roomsN, 1000 + i, burst);
    const taps = delaysFor(roomsN * playersN, i, burst);
    for (const [k, side] of sides.entries()) await side.prompt(i, hosts, taps, burst ? samples[k]!.burst : samples[k]!.spread);
  }
  for (const side of sides) await side.close();
  rmSync(durableDir, { recursive: true, force: true });
  const db = await f.stored();
  const [fc, bare, stored] = samples as [Samples, Samples, Samples];
  const load = readFileSync("/proc/loadavg", "utf8").split(" ").slice(0, 3).join(" ");
  console.log(`\n${roomsN} rooms × ${playersN} players (${roomsN * playersN} pads), ${promptsN} prompts; load generator on the same cores (load average ${load})`);
  console.log(`target: Fretcall's p99 under ${TARGET_P99_MS} ms and within ${TARGET_RATIO}× of the bare ws + commit server's`);
  console.log(`acks include the SQLite commit (synchronous=FULL); "bare ws + commit" stores each answer the same way before echoing it`);
  const head = `  ${"".padEnd(16)} ${"Fretcall p50/p99".padStart(19)}   ${"bare ws p50/p99".padStart(19)}   ${"bare ws + commit".padStart(19)}   p99 ratio`;
  console.log(`spread (${promptsN - 1} prompts): each room's host acts, and then each pad taps, at its own moment within ${TAPS_OVER_MS / 1000} s`);
  console.log(head);
  const fanout = line("prompt fan-out", fc.spread.fanout, bare.spread.fanout, stored.spread.fanout);
  const ack = line("answer ack", fc.spread.ack, bare.spread.ack, stored.spread.ack);
  console.log(`burst (last prompt): every host at the same instant, then every pad at the same instant`);
  console.log(head);
  line("prompt fan-out", fc.burst.fanout, bare.burst.fanout, stored.burst.fanout);
  line("answer ack", fc.burst.ack, bare.burst.ack, stored.burst.ack);
  const rate = (p: Phase) => p.ack.length / (p.ackSpanMs / 1000);
  const share = rate(fc.burst) / rate(stored.burst);
  console.log(
    `  burst throughput: Fretcall ${rate(fc.burst).toFixed(0)} answers/s stored and acknowledged; bare ws echo ${rate(bare.burst).toFixed(0)}/s; bare ws + commit ${rate(stored.burst).toFixed(0)}/s (${share.toFixed(2)} of it, ${share >= TARGET_THROUGHPUT ? "meets" : "misses"} ≥ ${TARGET_THROUGHPUT})`,
  );
  console.log(`answers: ${db.accepted} acknowledged, ${db.stored} stored of ${db.expected} (lost ${db.expected - db.distinct}, duplicated ${db.stored - db.distinct})`);
  const kib = (side: Side) => side.memPerPlayerKiB.toFixed(1);
  console.log(
    `server memory per connected pad (RSS): Fretcall ${kib(f.side)} KiB (${f.side.memPerPlayerKiB <= TARGET_KIB_PER_PAD ? "meets" : "misses"} ≤ ${TARGET_KIB_PER_PAD}); bare ws ${kib(base)} KiB; bare ws + commit ${kib(durable)} KiB`,
  );
  return { players: roomsN * playersN, worstP99: Math.max(fanout.p99, ack.p99) };
}

const args = process.argv.slice(2);
if (args[0] === "--bare-ws") await bareServer(Number(args[1]), args[2]);
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
        // This process holds every socket of all three servers at once (pads and stages).
        const sockets = 3 * roomsN * 41;
        if (sockets + 200 > openFileLimit()) {
          console.log(
            `\nstopped before ${roomsN} rooms: the load generator would need ${sockets} sockets, over its open-file limit of ${openFileLimit()}; spread p99 stayed under ${SCALE_LIMIT_MS} ms up to ${last ?? 0} pads`,
          );
          break;
        }
        const row = await report(roomsN, 40, 3);
        if (row.worstP99 > SCALE_LIMIT_MS) {
          console.log(`\nspread p99 passed ${SCALE_LIMIT_MS} ms at ${row.players} pads${last === null ? "" : `; last size under it: ${last} pads`}`);
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
