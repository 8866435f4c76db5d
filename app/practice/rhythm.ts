/**
 * The rhythm pass, pure: when each note of a tune should be played at a tempo, and how a student's taps compare.
 * Times are milliseconds from the first click of the count-in.
 *
 * Timeline of an upload read fully (its stored bars carry their meters, its notes their onsets):
 * - The beat follows the meter (common practice, no source): x/4 counts quarters, x/2 (cut time) halves,
 *   6/8, 9/8 and 12/8 dotted quarters (three eighths to a beat), other x/8 eighths. The tempo is in the beat
 *   of the first full bar: a beat lasts 60 000 / bpm ms; it starts at the score's first tempo marking
 *   (defaultTempo). When the meter changes, the quarter note keeps its length (later tempo markings are not
 *   followed), and the clicks follow the new bar's beat.
 * - The count-in is one bar of the first full bar's meter; that bar starts right after it. A pickup's notes
 *   fall in the count-in's last beats, as a band counts a pickup in.
 * - Each note sounds at its written onset: rests anywhere are simply time between onsets, and tied notes
 *   were merged when the score was read, so a tie is one tap.
 * Built-in tunes and uploads stored before scores were read fully keep no onsets or meters:
 * - Within a bar, notes follow each other by their `beats` (quarter notes). Each bar starts on its own bar line
 *   (`beatsPerBar` quarters apart): a bar whose notes fill less than the bar leaves the rest at its end, and a
 *   bar number that jumps (a bar of rest) skips whole bars. A short *first* bar, when more bars follow, is a
 *   pickup: it ends on the bar line of the next bar.
 * The click goes on, one per beat, until the last note has sounded, accented on each bar line.
 *
 * Tolerance (fixed in ms rather than in beats, because what it absorbs — ears and touch screens — does not change
 * with the tempo):
 * - ON_TIME_MS = ±80 ms. Listeners usually hear two onsets under about 50 ms apart as together (from memory; the
 *   figure recurs in the sensorimotor-synchronisation literature), and a phone's touch screen adds some tens of ms
 *   of jitter of its own; 80 ms covers both without praising a sloppy tap. At 90 bpm it is about a 32nd note
 *   (666.7 ms ÷ 8 = 83.3 ms).
 * - CLOSE_MS = ±160 ms: twice that, just under a 16th note at 90 bpm (666.7 ÷ 4 = 166.7 ms). Half credit.
 * - Beyond that, up to MATCH_WINDOW_MS = 400 ms (and never more than halfway to the neighbouring note), a tap is
 *   "early" or "late" by its signed offset; no tap in the window is "missed". Each note takes the nearest tap in
 *   its window; taps matched to no note are "extra".
 * - Score = (on time × 1 + close × ½ − extra × ½) ÷ notes, as a whole percentage, never below 0: mashing the
 *   button cannot score well.
 */
import type { TuneBar } from "~/music/musicxml";
import { tempoInBeat, type ScoreTempo } from "~/music/tempo";
import type { Tune, TuneNote } from "~/tunes/builtin";

/** What the rhythm pass needs of a tune. */
export type RhythmTune = Pick<Tune, "notes" | "beatsPerBar"> & { score?: { measures: readonly TuneBar[]; tempo?: ScoreTempo | null } };

export const ON_TIME_MS = 80;
export const CLOSE_MS = 160;
export const MATCH_WINDOW_MS = 400;
export const TEMPO_RANGE = [40, 160] as const;
export const DEFAULT_TEMPO = 72;

export class RhythmError extends Error {}

/**
 * The tempo the rhythm pass starts at: the score's own marking counted in the first full bar's beat (the beat
 * the pass clicks), rounded and kept within TEMPO_RANGE; DEFAULT_TEMPO when the score marks none.
 */
export function defaultTempo(tune: RhythmTune): number {
  const tempo = tune.score?.tempo;
  const first = tune.score?.measures.find((m) => !m.pickup) ?? tune.score?.measures[0];
  if (!tempo || !first) return DEFAULT_TEMPO;
  const bpm = Math.round(tempoInBeat(tempo, beatOf(first.beats, first.beatType).beat));
  return Math.min(TEMPO_RANGE[1], Math.max(TEMPO_RANGE[0], bpm));
}

export function beatMs(bpm: number): number {
  if (!Number.isFinite(bpm) || bpm < TEMPO_RANGE[0] || bpm > TEMPO_RANGE[1]) {
    throw new RhythmError(`Tempo must be ${TEMPO_RANGE[0]} to ${TEMPO_RANGE[1]} beats per minute, not ${String(bpm)}.`);
  }
  return 60_000 / bpm;
}

