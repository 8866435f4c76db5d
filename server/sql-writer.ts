import type { InStatement } from "@libsql/client";
import type { Worker } from "node:worker_threads";
import { startThread } from "./threads";

/** How often the checkpointer thread copies the WAL back into the database file. */
const CHECKPOINT_EVERY_MS = 1_000;
/** The writer connection's own checkpoint threshold, in pages (4 KiB each): about 40 MiB of WAL. */
const CHECKPOINT_PAGES = 10_000;

/** Resolves when the thread says it has the database open; rejects if it fails or stops first. */
function readyOf(worker: Worker) {
  return new Promise<void>((resolve, reject) => {
    worker.on("message", (m: WriterReply) => m.type === "ready" && resolve());
    worker.once("error", reject);
    worker.once("exit", (code) => reject(new Error(`a database thread stopped before it was ready (exit code ${code})`)));
  });
}

function stopThread(worker: Worker) {
  const exited = new Promise((r) => worker.once("exit", r));
  worker.postMessage({ type: "close" } satisfies WriterRequest);
  return exited;
}

/** `returning`: the reply carries the last statement's rows (as arrays of values). */
export type WriterRequest = { type: "batch"; id: number; statements: InStatement[]; returning?: boolean } | { type: "close" };
export type WriterReply = { type: "ready" } | { type: "done"; id: number; error: string | null; rows?: unknown[][] };

interface Target {
  url: string;
  authToken?: string;
}

/**
 * Runs batches of SQL, each as one transaction, on a thread of its own (server/sql-writer.worker.ts),
 * in the order they were handed over; an embedded database also gets a checkpointer thread
 * (server/checkpointer.worker.ts). If a thread dies, the batches it held fail and it is started
 * again: the writer with the next batch, the checkpointer a moment later.
 */
export class SqlWriter {
  private worker: Worker | null = null;
  private checkpointer: Worker | null = null;
  private closing = false;
  private nextId = 0;
  private readonly waiting = new Map<number, (error: Error | null, rows?: unknown[][]) => void>();
  /** Settles when the first writer thread (and the checkpointer) have the database open, or one failed to. */
  readonly ready: Promise<void>;

  /** The threads start at once, so the first answer of the day does not wait for one to load. */
  constructor(private readonly target: Target) {
    const threads = [this.thread()];
    if (target.url.startsWith("file:")) threads.push(this.startCheckpointer());
    this.ready = Promise.all(threads.map(readyOf)).then(() => {});
    // Known once the server awaits it; until then a failure must not count as unhandled.
    this.ready.catch(() => {});
  }

  /** Resolves once committed; rejects with the database's error (nothing of the batch is kept then). */
  run(statements: InStatement[]): Promise<void> {
    return this.post(statements, false).then(() => {});
  }

  /** The same, for a batch whose last statement returns rows (… RETURNING): resolves with them. */
  query(statements: InStatement[]): Promise<unknown[][]> {
    return this.post(statements, true);
  }

  private post(statements: InStatement[], returning: boolean): Promise<unknown[][]> {
    const id = ++this.nextId;
    return new Promise((resolve, reject) => {
      this.waiting.set(id, (error, rows) => (error ? reject(error) : resolve(rows ?? [])));
      this.thread().postMessage({ type: "batch", id, statements, returning } satisfies WriterRequest);
    });
  }

  private thread(): Worker {
    if (this.worker) return this.worker;
    const worker = startThread(new URL("./sql-writer.worker.ts", import.meta.url), { ...this.target, checkpointPages: CHECKPOINT_PAGES });
    worker.on("message", (reply: WriterReply) => {
      if (reply.type !== "done") return;
      const done = this.waiting.get(reply.id);
      this.waiting.delete(reply.id);
      done?.(reply.error === null ? null : new Error(reply.error), reply.rows);
    });
    const lost = (why: string) => {
      if (this.worker !== worker) return;
      this.worker = null;
      for (const done of this.waiting.values()) done(new Error(`the writer thread stopped: ${why}`));
      this.waiting.clear();
    };
    worker.on("error", (error) => lost(error.message));
    worker.on("exit", (code) => lost(`exit code ${code}`));
    this.worker = worker;
    return worker;
  }

  private startCheckpointer(): Worker {
    const worker = startThread(new URL("./checkpointer.worker.ts", import.meta.url), { ...this.target, everyMs: CHECKPOINT_EVERY_MS });
    worker.on("error", (error) => console.error("checkpointer thread failed", error));
    worker.on("exit", () => {
      if (this.closing) return;
      console.error("checkpointer thread stopped; starting it again");
      setTimeout(() => this.closing || this.startCheckpointer(), CHECKPOINT_EVERY_MS).unref();
    });
    this.checkpointer = worker;
    return worker;
  }

  /**
   * Ends the threads once the writer has run every batch handed over so far. Each is asked to
   * stop rather than terminated: ending a thread inside a database call can bring the process down.
   */
  async close() {
    this.closing = true;
    await Promise.all([this.checkpointer, this.worker].map((worker) => worker && stopThread(worker)));
  }
}
