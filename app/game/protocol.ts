/**
 * The Fretcall room protocol: JSON messages over one WebSocket per stage or pad. docs/protocol.md
 * explains every message; keep the two in step. This module holds the one definition of each message
 * (its zod schema) and the server's checks; the browser takes only ./messages.ts (constants and the
 * types derived from these schemas), so zod and the schemas stay off the pad's first load.
 */
import { z } from "zod";
import { MISTAKE_LABELS, type MistakeKind } from "~/music/mistakes";
import { NOTE_NAMINGS } from "~/music/naming";
import { MAX_FRETS } from "~/music/tuning";
import {
  CLOSE_CODES,
  ERROR_CODES,
  HOST_ACTIONS,
  MAX_MESSAGE_BYTES,
  MODES,
  PAUSABLE,
  PHASES,
  PROTOCOL_VERSION,
  RATE_LIMIT_BURST,
  RATE_LIMIT_PER_SECOND,
  RATE_LIMIT_STRIKES,
  SERVER_MESSAGE_TYPES,
  type ClientMessage,
  type CloseCode,
  type ErrorCode,
  type Same,
  type ServerMessage,
} from "./messages";
import { isRoomCode, normaliseRoomCode } from "./roomCode";

export * from "./messages";

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
  // naming: the note names this phone chose for its feedback; absent, the school's.
  msg("answer", { promptId: id, spot: spotSchema, tapAt: time, naming: z.enum(NOTE_NAMINGS).optional() }),
  msg("host", { action: z.enum(HOST_ACTIONS) }),
  msg("remove", { playerId: id }),
]);

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

/**
 * Tune walk: the melody so far, for the stage to engrave — the walk's notes up to the one asked (the last), with the
 * bars of the score they sit in. Never a later note, never the title: the class would read ahead.
 */
export const melodySchema = z.strictObject({
  /** The walk's first bar (1-based): bars before it are not drawn. */
  from: z.int().positive(),
  keyFifths: z.int().min(-7).max(7),
  beatsPerBar: z.number().positive(),
  notes: z.array(
    z.strictObject({
      pitch: z.string(),
      beats: z.number().positive(),
      bar: z.int().positive(),
      onset: z.number().nonnegative().optional(),
      tied: z.boolean().optional(),
    }),
  ),
  /** An upload's bars 1… up to the asked note's (meters, keys, pickups, repeats); null for a built-in tune (x/4 throughout). */
  measures: z
    .array(
      z.strictObject({
        number: z.string(),
        start: z.number().nonnegative(),
        length: z.number().nonnegative(),
        beats: z.number().positive(),
        beatType: z.int().positive(),
        keyFifths: z.int().min(-7).max(7),
        pickup: z.boolean(),
        repeatStart: z.literal(true).optional(),
        repeatEnd: z.literal(true).optional(),
        ending: z.strictObject({ number: z.string(), start: z.boolean(), end: z.enum(["hook", "open"]).nullable() }).optional(),
      }),
    )
    .nullable(),
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
    showAt: time,
    deadline: time,
    answerMs: z.int().positive(),
  }),
  // What the prompt asks, apart from when: the stage gets it with the prompt, pads not before showAt.
  msg("note", {
    promptId: id,
    written: z.string(),
    keyFifths: z.int().min(-7).max(7),
    printedAccidental: z.enum(["sharp", "flat", "natural"]).nullable(),
    ledger: z.boolean(),
    spotsToFind: count.nullable(),
    /** The stage's alone, in a Tune walk: pads never get it. */
    melody: melodySchema.optional(),
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
  msg("ended", { phase: z.literal("ended"), reason: z.enum(["finished", "host", "idle"]), tuneName: z.string().nullable(), summaries: z.array(summarySchema) }),
]);
// The browser's list of server message types (./messages.ts) is this schema's, checked when compiling.
true satisfies Same<(typeof SERVER_MESSAGE_TYPES)[number], ServerMessage["type"]>;

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

// ---- the hot path --------------------------------------------------------------------------
// Every pad sends answers and clock pings many times a round, so these two are checked by hand
// first, by the same rules as their schemas above (still the one definition: a table test in
// protocol.test.ts holds the two together), at a fraction of the schema's cost. What the check
// does not accept goes on to the schema, whose errors say what is wrong.

const isTime = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v) && v >= 0;
const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);
/** No key outside `allowed` (a strict object); JSON.parse makes only own, enumerable keys. */
function onlyKeys(o: Record<string, unknown>, allowed: ReadonlySet<string>) {
  for (const key in o) if (!allowed.has(key)) return false;
  return true;
}
const inRange = (v: unknown, min: number, max: number) => Number.isSafeInteger(v) && (v as number) >= min && (v as number) <= max;

const ANSWER_KEYS = new Set(["type", "promptId", "spot", "tapAt", "naming"]);
const SPOT_KEYS = new Set(["string", "fret"]);
const PING_KEYS = new Set(["type", "t0", "last"]);
const REPORT_KEYS = new Set(["t0", "t3"]);

/** The frame as an answer or a ping when it plainly is a valid one; undefined leaves it to the schema. */
export function quickClientMessage(d: unknown): ClientMessage | undefined {
  if (!isRecord(d)) return undefined;
  if (d.type === "answer") {
    const { promptId, spot, naming } = d;
    if (!onlyKeys(d, ANSWER_KEYS) || typeof promptId !== "string" || promptId.length < 1 || promptId.length > 32 || !isTime(d.tapAt)) return undefined;
    if (naming !== undefined && !(NOTE_NAMINGS as readonly unknown[]).includes(naming)) return undefined;
    if (!isRecord(spot) || !onlyKeys(spot, SPOT_KEYS) || !inRange(spot.string, 1, 12) || !inRange(spot.fret, 0, MAX_FRETS)) return undefined;
    return d as ClientMessage;
  }
  if (d.type === "ping") {
    const last = d.last;
    if (!onlyKeys(d, PING_KEYS) || !isTime(d.t0)) return undefined;
    if (last !== undefined && (!isRecord(last) || !onlyKeys(last, REPORT_KEYS) || !isTime(last.t0) || !isTime(last.t3))) return undefined;
    return d as ClientMessage;
  }
  return undefined;
}

/** Parses one client frame. Never throws: garbage of any kind comes back as a ProtocolError. */
export function parseClientMessage(raw: string | Uint8Array | ArrayBuffer): ParseResult<ClientMessage> {
  const frame = decodeFrame(raw);
  if (!frame.ok) return frame;
  const quick = quickClientMessage(frame.message);
  if (quick) return { ok: true, message: quick };
  const parsed = validate(clientMessageSchema, CLIENT_TYPES, frame.message);
  if (parsed.ok && parsed.message.type === "hello" && parsed.message.protocol !== PROTOCOL_VERSION) {
    return fail(ERROR_CODES.badVersion, `This room speaks protocol ${PROTOCOL_VERSION}, the app sent ${parsed.message.protocol}. Reload the page.`, CLOSE_CODES.badVersion);
  }
  return parsed;
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
