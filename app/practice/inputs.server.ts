// What a teacher sees of solo practice: per student of a class, how many answers were tapped on the screen and
// how many played on a guitar (heard by the phone), and one student's recent answers with how each was given.
// Callers have already checked the teacher may see the class (access.server.ts); every query is by class or student.
import { and, eq, gte, sql } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { memberships, practiceAnswers, users } from "~/db/schema";
import {
  PRACTICE_REVIEW_DAYS,
  type PracticeLine,
  type PracticeMix,
} from "./answers";
import { practiceRows } from "./answers.server";

const DAY_MS = 86_400_000;

/** Every student of the class with their practice over the last PRACTICE_REVIEW_DAYS days, split by input. */
export async function classPracticeMix(
  db: Db,
  classId: string,
  now = Date.now(),
): Promise<PracticeMix[]> {
  const since = new Date(now - PRACTICE_REVIEW_DAYS * DAY_MS);
  const counted = db
    .select({
      userId: practiceAnswers.userId,
      tapped: sql<number>`sum(${practiceAnswers.input} = 'tap')`.as("tapped"),
      tappedRight:
        sql<number>`sum(${practiceAnswers.input} = 'tap' and ${practiceAnswers.kind} = 'home-spot')`.as(
          "tapped_right",
        ),
      played: sql<number>`sum(${practiceAnswers.input} = 'played')`.as(
        "played",
      ),
      playedRight:
        sql<number>`sum(${practiceAnswers.input} = 'played' and ${practiceAnswers.pitchRight})`.as(
          "played_right",
        ),
      lastAt: sql<number>`max(${practiceAnswers.at})`.as("last_at"),
    })
    .from(practiceAnswers)
    .innerJoin(
      memberships,
      and(
        eq(memberships.userId, practiceAnswers.userId),
        eq(memberships.classId, classId),
      ),
    )
    .where(gte(practiceAnswers.at, since))
    .groupBy(practiceAnswers.userId)
    .as("counted");
  const rows = await db
    .select({
      userId: users.id,
      displayName: users.displayName,
      tapped: counted.tapped,
      tappedRight: counted.tappedRight,
      played: counted.played,
      playedRight: counted.playedRight,
      lastAt: counted.lastAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .leftJoin(counted, eq(counted.userId, memberships.userId))
    .where(
      and(eq(memberships.classId, classId), eq(memberships.role, "student")),
    )
    .orderBy(users.displayName);
  return rows.map((r) => ({
    userId: r.userId,
    displayName: r.displayName,
    tapped: Number(r.tapped ?? 0),
    tappedRight: Number(r.tappedRight ?? 0),
    played: Number(r.played ?? 0),
    playedRight: Number(r.playedRight ?? 0),
    lastAt: r.lastAt === null ? null : Number(r.lastAt),
  }));
}

/** One student's latest practice answers, newest first: the stored rows (practiceRows) as the teacher's table shows them. */
export async function recentPractice(
  db: Db,
  studentId: string,
  limit = 40,
): Promise<PracticeLine[]> {
  const rows = await practiceRows(db, studentId, { limit });
  return rows.map((r) => ({
    clientId: r.clientId,
    at: r.at,
    source: r.source,
    written: r.written,
    input: r.input,
    spot:
      r.string !== null && r.fret !== null
        ? { string: r.string, fret: r.fret }
        : null,
    heard:
      r.heardMidi !== null
        ? { midi: r.heardMidi, cents: r.heardCents ?? 0 }
        : null,
    kind: r.kind,
    pitchRight: r.pitchRight,
    reactionMs: r.reactionMs,
  }));
}
