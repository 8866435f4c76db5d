/**
 * Scripted rooms over real WebSockets, shared by the integration tests and the live benchmark
 * (bench/live.ts): open a room straight in the database, then drive its stage and pads as a
 * browser would, speaking the room protocol (docs/protocol.md).
 */
import { nanoid } from "nanoid";
import WebSocket from "ws";
import type { Db } from "~/db/client.server";
import { rooms } from "~/db/schema";
import { PROTOCOL_VERSION, type ServerMessage } from "~/game/protocol";
import { newRoomCode } from "~/game/roomCode";
import { drawnPrompts, roomConfig, type RoomConfig } from "~/game/roomConfig";
import { DEMO_SCHOOL } from "~/demo/school";
import type { ReadingSpec } from "~/music/pools";
import { hostKeyFor } from "~/rooms/rooms.server";

/** A scripted stage or pad: records every server message and waits for the ones the script expects. */
export class ScriptedSocket {
  readonly messages: ServerMessage[] = [];
  closed: { code: number; reason: string } | null = null;
  private waiters: { match: (m: ServerMessage) => boolean; resolve: (m: ServerMessage) => void }[] = [];
  private closeWaiters: ((c: { code: number }) => void)[] = [];

  private constructor(readonly ws: WebSocket) {
    ws.on("message", (data) => {
      const m = JSON.parse(String(data)) as ServerMessage;
      this.messages.push(m);
      this.waiters = this.waiters.filter((w) => (w.match(m) ? (w.resolve(m), false) : true));
    });
    ws.on("close", (code, reason) => {
      this.closed = { code, reason: String(reason) };
      for (const w of this.closeWaiters) w({ code });
    });
  }

  static open(base: string, origin = base, headers: Record<string, string> = {}): Promise<ScriptedSocket> {
    const ws = new WebSocket(`${base.replace(/^http/, "ws")}/ws`, { origin, headers });
    return new Promise((resolve, reject) => {
      ws.once("open", () => resolve(new ScriptedSocket(ws)));
      ws.once("error", reject);
      ws.once("unexpected-response", (_req, res) => reject(new Error(`upgrade refused: ${res.statusCode}`)));
    });
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

export async function openStage(url: string, secret: string, room: { id: string; code: string }) {
  const stage = await ScriptedSocket.open(url);
  stage.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: room.code, hostKey: hostKeyFor(secret, room.id) });
  await stage.next("welcome");
  return stage;
}

export async function joinPlayer(url: string, code: string, nickname: string) {
  const pad = await ScriptedSocket.open(url);
  pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code });
  await pad.next("welcome");
  pad.send({ type: "join", room: code, nickname });
  const welcome = await pad.next("welcome", (m) => m.you !== null);
  return { pad, you: welcome.you! };
}

/** Waits until the prompt is open on the server's clock (the pad would show it then). */
export async function untilShown(showAt: number) {
  const wait = showAt - Date.now() + 5;
  if (wait > 0) await new Promise((r) => setTimeout(r, wait));
}

/** Only what a pad sends: the protocol refuses extra fields. */
export const spotOf = ({ string, fret }: { string: number; fret: number }) => ({ string, fret });
