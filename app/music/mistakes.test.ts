import { describe, expect, it } from "vitest";
import type { NoteNaming } from "./naming";
import type { Spot } from "./fretboard";
import { diagnose, diagnosePlayed, MISTAKE_LABELS, type MistakeKind } from "./mistakes";
import { keyAlter } from "./keys";
import { MusicError, parsePitch } from "./pitch";
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

describe("key-signature miss or half step off, in every key", () => {
  // Expectations: common practice, no source — the key's sharps (F C G D A E B) or flats (B E A D G C F)
  // in order, and which letters sit a half step apart within each key.
  const ROWS: [number, string, number, MistakeKind, string][] = [
    // fifths, written, semitones tapped (same string), kind, what "you played" names
    [0, "B4", 1, "half-step-off", "C"],
    [0, "E4", 1, "half-step-off", "F"],
    [0, "F4", -1, "half-step-off", "E"],
    [1, "F#4", -1, "key-signature-miss", "F"],
    [1, "B4", 1, "half-step-off", "C"],
    [1, "E4", 1, "half-step-off", "F"], // F is the key's own letter, but E was written
    [1, "C5", 1, "half-step-off", "C♯"],
    [2, "C#5", -1, "key-signature-miss", "C"],
    [2, "B4", 1, "half-step-off", "C"],
    [3, "G#4", -1, "key-signature-miss", "G"],
    [3, "E4", 1, "half-step-off", "F"],
    [4, "D#5", -1, "key-signature-miss", "D"],
    [4, "B4", 1, "half-step-off", "C"],
    [5, "A#4", -1, "key-signature-miss", "A"],
    [5, "E5", 1, "half-step-off", "F"],
    [6, "E#4", -1, "key-signature-miss", "E"],
    [6, "B4", 1, "half-step-off", "C"],
    [7, "B#4", -1, "key-signature-miss", "B"],
    [7, "E#4", 1, "half-step-off", "F♯"],
    [-1, "Bb4", 1, "key-signature-miss", "B"],
    [-1, "E4", 1, "half-step-off", "F"],
    [-1, "A4", 1, "half-step-off", "B♭"],
    [-2, "Eb5", 1, "key-signature-miss", "E"],
    [-2, "D5", 1, "half-step-off", "E♭"],
    [-3, "Ab4", 1, "key-signature-miss", "A"],
    [-3, "G4", 1, "half-step-off", "A♭"],
    [-4, "Db5", 1, "key-signature-miss", "D"],
    [-4, "C5", 1, "half-step-off", "D♭"],
    [-5, "Gb4", 1, "key-signature-miss", "G"],
    [-5, "F4", 1, "half-step-off", "G♭"],
    [-6, "Cb5", 1, "key-signature-miss", "C"],
    [-6, "F4", 1, "half-step-off", "G♭"],
    // B♭ up a fret is C♭ in this key, but also B♭ without its flat: the written letter wins.
    [-6, "Bb4", 1, "key-signature-miss", "B"],
    [-7, "Fb4", 1, "key-signature-miss", "F"],
    [-7, "Fb4", -1, "half-step-off", "E♭"],
    [-7, "Eb4", 1, "key-signature-miss", "E"], // F♭ in this key, and E♭ without its flat

  ];
  const keyPool = (fifths: number) => buildPool({ ...spec, position: 5, keyFifths: fifths, accidentals: "key" });
  const slip = (fifths: number, n: PoolNote, semitones: number) =>
    diagnose({ note: n, keyFifths: fifths, tapped: { string: n.home.string, fret: n.home.fret + semitones }, tuning: TUNINGS.standard, reading: "guitar" });

  it.each(ROWS)("key %i: %s played %i half step → %s (you played %s)", (fifths, written, semitones, kind, played) => {
    const d = slip(fifths, note(written, keyPool(fifths)), semitones);
    expect(d).toMatchObject({ kind, semitones });
    expect(d.message).toContain(`you played ${played}${kind === "key-signature-miss" ? "." : ","}`);
  });

  it("every note of every key: a key-signature miss exactly when the key's alteration was left off", () => {
    for (let fifths = -7; fifths <= 7; fifths++) {
      for (const n of keyPool(fifths)) {
        const alter = keyAlter(fifths, parsePitch(n.written).letter);
        for (const semitones of [-1, 1]) {
          if (n.home.fret + semitones < 0) continue;
          expect([fifths, n.written, semitones, slip(fifths, n, semitones).kind]).toEqual([fifths, n.written, semitones, alter !== 0 && semitones === -alter ? "key-signature-miss" : "half-step-off"]);
        }
      }
    }
  });
});

