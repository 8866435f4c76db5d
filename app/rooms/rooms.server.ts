import { and, desc, eq, isNotNull, isNull, sql } from "drizzle-orm";
import { nanoid } from "nanoid";
import { createHmac, randomInt, timingSafeEqual } from "node:crypto";
import { clientAddress, peek, take, type Limits } from "~/auth/rate-limit.server";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { classes, roomEvents, rooms } from "~/db/schema";
import { newRoomCode } from "~/game/roomCode";
import { promptsFromPool, roomConfig, tunePrompts, walkSheet, type RoomConfig } from "~/game/roomConfig";
import { UserError } from "~/lib/userError";
import type { SpotMap } from "~/music/positions";
import { classSpotMap } from "~/reading/spotMaps.server";
import { applySpotMap, parseReadingSet } from "~/reading/spec";
import type { Tune } from "~/tunes/builtin";
import { barRange, findTune } from "~/tunes/tunes.server";
import { quickSetupSchema, roundTitle, type ParsedSetup, type QuickSetup } from "./setup";
import { schoolNaming } from "~/school/naming.server";

/**
 * The stage's credential for its room: derived from the server secret, so nothing secret is
 * stored and only a page the host's session may load can hand it out.
 */
export function hostKeyFor(secret: string, roomId: string) {
  return createHmac("sha256", secret).update(`host:${roomId}`).digest("base64url");
}

export function hostKeyMatches(secret: string, roomId: string, key: string) {
  const expected = Buffer.from(hostKeyFor(secret, roomId));
  const given = Buffer.from(key);
  return given.length === expected.length && timingSafeEqual(given, expected);
}

/**
 * Builds the room's config from the parsed quick setup (throws RoomConfigError / MusicError with a clear message).
 * With a class's home-spot map, every prompt's home spot is the class's.
 */
export function configFromSetup({ set: setup, spec, pool }: ParsedSetup, code: string, seed = randomInt(2 ** 31), spotMap?: SpotMap, tune?: Tune): RoomConfig {
  const settings = {
    code,
    mode: setup.mode,
    homeOnly: setup.homeOnly,
    answerMs: setup.seconds * 1000,
    teams: setup.mode === "teams" ? { count: setup.teams, balance: "points" as const } : null,
  };
  if (setup.mode === "tune-walk") {
    if (!tune) throw new UserError("That tune doesn't exist.", "tuneId");
    const notes = barRange(tune, setup.fromBar ?? 1, setup.toBar ?? Infinity);
    if (notes.length === 0) throw new UserError(`Bars ${setup.fromBar ?? 1}–${setup.toBar ?? "end"} of “${tune.title}” have no notes.`, "fromBar");
    const prompts = tunePrompts({ ...spec, keyFifths: tune.keyFifths }, notes.map((n) => n.pitch));
    return roomConfig(spec, { ...settings, tuneName: tune.title, sheet: walkSheet(tune, notes) }, applySpotMap(prompts, spotMap, spec.frets));
  }
  return roomConfig(spec, settings, applySpotMap(promptsFromPool(pool, spec.keyFifths, setup.prompts, seed), spotMap, spec.frets));
}

const isCodeClash = (error: unknown) =>
  /UNIQUE constraint failed: rooms\.code/.test(String((error as { cause?: unknown }).cause ?? error));

/** Where a round came from: a saved reading set (linked for the class review) or a ready-made one (named). */
export interface RoomSource {
  readingSetId?: string | null;
  name?: string;
}

/**
 * Opens a room; a room code clash with another open room (rare: 19⁶ codes) draws a new code. The setup is kept
 * in its own column so "Host this again" can draw afresh from the same settings.
 */
