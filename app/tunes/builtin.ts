/**
 * Fretcall's built-in melodies: short original tunes written for reading in fifth position
 * (written A3–A5 in standard tuning). Durations are in quarter-note beats, kept for the rhythm
 * pass; a Tune walk uses the pitches only.
 */
import type { LeftOut, ScorePart, TuneBar } from "~/music/musicxml";
import type { ScoreTempo } from "~/music/tempo";

export interface TuneNote {
  pitch: string;
  beats: number;
  bar: number;
  /** Quarter notes from the start of the score (uploads read fully; built-in tunes follow bar after bar). */
  onset?: number;
  /** Made of tied notes: one note to play. */
  tied?: boolean;
}

/** What an upload's score says beyond its notes (kept since uploads were read fully). */
export interface StoredScore {
  partId: string;
  part: string;
  parts: ScorePart[];
  /** Bars in order: `bar` of a note is its index here plus 1. */
  measures: TuneBar[];
  leftOut: LeftOut;
  /** The score's first tempo marking; absent for uploads stored before tempo was read. */
  tempo?: ScoreTempo | null;
}

export interface Tune {
  id: string;
  title: string;
  composer: string;
  keyFifths: number;
  beatsPerBar: number;
  notes: TuneNote[];
  /** Absent for built-in tunes and for uploads stored before scores were read fully. */
  score?: StoredScore;
}

/** Builds a tune from bars written as "E4:1 G4:1 A4:2" (pitch:beats). */
function tune(id: string, title: string, keyFifths: number, beatsPerBar: number, bars: string[]): Tune {
  const notes = bars.flatMap((bar, i) =>
    bar.split(/\s+/).map((token) => {
      const [pitch, beats] = token.split(":");
      return { pitch: pitch!, beats: Number(beats), bar: i + 1 };
    }),
  );
  return { id, title, composer: "Fretcall original", keyFifths, beatsPerBar, notes };
}

export const BUILTIN_TUNES: Tune[] = [
  tune("lantern-walk", "Lantern Walk", 0, 4, [
    "E4:1 G4:1 A4:1 G4:1",
    "C5:2 B4:1 A4:1",
    "G4:1 E4:1 F4:1 D4:1",
    "E4:3 G4:1",
    "A4:1 C5:1 D5:1 C5:1",
    "E5:2 D5:1 C5:1",
    "B4:1 G4:1 A4:1 B4:1",
    "C5:4",
  ]),
  tune("harbour-bells", "Harbour Bells", 1, 3, [
    "G4:1 B4:1 D5:1",
    "F#5:2 E5:1",
    "D5:1 B4:1 G4:1",
    "A4:3",
    "B4:1 C5:1 D5:1",
    "E5:1 D5:1 C5:1",
    "B4:1 A4:1 F#4:1",
    "G4:3",
  ]),
];

export const builtinTune = (id: string) => BUILTIN_TUNES.find((t) => t.id === id);
