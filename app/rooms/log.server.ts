import { asc, eq } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { roomEvents, rooms } from "~/db/schema";
import { replay, type RoomRecord, type RoomState } from "~/game/room";
import type { RoomConfig } from "~/game/roomConfig";

/** A room rebuilt from SQLite: its config and every persisted record, replayed through the reducer. */
export async function loadRoomState(db: Db, roomId: string): Promise<{ state: RoomState; seq: number } | undefined> {
  const [room] = await db.select({ config: rooms.config }).from(rooms).where(eq(rooms.id, roomId));
  if (!room) return undefined;
  const rows = await db
    .select({ event: roomEvents.event })
    .from(roomEvents)
    .where(eq(roomEvents.roomId, roomId))
    .orderBy(asc(roomEvents.seq));
  const records = rows.map((r) => r.event as RoomRecord);
  return { state: replay(room.config as RoomConfig, records), seq: records.length };
}
