import { describe, expect, it } from "vitest";
import { demoEditedMap } from "~/demo/reading";
import { buildPool } from "~/music/pools";
import { validateSpotMap } from "~/music/positions";
import { TUNINGS } from "~/music/tuning";
import { readingPreset } from "./presets";
import { applySpotMap, parseReadingSet, readingSetSpecSchema } from "./spec";

const parsed = parseReadingSet(readingSetSpecSchema, readingPreset("ready-naturals-5")!.spec);
if (!parsed.ok) throw new Error("the ready-made set parses");
const pool = parsed.pool;
const B4 = 71;
const defaultB4 = pool.find((n) => n.writtenMidi === B4)!.home;
const movedB4 = { string: 4, fret: 9 };

describe("applySpotMap: one rule for rounds and practice", () => {
  it("the demo's edited map is valid and moves B4", () => {
    expect(validateSpotMap(demoEditedMap(), TUNINGS.standard)).toEqual([]);
    expect(defaultB4).not.toMatchObject(movedB4);
  });

  // map, frets of the neck, where B4's home ends up, why
  it.each([
    ["no class map", undefined, 15, defaultB4],
    ["the class moved B4", demoEditedMap(), 15, movedB4],
    ["the class moved B4, to a fret this neck has exactly", demoEditedMap(), 9, movedB4],
    ["the class moved B4 beyond this neck's frets", demoEditedMap(), 8, defaultB4],
    ["the class map does not reach B4", { ...demoEditedMap(), spots: demoEditedMap().spots.filter((s) => s.writtenMidi !== B4) }, 15, defaultB4],
  ])("%s → B4 at its expected home", (_why, map, frets, home) => {
    const moved = applySpotMap(pool, map, frets);
    expect(moved.find((n) => n.writtenMidi === B4)!.home).toMatchObject(home);
    // Every other note keeps its spot, whatever the map says about B4.
    expect(moved.filter((n) => n.writtenMidi !== B4)).toEqual(pool.filter((n) => n.writtenMidi !== B4));
  });

  it("works on prompts as well as pool notes, keeping their other fields", () => {
    const prompts = pool.map((n) => ({ ...n, keyFifths: 0 }));
    expect(applySpotMap(prompts, demoEditedMap(), 15).find((n) => n.writtenMidi === B4)).toMatchObject({ keyFifths: 0, home: movedB4 });
  });
});

describe("parseReadingSet builds the pool once, from stored JSON or a form", () => {
  it("gives the same set, spec and pool either way", () => {
    const form = new FormData();
    for (const [k, v] of Object.entries(parsed.set)) if (v !== false) form.set(k, v === true ? "on" : String(v));
    const fromForm = parseReadingSet(readingSetSpecSchema, form);
    expect(fromForm).toEqual(parsed);
    expect(buildPool(parsed.spec)).toEqual(pool);
  });
});
