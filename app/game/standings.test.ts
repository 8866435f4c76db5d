import { describe, expect, it } from "vitest";
import type { Answer, Player, RoomState } from "./room";
import { playerSummaries, standings } from "./standings";

const player = (id: string, points: number, longestStreak: number, team: number | null = null, removed = false): Player => ({
  id, nickname: `Kid ${id}`, seatToken: `seat-${id}`, online: true, removed, team, points, streak: 0, longestStreak,
});

const answer = (playerId: string, reactionMs: number, verdict: Answer["verdict"]): Answer => ({
  playerId, promptId: "p1", index: 0, spot: { string: 1, fret: 5 }, tapAt: 0, at: 0, reactionMs, verdict, points: 0, streak: 0, found: null,
  diagnosis: { kind: verdict === "wrong" ? "half-step-off" : verdict === "right" ? "home-spot" : "other-spot", pitchRight: verdict !== "wrong", correct: verdict === "right", semitones: verdict === "wrong" ? 1 : 0, message: "" },
});

function state(players: Player[], answers: Answer[] = [], teams: number | null = null): RoomState {
  return {
    config: { teams: teams === null ? null : { count: teams, balance: "round-robin" } } as RoomState["config"],
    phase: "reveal", locked: false, players, answers, run: null, phaseSince: 0, paused: null, ended: null,
  };
}

describe("playerSummaries", () => {
  it.each<[string, Answer[], { answered: number; correct: number; accuracy: number; medianReactionMs: number | null }]>([
    ["no answers", [], { answered: 0, correct: 0, accuracy: 0, medianReactionMs: null }],
    ["odd count", [answer("a", 900, "right"), answer("a", 300, "right"), answer("a", 600, "right")], { answered: 3, correct: 3, accuracy: 1, medianReactionMs: 600 }],
    ["even count", [answer("a", 900, "right"), answer("a", 300, "right")], { answered: 2, correct: 2, accuracy: 1, medianReactionMs: 600 }],
    ["misses count against accuracy, not the median", [answer("a", 500, "right"), answer("a", 50, "wrong")], { answered: 2, correct: 1, accuracy: 0.5, medianReactionMs: 500 }],
    ["partial is right pitch but not correct", [answer("a", 400, "partial"), answer("a", 800, "right")], { answered: 2, correct: 1, accuracy: 0.5, medianReactionMs: 600 }],
  ])("%s", (_, answers, expected) => {
    expect(playerSummaries(state([player("a", 0, 0)], answers))[0]).toMatchObject(expected);
  });

  it("leaves removed players out", () => {
    expect(playerSummaries(state([player("a", 0, 0), player("b", 0, 0, null, true)])).map((s) => s.playerId)).toEqual(["a"]);
  });
});

describe("standings", () => {
  it("ranks by points (ties share a rank, longer streak first), and separately by longest streak", () => {
    const s = standings(state([player("a", 900, 1), player("b", 1500, 2), player("c", 900, 4), player("d", 200, 3)]), false);
    expect(s.points.map((r) => [r.playerId, r.rank])).toEqual([["b", 1], ["c", 2], ["a", 2], ["d", 4]]);
    expect(s.streaks.map((r) => r.playerId)).toEqual(["c", "d", "b", "a"]);
    expect(s.teams).toEqual([]);
  });

  it("scores teams by the mean of their members and hides empty teams", () => {
    const s = standings(state([player("a", 1000, 0, 0), player("b", 0, 0, 0), player("c", 700, 0, 1), player("x", 5000, 0, 1, true)], [], 3), true);
    expect(s.teams).toEqual([
      { team: 1, name: "Saddle", points: 700, members: 1 },
      { team: 0, name: "Nut", points: 500, members: 2 },
    ]);
    expect(s.final).toBe(true);
  });
});
