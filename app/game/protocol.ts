/**
 * The Fretcall room protocol: JSON messages over one WebSocket per stage or pad, shared by the
 * server hub and the browser. docs/protocol.md explains every message; keep the two in step.
 * Limits live here as constants so the hub, the client and the docs agree.
 */
import { z } from "zod";
import { MISTAKE_LABELS, type MistakeKind } from "~/music/mistakes";
import { MAX_FRETS } from "~/music/tuning";
import { isRoomCode, normaliseRoomCode } from "./roomCode";

export const PROTOCOL_VERSION = 2;
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
} as const;
export type ErrorCode = (typeof ERROR_CODES)[keyof typeof ERROR_CODES];

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

const MISTAKE_KINDS = Object.keys(MISTAKE_LABELS) as [MistakeKind, ...MistakeKind[]];

// ---- shared pieces -------------------------------------------------------------------------

const time = z.number().nonnegative();
const id = z.string().min(1).max(32);
const roomCode = z
  .string()
  .max(32)
  .transform(normaliseRoomCode)
  .refine(isRoomCode, "not a room code");
const spotSchema = z.strictObject({
  string: z.int().min(1).max(12),
  fret: z.int().min(0).max(MAX_FRETS),
});
const count = z.int().nonnegative();

// ---- client → server -----------------------------------------------------------------------

const msg = <T extends string, S extends z.ZodRawShape>(type: T, shape: S) => z.strictObject({ type: z.literal(type), ...shape });

export const clientMessageSchema = z.discriminatedUnion("type", [
  z.discriminatedUnion("role", [
    msg("hello", { protocol: z.int(), role: z.literal("host"), room: roomCode, hostKey: z.string().min(16).max(128) }),
    msg("hello", { protocol: z.int(), role: z.literal("player"), room: roomCode, seatToken: z.string().min(16).max(64).optional() }),
  ]),
  msg("join", { room: roomCode, nickname: z.string().max(100) }),
  msg("ping", { t0: time, last: z.strictObject({ t0: time, t3: time }).optional() }),
  msg("answer", { promptId: id, spot: spotSchema, tapAt: time }),
  msg("host", { action: z.enum(HOST_ACTIONS) }),
  msg("remove", { playerId: id }),
]);
export type ClientMessage = z.output<typeof clientMessageSchema>;

// ---- server → client -----------------------------------------------------------------------

const you = z.strictObject({ playerId: id, nickname: z.string(), seatToken: z.string(), team: z.int().nullable() });
/** The room's phase once the message is applied: every message that can change it carries it. */
const phase = z.enum(PHASES);
const pausedFrom = z.enum(PAUSABLE).nullable();
const diagnosis = z.strictObject({ kind: z.enum(MISTAKE_KINDS), pitchRight: z.boolean(), semitones: z.int(), message: z.string() });
const standingRow = z.strictObject({ playerId: id, nickname: z.string(), points: count, rank: z.int().positive(), team: z.int().nullable() });
const streakRow = z.strictObject({ playerId: id, nickname: z.string(), longestStreak: count });
const teamRow = z.strictObject({ team: count, name: z.string(), points: count, members: count });
export const summarySchema = z.strictObject({
  playerId: id,
  nickname: z.string(),
  points: count,
  answered: count,
  correct: count,
  accuracy: z.number().min(0).max(1),
  medianReactionMs: z.number().nonnegative().nullable(),
  longestStreak: count,
});

export const serverMessageSchema = z.discriminatedUnion("type", [
  msg("welcome", { role: z.enum(["host", "player"]), room: z.string(), phase, pausedFrom, serverTime: time, you: you.nullable() }),
  msg("error", { code: z.enum(Object.values(ERROR_CODES) as [ErrorCode, ...ErrorCode[]]), message: z.string() }),
  msg("pong", { t0: time, t1: time, t2: time }),
  msg("roster", {
    locked: z.boolean(),
    max: count,
    players: z.array(z.strictObject({ playerId: id, nickname: z.string(), online: z.boolean(), team: z.int().nullable() })),
  }),
  msg("prompt", {
    phase,
    promptId: id,
    index: count,
    total: count,
    mode: z.enum(MODES),
    written: z.string(),
    keyFifths: z.int().min(-7).max(7),
    printedAccidental: z.enum(["sharp", "flat", "natural"]).nullable(),
    ledger: z.boolean(),
    showAt: time,
    deadline: time,
    answerMs: z.int().positive(),
    spotsToFind: count.nullable(),
  }),
  msg("answered", { promptId: id, count, of: count, offline: count }),
  z.discriminatedUnion("accepted", [
    msg("answer-ack", {
      promptId: id,
      accepted: z.literal(true),
      points: count,
      total: count,
      streak: count,
      reactionMs: z.number().nonnegative(),
      diagnosis,
      found: z.enum(["new", "already"]).nullable(),
    }),
    msg("answer-ack", { promptId: id, accepted: z.literal(false), code: z.enum(Object.values(ERROR_CODES) as [ErrorCode, ...ErrorCode[]]), message: z.string() }),
  ]),
  msg("progress", { promptId: id, found: z.array(spotSchema), total: count }),
  msg("reveal", {
    phase,
    promptId: id,
    written: z.string(),
    home: spotSchema,
    otherSpots: z.array(spotSchema),
    heat: z.array(z.strictObject({ string: z.int(), fret: z.int(), count: z.int().positive() })),
    counts: z.record(z.enum([...MISTAKE_KINDS, "no-answer"]), count),
    answered: count,
    of: count,
    offline: count,
  }),
  msg("standings", { phase, final: z.boolean(), points: z.array(standingRow), streaks: z.array(streakRow), teams: z.array(teamRow) }),
  msg("paused", { phase: z.literal("paused"), pausedFrom: z.enum(PAUSABLE), at: time }),
  msg("resumed", { phase: z.enum(PAUSABLE) }),
  msg("ended", { phase: z.literal("ended"), reason: z.enum(["finished", "host"]), tuneName: z.string().nullable(), summaries: z.array(summarySchema) }),
]);
export type ServerMessage = z.output<typeof serverMessageSchema>;
export type ServerMessageOf<T extends ServerMessage["type"]> = Extract<ServerMessage, { type: T }>;
export type Summary = z.output<typeof summarySchema>;

