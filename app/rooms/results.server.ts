import { MISTAKE_LABELS, type MistakeKind } from "~/music/mistakes";
import { playerSummaries } from "~/game/standings";
import type { Db } from "~/db/client.server";
import { loadRoomState } from "./log.server";

export interface PromptResult {
  index: number;
  written: string;
  answered: number;
  right: number;
  kinds: Partial<Record<MistakeKind, number>>;
}

/** A round's results, rebuilt from its log so they match what the class saw on the stage. */
export async function roundResults(db: Db, roomId: string) {
  const loaded = await loadRoomState(db, roomId);
  if (!loaded) return undefined;
  const { state } = loaded;
  const summaries = playerSummaries(state);
  const byPoints = [...summaries].sort((a, b) => b.points - a.points || b.longestStreak - a.longestStreak);
  const byStreak = [...summaries].sort((a, b) => b.longestStreak - a.longestStreak || b.points - a.points);
  const shown = state.run ? state.run.index + 1 : 0;
  const prompts: PromptResult[] = state.config.prompts.slice(0, shown).map((note, index) => {
    const mine = state.answers.filter((a) => a.index === index);
    const kinds: Partial<Record<MistakeKind, number>> = {};
    for (const a of mine) kinds[a.diagnosis.kind] = (kinds[a.diagnosis.kind] ?? 0) + 1;
    return { index, written: note.written, answered: mine.length, right: mine.filter((a) => a.verdict === "right").length, kinds };
  });
  return { phase: state.phase, mode: state.config.mode, tuneName: state.config.tuneName, byPoints, byStreak, prompts, labels: MISTAKE_LABELS };
}
