import { describe, expect, it } from "vitest";
import type { ReadingSpec } from "~/music/pools";
import { RoomConfigError, ROOM_DEFAULTS, drawnPrompts, roomConfig, tunePrompts } from "./roomConfig";

const SPEC: ReadingSpec = { position: 5, tuning: "standard", frets: 15, reading: "guitar", keyFifths: 0, accidentals: "naturals", ledgerLines: false };
const G_MAJOR: ReadingSpec = { ...SPEC, keyFifths: 1, accidentals: "key" };
const prompts = drawnPrompts(SPEC, 4, 1);

describe("roomConfig", () => {
  it("fills in defaults and takes the neck from the reading set", () => {
    const config = roomConfig(SPEC, { code: "KMNPRT", mode: "sprint" }, prompts);
    expect(config).toMatchObject({ ...ROOM_DEFAULTS, tuning: "standard", frets: 15, reading: "guitar", tuneName: null, teams: null });
    expect(config.prompts).toHaveLength(4);
  });

  it.each<[string, Parameters<typeof roomConfig>[1], number, RegExp]>([
    ["no prompts", { code: "KMNPRT", mode: "sprint" }, 0, /1 to 200 prompts, not 0/],
    ["answer time too short", { code: "KMNPRT", mode: "sprint", answerMs: 1_000 }, 4, /3–60 s/],
    ["answer time too long", { code: "KMNPRT", mode: "sprint", answerMs: 120_000 }, 4, /3–60 s/],
    ["Tune walk without a name", { code: "KMNPRT", mode: "tune-walk" }, 4, /tune's name/],
    ["Teams without teams", { code: "KMNPRT", mode: "teams" }, 4, /2 to 8 teams/],
    ["one team", { code: "KMNPRT", mode: "teams", teams: { count: 1, balance: "round-robin" } }, 4, /2 to 8 teams/],
    ["teams outside Teams", { code: "KMNPRT", mode: "sprint", teams: { count: 2, balance: "round-robin" } }, 4, /only be set for the Teams mode/],
  ])("refuses %s", (_, settings, count, message) => {
    expect(() => roomConfig(SPEC, settings, prompts.slice(0, count))).toThrow(RoomConfigError);
    expect(() => roomConfig(SPEC, settings, prompts.slice(0, count))).toThrow(message);
  });
});

describe("drawnPrompts", () => {
  it("is repeatable for a seed and carries the key signature", () => {
    expect(drawnPrompts(G_MAJOR, 10, 5)).toEqual(drawnPrompts(G_MAJOR, 10, 5));
    expect(drawnPrompts(G_MAJOR, 10, 5).every((n) => n.keyFifths === 1)).toBe(true);
  });
});

describe("tunePrompts", () => {
  // Key-signature rules: common practice, no source.
  it.each<[ReadingSpec, string, string, "sharp" | "flat" | "natural" | null]>([
    [G_MAJOR, "F#5", "F#5", null], // the signature already sharpens F
    [G_MAJOR, "F5", "F5", "natural"],
    [G_MAJOR, "C#5", "C#5", "sharp"],
    [SPEC, "Bb4", "Bb4", "flat"],
    [SPEC, "A4", "A4", null],
  ])("in %#: %s is written %s with printed accidental %s", (spec, text, written, printed) => {
    const [note] = tunePrompts(spec, [text]);
    expect(note).toMatchObject({ written, printedAccidental: printed, keyFifths: spec.keyFifths });
  });

  it("keeps the tune's order and spelling, with home spots from the position", () => {
    const notes = tunePrompts(SPEC, ["A4", "A#4", "Bb4", "A4"]);
    expect(notes.map((n) => n.written)).toEqual(["A4", "A#4", "Bb4", "A4"]);
    expect(notes[1]!.home).toEqual(notes[2]!.home); // enharmonic: same fret
  });

  it.each([
    ["C3", /Note 1 \(C3\) is out of reach in position 5/],
    ["F##5", /double sharps and flats/],
  ])("refuses %s clearly", (text, message) => {
    expect(() => tunePrompts(SPEC, [text])).toThrow(message);
  });
});
