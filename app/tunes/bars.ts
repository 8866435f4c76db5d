// One bar of a tune as a staff draws it: its key, and each note's printed sign decided for the whole bar
// (writeStaffBar), so an accidental holds to the bar line and a natural appears where one is needed.
import { writeStaffBar, type PrintedAccidental } from "~/music/keys";
import { parsePitch } from "~/music/pitch";
import type { Tune } from "./builtin";

export interface DrawnBar {
  bar: number;
  keyFifths: number;
  notes: { written: string; accidental: PrintedAccidental | null }[];
}

export function drawnBar(tune: Pick<Tune, "notes" | "keyFifths" | "score">, bar: number): DrawnBar {
  // A stored score knows each bar's key; older tunes have one key throughout.
  const keyFifths = tune.score?.measures[bar - 1]?.keyFifths ?? tune.keyFifths;
  const notesOf = (b: number) => tune.notes.filter((n) => n.bar === b);
  const pitchesOf = (b: number) => notesOf(b).map((n) => parsePitch(n.pitch));
  const pitches = pitchesOf(bar);
  const previousKey = tune.score?.measures[bar - 2]?.keyFifths ?? tune.keyFifths;
  // A courtesy sign only makes sense within one key; after a key change the new signature speaks for itself.
  const signs = writeStaffBar(keyFifths, pitches, previousKey === keyFifths ? pitchesOf(bar - 1) : []);
  return { bar, keyFifths, notes: notesOf(bar).map((n, i) => ({ written: n.pitch, accidental: signs[i]!.accidental ?? null })) };
}
