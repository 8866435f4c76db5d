import { describe, expect, it } from "vitest";
import { MusicError } from "./pitch";
import { buildPool, drawPrompts, seededRandom, type ReadingSpec } from "./pools";

const base: ReadingSpec = {
  position: 1,
  tuning: "standard",
  frets: 19,
  reading: "guitar",
  keyFifths: 0,
  accidentals: "naturals",
  ledgerLines: false,
};
const written = (spec: Partial<ReadingSpec>) => buildPool({ ...base, ...spec }).map((n) => n.written);

describe("buildPool", () => {
  it("naturals on the staff in first position: D4 below the staff to G5 above it, no ledger lines", () => {
    // Treble staff lines E4 G4 B4 D5 F5: common practice, no source.
    expect(written({})).toEqual(["D4", "E4", "F4", "G4", "A4", "B4", "C5", "D5", "E5", "F5", "G5"]);
  });

  it("ledger lines bring in C4 and below, A5 and above, and are flagged", () => {
    const pool = buildPool({ ...base, ledgerLines: true });
    expect(pool.map((n) => n.written)).toEqual(
      ["E3", "F3", "G3", "A3", "B3", "C4", "D4", "E4", "F4", "G4", "A4", "B4", "C5", "D5", "E5", "F5", "G5", "A5"],
    );
    expect(pool.filter((n) => n.ledger).map((n) => n.written)).toEqual(["E3", "F3", "G3", "A3", "B3", "C4", "A5"]);
  });

  it("key: the notes of G major, F spelt F#, no printed accidentals", () => {
    const pool = buildPool({ ...base, keyFifths: 1, accidentals: "key" });
    expect(pool.map((n) => n.written)).toEqual(["D4", "E4", "F#4", "G4", "A4", "B4", "C5", "D5", "E5", "F#5", "G5"]);
    expect(pool.every((n) => n.printedAccidental === null)).toBe(true);
  });

  it("chromatic in F major: flats as a reader expects, with the sign the staff must print", () => {
    const pool = buildPool({ ...base, keyFifths: -1, accidentals: "chromatic", lowest: "A4", highest: "D5" });
    expect(pool.map((n) => [n.written, n.printedAccidental])).toEqual([
      ["A4", null],
      ["Bb4", null],
      ["B4", "natural"],
      ["C5", null],
      ["Db5", "flat"],
      ["D5", null],
    ]);
  });

  it("chromatic in C: sharps", () => {
    expect(written({ accidentals: "chromatic", lowest: "F4", highest: "A4" })).toEqual(["F4", "F#4", "G4", "G#4", "A4"]);
  });

  it("each note carries its home spot from the default map", () => {
    const [b4] = buildPool({ ...base, lowest: "B4", highest: "B4" });
    expect(b4).toMatchObject({ written: "B4", writtenMidi: 71, home: { string: 2, fret: 0 }, ledger: false });
  });

  it("restricts to strings and a written range", () => {
    expect(written({ strings: [1, 2] })).toEqual(["B4", "C5", "D5", "E5", "F5", "G5"]);
    expect(written({ strings: [3], position: 5, ledgerLines: true })).toEqual(["B4", "C5", "D5"]);
    expect(written({ lowest: "F4", highest: "B4" })).toEqual(["F4", "G4", "A4", "B4"]);
  });

  it.each([
    [{ accidentals: "naturals", keyFifths: 2 }, /"Naturals" reads without a key signature/],
    [{ accidentals: "some" }, /Accidentals must be one of naturals, key, chromatic/],
    [{ tuning: "banjo" }, /Unknown tuning "banjo"/],
    [{ frets: 40 }, /from 12 to 24/],
    [{ position: 0 }, /Position must be a whole number/],
    [{ position: 17 }, /stretches to fret 21, but this neck has only 19 frets/],
    [{ reading: "bass" }, /Reading must be/],
    [{ keyFifths: 9 }, /7 sharps/],
    [{ strings: [0] }, /String 0 is not on this neck/],
    [{ strings: [] }, /at least one string/],
    [{ lowest: "Z9" }, /Lowest note: "Z9" is not a pitch/],
    [{ lowest: "C5", highest: "C4" }, /lowest note C5 is above the highest note C4/],
    [{ ledgerLines: "no" }, /ledger lines are allowed/],
    [{ strings: [6] }, /No notes fit this reading set \(position 1, Standard, strings 6, no ledger lines\)/],
  ] as [Partial<ReadingSpec>, RegExp][])("rejects %o", (change, message) => {
    expect(() => buildPool({ ...base, ...change })).toThrow(MusicError);
    expect(() => buildPool({ ...base, ...change })).toThrow(message);
  });
});

describe("seededRandom", () => {
  it("is reproducible, seed-dependent and stays in [0, 1)", () => {
    const a = seededRandom(42);
    const b = seededRandom(42);
    const first = Array.from({ length: 1000 }, a);
    expect(Array.from({ length: 1000 }, b)).toEqual(first);
    expect(first.every((x) => x >= 0 && x < 1)).toBe(true);
    expect(seededRandom(43)()).not.toBe(first[0]);
    expect(() => seededRandom(Number.NaN)).toThrow(/finite number/);
  });
});

describe("drawPrompts", () => {
  const pool = buildPool(base);

  it("is reproducible and never repeats a note twice in a row", () => {
    const prompts = drawPrompts(pool, 500, 7);
    expect(drawPrompts(pool, 500, 7)).toEqual(prompts);
    expect(drawPrompts(pool, 500, 8)).not.toEqual(prompts);
    prompts.slice(1).forEach((p, i) => expect(p.writtenMidi).not.toBe(prompts[i]!.writtenMidi));
  });

  it("draws weak notes more often", () => {
    const weights = { [pool[0]!.writtenMidi]: 10, [pool[1]!.writtenMidi]: 0 };
    const prompts = drawPrompts(pool, 2000, 1, weights);
    const count = (midi: number) => prompts.filter((p) => p.writtenMidi === midi).length;
    expect(count(pool[0]!.writtenMidi)).toBeGreaterThan(5 * count(pool[2]!.writtenMidi));
    expect(count(pool[1]!.writtenMidi)).toBe(0);
  });

  it("falls back to even draws when every other note weighs 0, and repeats a one-note pool", () => {
    const two = pool.slice(0, 2);
    const prompts = drawPrompts(two, 6, 3, { [two[0]!.writtenMidi]: 0, [two[1]!.writtenMidi]: 0 });
    // Two notes and no repeats: the draw must alternate.
    const start = prompts[0]!.written;
    const other = start === "D4" ? "E4" : "D4";
    expect(prompts.map((p) => p.written)).toEqual([start, other, start, other, start, other]);
    expect(drawPrompts(pool.slice(0, 1), 3, 3).map((p) => p.written)).toEqual(["D4", "D4", "D4"]);
  });

  it("rejects bad requests", () => {
    expect(() => drawPrompts([], 3, 1)).toThrow(/empty pool/);
    expect(() => drawPrompts(pool, -1, 1)).toThrow(/Prompt count/);
    expect(() => drawPrompts(pool, 3, 1, { 62: -1 })).toThrow(/weight for MIDI 62 must be zero or more/);
  });
});
