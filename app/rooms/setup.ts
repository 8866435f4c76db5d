import { z } from "zod";
import { MODES } from "~/game/protocol";
import { ANSWER_MS_RANGE, TEAM_COUNT_RANGE } from "~/game/roomConfig";
import type { ReadingSpec } from "~/music/pools";
import { MAX_FRETS, MIN_FRETS } from "~/music/tuning";

export const PROMPT_COUNT_RANGE = [3, 60] as const;

const checkbox = z.preprocess((v) => v === "on" || v === "true" || v === true, z.boolean());

/** The quick setup form for hosting a round; every limit is also a clear message. */
export const quickSetupSchema = z
  .object({
    mode: z.enum(MODES, "Choose a mode."),
    position: z.coerce.number().int().min(1, "Position 1 to 12.").max(12, "Position 1 to 12."),
    tuning: z.string().min(1).max(80),
    frets: z.coerce.number().int().min(MIN_FRETS).max(MAX_FRETS).default(15),
    keyFifths: z.coerce.number().int().min(-7).max(7),
    accidentals: z.enum(["naturals", "key", "chromatic"]),
    ledgerLines: checkbox,
    homeOnly: checkbox,
    prompts: z.coerce
      .number()
      .int("A whole number of notes.")
      .min(PROMPT_COUNT_RANGE[0], `At least ${PROMPT_COUNT_RANGE[0]} notes.`)
      .max(PROMPT_COUNT_RANGE[1], `At most ${PROMPT_COUNT_RANGE[1]} notes.`),
    seconds: z.coerce
      .number()
      .int()
      .min(ANSWER_MS_RANGE[0] / 1000, `At least ${ANSWER_MS_RANGE[0] / 1000} seconds.`)
      .max(ANSWER_MS_RANGE[1] / 1000, `At most ${ANSWER_MS_RANGE[1] / 1000} seconds.`),
    teams: z.coerce.number().int().min(TEAM_COUNT_RANGE[0]).max(TEAM_COUNT_RANGE[1]).default(2),
    tuneId: z.string().max(64).optional(),
    classId: z.string().max(64).optional(),
  })
  .refine((v) => v.mode !== "tune-walk" || Boolean(v.tuneId), { path: ["tuneId"], message: "Choose a tune for the Tune walk." });

export type QuickSetup = z.infer<typeof quickSetupSchema>;

export const QUICK_DEFAULTS: QuickSetup = {
  mode: "sprint",
  position: 5,
  tuning: "standard",
  frets: 15,
  keyFifths: 0,
  accidentals: "naturals",
  ledgerLines: false,
  homeOnly: true,
  prompts: 12,
  seconds: 10,
  teams: 2,
};

export function readingSpecOf(setup: QuickSetup): ReadingSpec {
  return {
    position: setup.position,
    tuning: setup.tuning,
    frets: setup.frets,
    reading: "guitar",
    keyFifths: setup.accidentals === "naturals" ? 0 : setup.keyFifths,
    accidentals: setup.accidentals,
    ledgerLines: setup.ledgerLines,
  };
}
