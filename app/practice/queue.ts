// The phone's outbox for finished practice answers. Answers wait in localStorage (one queue per account, since
// phones are shared) until the server has them; a dropped connection only delays them. The server is
// idempotent by clientId, so sending the same answer twice after an unclear failure is safe.
// Types only: ./answers.ts is the server's zod check, which the phone does not download.
import type { AnswerProblem, AnswerVerdict, PracticeAnswerInput } from "./answers";

/** Answers in one request, at most; the server's batch schema (./answers.ts) refuses more. */
export const MAX_BATCH = 100;

export interface KeyValueStore {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
}

export const queueKey = (userId: string) => `fretcall-practice-queue:${userId}`;

export function readQueue(store: KeyValueStore | null, key: string): PracticeAnswerInput[] {
  try {
    const value: unknown = JSON.parse(store?.getItem(key) ?? "[]");
    return Array.isArray(value) ? (value.filter((a) => typeof a === "object" && a !== null && typeof a.clientId === "string") as PracticeAnswerInput[]) : [];
  } catch {
    return [];
  }
}

function writeQueue(store: KeyValueStore | null, key: string, list: PracticeAnswerInput[]) {
  try {
    store?.setItem(key, JSON.stringify(list));
  } catch {
    // Storage full or refused (private browsing): the answers still wait in memory for this page.
  }
}

export function enqueue(store: KeyValueStore | null, key: string, answer: PracticeAnswerInput) {
  const list = readQueue(store, key).filter((a) => a.clientId !== answer.clientId);
  writeQueue(store, key, [...list, answer]);
}

function dequeue(store: KeyValueStore | null, key: string, clientIds: Set<string>) {
  writeQueue(store, key, readQueue(store, key).filter((a) => !clientIds.has(a.clientId)));
}

export type FlushState = "sent" | "offline" | "signed-out" | "server-error";

export interface FlushResult {
  state: FlushState;
  verdicts: AnswerVerdict[];
  /** Answers the server refused for good (too old, not valid): dropped from the queue, with the reason. */
  dropped: AnswerProblem[];
  pending: number;
}

export type Send = (batch: PracticeAnswerInput[]) => Promise<Response>;

/**
 * Sends everything queued, MAX_BATCH at a time, until the queue is empty or the network or server says stop.
 * A refused batch (400) stored nothing: its named bad answers are dropped and the rest go again.
 */
export async function flushQueue(store: KeyValueStore | null, key: string, send: Send): Promise<FlushResult> {
  const verdicts: AnswerVerdict[] = [];
  const dropped: AnswerProblem[] = [];
  const done = (state: FlushState): FlushResult => ({ state, verdicts, dropped, pending: readQueue(store, key).length });
  for (let round = 0; round < 50; round++) {
    const batch = readQueue(store, key).slice(0, MAX_BATCH);
    if (batch.length === 0) return done("sent");
    let response: Response;
    try {
      response = await send(batch);
    } catch {
      return done("offline");
    }
    if (response.status === 401) return done("signed-out");
    if (response.ok) {
      const body = (await response.json()) as { results: AnswerVerdict[] };
      verdicts.push(...body.results);
      dequeue(store, key, new Set(batch.map((a) => a.clientId)));
      continue;
    }
    if (response.status === 400) {
      const body = (await response.json().catch(() => ({ problems: [] }))) as { problems?: AnswerProblem[] };
      const named = (body.problems ?? []).filter((p) => p.clientId !== null && batch.some((a) => a.clientId === p.clientId));
      // A refusal that names no answer would refuse every resend the same way: drop the batch rather than loop.
      const refused = named.length > 0 ? named : batch.map((a, index) => ({ index, clientId: a.clientId, message: "The server could not read this answer." }));
      dropped.push(...refused);
      dequeue(store, key, new Set(refused.map((p) => p.clientId!)));
      continue;
    }
    return done("server-error");
  }
  return done("server-error");
}
