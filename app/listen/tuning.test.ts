import { describe, expect, it } from "vitest";
import { OPEN_STRINGS, readString, wholeGuitarOffset } from "./tuning";

// 12-TET from A4 = 440 Hz (ISO 16), MIDI 1.0 numbers; standard tuning E2 A2 D3 G3 B3 E4 (common practice, no source).
const tet = (n: number, cents = 0) => 440 * Math.pow(2, (n - 69) / 12 + cents / 1200);

describe("standard tuning's open strings", () => {
  it("are E4 B3 G3 D3 A2 E2 from string 1 (MIDI 1.0: E4 = 64 … E2 = 40)", () => {
    expect(OPEN_STRINGS).toEqual([64, 59, 55, 50, 45, 40]);
  });
});

describe("readString", () => {
  it.each([
    [tet(40), 6, "E2", 0, "in tune (spot on)"],
    [tet(40, -12), 6, "E2", -12, "12 cents flat — tighten a little"],
    [tet(45, 30), 5, "A2", 30, "30 cents sharp — loosen it"],
    [tet(50, 3), 4, "D3", 3, "in tune (3 cents off)"],
    [tet(55, -40), 3, "G3", -40, "40 cents flat — tighten it"],
    [tet(59, 8), 2, "B3", 8, "8 cents sharp — loosen a little"],
    [tet(64, -25), 1, "E4", -25, "25 cents flat — tighten a little"],
    // A string a whole step low still reads as its own string, far flat.
    [tet(62), 1, "E4", -200, "about 2 half steps flat — tighten it a lot"],
  ])("%f Hz → string %i (%s), %f cents: %s", (hz, string, target, cents, words) => {
    const reading = readString(hz);
    expect(reading).toMatchObject({ string, target, words });
    expect(reading.cents).toBeCloseTo(cents, 6);
  });

  it("reads against another reference when one is set (A4 = 442 Hz: 442 Hz is in tune)", () => {
    expect(readString(442 / 2 ** (5 / 12), 442)).toMatchObject({ string: 1, target: "E4" });
    expect(readString(442 / 2 ** (5 / 12), 442).cents).toBeCloseTo(0, 6);
  });
});

describe("wholeGuitarOffset", () => {
  const all = (cents: number[]) => cents.map((c, i) => ({ string: 6 - i, cents: c }));

  it.each([
    ["all strings in tune", all([0, 2, -3, 1, 0, -1]), null],
    ["strings off in different directions", all([-20, 15, -5, 30, 0, 2]), null],
    ["too few strings read", all([31, 33]), null],
    ["spread wider than 20 cents", all([10, 35, 20, 22, 25, 24]), null],
  ])("no hint: %s", (_, readings, expected) => {
    expect(wholeGuitarOffset(readings)).toBe(expected);
  });

  it("names the reference the guitar was tuned to: +31.4 cents is A4 = 448 Hz (1200·log2(448/440) = 31.2, arithmetic)", () => {
    const offset = wholeGuitarOffset(all([30, 32, 31, 33, 31, 31]));
    expect(offset?.cents).toBeCloseTo(31.33, 1);
    expect(offset?.hint).toMatch(/about 31 cents sharp.*A4 = 448 Hz/);
  });

  it("says tune up when every string is about 15 cents flat", () => {
    expect(wholeGuitarOffset(all([-14, -16, -15, -15]))?.hint).toMatch(/15 cents flat.*A4 = 436 Hz.*up/);
  });

  it("recognises a guitar tuned down a half step", () => {
    expect(wholeGuitarOffset(all([-98, -101, -100, -103, -99, -100]))?.hint).toMatch(/1 half step low: the guitar is tuned down/);
  });

  it("recognises a capo at the second fret", () => {
    expect(wholeGuitarOffset(all([199, 201, 200, 202, 198, 200]))?.hint).toMatch(/2 half steps high: is a capo on/);
  });

  it("uses each string's latest reading", () => {
    const readings = [{ string: 6, cents: -40 }, ...all([20, 21, 22, 20])];
    expect(wholeGuitarOffset(readings)?.cents).toBeCloseTo(20.75, 6);
  });
});
