/**
 * One "node" of tests/integration/shared-sqlite.test.ts: its own SqlWriter (writer and checkpointer
 * threads) on the shared database file, writing one small batch every few milliseconds once told
 * to go (a line on stdin, sent when both processes are ready), as a busy live hub would. Prints
 * "ready", then what it did as one JSON line.
 */
import { SqlWriter } from "../../server/sql-writer";

const [url, node, forMs, everyMs] = process.argv.slice(2) as [string, string, string, string];
const writer = new SqlWriter({ url });
await writer.ready;
console.log("ready");
await new Promise((r) => process.stdin.once("data", r));
process.stdin.pause();

const runs: Promise<void>[] = [];
const failures: string[] = [];
let acked = 0;
const waits: number[] = [];
const began = Date.now();
const until = Date.now() + Number(forMs);
for (let batch = 0; Date.now() < until; batch++) {
  const rows = [0, 1, 2].map((row) => ({ sql: "INSERT INTO stress (node, batch, row) VALUES (?, ?, ?)", args: [node, batch, row] }));
  const sentAt = Date.now();
  runs.push(writer.run(rows).then(() => void (acked++, waits.push(Date.now() - sentAt)), (error: Error) => void failures.push(error.message)));
  await new Promise((r) => setTimeout(r, Number(everyMs)));
}
await Promise.all(runs);
const tookMs = Date.now() - began;
await writer.close();
waits.sort((x, y) => x - y);
console.log(JSON.stringify({ node, sent: runs.length, acked, failures, tookMs, p50: waits[waits.length >> 1], max: waits.at(-1) }));
