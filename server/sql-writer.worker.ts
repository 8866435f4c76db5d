/**
 * The hub's writer thread: its own connection to the database, running one batch of statements
 * at a time as one transaction. A commit waits for the disk (synchronous=FULL); doing it here
 * keeps that wait off the event loop that serves every socket.
 */
import type { InStatement } from "@libsql/client";
import { parentPort, workerData } from "node:worker_threads";
import { openDb } from "~/db/client.server";
import type { WriterReply, WriterRequest } from "./sql-writer";

const { url, authToken, checkpointPages } = workerData as { url: string; authToken?: string; checkpointPages: number };
const db = await openDb(url, authToken);
// The checkpointer thread copies the WAL back; SQLite's own checkpoint, inside a commit, is left
// only as the bound should that thread fall behind.
if (url.startsWith("file:")) await db.$client.execute(`PRAGMA wal_autocheckpoint = ${checkpointPages}`);
const port = parentPort!;
port.postMessage({ type: "ready" } satisfies WriterReply);

/** One transaction at a time, in the order the batches came. */
let queue = Promise.resolve();

port.on("message", (m: WriterRequest) => {
  queue = queue.then(async () => {
    if (m.type === "close") {
      db.$client.close();
      return port.close();
    }
    let reply: WriterReply;
    try {
      // "write" = BEGIN IMMEDIATE … COMMIT.
      const results = await db.$client.batch(m.statements as InStatement[], "write");
      const rows = m.returning ? results.at(-1)?.rows.map((row) => Array.from(row)) : undefined;
      reply = { type: "done", id: m.id, error: null, rows };
    } catch (error) {
      reply = { type: "done", id: m.id, error: error instanceof Error ? error.message : String(error) };
    }
    port.postMessage(reply);
  });
});
