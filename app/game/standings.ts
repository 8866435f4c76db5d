/** Summaries and standings, derived from the room state only, so a rebuilt room reports the same. */
import type { ServerMessageOf, Summary } from "./messages";
import type { Player, RoomState } from "./room";
import { median } from "~/lib/median";
import { teamScore } from "./scoring";

export const TEAM_NAMES = ["Nut", "Saddle", "Bridge", "Headstock", "Soundhole", "Rosette", "Tuner", "Capo"] as const;

const inRoom = (state: RoomState): Player[] => state.players.filter((p) => !p.removed);

/**
 * Per player: points, answers given, correct (full credit), accuracy = correct ÷ answered, the
 * median reaction time of right-pitch answers (how fast the note is found once read), longest streak.
 */
export function playerSummaries(state: RoomState): Summary[] {
  return inRoom(state).map((p) => {
    const mine = state.answers.filter((a) => a.playerId === p.id);
    const correct = mine.filter((a) => a.verdict === "right").length;
    return {
      playerId: p.id,
      nickname: p.nickname,
      points: p.points,
      answered: mine.length,
      correct,
      accuracy: mine.length === 0 ? 0 : correct / mine.length,
      medianReactionMs: median(mine.filter((a) => a.diagnosis.pitchRight).map((a) => a.reactionMs)),
      longestStreak: p.longestStreak,
    };
  });
}

/** By points (ties share a rank; then longer streak, then join order), by longest streak, and teams by mean points. */
export function standings(state: RoomState, final: boolean): ServerMessageOf<"standings"> {
  const players = inRoom(state);
  const byPoints = [...players].sort((a, b) => b.points - a.points || b.longestStreak - a.longestStreak);
  const byStreak = [...players].sort((a, b) => b.longestStreak - a.longestStreak || b.points - a.points);
  const teamRows = Array.from({ length: state.config.teams?.count ?? 0 }, (_, team) => {
    const members = players.filter((p) => p.team === team);
    return { team, name: TEAM_NAMES[team]!, points: teamScore(members.map((m) => m.points)), members: members.length };
  })
    .filter((t) => t.members > 0)
    .sort((a, b) => b.points - a.points);
  return {
    type: "standings",
    phase: state.phase,
    final,
    points: byPoints.map((p) => ({
      playerId: p.id,
      nickname: p.nickname,
      points: p.points,
      rank: 1 + byPoints.filter((q) => q.points > p.points).length,
      team: p.team,
    })),
    streaks: byStreak.map((p) => ({ playerId: p.id, nickname: p.nickname, longestStreak: p.longestStreak })),
    teams: teamRows,
  };
}
