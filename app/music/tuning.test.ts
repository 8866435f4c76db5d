import { describe, expect, it } from "vitest";
import { MusicError } from "./pitch";
import { checkFrets, MAX_FRETS, MIN_FRETS, resolveTuning, TUNINGS } from "./tuning";

describe("TUNINGS", () => {
  it.each([
    // Open-string MIDI numbers, string 1 first (MIDI 1.0 numbering: E4 = 64, E2 = 40).
    ["standard", [64, 59, 55, 50, 45, 40]], // E2 A2 D3 G3 B3 E4: common practice, no source
    ["drop-d", [64, 59, 55, 50, 45, 38]], // D2 A2 D3 G3 B3 E4: common practice, no source
    ["dadgad", [62, 57, 55, 50, 45, 38]], // D2 A2 D3 G3 A3 D4: common practice, no source
    ["open-g", [62, 59, 55, 50, 43, 38]], // D2 G2 D3 G3 B3 D4: common practice, no source
    ["seven-string", [64, 59, 55, 50, 45, 40, 35]], // B1 below standard: common practice, no source
  ] as const)("%s", (id, strings) => {
    expect(TUNINGS[id].strings).toEqual(strings);
    expect(TUNINGS[id].id).toBe(id);
    expect(resolveTuning(id)).toBe(TUNINGS[id]);
  });
});

describe("resolveTuning", () => {
  it("reads custom notes low to high and numbers string 1 as the highest", () => {
    const t = resolveTuning("C2, G2 D3 G3 B3 E4");
    expect(t.strings).toEqual([64, 59, 55, 50, 43, 36]);
    expect(t.id).toBe("C2 G2 D3 G3 B3 E4");
    expect(resolveTuning(t.id).strings).toEqual(t.strings);
    expect(resolveTuning("E♭2 A♭2 D♭3 G♭3 B♭3 E♭4").strings).toEqual([63, 58, 54, 49, 44, 39]);
    expect(resolveTuning(" Standard ")).toBe(TUNINGS.standard);
  });

  it.each([
    ["", /Choose a tuning/],
    ["baritone", /Unknown tuning "baritone": use standard, drop-d/],
    ["E4 B3 G3 D3 A2 E2", /B3 is lower than E4; list the notes from the lowest string/],
    ["E2 A2 D3", /needs 4 to 10 notes/],
    ["E2 A2 D3 H3 B3 E4", /Tuning note 4 .*must start with a letter A to G/],
    ["E2 A2 D3 G3 B3 G4", /B3 to G4 is 8 half steps.*at most a fifth/],
  ])("rejects %j", (text, message) => {
    expect(() => resolveTuning(text)).toThrow(MusicError);
    expect(() => resolveTuning(text)).toThrow(message);
  });
});

describe("checkFrets", () => {
  it.each([MIN_FRETS, 19, MAX_FRETS])("accepts %i", (frets) => expect(checkFrets(frets)).toBe(frets));
  it.each([11, 25, 12.5, Number.NaN])("rejects %d", (frets) => {
    expect(() => checkFrets(frets)).toThrow(/from 12 to 24/);
  });
});
