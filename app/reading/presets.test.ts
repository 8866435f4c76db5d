import { describe, expect, it } from "vitest";
import { buildPool, type PoolNote } from "~/music/pools";
import { positionWindow } from "~/music/positions";
import { READING_PRESETS, readingPreset } from "./presets";
import { readingSetSpecSchema, readingSpecOf } from "./spec";

const pool = (id: string) => buildPool(readingSpecOf(readingPreset(id)!.spec));
const written = (p: PoolNote[]) => new Set(p.map((n) => n.written));
const letters = (p: PoolNote[]) => p.map((n) => n.written.replace(/\d+$/, ""));

describe("ready-made reading sets", () => {
  it.each(READING_PRESETS.map((p) => [p.id, p] as const))("%s passes the set checks and builds a non-empty pool", (_, p) => {
    expect(readingSetSpecSchema.parse(p.spec)).toEqual(p.spec);
    expect(buildPool(readingSpecOf(p.spec)).length).toBeGreaterThan(5);
  });

  it("numbers the steps in order with unique ids", () => {
    expect(READING_PRESETS.map((p) => p.step)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(new Set(READING_PRESETS.map((p) => p.id)).size).toBe(READING_PRESETS.length);
  });

  it("step 1: naturals only, no accidental, no ledger line", () => {
    const p = pool("ready-naturals-5");
    expect(letters(p).every((l) => /^[A-G]$/.test(l))).toBe(true);
    expect(p.some((n) => n.ledger || n.printedAccidental)).toBe(false);
  });

  it("step 2 adds one sharp: F becomes F♯, nothing else changes", () => {
    const before = letters(pool("ready-naturals-5"));
    const after = letters(pool("ready-g-major-5"));
    expect(after).toEqual(before.map((l) => (l === "F" ? "F#" : l)));
    expect(pool("ready-g-major-5").every((n) => n.printedAccidental === null)).toBe(true);
  });

  it("step 3 adds one flat: B becomes B♭", () => {
    const before = letters(pool("ready-naturals-5"));
    expect(letters(pool("ready-f-major-5"))).toEqual(before.map((l) => (l === "B" ? "Bb" : l)));
  });

  it("step 4 adds written accidentals to the naturals", () => {
    const naturals = written(pool("ready-naturals-5"));
    const p = pool("ready-accidentals-5");
    expect([...naturals].every((w) => written(p).has(w))).toBe(true);
    expect(p.filter((n) => !naturals.has(n.written)).every((n) => n.printedAccidental !== null)).toBe(true);
    expect(p.some((n) => n.printedAccidental !== null)).toBe(true);
    expect(p.some((n) => n.ledger)).toBe(false);
  });

  it("step 5 adds ledger-line notes to step 4", () => {
    const step4 = written(pool("ready-accidentals-5"));
    const p = pool("ready-ledger-5");
    expect([...step4].every((w) => written(p).has(w))).toBe(true);
    const added = p.filter((n) => !step4.has(n.written));
    expect(added.length).toBeGreaterThan(0);
    expect(added.every((n) => n.ledger)).toBe(true);
  });

  it("step 6 moves the hand to second position", () => {
    const w = positionWindow(2);
    const p = pool("ready-naturals-2");
    expect(p.every((n) => n.home.fret >= w.stretchLow && n.home.fret <= w.stretchHigh)).toBe(true);
    expect(p.every((n) => n.printedAccidental === null)).toBe(true);
  });
});
