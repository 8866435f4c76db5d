// Gradebook CSV: one row per student per round, safe to open in a spreadsheet.
import Papa from "papaparse";
import type { PlayerFigures, RoundInfo } from "./stats";

export const CSV_COLUMNS = ["class", "round", "date", "student", "account", "points", "answers", "correct", "accuracy %", "median time s", "longest streak"] as const;

/**
 * A spreadsheet runs a cell starting with =, +, -, @, tab or CR as a formula (a nickname like
 * "=HYPERLINK(…)" would be a link out of the school's gradebook); papaparse's escapeFormulae prefixes
 * such text cells with ' so they stay text. Numbers are written as numbers.
 */
export function toCsv(rows: readonly (readonly (string | number)[])[]): string {
  return Papa.unparse({ fields: [...CSV_COLUMNS], data: rows.map((r) => [...r]) }, { escapeFormulae: true, newline: "\r\n" });
}

export function gradebookRows(className: string, round: Pick<RoundInfo, "title" | "startedAt">, players: readonly PlayerFigures[]) {
  const date = new Date(round.startedAt).toISOString().slice(0, 10);
  return [...players]
    .sort((a, b) => a.nickname.localeCompare(b.nickname))
    .map((p) => [
      className,
      round.title,
      date,
      p.nickname,
      p.userId ? "yes" : "nickname only",
      p.points,
      p.answered,
      p.correct,
      Math.round(p.accuracy * 100),
      p.medianMs === null ? "" : Number((p.medianMs / 1000).toFixed(2)),
      p.longestStreak,
    ]);
}
