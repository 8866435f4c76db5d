import { describe, expect, it } from "vitest";
import { drawnBar } from "./bars";

const note = (pitch: string, bar: number) => ({ pitch, beats: 1, bar });
const measure = (keyFifths: number) => ({ number: "", start: 0, length: 4, beats: 4, beatType: 4, keyFifths, pickup: false });

describe("drawnBar", () => {
  // Common practice, no source: a sign holds to the bar line; a natural is drawn where the earlier sign would apply.
  const tune = { keyFifths: 0, notes: [note("C#5", 1), note("C5", 1), note("C5", 2), note("F#5", 3), note("F5", 3)] };

  it("draws C♯ then C♮ in one bar with the natural, and a courtesy natural after the bar line", () => {
    expect(drawnBar(tune, 1).notes).toEqual([
      { written: "C#5", accidental: "sharp" },
      { written: "C5", accidental: "natural" },
    ]);
    expect(drawnBar(tune, 2).notes).toEqual([{ written: "C5", accidental: "natural" }]);
  });

  it("uses each bar's own key from a stored score", () => {
    const changing = { ...tune, score: { partId: "P1", part: "", parts: [], leftOut: { graceNotes: 0, cueNotes: 0, chordNotes: 0, lowerVoiceNotes: 0, otherParts: [] }, measures: [measure(0), measure(0), measure(1)] } };
    // Bar 3 is in G: F♯ needs no sign, F♮ does.
    expect(drawnBar(changing, 3)).toEqual({
      bar: 3,
      keyFifths: 1,
      notes: [
        { written: "F#5", accidental: null },
        { written: "F5", accidental: "natural" },
      ],
    });
  });
});
