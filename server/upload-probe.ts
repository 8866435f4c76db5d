// Measures how fast the server answers other requests while an upload is being read: a GET of
// /healthz and a pad's answer to a prompt it is not showing (answered at once, without a commit)
// every PROBE_EVERY_MS, plus one real answer per pad (acked after its commit). Shared by
// tests/integration/upload-stall.test.ts and bench/upload-stall.ts.
import type { Db } from "~/db/client.server";
import { joinPlayer, openStage, openTestRoom, spotOf, untilShown, type ScriptedSocket } from "./scripted-rooms";

const PROBE_EVERY_MS = 40;
/** Each pad probes every PADS × 40 ms: under the protocol's 8 messages a second. */
const PADS = 5;

export interface Latencies {
  healthz: number[];
  /** A refused answer's ack: the event loop alone. */
  ack: number[];
  /** An accepted answer's ack: the event loop and the commit. */
  committedAck: number[];
}

export async function openLiveRoom(url: string, db: Db, secret: string) {
  const room = await openTestRoom(db, { answerMs: 60_000, countdownMs: 0, prompts: 20 });
  const stage = await openStage(url, secret, room);
  const pads = await Promise.all(Array.from({ length: PADS }, (_, i) => joinPlayer(url, room.code, `Probe ${i + 1}`).then((p) => p.pad)));
  let index = -1;
  let promptId = "";
  /** Moves to the next prompt, so every pad may give one real answer again. */
  const next = async () => {
    // The reveal comes once every pad has answered (probeWhile sees to it).
    if (index >= 0) await stage.next("reveal", (m) => m.promptId === promptId);
    index++;
    const from = pads.map((p) => p.messages.length);
    stage.send({ type: "host", action: index === 0 ? "start" : "next" });
    if (index > 0 && index % room.config.standingsEvery === 0) stage.send({ type: "host", action: "next" });
    const prompts = await Promise.all(pads.map((p, k) => p.next("prompt", (m) => m.index === index, from[k])));
    await untilShown(Math.max(...prompts.map((p) => p.showAt)));
    promptId = prompts[0]!.promptId;
    return { promptId, home: spotOf(room.config.prompts[index]!.home) };
  };
  const close = () => [stage, ...pads].forEach((s) => s.close());
  return { pads, next, close };
}

async function timed(run: () => Promise<unknown>, into: number[]) {
  const at = performance.now();
  await run();
  into.push(performance.now() - at);
}

async function ackOf(pad: ScriptedSocket, promptId: string, spot: { string: number; fret: number }) {
  const before = pad.messages.length;
  pad.send({ type: "answer", promptId, spot, tapAt: Date.now() });
  await pad.next("answer-ack", (m) => m.promptId === promptId, before);
}

/** Starts `work` once the room shows a prompt, probes until it settles (at least `minMs`), and returns what it gave with the latencies. */
export async function probeWhile<T>(url: string, live: Awaited<ReturnType<typeof openLiveRoom>>, work: () => Promise<T>, minMs = 0) {
  const into: Latencies = { healthz: [], ack: [], committedAck: [] };
  const prompt = await live.next();
  let done = false;
  let workMs = 0;
  const started = performance.now();
  const settled = work().finally(() => {
    done = true;
    workMs = performance.now() - started;
  });
  const probes: Promise<unknown>[] = [];
  let answered = 0;
  for (let i = 0; !done || performance.now() - started < minMs; i++) {
    probes.push(timed(() => fetch(`${url}/healthz`).then((r) => r.arrayBuffer()), into.healthz));
    // Every fifth probe, while a pad has not answered this prompt, is a real answer; the rest answer a prompt the pad is not showing.
    const pad = live.pads[i % live.pads.length]!;
    if (i % 5 === 4 && answered < live.pads.length) probes.push(timed(() => ackOf(live.pads[answered++]!, prompt.promptId, prompt.home), into.committedAck));
    else probes.push(timed(() => ackOf(pad, "not-this-prompt", prompt.home), into.ack));
    await new Promise((r) => setTimeout(r, PROBE_EVERY_MS));
  }
  await Promise.all(probes);
  // Pads that have not answered this prompt yet do so now, so the round can move on.
  await Promise.all(live.pads.slice(answered).map((pad) => ackOf(pad, prompt.promptId, prompt.home)));
  /** `ms`: how long `work` took. */
  return { result: await settled, latencies: into, ms: workMs };
}

export function percentile(xs: number[], p: number) {
  const sorted = [...xs].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? NaN;
}
