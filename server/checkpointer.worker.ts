/**
 * Copies the WAL back into the database file every little while, on a connection and thread of
 * its own. In WAL mode a checkpoint and a commit do not wait for each other, so the writer
 * thread's commits never stall behind this copy; left to SQLite, it would run inside whichever
 * commit crossed the threshold, holding up every answer behind it.
 */
import { parentPort, workerData } from "node:worker_threads";
import { openDb } from "~/db/client.server";
import type { WriterReply } from "./sql-writer";

const { url, authToken, everyMs } = workerData as { url: string; authToken?: string; everyMs: number };
const db = await openDb(url, authToken);
parentPort!.postMessage({ type: "ready" } satisfies WriterReply);

const timer = setInterval(async () => {
  try {
    // PASSIVE: copies what it can without waiting for readers or the writer.
    await db.$client.execute("PRAGMA wal_checkpoint(PASSIVE)");
  } catch (error) {
    console.error("checkpointer: checkpoint failed; trying again next time", error);
  }
}, everyMs);

// Asked to stop, it finishes what it is doing: ending a thread inside a database call is not safe.
parentPort!.once("message", () => {
  clearInterval(timer);
  db.$client.close();
  parentPort!.close();
});
