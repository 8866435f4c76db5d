import { findTune } from "~/tunes/tunes.server";
// Rhythm passes on the server: whether a tune is unlocked (its pitches steady), and storing a pass, scored here
// from the taps and the tune, never from a score the phone claims.
import { and, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { rhythmAttempts } from "~/db/schema";
import type { PoolNote } from "~/music/pools";
import type { Tune } from "~/tunes/builtin";
import { allSteady, noteName, noteStates, STEADY_BOX } from "./adaptive";
import { historyFor, practicePlan, TUNE_POSITION } from "./practice.server";
import { MAX_OFFSET_MS, MIN_OFFSET_MS, playedTaps } from "./calibration";
import { scoreTaps, TEMPO_RANGE, timeline, type RhythmScore } from "./rhythm";
import { schoolNaming } from "~/school/naming.server";

const DAY_MS = 86_400_000;

export interface RhythmState {
  tune: Tune;
  position: number;
  notes: { written: string; writtenMidi: number; box: number }[];
  unlocked: boolean;
  /** Plain words: what still needs steadying, or that the pass is open. */
  why: string;
}

/**
 * A tune's rhythm pass opens once every pitch of it that lies in the position is steady (box ≥ STEADY_BOX) in
 * the student's history there, by the adaptive rule: pitch first, rhythm later.
 */
export async function rhythmState(db: Db, user: SessionUser, tuneId: string, position = TUNE_POSITION, now = Date.now()): Promise<RhythmState | undefined> {
  const tune = await findTune(db, user.orgId, tuneId);
  if (!tune) return undefined;
  const plan = await practicePlan(db, user, new URLSearchParams({ tune: tuneId, position: String(position) }));
  const notes: PoolNote[] = plan?.ok ? plan.plan.notes : [];
  const states = noteStates(await historyFor(db, user.id, position, "standard", now), now - DAY_MS);
  const boxes = notes.map((n) => ({ written: n.written, writtenMidi: n.writtenMidi, box: states.get(n.writtenMidi)?.box ?? 0 }));
  const unlocked = allSteady(notes, states);
  const naming = await schoolNaming(db, user.orgId);
  const waiting = boxes.filter((b) => b.box < STEADY_BOX).map((b) => noteName(b.written, naming));
  const why = unlocked
    ? "Every note of this tune is steady: now play it in time."
    : notes.length === 0
      ? `None of this tune's notes lie in position ${position}.`
      : `Pitch first: steady these notes in practice (two quick home spots in a row each) to open the rhythm pass: ${waiting.join(", ")}.`;
  return { tune, position, notes: boxes, unlocked, why };
}

const delayRange = `The calibrated delay must be ${MIN_OFFSET_MS} to ${MAX_OFFSET_MS} ms.`;

export const rhythmPassSchema = z
  .object(
    {
      id: z.string("Every pass needs an id.").regex(/^[A-Za-z0-9_-]{8,40}$/, "A pass id is 8–40 letters, digits, - or _."),
      tuneId: z.string("Name the tune.").regex(/^[A-Za-z0-9_-]{1,64}$/, "Name the tune by its id."),
      position: z.number().int().min(1).max(12).default(TUNE_POSITION),
      tempo: z
        .number("The tempo must be a number.")
        .int("The tempo must be a whole number of beats per minute.")
        .min(TEMPO_RANGE[0], `The tempo must be ${TEMPO_RANGE[0]} to ${TEMPO_RANGE[1]} beats per minute.`)
        .max(TEMPO_RANGE[1], `The tempo must be ${TEMPO_RANGE[0]} to ${TEMPO_RANGE[1]} beats per minute.`),
      taps: z.array(z.number("Every tap is a time in ms.").finite().min(0, "Taps are counted from the first click: no negative times."), "Send the taps as a list of times in ms.").max(2000, "At most 2000 taps."),
      // "played": the taps are note onsets the microphone heard, before the calibrated delay (latencyMs) comes off.
      input: z.enum(["tap", "played"], 'Say how the notes were given: "tap" or "played".').default("tap"),
      latencyMs: z.number(delayRange).int(delayRange).min(MIN_OFFSET_MS, delayRange).max(MAX_OFFSET_MS, delayRange).optional(),
    },
    "Send a JSON object: { id, tuneId, tempo, taps }.",
  )
  .refine((p) => (p.input === "played") === (p.latencyMs !== undefined), "A played pass names its calibrated delay (latencyMs), and only a played pass has one.");

export interface StoredPass extends RhythmScore {
  id: string;
  tuneId: string;
  tempo: number;
  input: "tap" | "played";
  /** A played pass: the calibrated delay taken off what the microphone heard. */
  latencyMs?: number;
  at: number;
}

export type RhythmRecord = { status: 200; body: StoredPass & { duplicate: boolean } } | { status: 400 | 403 | 404 | 409; body: { error: string } };

export async function recordRhythmPass(db: Db, user: SessionUser, body: unknown, now = Date.now()): Promise<RhythmRecord> {
  if (user.role !== "student") return { status: 403, body: { error: "Rhythm passes are played by students, from their own account." } };
  const parsed = rhythmPassSchema.safeParse(body);
  if (!parsed.success) return { status: 400, body: { error: `Nothing was stored: ${parsed.error.issues[0]!.message}` } };
  const pass = parsed.data;
  const [existing] = await db.select().from(rhythmAttempts).where(eq(rhythmAttempts.id, pass.id));
  if (existing) {
    if (existing.userId !== user.id) return { status: 409, body: { error: "That pass id is taken; send the pass with a new id." } };
    return { status: 200, body: { ...storedOf(existing), duplicate: true } };
  }
  const state = await rhythmState(db, user, pass.tuneId, pass.position, now);
  if (!state) return { status: 404, body: { error: "No such tune." } };
  if (!state.unlocked) return { status: 409, body: { error: state.why } };
  const { endMs } = timeline(state.tune, pass.tempo);
  if (pass.taps.some((t) => t > endMs + 10_000)) return { status: 400, body: { error: "Nothing was stored: a tap comes long after the tune has ended." } };
  const played = pass.input === "played";
  const score = scoreTaps(state.tune, pass.tempo, played ? playedTaps(pass.taps, pass.latencyMs!) : pass.taps);
  const results = { ...score, position: pass.position, ...(played ? { latencyMs: pass.latencyMs } : {}) };
  const row = { id: pass.id, userId: user.id, tuneId: pass.tuneId, tempo: pass.tempo, score: score.score, results, input: pass.input, at: new Date(now) };
  await db.insert(rhythmAttempts).values(row);
  return { status: 200, body: { ...storedOf(row), duplicate: false } };
}

function storedOf(row: typeof rhythmAttempts.$inferSelect): StoredPass {
  return { ...row.results, id: row.id, tuneId: row.tuneId, tempo: row.tempo, score: row.score, input: row.input, at: row.at.getTime() };
}

/** The student's own passes, newest first (of one tune, or all). */
export async function rhythmPasses(db: Db, userId: string, tuneId?: string, limit = 10): Promise<StoredPass[]> {
  const rows = await db
    .select()
    .from(rhythmAttempts)
    .where(and(eq(rhythmAttempts.userId, userId), tuneId ? eq(rhythmAttempts.tuneId, tuneId) : undefined))
    .orderBy(desc(rhythmAttempts.at))
    .limit(limit);
  return rows.map(storedOf);
}

/** A student's passes with their tunes' titles, newest first: for their teacher (the caller checks access). */
export async function passesForTeacher(db: Db, orgId: string, userId: string, limit = 20): Promise<(StoredPass & { title: string })[]> {
  const passes = await rhythmPasses(db, userId, undefined, limit);
  const titles = new Map<string, string>();
  for (const id of new Set(passes.map((p) => p.tuneId))) titles.set(id, (await findTune(db, orgId, id))?.title ?? "A tune no longer kept");
  return passes.map((p) => ({ ...p, title: titles.get(p.tuneId)! }));
}