export interface Timeline {
  beatMs: number;
  /** Expected onset of each note, in tune order. */
  onsets: number[];
  /** Every click: the count-in, then each beat until the last note ends. `accent` marks a bar line. */
  clicks: { at: number; accent: boolean }[];
  /** When the last note ends. */
  endMs: number;
  /** Clicks of the count-in: one bar of the first full bar's beats (2 in 6/8 and cut time). */
  countIn: number;
}

/** A meter's beat in quarter notes, and beats to its bar. */
export function beatOf(beats: number, beatType: number): { beat: number; perBar: number } {
  const unit = 4 / beatType;
  // Compound meters (6/8, 9/8, 12/8) are felt in dotted beats of three.
  if (beatType >= 8 && beats > 3 && beats % 3 === 0) return { beat: 3 * unit, perBar: beats / 3 };
  return { beat: unit, perBar: beats };
}

/** Times in quarter notes from the first full bar line (a pickup's are negative). */
interface Plan {
  onsets: number[];
  end: number;
  /** From the first full bar on: where each starts, how long its meter is, its beat. */
  bars: { start: number; length: number; beat: number }[];
  countIn: { beat: number; perBar: number };
}

/** Built-in tunes and older uploads: onsets from the note lengths, bar after bar of `beatsPerBar` quarters. */
function plainPlan(notes: readonly TuneNote[], beatsPerBar: number): Plan {
  const firstBar = notes[0]!.bar;
  const firstBarBeats = notes.filter((n) => n.bar === firstBar).reduce((sum, n) => sum + n.beats, 0);
  const pickup = firstBarBeats < beatsPerBar && notes.some((n) => n.bar !== firstBar);
  let barStart = pickup ? -firstBarBeats : 0;
  let bar = firstBar;
  let cursor = barStart;
  const onsets = notes.map((n) => {
    if (n.bar !== bar) {
      // The next bar line is 0 after a pickup, else one bar on; skipped bar numbers are bars of rest. A bar
      // overfilled by a bad upload pushes the next one back rather than overlapping it.
      const nextLine = pickup && bar === firstBar ? 0 : barStart + beatsPerBar;
      barStart = Math.max(nextLine + (n.bar - bar - 1) * beatsPerBar, cursor);
      bar = n.bar;
      cursor = barStart;
    }
    const at = cursor;
    cursor += n.beats;
    return at;
  });
  const bars = Array.from({ length: Math.ceil(cursor / beatsPerBar) }, (_, i) => ({ start: i * beatsPerBar, length: beatsPerBar, beat: 1 }));
  return { onsets, end: cursor, bars, countIn: { beat: 1, perBar: beatsPerBar } };
}

/** An upload read fully: each note's written onset, each bar's own meter. */
function scorePlan(notes: readonly TuneNote[], measures: readonly TuneBar[]): Plan {
  const first = measures.find((m) => !m.pickup) ?? measures[0]!;
  const zero = first.start;
  const onsets = notes.map((n) => n.onset! - zero);
  const end = Math.max(...notes.map((n, i) => onsets[i]! + n.beats));
  const bars = measures
    .filter((m) => m.start >= zero)
    .map((m) => ({ start: m.start - zero, length: (m.beats * 4) / m.beatType, beat: beatOf(m.beats, m.beatType).beat }));
  return { onsets, end, bars, countIn: beatOf(first.beats, first.beatType) };
}

export function checkTune(notes: readonly TuneNote[], beatsPerBar: number) {
  if (!Number.isInteger(beatsPerBar) || beatsPerBar < 1 || beatsPerBar > 16) {
    throw new RhythmError(`A bar has 1 to 16 beats, not ${String(beatsPerBar)}.`);
  }
  if (!Array.isArray(notes) || notes.length === 0) throw new RhythmError("The tune has no notes.");
  notes.forEach((n, i) => {
    if (!(n.beats > 0) || !Number.isFinite(n.beats)) throw new RhythmError(`Note ${i + 1} has no length.`);
    if (!Number.isInteger(n.bar) || (i > 0 && n.bar < notes[i - 1]!.bar)) {
      throw new RhythmError(`Note ${i + 1} has a bar number out of order.`);
    }
  });
}

