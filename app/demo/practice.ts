/**
 * Solo practice for the demo school over the last two weeks: short sessions of 20 notes, chosen by the real
 * adaptive rule from each student's growing history and answered by a scripted student who is surer of some
 * letters than others; plus a few rhythm passes. Seeded, so every seed gives the same answers; only the dates
 * follow today's date (everything lies at least an hour in the past).
 *
 * Amani (the student who signs in) has practised every day for the last six days up to yesterday, so her home
 * shows a streak to keep; she has steadied the pitches of Lantern Walk, so its rhythm pass is open, and has
 * tried it twice.
 */
import type { Db } from "~/db/client.server";
import { practiceAnswers, rhythmAttempts } from "~/db/schema";
import { parsePitch } from "~/music/pitch";
import { seededRandom, type PoolNote } from "~/music/pools";
import type { SpotMap } from "~/music/positions";
import { diagnose } from "~/music/mistakes";
import { resolveTuning } from "~/music/tuning";
import { allSteady, chooseNext, noteStates, type PracticeAnswer } from "~/practice/adaptive";
import { setOrder, tunePool } from "~/practice/pool";
import { spotMapFor } from "~/practice/practice.server";
import { scoreTaps, timeline } from "~/practice/rhythm";
import { readingPreset } from "~/reading/presets";
import { applySpotMap, parseReadingSet, readingSetSpecSchema } from "~/reading/spec";
import { builtinTune } from "~/tunes/builtin";
import { DEMO_SCHOOL as S } from "./school";

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const SESSION_NOTES = 20;
const TUNING = resolveTuning("standard");

type Rng = () => number;

interface Material {
  source: string;
  keyFifths: number;
  position: number;
  notes: PoolNote[];
}

/** `map` is the class's home-spot map for fifth position (its own, or the default one). */
function presetMaterial(id: string, map: SpotMap): Material {
  const reading = parseReadingSet(readingSetSpecSchema, readingPreset(id)!.spec);
  if (!reading.ok) throw new Error(`Ready-made set ${id} does not parse.`);
  const { spec, pool } = reading;
  return { source: `preset:${id}`, keyFifths: spec.keyFifths, position: spec.position, notes: setOrder(applySpotMap(pool, map, spec.frets)) };
}

function tuneMaterial(id: string, map: SpotMap): Material {
  const tune = builtinTune(id)!;
  return { source: `tune:${id}`, keyFifths: tune.keyFifths, position: 5, notes: tunePool(tune.notes, tune.keyFifths, map).pool };
}

/** What each class practises between lessons: the step its lessons are on, and a tune. */
const CLASS_MATERIAL: Record<string, string[]> = {
  "demo-class-tue": ["preset:ready-naturals-5", "tune:lantern-walk"],
  "demo-class-thu": ["preset:ready-g-major-5", "tune:harbour-bells"],
  "demo-class-sat": ["preset:ready-naturals-5", "preset:ready-f-major-5"],
};
const material = (source: string, map: SpotMap) => (source.startsWith("tune:") ? tuneMaterial(source.slice(5), map) : presetMaterial(source.slice(7), map));

interface Scripted {
  id: string;
  number: number;
  /** Chance of the home spot on an ordinary note; a weak letter is harder. */
  skill: number;
  weakLetter: string;
  pace: number;
  /** Chance of practising on a given day. */
  diligence: number;
}

/** A believable wrong tap: most often the fret next door, sometimes the string next door or another spot. */
function missSpot(note: PoolNote, random: Rng) {
  const side = random() < 0.5 ? 1 : -1;
  const r = random();
  if (r < 0.6) return { string: note.home.string, fret: Math.max(0, note.home.fret + side) };
  if (r < 0.85) return { string: Math.min(6, Math.max(1, note.home.string + side)), fret: note.home.fret };
  return { string: note.home.string, fret: Math.max(0, note.home.fret + 2 * side) };
}

type PracticeRow = typeof practiceAnswers.$inferInsert;

/** One stored practice answer: who answered and in what setting, the note asked, where they tapped and what the engine made of it. */
export function practiceRow(
  who: Pick<PracticeRow, "userId" | "clientId" | "assignmentId" | "source" | "position" | "tuning">,
  note: { written: string; writtenMidi: number },
  tapped: { string: number; fret: number },
  diagnosis: { kind: PracticeRow["kind"]; pitchRight: boolean },
  reactionMs: number,
  at: number,
): PracticeRow {
  const { written, writtenMidi } = note;
  return { ...who, written, writtenMidi, string: tapped.string, fret: tapped.fret, kind: diagnosis.kind, pitchRight: diagnosis.pitchRight, reactionMs, at: new Date(at) };
}

