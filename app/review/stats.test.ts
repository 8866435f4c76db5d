import { describe, expect, it } from "vitest";
import { classReview, mistakeShares, mostImproved, noteHeatmap, reteachList, roundPlayers, studentProgress, type AnswerRow, type ReviewInput } from "./stats";

/**
 * Two rounds, worked out by hand.
 * S1 (home spot only ON): Ana, Ben (accounts) and Guest (nickname only).
 * S2 (home spot only OFF, so "other spot" is full credit): Ana and Ben.
 */
const row = (roomId: string, playerId: string, promptIndex: number, written: string, kind: string, reactionMs: number, streak: number, points: number): AnswerRow => ({
  roomId,
  playerId,
  promptIndex,
  written,
  writtenMidi: { C5: 72, D5: 74, "F#4": 66 }[written]!,
  string: 1,
  fret: 5,
  kind,
  pitchRight: kind === "home-spot" || kind === "other-spot",
  // As the rounds' reducer stored it: S2 was played with home spot only off.
  verdict: kind === "home-spot" || (kind === "other-spot" && roomId === "S2") ? "right" : kind === "other-spot" ? "partial" : "wrong",
  points,
  reactionMs,
  streak,
  at: 0,
});

const input: ReviewInput = {
  rounds: [
    { id: "S2", title: "Week 2", startedAt: 2000, live: false, position: 5, tuning: "standard", frets: 15, homes: [{ string: 4, fret: 4 }, { string: 4, fret: 4 }, { string: 2, fret: 3 }, { string: 2, fret: 1 }] },
    { id: "S1", title: "Week 1", startedAt: 1000, live: false, position: 5, tuning: "standard", frets: 15, homes: [{ string: 2, fret: 1 }, { string: 2, fret: 3 }, { string: 4, fret: 4 }, { string: 2, fret: 1 }] },
  ],
  players: [
    { id: "a1", roomId: "S1", userId: "u-ana", nickname: "Ana" },
    { id: "b1", roomId: "S1", userId: "u-ben", nickname: "Ben" },
    { id: "g1", roomId: "S1", userId: null, nickname: "Guest" },
    { id: "a2", roomId: "S2", userId: "u-ana", nickname: "Ana" },
    { id: "b2", roomId: "S2", userId: "u-ben", nickname: "Ben" },
  ],
  answers: [
    // Ana S1: correct = 2 of 4 (other spot is half credit with home only on) → 50 %;
    // right-pitch times 1000, 2000, 1500 → median 1500; streak peaks at 1; points 2000.
    row("S1", "a1", 0, "C5", "home-spot", 1000, 1, 900),
    row("S1", "a1", 1, "D5", "other-spot", 2000, 1, 300),
    row("S1", "a1", 2, "F#4", "key-signature-miss", 3000, 0, 0),
    row("S1", "a1", 3, "C5", "home-spot", 1500, 1, 800),
    // Ben S1: 4 of 4 → 100 %; times 500, 700, 900, 600 → median (600 + 700) / 2 = 650; streak 4; points 4030.
    row("S1", "b1", 0, "C5", "home-spot", 500, 1, 950),
    row("S1", "b1", 1, "D5", "home-spot", 700, 2, 980),
    row("S1", "b1", 2, "F#4", "home-spot", 900, 3, 1000),
    row("S1", "b1", 3, "C5", "home-spot", 600, 4, 1100),
    // Guest S1: 1 of 2, too few answers to be ranked on accuracy or time.
    row("S1", "g1", 0, "C5", "wide-miss", 4000, 0, 0),
    row("S1", "g1", 1, "D5", "home-spot", 2500, 1, 700),
    // Ana S2: other spot counts now → 3 of 4 = 75 %; times 1200, 1000, 800 → median 1000; streak 2; points 2600.
    row("S2", "a2", 0, "F#4", "other-spot", 1200, 1, 800),
    row("S2", "a2", 1, "F#4", "home-spot", 1000, 2, 900),
    row("S2", "a2", 2, "D5", "half-step-off", 2000, 0, 0),
    row("S2", "a2", 3, "C5", "home-spot", 800, 1, 900),
    // Ben S2: stuck on F♯ → 2 of 4 = 50 %; times 900, 700 → median 800; streak 2; points 1900.
    row("S2", "b2", 0, "F#4", "key-signature-miss", 3000, 0, 0),
    row("S2", "b2", 1, "F#4", "key-signature-miss", 2800, 0, 0),
    row("S2", "b2", 2, "D5", "home-spot", 900, 1, 900),
    row("S2", "b2", 3, "C5", "home-spot", 700, 2, 1000),
  ],
};

