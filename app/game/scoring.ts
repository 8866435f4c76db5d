/**
 * Scoring (computed on the server only).
 *
 * ### How Fretcall scores an answer
 * Let T be the prompt's answer time and r the reaction time (from the moment the note is shown
 * to the tap, in server time, clamped to 0…T).
 *
 * - **Speed bonus** = round(500 × (1 − r / T)): 500 for an instant tap, falling in a straight
 *   line to 0 at the deadline.
 * - **Home spot** (right pitch at the home spot; or at any spot when "home spot only" is off):
 *   500 + speed bonus + streak bonus, and the streak grows by 1.
 *   **Streak bonus** = 50 × (answers already in the streak), capped at 250 — so the 1st right
 *   answer in a row earns +0, the 2nd +50, … the 6th and later +250.
 * - **Other spot** with "home spot only" on (right pitch, wrong place):
 *   half of (500 + speed bonus), rounded; no streak bonus, and the streak is *kept* as it is —
 *   neither grown nor broken. The student read the note correctly, which is the skill the
 *   streak stands for, but did not use the home spot the drill is about.
 * - **Any other mistake** (octave off, key-signature miss, …): 0 points, streak back to 0.
 * - **No answer** while connected: 0 points, streak back to 0. A student whose phone was
 *   offline when the prompt closed keeps the streak (weak Wi-Fi is not a reading mistake).
 * - **Full neck** (cooperative): a right-pitch spot nobody had found yet earns 500 + speed bonus;
 *   a spot someone already found earns 0; streaks are not counted in Full neck.
 * - **Teams**: a team's score is the mean of its members' points, rounded.
 *
 * Best single answer: 500 + 500 + 250 = 1250 points.
 */
import type { Diagnosis } from "~/music/mistakes";

export const BASE_POINTS = 500;
export const SPEED_BONUS_MAX = 500;
export const STREAK_STEP = 50;
export const STREAK_BONUS_MAX = 250;
export const PARTIAL_SHARE = 0.5;

/** right = full credit; partial = right pitch at another spot while "home spot only" is on. */
export type Verdict = "right" | "partial" | "wrong";

/** Also solo practice's rule, over stored rows whose kind is plain text. */
export function verdictOf(diagnosis: { kind: Diagnosis["kind"] | (string & {}); pitchRight: boolean }, homeOnly: boolean): Verdict {
  if (!diagnosis.pitchRight) return "wrong";
  return diagnosis.kind === "home-spot" || !homeOnly ? "right" : "partial";
}

export function speedBonus(reactionMs: number, answerMs: number): number {
  const r = Math.min(Math.max(reactionMs, 0), answerMs);
  return Math.round(SPEED_BONUS_MAX * (1 - r / answerMs));
}

export function streakBonus(streakBefore: number): number {
  return Math.min(STREAK_STEP * streakBefore, STREAK_BONUS_MAX);
}

export interface Score {
  points: number;
  speedBonus: number;
  streakBonus: number;
  /** The streak after this answer. */
  streak: number;
}

export function scoreAnswer(input: { verdict: Verdict; reactionMs: number; answerMs: number; streakBefore: number }): Score {
  const speed = speedBonus(input.reactionMs, input.answerMs);
  switch (input.verdict) {
    case "right": {
      const bonus = streakBonus(input.streakBefore);
      return { points: BASE_POINTS + speed + bonus, speedBonus: speed, streakBonus: bonus, streak: input.streakBefore + 1 };
    }
    case "partial":
      return { points: Math.round((BASE_POINTS + speed) * PARTIAL_SHARE), speedBonus: speed, streakBonus: 0, streak: input.streakBefore };
    case "wrong":
      return { points: 0, speedBonus: 0, streakBonus: 0, streak: 0 };
  }
}

/** Full neck: a newly found spot. */
export function scoreFind(reactionMs: number, answerMs: number): number {
  return BASE_POINTS + speedBonus(reactionMs, answerMs);
}

export function teamScore(memberPoints: readonly number[]): number {
  if (memberPoints.length === 0) return 0;
  return Math.round(memberPoints.reduce((a, b) => a + b, 0) / memberPoints.length);
}
