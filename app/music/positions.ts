// Positions and home-spot maps: one fixed hand place, one spot per written pitch.
import { checkReading, soundingMidi, spotSounding, writtenMidiFor, type Reading, type Spot } from "./fretboard";
import { defaultSpelling } from "./keys";
import { displayPitch, MusicError, parsePitch, pitchMidi, pitchToString } from "./pitch";
import { checkFrets, MAX_FRETS, type Tuning } from "./tuning";

export interface PositionWindow {
  position: number;
  first: number;
  last: number;
  stretchLow: number;
  stretchHigh: number;
}

// The highest position whose upper stretch (N + 4) still lies on the longest neck.
const MAX_POSITION = MAX_FRETS - 4;

/**
 * Position N: index finger at fret N, one finger per fret over N..N+3, stretches to N−1 and N+4.
 * In position 1, stretchLow is fret 0: the open strings. They count as inside the span (no finger needed, and
 * that is how first position is taught), so an open string is a home spot, not a stretch.
 */
export function positionWindow(position: number): PositionWindow {
  if (!Number.isInteger(position) || position < 1 || position > MAX_POSITION) {
    throw new MusicError(`Position must be a whole number from 1 to ${MAX_POSITION}, not ${String(position)}.`);
  }
  return { position, first: position, last: position + 3, stretchLow: position - 1, stretchHigh: position + 4 };
}

/**
 * How far the hand leaves its place to play this fret: 0 inside the span, 1 for a one-fret stretch, 2 for a
 * two-fret stretch (N−2, N+5), which only fills the one-note hole a fifth between strings leaves
 * (drop D, DADGAD, open G); undefined when the fret is not playable from this position.
 */
function reach(fret: number, w: PositionWindow): 0 | 1 | 2 | undefined {
  if ((fret >= w.first && fret <= w.last) || (w.position === 1 && fret === 0)) return 0;
  if (fret === w.stretchLow || fret === w.stretchHigh) return 1;
  if (fret >= 0 && (fret === w.stretchLow - 1 || fret === w.stretchHigh + 1)) return 2;
  return undefined;
}

export interface HomeSpot extends Spot {
  writtenMidi: number;
  written: string /* default ASCII spelling e.g. "F#4" */;
}
export interface SpotMap {
  position: number;
  tuning: string /* tuning id or notes */;
  reading: Reading;
  spots: HomeSpot[] /* ascending writtenMidi, chromatic, no gaps */;
}

/** The nearest spot for a sounding pitch in this window, or undefined if no string reaches it. */
function bestSpot(sounding: number, tuning: Tuning, w: PositionWindow, frets: number) {
  let best: { spot: Spot; cost: 0 | 1 | 2 } | undefined;
  // Strings run from string 1 (highest) down, and only a strictly smaller cost replaces the best so far: ties go
  // to the higher-pitched string, i.e. the lower fret. For a one-fret stretch that means reaching back with the
  // index finger (strongest, and it anchors the hand) rather than forward with the little finger (weakest);
  // in position 1 it makes the open string the home spot rather than a fretted note on the string below.
  tuning.strings.forEach((open, i) => {
    const fret = sounding - open;
    const cost = fret <= frets ? reach(fret, w) : undefined;
    if (cost !== undefined && (best === undefined || cost < best.cost)) best = { spot: { string: i + 1, fret }, cost };
  });
  return best;
}

/**
 * Default map, deterministic: every pitch from the lowest string at stretchLow to the highest string at
 * stretchHigh, each at the spot needing the least reach (see bestSpot for ties). Frets default to the longest
 * neck; a position whose upper stretch would run off the neck is refused.
 */
export function defaultSpotMap(position: number, tuning: Tuning, opts: { frets?: number; reading?: Reading } = {}): SpotMap {
  const w = positionWindow(position);
  const frets = checkFrets(opts.frets ?? MAX_FRETS);
  const reading = checkReading(opts.reading ?? "guitar");
  if (w.stretchHigh > frets) {
    throw new MusicError(`Position ${position} stretches to fret ${w.stretchHigh}, but this neck has only ${frets} frets.`);
  }
  const lowest = Math.min(...tuning.strings) + w.stretchLow;
  const highest = Math.max(...tuning.strings) + w.stretchHigh;
  const spots: HomeSpot[] = [];
  for (let sounding = lowest; sounding <= highest; sounding++) {
    const best = bestSpot(sounding, tuning, w, frets);
    if (!best) throw new MusicError(`Position ${position} in ${tuning.name} cannot reach sounding MIDI ${sounding}.`);
    const writtenMidi = writtenMidiFor(sounding, reading);
    spots.push({ string: best.spot.string, fret: best.spot.fret, writtenMidi, written: pitchToString(defaultSpelling(writtenMidi)) });
  }
  return { position, tuning: tuning.id, reading, spots };
}

export interface SpotMapProblem {
  code: string;
  message: string;
  writtenMidi?: number;
}

const spotName = (s: Spot) => `string ${s.string}, fret ${s.fret}`;
const writtenName = (midi: number) => displayPitch(defaultSpelling(midi));

