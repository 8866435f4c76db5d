import type { Db } from "~/db/client.server";
import { MISTAKE_LABELS } from "~/music/mistakes";
import { reviewInput } from "~/review/review.server";
import { leaderboards, promptResults, roundPlayers } from "~/review/stats";
import { loadRoomState } from "./log.server";

/**
 * A round's results. The figures come from the stored answer rows, as in the class review, the export
 * and the API; the log only says how far the round got and who the host removed (left off the boards, as on the stage).
 */
export async function roundResults(db: Db, roomId: string) {
  const loaded = await loadRoomState(db, roomId);
  if (!loaded) return undefined;
  const { state } = loaded;
  const removed = new Set(state.players.filter((p) => p.removed).map((p) => p.id));
  const input = await reviewInput(db, { roomId });
  const boards = leaderboards(roundPlayers({ ...input, players: input.players.filter((p) => !removed.has(p.id)) }, roomId));
  const shown = state.run ? state.run.index + 1 : 0;
  return {
    phase: state.phase,
    mode: state.config.mode,
    tuneName: state.config.tuneName,
    byPoints: boards.points,
    byStreak: boards.streak,
    prompts: promptResults(input, roomId, state.config.prompts.slice(0, shown)),
    labels: MISTAKE_LABELS,
  };
}
