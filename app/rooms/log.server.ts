import { asc, eq } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { roomEvents, rooms } from "~/db/schema";
import { replay, type RoomState } from "~/game/room";

/**
 * A room rebuilt from SQLite: its config and every persisted record, replayed through the reducer.
 * `seq` is the last sequence number used and `lastAt` the server time of the last record (null
 * when nothing was recorded yet).
 */
export async function loadRoomState(db: Db, roomId: string): Promise<{ state: RoomState; seq: number; lastAt: number | null } | undefined> {
  const [room] = await db.select({ config: rooms.config }).from(rooms).where(eq(rooms.id, roomId));
  if (!room) return undefined;
  const rows = await db
    .select({ seq: roomEvents.seq, at: roomEvents.at, event: roomEvents.event })
    .from(roomEvents)
    .where(eq(roomEvents.roomId, roomId))
    .orderBy(asc(roomEvents.seq));
  const last = rows.at(-1);
  return { state: replay(room.config, rows.map((r) => r.event)), seq: last?.seq ?? 0, lastAt: last?.at ?? null };
}
