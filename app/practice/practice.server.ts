import { findTune } from "~/tunes/tunes.server";
// Solo practice on the server: what a student may practise, the plan of one session (notes on the class's home
// spots, in progression order), and the history the adaptive rule learns from.
import { and, desc, eq, gte, sql } from "drizzle-orm";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { answers, assignments, practiceAnswers, roomPlayers, rooms, tunes } from "~/db/schema";
import { MusicError } from "~/music/pitch";
import { defaultSpotMap, positionWindow, type SpotMap } from "~/music/positions";
import { MAX_FRETS, resolveTuning } from "~/music/tuning";
import { READING_PRESETS } from "~/reading/presets";
import { readingSetFor, setsFor } from "~/reading/sets.server";
import { applySpotMap, parseReadingSet, readingSetSpecSchema } from "~/reading/spec";
import { classSpotMap } from "~/reading/spotMaps.server";
import { classesFor } from "~/school/classes.server";
import { BUILTIN_TUNES } from "~/tunes/builtin";
import type { PracticeAnswer } from "./adaptive";
import { assignmentForStudent, resolveMaterial, studentAssignments, type Material as AssignmentMaterial } from "./assignments.server";
import { setOrder, tunePool, type PracticePlan } from "./pool";
import { creditedAssignment } from "./progress";

/** Built-in tunes are written for fifth position; a tune is practised there unless the student picks another. */
export const TUNE_POSITION = 5;
export const DEFAULT_SESSION_NOTES = 20;
/** The adaptive rule looks back this far (and at most HISTORY_LIMIT answers): enough to settle every box. */
export const HISTORY_DAYS = 60;
const HISTORY_LIMIT = 2000;
const DAY_MS = 86_400_000;


export type PlanResult = { ok: true; plan: PracticePlan } | { ok: false; status: 400 | 404; message: string };

/** A tune the student's school can see: built in, or uploaded by the school. */
/** The class whose map a session uses: the one named (if the student is in it), else the student's first. */
async function mapClass(db: Db, user: SessionUser, wanted: string | null | undefined): Promise<string | null> {
  const mine = await classesFor(db, user);
  return mine.find((c) => c.id === wanted)?.id ?? mine[0]?.id ?? null;
}

/** The class's own map for the position, or the default one. */
export async function spotMapFor(db: Db, classId: string | null, position: number, tuning: string): Promise<{ map: SpotMap; fromClass: boolean }> {
  const own = classId ? await classSpotMap(db, classId, position, tuning) : undefined;
  return own ? { map: own, fromClass: true } : { map: defaultSpotMap(position, resolveTuning(tuning), { frets: MAX_FRETS }), fromClass: false };
}

type Material = AssignmentMaterial | { kind: "position"; position: number };

async function planOf(
  db: Db,
  user: SessionUser,
  material: Material,
  opts: { classId?: string | null; assignmentId?: string | null; position?: number },
): Promise<PlanResult> {
  const classId = await mapClass(db, user, opts.classId);
  const common = { classId, assignmentId: opts.assignmentId ?? null, countsToward: null };
  try {
    if (material.kind === "tune") {
      const position = opts.position ?? TUNE_POSITION;
      const { map, fromClass } = await spotMapFor(db, classId, position, "standard");
      const { pool, outside } = tunePool(material.tune.notes, material.tune.keyFifths, map);
      if (pool.length === 0) return { ok: false, status: 400, message: `None of the notes of “${material.name}” lie in position ${position}. Choose another position.` };
      const plan = { source: `tune:${material.id}`, title: material.name, position, tuning: "standard", frets: 15, keyFifths: material.tune.keyFifths, homeOnly: true };
      return { ok: true, plan: { ...plan, ...common, classMap: fromClass, tuneId: material.id, notes: pool, outside } };
    }
    const reading =
      material.kind === "position"
        ? parseReadingSet(readingSetSpecSchema, { ...READING_PRESETS[0]!.spec, position: material.position, frets: Math.max(15, positionWindow(material.position).stretchHigh) })
        : ({ ok: true, ...material.reading } as const);
    if (!reading.ok) return { ok: false, status: 400, message: Object.values(reading.errors)[0] ?? "No notes to read in this position." };
    const engine = reading.spec;
    const tuning = resolveTuning(engine.tuning).id;
    const { map, fromClass } = await spotMapFor(db, classId, engine.position, tuning);
    const notes = setOrder(applySpotMap(reading.pool, fromClass ? map : undefined, engine.frets));
    const plan = {
      source: material.kind === "position" ? `position:${material.position}` : `${material.kind}:${material.id}`,
      title: material.kind === "position" ? `Position ${material.position}, naturals` : material.name,
      position: engine.position,
      tuning,
      frets: engine.frets,
      keyFifths: engine.keyFifths,
      homeOnly: reading.set.homeOnly,
    };
    return { ok: true, plan: { ...plan, ...common, classMap: fromClass, tuneId: null, notes, outside: [] } };
  } catch (error) {
    if (error instanceof MusicError) return { ok: false, status: 400, message: error.message };
    throw error;
  }
}

const POSITION_PARAM = /^(?:[1-9]|1[0-2])$/;

/**
 * The session the query asks for: ?assignment=<id>, ?set=<id>, ?preset=<id>, ?tune=<id> (with &position=<n>) or
 * ?position=<n>; &class=<id> picks whose home-spot map to use. undefined when nothing is chosen yet.
 */
