import { asc, eq } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { roomEvents, rooms } from "~/db/schema";
import { replay, type RoomEvent, type RoomRecord, type RoomState } from "~/game/room";

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
  return { state: replay(room.config, rows.map((r) => upgraded(r.event))), seq: last?.seq ?? 0, lastAt: last?.at ?? null };
}

/** Join events logged before the field was named `seatToken` carry it as `seat`. */
function upgraded(record: RoomRecord): RoomRecord {
  const e = record.event as RoomEvent & { seat?: string };
  if (e.type !== "join" || e.seatToken !== undefined) return record;
  const { seat, ...event } = e;
  return { ...record, event: { ...event, seatToken: seat! } };
}
