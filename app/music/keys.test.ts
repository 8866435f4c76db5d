import { describe, expect, it } from "vitest";
import {
  defaultSpelling,
  keyAlter,
  KEYS,
  ledgerLineCount,
  readStaffBar,
  resolveKey,
  spellInKey,
  writeStaffBar,
  type StaffNote,
} from "./keys";
import { LETTERS, MusicError, parsePitch, pitchToString, type Letter } from "./pitch";

describe("KEYS", () => {
  // Circle of fifths key signatures and relative minors: from memory.
  it.each([
    ["Cb", -7, "Ab"],
    ["Gb", -6, "Eb"],
    ["Db", -5, "Bb"],
    ["Ab", -4, "F"],
    ["Eb", -3, "C"],
    ["Bb", -2, "G"],
    ["F", -1, "D"],
    ["C", 0, "A"],
    ["G", 1, "E"],
    ["D", 2, "B"],
    ["A", 3, "F#"],
    ["E", 4, "C#"],
    ["B", 5, "G#"],
    ["F#", 6, "D#"],
    ["C#", 7, "A#"],
  ])("%s major has fifths %i and relative minor %s", (tonic, fifths, minor) => {
    expect(resolveKey(`${tonic}-major`)).toMatchObject({ tonic, mode: "major", fifths });
    expect(resolveKey(`${minor}-minor`)).toMatchObject({ tonic: minor, mode: "minor", fifths });
  });

  it("has 15 major and 15 minor keys with unique ids", () => {
    expect(KEYS.filter((k) => k.mode === "major")).toHaveLength(15);
    expect(KEYS.filter((k) => k.mode === "minor")).toHaveLength(15);
    expect(new Set(KEYS.map((k) => k.id)).size).toBe(30);
  });
});