const pick = <T extends { nickname: string }>(list: T[]) => list.map((p) => p.nickname);

describe("one round", () => {
  it("gives each player points, answers, correct, accuracy, median time and longest streak", () => {
    const s1 = Object.fromEntries(roundPlayers(input, "S1").map((p) => [p.nickname, p]));
    expect(s1.Ana).toMatchObject({ key: "u-ana", points: 2000, answered: 4, correct: 2, accuracy: 0.5, medianMs: 1500, longestStreak: 1 });
    expect(s1.Ben).toMatchObject({ points: 4030, answered: 4, correct: 4, accuracy: 1, medianMs: 650, longestStreak: 4 });
    expect(s1.Guest).toMatchObject({ key: "seat:g1", userId: null, answered: 2, correct: 1, medianMs: 2500 });
    const s2 = Object.fromEntries(roundPlayers(input, "S2").map((p) => [p.nickname, p]));
    expect(s2.Ana).toMatchObject({ correct: 3, accuracy: 0.75, medianMs: 1000, longestStreak: 2, points: 2600 });
    expect(s2.Ben).toMatchObject({ correct: 2, accuracy: 0.5, medianMs: 800, longestStreak: 2, points: 1900 });
  });

  it("ranks everyone who played by points, but only players with enough answers by accuracy and time", () => {
    const r = classReview(input, "S1");
    expect(pick(r.leaderboards.points)).toEqual(["Ben", "Ana", "Guest"]);
    expect(pick(r.leaderboards.accuracy)).toEqual(["Ben", "Ana"]);
    expect(pick(r.leaderboards.speed)).toEqual(["Ben", "Ana"]);
  });

  it("merges two seats of one account in a round (a rejoin from another phone)", () => {
    const rejoined: ReviewInput = {
      ...input,
      players: [...input.players, { id: "a1b", roomId: "S1", userId: "u-ana", nickname: "Ana" }],
      answers: [...input.answers, row("S1", "a1b", 4, "C5", "home-spot", 900, 2, 950)],
    };
    const ana = roundPlayers(rejoined, "S1").filter((p) => p.nickname === "Ana");
    expect(ana).toHaveLength(1);
    expect(ana[0]).toMatchObject({ answered: 5, correct: 3, longestStreak: 2 });
  });
});

