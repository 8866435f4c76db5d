import { findTune } from "~/tunes/tunes.server";
// Assignments in the database: what can be assigned, who is targeted, and everyone's progress.
// The rules for progress itself are pure, in progress.ts.
import { and, asc, eq, inArray, isNull, or } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { assignments, assignmentTargets, classes, memberships, practiceAnswers, readingSets, tunes, users } from "~/db/schema";
import { READING_PRESETS, readingPreset } from "~/reading/presets";
import { setsFor } from "~/reading/sets.server";
import { parseReadingSet, readingSetSpecSchema, describeReadingSet, type ParsedReadingSet } from "~/reading/spec";
import { BUILTIN_TUNES, type Tune } from "~/tunes/builtin";
import { practicePath, type MaterialKind, type MaterialRef } from "./assignmentForm";
import type { OpenAssignment } from "./AssignmentParts";
import { completedLate, progressOf, statusOf, type Goal, type PracticeRow, type Progress, type Status } from "./progress";

export type Assignment = typeof assignments.$inferSelect;

// ---- material ----------------------------------------------------------------------------------

export interface MaterialOption {
  value: string;
  label: string;
  group: "Reading sets" | "Ready-made reading sets" | "Tunes";
}

/** Everything a teacher may assign to this class: their visible saved sets (school-wide or this class's), the presets, the tunes. */
export async function materialOptions(db: Db, user: SessionUser, classId: string): Promise<MaterialOption[]> {
  const [sets, uploaded] = await Promise.all([
    setsFor(db, user),
    db.select({ id: tunes.id, title: tunes.title }).from(tunes).where(eq(tunes.orgId, user.orgId)).orderBy(asc(tunes.title)),
  ]);
  return [
    ...sets
      .filter((s) => s.spec && (s.classId === null || s.classId === classId))
      .map((s) => ({ value: `set:${s.id}`, label: `${s.name} — ${s.summary}`, group: "Reading sets" as const })),
    ...READING_PRESETS.map((p) => ({ value: `preset:${p.id}`, label: `${p.step}. ${p.name} — ${describeReadingSet(p.spec)}`, group: "Ready-made reading sets" as const })),
    ...[...BUILTIN_TUNES, ...uploaded].map((t) => ({ value: `tune:${t.id}`, label: t.title, group: "Tunes" as const })),
  ];
}

/** What a student practises for an assignment, resolved; null when the set or tune has since been deleted. */
export type Material =
  | { kind: "set" | "preset"; id: string; name: string; reading: ParsedReadingSet }
  | { kind: "tune"; id: string; name: string; tune: Tune };

/** A tune wherever it lives: built in, or uploaded by the school. */
export async function resolveMaterial(db: Db, orgId: string, ref: MaterialRef): Promise<Material | null> {
  if (ref.kind === "preset") {
    const p = readingPreset(ref.id);
    const reading = p && parseReadingSet(readingSetSpecSchema, p.spec);
    return p && reading?.ok ? { kind: "preset", id: p.id, name: p.name, reading } : null;
  }
  if (ref.kind === "tune") {
    const t = await findTune(db, orgId, ref.id);
    return t ? { kind: "tune", id: t.id, name: t.title, tune: t } : null;
  }
  const [row] = await db.select().from(readingSets).where(and(eq(readingSets.id, ref.id), eq(readingSets.orgId, orgId)));
  const parsed = row && parseReadingSet(readingSetSpecSchema, row.spec);
  return row && parsed?.ok ? { kind: "set", id: row.id, name: row.name, reading: parsed } : null;
}

export function materialRefOf(a: Pick<Assignment, "readingSetId" | "presetId" | "tuneId">): MaterialRef | null {
  if (a.readingSetId) return { kind: "set", id: a.readingSetId };
  if (a.presetId) return { kind: "preset", id: a.presetId };
  if (a.tuneId) return { kind: "tune", id: a.tuneId };
  return null;
}

/**
 * Solo practice drills the home spot, and its own figures count only the home spot as correct
 * (app/practice/summary.ts); assignment progress counts the same way, whatever the set says for live rounds.
 */
const PRACTICE_HOME_ONLY = true;


// ---- creating and deleting -----------------------------------------------------------------------

export interface NewAssignment {
  title: string;
  material: MaterialRef;
  students: string[];
  goal: Goal;
  dueAt: number;
}

/** Students of the class, by name. */
export async function classStudents(db: Db, classId: string) {
  return db
    .select({ id: users.id, displayName: users.displayName, email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.classId, classId), eq(memberships.role, "student")))
    .orderBy(asc(users.displayName));
}

/**
 * Checks what only the database knows (the material is one this teacher may assign here; the chosen
 * students are in the class) and stores the assignment. Field errors come back instead of a row.
 */
