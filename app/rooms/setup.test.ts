import { describe, expect, it } from "vitest";
import { readingPreset } from "~/reading/presets";
import { parseReadingSet, readingSetSpecSchema } from "~/reading/spec";
import { quickSetupSchema, setupFromSet } from "./setup";

describe("the quick setup is a reading set not saved yet", () => {
  it("a ready-made set makes a valid quick setup for a class, with the set's spec and pool", () => {
    const set = parseReadingSet(readingSetSpecSchema, readingPreset("ready-g-major-5")!.spec);
    if (!set.ok) throw new Error("the ready-made set parses");
    const setup = setupFromSet(set, "class-1");
    expect(parseReadingSet(quickSetupSchema, setup.set)).toEqual({ ok: true, ...setup });
  });
});
