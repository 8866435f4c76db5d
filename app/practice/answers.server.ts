// Storing and reading solo practice answers. The server decides: each answer is diagnosed again from the written
// note and the tapped spot (or the played note heard) against the home-spot map the server chooses; a batch with
// any bad answer stores nothing.
import { and, desc, eq, gte } from "drizzle-orm";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { memberships, practiceAnswers } from "~/db/schema";
import { checkSpot } from "~/music/fretboard";
import { diagnose, diagnosePlayed } from "~/music/mistakes";
import { displayPitch, MusicError, parsePitch } from "~/music/pitch";
import { positionWindow } from "~/music/positions";
import { resolveTuning } from "~/music/tuning";
import {
  MAX_AGE_MS,
  MAX_CLOCK_AHEAD_MS,
  practiceBatchSchema,
  type AnswerProblem,
  type BatchAccepted,
  type BatchRefused,
  type PracticeAnswer,
} from "./answers";
import { studentAssignments } from "./assignments.server";
import { creditedAssignment } from "./progress";
import { poolNoteOn } from "./pool";
import { spotMapFor } from "./practice.server";

type Row = typeof practiceAnswers.$inferInsert;
type StudentAssignment = Awaited<ReturnType<typeof studentAssignments>>[number];

/** Checks one answer against the engine and the student's classes and assignments; the row or a message. */
async function checked(
  db: Db,
  user: SessionUser,
  a: PracticeAnswer,
  ctx: { now: number; classIds: Set<string>; mine: StudentAssignment[] },
): Promise<{ row: Row; message: string } | string> {
  if (a.at < ctx.now - MAX_AGE_MS) return `answered on ${new Date(a.at).toISOString().slice(0, 10)}, more than 7 days ago: too old to count.`;
  if (a.at > ctx.now + MAX_CLOCK_AHEAD_MS) return "its time lies in the future; check the phone's clock.";
  if (a.classId && !ctx.classIds.has(a.classId)) return "you are not in that class.";
  const credited = creditedAssignment(ctx.mine, a.source, a.assignmentId);
  if (a.assignmentId && !credited) return "that assignment is not one of yours.";
  try {
    const tuning = resolveTuning(a.tuning);
    positionWindow(a.position);
    const tapped = a.input === "tap" ? checkSpot({ string: a.string!, fret: a.fret! }, tuning) : null;
    const { map } = await spotMapFor(db, a.classId ?? null, a.position, tuning.id);
    const note = poolNoteOn(map, a.written, a.keyFifths);
    if (!note) return `${displayPitch(parsePitch(a.written))} has no home spot in position ${a.position}.`;
    // The map says how its notes are read: guitar (sounds an octave below written) or concert pitch.
    const reading = map.reading;
    const verdict = tapped
      ? diagnose({ note, keyFifths: a.keyFifths, tapped, tuning, reading })
      : diagnosePlayed({ note, keyFifths: a.keyFifths, heardMidi: a.heardMidi!, reading });
    const row: Row = {
      userId: user.id,
      clientId: a.clientId,
      assignmentId: credited?.id ?? null,
      source: a.source,
      position: a.position,
      tuning: tuning.id,
      written: note.written,
      writtenMidi: note.writtenMidi,
      input: a.input,
      string: tapped?.string ?? null,
      fret: tapped?.fret ?? null,
      heardMidi: tapped ? null : a.heardMidi!,
      heardCents: tapped ? null : (a.heardCents ?? 0),
      kind: verdict.kind,
      pitchRight: verdict.pitchRight,
      reactionMs: a.reactionMs,
      at: new Date(a.at),
    };
    return { row, message: verdict.message };
  } catch (error) {
    if (error instanceof MusicError) return error.message.replace(/^./, (c) => c.toLowerCase());
    throw error;
  }
}

export type RecordResult = { status: 200; body: BatchAccepted } | { status: 400 | 403; body: BatchRefused };

