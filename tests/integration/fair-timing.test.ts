/**
 * Fair timing over real WebSockets on delayed links: the bound on a pad's claimed tap time comes
 * from round trips the server timed itself. Each test prints its figures (honest error, forged
 * gain) so they can be quoted.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { addSample, emptyClock, estimate, type ClockState } from "~/game/clock";
import { PROTOCOL_VERSION, type ServerMessage } from "~/game/protocol";
import { seedDemo } from "../../server/seed";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket, spotOf } from "../../server/scripted-rooms";
import { DelayedLink, type LinkDelay } from "./delayed-link";
import { startTestServer, type TestServer } from "./harness";

let server: TestServer;
let secret: string;
const links: DelayedLink[] = [];
beforeAll(async () => {
  server = await startTestServer();
  secret = server.services.env.SESSION_SECRET;
  // Ten round trips a second fill the window in seconds instead of a minute.
  server.hub.roundTripPingMs = 100;
  await seedDemo(server.services.db);
});
afterAll(async () => {
  for (const link of links) await link.close();
  await server.close();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const until = (serverTime: number) => sleep(Math.max(0, serverTime - Date.now()));

async function linkOf(delay: LinkDelay) {
  const link = await DelayedLink.open(server.port, delay);
  links.push(link);
  return link;
}
/**
 * What a busy machine's event loop can add to one measurement: this process runs the server, the
 * links and the pads, so a pause on it lands in some figures and not others. Quiet runs show 0.4–2 ms.
 */
const JITTER_MS = 15;
const steady = (oneWayMs: number): LinkDelay => () => oneWayMs;
/**
 * 10 ms each way, and every 15th chunk across the link held up 300 ms, as a Wi-Fi retransmission
 * does (what follows it waits behind it). Counted, not drawn at random: a random 3 % left some runs
 * with too few hold-ups in the window for its p95 to see them, whatever the server's rule.
 */
const bursty = (): LinkDelay => {
  let chunks = 0;
  return () => 10 + (++chunks % 15 === 0 ? 300 : 0);
};

/**
 * A pad that syncs its clock as docs/protocol.md asks (a ping every 150 ms, reporting the last
 * pong's arrival), on a clock `skewMs` away from the server's. A lying pad reports every pong
 * `reportLateMs` later than it came (fake round trips).
 */
class SyncedPad {
  private clock: ClockState = emptyClock();
  private last: { t0: number; t3: number } | undefined;
  /** When each prompt's note reached this pad (real time): an honest student's reaction starts there. */
  readonly noteAt = new Map<string, number>();
  private readonly pinger = setInterval(() => this.ping(), 150);

  private constructor(
    public socket: ScriptedSocket,
    readonly you: { playerId: string; seatToken: string },
    private readonly code: string,
    private readonly skewMs: number,
    private readonly reportLateMs: number,
  ) {
    this.listen();
  }

  static async join(link: DelayedLink, code: string, nickname: string, skewMs: number, reportLateMs = 0) {
    const { pad, you } = await joinPlayer(link.url, code, nickname);
    return new SyncedPad(pad, you, code, skewMs, reportLateMs);
  }

  private listen() {
    this.socket.ws.on("message", (data) => {
      const t3 = this.now();
      const m = JSON.parse(String(data)) as ServerMessage;
      if (m.type === "note" && !this.noteAt.has(m.promptId)) this.noteAt.set(m.promptId, Date.now());
      if (m.type !== "pong") return;
      this.clock = addSample(this.clock, { t0: m.t0, t1: m.t1, t2: m.t2, t3 });
      this.last = { t0: m.t0, t3: t3 + this.reportLateMs };
    });
  }

  now() {
    return Date.now() + this.skewMs;
  }

  private ping() {
    if (this.socket.ws.readyState !== this.socket.ws.OPEN) return;
    this.socket.send({ type: "ping", t0: this.now(), ...(this.last ? { last: this.last } : {}) });
  }