export async function createRoom(db: Db, host: SessionUser, parsed: ParsedSetup, source: RoomSource = {}) {
  const setup = parsed.set;
  const spotMap = setup.classId ? await classSpotMap(db, setup.classId, setup.position, setup.tuning) : undefined;
  const tune = setup.mode === "tune-walk" ? await findTune(db, host.orgId, setup.tuneId ?? "") : undefined;
  const naming = await schoolNaming(db, host.orgId);
  const [filed] = setup.classId ? await db.select({ name: classes.name }).from(classes).where(eq(classes.id, setup.classId)) : [];
  const title = roundTitle({
    className: filed?.name,
    setName: source.name,
    mode: setup.mode,
    spec: { ...parsed.spec, keyFifths: tune?.keyFifths ?? parsed.spec.keyFifths },
  });
  for (let attempt = 0; ; attempt++) {
    const code = newRoomCode();
    const config = { ...configFromSetup(parsed, code, undefined, spotMap, tune), naming };
    const id = nanoid();
    try {
      await db.insert(rooms).values({
        id,
        code,
        orgId: host.orgId,
        hostUserId: host.id,
        classId: setup.classId || null,
        readingSetId: source.readingSetId ?? null,
        title,
        mode: setup.mode,
        position: setup.position,
        config,
        setup,
        sourceName: source.name ?? null,
      });
      return { id, code };
    } catch (error) {
      if (attempt < 5 && isCodeClash(error)) continue;
      throw error;
    }
  }
}

export async function openRoomByCode(db: Db, code: string) {
  const [room] = await db.select().from(rooms).where(and(eq(rooms.code, code), isNull(rooms.endedAt)));
  return room;
}

/** The last room that had this code and has ended (codes are reused once a room ends); undefined if none did. */
export async function endedRoomByCode(db: Db, code: string) {
  const [room] = await db.select().from(rooms).where(and(eq(rooms.code, code), isNotNull(rooms.endedAt))).orderBy(desc(rooms.endedAt)).limit(1);
  return room;
}

/** What a phone is told for a code whose round is over, so it is not taken for a mistyped one. */
export const ROUND_OVER = "This round is over: the teacher's room with that code has ended. If the class plays again, type the new code from the class screen.";

/** Codes of open rooms in which nothing was recorded (or, with no record yet, which were opened) before `before` (ms). */
export async function idleRoomCodes(db: Db, before: number): Promise<string[]> {
  const lastAt = sql<number>`coalesce((SELECT max(${roomEvents.at}) FROM ${roomEvents} WHERE ${roomEvents.roomId} = ${rooms.id}), ${rooms.createdAt})`;
  const rows = await db
    .select({ code: rooms.code })
    .from(rooms)
    .where(and(isNull(rooms.endedAt), sql`${lastAt} < ${before}`));
  return rows.map((r) => r.code);
}

/**
 * A typed room code from a visitor: an address that has tried too many codes that open no room is
 * refused for a while (codes can't be found by guessing), right codes never count.
 */
export async function lookUpRoom(svc: { db: Db; limits: Limits }, request: Request, code: string) {
  const address = clientAddress(request);
  const refused = await peek(svc.limits.roomLookups, address);
  if (refused) return { ok: false as const, refused };
  const room = await openRoomByCode(svc.db, code);
  if (room) return { ok: true as const, room };
  // A class reloading a finished round shares one address: codes that were real never count against it.
  if (await endedRoomByCode(svc.db, code)) return { ok: false as const, refused: undefined, ended: true, error: ROUND_OVER };
  await take(svc.limits.roomLookups, address);
  return { ok: false as const, refused: undefined, ended: false, error: "No open room has that code. Check the code on the class screen." };
}

export async function roomById(db: Db, id: string) {
  const [room] = await db.select().from(rooms).where(eq(rooms.id, id));
  return room;
}

export async function roomsHostedBy(db: Db, userId: string, limit = 20) {
  return db
    .select({ id: rooms.id, code: rooms.code, title: rooms.title, mode: rooms.mode, createdAt: rooms.createdAt, endedAt: rooms.endedAt })
    .from(rooms)
    .where(eq(rooms.hostUserId, userId))
    .orderBy(desc(rooms.createdAt))
    .limit(limit);
}

/** The settings a room was opened with, to host it again with a new draw; undefined for rooms from before they were kept. */
export function roomSetup(room: { setup: QuickSetup | null; sourceName: string | null; readingSetId: string | null; classId: string | null }) {
  // Parsed again: a setup kept under older rules may no longer make a round.
  const parsed = room.setup && parseReadingSet(quickSetupSchema, { ...room.setup, classId: room.classId ?? undefined });
  if (!parsed?.ok) return undefined;
  const source: RoomSource = { readingSetId: room.readingSetId, ...(room.sourceName !== null ? { name: room.sourceName } : {}) };
  return { setup: parsed, source };
}
