// Demo assignments: one per class of the invented school, some students done, some part way, some
// not started; the practice answers behind them are made up, drawn with fixed seeds so every seed looks the same.
import type { Db } from "~/db/client.server";
import { assignments, assignmentTargets, mailLog, practiceAnswers } from "~/db/schema";
import { drawnPrompts, tunePrompts, type PromptNote } from "~/game/roomConfig";
import { diagnose } from "~/music/mistakes";
import { seededRandom } from "~/music/pools";
import { resolveTuning } from "~/music/tuning";
import { materialValue, type MaterialRef } from "~/practice/assignmentForm";
import { readingPreset } from "~/reading/presets";
import { readingSpecOf } from "~/reading/spec";
import { builtinTune } from "~/tunes/builtin";
import { practiceRow } from "./practice";
import { DEMO_SCHOOL as S } from "./school";

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

/** How a student did: answers given, the share right, typical reaction time. */
type Effort = readonly [answers: number, rightShare: number, typicalMs: number];
const DONE: Effort = [46, 0.96, 1500];
const STEADY: Effort = [52, 0.93, 1700];
const PART_WAY: Effort = [18, 0.89, 1900];
const STRUGGLING: Effort = [44, 0.78, 2600];

interface DemoAssignment {
  id: string;
  classId: string;
  teacher: string;
  title: string;
  material: MaterialRef;
  goal: { notes: number; accuracyPct: number; medianMs: number | null };
  dueInDays: number;
  setDaysAgo: number;
  /** Chosen students; empty = whole class. */
  chosen: string[];
  /** Practice by student number (demo-student-N); missing = not started. */
  effort: Record<number, Effort>;
}

const student = (n: number) => `demo-student-${n}`;

const PLAN: DemoAssignment[] = [
  {
    id: "demo-assignment-tue",
    classId: "demo-class-tue",
    teacher: "demo-teacher-rafe",
    title: "Naturals in fifth position",
    material: { kind: "preset", id: "ready-naturals-5" },
    goal: { notes: 40, accuracyPct: 90, medianMs: 2000 },
    dueInDays: 5,
    setDaysAgo: 2,
    chosen: [],
    // Amani (1), the student who signs in, is part way, so her home shows an open assignment with progress.
    effort: { 1: PART_WAY, 2: DONE, 3: STEADY, 4: DONE, 5: STRUGGLING },
  },
  {
    id: "demo-assignment-thu",
    classId: "demo-class-thu",
    teacher: "demo-teacher-rafe",
    title: "Harbour Bells, pitches first",
    material: { kind: "tune", id: "harbour-bells" },
    goal: { notes: 30, accuracyPct: 85, medianMs: null },
    dueInDays: 3,
    setDaysAgo: 4,
    chosen: [],
    effort: { 9: DONE, 10: DONE, 11: STEADY, 12: PART_WAY, 14: DONE, 15: STRUGGLING },
  },
  {
    id: "demo-assignment-sat",
    classId: "demo-class-sat",
    teacher: "demo-teacher-saoirse",
    title: "One sharp: G major",
    material: { kind: "preset", id: "ready-g-major-5" },
    goal: { notes: 40, accuracyPct: 90, medianMs: 2500 },
    dueInDays: 6,
    setDaysAgo: 1,
    chosen: [student(17), student(18), student(19), student(20), student(21)],
    effort: { 17: DONE, 18: PART_WAY, 20: STEADY },
  },
];

/** The notes a student reads for the assignment, with the tuning and key they are read in. */
function notesOf(material: MaterialRef, count: number, seed: number): { notes: PromptNote[]; tuning: string; position: number } {
  if (material.kind === "tune") {
    const tune = builtinTune(material.id)!;
    const spec = { position: 5, tuning: "standard", frets: 15, reading: "guitar" as const, keyFifths: tune.keyFifths, accidentals: "chromatic" as const, ledgerLines: true };
    const walk = tunePrompts(spec, tune.notes.map((n) => n.pitch));
    return { notes: Array.from({ length: count }, (_, i) => walk[i % walk.length]!), tuning: spec.tuning, position: spec.position };
  }
  const spec = readingSpecOf(readingPreset(material.id)!.spec);
  return { notes: drawnPrompts(spec, count, seed), tuning: spec.tuning, position: spec.position };
}

/** One student's practice for one assignment: answers spread over the days since it was set. */
function practiceRows(a: DemoAssignment, userId: string, effort: Effort, seed: number, now: number) {
  const [count, rightShare, typicalMs] = effort;
  const random = seededRandom(seed);
  const { notes, tuning, position } = notesOf(a.material, count, seed);
  const tuningNotes = resolveTuning(tuning);
  // Two or three short sittings, the first a day after the assignment was set.
  const start = now - a.setDaysAgo * DAY + 20 * HOUR;
  return notes.map((note, i) => {
    const right = random() < rightShare;
    // A miss is the fret next door: the engine names it (half step off, most often).
    const tapped = right ? note.home : { string: note.home.string, fret: note.home.fret + (random() < 0.5 ? 1 : -1) };
    const d = diagnose({ note, keyFifths: note.keyFifths, tapped, tuning: tuningNotes, reading: "guitar", homeOnly: true });
    const sitting = Math.floor((i / notes.length) * Math.min(3, Math.max(1, a.setDaysAgo)));
    const who = { userId, clientId: `demo-${a.id}-${i}`, assignmentId: a.id, source: materialValue(a.material), position, tuning };
    return practiceRow(who, note, tapped, d, Math.round(typicalMs * (0.7 + random() * 0.6)), Math.min(now - HOUR, start + sitting * DAY + i * 9_000));
  });
}

/** Adds the demo assignments to a freshly seeded demo school; their notices count as already sent. */
export async function seedDemoAssignments(db: Db, now = Date.now()) {
  const withEmail = new Set([student(S.studentWithSignIn.index + 1)]);
  for (const [index, a] of PLAN.entries()) {
    const dueAt = new Date(Math.floor((now + a.dueInDays * DAY) / DAY) * DAY + 18 * HOUR);
    const targets = a.chosen.length ? a.chosen : S.students.flatMap(([, classId], i) => (classId === a.classId ? [student(i + 1)] : []));
    const practice = Object.entries(a.effort).flatMap(([n, effort]) => practiceRows(a, student(Number(n)), effort, 1000 * (index + 1) + Number(n), now));
    await db.batch([
      db.insert(assignments).values({
        id: a.id,
        orgId: S.id,
        classId: a.classId,
        title: a.title,
        presetId: a.material.kind === "preset" ? a.material.id : null,
        tuneId: a.material.kind === "tune" ? a.material.id : null,
        goalNotes: a.goal.notes,
        goalAccuracy: a.goal.accuracyPct,
        goalMedianMs: a.goal.medianMs,
        dueAt,
        createdBy: a.teacher,
        createdAt: new Date(now - a.setDaysAgo * DAY),
      }),
      ...(a.chosen.length ? [db.insert(assignmentTargets).values(a.chosen.map((userId) => ({ assignmentId: a.id, userId })))] : []),
      ...(practice.length ? [db.insert(practiceAnswers).values(practice)] : []),
      ...targets
        .filter((userId) => withEmail.has(userId))
        .map((userId) => db.insert(mailLog).values({ kind: "assignment-notice", subjectId: a.id, userId, sentAt: new Date(now - a.setDaysAgo * DAY) })),
    ]);
  }
}