  /** The pad's own estimate of its clock is right (its samples are true, only its reports lie). */
  synced() {
    return estimate(this.clock) !== null;
  }

  answer(promptId: string, spot: { string: number; fret: number }, tapAt: number) {
    this.socket.send({ type: "answer", promptId, spot, tapAt });
  }

  /** The connection drops at once (no close handshake): the Wi-Fi went. */
  drop() {
    this.socket.ws.terminate();
  }

  /** A new socket over `link`, taking the seat back with its seat token (the pad's clock is the same). */
  async reconnect(link: DelayedLink) {
    this.socket = await ScriptedSocket.open(link.url);
    this.listen();
    this.socket.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: this.code, seatToken: this.you.seatToken });
  }

  close() {
    clearInterval(this.pinger);
    this.socket.close();
  }
}

/** Opens a room with its stage, lets `pads` join and sync for `syncMs`, starts it and returns its first shown prompt. */
async function playing(join: (code: string) => Promise<SyncedPad[]>, opts: { prompts?: number; syncMs?: number } = {}) {
  const room = await openTestRoom(server.services.db, { prompts: opts.prompts ?? 1 });
  const stage = await openStage(server.url, secret, room);
  const pads = await join(room.code);
  await sleep(opts.syncMs ?? 2_500);
  for (const pad of pads) expect(pad.synced()).toBe(true);
  stage.send({ type: "host", action: "start" });
  const prompt = await stage.next("prompt", (m) => m.index === 0);
  return { room, stage, pads, prompt };
}

const noteOn = async (pad: SyncedPad, promptId: string) => {
  while (!pad.noteAt.has(promptId)) await sleep(2);
  return pad.noteAt.get(promptId)!;
};

/** Each pad taps 400 ms after the note reached it (the same reaction everywhere); returns each tap's true reaction time (ms), its ack and when it was sent. */
async function tapTogether(
  pads: SyncedPad[],
  prompt: { promptId: string; showAt: number },
  spot: { string: number; fret: number },
  opts: { claim?: (p: SyncedPad) => number; onTap?: () => void } = {},
) {
  const claim = opts.claim ?? ((p: SyncedPad) => p.now());
  const seen = await Promise.all(pads.map((p) => noteOn(p, prompt.promptId)));
  const order = pads.map((pad, i) => ({ pad, i, tapAt: seen[i]! + 400 })).sort((x, y) => x.tapAt - y.tapAt);
  const sent: number[] = [];
  for (const { pad, i, tapAt } of order) {
    await sleep(Math.max(0, tapAt - Date.now()));
    // Right before the first answer, so what it does to the link hits the answer.
    if (sent.length === 0) opts.onTap?.();
    sent[i] = Date.now();
    pad.answer(prompt.promptId, spot, claim(pad));
  }
  const acks = await Promise.all(pads.map((p) => p.socket.next("answer-ack", (m) => m.promptId === prompt.promptId)));
  return acks.map((ack, i) => {
    if (!ack.accepted) throw new Error(`answer refused: ${ack.code}`);
    return { trueMs: sent[i]! - seen[i]!, sentAt: sent[i]!, reactionMs: ack.reactionMs, ack, ackAt: Date.now() };
  });
}

const ms = (x: number) => `${x.toFixed(1)} ms`;

