// Loading the class review: who may see which class and round, and the rows the figures are made from.
import { and, eq, inArray } from "drizzle-orm";
import { data } from "react-router";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { answers, classes, memberships, roomPlayers, rooms, users } from "~/db/schema";
import { roundInfo, type ReviewInput } from "./stats";

const notFound = (what: string) => data({ error: `No such ${what}.` }, { status: 404 });

/** Whether a teacher (or admin) may review a class: admins of its school, and its own teachers. */
async function maySeeClass(db: Db, user: SessionUser, cls: { id: string; orgId: string }) {
  if (cls.orgId !== user.orgId) return false;
  if (user.role === "admin") return true;
  const [m] = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.classId, cls.id), eq(memberships.userId, user.id), eq(memberships.role, "teacher")));
  return Boolean(m);
}

/** The class, or a 404 for anyone who may not review it (not a hint that it exists). Call after the teacher check. */
export async function requireReviewClass(db: Db, user: SessionUser, classId: string) {
  const [cls] = await db.select({ id: classes.id, orgId: classes.orgId, name: classes.name }).from(classes).where(eq(classes.id, classId));
  if (!cls || !(await maySeeClass(db, user, cls))) throw notFound("class");
  return cls;
}

/** A round: its host, an admin of its school, or a teacher of its class may review it. */
export async function requireReviewRoom(db: Db, user: SessionUser, roomId: string) {
  const [room] = await db.select().from(rooms).where(eq(rooms.id, roomId));
  if (!room || room.orgId !== user.orgId) throw notFound("round");
  if (room.hostUserId === user.id || user.role === "admin") return room;
  const [cls] = room.classId ? await db.select({ id: classes.id, orgId: classes.orgId }).from(classes).where(eq(classes.id, room.classId)) : [];
  if (!cls || !(await maySeeClass(db, user, cls))) throw notFound("round");
  return room;
}

/** A student of the class (a past member with rounds in it is not kept: removal ends the view). */
export async function requireClassStudent(db: Db, classId: string, userId: string) {
  const [student] = await db
    .select({ id: users.id, displayName: users.displayName })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.classId, classId), eq(memberships.userId, userId), eq(memberships.role, "student")));
  if (!student) throw notFound("student in this class");
  return student;
}

/** Every round of the class (or the given rounds), with its seats and answers. */
export async function reviewInput(db: Db, where: { classId: string } | { roomId: string }): Promise<ReviewInput> {
  const roomRows = await db
    .select({ id: rooms.id, title: rooms.title, position: rooms.position, createdAt: rooms.createdAt, endedAt: rooms.endedAt, config: rooms.config })
    .from(rooms)
    .where("classId" in where ? eq(rooms.classId, where.classId) : eq(rooms.id, where.roomId));
  const ids = roomRows.map((r) => r.id);
  if (ids.length === 0) return { rounds: [], players: [], answers: [] };
  const [players, rows] = await Promise.all([
    db.select({ id: roomPlayers.id, roomId: roomPlayers.roomId, userId: roomPlayers.userId, nickname: roomPlayers.nickname }).from(roomPlayers).where(inArray(roomPlayers.roomId, ids)),
    db.select().from(answers).where(inArray(answers.roomId, ids)),
  ]);
  return { rounds: roomRows.map(roundInfo), players, answers: rows };
}

export const answerCount = async (db: Db, roomId: string) => (await db.$count(answers, eq(answers.roomId, roomId)));

export async function roomEnded(db: Db, roomId: string) {
  const [room] = await db.select({ endedAt: rooms.endedAt }).from(rooms).where(eq(rooms.id, roomId));
  return !room || room.endedAt !== null;
}
