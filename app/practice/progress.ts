/**
 * Assignment progress, pure: from an assignment's goal and one student's practice answers for it,
 * how far they are and whether (and when) they finished. No I/O; progress.test.ts works the rules
 * through on constructed answers.
 *
 * Rules, in one place:
 * - **Which answers count**: only practice answers stored with this assignment's id (and, when the goal
 *   asks for played answers, only those played on a guitar and heard by the phone; taps are left out). The server
 *   stores that id by one rule (`creditedAssignment`): the assignment the student opened, or else
 *   their unfinished assignment of the same material (reading set, ready-made set or tune) due
 *   soonest, however the session was started. Practice of other material does not count, so a
 *   teacher can read the figures as "work done for this assignment".
 * - **Correct** = the live rounds' full-credit rule (`verdictOf` in game/scoring.ts): the home spot
 *   always; another spot of the right pitch only when `homeOnly` is off. Assignments pass homeOnly = true, as solo practice
 *   drills the home spot (assignments.server.ts).
 * - **The judged window** = the latest `goal.notes` answers, in the order they were given. A goal
 *   "40 notes at 90 % with a median under 2 s" means: 40 answers in a row that together are at
 *   least 90 % correct and whose right-pitch answers have a median reaction time under 2 s. Early
 *   stumbles while learning therefore never block completion; only the student's recent playing does.
 * - **Accuracy met** when correct × 100 ≥ goal % × answers in the window (integers, no rounding).
 * - **Speed met** when there is no time goal, or the median reaction time of the window's
 *   right-pitch answers (the review's "median time") is strictly under the goal.
 * - **Completion** = the first answer that closes a full window meeting every part; `completedAt`
 *   is that answer's time. Completion is kept: later, weaker practice does not undo it.
 * - **Figures shown**: for a completed assignment those of the completing window; otherwise those
 *   of the latest window (fewer than `goal.notes` answers while the student is still getting there).
 * - **Status**: done once completed (late if completed after the due time); otherwise overdue after
 *   the due time, else open. Practice after the due time still counts.
 */
import { median } from "~/lib/median";
import { verdictOf } from "~/game/scoring";

export interface Goal {
  /** How many answers in a row make the judged window. */
  notes: number;
  /** Percent correct the window needs, 1–100. */
  accuracyPct: number;
  /** Median reaction time of right-pitch answers must be under this; null = no time goal. */
  medianMs: number | null;
  /** Only answers played on a guitar (heard by the phone) count; taps are left out. */
  playedOnly?: boolean;
}

/** The fields of a `practice_answers` row the rule reads. */
export interface PracticeRow {
  kind: string;
  pitchRight: boolean;
  reactionMs: number;
  /** Epoch milliseconds. */
  at: number;
  /** How it was given; absent = a tap. */
  input?: "tap" | "played";
}

export interface Progress {
  /** Every answer given for the assignment. */
  answered: number;
  /** Answers toward the window: min(answered, goal.notes). */
  notes: number;
  /** The judged window (see the rules): its size, correct answers, accuracy 0–1 and median time. */
  window: number;
  correct: number;
  accuracy: number;
  medianMs: number | null;
  met: { notes: boolean; accuracy: boolean; speed: boolean };
  /** Epoch ms of the answer that completed the assignment, or null. */
  completedAt: number | null;
}

export type Status = "open" | "overdue" | "done";

interface Judged {
  correct: number;
  medianMs: number | null;
  accuracy: boolean;
  speed: boolean;
}

function judge(window: readonly (PracticeRow & { correct: boolean })[], goal: Goal): Judged {
  const correct = window.filter((r) => r.correct).length;
  const medianMs = median(window.filter((r) => r.pitchRight).map((r) => r.reactionMs));
  return {
    correct,
    medianMs,
    accuracy: window.length > 0 && correct * 100 >= goal.accuracyPct * window.length,
    speed: goal.medianMs === null || (medianMs !== null && medianMs < goal.medianMs),
  };
}