describe("honest pads on different links", () => {
  // The note leaves the server at its show time and reaches the slow pad ~140 ms after the fast one;
  // both students react in the same 400 ms from when they saw it.
  it("two pads on 20 ms and 300 ms links reacting equally fast get the same reaction times, within jitter", async () => {
    const fast = await linkOf(steady(10));
    const slow = await linkOf(steady(150));
    const { room, stage, pads, prompt } = await playing(async (code) => [
      await SyncedPad.join(fast, code, "Fast", 312_345),
      await SyncedPad.join(slow, code, "Slow", -98_765),
    ]);
    const [a, b] = await tapTogether(pads, prompt, spotOf(room.config.prompts[0]!.home));
    const errors = [a!.reactionMs - a!.trueMs, b!.reactionMs - b!.trueMs];
    console.log(`honest error: 20 ms link ${ms(errors[0]!)}, 300 ms link ${ms(errors[1]!)}, between them ${ms(Math.abs(a!.reactionMs - b!.reactionMs))}`);
    for (const e of errors) expect(Math.abs(e)).toBeLessThanOrEqual(JITTER_MS);
    expect(Math.abs(a!.reactionMs - b!.reactionMs)).toBeLessThanOrEqual(JITTER_MS);
    for (const p of pads) p.close();
    stage.close();
  });

  it("an honest pad on a bursty link (occasional 300 ms hold-ups) whose answer is held up 300 ms loses nothing beyond jitter", async () => {
    const link = await linkOf(bursty());
    const { room, stage, pads, prompt } = await playing(async (code) => [await SyncedPad.join(link, code, "Bursty", 45_000)], { syncMs: 4_000 });
    const bound = (await server.hub.seatClock(room.code, pads[0]!.you.playerId))!;
    // The minute of round trips is measured; from here only the answer is held up, not the note on its way down
    // (a note held up reaches the student late, which no server can see).
    link.delay = steady(10);
    // The answer itself is held up 300 ms.
    const [tap] = await tapTogether(pads, prompt, spotOf(room.config.prompts[0]!.home), { onTap: () => link.holdNextUp(300) });
    expect(tap!.ackAt - tap!.sentAt).toBeGreaterThanOrEqual(300);
    const loss = tap!.reactionMs - tap!.trueMs;
    console.log(`bursty honest loss: ${ms(loss)} with the answer held up 300 ms (server's p95 round trip ${ms(bound.figures!.highMs)}, fastest ${ms(bound.figures!.lowMs)}, uplink bound ${ms(bound.uplinkMs!)})`);
    expect(loss).toBeLessThanOrEqual(JITTER_MS);
    expect(loss).toBeGreaterThanOrEqual(-JITTER_MS);
    pads[0]!.close();
    stage.close();
  });
});

describe("a lying pad", () => {
  it("reporting fake round trips and claiming early taps gains no more than the bound the server measured", async () => {
    const link = await linkOf(steady(20));
    const { room, stage, pads, prompt } = await playing(async (code) => [
      await SyncedPad.join(link, code, "Honest", 7_000),
      // Its pong reports come 900 ms late: under the old rule its window grew to about 1 s.
      await SyncedPad.join(link, code, "Liar", -7_000, 900),
    ]);
    const [honest, liar] = pads as [SyncedPad, SyncedPad];
    const bound = (await server.hub.seatClock(room.code, liar.you.playerId))!;
    // The liar claims its tap 600 ms earlier than it was (and its forged reports move its clock 450 ms more).
    const [h, l] = await tapTogether(pads, prompt, spotOf(room.config.prompts[0]!.home), {
      claim: (p) => (p === liar ? p.now() - 600 : p.now()),
    });
    const gain = h!.reactionMs - l!.reactionMs;
    console.log(`forged gain: ${ms(gain)} (the server's uplink bound for the liar ${ms(bound.uplinkMs!)}; its measured round trips p95 ${ms(bound.figures!.highMs)}, fastest ${ms(bound.figures!.lowMs)}; honest error ${ms(h!.reactionMs - h!.trueMs)})`);
    expect(gain).toBeLessThanOrEqual(bound.uplinkMs! + 1);
    // Its fake reports did not widen it (the old rule allowed it ~950 ms); loaded machines add some event-loop jitter.
    expect(bound.uplinkMs!).toBeLessThan(200);
    expect(Math.abs(h!.reactionMs - h!.trueMs)).toBeLessThanOrEqual(JITTER_MS);
    honest.close();
    liar.close();
    stage.close();
  });
});

