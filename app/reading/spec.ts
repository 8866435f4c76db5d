// A reading set: what a class reads (the engine's ReadingSpec) plus how a round from it runs.
// The same fields describe the host page's quick setup, which is a reading set not saved yet.
import { z } from "zod";
import type { Mode } from "~/game/protocol";
import { ANSWER_MS_RANGE } from "~/game/roomConfig";
import { KEYS } from "~/music/keys";
import { displayPitch, MusicError, parsePitch } from "~/music/pitch";
import { buildPool, type ReadingSpec } from "~/music/pools";
import { MAX_FRETS, MIN_FRETS, resolveTuning } from "~/music/tuning";

export const PROMPT_COUNT_RANGE = [3, 60] as const;
/** Tune walk reads a tune, not a pool, so a reading set offers the other modes. */
export const SET_MODES = ["sprint", "full-neck", "teams"] as const satisfies readonly Mode[];
export const MODE_NAMES: Record<Mode, string> = { sprint: "Sprint", "tune-walk": "Tune walk", "full-neck": "Full neck", teams: "Teams" };

const checkbox = z.preprocess((v) => v === "on" || v === "true" || v === true, z.boolean());
const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

/** A written pitch typed by a teacher, checked by the engine's parser so its message reaches the form. */
const writtenNote = (which: string) =>
  z.preprocess(
    blankToUndefined,
    z
      .string()
      .trim()
      .max(8, `${which}: a note such as E4.`)
      .superRefine((text, ctx) => {
        try {
          parsePitch(text);
        } catch (error) {
          if (!(error instanceof MusicError)) throw error;
          ctx.addIssue(`${which}: ${error.message}`);
        }
      })
      .optional(),
  );

/** Allowed strings arrive as checkboxes joined into "1,2,3" (see collectStrings) or, stored, as an array. */
const strings = z.preprocess(
  (v) => (typeof v === "string" ? (v.trim() === "" ? [] : v.split(",").map(Number)) : v),
  z
    .array(z.number().int("Strings are numbered 1 to 7.").min(1, "Strings are numbered 1 to 7.").max(7, "Strings are numbered 1 to 7."))
    .min(1, "Choose at least one string.")
    .optional(),
);

/** Every field of a reading set but its mode; shared with the quick setup. */
export const readingSetFields = {
  position: z.coerce.number().int("Position 1 to 12.").min(1, "Position 1 to 12.").max(12, "Position 1 to 12."),
  tuning: z
    .string()
    .trim()
    .min(1, "Choose a tuning.")
    .max(80, "A tuning is at most 80 characters.")
    .superRefine((text, ctx) => {
      try {
        resolveTuning(text);
      } catch (error) {
        if (!(error instanceof MusicError)) throw error;
        ctx.addIssue(error.message);
      }
    }),
  frets: z.coerce
    .number()
    .int(`Frets: a whole number from ${MIN_FRETS} to ${MAX_FRETS}.`)
    .min(MIN_FRETS, `Frets: a whole number from ${MIN_FRETS} to ${MAX_FRETS}.`)
    .max(MAX_FRETS, `Frets: a whole number from ${MIN_FRETS} to ${MAX_FRETS}.`)
    .default(15),
  strings,
  lowest: writtenNote("Lowest note"),
  highest: writtenNote("Highest note"),
  keyFifths: z.coerce.number().int("Choose a key signature.").min(-7, "Choose a key signature.").max(7, "Choose a key signature."),
  accidentals: z.enum(["naturals", "key", "chromatic"], "Choose which notes to read."),
  ledgerLines: checkbox,
  homeOnly: checkbox,
  prompts: z.coerce
    .number()
    .int("A whole number of notes.")
    .min(PROMPT_COUNT_RANGE[0], `At least ${PROMPT_COUNT_RANGE[0]} notes.`)
    .max(PROMPT_COUNT_RANGE[1], `At most ${PROMPT_COUNT_RANGE[1]} notes.`),
  seconds: z.coerce
    .number()
    .int("A whole number of seconds.")
    .min(ANSWER_MS_RANGE[0] / 1000, `At least ${ANSWER_MS_RANGE[0] / 1000} seconds.`)
    .max(ANSWER_MS_RANGE[1] / 1000, `At most ${ANSWER_MS_RANGE[1] / 1000} seconds.`),
};

type ReadingFields = z.output<z.ZodObject<typeof readingSetFields>>;

/** The engine's view of a reading set. Naturals read without a signature, whatever key was left selected. */
export function readingSpecOf(set: ReadingFields): ReadingSpec {
  return {
    position: set.position,
    tuning: set.tuning,
    frets: set.frets,
    reading: "guitar",
    ...(set.strings ? { strings: set.strings } : {}),
    ...(set.lowest ? { lowest: set.lowest } : {}),
    ...(set.highest ? { highest: set.highest } : {}),
    keyFifths: set.accidentals === "naturals" ? 0 : set.keyFifths,
    accidentals: set.accidentals,
    ledgerLines: set.ledgerLines,
  };
}

/** The engine has the last word: a set whose pool is empty or impossible is refused with its message, on `pool`. */
export function poolCheck(set: ReadingFields & { mode: Mode }, ctx: z.RefinementCtx) {
  if (set.mode === "tune-walk") return;
  try {
    buildPool(readingSpecOf(set));
  } catch (error) {
    if (!(error instanceof MusicError)) throw error;
    ctx.addIssue({ code: "custom", path: ["pool"], message: error.message });
  }
}

export const readingSetSpecSchema = z
  .object({ mode: z.enum(SET_MODES, "Choose Sprint, Full neck or Teams."), ...readingSetFields })
  .superRefine(poolCheck);
export type ReadingSetSpec = z.output<typeof readingSetSpecSchema>;

export const readingSetFormSchema = z
  .object({
    name: z.string().trim().min(1, "Give the set a name.").max(80, "Keep the name under 80 characters."),
    classId: z.preprocess(blankToUndefined, z.string().max(64).optional()),
    mode: z.enum(SET_MODES, "Choose Sprint, Full neck or Teams."),
    ...readingSetFields,
  })
  .superRefine(poolCheck);

/** Checkboxes named "strings" come as several values; a hidden empty one marks that the form had them at all. */
export function collectStrings(form: FormData): FormData {
  if (form.has("strings")) form.set("strings", form.getAll("strings").filter((v) => v !== "").join(","));
  return form;
}

const ACCIDENTAL_WORDS = { naturals: "naturals only", key: "notes of the key", chromatic: "with accidentals" } as const;

/** One line a busy teacher can read at a glance. */
export function describeReadingSet(set: ReadingSetSpec): string {
  const key = KEYS.find((k) => k.mode === "major" && k.fifths === set.keyFifths);
  const parts = [
    `Position ${set.position}`,
    resolveTuning(set.tuning).name,
    set.accidentals === "naturals" ? "naturals only" : `${key?.name ?? "C major"}, ${ACCIDENTAL_WORDS[set.accidentals]}`,
    set.ledgerLines ? "ledger lines" : "no ledger lines",
    set.strings ? `strings ${set.strings.join(", ")}` : null,
    set.lowest || set.highest
      ? `${set.lowest ? displayPitch(parsePitch(set.lowest)) : "lowest"} to ${set.highest ? displayPitch(parsePitch(set.highest)) : "highest"}`
      : null,
    `${set.prompts} notes, ${set.seconds} s each`,
    MODE_NAMES[set.mode],
    set.homeOnly ? "home spot only" : "any spot",
  ];
  return parts.filter(Boolean).join(" · ");
}
