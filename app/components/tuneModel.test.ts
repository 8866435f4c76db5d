import { beforeAll, describe, expect, it, vi } from "vitest";
import type { StaveNote } from "vexflow/bravura";
import { BUILTIN_TUNES, type Tune } from "~/tunes/builtin";
import { engraveTune, tieEnds } from "~/tunes/engraving";
import { ASKED_COLOUR, buildBar } from "./tuneModel";

// VexFlow's model is checked here without a page: which glyphs each note carries, its duration, beams and tuplets.
beforeAll(() => {
  // Without a canvas VexFlow warns for every text measurement; glyph metrics come from the font tables regardless.
  vi.spyOn(console, "warn").mockImplementation(() => undefined);
  // A dot parses its CSS font through a <span>, text is measured on a <canvas>: bare stand-ins suffice for the model.
  vi.stubGlobal("document", { createElement: () => ({ style: {}, getContext: () => null }) });
});

/** A tune given bar by bar as "pitch:quarters" ("r" for a rest), meter beats/beatType, read as an upload's stored score. */
function tune(beats: number, beatType: number, bars: string[]): Tune {
  const full = (beats * 4) / beatType;
  let onset = 0;
  const notes = bars.flatMap((bar, i) =>
    bar.split(" ").flatMap((token) => {
      const [pitch, length] = token.split(":");
      const at = onset;
      onset += Number(length);
      return pitch === "r" ? [] : [{ pitch: pitch!, beats: Number(length), bar: i + 1, onset: at }];
    }),
  );
  const measures = bars.map((_, i) => ({ number: String(i + 1), start: i * full, length: full, beats, beatType, keyFifths: 0, pickup: false }));
  const leftOut = { graceNotes: 0, cueNotes: 0, chordNotes: 0, lowerVoiceNotes: 0, otherParts: [] };
  return { id: "t", title: "t", composer: "", keyFifths: 0, beatsPerBar: full, notes, score: { partId: "P1", part: "", parts: [], measures, leftOut } };
}

const signs = (note: StaveNote) => note.getModifiersByType("Accidental").map((m) => (m as unknown as { type: string }).type);
const durations = (notes: StaveNote[]) => notes.map((n) => `${n.getDuration()}${n.isRest() ? "r" : ""}${".".repeat(n.getModifiersByType("Dot").length)}`);

describe("VexFlow model of an engraved bar", () => {
  it("puts the natural on the second C of a bar with C♯ then C", () => {
    const built = buildBar(engraveTune(tune(4, 4, ["C#5:1 C5:1 C5:2"]))[0]!, null);
    expect(built.notes.map(signs)).toEqual([["#"], ["n"], []]);
  });

  it("carries dotted values, rests and triplets with their real length", () => {
    const third = 1 / 3;
    const built = buildBar(engraveTune(tune(5, 4, [`E5:1.5 D5:0.5 r:1 C5:${third} D5:${third} E5:${third} G5:${2 * third} A5:${third}`]))[0]!, null);
    expect(durations(built.notes)).toEqual(["q.", "8", "qr", "8", "8", "8", "q", "8"]);
    // Three triplet eighths, then a triplet quarter and eighth: two brackets of one beat each.
    expect(built.tuplets.map((t) => t.getNotes().length)).toEqual([3, 2]);
    // VexFlow's ticks (a triplet member takes ⅔ of its value) fill the 5/4 bar exactly as the layout wrote it.
    expect(built.voice.getTicksUsed().value()).toBe(built.voice.getTotalTicks().value());
  });

  it("beams six eighths in two groups of three in 6/8 and three groups of two in 3/4", () => {
    const line = "C5:0.5 D5:0.5 E5:0.5 F5:0.5 G5:0.5 A5:0.5";
    const beamed = (beats: number, beatType: number) => buildBar(engraveTune(tune(beats, beatType, [line]))[0]!, null).beams.map((b) => b.getNotes().length);
    expect(beamed(6, 8)).toEqual([3, 3]);
    expect(beamed(3, 4)).toEqual([2, 2, 2]);
  });

  it("ties a note over the bar line, and marks the note being asked in every piece of it", () => {
    // A4 starts on beat 3 of bar 1 and lasts two beats: a quarter tied over the bar line to a quarter.
    const bars = engraveTune(tune(3, 4, ["G4:2 A4:2", "B4:2"]));
    expect(tieEnds(bars)).toEqual([{ from: [0, 1], to: [1, 0] }]);
    const built = bars.map((b) => buildBar(b, 1));
    expect(durations(built[1]!.notes)).toEqual(["q", "h"]);
    expect(built.flatMap((b) => b.asked)).toHaveLength(2);
    expect(built[0]!.asked[0]!.getStyle()?.fillStyle).toBe(ASKED_COLOUR);
    expect(built[0]!.notes[0]!.getStyle()?.fillStyle).toBeUndefined();
  });

  it("builds every bar of the built-in tunes", () => {
    for (const t of BUILTIN_TUNES) {
      for (const bar of engraveTune(t)) expect(buildBar(bar, null).notes.length).toBe(bar.events.length);
    }
  });
});
