/**
 * Scripted rooms over real WebSockets, shared by the integration tests and the live benchmark
 * (bench/live.ts): open a room straight in the database, then drive its stage and pads as a
 * browser would, speaking the room protocol (docs/protocol.md).
 */
import { nanoid } from "nanoid";
import WebSocket from "ws";
import type { Db } from "~/db/client.server";
import { rooms } from "~/db/schema";
import { CLOSE_CODES, PROTOCOL_VERSION, type ServerMessage } from "~/game/protocol";
import { newRoomCode } from "~/game/roomCode";
import { drawnPrompts, roomConfig, type RoomConfig } from "~/game/roomConfig";
import { DEMO_SCHOOL } from "~/demo/school";
import type { ReadingSpec } from "~/music/pools";
import { hostKeyFor } from "~/rooms/rooms.server";

/** Close codes after which the real page stops trying (docs/protocol.md), and our own normal close. */
const FINAL_CLOSES = new Set<number>([1000, ...Object.values(CLOSE_CODES)]);
/** How long a reconnecting script keeps trying, and how often. */
const RECONNECT_FOR_MS = 30_000;
const RECONNECT_EVERY_MS = 200;

interface Target {
  url: string;
  origin: string;
  headers: Record<string, string>;
  localAddress?: string;
}

function connect({ url, origin, headers, localAddress }: Target): Promise<WebSocket> {
  const ws = new WebSocket(url, { origin, headers, localAddress });
  return new Promise((resolve, reject) => {
    ws.once("open", () => resolve(ws));
    ws.once("error", reject);
    ws.once("unexpected-response", (_req, res) => reject(new Error(`upgrade refused: ${res.statusCode}`)));
  });
}

/** A scripted stage or pad: records every server message and waits for the ones the script expects. */
export class ScriptedSocket {
  readonly messages: ServerMessage[] = [];
  closed: { code: number; reason: string } | null = null;
  /** Every close the socket saw, reconnected or not (codes in order). */
  readonly closes: number[] = [];
  /** Times the socket came back by itself (see stayConnected). */
  reconnects = 0;
  private waiters: { match: (m: ServerMessage) => boolean; resolve: (m: ServerMessage) => void }[] = [];
  private closeWaiters: ((c: { code: number }) => void)[] = [];
  private hello: (() => unknown) | null = null;
  private stopping = false;

  private constructor(
    public ws: WebSocket,
    private readonly target: Target,
  ) {
    this.listen(ws);
  }

  private listen(ws: WebSocket) {
    ws.on("message", (data) => {
      const m = JSON.parse(String(data)) as ServerMessage;
      this.messages.push(m);
      this.waiters = this.waiters.filter((w) => (w.match(m) ? (w.resolve(m), false) : true));
    });
    ws.on("close", (code, reason) => {
      this.closes.push(code);
      if (this.hello && !this.stopping && !FINAL_CLOSES.has(code)) return void this.comeBack();
      this.closed = { code, reason: String(reason) };
      for (const w of this.closeWaiters) w({ code });
    });
  }

  /**
   * `localAddress`: the loopback address to connect from, so many classes need not share one address's limits.
   * `room`: the code the real pages put in the URL, which a load balancer routes on.
   */
  static async open(base: string, origin = base, headers: Record<string, string> = {}, localAddress?: string, room?: string): Promise<ScriptedSocket> {
    const target = { url: `${base.replace(/^http/, "ws")}/ws${room ? `?room=${room}` : ""}`, origin, headers, localAddress };
    return new ScriptedSocket(await connect(target), target);
  }

  /**
   * Reconnects by itself as the real page does, after any close that is not final (a node that died
   * or gave up the room, 1006 or 1012), saying `hello()` again: a pad's seat token, the stage's host key.
   */
  stayConnected(hello: () => unknown) {
    this.hello = hello;
  }

  private async comeBack() {
    const until = Date.now() + RECONNECT_FOR_MS;
    while (!this.stopping && Date.now() < until) {
      await new Promise((r) => setTimeout(r, RECONNECT_EVERY_MS));
      try {
        this.ws = await connect(this.target);
      } catch {
        continue;
      }
      this.listen(this.ws);
      this.reconnects += 1;
      this.send(this.hello!());
      return;
    }
    this.closed = { code: 1006, reason: "could not reconnect" };
    for (const w of this.closeWaiters) w(this.closed);
  }

  send(message: unknown) {
    this.ws.send(typeof message === "string" ? message : JSON.stringify(message));
  }

