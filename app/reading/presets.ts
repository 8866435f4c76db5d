// Ready-made reading sets for a typical progression, shown to every teacher. Our own plan: each step adds one
// thing to the step before (presets.test.ts checks that it adds exactly what it says).
import type { ReadingSetSpec } from "./spec";

export interface ReadingPreset {
  id: string;
  step: number;
  name: string;
  /** What this step adds to the one before, in the teacher's words. */
  adds: string;
  spec: ReadingSetSpec;
}

const base: ReadingSetSpec = {
  mode: "sprint",
  position: 5,
  tuning: "standard",
  frets: 15,
  keyFifths: 0,
  accidentals: "naturals",
  ledgerLines: false,
  homeOnly: true,
  prompts: 12,
  seconds: 10,
};

const steps: Omit<ReadingPreset, "step">[] = [
  { id: "ready-naturals-5", name: "Naturals in fifth position", adds: "The natural notes on the staff, no key signature.", spec: base },
  { id: "ready-g-major-5", name: "One sharp: G major", adds: "The key signature of G major: every F is F♯.", spec: { ...base, keyFifths: 1, accidentals: "key" } },
  { id: "ready-f-major-5", name: "One flat: F major", adds: "The key signature of F major: every B is B♭.", spec: { ...base, keyFifths: -1, accidentals: "key" } },
  {
    id: "ready-accidentals-5",
    name: "Accidentals in fifth position",
    adds: "Sharps and flats written beside the note, in C major.",
    spec: { ...base, accidentals: "chromatic", seconds: 12 },
  },
  {
    id: "ready-ledger-5",
    name: "Ledger lines in fifth position",
    adds: "Notes above and below the staff on ledger lines.",
    spec: { ...base, accidentals: "chromatic", ledgerLines: true, seconds: 12 },
  },
  {
    id: "ready-naturals-2",
    name: "Second position naturals",
    adds: "A new hand place: index finger at fret 2, naturals with ledger lines.",
    spec: { ...base, position: 2, ledgerLines: true },
  },
];

export const READING_PRESETS: readonly ReadingPreset[] = steps.map((s, i) => ({ ...s, step: i + 1 }));

export const readingPreset = (id: string) => READING_PRESETS.find((p) => p.id === id);