// ---- parsing -------------------------------------------------------------------------------

export interface ProtocolError {
  code: ErrorCode;
  message: string;
}
export type ParseResult<T> = { ok: true; message: T } | { ok: false; error: ProtocolError; close: CloseCode | null };

const fail = (code: ErrorCode, message: string, close: CloseCode | null = null) => ({ ok: false, error: { code, message }, close }) as const;

const strictUtf8 = new TextDecoder("utf-8", { fatal: true });

function decodeFrame(raw: string | Uint8Array | ArrayBuffer): ParseResult<unknown> {
  // UTF-8 never takes fewer bytes than UTF-16 code units, so a long string fails before encoding.
  const bytes = typeof raw === "string" ? (raw.length > MAX_MESSAGE_BYTES ? Infinity : new TextEncoder().encode(raw).length) : raw.byteLength;
  if (bytes > MAX_MESSAGE_BYTES) return fail(ERROR_CODES.tooLarge, `Messages are limited to ${MAX_MESSAGE_BYTES} bytes.`, CLOSE_CODES.tooLarge);
  let text: string;
  try {
    text = typeof raw === "string" ? raw : strictUtf8.decode(raw);
  } catch {
    return fail(ERROR_CODES.badMessage, "The message is not valid UTF-8 text.");
  }
  try {
    return { ok: true, message: JSON.parse(text) as unknown };
  } catch {
    return fail(ERROR_CODES.badMessage, "The message is not valid JSON.");
  }
}

function validate<S extends z.ZodType>(schema: S, types: readonly string[], data: unknown): ParseResult<z.output<S>> {
  if (typeof data !== "object" || data === null || Array.isArray(data) || typeof (data as { type?: unknown }).type !== "string") {
    return fail(ERROR_CODES.badMessage, 'A message is a JSON object with a string "type" field.');
  }
  const type = (data as { type: string }).type;
  if (!types.includes(type)) return fail(ERROR_CODES.badMessage, `Unknown message type "${type}"; expected one of ${types.join(", ")}.`);
  const result = schema.safeParse(data);
  if (result.success) return { ok: true, message: result.data };
  const problems = result.error.issues.slice(0, 3).map((i) => `${i.path.length > 0 ? i.path.join(".") : "message"}: ${i.message}`);
  return fail(ERROR_CODES.badMessage, `Bad "${type}" message — ${problems.join("; ")}.`);
}

/** The `type` values a schema accepts, read from the schema itself so error messages never go stale. */
type Option = { shape: { type: { value: string } } } | { options: readonly Option[] };
const typesOf = (options: readonly Option[]): string[] => [...new Set(options.flatMap((o) => ("options" in o ? typesOf(o.options) : [o.shape.type.value])))];
const CLIENT_TYPES = typesOf(clientMessageSchema.options as readonly Option[]);
const SERVER_TYPES = typesOf(serverMessageSchema.options as readonly Option[]);

/** Parses one client frame. Never throws: garbage of any kind comes back as a ProtocolError. */
export function parseClientMessage(raw: string | Uint8Array | ArrayBuffer): ParseResult<ClientMessage> {
  const frame = decodeFrame(raw);
  if (!frame.ok) return frame;
  const parsed = validate(clientMessageSchema, CLIENT_TYPES, frame.message);
  if (parsed.ok && parsed.message.type === "hello" && parsed.message.protocol !== PROTOCOL_VERSION) {
    return fail(ERROR_CODES.badVersion, `This room speaks protocol ${PROTOCOL_VERSION}, the app sent ${parsed.message.protocol}. Reload the page.`, CLOSE_CODES.badVersion);
  }
  return parsed;
}

/** For clients: checks what the server sent (same guarantees, no size limit). */
export function parseServerMessage(raw: string): ParseResult<ServerMessage> {
  try {
    return validate(serverMessageSchema, SERVER_TYPES, JSON.parse(raw) as unknown);
  } catch {
    return fail(ERROR_CODES.badMessage, "The message is not valid JSON.");
  }
}

// ---- rate limit ----------------------------------------------------------------------------

export interface RateBucket {
  tokens: number;
  at: number;
  strikes: number;
}

export const newRateBucket = (now: number): RateBucket => ({ tokens: RATE_LIMIT_BURST, at: now, strikes: 0 });

/** One incoming message: allow it, refuse it (error rate-limited), or close the socket (4005). */
export function takeToken(bucket: RateBucket, now: number): { bucket: RateBucket; verdict: "allow" | "refuse" | "close" } {
  const tokens = Math.min(RATE_LIMIT_BURST, bucket.tokens + (Math.max(0, now - bucket.at) / 1000) * RATE_LIMIT_PER_SECOND);
  if (tokens >= 1) return { bucket: { tokens: tokens - 1, at: now, strikes: 0 }, verdict: "allow" };
  const strikes = bucket.strikes + 1;
  return { bucket: { tokens, at: now, strikes }, verdict: strikes >= RATE_LIMIT_STRIKES ? "close" : "refuse" };
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