export async function createAssignment(
  db: Db,
  user: SessionUser,
  cls: { id: string; orgId: string },
  input: NewAssignment,
  now = Date.now(),
): Promise<{ ok: true; id: string } | { ok: false; errors: Record<string, string> }> {
  const allowed = (await materialOptions(db, user, cls.id)).some((o) => o.value === `${input.material.kind}:${input.material.id}`);
  const material = allowed ? await resolveMaterial(db, cls.orgId, input.material) : null;
  if (!material) return { ok: false, errors: { material: "That reading set or tune isn't available to this class. Choose another." } };
  const inClass = new Set((await classStudents(db, cls.id)).map((s) => s.id));
  if (input.students.some((id) => !inClass.has(id))) {
    return { ok: false, errors: { students: "Some of the chosen students are not in this class any more. Choose again." } };
  }
  const id = nanoid();
  await db.batch([
    db.insert(assignments).values({
      id,
      orgId: cls.orgId,
      classId: cls.id,
      title: input.title || material.name,
      readingSetId: material.kind === "set" ? material.id : null,
      presetId: material.kind === "preset" ? material.id : null,
      tuneId: material.kind === "tune" ? material.id : null,
      goalNotes: input.goal.notes,
      goalAccuracy: input.goal.accuracyPct,
      goalMedianMs: input.goal.medianMs,
      playedOnly: input.goal.playedOnly ?? false,
      dueAt: new Date(input.dueAt),
      createdBy: user.id,
      createdAt: new Date(now),
    }),
    ...(input.students.length ? [db.insert(assignmentTargets).values(input.students.map((userId) => ({ assignmentId: id, userId })))] : []),
  ]);
  return { ok: true, id };
}

/** Deletes an assignment of this class; false when there is none (already deleted, or another class's). */
export async function deleteAssignment(db: Db, classId: string, id: string) {
  const gone = await db.delete(assignments).where(and(eq(assignments.id, id), eq(assignments.classId, classId))).returning({ id: assignments.id });
  return gone.length > 0;
}

// ---- who and how far -----------------------------------------------------------------------------

export const goalOf = (a: Pick<Assignment, "goalNotes" | "goalAccuracy" | "goalMedianMs" | "playedOnly">): Goal => ({
  notes: a.goalNotes,
  accuracyPct: a.goalAccuracy,
  medianMs: a.goalMedianMs,
  playedOnly: a.playedOnly,
});

export interface Target {
  userId: string;
  displayName: string;
  email: string | null;
}

/**
 * The students each assignment is for: its chosen students, or (none chosen) the whole class. Either
 * way only current students of the class: removal from the class ends the assignment for them.
 */
export async function targetsOf(db: Db, list: readonly Pick<Assignment, "id" | "classId">[]): Promise<Map<string, Target[]>> {
  const ids = list.map((a) => a.id);
  const classIds = [...new Set(list.map((a) => a.classId))];
  if (ids.length === 0) return new Map();
  const [chosen, members] = await Promise.all([
    db.select().from(assignmentTargets).where(inArray(assignmentTargets.assignmentId, ids)),
    db
      .select({ classId: memberships.classId, userId: users.id, displayName: users.displayName, email: users.email })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(inArray(memberships.classId, classIds), eq(memberships.role, "student")))
      .orderBy(asc(users.displayName)),
  ]);
  return new Map(
    list.map((a) => {
      const picked = new Set(chosen.filter((t) => t.assignmentId === a.id).map((t) => t.userId));
      const inClass = members.filter((m) => m.classId === a.classId && (picked.size === 0 || picked.has(m.userId)));
      return [a.id, inClass.map(({ userId, displayName, email }) => ({ userId, displayName, email }))];
    }),
  );
}

/** Practice answers given for these assignments, by assignment and student. */
async function practiceFor(db: Db, assignmentIds: readonly string[], userIds?: readonly string[]) {
  const byKey = new Map<string, PracticeRow[]>();
  if (assignmentIds.length === 0) return byKey;
  const rows = await db
    .select({
      assignmentId: practiceAnswers.assignmentId,
      userId: practiceAnswers.userId,
      kind: practiceAnswers.kind,
      pitchRight: practiceAnswers.pitchRight,
      reactionMs: practiceAnswers.reactionMs,
      at: practiceAnswers.at,
      input: practiceAnswers.input,
    })
    .from(practiceAnswers)
    .where(and(inArray(practiceAnswers.assignmentId, [...assignmentIds]), userIds ? inArray(practiceAnswers.userId, [...userIds]) : undefined));
  for (const r of rows) {
    const key = `${r.assignmentId} ${r.userId}`;
    byKey.set(key, [...(byKey.get(key) ?? []), { kind: r.kind, pitchRight: r.pitchRight, reactionMs: r.reactionMs, at: r.at.getTime(), input: r.input }]);
  }
  return byKey;
}

export interface StudentProgress extends Target {
  progress: Progress;
  status: Status;
  late: boolean;
}

