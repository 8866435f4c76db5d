import { describe, expect, it } from "vitest";
import { READING_PRESETS } from "~/reading/presets";
import { classReady, readsStep, stepOfRound, stepTargetMs, type RoundReading, type StepFigures } from "./ready";

const TARGET = stepTargetMs(10_000); // 5 s
const fig = (answers: number, homeSpots: number, medianMs: number | null): StepFigures => ({ answers, homeSpots, medianMs });
const reader = fig(20, 19, 2_000);
const slow = fig(20, 20, 5_000);
const misses = fig(20, 17, 1_500);

describe("reads the current step", () => {
  it.each<[string, StepFigures | undefined, string]>([
    ["no answers", undefined, "too few answers"],
    ["9 answers, all right and quick", fig(9, 9, 1_000), "too few answers"],
    ["10 answers, 9 home spots, quick", fig(10, 9, 4_999), "reads it"],
    ["95 % home spots, 2 s", reader, "reads it"],
    ["85 % home spots", misses, "working on it"],
    ["all home spots, median exactly at the target", slow, "working on it"],
    ["home spots but no right-pitch time", fig(12, 12, null), "working on it"],
  ])("%s → %s", (_, f, expected) => expect(readsStep(f, TARGET)).toBe(expected));
});

describe("the class is ready for the next step", () => {
  it.each<[string, (StepFigures | undefined)[], boolean, number]>([
    ["an empty class", [], false, 0],
    ["4 of 5 read it (80 %)", [reader, reader, reader, reader, slow], true, 4],
    ["3 of 5 read it", [reader, reader, reader, misses, slow], false, 3],
    ["8 of 10, two who never played", [...Array(8).fill(reader), undefined, undefined], true, 8],
    ["7 of 10", [...Array(7).fill(reader), undefined, misses, slow], false, 7],
    ["1 of 1", [reader], true, 1],
    ["3 of 4 (75 %)", [reader, reader, reader, undefined], false, 3],
  ])("%s", (_, students, ready, readers) => {
    expect(classReady(students, TARGET)).toMatchObject({ ready, readers, students: students.length });
  });

  it("asks for 80 % of the roster, rounded up", () => {
    expect(classReady(Array(4).fill(reader), TARGET).needed).toBe(4);
    expect(classReady(Array(10).fill(reader), TARGET).needed).toBe(8);
    expect(classReady(Array(11).fill(reader), TARGET).needed).toBe(9);
  });
});

describe("the step a round read", () => {
  const step = (r: Partial<RoundReading>) => stepOfRound({ position: 5, keyFifths: 0, chromatic: false, ledger: false, ...r }, READING_PRESETS)?.step;
  it.each<[string, Partial<RoundReading>, number | undefined]>([
    ["naturals in fifth position", {}, 1],
    ["G major", { keyFifths: 1 }, 2],
    ["F major", { keyFifths: -1 }, 3],
    ["accidentals", { chromatic: true }, 4],
    ["naturals with ledger lines", { ledger: true }, 5],
    ["second position", { position: 2, ledger: true }, 6],
    ["D major: outside the progression", { keyFifths: 2 }, undefined],
  ])("%s → step %s", (_, r, expected) => expect(step(r)).toBe(expected));
});
