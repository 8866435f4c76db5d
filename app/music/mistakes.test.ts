import { describe, expect, it } from "vitest";
import type { Spot } from "./fretboard";
import { diagnose, MISTAKE_LABELS, type MistakeKind } from "./mistakes";
import { MusicError } from "./pitch";
import { buildPool, type PoolNote, type ReadingSpec } from "./pools";
import { resolveTuning, TUNINGS } from "./tuning";

// G major (one sharp), second position (frets 2–5), standard tuning, every pitch.
const spec: ReadingSpec = {
  position: 2,
  tuning: "standard",
  frets: 19,
  reading: "guitar",
  keyFifths: 1,
  accidentals: "chromatic",
  ledgerLines: true,
};
const pool = buildPool(spec);
const note = (written: string, from: PoolNote[] = pool): PoolNote => {
  const found = from.find((n) => n.written === written);
  if (!found) throw new Error(`${written} not in pool`);
  return found;
};
const tap = (written: string, tapped: Spot, homeOnly?: boolean) =>
  diagnose({ note: note(written), keyFifths: 1, tapped, tuning: TUNINGS.standard, reading: "guitar", homeOnly });

describe("diagnose", () => {
  it.each([
    // written, tapped, kind, semitones, message
    ["F#5", { string: 1, fret: 2 }, "home-spot", 0, "Right note on its home spot."],
    ["F#5", { string: 2, fret: 7 }, "other-spot", 0, "Right note. In this position its home spot is string 1, fret 2."],
    ["F#5", { string: 4, fret: 4 }, "octave-off", -12, "Right letter, but an octave too low: you played F♯4, the note is F♯5. Home spot: string 1, fret 2."],
    ["F#5", { string: 1, fret: 14 }, "octave-off", 12, "Right letter, but an octave too high: you played F♯6, the note is F♯5. Home spot: string 1, fret 2."],
    ["F#5", { string: 1, fret: 1 }, "key-signature-miss", -1, "The key signature makes this F♯; you played F. Home spot: string 1, fret 2."],
    ["C5", { string: 3, fret: 6 }, "key-signature-miss", 1, "The key signature leaves C alone; you played C♯. Home spot: string 3, fret 5."],
    ["A#4", { string: 3, fret: 2 }, "accidental-miss", -1, "The sharp sign before this note makes it A♯; you played A. Home spot: string 3, fret 3."],
    ["F4", { string: 4, fret: 4 }, "accidental-miss", 1, "The natural sign before this note makes it F; you played F♯. Home spot: string 4, fret 3."],
    ["F#5", { string: 2, fret: 2 }, "string-over", -5, "Right fret, wrong string: F♯ is on string 1; you played string 2. Home spot: string 1, fret 2."],
    ["G4", { string: 4, fret: 4 }, "half-step-off", -1, "A half step (one fret) too low: you played F♯, the note is G. Home spot: string 4, fret 5."],
    ["F#5", { string: 6, fret: 0 }, "wide-miss", -26, "You played E, 26 half steps below F♯. Home spot: string 1, fret 2."],
    ["A#4", { string: 3, fret: 5 }, "wide-miss", 2, "You played C, 2 half steps above A♯. Home spot: string 3, fret 3."],
  ] as [string, Spot, MistakeKind, number, string][])("%s tapped at %o → %s", (written, tapped, kind, semitones, message) => {
    const d = tap(written, tapped);
    expect(d).toMatchObject({ kind, semitones, message, pitchRight: semitones === 0 });
    expect(MISTAKE_LABELS[d.kind]).toBeTruthy();
  });

  it("homeOnly: another spot has the right pitch but does not count", () => {
    expect(tap("F#5", { string: 2, fret: 7 }, true)).toEqual({
      kind: "other-spot",
      pitchRight: true,
      correct: false,
      semitones: 0,
      message: "Right note, but your home spot is string 1, fret 2.",
    });
    expect(tap("F#5", { string: 2, fret: 7 }).correct).toBe(true);
    expect(tap("F#5", { string: 1, fret: 2 }, true).correct).toBe(true);
    expect(tap("F#5", { string: 1, fret: 1 }).correct).toBe(false);
  });

  it("precedence: key-signature miss beats half step off, string over beats half step off", () => {
    expect(tap("F#5", { string: 1, fret: 1 }).kind).toBe("key-signature-miss"); // also a half step
    // Strings a half step apart make a string over that is also a half step off.
    const tuning = resolveTuning("E2 A2 D3 G3 G#3 C#4");
    const custom = buildPool({ ...spec, tuning: tuning.id, keyFifths: 0 });
    const a4 = note("A4", custom);
    expect(a4.home).toMatchObject({ string: 3, fret: 2 });
    const d = diagnose({ note: a4, keyFifths: 0, tapped: { string: 2, fret: 2 }, tuning, reading: "guitar" });
    expect(d).toMatchObject({ kind: "string-over", semitones: 1 });
  });

  it("concert reading compares sounding pitches without the octave shift", () => {
    const concert = buildPool({ ...spec, reading: "concert", keyFifths: 0, accidentals: "naturals" });
    const e4 = note("E4", concert);
    expect(e4.home).toMatchObject({ string: 2, fret: 5 });
    const d = diagnose({ note: e4, keyFifths: 0, tapped: { string: 1, fret: 0 }, tuning: TUNINGS.standard, reading: "concert" });
    expect(d.kind).toBe("other-spot");
  });

  it("labels every kind in the product's words", () => {
    expect(Object.values(MISTAKE_LABELS)).toEqual([
      "home spot", "other spot", "octave off", "key-signature miss", "accidental miss", "half step off", "string over", "wide miss",
    ]);
  });

  it("rejects bad input clearly", () => {
    expect(() => tap("F#5", { string: 7, fret: 0 })).toThrow(/String 7 is not on this neck/);
    expect(() => tap("F#5", { string: 1, fret: 30 })).toThrow(/Fret 30 is not on a neck/);
    const broken = { ...note("F#5"), writtenMidi: 80 };
    const call = () => diagnose({ note: broken, keyFifths: 1, tapped: { string: 1, fret: 2 }, tuning: TUNINGS.standard, reading: "guitar" });
    expect(call).toThrow(MusicError);
    expect(call).toThrow(/"F#5" does not match its MIDI number 80/);
    expect(() => diagnose({ note: note("F#5"), keyFifths: 1, tapped: { string: 1, fret: 2 }, tuning: TUNINGS.standard, reading: "x" as never })).toThrow(
      /Reading must be/,
    );
  });
});
