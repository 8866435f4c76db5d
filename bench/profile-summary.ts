/**
 * Summarises V8 CPU profiles (`node --cpu-prof`, as `BENCH_PROFILE=dir npx tsx bench/live.ts` writes
 * them): the top functions by self time, as a share of the thread's busy time (idle and GC shown apart),
 * and the hub's busy time by what it was doing (each sample counted under the first of CATEGORIES
 * that a frame of its stack matches, leaf to root).
 *
 *   npx tsx bench/profile-summary.ts <file.cpuprofile | dir> [top=25]
 */
import { readdirSync, readFileSync, statSync } from "node:fs";
import { basename, join } from "node:path";

interface CallFrame {
  functionName: string;
  url: string;
  lineNumber: number;
}
interface ProfileNode {
  id: number;
  callFrame: CallFrame;
  children?: number[];
}
interface Profile {
  nodes: ProfileNode[];
  samples: number[];
  timeDeltas: number[];
}

const place = (url: string, line: number) => {
  const at = url.replace(/^file:\/\//, "").replace(/.*\/node_modules\//, "~/");
  return at ? `${at.split("/").slice(-2).join("/")}:${line + 1}` : "";
};

/** What the live hub's main thread does, by the frames on the stack (server/ and the ws library). */
const CATEGORIES: [string, (f: CallFrame) => boolean][] = [
  ["timing round trips and the heartbeat (pings, pongs)", (f) => f.url.endsWith("server/round-trips.ts") || (f.url.endsWith("server/sockets.ts") && f.functionName !== "attachSockets")],
  ["taking in messages (parse, check, reducer step, handing the write over)", (f) => f.url.endsWith("server/hub.ts") && ["onMessage", "handle", ""].includes(f.functionName)],
  ["sending (deliveries, uncorking, writing frames)", (f) => ["uncorkAll", "deliver", "sendNow"].includes(f.functionName)],
  ["group commit and the hop to the writer thread", (f) => /(rooms\/store\.server|server\/sql-writer)\.ts$/.test(f.url)],
  ["reading frames off sockets", (f) => f.url.includes("/ws/lib/receiver") || f.functionName === "onStreamRead"],
  ["loading modules (start-up)", (f) => /node:internal\/modules|\/tsx\//.test(f.url)],
];

function summarise(file: string, top: number) {
  const p = JSON.parse(readFileSync(file, "utf8")) as Profile;
  const byId = new Map(p.nodes.map((n) => [n.id, n]));
  const parent = new Map<number, number>();
  for (const n of p.nodes) for (const c of n.children ?? []) parent.set(c, n.id);
  const categoryOf = (id: number) => {
    const stack: CallFrame[] = [];
    for (let at: number | undefined = id; at !== undefined; at = parent.get(at)) stack.push(byId.get(at)!.callFrame);
    return CATEGORIES.find(([, matches]) => stack.some(matches))?.[0] ?? "other";
  };
  const byCategory = new Map<string, number>();
  const self = new Map<string, number>();
  let total = 0;
  let idle = 0;
  for (const [i, id] of p.samples.entries()) {
    const dt = p.timeDeltas[i] ?? 0;
    const n = byId.get(id)!;
    const { functionName, url, lineNumber } = n.callFrame;
    total += dt;
    if (functionName === "(idle)") {
      idle += dt;
      continue;
    }
    const key = `${functionName || "(anonymous)"} ${place(url, lineNumber)}`.trim();
    self.set(key, (self.get(key) ?? 0) + dt);
    const category = functionName.startsWith("(") ? functionName : categoryOf(id);
    byCategory.set(category, (byCategory.get(category) ?? 0) + dt);
  }
  const busy = total - idle;
  console.log(`\n${basename(file)}: ${(total / 1e6).toFixed(2)} s sampled, busy ${(busy / 1e6).toFixed(2)} s (${((100 * busy) / total).toFixed(0)}%)`);
  const list = (entries: Map<string, number>, n: number) => {
    for (const [key, us] of [...entries].sort((a, b) => b[1] - a[1]).slice(0, n)) {
      console.log(`  ${((100 * us) / busy).toFixed(1).padStart(5)}%  ${(us / 1000).toFixed(0).padStart(6)} ms  ${key}`);
    }
  };
  list(self, top);
  console.log("  by what it was doing:");
  list(byCategory, CATEGORIES.length + 4);
}

const [target = ".", top = "25"] = process.argv.slice(2);
const files = statSync(target).isDirectory()
  ? readdirSync(target)
      .filter((f) => f.endsWith(".cpuprofile"))
      .map((f) => join(target, f))
  : [target];
for (const f of files) summarise(f, Number(top));