export interface AssignmentView {
  id: string;
  classId: string;
  title: string;
  material: { kind: MaterialKind; id: string; name: string } | null;
  goal: Goal;
  dueAt: number;
  createdAt: number;
  /** Chosen students (true) or the whole class. */
  chosen: boolean;
  students: StudentProgress[];
  done: number;
}

/** Assignments with every targeted student's progress (or one student's only), newest due date first. */
export async function assignmentViews(db: Db, list: Assignment[], now: number, onlyUser?: string): Promise<AssignmentView[]> {
  const [targets, practice, chosenIds] = await Promise.all([
    targetsOf(db, list),
    practiceFor(db, list.map((a) => a.id), onlyUser ? [onlyUser] : undefined),
    list.length ? db.selectDistinct({ id: assignmentTargets.assignmentId }).from(assignmentTargets).where(inArray(assignmentTargets.assignmentId, list.map((a) => a.id))) : [],
  ]);
  const chosen = new Set(chosenIds.map((c) => c.id));
  const views = await Promise.all(
    list.map(async (a) => {
      const ref = materialRefOf(a);
      const material = ref ? await resolveMaterial(db, a.orgId, ref) : null;
      const goal = goalOf(a);
      const dueAt = a.dueAt.getTime();
      const students = (targets.get(a.id) ?? [])
        .filter((t) => !onlyUser || t.userId === onlyUser)
        .map((t) => {
          const progress = progressOf(goal, practice.get(`${a.id} ${t.userId}`) ?? [], PRACTICE_HOME_ONLY);
          return { ...t, progress, status: statusOf(progress, dueAt, now), late: completedLate(progress, dueAt) };
        });
      return {
        id: a.id,
        classId: a.classId,
        title: a.title,
        material: material ? { kind: material.kind, id: material.id, name: material.name } : null,
        goal,
        dueAt,
        createdAt: a.createdAt.getTime(),
        chosen: chosen.has(a.id),
        students,
        done: students.filter((s) => s.status === "done").length,
      };
    }),
  );
  return views.sort((x, y) => y.dueAt - x.dueAt);
}

export async function classAssignments(db: Db, classId: string, now = Date.now()) {
  return assignmentViews(db, await db.select().from(assignments).where(eq(assignments.classId, classId)), now);
}

export interface MyAssignment extends OpenAssignment {
  material: AssignmentView["material"];
}

/** A student's assignments in every class they study in, soonest due first. */
export async function studentAssignments(db: Db, userId: string, now = Date.now()): Promise<MyAssignment[]> {
  const rows = await db
    .select({ a: assignments, className: classes.name })
    .from(assignments)
    .innerJoin(classes, eq(classes.id, assignments.classId))
    .innerJoin(memberships, and(eq(memberships.classId, assignments.classId), eq(memberships.userId, userId), eq(memberships.role, "student")))
    .leftJoin(assignmentTargets, eq(assignmentTargets.assignmentId, assignments.id))
    .where(or(isNull(assignmentTargets.userId), eq(assignmentTargets.userId, userId)));
  const unique = [...new Map(rows.map((r) => [r.a.id, r])).values()];
  const className = new Map(unique.map((r) => [r.a.id, r.className]));
  const views = await assignmentViews(db, unique.map((r) => r.a), now, userId);
  return views
    .flatMap((v) =>
      v.students.map((s) => ({
        id: v.id,
        title: v.title,
        className: className.get(v.id)!,
        material: v.material,
        goal: v.goal,
        dueAt: v.dueAt,
        progress: s.progress,
        status: s.status,
        late: s.late,
        practiceUrl: practicePath(v.id),
      })),
    )
    .sort((x, y) => x.dueAt - y.dueAt);
}

/** Overdue work stays on the student's home this long after its due time, then drops off. */
export const OVERDUE_SHOWN_MS = 14 * 86_400_000;

/** What the student's home lists: open, recently overdue, or done but not yet due (so the student sees the ✓). */
export async function openAssignmentsFor(db: Db, userId: string, now = Date.now()) {
  return (await studentAssignments(db, userId, now)).filter((a) => (a.status === "done" ? a.dueAt > now : a.dueAt > now - OVERDUE_SHOWN_MS));
}

/**
 * For the practice page (/me/practice?assignment=<id>): the assignment if it is this student's, with
 * the material to practise and the goal; undefined otherwise (answer 404).
 * Practice answers given for it are stored with `assignmentId` set; only those count toward it.
 */
export async function assignmentForStudent(db: Db, userId: string, assignmentId: string) {
  const mine = (await studentAssignments(db, userId)).find((a) => a.id === assignmentId);
  if (!mine) return undefined;
  const [row] = await db.select().from(assignments).where(eq(assignments.id, assignmentId));
  const ref = row ? materialRefOf(row) : null;
  const material = row && ref ? await resolveMaterial(db, row.orgId, ref) : null;
  return { ...mine, material };
}
