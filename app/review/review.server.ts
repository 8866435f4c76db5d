// Loading the class review: the rows the figures are made from.
import { and, eq, inArray } from "drizzle-orm";
import { data } from "react-router";
import type { Db } from "~/db/client.server";
import { answers, memberships, roomPlayers, rooms, users } from "~/db/schema";
import { roundInfo, type ReviewInput } from "./stats";

const notFound = (what: string) => data({ error: `No such ${what}.` }, { status: 404 });

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

/**
 * Every round of the class (or the one round), with its seats and answer rows: the one read every report
 * of round figures starts from (results page, class review, CSV export, JSON API), so they all agree.
 */
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