export function timeline(tune: RhythmTune, bpm: number): Timeline {
  const { notes, beatsPerBar } = tune;
  checkTune(notes, beatsPerBar);
  const beat = beatMs(bpm);
  const measures = tune.score?.measures;
  const plan = measures?.length && notes.every((n) => Number.isFinite(n.onset)) ? scorePlan(notes, measures) : plainPlan(notes, beatsPerBar);
  const quarterMs = beat / plan.countIn.beat;
  // Time 0 is the first count-in click, one bar before the first full bar.
  const countInMs = plan.countIn.perBar * beat;
  const toMs = (q: number) => countInMs + q * quarterMs;
  const clicks: Timeline["clicks"] = Array.from({ length: plan.countIn.perBar }, (_, k) => ({ at: k * beat, accent: k === 0 }));
  plan.bars.forEach((bar, i) => {
    const until = Math.min(bar.start + bar.length, plan.bars[i + 1]?.start ?? Infinity, plan.end);
    for (let q = bar.start; q < until - 1e-9; q += bar.beat) clicks.push({ at: toMs(q), accent: q === bar.start });
  });
  return { beatMs: beat, onsets: plan.onsets.map(toMs), clicks, endMs: toMs(plan.end), countIn: plan.countIn.perBar };
}

export type Grade = "on-time" | "close" | "early" | "late" | "missed";
export const GRADE_WORDS: Record<Grade, string> = { "on-time": "on time", close: "close", early: "early", late: "late", missed: "missed" };

export interface NoteResult {
  index: number;
  pitch: string;
  expectedMs: number;
  tapMs: number | null;
  /** tap − expected, rounded: negative is early. */
  offsetMs: number | null;
  grade: Grade;
}

export interface RhythmScore {
  notes: NoteResult[];
  extraTaps: number;
  /** Whole percent, 0–100. */
  score: number;
  /** Mean offset of the matched taps: a steady +120 ms may be the headphones' delay rather than the hand. */
  meanOffsetMs: number | null;
  counts: Record<Grade, number>;
}

export function gradeOf(offset: number): Grade {
  const size = Math.abs(offset);
  if (size <= ON_TIME_MS) return "on-time";
  if (size <= CLOSE_MS) return "close";
  return offset < 0 ? "early" : "late";
}

/** Scores taps (ms from the first count-in click, any order) against the tune's onsets at this tempo. */
export function scoreTaps(tune: RhythmTune, bpm: number, taps: readonly number[]): RhythmScore {
  const { notes } = tune;
  const { onsets } = timeline(tune, bpm);
  if (!Array.isArray(taps) || taps.some((t) => !Number.isFinite(t))) throw new RhythmError("Every tap must be a time in milliseconds.");
  const sorted = [...taps].sort((a, b) => a - b);
  const used = new Set<number>();
  const results = onsets.map((expected, i): NoteResult => {
    const gapBefore = i > 0 ? expected - onsets[i - 1]! : Infinity;
    const gapAfter = i < onsets.length - 1 ? onsets[i + 1]! - expected : Infinity;
    const window = Math.min(MATCH_WINDOW_MS, gapBefore / 2, gapAfter / 2);
    let best = -1;
    sorted.forEach((t, j) => {
      if (used.has(j) || Math.abs(t - expected) > window) return;
      if (best === -1 || Math.abs(t - expected) < Math.abs(sorted[best]! - expected)) best = j;
    });
    const base = { index: i, pitch: notes[i]!.pitch, expectedMs: Math.round(expected) };
    if (best === -1) return { ...base, tapMs: null, offsetMs: null, grade: "missed" };
    used.add(best);
    const offset = sorted[best]! - expected;
    // `+ 0` turns a rounded −0 into 0.
    return { ...base, tapMs: Math.round(sorted[best]!), offsetMs: Math.round(offset) + 0, grade: gradeOf(offset) };
  });
  const counts: Record<Grade, number> = { "on-time": 0, close: 0, early: 0, late: 0, missed: 0 };
  for (const r of results) counts[r.grade]++;
  const extraTaps = sorted.length - used.size;
  const points = counts["on-time"] + 0.5 * counts.close - 0.5 * extraTaps;
  const matched = results.filter((r) => r.offsetMs !== null);
  return {
    notes: results,
    extraTaps,
    score: Math.max(0, Math.round((100 * points) / results.length)),
    meanOffsetMs: matched.length ? Math.round(matched.reduce((sum, r) => sum + r.offsetMs!, 0) / matched.length) : null,
    counts,
  };
}
