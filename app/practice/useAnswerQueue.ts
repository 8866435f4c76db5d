// The practice pages' outbox in React: add an answer, and it is sent now, when the browser says it is back
// online, or on the next retry tick, whichever comes first.
import { useCallback, useEffect, useRef, useState } from "react";
import type { AnswerProblem, AnswerVerdict, PracticeAnswerInput } from "./answers";
import { enqueue, flushQueue, queueKey, readQueue, type FlushState } from "./queue";

const RETRY_MS = 10_000;
export const ANSWERS_URL = "/api/v1/practice/answers";

export interface QueueStatus {
  pending: number;
  state: FlushState | "sending" | "idle";
  dropped: AnswerProblem[];
  verdicts: Record<string, AnswerVerdict>;
}

const store = () => (typeof localStorage === "undefined" ? null : localStorage);

const send = (batch: PracticeAnswerInput[]) =>
  fetch(ANSWERS_URL, { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify({ answers: batch }), credentials: "same-origin" });

export function useAnswerQueue(userId: string) {
  const key = queueKey(userId);
  const [status, setStatus] = useState<QueueStatus>({ pending: 0, state: "idle", dropped: [], verdicts: {} });
  const busy = useRef(false);
  const again = useRef(false);

  const flush = useCallback(async () => {
    if (busy.current) {
      again.current = true;
      return;
    }
    busy.current = true;
    try {
      do {
        again.current = false;
        setStatus((s) => ({ ...s, pending: readQueue(store(), key).length, state: "sending" }));
        const result = await flushQueue(store(), key, send);
        setStatus((s) => ({
          pending: result.pending,
          state: result.state,
          dropped: [...s.dropped, ...result.dropped],
          verdicts: { ...s.verdicts, ...Object.fromEntries(result.verdicts.map((v) => [v.clientId, v])) },
        }));
      } while (again.current);
    } finally {
      busy.current = false;
    }
  }, [key]);

  const add = useCallback(
    (answer: PracticeAnswerInput) => {
      enqueue(store(), key, answer);
      void flush();
    },
    [key, flush],
  );

  useEffect(() => {
    // Answers left from an earlier visit go out as soon as the page opens.
    void flush();
    const online = () => void flush();
    window.addEventListener("online", online);
    const timer = window.setInterval(() => {
      if (readQueue(store(), key).length > 0) void flush();
    }, RETRY_MS);
    return () => {
      window.removeEventListener("online", online);
      window.clearInterval(timer);
    };
  }, [key, flush]);

  return { status, add, flush };
}