describe("diagnose", () => {
  it.each([
    // written, tapped, kind, semitones, message
    ["F#5", { string: 1, fret: 2 }, "home-spot", 0, "Right note on its home spot."],
    ["F#5", { string: 2, fret: 7 }, "other-spot", 0, "Right note. In this position its home spot is string 1, fret 2."],
    ["F#5", { string: 4, fret: 4 }, "octave-off", -12, "Right letter, but an octave too low: you played F♯4, the note is F♯5. Home spot: string 1, fret 2."],
    ["F#5", { string: 1, fret: 14 }, "octave-off", 12, "Right letter, but an octave too high: you played F♯6, the note is F♯5. Home spot: string 1, fret 2."],
    ["F#5", { string: 1, fret: 1 }, "key-signature-miss", -1, "The key signature makes this F♯; you played F. Home spot: string 1, fret 2."],
    // The key does not touch C: C♯ is a half step off, not a misread signature.
    ["C5", { string: 3, fret: 6 }, "half-step-off", 1, "A half step (one fret) too high: you played C♯, the note is C. Home spot: string 3, fret 5."],
    // B→C is the neighbouring letter, a half step up in any key (the issue's own example).
    ["B4", { string: 3, fret: 5 }, "half-step-off", 1, "A half step (one fret) too high: you played C, the note is B. Home spot: string 3, fret 4."],
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

  it("names the notes in the class's naming (table in naming.test.ts)", () => {
    const named = (written: string, tapped: Spot, naming: NoteNaming) =>
      diagnose({ note: note(written), keyFifths: 1, tapped, tuning: TUNINGS.standard, reading: "guitar", naming }).message;
    expect(named("G4", { string: 4, fret: 4 }, "solfege")).toBe("A half step (one fret) too low: you played Fa♯, the note is Sol. Home spot: string 4, fret 5.");
    expect(named("F#5", { string: 4, fret: 4 }, "german")).toBe("Right letter, but an octave too low: you played Fis4, the note is Fis5. Home spot: string 1, fret 2.");
    expect(named("F#5", { string: 1, fret: 1 }, "german")).toBe("The key signature makes this Fis; you played F. Home spot: string 1, fret 2.");
    expect(named("B4", { string: 3, fret: 5 }, "german")).toBe("A half step (one fret) too high: you played C, the note is H. Home spot: string 3, fret 4.");
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

describe("diagnosePlayed: a heard (sounding) MIDI number against the written note", () => {
  // MIDI 1.0 note numbers: C4 = 60, each half step one number. Guitar sounds an octave below written
  // (common practice, no source); concert pitch sounds as written. G major, second position (the pool above).
  const ROWS: [string, "guitar" | "concert", number, MistakeKind][] = [
    ["G4", "guitar", 55, "home-spot"], // G4 written = 67, sounds G3 = 55
    ["G4", "guitar", 67, "octave-off"], // sounding as written: an octave high
    ["G4", "guitar", 43, "octave-off"],
    ["G4", "guitar", 56, "half-step-off"],
    ["G4", "guitar", 54, "half-step-off"],
    ["G4", "guitar", 60, "wide-miss"],
    ["F#4", "guitar", 53, "key-signature-miss"], // F♯4 = 66 − 12 = 54; F natural = 53
    ["G4", "concert", 67, "home-spot"],
    ["G4", "concert", 55, "octave-off"],
    ["G4", "concert", 68, "half-step-off"],
  ];
  it.each(ROWS)("%s (%s reading) heard as %i → %s", (written, reading, heardMidi, kind) => {
    const d = diagnosePlayed({ note: note(written), keyFifths: 1, heardMidi, reading });
    expect(d.kind).toBe(kind);
    expect(d.pitchRight).toBe(kind === "home-spot");
  });

  it("an accidental misread by ear is an accidental miss", () => {
    // C♯5 in G major carries a printed sharp; C natural played = one half step lower (MIDI 1.0: C5 = 72, sounds 60).
    const d = diagnosePlayed({ note: note("C#5"), keyFifths: 1, heardMidi: 60, reading: "guitar" });
    expect(d.kind).toBe("accidental-miss");
  });

  it("says the string cannot be heard, and names the home spot", () => {
    const n = note("G4");
    const d = diagnosePlayed({ note: n, keyFifths: 1, heardMidi: 55, reading: "guitar" });
    expect(d.message).toContain("cannot tell the string");
    expect(d.message).toContain(`string ${n.home.string}, fret ${n.home.fret}`);
  });

  it.each([-1, 128, 60.5, Number.NaN])("refuses a heard note of %s", (heardMidi) => {
    expect(() => diagnosePlayed({ note: note("G4"), keyFifths: 1, heardMidi, reading: "guitar" })).toThrow(MusicError);
  });
});
