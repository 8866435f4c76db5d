import { describe, expect, it } from "vitest";
import { buildPool } from "~/music/pools";
import { parseReadingSet, readingSetFormSchema, readingSetSpecSchema, readingSpecOf, describeReadingSet, type ReadingSetSpec } from "./spec";

const SET: ReadingSetSpec = {
  mode: "sprint",
  position: 5,
  tuning: "standard",
  frets: 15,
  strings: [1, 2, 3],
  lowest: "E4",
  highest: "G5",
  keyFifths: 1,
  accidentals: "key",
  ledgerLines: false,
  homeOnly: true,
  prompts: 12,
  seconds: 10,
};

const form = (fields: Record<string, string | string[]>) => {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) for (const one of [v].flat()) f.append(k, one);
  return f;
};
const good = {
  name: "Week 2",
  mode: "sprint",
  position: "5",
  tuning: "standard",
  frets: "15",
  strings: ["", "1", "2", "3"],
  lowest: "",
  highest: "",
  keyFifths: "1",
  accidentals: "key",
  ledgerLines: "on",
  homeOnly: "on",
  prompts: "12",
  seconds: "10",
};

describe("reading set spec ↔ the engine's ReadingSpec", () => {
  it("carries every reading field across", () => {
    const { mode: _mode, homeOnly: _homeOnly, prompts: _prompts, seconds: _seconds, ...reading } = SET;
    expect(readingSpecOf(SET)).toEqual({ ...reading, reading: "guitar" });
  });

  it("leaves out what the set leaves open (all strings, the whole range)", () => {
    const spec = readingSpecOf({ ...SET, strings: undefined, lowest: undefined, highest: undefined });
    expect(spec).not.toHaveProperty("strings");
    expect(spec).not.toHaveProperty("lowest");
    expect(spec).not.toHaveProperty("highest");
  });

  it("reads naturals without a key signature, whatever key was left selected", () => {
    expect(readingSpecOf({ ...SET, accidentals: "naturals", keyFifths: 3 }).keyFifths).toBe(0);
  });

  it("round-trips through stored JSON unchanged, and the pool respects strings and range", () => {
    expect(readingSetSpecSchema.parse(JSON.parse(JSON.stringify(SET)))).toEqual(SET);
    const pool = buildPool(readingSpecOf(SET));
    expect(pool.every((n) => [1, 2, 3].includes(n.home.string) && n.writtenMidi >= 64 && n.writtenMidi <= 79)).toBe(true);
    expect(pool.map((n) => n.written)).toContain("F#5");
  });

  it("parses the posted form, checkboxes for strings included", () => {
    const parsed = parseReadingSet(readingSetFormSchema, form(good));
    expect(parsed).toMatchObject({ ok: true, set: { name: "Week 2", strings: [1, 2, 3], lowest: undefined, ledgerLines: true } });
  });

  it.each([
    [{ name: "  " }, "name", "Give the set a name."],
    [{ strings: [""] }, "strings", "Choose at least one string."],
    [{ lowest: "H4" }, "lowest", "Lowest note:"],
    [{ prompts: "2" }, "prompts", "At least 3 notes."],
    [{ seconds: "90" }, "seconds", "At most 60 seconds."],
    [{ tuning: "banjo" }, "tuning", 'Unknown tuning "banjo"'],
    [{ mode: "tune-walk" }, "mode", "Choose Sprint, Full neck or Teams."],
    [{ lowest: "G5", highest: "E4" }, "pool", "is above the highest note"],
    [{ strings: ["", "1"], lowest: "C4", highest: "D4" }, "pool", "No notes fit this reading set"],
  ])("refuses %o with a clear message on %s", (override, field, message) => {
    const parsed = parseReadingSet(readingSetFormSchema, form({ ...good, ...override }));
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.errors[field]).toContain(message);
  });

  it("sums a set up in one line", () => {
    expect(describeReadingSet(SET)).toBe("Position 5 · Standard · G major, notes of the key · no ledger lines · strings 1, 2, 3 · E4 to G5 · 12 notes, 10 s each · Sprint · home spot only");
  });
});
