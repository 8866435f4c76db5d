import type { Worker } from "node:worker_threads";
import type { ScoreReading } from "~/music/musicxml";
import { startThread } from "./threads";

export type ScoreRequest = { type: "read"; id: number; bytes: Uint8Array; partId?: string; kept?: boolean } | { type: "close" };
/** `json` is a ScoreReading without `kept` as JSON text; `kept` comes beside it, handed over as bytes. */
export type ScoreReply = { type: "ready" } | { type: "done"; id: number; json: string; kept?: Uint8Array };

export interface ScoreReaderLimits {
  /** A file at the size limit parses in about a second here; ten times that means something is wrong. */
  timeMs: number;
  /** Uploads waiting their turn; more are refused at once rather than held in memory. */
  waiting: number;
  /** The thread's heap: a 4 MB score parses in well under this; a thread that needs more is ended by Node. */
  heapMb: number;
}
export const SCORE_READER_LIMITS: ScoreReaderLimits = { timeMs: 10_000, waiting: 8, heapMb: 512 };

const refused = (error: string): ScoreReading => ({ ok: false, error });

/**
 * Reads uploaded scores on a thread of its own (server/score-reader.worker.ts), one at a time, so
 * parsing never holds up the event loop that serves live rooms. The thread starts with the first
 * upload and stays; one that runs past the time limit is ended (it runs plain JavaScript only, so
 * terminating it is safe, unlike the database threads) and the next upload starts a fresh one.
 */
export class ScoreReader {
  private worker: Worker | null = null;
  private started: Promise<Worker> | null = null;
  private queue: Promise<unknown> = Promise.resolve();
  private waiting = 0;
  private nextId = 0;
  private closed = false;

  constructor(private readonly limits: ScoreReaderLimits = SCORE_READER_LIMITS) {}

  readonly read = (bytes: Uint8Array, options: { partId?: string; kept?: boolean } = {}): Promise<ScoreReading> => {
    if (this.closed) return Promise.resolve(refused("The server is restarting; upload the score again in a minute."));
    if (this.waiting >= this.limits.waiting) return Promise.resolve(refused("Several scores are being read right now; upload this one again in a moment."));
    this.waiting++;
    const job = this.queue.then(() => this.readNow(bytes, options)).finally(() => this.waiting--);
    this.queue = job;
    return job;
  };

  private async readNow(bytes: Uint8Array, options: { partId?: string; kept?: boolean }): Promise<ScoreReading> {
    let worker: Worker;
    try {
      worker = await this.thread();
    } catch (error) {
      console.error("score reader thread did not start", error);
      return refused("Fretcall could not start reading scores just now (an error on our side); try again in a minute.");
    }
    const id = ++this.nextId;
    return new Promise((resolve) => {
      const finish = (result: ScoreReading) => {
        clearTimeout(timer);
        worker.off("message", onMessage);
        worker.off("exit", onExit);
        resolve(result);
      };
      const onMessage = (m: ScoreReply) => m.type === "done" && m.id === id && finish({ ...(JSON.parse(m.json) as ScoreReading), ...(m.kept ? { kept: m.kept } : {}) } as ScoreReading);
      // Node ends a thread that outgrows its heap limit.
      const onExit = () => finish(refused("Reading this score needed far more memory than a melody does, so it was stopped."));
      const timer = setTimeout(() => {
        this.forget(worker);
        void worker.terminate();
        finish(refused(`Reading this score took longer than ${this.limits.timeMs / 1000} s, so it was stopped; a melody reads in well under a second.`));
      }, this.limits.timeMs);
      worker.on("message", onMessage);
      worker.once("exit", onExit);
      // Handed over rather than copied (a copy of 3 MB costs the event loop tens of ms) when the bytes
      // own their whole buffer; a view into a shared pool must be copied, or the pool would go with it.
      const own = bytes.buffer instanceof ArrayBuffer && bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength;
      worker.postMessage({ type: "read", id, bytes, ...options } satisfies ScoreRequest, own ? [bytes.buffer as ArrayBuffer] : []);
    });
  }

  private forget(worker: Worker) {
    if (this.worker !== worker) return;
    this.worker = null;
    this.started = null;
  }

  private thread(): Promise<Worker> {
    if (this.started) return this.started;
    const worker = startThread(new URL("./score-reader.worker.ts", import.meta.url), null, {
      resourceLimits: { maxOldGenerationSizeMb: this.limits.heapMb },
    });
    worker.unref(); // an idle reader never keeps the process alive
    this.worker = worker;
    // Always listened to: an unheard "error" event would end the whole process.
    worker.on("error", (error) => console.error("score reader thread failed", error.message));
    worker.on("exit", () => this.forget(worker));
    this.started = new Promise((resolve, reject) => {
      worker.on("message", (m: ScoreReply) => m.type === "ready" && resolve(worker));
      worker.once("exit", (code) => reject(new Error(`the score reader stopped before it was ready (exit code ${code})`)));
    });
    return this.started;
  }

  /** Asks the thread to stop once the score it is reading (if any) is done. */
  async close() {
    this.closed = true;
    const worker = this.worker;
    if (!worker) return;
    const exited = new Promise((r) => worker.once("exit", r));
    worker.postMessage({ type: "close" } satisfies ScoreRequest);
    await exited;
  }
}
