// What a phone sends to POST /api/v1/practice/answers: finished answers, in batches, each with its own clientId
// so a resend after a dropped connection is harmless. The phone sends what was asked and where the student
// tapped; the server works out the verdict again and never takes the phone's word for it.
import { z } from "zod";

export const MAX_BATCH = 100;
/** Older answers are refused: a queue that old belongs to a phone that has been away too long to trust. */
export const MAX_AGE_MS = 7 * 86_400_000;
/** Phone clocks drift; an answer a few minutes "in the future" is still fine. */
export const MAX_CLOCK_AHEAD_MS = 5 * 60_000;
export const MAX_REACTION_MS = 10 * 60_000;

const whole = (what: string, min: number, max: number) =>
  z.number(`${what} must be a number.`).int(`${what} must be a whole number.`).min(min, `${what} must be ${min} to ${max}.`).max(max, `${what} must be ${min} to ${max}.`);
const id = (what: string) => z.string(`${what} must be text.`).regex(/^[A-Za-z0-9_-]{1,64}$/, `${what} must be 1–64 letters, digits, - or _.`);

export const SOURCE_PATTERN = /^(?:(?:set|preset|tune):[A-Za-z0-9_-]{1,64}|position:(?:[1-9]|1[0-2]))$/;

export const practiceAnswerSchema = z.object({
  clientId: z.string("Every answer needs a clientId.").regex(/^[A-Za-z0-9_-]{8,40}$/, "A clientId is 8–40 letters, digits, - or _."),
  source: z.string("Say what was practised.").regex(SOURCE_PATTERN, 'The source is "set:<id>", "preset:<id>", "tune:<id>" or "position:<1–12>".'),
  assignmentId: id("The assignment id").nullish(),
  classId: id("The class id").nullish(),
  position: whole("The position", 1, 12),
  tuning: z.string("Name the tuning.").min(1, "Name the tuning.").max(80, "A tuning is at most 80 characters."),
  keyFifths: whole("The key signature", -7, 7),
  written: z.string("Give the written note, e.g. F#5.").min(2, "Give the written note, e.g. F#5.").max(8, "A written note is at most 8 characters."),
  string: whole("The string", 1, 7),
  fret: whole("The fret", 0, 24),
  reactionMs: whole("The reaction time (ms)", 0, MAX_REACTION_MS),
  at: z.number("The time of the answer must be a number (ms since 1970).").int("The time of the answer must be whole milliseconds."),
});
export type PracticeAnswerInput = z.infer<typeof practiceAnswerSchema>;

export const practiceBatchSchema = z.object(
  {
    answers: z
      .array(practiceAnswerSchema, "Send { answers: [...] }.")
      .min(1, "Send at least one answer.")
      .max(MAX_BATCH, `Send at most ${MAX_BATCH} answers at a time.`),
  },
  "Send a JSON object: { answers: [...] }.",
);

export interface AnswerProblem {
  index: number;
  clientId: string | null;
  message: string;
}

/** The server's verdict on one answer, as the phone shows it. */
export interface AnswerVerdict {
  clientId: string;
  kind: string;
  pitchRight: boolean;
  message: string;
  duplicate: boolean;
}

export interface BatchAccepted {
  stored: number;
  duplicates: number;
  results: AnswerVerdict[];
}

export interface BatchRefused {
  error: string;
  problems: AnswerProblem[];
}