function playSession(s: Scripted, m: Material, start: number, history: PracticeAnswer[], random: Rng, counter: { n: number }) {
  const rows: PracticeRow[] = [];
  let previous: number | undefined;
  let at = start;
  for (let i = 0; i < SESSION_NOTES; i++) {
    const choice = chooseNext(m.notes, noteStates(history, 0), { previous, random });
    const note = m.notes.find((n) => n.writtenMidi === choice.note.writtenMidi)!;
    const weak = parsePitch(note.written).letter === s.weakLetter || note.printedAccidental !== null;
    const seen = noteStates(history, 0).get(note.writtenMidi)?.answers ?? 0;
    // Practice helps: each earlier answer of the note makes the next a little surer and quicker.
    const chance = Math.min(0.97, (weak ? s.skill - 0.25 : s.skill) + 0.02 * seen);
    const tapped = random() < chance ? note.home : missSpot(note, random);
    const d = diagnose({ note, keyFifths: m.keyFifths, tapped, tuning: TUNING, reading: "guitar" });
    const reactionMs = Math.round(s.pace * (weak ? 1.4 : 1) * Math.max(0.5, 1 - 0.03 * seen) * (0.7 + random() * 0.6));
    at += reactionMs + 1_500 + Math.round(random() * 2_000);
    history.push({ writtenMidi: note.writtenMidi, kind: d.kind, reactionMs, at });
    const who = { userId: s.id, clientId: `demo-practice-${s.number}-${counter.n++}`, assignmentId: null, source: m.source, position: m.position, tuning: TUNING.id };
    rows.push(practiceRow(who, note, tapped, d, reactionMs, at));
    previous = note.writtenMidi;
  }
  return rows;
}

/** A rhythm pass by a scripted student whose taps scatter around the beat by up to `spreadMs`. */
function rhythmPass(userId: string, tuneId: string, tempo: number, spreadMs: number, at: number, random: Rng, id: string) {
  const tune = builtinTune(tuneId)!;
  const taps = timeline(tune.notes, tune.beatsPerBar, tempo).onsets.filter(() => random() > 0.04).map((t) => Math.round(t + (random() * 2 - 1) * spreadMs + 25));
  const score = scoreTaps(tune.notes, tune.beatsPerBar, tempo, taps);
  return { id, userId, tuneId, tempo, score: score.score, results: { ...score, position: 5 }, at: new Date(at) };
}

export async function seedDemoPractice(db: Db, now = Date.now()) {
  const random = seededRandom(20_260_301);
  // Sessions start in the late afternoon (UTC) of each day, but never less than an hour before now.
  const evening = (daysAgo: number) => Math.min(now - 2 * HOUR, Math.floor(now / DAY) * DAY - daysAgo * DAY + 16 * HOUR + Math.round(random() * 3 * HOUR));
  const answerRows: PracticeRow[] = [];
  const passes: (typeof rhythmAttempts.$inferInsert)[] = [];
  // Every demo material reads in fifth position; a class that has edited its map (app/demo/reading.ts) practises on it.
  const maps = new Map<string, SpotMap>();
  for (const c of S.classes) maps.set(c.id, (await spotMapFor(db, c.id, 5, TUNING.id)).map);

  for (const [i, [, classId]] of S.students.entries()) {
    const number = i + 1;
    const s: Scripted = {
      id: `demo-student-${number}`,
      number,
      skill: 0.62 + random() * 0.3,
      weakLetter: "CDEFGAB"[Math.floor(random() * 7)]!,
      pace: 1_300 + random() * 1_800,
      diligence: i === S.studentWithSignIn.index ? 1 : 0.15 + random() * 0.45,
    };
    const sources = CLASS_MATERIAL[classId]!;
    const histories = new Map<string, PracticeAnswer[]>();
    const counter = { n: 0 };
    for (let daysAgo = 13; daysAgo >= 1; daysAgo--) {
      // Amani practises daily for the last six days; before that, like everyone, on some days only.
      const practises = i === S.studentWithSignIn.index ? daysAgo <= 6 || random() < 0.4 : random() < s.diligence;
      if (!practises) continue;
      const m = material(sources[daysAgo % sources.length]!, maps.get(classId)!);
      const key = `${m.position}`;
      const history = histories.get(key) ?? [];
      histories.set(key, history);
      answerRows.push(...playSession(s, m, evening(daysAgo), history, random, counter));
    }
    if (i === S.studentWithSignIn.index) {
      // Until Lantern Walk's pitches are steady, a little more tune practice on the last evening.
      const lantern = tuneMaterial("lantern-walk", maps.get(classId)!);
      const history = histories.get("5")!;
      for (let extra = 0; extra < 6 && !allSteady(lantern.notes, noteStates(history, 0)); extra++) {
        answerRows.push(...playSession({ ...s, skill: 0.95 }, lantern, evening(1) + (extra + 1) * 5 * 60_000, history, random, counter));
      }
      passes.push(rhythmPass(s.id, "lantern-walk", 72, 220, evening(2), random, "demo-rhythm-1"));
      passes.push(rhythmPass(s.id, "lantern-walk", 72, 110, evening(1) + HOUR, random, "demo-rhythm-2"));
    }
  }
  // Everything strictly in the past, whatever the hour the seed runs at.
  const past = answerRows.filter((r) => (r.at as Date).getTime() < now - HOUR);
  for (let i = 0; i < past.length; i += 400) await db.insert(practiceAnswers).values(past.slice(i, i + 400));
  if (passes.length) await db.insert(rhythmAttempts).values(passes.map((p) => ({ ...p, at: new Date(Math.min(p.at.getTime(), now - HOUR)) })));
}
