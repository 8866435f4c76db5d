// The class hub: per student, last activity, how they read the class's current step, their stuck notes and their
// latest assignment; and whether the class is ready for the next step. Every figure is counted in SQL (grouped
// per student, per note), so a class with a long history is never loaded round by round.
import { and, desc, eq, isNotNull, sql, type SQL } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { rooms } from "~/db/schema";
import type { RoomConfig } from "~/game/roomConfig";
import type { MistakeKind } from "~/music/mistakes";
import { classAssignments } from "~/practice/assignments.server";
import type { Status } from "~/practice/progress";
import { READING_PRESETS, type ReadingPreset } from "~/reading/presets";
import { classReady, readsStep, stepOfRound, stepTargetMs, type ClassReadiness, type StepFigures, type StepReading } from "./ready";
import { reteachList, type NoteCell } from "./stats";

/** The class's current step is judged on its latest rounds of that reading, at most this many. */
export const STEP_ROUNDS = 5;

export interface HubStudent {
  id: string;
  displayName: string;
  lastActivity: number | null;
  step: StepFigures | null;
  reading: StepReading;
  /** Notes this student misreads in the class's rounds (the review's "not read yet" rule), worst first. */
  stuck: string[];
  assignment: { title: string; status: Status } | null;
}

export interface ClassHub {
  /** The reading of the class's latest round; null before any. */
  current: { title: string; step: ReadingPreset | null; targetMs: number; rounds: number } | null;
  next: ReadingPreset | null;
  readiness: ClassReadiness | null;
  students: HubStudent[];
}

const list = (ids: readonly string[]) => sql.join(ids.map((id) => sql`${id}`), sql`, `);
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

async function stepFigures(db: Db, roomIds: readonly string[]) {
  if (roomIds.length === 0) return new Map<string, StepFigures>();
  // The median of each student's right-pitch times, by row number over their sorted times (SQLite has no median).
  const rows = await db.all<{ uid: string; answers: number; home: number; median: number | null }>(sql`
    with a as (
      select rp.user_id as uid, an.kind as kind, an.pitch_right as pitch_right, an.reaction_ms as ms
      from answers an join room_players rp on rp.id = an.player_id
      where an.room_id in (${list(roomIds)}) and rp.user_id is not null
    ), t as (
      select uid, ms, row_number() over (partition by uid order by ms) as rn, count(*) over (partition by uid) as n from a where pitch_right = 1
    )
    select c.uid as uid, c.answers as answers, c.home as home, m.median as median
    from (select uid, count(*) as answers, sum(kind = 'home-spot') as home from a group by uid) c
    left join (select uid, avg(ms) as median from t where rn in ((n + 1) / 2, (n + 2) / 2) group by uid) m on m.uid = c.uid`);
  return new Map(rows.map((r) => [r.uid, { answers: Number(r.answers), homeSpots: Number(r.home), medianMs: num(r.median) }]));
}

/** Per student and note, the class's answers folded into the review's note cells, then the review's reteach rule. */
async function stuckNotes(db: Db, inClass: SQL) {
  const rows = await db.all<{ uid: string; written: string; midi: number; kind: string; n: number; correct: number }>(sql`
    select rp.user_id as uid, an.written as written, an.written_midi as midi, an.kind as kind, count(*) as n, sum(an.verdict = 'right') as correct
    from answers an join room_players rp on rp.id = an.player_id join rooms r on r.id = an.room_id
    where ${inClass} and rp.user_id is not null
    group by rp.user_id, an.written, an.kind`);
  const cells = new Map<string, Map<string, NoteCell>>();
  for (const r of rows) {
    const mine = cells.get(r.uid) ?? new Map<string, NoteCell>();
    cells.set(r.uid, mine);
    const cell = mine.get(r.written) ?? { written: r.written, writtenMidi: Number(r.midi), home: null, answers: 0, correct: 0, accuracy: 0, medianMs: null, kinds: {} };
    cell.answers += Number(r.n);
    cell.correct += Number(r.correct);
    cell.accuracy = cell.correct / cell.answers;
    cell.kinds[r.kind as MistakeKind] = Number(r.n);
    mine.set(r.written, cell);
  }
  // Times are left out (null), so only the "not read yet" half of the rule applies: accuracy, not speed.
  return new Map([...cells].map(([uid, mine]) => [uid, reteachList([...mine.values()]).map((c) => c.written)]));
}

