import { describe, expect, it } from "vitest";
import { readingPreset } from "~/reading/presets";
import { parseReadingSet, readingSetSpecSchema } from "~/reading/spec";
import { quickSetupSchema, roundTitle, setupFromSet } from "./setup";

describe("the quick setup is a reading set not saved yet", () => {
  it("a ready-made set makes a valid quick setup for a class, with the set's spec and pool", () => {
    const set = parseReadingSet(readingSetSpecSchema, readingPreset("ready-g-major-5")!.spec);
    if (!set.ok) throw new Error("the ready-made set parses");
    const setup = setupFromSet(set, "class-1");
    expect(parseReadingSet(quickSetupSchema, setup.set)).toEqual({ ok: true, ...setup });
  });
});

describe("a round's title", () => {
  const spec = { position: 5, keyFifths: 2, accidentals: "key" as const };
  it("names the class, the set, the mode, the key and the position", () => {
    expect(roundTitle({ className: "Tuesday beginners", setName: "Two sharps", mode: "sprint", spec })).toBe("Tuesday beginners · Two sharps · Sprint · D major · position 5");
  });
  it("leaves out what a one-off round lacks, and says naturals and accidentals in words", () => {
    expect(roundTitle({ mode: "full-neck", spec: { ...spec, keyFifths: 0, accidentals: "naturals" } })).toBe("Full neck · naturals · position 5");
    expect(roundTitle({ mode: "teams", spec: { ...spec, keyFifths: -1, accidentals: "chromatic" } })).toBe("Teams · F major with accidentals · position 5");
  });
  it("gives a Tune walk its tune's key, never the tune's name", () => {
    expect(roundTitle({ className: "Year 8", mode: "tune-walk", spec: { ...spec, keyFifths: 1, accidentals: "naturals" } })).toBe("Year 8 · Tune walk · G major · position 5");
  });
});
