/**
 * Whether a class is ready for the next step of its progression. The rule, in one place:
 * - A student **reads the current step** when, over at least READY_MIN_ANSWERS answers in the class's rounds of
 *   that step, at least READY_HOME_SHARE of them were the home spot and the median time of their right-pitch
 *   answers is under the step's target (half the time the step allows per note).
 * - The class is **ready for the next step** when at least READY_CLASS_SHARE of its students read the current
 *   step. Every student on the roster counts, so one who hasn't played counts as not reading it yet.
 */
export const READY_MIN_ANSWERS = 10;
export const READY_HOME_SHARE = 0.9;
export const READY_CLASS_SHARE = 0.8;

export interface StepFigures {
  answers: number;
  homeSpots: number;
  /** Median time of the right-pitch answers; null without any. */
  medianMs: number | null;
}

export type StepReading = "reads it" | "working on it" | "too few answers";

/** The step's target median: half the time it gives per note. */
export const stepTargetMs = (answerMs: number) => Math.round(answerMs / 2);

export function readsStep(f: StepFigures | undefined, targetMs: number): StepReading {
  if (!f || f.answers < READY_MIN_ANSWERS) return "too few answers";
  const well = f.homeSpots / f.answers >= READY_HOME_SHARE && f.medianMs !== null && f.medianMs < targetMs;
  return well ? "reads it" : "working on it";
}

export interface ClassReadiness {
  ready: boolean;
  readers: number;
  students: number;
  /** Readers the rule asks for. */
  needed: number;
}

/** `students`: one entry per student on the roster (undefined for one with no answers at the step). */
export function classReady(students: readonly (StepFigures | undefined)[], targetMs: number): ClassReadiness {
  const readers = students.filter((f) => readsStep(f, targetMs) === "reads it").length;
  const needed = Math.ceil(READY_CLASS_SHARE * students.length - 1e-9);
  return { ready: students.length > 0 && readers >= needed, readers, students: students.length, needed };
}

/** What a round read, as far as the progression cares. */
export interface RoundReading {
  position: number;
  keyFifths: number;
  chromatic: boolean;
  ledger: boolean;
}

/**
 * The first step of the progression whose ready-made set covers what the round read (same position and key,
 * accidentals and ledger lines only where that step has them); undefined for a reading outside the progression.
 */
export function stepOfRound<P extends { spec: { position: number; keyFifths: number; accidentals: string; ledgerLines: boolean } }>(r: RoundReading, steps: readonly P[]): P | undefined {
  return steps.find(
    ({ spec }) =>
      spec.position === r.position &&
      spec.keyFifths === r.keyFifths &&
      (!r.chromatic || spec.accidentals === "chromatic") &&
      (!r.ledger || spec.ledgerLines),
  );
}