const refuse = (error: string, problems: AnswerProblem[] = []): RecordResult => ({ status: 400, body: { error, problems } });

/** POST body → stored rows. All or nothing: one bad answer refuses the batch, naming each problem. */
export async function recordPracticeAnswers(db: Db, user: SessionUser, body: unknown, now = Date.now()): Promise<RecordResult> {
  if (user.role !== "student") {
    return { status: 403, body: { error: "Practice answers are sent by the student who practised, from their own account.", problems: [] } };
  }
  const parsed = practiceBatchSchema.safeParse(body);
  if (!parsed.success) {
    const problems = parsed.error.issues.map((issue): AnswerProblem => {
      const [top, index] = issue.path;
      const i = top === "answers" && typeof index === "number" ? index : -1;
      const raw = i >= 0 ? (body as { answers: unknown[] }).answers[i] : undefined;
      const clientId = typeof raw === "object" && raw && typeof (raw as { clientId?: unknown }).clientId === "string" ? (raw as { clientId: string }).clientId : null;
      return { index: i, clientId, message: i >= 0 ? `Answer ${i + 1}: ${issue.message}` : issue.message };
    });
    return refuse(`Nothing was stored: ${problems[0]!.message}`, problems);
  }
  const list = parsed.data.answers;
  const seen = new Set<string>();
  const repeated = list.findIndex((a) => seen.size === seen.add(a.clientId).size);
  if (repeated >= 0) {
    return refuse(`Nothing was stored: answer ${repeated + 1} repeats a clientId of the same batch.`, [
      { index: repeated, clientId: list[repeated]!.clientId, message: `Answer ${repeated + 1}: this clientId appears twice in the batch.` },
    ]);
  }

  const [classRows, mine] = await Promise.all([
    db.select({ classId: memberships.classId }).from(memberships).where(eq(memberships.userId, user.id)),
    studentAssignments(db, user.id, now),
  ]);
  const ctx = { now, classIds: new Set(classRows.map((r) => r.classId)), mine };
  const checkedRows: { row: Row; message: string }[] = [];
  const problems: AnswerProblem[] = [];
  for (const [index, a] of list.entries()) {
    const result = await checked(db, user, a, ctx);
    if (typeof result === "string") problems.push({ index, clientId: a.clientId, message: `Answer ${index + 1}: ${result}` });
    else checkedRows.push(result);
  }
  if (problems.length > 0) {
    return refuse(`Nothing was stored: ${problems.length === 1 ? problems[0]!.message : `${problems.length} answers were refused.`}`, problems);
  }

  // Idempotent by (userId, clientId): a resend of an answer already stored changes nothing.
  const inserted = await db
    .insert(practiceAnswers)
    .values(checkedRows.map((c) => c.row))
    .onConflictDoNothing({ target: [practiceAnswers.userId, practiceAnswers.clientId] })
    .returning({ clientId: practiceAnswers.clientId });
  const fresh = new Set(inserted.map((r) => r.clientId));
  return {
    status: 200,
    body: {
      stored: fresh.size,
      duplicates: checkedRows.length - fresh.size,
      results: checkedRows.map(({ row, message }) => ({ clientId: row.clientId, kind: row.kind, pitchRight: row.pitchRight, message, duplicate: !fresh.has(row.clientId) })),
    },
  };
}

export const MAX_READ = 2000;

/** A student's stored answers, newest first. */
export async function practiceRows(db: Db, studentId: string, opts: { since?: number; limit?: number } = {}) {
  const rows = await db
    .select()
    .from(practiceAnswers)
    .where(and(eq(practiceAnswers.userId, studentId), opts.since === undefined ? undefined : gte(practiceAnswers.at, new Date(opts.since))))
    .orderBy(desc(practiceAnswers.at))
    .limit(Math.min(opts.limit ?? 500, MAX_READ));
  return rows.map(({ userId: _userId, ...r }) => ({ ...r, at: r.at.getTime() }));
}