/** Problems with one entry: its spelling, its string, and whether its spot holds its pitch within the position. */
function entryProblems(entry: HomeSpot, map: SpotMap, tuning: Tuning, w: PositionWindow | undefined): SpotMapProblem[] {
  const { writtenMidi } = entry;
  const label = writtenName(writtenMidi);
  const problems: SpotMapProblem[] = [];
  try {
    if (pitchMidi(parsePitch(entry.written)) !== writtenMidi) {
      problems.push({ code: "wrong-spelling", writtenMidi, message: `"${entry.written}" is not ${label}.` });
    }
  } catch (error) {
    problems.push({ code: "wrong-spelling", writtenMidi, message: `${label}: ${(error as Error).message}` });
  }
  if (!Number.isInteger(entry.string) || entry.string < 1 || entry.string > tuning.strings.length) {
    problems.push({
      code: "string-not-in-tuning",
      writtenMidi,
      message: `${label} is on string ${String(entry.string)}, but ${tuning.name} has strings 1 to ${tuning.strings.length}.`,
    });
    return problems;
  }
  if (!Number.isInteger(entry.fret) || entry.fret < 0 || entry.fret > MAX_FRETS) {
    problems.push({ code: "outside-position", writtenMidi, message: `${label} is on fret ${String(entry.fret)}, which is not on the neck.` });
    return problems;
  }
  const sounds = spotSounding(entry, tuning);
  const reading = map.reading === "concert" ? "concert" : "guitar";
  if (sounds !== soundingMidi(writtenMidi, reading)) {
    const plays = writtenName(writtenMidiFor(sounds, reading));
    problems.push({ code: "wrong-pitch", writtenMidi, message: `${label} is placed at ${spotName(entry)}, which plays ${plays}.` });
  } else if (w) {
    const cost = reach(entry.fret, w);
    // A two-fret stretch is only fair when no string offers the pitch within the one-fret stretches.
    const nearer = cost === 2 && (bestSpot(sounds, tuning, w, MAX_FRETS)?.cost ?? 2) < 2;
    if (cost === undefined || nearer) {
      problems.push({
        code: "outside-position",
        writtenMidi,
        message: `${label} at ${spotName(entry)} is outside position ${w.position} (frets ${w.stretchLow} to ${w.stretchHigh}).`,
      });
    }
  }
  return problems;
}

/** Every problem in a map, teacher-edited or not, each named; [] means valid. */
export function validateSpotMap(map: SpotMap, tuning: Tuning): SpotMapProblem[] {
  if (typeof map !== "object" || map === null || !Array.isArray(map.spots)) {
    return [{ code: "not-a-map", message: "A home-spot map needs a position, a tuning, a reading and a list of spots." }];
  }
  const problems: SpotMapProblem[] = [];
  let w: PositionWindow | undefined;
  try {
    w = positionWindow(map.position);
  } catch (error) {
    problems.push({ code: "bad-position", message: (error as Error).message });
  }
  if (map.reading !== "guitar" && map.reading !== "concert") {
    problems.push({ code: "bad-reading", message: `Reading must be "guitar" or "concert", not ${JSON.stringify(map.reading)}.` });
  }
  if (map.tuning !== tuning.id) {
    problems.push({ code: "tuning-mismatch", message: `This map is for tuning "${map.tuning}", not ${tuning.name}.` });
  }
  if (map.spots.length === 0) problems.push({ code: "empty", message: "The map has no spots." });

  const seen = new Set<number>();
  let previous = -Infinity;
  for (const entry of map.spots) {
    const midi = entry?.writtenMidi;
    if (!Number.isInteger(midi) || midi < 0 || midi > 127) {
      problems.push({ code: "not-a-map", message: `Every spot needs a writtenMidi from 0 to 127; found ${JSON.stringify(entry)}.` });
      continue;
    }
    if (seen.has(entry.writtenMidi)) {
      problems.push({
        code: "duplicate-pitch",
        writtenMidi: entry.writtenMidi,
        message: `${writtenName(entry.writtenMidi)} has more than one home spot; keep one.`,
      });
      continue;
    }
    if (entry.writtenMidi < previous) {
      problems.push({
        code: "out-of-order",
        writtenMidi: entry.writtenMidi,
        message: `${writtenName(entry.writtenMidi)} comes after a higher note; list spots from low to high.`,
      });
    }
    previous = entry.writtenMidi;
    seen.add(entry.writtenMidi);
    problems.push(...entryProblems(entry, map, tuning, w));
  }

  if (seen.size > 0) {
    const present = [...seen];
    const low = Math.min(...present);
    const high = Math.max(...present);
    for (let midi = low + 1; midi < high; midi++) {
      if (!seen.has(midi)) {
        problems.push({
          code: "gap",
          writtenMidi: midi,
          message: `${writtenName(midi)} has no home spot, but notes below and above it do.`,
        });
      }
    }
  }
  return problems;
}

/** The home spot of a written pitch, or undefined when the map doesn't reach it. */
export function homeSpotFor(map: SpotMap, writtenMidi: number): HomeSpot | undefined {
  // Maps are chromatic from their first entry, so the index is a subtraction; the check covers edited maps.
  const guess = map.spots[writtenMidi - (map.spots[0]?.writtenMidi ?? 0)];
  return guess?.writtenMidi === writtenMidi ? guess : map.spots.find((s) => s.writtenMidi === writtenMidi);
}
