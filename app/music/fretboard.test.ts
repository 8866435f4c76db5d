import { describe, expect, it } from "vitest";
import { fretDistance, soundingMidi, spotSounding, spotsFor, spotsForSounding, writtenMidiFor, type Spot } from "./fretboard";
import { MusicError } from "./pitch";
import { resolveTuning, TUNINGS } from "./tuning";

const standard = TUNINGS.standard;

describe("reading", () => {
  it("guitar sounds an octave below written; concert sounds as written", () => {
    expect(soundingMidi(64)).toBe(52); // common practice, no source: guitar sounds an octave below written
    expect(soundingMidi(64, "guitar")).toBe(52);
    expect(soundingMidi(64, "concert")).toBe(64);
    expect(writtenMidiFor(52, "guitar")).toBe(64);
    expect(() => soundingMidi(64, "bass" as never)).toThrow(/Reading must be "guitar"/);
  });

  it("the open low E string is written E3, three ledger lines below the staff", () => {
    // common practice, no source: guitar parts are written an octave above the sound
    expect(spotsFor("E3", { tuning: standard, frets: 12 })).toEqual([{ string: 6, fret: 0 }]);
    expect(spotsFor("E4", { tuning: standard, frets: 12 })).toEqual([
      { string: 4, fret: 2 },
      { string: 5, fret: 7 },
      { string: 6, fret: 12 },
    ]);
  });
});

describe("spotsFor", () => {
  it("written E5 (top space of the staff) has four places within the first 15 frets in standard tuning", () => {
    // common practice, no source
    expect(spotsFor("E5", { tuning: standard, frets: 15 })).toEqual([
      { string: 1, fret: 0 },
      { string: 2, fret: 5 },
      { string: 3, fret: 9 },
      { string: 4, fret: 14 },
    ]);
  });

  it("concert reading maps written pitch straight to sound", () => {
    expect(spotsFor("E4", { tuning: standard, frets: 12, reading: "concert" })).toEqual([
      { string: 1, fret: 0 },
      { string: 2, fret: 5 },
      { string: 3, fret: 9 },
    ]);
  });

  it.each([
    ["C#4", "Db4"],
    ["B#3", "C4"],
    ["E#4", "F4"],
    ["Cb5", "B4"],
    ["F##4", "G4"],
    ["Abb4", "G4"],
  ])("enharmonics %s and %s share spots", (a, b) => {
    const opts = { tuning: TUNINGS["seven-string"], frets: 24 };
    expect(spotsFor(a, opts)).toEqual(spotsFor(b, opts));
    expect(spotsFor(a, opts).length).toBeGreaterThan(0);
  });

  it("returns no spots for a note below the neck", () => {
    expect(spotsFor("C3", { tuning: standard, frets: 24 })).toEqual([]);
  });

  it("rejects bad input clearly", () => {
    expect(() => spotsFor("Q4", { tuning: standard, frets: 19 })).toThrow(MusicError);
    expect(() => spotsFor("E4", { tuning: standard, frets: 30 })).toThrow(/from 12 to 24/);
  });
});

// Independent cross-check: open strings and letter semitones typed here by hand, spots by plain subtraction.
describe("cross-check against plain MIDI arithmetic", () => {
  const OPEN: Record<string, number[]> = {
    standard: [64, 59, 55, 50, 45, 40],
    "drop-d": [64, 59, 55, 50, 45, 38],
    dadgad: [62, 57, 55, 50, 45, 38],
    "open-g": [62, 59, 55, 50, 43, 38],
    "seven-string": [64, 59, 55, 50, 45, 40, 35],
    "C2 G2 D3 G3 B3 E4": [64, 59, 55, 50, 43, 36],
  };
  const SEMITONE: Record<string, number> = { C: 0, D: 2, E: 4, F: 5, G: 7, A: 9, B: 11 };
  const ACCIDENTAL: Record<string, number> = { bb: -2, b: -1, "": 0, "#": 1, "##": 2, x: 2, "♯": 1, "♭": -1 };
  const written: { text: string; midi: number }[] = [];
  for (let octave = 0; octave <= 8; octave++) {
    for (const letter of Object.keys(SEMITONE)) {
      for (const [sign, alter] of Object.entries(ACCIDENTAL)) {
        written.push({ text: `${letter}${sign}${octave}`, midi: 12 * (octave + 1) + SEMITONE[letter]! + alter });
      }
    }
  }

  it.each(Object.keys(OPEN))("%s: every written pitch × 12–24 frets", (id) => {
    const tuning = resolveTuning(id);
    let compared = 0;
    for (let frets = 12; frets <= 24; frets++) {
      for (const w of written) {
        const expected: Spot[] = [];
        OPEN[id]!.forEach((open, i) => {
          const fret = w.midi - 12 - open;
          if (fret >= 0 && fret <= frets) expected.push({ string: i + 1, fret });
        });
        expect(spotsFor(w.text, { tuning, frets })).toEqual(expected);
        compared++;
      }
    }
    expect(compared).toBe(13 * written.length);
  });
});

describe("spotSounding", () => {
  it.each([
    [{ string: 1, fret: 0 }, 64],
    [{ string: 6, fret: 5 }, 45],
    [{ string: 3, fret: 12 }, 67],
  ])("%o sounds MIDI %i", (spot, midi) => expect(spotSounding(spot, standard)).toBe(midi));

  it.each([
    [{ string: 7, fret: 0 }, /String 7 is not on this neck: Standard has strings 1 to 6/],
    [{ string: 0, fret: 0 }, /String 0 is not on this neck/],
    [{ string: 1, fret: -1 }, /Fret -1 is not on a neck/],
    [{ string: 1, fret: 25 }, /Fret 25 is not on a neck/],
    [{ string: 1.5, fret: 2 }, /whole-number string and fret/],
  ])("rejects %o", (spot, message) => expect(() => spotSounding(spot, standard)).toThrow(message));

  it("agrees with spotsForSounding", () => {
    for (const spot of spotsForSounding(57, standard, 24)) expect(spotSounding(spot, standard)).toBe(57);
  });
});

describe("fretDistance", () => {
  it.each([
    [0, 650, 0],
    [12, 650, 325], // string physics: the 12th fret halves the string (octave)
    [24, 650, 487.5], // string physics: two octaves leave a quarter of the string
    [7, 648, 648 * (1 - 2 ** (-7 / 12))],
  ])("fret %i on a %i mm scale is %f mm from the nut", (n, length, mm) => {
    expect(fretDistance(n, length)).toBeCloseTo(mm, 9);
  });

  it("rejects nonsense", () => {
    expect(() => fretDistance(-1, 650)).toThrow(/zero or more/);
    expect(() => fretDistance(3, 0)).toThrow(/positive number/);
  });
});
