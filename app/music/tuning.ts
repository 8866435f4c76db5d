// Tunings as open-string MIDI numbers, string 1 = highest-pitched, as guitarists number them.
import { MusicError, parsePitch, pitchMidi, pitchToString } from "./pitch";

export type TuningId = "standard" | "drop-d" | "dadgad" | "open-g" | "seven-string";
export interface Tuning {
  id: string;
  name: string;
  strings: number[] /* MIDI, index 0 = string 1 (highest) */;
}

export const MIN_FRETS = 12;
export const MAX_FRETS = 24;
const MIN_STRINGS = 4;
const MAX_STRINGS = 10;
// A fifth is the widest gap at which a position (with stretches) still reaches every pitch between two strings.
const MAX_STRING_GAP = 7;

/** Custom tunings are identified by their notes, low to high, so the id alone rebuilds the tuning. */
function buildTuning(notesLowToHigh: string, preset?: { id: TuningId; name: string }): Tuning {
  const tokens = notesLowToHigh.trim().split(/[\s,]+/u).filter((t) => t !== "");
  if (tokens.length < MIN_STRINGS || tokens.length > MAX_STRINGS) {
    throw new MusicError(
      `A tuning needs ${MIN_STRINGS} to ${MAX_STRINGS} notes, low string first, like "E2 A2 D3 G3 B3 E4"; got ${tokens.length}.`,
    );
  }
  const pitches = tokens.map((token, i) => {
    try {
      return parsePitch(token);
    } catch (error) {
      throw new MusicError(`Tuning note ${i + 1} of "${notesLowToHigh.trim()}": ${(error as Error).message}`);
    }
  });
  const lowToHigh = pitches.map(pitchMidi);
  for (let i = 1; i < lowToHigh.length; i++) {
    const gap = lowToHigh[i]! - lowToHigh[i - 1]!;
    if (gap < 0) {
      throw new MusicError(
        `Tuning "${notesLowToHigh.trim()}": ${tokens[i]} is lower than ${tokens[i - 1]}; list the notes from the lowest string to the highest.`,
      );
    }
    if (gap > MAX_STRING_GAP) {
      throw new MusicError(
        `Tuning "${notesLowToHigh.trim()}": ${tokens[i - 1]} to ${tokens[i]} is ${gap} half steps; neighbouring strings may be at most a fifth (7) apart so each position reaches every note.`,
      );
    }
  }
  const canonical = pitches.map(pitchToString).join(" ");
  return { id: preset?.id ?? canonical, name: preset?.name ?? `Custom (${canonical})`, strings: lowToHigh.reverse() };
}

export const TUNINGS: Record<TuningId, Tuning> = {
  standard: buildTuning("E2 A2 D3 G3 B3 E4", { id: "standard", name: "Standard" }),
  "drop-d": buildTuning("D2 A2 D3 G3 B3 E4", { id: "drop-d", name: "Drop D" }),
  dadgad: buildTuning("D2 A2 D3 G3 A3 D4", { id: "dadgad", name: "DADGAD" }),
  "open-g": buildTuning("D2 G2 D3 G3 B3 D4", { id: "open-g", name: "Open G" }),
  "seven-string": buildTuning("B1 E2 A2 D3 G3 B3 E4", { id: "seven-string", name: "Seven-string" }),
};

/** An id from TUNINGS, or custom notes low→high such as "D2 A2 D3 G3 B3 E4". */
export function resolveTuning(idOrNotes: string): Tuning {
  if (typeof idOrNotes !== "string" || idOrNotes.trim() === "") {
    throw new MusicError(`Choose a tuning: ${Object.keys(TUNINGS).join(", ")}, or notes low to high like "E2 A2 D3 G3 B3 E4".`);
  }
  const key = idOrNotes.trim().toLowerCase();
  if (Object.hasOwn(TUNINGS, key)) return TUNINGS[key as TuningId];
  if (!/\s|,/u.test(idOrNotes.trim())) {
    throw new MusicError(
      `Unknown tuning "${idOrNotes.trim()}": use ${Object.keys(TUNINGS).join(", ")}, or notes low to high like "E2 A2 D3 G3 B3 E4".`,
    );
  }
  return buildTuning(idOrNotes);
}

/** Guards a neck length; returns it so callers can validate inline. */
export function checkFrets(frets: number): number {
  if (!Number.isInteger(frets) || frets < MIN_FRETS || frets > MAX_FRETS) {
    throw new MusicError(`A neck must have a whole number of frets from ${MIN_FRETS} to ${MAX_FRETS}, not ${String(frets)}.`);
  }
  return frets;
}
