/**
 * Cluster capacity: how many pads three Fretcall nodes behind nginx (server/cluster/local.ts) hold
 * before a spread p99 passes 100 ms, beside one node alone on the same machine, in the same run.
 * Classes of 40 pads play as in bench/live.ts's spread phase: each room's host acts, and then each
 * pad taps, at its own moment within 2 s; the figures are the host action → prompt on each pad
 * (fan-out) and the tap → its ack (which includes the commit). The sizes grow until both sides pass
 * the limit. Loopback only; each class connects from its own loopback address (the per-address
 * limits are for a school's network, not for a load generator); every wait is bounded. Prints
 * figures; asserts nothing. The load generator, the nodes, nginx and Redis share this machine's cores.
 *
 *   npx tsx bench/cluster.ts [maxRooms=100]
 */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { performance } from "node:perf_hooks";
import { closeDb, migrateDb, openDb, type Db } from "~/db/client.server";
import { seedDemo } from "../server/seed";
import { freePort, killAllNow, startCluster, startNode } from "../server/cluster/local";
import { joinPlayer, openStage, openTestRoom, spotOf, untilShown, type ScriptedSocket } from "../server/scripted-rooms";

const SECRET = "bench-secret-0123456789abcdef0123456789";
const PADS_PER_ROOM = 40;
const PROMPTS = 3;
const SPREAD_MS = 2_000;
const LIMIT_MS = 100;
const WAIT_MS = 60_000;
const SIZES = [1, 2, 5, 10, 20, 30, 40, 60, 80, 100, 150];
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function pct(values: number[], p: number) {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? NaN;
}

/** Each class its own loopback address (127.0.0.0/8 is all loopback on Linux), never reused in a run. */
let classes = 0;
const nextAddress = () => {
  const n = ++classes;
  return `127.${10 + Math.floor(n / 62_500)}.${Math.floor(n / 250) % 250}.${(n % 250) + 1}`;
};

async function inBatches<T, R>(items: T[], size: number, run: (item: T) => Promise<R>) {
  const out: R[] = [];
  for (let i = 0; i < items.length; i += size) out.push(...(await Promise.all(items.slice(i, i + size).map(run))));
  return out;
}

interface Figures {
  fanout: number[];
  ack: number[];
  refused: number;
}

/** One size on one side: the rooms open, the classes join, PROMPTS spread prompts are played, the rooms end. */
async function measure(url: string, db: Db, rooms: number): Promise<Figures> {
  const figures: Figures = { fanout: [], ack: [], refused: 0 };
  const opened = await inBatches(Array.from({ length: rooms }), 10, async () => {
    const room = await openTestRoom(db, { prompts: PROMPTS, answerMs: 20_000, countdownMs: 0 });
    const from = nextAddress();
    const stage = await openStage(url, SECRET, room, from);
    const pads = await inBatches(
      Array.from({ length: PADS_PER_ROOM }, (_, i) => `P${i + 1}`),
      20,
      async (name) => (await joinPlayer(url, room.code, name, from)).pad,
    );
    return { room, stage, pads };
  });
  try {
    for (let index = 0; index < PROMPTS; index++) {
      const shown = await Promise.all(
        opened.map(async ({ room, stage, pads }) => {
          if (index > 0) await stage.next("reveal", () => true, 0, WAIT_MS);
          stage.messages.length = 0;
          await sleep(Math.random() * SPREAD_MS);
          const sentAt = performance.now();
          stage.send({ type: "host", action: index === 0 ? "start" : "next" });
          return Promise.all(
            pads.map(async (pad) => {
              const prompt = await pad.next("prompt", (m) => m.index === index, 0, WAIT_MS);
              figures.fanout.push(performance.now() - sentAt);
              return { pad, room, prompt };
            }),
          );
        }),
      );
      const pads = shown.flat();
      await untilShown(Math.max(...pads.map((p) => p.prompt.showAt)));
      await Promise.all(
        pads.map(async ({ pad, room, prompt }) => {
          await sleep(Math.random() * SPREAD_MS);
          const at = performance.now();
          pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[index]!.home), tapAt: Date.now() });
          const ack = await pad.next("answer-ack", (m) => m.promptId === prompt.promptId, 0, WAIT_MS);
          figures.ack.push(performance.now() - at);
          if (!ack.accepted) figures.refused++;
          // No history kept between prompts: the generator's own garbage would show up as latency.
          pad.messages.length = 0;
        }),
      );
    }
  } finally {
    for (const { stage, pads } of opened) {
      stage.send({ type: "host", action: "end" });
      for (const s of [stage, ...pads] as ScriptedSocket[]) s.close();
    }
  }
  return figures;
}

