// Prints how fast a live room and /healthz answer while the worst uploads we can build are read,
// beside a baseline with no upload, and how long each read would have held the event loop had it
// run there (as it did before the score reader thread). The production build serves in this
// process, so the probes share its event loop. Run: npm run build && npx tsx bench/upload-stall.ts
import { strToU8 } from "fflate";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { parseScoreFile } from "~/music/musicxml";
import { startServer } from "../server/index";
import { seedDemo } from "../server/seed";
import { deepScore, hugeLegalMxl, hugeLegalScore, mxlBomb } from "../tests/fixtures/hostile-scores";
import { Client } from "../tests/integration/harness";
import { openLiveRoom, percentile, probeWhile, type Latencies } from "../server/upload-probe";

const BASELINE_MS = 3_000;
const dir = mkdtempSync(join(tmpdir(), "fretcall-upload-bench-"));
const server = await startServer({
  NODE_ENV: "production",
  PORT: "0",
  HOST: "127.0.0.1",
  SESSION_SECRET: "bench-secret-0123456789abcdef0123456789",
  MAIL_CAPTURE: "1",
  MAIL_DIR: join(dir, "mail"),
  DATABASE_URL: `file:${join(dir, "bench.db")}`,
});
await seedDemo(server.services.db);
const teacher = new Client(server.url);
await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD });
const live = await openLiveRoom(server.url, server.services.db, server.services.env.SESSION_SECRET);

async function upload(name: string, bytes: Uint8Array) {
  const form = new FormData();
  form.set("score", new File([new Uint8Array(bytes)], name));
  const res = await teacher.request("/teach/tunes", { method: "POST", body: form });
  const text = await res.text();
  return res.status === 302 ? "stored" : /Nothing was saved/.test(text) ? "refused" : `status ${res.status}`;
}

const row = (label: string, l: Latencies, extra: string) => {
  const f = (xs: number[]) => (xs.length ? `${percentile(xs, 50).toFixed(1)} / ${percentile(xs, 99).toFixed(1)} / ${Math.max(...xs).toFixed(1)}` : "—");
  return `| ${label} | ${f(l.healthz)} | ${f(l.ack)} | ${f(l.committedAck)} | ${extra} |`;
};

const lines = [
  "| upload | /healthz p50 / p99 / max ms | refused ack p50 / p99 / max ms | committed ack p50 / p99 / max ms | read (result) · same read on the event loop |",
  "|---|---|---|---|---|",
];
lines.push(row("none (baseline)", (await probeWhile(server.url, live, () => Promise.resolve(), BASELINE_MS)).latencies, ""));
const cases: [string, string, Uint8Array][] = [
  ["densest legal .musicxml", "dense.musicxml", strToU8(hugeLegalScore())],
  ["densest legal .mxl", "dense.mxl", hugeLegalMxl()],
  [".mxl unpacking to 19 MB", "bomb.mxl", mxlBomb()],
  ["nested past the limit", "deep.musicxml", strToU8(deepScore())],
];
for (const [label, name, bytes] of cases) {
  // Probed for at least a second, so even a quick refusal gets a fair sample.
  const { result, latencies, ms } = await probeWhile(server.url, live, () => upload(name, bytes.slice()), 1_000);
  const at = performance.now();
  try {
    parseScoreFile(bytes);
  } catch {
    // refusals take time too
  }
  lines.push(row(`${label} (${(bytes.length / 1024).toFixed(0)} KB)`, latencies, `${ms.toFixed(0)} ms (${result}) · ${(performance.now() - at).toFixed(0)} ms`));
}
console.log(lines.join("\n"));
live.close();
await server.close();
rmSync(dir, { recursive: true, force: true });
