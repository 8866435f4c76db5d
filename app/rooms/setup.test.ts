import { describe, expect, it } from "vitest";
import { drawnPrompts } from "~/game/roomConfig";
import { demoEditedMap } from "~/demo/reading";
import { validateSpotMap } from "~/music/positions";
import { TUNINGS } from "~/music/tuning";
import { readingPreset } from "~/reading/presets";
import { readingSpecOf } from "~/reading/spec";
import { quickSetupSchema, setupFromSet, withSpotMap } from "./setup";

describe("class home-spot maps in rounds", () => {
  const spec = readingSpecOf(readingPreset("ready-naturals-5")!.spec);
  const prompts = drawnPrompts(spec, 40, 7);

  it("the demo's edited map is valid and moves B4", () => {
    expect(validateSpotMap(demoEditedMap(), TUNINGS.standard)).toEqual([]);
  });

  it("replaces each prompt's home with the class's spot and leaves the rest alone", () => {
    const moved = withSpotMap(prompts, demoEditedMap(), 15);
    expect(prompts.some((p) => p.written === "B4")).toBe(true);
    for (const [i, p] of moved.entries()) {
      if (p.written === "B4") expect(p.home).toMatchObject({ string: 4, fret: 9 });
      else expect(p).toEqual(prompts[i]);
    }
  });

  it("without a map, prompts are unchanged", () => {
    expect(withSpotMap(prompts, undefined, 15)).toBe(prompts);
  });
});

describe("the quick setup is a reading set not saved yet", () => {
  it("a ready-made set makes a valid quick setup for a class", () => {
    const setup = setupFromSet(readingPreset("ready-g-major-5")!.spec, "class-1");
    expect(quickSetupSchema.parse(setup)).toEqual(setup);
  });
});