const cell = (values: number[]) => `${pct(values, 50).toFixed(1).padStart(7)} ${pct(values, 99).toFixed(1).padStart(7)}`;
const worst = (f: Figures) => Math.max(pct(f.fanout, 99), pct(f.ack, 99));

async function main() {
  const maxRooms = Number(process.argv[2] ?? 100);
  const dir = mkdtempSync(join(tmpdir(), "fretcall-bench-cluster-"));
  const databases: Db[] = [];
  const database = async (name: string) => {
    const url = `file:${join(dir, name)}`;
    const db = await openDb(url);
    await migrateDb(db);
    await seedDemo(db);
    databases.push(db);
    return { url, db };
  };
  const shared = await database("cluster.db");
  const alone = await database("single.db");
  const env = { MAIL_CAPTURE: "1", MAIL_DIR: join(dir, "mail"), LOG_LEVEL: "warn" };
  const cluster = await startCluster({ nodes: 3, databaseUrl: shared.url, secret: SECRET, dir, quiet: true, env });
  const single = await startNode({ port: await freePort(), id: "single", databaseUrl: alone.url, secret: SECRET, quiet: true, env });
  const sides = [
    { name: "3 nodes + nginx", url: cluster.url, db: shared.db, capacity: 0, passed: false },
    { name: "1 node", url: `http://${single.address}`, db: alone.db, capacity: 0, passed: false },
  ];
  try {
    console.log(`classes of ${PADS_PER_ROOM} pads, ${PROMPTS} prompts each; host actions and taps spread over ${SPREAD_MS / 1000} s; ms`);
    console.log(`${"pads".padStart(6)}  ${"side".padEnd(16)} ${"fan-out p50/p99".padStart(15)}  ${"ack p50/p99".padStart(15)}  refused`);
    for (const rooms of SIZES.filter((r) => r <= maxRooms)) {
      for (const side of sides.filter((s) => !s.passed)) {
        const f = await measure(side.url, side.db, rooms);
        const pads = rooms * PADS_PER_ROOM;
        console.log(`${String(pads).padStart(6)}  ${side.name.padEnd(16)} ${cell(f.fanout)}  ${cell(f.ack)}  ${f.refused}`);
        if (worst(f) > LIMIT_MS) side.passed = true;
        else side.capacity = pads;
      }
      if (sides.every((s) => s.passed)) break;
    }
    const load = readFileSync("/proc/loadavg", "utf8").split(" ").slice(0, 3).join(" ");
    console.log(`\ncapacity (most pads with both spread p99s under ${LIMIT_MS} ms; load average ${load}):`);
    for (const s of sides) console.log(`  ${s.name.padEnd(16)} ${s.capacity} pads${s.passed ? "" : ` (still under the limit at the largest size tried)`}`);
  } finally {
    await Promise.all([cluster.stop(), single.stop()]);
    for (const db of databases) await closeDb(db);
    rmSync(dir, { recursive: true, force: true });
  }
}

// Bounded however the servers behave: children are killed and the run ends.
const watchdog = setTimeout(() => {
  console.error("bench: time limit reached, stopping");
  killAllNow();
  process.exit(2);
}, 30 * 60_000);
await main();
clearTimeout(watchdog);
