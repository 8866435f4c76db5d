import { describe, expect, it } from "vitest";
import type { MistakeKind } from "~/music/mistakes";
import { scoreAnswer, scoreFind, speedBonus, streakBonus, teamScore, verdictOf, type Verdict } from "./scoring";

const T = 10_000;

describe("speedBonus", () => {
  it.each([
    [0, 500],
    [-50, 500], // a tap stamped before the note appeared counts as instant, never more
    [1_000, 450],
    [2_500, 375],
    [5_000, 250],
    [9_999, 0],
    [10_000, 0],
    [12_000, 0],
  ])("r = %i ms of 10 s → %i", (r, bonus) => {
    expect(speedBonus(r, T)).toBe(bonus);
  });
});

describe("streakBonus", () => {
  it.each([
    [0, 0],
    [1, 50],
    [4, 200],
    [5, 250],
    [6, 250],
    [40, 250],
  ])("%i already in the streak → +%i", (before, bonus) => {
    expect(streakBonus(before)).toBe(bonus);
  });
});

describe("scoreAnswer", () => {
  it.each<[Verdict, number, number, number, number]>([
    // verdict, reaction ms, streak before, points, streak after
    ["right", 0, 0, 1000, 1],
    ["right", 0, 5, 1250, 6],
    ["right", 0, 9, 1250, 10],
    ["right", 2_500, 2, 500 + 375 + 100, 3],
    ["right", 10_000, 0, 500, 1],
    ["partial", 0, 3, 500, 3],
    ["partial", 2_500, 3, 438, 3], // (500 + 375) / 2 = 437.5 → 438
    ["partial", 10_000, 0, 250, 0],
    ["wrong", 0, 7, 0, 0],
    ["wrong", 9_000, 0, 0, 0],
  ])("%s at %i ms with streak %i → %i points, streak %i", (verdict, reactionMs, streakBefore, points, streak) => {
    const score = scoreAnswer({ verdict, reactionMs, answerMs: T, streakBefore });
    expect(score.points).toBe(points);
    expect(score.streak).toBe(streak);
    expect(score.points).toBe(verdict === "wrong" ? 0 : verdict === "right" ? 500 + score.speedBonus + score.streakBonus : Math.round((500 + score.speedBonus) / 2));
  });
});

describe("verdictOf", () => {
  it.each<[MistakeKind, boolean, boolean, Verdict]>([
    ["home-spot", true, true, "right"],
    ["home-spot", true, false, "right"],
    ["other-spot", true, true, "partial"],
    ["other-spot", true, false, "right"],
    ["octave-off", false, true, "wrong"],
    ["key-signature-miss", false, false, "wrong"],
    ["accidental-miss", false, true, "wrong"],
    ["half-step-off", false, true, "wrong"],
    ["string-over", false, true, "wrong"],
    ["wide-miss", false, false, "wrong"],
  ])("%s (pitch right %s, home only %s) → %s", (kind, pitchRight, homeOnly, verdict) => {
    expect(verdictOf({ kind, pitchRight }, homeOnly)).toBe(verdict);
  });
});

describe("scoreFind and teamScore", () => {
  it.each([
    [0, 1000],
    [5_000, 750],
    [10_000, 500],
  ])("Full neck find at %i ms → %i", (r, points) => {
    expect(scoreFind(r, T)).toBe(points);
  });

  it.each<[number[], number]>([
    [[], 0],
    [[1000], 1000],
    [[1000, 0], 500],
    [[1000, 500, 250], 583],
  ])("team of %j → %i", (points, score) => {
    expect(teamScore(points)).toBe(score);
  });
});
