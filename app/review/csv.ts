// Gradebook CSV: one row per student per round, safe to open in a spreadsheet.
import Papa from "papaparse";
import type { PlayerFigures, RoundInfo } from "./stats";

export const CSV_COLUMNS = ["class", "round", "date", "student", "account", "points", "answers", "correct", "accuracy %", "median time s", "longest streak"] as const;

// The start of the cell and of every line in it, when a formula character follows.
const FORMULA_LINE = /(?<=^|[\r\n])(?=[=+\-@\t\r])/g;

/**
 * A spreadsheet runs a cell starting with =, +, -, @, tab or CR as a formula (a nickname like
 * "=HYPERLINK(…)" would be a link out of the school's gradebook). Such a text cell gets a ' in
 * front, which keeps it text. A cell with line breaks gets one in front of every line that starts
 * so too, because some importers and a paste of the cell split it into one cell per line.
 * Numbers are written as numbers.
 */
export function neutraliseCell(cell: string | number): string | number {
  return typeof cell === "string" ? cell.replace(FORMULA_LINE, "'") : cell;
}

export function toCsv(rows: readonly (readonly (string | number)[])[]): string {
  return Papa.unparse({ fields: [...CSV_COLUMNS], data: rows.map((r) => r.map(neutraliseCell)) }, { newline: "\r\n" });
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
