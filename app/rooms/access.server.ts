import { data } from "react-router";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { roomById } from "./rooms.server";

/** A room's host, or an admin of its school, may see it; anyone else gets a 404 (not a hint that it exists). */
export async function requireRoomAccess(db: Db, user: SessionUser, roomId: string) {
  const room = await roomById(db, roomId);
  const allowed = room && (room.hostUserId === user.id || (user.role === "admin" && room.orgId === user.orgId));
  if (!allowed) throw data({ error: "No such round." }, { status: 404 });
  return room;
}