async function lastActivity(db: Db, inClass: SQL, studentIds: readonly string[]) {
  if (studentIds.length === 0) return new Map<string, number>();
  const rows = await db.all<{ uid: string; at: number }>(sql`
    select uid, max(at) as at from (
      select rp.user_id as uid, max(an.at) as at from answers an join room_players rp on rp.id = an.player_id join rooms r on r.id = an.room_id
      where ${inClass} and rp.user_id is not null group by rp.user_id
      union all
      select user_id as uid, max(at) as at from practice_answers where user_id in (${list(studentIds)}) group by user_id
    ) group by uid`);
  return new Map(rows.map((r) => [r.uid, Number(r.at)]));
}

/** The hub of a class whose access was already checked; `students` is its roster. */
export async function classHub(db: Db, cls: { id: string; orgId: string }, students: readonly { id: string; displayName: string }[], now = Date.now()): Promise<ClassHub> {
  const ofClass = and(eq(rooms.classId, cls.id), eq(rooms.orgId, cls.orgId));
  const inClass = sql`r.class_id = ${cls.id} and r.org_id = ${cls.orgId}`;
  const [latest] = await db
    .select({ title: rooms.title, position: rooms.position, config: rooms.config })
    .from(rooms)
    .where(and(ofClass, isNotNull(rooms.endedAt)))
    .orderBy(desc(rooms.createdAt))
    .limit(1);
  const stepRooms = latest
    ? await db.select({ id: rooms.id }).from(rooms).where(and(ofClass, isNotNull(rooms.endedAt), eq(rooms.title, latest.title))).orderBy(desc(rooms.createdAt)).limit(STEP_ROUNDS)
    : [];
  const ids = students.map((s) => s.id);
  const [figures, stuck, active, assignments] = await Promise.all([
    stepFigures(db, stepRooms.map((r) => r.id)),
    stuckNotes(db, inClass),
    lastActivity(db, inClass, ids),
    classAssignments(db, cls.id, now),
  ]);
  const current = latest ? currentStep(latest.title, latest.position, latest.config, stepRooms.length) : null;
  const targetMs = current?.targetMs ?? 0;
  return {
    current,
    next: current?.step ? (READING_PRESETS.find((p) => p.step === current.step!.step + 1) ?? null) : null,
    readiness: current ? classReady(ids.map((id) => figures.get(id)), targetMs) : null,
    students: students.map((s) => {
      const latestAssignment = assignments.find((a) => a.students.some((t) => t.userId === s.id));
      return {
        id: s.id,
        displayName: s.displayName,
        lastActivity: active.get(s.id) ?? null,
        step: figures.get(s.id) ?? null,
        reading: readsStep(figures.get(s.id), targetMs),
        stuck: stuck.get(s.id) ?? [],
        assignment: latestAssignment ? { title: latestAssignment.title, status: latestAssignment.students.find((t) => t.userId === s.id)!.status } : null,
      };
    }),
  };
}

function currentStep(title: string, position: number, config: RoomConfig, rounds: number) {
  const reading = {
    position,
    keyFifths: config.prompts[0]?.keyFifths ?? 0,
    chromatic: config.prompts.some((p) => p.printedAccidental !== null),
    ledger: config.prompts.some((p) => p.ledger),
  };
  return { title, step: stepOfRound(reading, READING_PRESETS) ?? null, targetMs: stepTargetMs(config.answerMs), rounds };
}