  /** The next message (already received since `from`, or still to come) that matches. */
  next<T extends ServerMessage["type"]>(
    type: T,
    where: (m: Extract<ServerMessage, { type: T }>) => boolean = () => true,
    from = 0,
    timeoutMs = 10_000,
  ): Promise<Extract<ServerMessage, { type: T }>> {
    const match = (m: ServerMessage) => m.type === type && where(m as Extract<ServerMessage, { type: T }>);
    const seen = this.messages.slice(from).find(match);
    if (seen) return Promise.resolve(seen as Extract<ServerMessage, { type: T }>);
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`no "${type}" message within ${timeoutMs} ms`)), timeoutMs);
      this.waiters.push({
        match,
        resolve: (m) => {
          clearTimeout(timer);
          resolve(m as Extract<ServerMessage, { type: T }>);
        },
      });
    });
  }

  waitClose(timeoutMs = 5_000): Promise<{ code: number }> {
    if (this.closed) return Promise.resolve(this.closed);
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error("socket did not close")), timeoutMs);
      this.closeWaiters.push((c) => {
        clearTimeout(timer);
        resolve(c);
      });
    });
  }

  close() {
    this.stopping = true;
    this.ws.close();
  }
}

const SPEC: ReadingSpec = {
  position: 5,
  tuning: "standard",
  frets: 15,
  reading: "guitar",
  keyFifths: 0,
  accidentals: "naturals",
  ledgerLines: false,
};

type TestSettings = Partial<Parameters<typeof roomConfig>[1]> & { prompts?: number };

/** A Sprint config with a short countdown, as the host form would make it. */
export function testRoomConfig(code: string, overrides: TestSettings = {}): RoomConfig {
  const { prompts = 4, ...settings } = overrides;
  return roomConfig(SPEC, { code, mode: "sprint", countdownMs: 300, answerMs: 5_000, ...settings }, drawnPrompts(SPEC, prompts, 42));
}

/** Opens a room for the demo teacher. */
export async function openTestRoom(db: Db, overrides: TestSettings = {}) {
  const code = newRoomCode();
  const config = testRoomConfig(code, overrides);
  const id = nanoid();
  await db.insert(rooms).values({
    id,
    code,
    orgId: DEMO_SCHOOL.id,
    hostUserId: DEMO_SCHOOL.teachers[0].id,
    title: "Test round",
    mode: config.mode,
    position: SPEC.position,
    config,
  });
  return { id, code, config };
}

/** `reconnect`: the stage comes back by itself after a close that is not final, as the real one does. */
export async function openStage(url: string, secret: string, room: { id: string; code: string }, localAddress?: string, { reconnect = false } = {}) {
  const stage = await ScriptedSocket.open(url, url, {}, localAddress, room.code);
  const hello = { type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: room.code, hostKey: hostKeyFor(secret, room.id) };
  stage.send(hello);
  await stage.next("welcome");
  if (reconnect) stage.stayConnected(() => hello);
  return stage;
}

/** `reconnect`: the pad comes back by itself with its seat token, as the real one does. */
export async function joinPlayer(url: string, code: string, nickname: string, localAddress?: string, { reconnect = false } = {}) {
  const pad = await ScriptedSocket.open(url, url, {}, localAddress, code);
  pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code });
  await pad.next("welcome");
  pad.send({ type: "join", room: code, nickname });
  const welcome = await pad.next("welcome", (m) => m.you !== null);
  const you = welcome.you!;
  if (reconnect) pad.stayConnected(() => ({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code, seatToken: you.seatToken }));
  return { pad, you };
}

/** Waits until the prompt is open on the server's clock (the pad would show it then). */
export async function untilShown(showAt: number) {
  const wait = showAt - Date.now() + 5;
  if (wait > 0) await new Promise((r) => setTimeout(r, wait));
}

/** The stage starts the round and the pad taps the first note's home spot: resolves once the stage shows its reveal. */
export async function answerFirstPrompt(stage: ScriptedSocket, pad: ScriptedSocket, room: { config: RoomConfig }) {
  stage.send({ type: "host", action: "start" });
  const prompt = await pad.next("prompt");
  await untilShown(prompt.showAt);
  pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[0]!.home), tapAt: Date.now() });
  const ack = await pad.next("answer-ack");
  if (!ack.accepted) throw new Error(`the home spot was refused: ${ack.message}`);
  await stage.next("reveal");
}

/** Only what a pad sends: the protocol refuses extra fields. */
export const spotOf = ({ string, fret }: { string: number; fret: number }) => ({ string, fret });
