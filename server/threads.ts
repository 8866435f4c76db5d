import { Worker, type WorkerOptions } from "node:worker_threads";

/**
 * Starts a thread that runs a TypeScript module of the server, through tsx registered in the
 * thread itself: the main thread's loader hooks do not reach worker threads.
 */
export function startThread(entry: URL, workerData: unknown, options: Pick<WorkerOptions, "resourceLimits"> = {}): Worker {
  const href = JSON.stringify(entry.href);
  return new Worker(`import("tsx/esm/api").then(({ register }) => { register(); return import(${href}); })`, { ...options, eval: true, workerData });
}
