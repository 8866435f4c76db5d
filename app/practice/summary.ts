/**
 * A student's own practice figures for their home page, pure:
 * - **Day streak**: consecutive local days with at least one practice answer or rhythm pass. A streak still
 *   counts through yesterday until today is over ("practise today to keep it"); a whole day without practice
 *   ends it. Days are the student's own: `tzOffsetMinutes` is the browser's getTimezoneOffset() (UTC − local).
 * - **Sessions**: answers of the same material with no gap over SESSION_GAP_MS belong to one session.
 * - **Per note**: the class review's note cells (app/review/stats.ts), counting the home spot as correct, which
 *   is what solo practice drills.
 */
import { median } from "~/lib/median";
import type { Spot } from "~/music/fretboard";
import type { MistakeKind } from "~/music/mistakes";
import type { NoteCell } from "~/review/stats";

const DAY_MS = 86_400_000;
export const SESSION_GAP_MS = 30 * 60_000;

export const localDay = (at: number, tzOffsetMinutes: number) => Math.floor((at - tzOffsetMinutes * 60_000) / DAY_MS);

export interface Streak {
  days: number;
  practisedToday: boolean;
}

export function dayStreak(times: readonly number[], now: number, tzOffsetMinutes: number): Streak {
  const days = new Set(times.map((t) => localDay(t, tzOffsetMinutes)));
  const today = localDay(now, tzOffsetMinutes);
  const practisedToday = days.has(today);
  let day = practisedToday ? today : today - 1;
  let count = 0;
  while (days.has(day)) {
    count++;
    day--;
  }
  return { days: count, practisedToday };
}

export interface AnswerSummaryRow {
  source: string;
  written: string;
  writtenMidi: number;
  kind: string;
  pitchRight: boolean;
  reactionMs: number;
  at: number;
}

export interface SessionSummary {
  source: string;
  start: number;
  end: number;
  answers: number;
  homeSpots: number;
  /** Median time of the right-pitch answers. */
  medianMs: number | null;
}

/** Sessions, newest first. */
export function sessionsOf(rows: readonly AnswerSummaryRow[]): SessionSummary[] {
  const ordered = [...rows].sort((a, b) => a.at - b.at);
  const groups: AnswerSummaryRow[][] = [];
  for (const row of ordered) {
    const current = groups.at(-1);
    const last = current?.at(-1);
    if (current && last && last.source === row.source && row.at - last.at <= SESSION_GAP_MS) current.push(row);
    else groups.push([row]);
  }
  return groups
    .map((g) => ({
      source: g[0]!.source,
      start: g[0]!.at,
      end: g.at(-1)!.at,
      answers: g.length,
      homeSpots: g.filter((r) => r.kind === "home-spot").length,
      medianMs: median(g.filter((r) => r.pitchRight).map((r) => r.reactionMs)),
    }))
    .reverse();
}

/** Per written pitch (as spelt), low to high, with the home spot `homeOf` gives for the practised position. */
export function noteCells(rows: readonly AnswerSummaryRow[], homeOf: (writtenMidi: number) => Spot | null): NoteCell[] {
  const groups = new Map<string, AnswerSummaryRow[]>();
  for (const r of rows) groups.set(r.written, [...(groups.get(r.written) ?? []), r]);
  return [...groups]
    .map(([written, list]): NoteCell => {
      const correct = list.filter((r) => r.kind === "home-spot").length;
      const kinds: NoteCell["kinds"] = {};
      for (const r of list) kinds[r.kind as MistakeKind] = (kinds[r.kind as MistakeKind] ?? 0) + 1;
      return {
        written,
        writtenMidi: list[0]!.writtenMidi,
        home: homeOf(list[0]!.writtenMidi),
        answers: list.length,
        correct,
        accuracy: correct / list.length,
        medianMs: median(list.filter((r) => r.pitchRight).map((r) => r.reactionMs)),
        kinds,
      };
    })
    .sort((a, b) => a.writtenMidi - b.writtenMidi || a.written.localeCompare(b.written));
}