export function progressOf(goal: Goal, rows: readonly PracticeRow[], homeOnly: boolean): Progress {
  const n = Math.max(1, Math.floor(goal.notes));
  // Stable sort: answers with the same time keep the order they were stored in.
  const counted = goal.playedOnly ? rows.filter((r) => r.input === "played") : rows;
  const ordered = [...counted].sort((a, b) => a.at - b.at).map((r) => ({ ...r, correct: verdictOf(r, homeOnly) === "right" }));
  let completedEnd: number | null = null;
  for (let end = n; end <= ordered.length && completedEnd === null; end++) {
    const j = judge(ordered.slice(end - n, end), goal);
    if (j.accuracy && j.speed) completedEnd = end;
  }
  const end = completedEnd ?? ordered.length;
  const window = ordered.slice(Math.max(0, end - n), end);
  const j = judge(window, goal);
  return {
    answered: ordered.length,
    notes: Math.min(ordered.length, n),
    window: window.length,
    correct: j.correct,
    accuracy: window.length === 0 ? 0 : j.correct / window.length,
    medianMs: j.medianMs,
    met: { notes: ordered.length >= n, accuracy: j.accuracy, speed: j.speed },
    completedAt: completedEnd === null ? null : ordered[completedEnd - 1]!.at,
  };
}

export function statusOf(progress: Pick<Progress, "completedAt">, dueAt: number, now: number): Status {
  if (progress.completedAt !== null) return "done";
  return now > dueAt ? "overdue" : "open";
}

/** Whether the assignment was finished after its due time. */
export const completedLate = (progress: Pick<Progress, "completedAt">, dueAt: number) =>
  progress.completedAt !== null && progress.completedAt > dueAt;

/** The goal in a teacher's words: "40 notes at 90 % correct, median under 2 s". */
export function goalWords(goal: Goal): string {
  const speed = goal.medianMs === null ? "" : `, median under ${formatSeconds(goal.medianMs)}`;
  return `${goal.notes} notes in a row at ${goal.accuracyPct} % correct${speed}${goal.playedOnly ? ", played on a guitar" : ""}`;
}

export const formatSeconds = (ms: number) => `${Number((ms / 1000).toFixed(2))} s`;

/** The progress in words, for the bar's label, the e-mails and screen readers. */
export function progressWords(goal: Goal, p: Progress): string {
  if (p.answered === 0) return "Not started";
  const parts = [
    `${p.notes} of ${goal.notes} notes`,
    `${Math.floor((p.correct * 100) / p.window)} % correct${p.met.accuracy ? " ✓" : ` (goal ${goal.accuracyPct} %)`}`,
  ];
  if (goal.medianMs !== null) {
    const time = p.medianMs === null ? "no right-pitch answers yet" : `median ${formatSeconds(p.medianMs)}`;
    parts.push(`${time}${p.met.speed ? " ✓" : ` (goal under ${formatSeconds(goal.medianMs)})`}`);
  }
  return parts.join(" · ");
}

/** What the credit rule needs to know of one of the student's assignments. */
export interface Creditable {
  id: string;
  material: { kind: string; id: string } | null;
  status: Status;
  dueAt: number;
}

/**
 * The assignment a practice answer counts toward, decided once on the server for the page and for the stored
 * answer alike: the one the student opened (`chosen`, already checked to be theirs); else, for practice of
 * material ("set:<id>", "preset:<id>", "tune:<id>") that an unfinished assignment of theirs asks for, the one
 * due soonest (an overdue one first: it still counts, as late); else none.
 */
export function creditedAssignment<A extends Creditable>(mine: readonly A[], source: string, chosen: string | null | undefined): A | undefined {
  if (chosen) return mine.find((a) => a.id === chosen);
  return mine
    .filter((a) => a.status !== "done" && a.material !== null && `${a.material.kind}:${a.material.id}` === source)
    .sort((x, y) => x.dueAt - y.dueAt)[0];
}
