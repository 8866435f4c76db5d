import { and, desc, eq, isNull } from "drizzle-orm";
import { nanoid } from "nanoid";
import { createHmac, randomInt, timingSafeEqual } from "node:crypto";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { rooms } from "~/db/schema";
import { newRoomCode } from "~/game/roomCode";
import { drawnPrompts, roomConfig, tunePrompts, type RoomConfig } from "~/game/roomConfig";
import { builtinTune } from "~/tunes/builtin";
import { readingSpecOf, type QuickSetup } from "./setup";

const MODE_TITLES = { sprint: "Sprint", "tune-walk": "Tune walk", "full-neck": "Full neck", teams: "Teams" } as const;

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

/** Builds the room's config from the quick setup (throws RoomConfigError / MusicError with a clear message). */
export function configFromSetup(setup: QuickSetup, code: string, seed = randomInt(2 ** 31)): RoomConfig {
  const spec = readingSpecOf(setup);
  const settings = {
    code,
    mode: setup.mode,
    homeOnly: setup.homeOnly,
    answerMs: setup.seconds * 1000,
    teams: setup.mode === "teams" ? { count: setup.teams, balance: "points" as const } : null,
  };
  if (setup.mode === "tune-walk") {
    const tune = builtinTune(setup.tuneId ?? "");
    if (!tune) throw new RangeError("That tune doesn't exist.");
    const prompts = tunePrompts({ ...spec, keyFifths: tune.keyFifths }, tune.notes.map((n) => n.pitch));
    return roomConfig(spec, { ...settings, tuneName: tune.title }, prompts);
  }
  return roomConfig(spec, settings, drawnPrompts(spec, setup.prompts, seed));
}

const isCodeClash = (error: unknown) =>
  /UNIQUE constraint failed: rooms\.code/.test(String((error as { cause?: unknown }).cause ?? error));

/** Opens a room; a room code clash with another open room (rare: 19⁶ codes) draws a new code. */
export async function createRoom(db: Db, host: SessionUser, setup: QuickSetup) {
  for (let attempt = 0; ; attempt++) {
    const code = newRoomCode();
    const config = configFromSetup(setup, code);
    const id = nanoid();
    try {
      await db.insert(rooms).values({
        id,
        code,
        orgId: host.orgId,
        hostUserId: host.id,
        classId: setup.classId || null,
        title: `${MODE_TITLES[setup.mode]} · position ${setup.position}`,
        mode: setup.mode,
        position: setup.position,
        config,
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