describe("resolveKey", () => {
  it.each([
    ["G-major", "G-major", "G major"],
    ["G major", "G-major", "G major"],
    ["g", "G-major", "G major"],
    ["Em", "E-minor", "E minor"],
    ["E minor", "E-minor", "E minor"],
    ["bbm", "Bb-minor", "B♭ minor"],
    ["F♯ major", "F#-major", "F♯ major"],
    ["Bb maj", "Bb-major", "B♭ major"],
  ])("%j → %s", (text, id, name) => {
    expect(resolveKey(text)).toMatchObject({ id, name });
  });

  it.each([
    ["H major", /not a key/],
    ["G# major", /G# major needs more than 7 sharps or flats.*enharmonic twin A♭ major/],
    ["Db minor", /Db minor needs more than 7.*C♯ minor/],
    ["G dorian", /not a key/],
  ])("rejects %j", (text, message) => {
    expect(() => resolveKey(text)).toThrow(MusicError);
    expect(() => resolveKey(text)).toThrow(message);
  });
});

describe("keyAlter", () => {
  // Order of sharps F C G D A E B and flats B E A D G C F: from memory.
  it.each([
    [0, "F", 0],
    [1, "F", 1],
    [1, "C", 0],
    [2, "C", 1],
    [7, "B", 1],
    [6, "B", 0],
    [-1, "B", -1],
    [-1, "E", 0],
    [-2, "E", -1],
    [-7, "F", -1],
    [-6, "F", 0],
  ] as [number, Letter, number][])("fifths %i: %s → %i", (fifths, letter, alter) => {
    expect(keyAlter(fifths, letter)).toBe(alter);
  });

  it("rejects a signature beyond 7", () => {
    expect(() => keyAlter(8, "C")).toThrow(/from 7 flats \(−7\) to 7 sharps \(7\)/);
  });
});

describe("writeStaffBar", () => {
  const signs = (fifths: number, written: string[], previous: string[] = []) =>
    writeStaffBar(fifths, written.map(parsePitch), previous.map(parsePitch)).map((n) => n.accidental ?? "-");

  it.each([
    // Common practice, no source: a sign holds to the bar line for its letter and octave, and is cancelled by a natural.
    [0, ["C#5", "C5"], [], ["sharp", "natural"]], // the case: C♯ then C♮ needs its natural
    [0, ["C#5", "C#5", "D5"], [], ["sharp", "-", "-"]], // the sharp holds
    [0, ["C#5", "C4"], [], ["sharp", "-"]], // another octave follows the key
    [1, ["F#4", "F4", "F4", "F#4"], [], ["-", "natural", "-", "sharp"]], // in G: F♮ against the key, then back
    [-1, ["B4", "Bb4"], [], ["natural", "flat"]], // in F
    [0, ["C5", "D5"], ["C#5"], ["natural", "-"]], // courtesy natural after a bar with C♯5
    [1, ["F#4"], ["F4"], ["sharp"]], // courtesy sharp after a bar with F♮4 in G
    [0, ["C4"], ["C#5"], ["-"]], // no courtesy for another octave
    [0, ["Bbb4", "F##4"], [], ["double-flat", "double-sharp"]],
  ] as [number, string[], string[], string[]][])("key %i: %j after %j → %j", (fifths, written, previous, expected) => {
    expect(signs(fifths, written, previous)).toEqual(expected);
  });

  it("reads back as written in every key (a round trip through readStaffBar)", () => {
    let seed = 7;
    const random = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    for (let fifths = -7; fifths <= 7; fifths++) {
      for (let trial = 0; trial < 40; trial++) {
        const bar = Array.from({ length: 8 }, () => ({ letter: LETTERS[Math.floor(random() * 7)]!, alter: Math.floor(random() * 3) - 1, octave: 4 + Math.floor(random() * 2) }));
        expect(readStaffBar(fifths, writeStaffBar(fifths, bar)).map(pitchToString)).toEqual(bar.map(pitchToString));
      }
    }
  });
});

describe("readStaffBar", () => {
  const bar = (fifths: number, notes: StaffNote[]) => readStaffBar(fifths, notes).map(pitchToString);

  it("applies the key signature to every octave", () => {
    expect(bar(1, [{ letter: "F", octave: 4 }, { letter: "F", octave: 5 }, { letter: "G", octave: 4 }])).toEqual(["F#4", "F#5", "G4"]);
  });

  it("a natural cancels the signature for that letter and octave until the bar line", () => {
    expect(
      bar(1, [
        { letter: "F", octave: 4, accidental: "natural" },
        { letter: "F", octave: 4 },
        { letter: "F", octave: 5 },
      ]),
    ).toEqual(["F4", "F4", "F#5"]);
  });

  it("an accidental carries through the bar for the same letter and octave only", () => {
    expect(
      bar(0, [
        { letter: "C", octave: 5, accidental: "sharp" },
        { letter: "D", octave: 5 },
        { letter: "C", octave: 5 },
        { letter: "C", octave: 4 },
        { letter: "C", octave: 5, accidental: "natural" },
        { letter: "C", octave: 5 },
      ]),
    ).toEqual(["C#5", "D5", "C#5", "C4", "C5", "C5"]);
  });

  it("accidentals are absolute, doubles included", () => {
    expect(
      bar(-1, [
        { letter: "B", octave: 4, accidental: "sharp" },
        { letter: "E", octave: 4, accidental: "double-flat" },
        { letter: "F", octave: 4, accidental: "double-sharp" },
      ]),
    ).toEqual(["B#4", "Ebb4", "F##4"]);
  });

  it("rejects bad notes with their place in the bar", () => {
    expect(() => readStaffBar(0, [{ letter: "C", octave: 4 }, { letter: "C", octave: 4, accidental: "sharpish" as never }])).toThrow(
      /Note 2 of the bar: unknown accidental "sharpish"/,
    );
    expect(() => readStaffBar(0, [{ letter: "X" as Letter, octave: 4 }])).toThrow(/Note 1 of the bar: the letter/);
    expect(() => readStaffBar(9, [])).toThrow(/7 sharps/);
  });
});

describe("spellInKey", () => {
  it.each([
    [66, 1, "major", "F#4"], // diatonic in G major
    [65, 1, "major", "F4"], // the natural beats E#
    [61, 1, "major", "C#4"], // sharp key raises
    [61, -1, "major", "Db4"], // flat key lowers
    [71, -1, "major", "B4"], // B natural in F major, not Cb
    [70, 0, "major", "A#4"], // C major uses sharps
    [59, -7, "major", "Cb4"], // Cb major tonic, octave follows the letter
    [60, 7, "major", "B#3"], // C# major leading note
    [61, -1, "minor", "C#4"], // D minor: raised 7th
    [67, 5, "minor", "F##4"], // G# minor: raised 7th keeps its letter (from memory)
    [66, -2, "minor", "F#4"], // G minor: raised 7th, not Gb
  ] as const)("MIDI %i, fifths %i, %s → %s", (midi, fifths, mode, spelt) => {
    expect(pitchToString(spellInKey(midi, fifths, mode))).toBe(spelt);
  });

  it("spells every pitch in every major key with at most one sharp or flat, and keeps the MIDI number", () => {
    for (let fifths = -7; fifths <= 7; fifths++) {
      for (let midi = 12; midi <= 115; midi++) {
        const p = spellInKey(midi, fifths);
        expect(Math.abs(p.alter)).toBeLessThanOrEqual(1);
        expect(parsePitch(pitchToString(p))).toEqual(p);
      }
    }
  });

  it("defaultSpelling uses sharps", () => {
    expect([61, 63, 66, 68, 70].map((m) => pitchToString(defaultSpelling(m)))).toEqual(["C#4", "D#4", "F#4", "G#4", "A#4"]);
  });

  it("rejects bad numbers", () => {
    expect(() => spellInKey(128, 0)).toThrow(/from 0 to 127/);
    expect(() => spellInKey(60, -8)).toThrow(/7 flats/);
  });
});

describe("ledgerLineCount", () => {
  // Treble staff lines E4 G4 B4 D5 F5: common practice, no source.
  it.each([
    ["D4", 0], // hangs below the bottom line
    ["E4", 0],
    ["F5", 0],
    ["G5", 0], // sits on the top line
    ["C4", 1], // middle C: one ledger line
    ["Cb4", 1], // the letter decides, not the sound
    ["B#3", 1],
    ["B3", 1],
    ["A3", 2],
    ["E3", 3], // open low E string in guitar reading
    ["A5", 1],
    ["B5", 1],
    ["C6", 2],
  ])("%s needs %i", (text, count) => {
    expect(ledgerLineCount(parsePitch(text))).toBe(count);
  });
});
