import { describe, expect, it } from "vitest";
import type { PracticeAnswerInput } from "./answers";
import { enqueue, flushQueue, readQueue, type KeyValueStore } from "./queue";

const memory = (): KeyValueStore => {
  const m = new Map<string, string>();
  return { getItem: (k) => m.get(k) ?? null, setItem: (k, v) => void m.set(k, v) };
};
const answer = (clientId: string): PracticeAnswerInput => ({
  clientId, source: "position:5", position: 5, tuning: "standard", keyFifths: 0, written: "C5", string: 3, fret: 5, reactionMs: 900, at: 1,
});
const json = (status: number, body: unknown) => new Response(JSON.stringify(body), { status, headers: { "Content-Type": "application/json" } });
const KEY = "q";

describe("the answer outbox", () => {
  it("keeps every answer while offline and sends them all once the network is back", async () => {
    const store = memory();
    ["aaaaaaaa", "bbbbbbbb"].forEach((id) => enqueue(store, KEY, answer(id)));
    const offline = await flushQueue(store, KEY, () => Promise.reject(new TypeError("Failed to fetch")));
    expect(offline).toMatchObject({ state: "offline", pending: 2 });
    const sent: string[][] = [];
    const online = await flushQueue(store, KEY, async (batch) => {
      sent.push(batch.map((a) => a.clientId));
      return json(200, { results: batch.map((a) => ({ clientId: a.clientId, kind: "home-spot", pitchRight: true, message: "", duplicate: false })) });
    });
    expect(sent).toEqual([["aaaaaaaa", "bbbbbbbb"]]);
    expect(online).toMatchObject({ state: "sent", pending: 0 });
    expect(online.verdicts).toHaveLength(2);
  });

  it("drops only the answers a refused batch names, and sends the rest again", async () => {
    const store = memory();
    ["old00000", "good0000"].forEach((id) => enqueue(store, KEY, answer(id)));
    const calls: string[][] = [];
    const result = await flushQueue(store, KEY, async (batch) => {
      calls.push(batch.map((a) => a.clientId));
      if (batch.some((a) => a.clientId === "old00000")) {
        return json(400, { error: "Nothing was stored", problems: [{ index: 0, clientId: "old00000", message: "Answer 1: too old to count." }] });
      }
      return json(200, { results: [] });
    });
    expect(calls).toEqual([["old00000", "good0000"], ["good0000"]]);
    expect(result.dropped.map((d) => d.clientId)).toEqual(["old00000"]);
    expect(result.pending).toBe(0);
  });

  it("keeps the answers when signed out or when the server fails, and never queues one twice", async () => {
    const store = memory();
    enqueue(store, KEY, answer("aaaaaaaa"));
    enqueue(store, KEY, answer("aaaaaaaa"));
    expect(readQueue(store, KEY)).toHaveLength(1);
    expect(await flushQueue(store, KEY, async () => json(401, { error: "Sign in first." }))).toMatchObject({ state: "signed-out", pending: 1 });
    expect(await flushQueue(store, KEY, async () => json(503, {}))).toMatchObject({ state: "server-error", pending: 1 });
  });

  it("reads a damaged store as empty rather than failing", () => {
    const store = memory();
    store.setItem(KEY, "{not json");
    expect(readQueue(store, KEY)).toEqual([]);
    expect(readQueue(null, KEY)).toEqual([]);
  });
});