export async function practicePlan(db: Db, user: SessionUser, query: URLSearchParams): Promise<PlanResult | undefined> {
  const result = await chosenPlan(db, user, query);
  if (!result?.ok) return result;
  // The answers endpoint applies the same rule to every answer it stores; the page names the outcome.
  const credited = creditedAssignment(await studentAssignments(db, user.id), result.plan.source, result.plan.assignmentId);
  const countsToward = credited ? { title: credited.title, className: credited.className, dueAt: credited.dueAt, playedOnly: credited.goal.playedOnly ?? false } : null;
  return { ok: true, plan: { ...result.plan, assignmentId: credited?.id ?? null, countsToward } };
}

async function chosenPlan(db: Db, user: SessionUser, query: URLSearchParams): Promise<PlanResult | undefined> {
  const get = (name: string) => query.get(name)?.trim() || null;
  const positionText = get("position");
  if (positionText !== null && !POSITION_PARAM.test(positionText)) return { ok: false, status: 400, message: "Position must be a whole number from 1 to 12." };
  const position = positionText === null ? undefined : Number(positionText);
  const classId = get("class");

  const assignmentId = get("assignment");
  if (assignmentId) {
    const mine = await assignmentForStudent(db, user.id, assignmentId);
    if (!mine) return { ok: false, status: 404, message: "No such assignment for you." };
    if (!mine.material) return { ok: false, status: 404, message: "The reading set or tune of this assignment has been deleted. Ask your teacher." };
    const [row] = await db.select({ classId: assignments.classId }).from(assignments).where(eq(assignments.id, assignmentId));
    return planOf(db, user, mine.material, { classId: row?.classId, assignmentId, position });
  }
  const setId = get("set");
  if (setId) {
    const found = await readingSetFor(db, user, setId);
    if (!found) return { ok: false, status: 404, message: "No such reading set." };
    const { saved: set, reading } = found;
    if (!reading) return { ok: false, status: 400, message: "This reading set needs an edit by your teacher before it can be practised." };
    return planOf(db, user, { kind: "set", id: set.id, name: set.name, reading }, { classId: set.classId ?? classId });
  }
  const presetId = get("preset");
  if (presetId) {
    const material = await resolveMaterial(db, user.orgId, { kind: "preset", id: presetId });
    if (!material) return { ok: false, status: 404, message: "No such ready-made reading set." };
    return planOf(db, user, material, { classId });
  }
  const tuneId = get("tune");
  if (tuneId) {
    const tune = await findTune(db, user.orgId, tuneId);
    if (!tune) return { ok: false, status: 404, message: "No such tune." };
    return planOf(db, user, { kind: "tune", id: tune.id, name: tune.title, tune }, { classId, position });
  }
  if (position !== undefined) return planOf(db, user, { kind: "position", position }, { classId });
  return undefined;
}

/** What the student may pick: their classes' reading sets, the ready-made ones and the tunes. */
export async function practiceChoices(db: Db, user: SessionUser) {
  const [sets, uploaded] = await Promise.all([
    setsFor(db, user),
    db.select({ id: tunes.id, title: tunes.title }).from(tunes).where(eq(tunes.orgId, user.orgId)).orderBy(tunes.title),
  ]);
  return {
    sets: sets.filter((s) => s.spec).map((s) => ({ id: s.id, name: s.name, className: s.className, summary: s.summary })),
    presets: READING_PRESETS.map((p) => ({ id: p.id, step: p.step, name: p.name, adds: p.adds })),
    tunes: [...BUILTIN_TUNES.map((t) => ({ id: t.id, title: t.title })), ...uploaded],
  };
}

/**
 * The student's own answers in this position and tuning over the last HISTORY_DAYS days, oldest first: solo
 * practice and, when they played signed in, live rounds (the same reading, so the same evidence).
 */
export async function historyFor(db: Db, userId: string, position: number, tuning: string, now = Date.now()): Promise<PracticeAnswer[]> {
  const since = now - HISTORY_DAYS * DAY_MS;
  const [solo, live] = await Promise.all([
    db
      .select({ writtenMidi: practiceAnswers.writtenMidi, kind: practiceAnswers.kind, reactionMs: practiceAnswers.reactionMs, at: practiceAnswers.at })
      .from(practiceAnswers)
      .where(and(eq(practiceAnswers.userId, userId), eq(practiceAnswers.position, position), eq(practiceAnswers.tuning, tuning), gte(practiceAnswers.at, new Date(since))))
      .orderBy(desc(practiceAnswers.at))
      .limit(HISTORY_LIMIT),
    db
      .select({ writtenMidi: answers.writtenMidi, kind: answers.kind, reactionMs: answers.reactionMs, at: answers.at })
      .from(answers)
      .innerJoin(roomPlayers, eq(roomPlayers.id, answers.playerId))
      .innerJoin(rooms, eq(rooms.id, answers.roomId))
      .where(
        and(
          eq(roomPlayers.userId, userId),
          eq(rooms.position, position),
          sql`json_extract(${rooms.config}, '$.tuning') = ${tuning}`,
          gte(answers.at, since),
        ),
      )
      .orderBy(desc(answers.at))
      .limit(HISTORY_LIMIT),
  ]);
  return [...solo.map((r) => ({ ...r, at: r.at.getTime() })), ...live].sort((a, b) => a.at - b.at).slice(-HISTORY_LIMIT);
}
