// What a phone sends to POST /api/v1/practice/answers: finished answers, in batches, each with its own clientId
// so a resend after a dropped connection is harmless. The phone sends what was asked and where the student
// tapped (or, played, the note it heard); the server works out the verdict again and never takes the phone's word for it.
import { z } from "zod";
import { MAX_BATCH } from "./queue";

/** Older answers are refused: a queue that old belongs to a phone that has been away too long to trust. */
export const MAX_AGE_MS = 7 * 86_400_000;
/** Phone clocks drift; an answer a few minutes "in the future" is still fine. */
export const MAX_CLOCK_AHEAD_MS = 5 * 60_000;
export const MAX_REACTION_MS = 10 * 60_000;

const whole = (what: string, min: number, max: number) =>
  z.number(`${what} must be a number.`).int(`${what} must be a whole number.`).min(min, `${what} must be ${min} to ${max}.`).max(max, `${what} must be ${min} to ${max}.`);
const id = (what: string) => z.string(`${what} must be text.`).regex(/^[A-Za-z0-9_-]{1,64}$/, `${what} must be 1–64 letters, digits, - or _.`);

/** How an answer was given: a tap on the drawn neck, or a note played on a guitar and heard by the phone. */
export const ANSWER_INPUTS = ["tap", "played"] as const;
export type AnswerInput = (typeof ANSWER_INPUTS)[number];

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
  /** How the answer was given; older clients send none, and every answer of theirs is a tap. */
  input: z.enum(ANSWER_INPUTS, 'The input is "tap" or "played".').default("tap"),
  /** A tap's spot. */
  string: whole("The string", 1, 7).optional(),
  fret: whole("The fret", 0, 24).optional(),
  /** A played answer's sounding note as heard (MIDI 1.0 number) and how far off it was, in cents. */
  heardMidi: whole("The heard note (MIDI number)", 0, 127).optional(),
  heardCents: whole("The heard note's cents", -50, 50).optional(),
  reactionMs: whole("The reaction time (ms)", 0, MAX_REACTION_MS),
  at: z.number("The time of the answer must be a number (ms since 1970).").int("The time of the answer must be whole milliseconds."),
}).superRefine((a, ctx) => {
  const need = (field: "string" | "fret" | "heardMidi", message: string) => {
    if (a[field] === undefined) ctx.addIssue({ code: "custom", path: [field], message });
  };
  if (a.input === "tap") {
    need("string", "A tapped answer needs the string.");
    need("fret", "A tapped answer needs the fret.");
  } else {
    need("heardMidi", "A played answer needs the heard note (heardMidi).");
    if (a.string !== undefined || a.fret !== undefined) ctx.addIssue({ code: "custom", path: ["string"], message: "A played answer has no spot: a microphone cannot tell the string." });
  }
});
export type PracticeAnswerInput = z.input<typeof practiceAnswerSchema>;
export type PracticeAnswer = z.output<typeof practiceAnswerSchema>;

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

/** The class review looks back this far at practice between lessons. */
export const PRACTICE_REVIEW_DAYS = 30;

/** A student's practice over the review's window, split by how the answers were given (the class review). */
export interface PracticeMix {
  userId: string;
  displayName: string;
  tapped: number;
  tappedRight: number;
  played: number;
  playedRight: number;
  /** Epoch ms of the latest answer, or null for none in the window. */
  lastAt: number | null;
}

/** One stored answer as a teacher's page lists it. */
export interface PracticeLine {
  clientId: string;
  at: number;
  source: string;
  written: string;
  input: AnswerInput;
  /** A tap's spot, or null when played. */
  spot: { string: number; fret: number } | null;
  /** The note a microphone heard (sounding MIDI number, cents), or null when tapped. */
  heard: { midi: number; cents: number } | null;
  kind: string;
  pitchRight: boolean;
  reactionMs: number;
}