describe("reconnecting and disconnected taps", () => {
  it("a pad whose socket is replaced keeps its clock samples: its first answer on the new socket is timed", async () => {
    const link = await linkOf(steady(150));
    const { room, stage, pads, prompt } = await playing(async (code) => [await SyncedPad.join(link, code, "Mover", 1_234)]);
    const pad = pads[0]!;
    const before = (await server.hub.seatClock(room.code, pad.you.playerId))!;
    expect(before.figures!.samples).toBeGreaterThan(5);
    const seen = await noteOn(pad, prompt.promptId);
    await sleep(100);
    pad.drop();
    await pad.reconnect(link);
    // Sent right behind the hello: the server has timed no round trip on this socket yet.
    const at = Date.now();
    pad.answer(prompt.promptId, spotOf(room.config.prompts[0]!.home), pad.now());
    const ack = await pad.socket.next("answer-ack", (m) => m.promptId === prompt.promptId);
    if (!ack.accepted) throw new Error(`answer refused: ${ack.code}`);
    const after = (await server.hub.seatClock(room.code, pad.you.playerId))!;
    const error = ack.reactionMs - (at - seen);
    console.log(`reconnected pad on a 300 ms link: ${before.figures!.samples} round trips kept, first answer's error ${ms(error)} (the arrival alone would be ~150 ms late)`);
    expect(after.figures!.samples).toBeGreaterThanOrEqual(before.figures!.samples);
    expect(Math.abs(error)).toBeLessThanOrEqual(JITTER_MS);
    pad.close();
    stage.close();
  });

  it("a tap made while disconnected keeps its correctness and streak but gets only the speed the server can prove", async () => {
    // A bursty link, so the server allows this pad a wide uplink (about 320 ms): the window alone would credit most of the outage.
    const link = await linkOf(bursty());
    const { room, stage, pads, prompt } = await playing(async (code) => [await SyncedPad.join(link, code, "Blip", -5_000)], { prompts: 2, syncMs: 4_000 });
    link.delay = steady(10);
    const { uplinkMs } = (await server.hub.seatClock(room.code, pads[0]!.you.playerId))!;
    expect(uplinkMs).toBeGreaterThan(200);
    const pad = pads[0]!;
    const [first] = await tapTogether(pads, prompt, spotOf(room.config.prompts[0]!.home));
    expect(first!.ack.streak).toBe(1);
    await stage.next("reveal");
    stage.send({ type: "host", action: "next" });
    const second = await stage.next("prompt", (m) => m.index === 1);
    await pad.socket.next("prompt", (m) => m.index === 1);
    // The Wi-Fi drops, the student taps 200 ms after the note showed, the phone is back a second later.
    const seen = await noteOn(pad, second.promptId);
    await until(seen + 100);
    pad.drop();
    await until(seen + 200);
    const tappedAt = pad.now();
    await sleep(1_000);
    await pad.reconnect(link);
    await pad.socket.next("welcome", (m) => m.you !== null);
    const sentAt = Date.now();
    pad.answer(second.promptId, spotOf(room.config.prompts[1]!.home), tappedAt);
    const ack = await pad.socket.next("answer-ack", (m) => m.promptId === second.promptId);
    if (!ack.accepted) throw new Error(`answer refused: ${ack.code}`);
    console.log(`disconnected tap: tapped ${ms(200)} after the note showed, scored ${ms(ack.reactionMs)} (it reached the server at least ${ms(sentAt - seen)} after; the uplink window was ${ms(uplinkMs!)})`);
    expect(ack.diagnosis.kind).toBe("home-spot");
    expect(ack.streak).toBe(2);
    expect(ack.reactionMs).toBeGreaterThanOrEqual(sentAt - seen);
    expect(ack.reactionMs).toBeLessThanOrEqual(sentAt - seen + 50);
    pad.close();
    stage.close();
  });
});