describe("across rounds", () => {
  const r = classReview(input);

  it("links students by account and leaves nickname-only seats out", () => {
    // Ana: 5 of 8 = 62.5 %; times 800,1000,1000,1200,1500,2000 → median 1100; points 4600.
    // Ben: 6 of 8 = 75 %; times 500,600,700,700,900,900 → median 700; points 5930; streak 4.
    const byName = Object.fromEntries(r.leaderboards.points.map((p) => [p.nickname, p]));
    expect(Object.keys(byName).sort()).toEqual(["Ana", "Ben"]);
    expect(byName.Ana).toMatchObject({ accuracy: 0.625, medianMs: 1100, points: 4600, longestStreak: 2 });
    expect(byName.Ben).toMatchObject({ accuracy: 0.75, medianMs: 700, points: 5930, longestStreak: 4 });
    expect(pick(r.leaderboards.streak)).toEqual(["Ben", "Ana"]);
    expect(pick(r.leaderboards.speed)).toEqual(["Ben", "Ana"]);
  });

  it("lists rounds newest first with their size", () => {
    expect(r.rounds.map((s) => [s.id, s.players, s.answers])).toEqual([
      ["S2", 2, 8],
      ["S1", 3, 10],
    ]);
  });

  it("most improved: accuracy now minus accuracy in the previous round, only those who rose", () => {
    // Ana 75 % − 50 % = +25 points; Ben 50 % − 100 % = −50 points, a drop: not listed.
    expect(mostImproved(input, "S2").map((m) => [m.nickname, m.delta, m.previousRoundId])).toEqual([["Ana", 0.25, "S1"]]);
    expect(mostImproved(input, "S1")).toEqual([]);
    // Across rounds it is about the latest round.
    expect(r.mostImproved.map((m) => m.nickname)).toEqual(["Ana"]);
    // The same accuracy twice is no change either: S1 played again, answer for answer, a week earlier as S0.
    const s1 = input.rounds.find((x) => x.id === "S1")!;
    const again = <T extends { roomId: string }>(rows: T[]) => rows.filter((x) => x.roomId === "S1").flatMap((x) => [x, { ...x, roomId: "S0" }]);
    const twice: ReviewInput = {
      rounds: [s1, { ...s1, id: "S0", startedAt: 500 }],
      players: again(input.players).map((p) => ({ ...p, id: `${p.roomId}-${p.id}` })),
      answers: again(input.answers).map((a) => ({ ...a, playerId: `${a.roomId}-${a.playerId}` })),
    };
    expect(mostImproved(twice, "S1")).toEqual([]);
  });

  it("builds the note heatmap with every answer, each round scored by its own rule", () => {
    // C5: 7 answers, 6 right (Guest's wide miss); right-pitch times 500,600,700,800,1000,1500 → 750.
    // D5: 5 answers, 3 right (Ana's other spot in S1 is half credit; her half step in S2 is wrong); times 700,900,2000,2500 → 1450.
    // F♯4: 6 answers, 3 right (Ana's other spot in S2 is full credit); times 900,1000,1200 → 1000.
    expect(r.heatmap.map((c) => [c.written, c.answers, c.correct, c.medianMs])).toEqual([
      ["F#4", 6, 3, 1000],
      ["C5", 7, 6, 750],
      ["D5", 5, 3, 1450],
    ]);
    expect(r.heatmap[0]!.home).toEqual({ string: 4, fret: 4 });
    expect(r.heatmap[0]!.kinds).toEqual({ "home-spot": 2, "other-spot": 1, "key-signature-miss": 3 });
  });

  it("shares each mistake kind among the 18 answers", () => {
    const share = Object.fromEntries(r.mistakes.map((m) => [m.kind, m.count]));
    expect(share).toMatchObject({ "home-spot": 11, "other-spot": 2, "key-signature-miss": 3, "half-step-off": 1, "wide-miss": 1, "octave-off": 0 });
    expect(r.mistakes.reduce((s, m) => s + m.share, 0)).toBeCloseTo(1);
    expect(mistakeShares([])).toHaveLength(8);
  });

  it("reteach: below 80 % lowest first, then the slowest of the rest", () => {
    // F♯4 50 % and D5 60 % are below the bar; C5 (86 %) fills in as the slowest remaining.
    expect(r.reteach.map((n) => [n.written, n.reason])).toEqual([
      ["F#4", "not read yet"],
      ["D5", "not read yet"],
      ["C5", "slow to find"],
    ]);
    expect(r.reteach[0]!.commonMistake).toBe("key-signature-miss");
    // Too few answers (fewer than 5 for a note) → nothing judged.
    expect(reteachList(noteHeatmap(input, input.answers.filter((a) => a.roomId === "S2")))).toEqual([]);
  });
});

describe("one student", () => {
  it("shows progress per round and personal bests", () => {
    const ana = studentProgress(input, "u-ana");
    expect(ana.rounds.map((s) => [s.roundId, s.accuracy, s.medianMs])).toEqual([
      ["S1", 0.5, 1500],
      ["S2", 0.75, 1000],
    ]);
    expect(ana.bests).toEqual({
      points: { value: 2600, roundId: "S2" },
      streak: { value: 2, roundId: "S2" },
      accuracy: { value: 0.75, roundId: "S2" },
      speed: { value: 1000, roundId: "S2" },
    });
    const ben = studentProgress(input, "u-ben");
    expect(ben.bests.speed).toEqual({ value: 650, roundId: "S1" });
    expect(ben.bests.points).toEqual({ value: 4030, roundId: "S1" });
    expect(ben.heatmap.find((c) => c.written === "F#4")).toMatchObject({ answers: 3, correct: 1 });
  });
});
