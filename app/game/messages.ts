/**
 * What a browser needs of the room protocol (docs/protocol.md): the version, limits, codes and the
 * message types. The messages themselves are defined once, as zod schemas in ./protocol.ts, and
 * their types are derived from those schemas here through a type-only import, so the stage and the
 * pad load neither zod nor the schemas. The server checks every message a client sends; a client
 * trusts the server's messages once they are JSON objects of a type it knows (`readServerMessage`).
 */
import type { z } from "zod";
import type { clientMessageSchema, melodySchema, serverMessageSchema, summarySchema } from "./protocol";

export const PROTOCOL_VERSION = 3;
/** Largest client→server message, in UTF-8 bytes. A real pad message is under 300 bytes. */
export const MAX_MESSAGE_BYTES = 4096;
/** Per socket token bucket: bursts of 20, refilled at 8 messages a second. */
export const RATE_LIMIT_BURST = 20;
export const RATE_LIMIT_PER_SECOND = 8;
/** Refused messages in a row before the hub closes the socket. */
export const RATE_LIMIT_STRIKES = 10;
/** Stage and pads should ping at least this often during play (clock sync, liveness). */
export const PING_INTERVAL_MS = 2_000;
/** Pings a pad sends right after joining, PING_BURST_GAP_MS apart, to sync before the first prompt. */
export const PING_BURST = 8;
export const PING_BURST_GAP_MS = 250;

export const MODES = ["sprint", "tune-walk", "full-neck", "teams"] as const;
export type Mode = (typeof MODES)[number];

export const PHASES = ["lobby", "prompt", "reveal", "standings", "paused", "ended"] as const;
export type Phase = (typeof PHASES)[number];
/** The phases a round can be paused in. */
export const PAUSABLE = ["prompt", "reveal", "standings"] as const;
export type Pausable = (typeof PAUSABLE)[number];

export const HOST_ACTIONS = ["start", "pause", "resume", "skip", "next", "end", "lock", "unlock", "clear-offline"] as const;
export type HostAction = (typeof HOST_ACTIONS)[number];

export const ERROR_CODES = {
  badMessage: "bad-message",
  tooLarge: "too-large",
  badVersion: "bad-version",
  unauthorised: "unauthorised",
  roomNotFound: "room-not-found",
  roomLocked: "room-locked",
  roomFull: "room-full",
  roomEnded: "room-ended",
  badNickname: "bad-nickname",
  notHost: "not-host",
  notJoined: "not-joined",
  unknownPlayer: "unknown-player",
  wrongPhase: "wrong-phase",
  noPlayers: "no-players",
  paused: "paused",
  notOpen: "not-open",
  tooLate: "too-late",
  wrongPrompt: "wrong-prompt",
  alreadyAnswered: "already-answered",
  turnOver: "turn-over",
  spotOffNeck: "spot-off-neck",
  rateLimited: "rate-limited",
  stopping: "stopping",
} as const;
export type ErrorCode = (typeof ERROR_CODES)[keyof typeof ERROR_CODES];

/**
 * Answer refusals that say "not now" rather than "no": the pad keeps the answer and sends it again —
 * after reconnecting (`stopping`), or once the prompt is open again (`paused`, `not-open`).
 */
export const ANSWER_RESEND_CODES: readonly ErrorCode[] = [ERROR_CODES.stopping, ERROR_CODES.paused, ERROR_CODES.notOpen];

export const CLOSE_CODES = {
  badVersion: 4000,
  unauthorised: 4001,
  removed: 4002,
  roomGone: 4003,
  tooLarge: 4004,
  rateLimited: 4005,
  replaced: 4006,
  helloTimeout: 4007,
} as const;
export type CloseCode = (typeof CLOSE_CODES)[keyof typeof CLOSE_CODES];

export type ClientMessage = z.output<typeof clientMessageSchema>;
export type ServerMessage = z.output<typeof serverMessageSchema>;
export type ServerMessageOf<T extends ServerMessage["type"]> = Extract<ServerMessage, { type: T }>;
export type Summary = z.output<typeof summarySchema>;
export type Melody = z.output<typeof melodySchema>;

/** Every server message type; ./protocol.ts checks when compiling that this is exactly its schema's list. */
export const SERVER_MESSAGE_TYPES = [
  "welcome",
  "error",
  "pong",
  "roster",
  "prompt",
  "note",
  "answered",
  "answer-ack",
  "progress",
  "reveal",
  "standings",
  "paused",
  "resumed",
  "ended",
] as const;

/** True when A and B are the same union; for checks made when compiling. */
export type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;

/**
 * One frame from the server, or null for anything that is not a JSON object of a known type (a newer server's
 * message mid-deploy is skipped, not shown half-understood). The fields are the server's own, built to the schema.
 */
export function readServerMessage(raw: string): ServerMessage | null {
  let data: unknown;
  try {
    data = JSON.parse(raw);
  } catch {
    return null;
  }
  if (typeof data !== "object" || data === null || Array.isArray(data)) return null;
  const type = (data as { type?: unknown }).type;
  return (SERVER_MESSAGE_TYPES as readonly unknown[]).includes(type) ? (data as ServerMessage) : null;
}

/** After a rate-limit close (4005) a client waits this long before reconnecting. */
export const RATE_LIMIT_BACKOFF_MS = 5_000;

/**
 * How long a client waits before its `retry`-th reconnect (1, 2, …): 0.6 s doubling to 5 s, plus
 * up to 0.3 s at random (`random` in 0…1) so a class's phones do not all come back in the same
 * instant; 5 s after a rate-limit close.
 */
export function reconnectDelayMs(retry: number, closeCode: number, random: number): number {
  const jitter = random * 300;
  if (closeCode === CLOSE_CODES.rateLimited) return RATE_LIMIT_BACKOFF_MS + jitter;
  return Math.min(5_000, 300 * 2 ** retry) + jitter;
}
