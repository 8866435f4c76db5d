// What a reading set is: what a class reads (the engine's ReadingSpec) plus how a round from it runs.
// The same fields describe the host page's quick setup, which is a reading set not saved yet. Every
// reading set, posted or stored, goes through parseReadingSet, which builds its pool once.
import { z } from "zod";
import type { Mode } from "~/game/messages";
import { ANSWER_MS_RANGE } from "~/game/roomConfig";
import { parseFields, type FieldErrors } from "~/lib/forms";
import { KEYS } from "~/music/keys";
import { displayPitch, MusicError, parsePitch } from "~/music/pitch";
import { buildPool, type PoolNote, type ReadingSpec } from "~/music/pools";
import { homeSpotFor, type SpotMap } from "~/music/positions";
import { MAX_FRETS, MIN_FRETS, resolveTuning } from "~/music/tuning";
import { nameField } from "~/lib/names";

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

type ReadingFields = z.output<z.ZodObject<typeof readingSetFields>> & { mode: Mode };

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

/** A saved reading set's fields (stored as the set's JSON). */
export const readingSetSpecSchema = z.object({ mode: z.enum(SET_MODES, "Choose Sprint, Full neck or Teams."), ...readingSetFields });
export type ReadingSetSpec = z.output<typeof readingSetSpecSchema>;

/** Where a saved set is filed: its name and, optionally, its class. */
export const setFilingSchema = z.object({
  name: nameField("the set's name", 80, "Give the set a name."),
  classId: z.preprocess(blankToUndefined, z.string().max(64).optional()),
});

/** The reading set page's form: the set and where it is filed. */
export const readingSetFormSchema = readingSetSpecSchema.extend(setFilingSchema.shape);

/** Checkboxes named "strings" come as several values; a hidden empty one marks that the form had them at all. */
export function collectStrings(form: FormData): FormData {
  if (form.has("strings")) form.set("strings", form.getAll("strings").filter((v) => v !== "").join(","));
  return form;
}

/** A reading set that checks out, with what everything else derives from it. */
export interface ParsedReadingSet<T extends ReadingFields = ReadingSetSpec> {
  set: T;
  spec: ReadingSpec;
  /** Its notes, built once here; empty for a Tune walk, which reads its tune instead. */
  pool: PoolNote[];
}

/**
 * "Naturals only" is read without a key signature, so a key chosen beside it would be silently dropped
 * (readingSpecOf). The host form refuses both together with this, on the key's field, and shows it beside
 * the fields as they are chosen; a stored set keeps being read as naturals (the reading set page locks the
 * key then). A Tune walk reads its tune's key and ignores both fields.
 */
export const NATURALS_KEY_CLASH = "“Naturals only” is read without a key signature. Choose C major (no sharps or flats), or “Notes of the key signature” to read in this key.";

export function keyClash(set: { mode: Mode; accidentals: string; keyFifths: number }): string | null {
  return set.mode !== "tune-walk" && set.accidentals === "naturals" && set.keyFifths !== 0 ? NATURALS_KEY_CLASH : null;
}

export type ReadingSetResult<T extends ReadingFields> = ({ ok: true } & ParsedReadingSet<T>) | { ok: false; errors: FieldErrors };

/**
 * The one parse of a reading set (or a quick setup, or a form carrying one), from a posted form or stored
 * JSON: the fields by `schema`, then the engine has the last word — a set whose pool is empty or
 * impossible is refused with its message, on `pool`.
 */
export function parseReadingSet<S extends z.ZodType<ReadingFields>>(schema: S, input: FormData | unknown): ReadingSetResult<z.output<S>> {
  const parsed = parseFields(schema, input instanceof FormData ? Object.fromEntries(collectStrings(input)) : input);
  if (!parsed.ok) return parsed;
  const set: z.output<S> = parsed.data;
  const spec = readingSpecOf(set);
  if (set.mode === "tune-walk") return { ok: true, set, spec, pool: [] };
  try {
    return { ok: true, set, spec, pool: buildPool(spec) };
  } catch (error) {
    if (!(error instanceof MusicError)) throw error;
    return { ok: false, errors: { pool: error.message } };
  }
}

/**
 * A class that moved some home spots reads with its own map: each note's home (which diagnosis and scoring go by)
 * becomes the class's spot. A pitch the map doesn't reach keeps the default, and so does a map spot beyond this
 * neck's frets: a map is kept per position and tuning, not per neck, and a spot the pad cannot show cannot be the answer.
 */
export function applySpotMap<T extends Pick<PoolNote, "writtenMidi" | "home">>(notes: readonly T[], map: SpotMap | undefined, frets: number): T[] {
  if (!map) return [...notes];
  return notes.map((n) => {
    const spot = homeSpotFor(map, n.writtenMidi);
    return spot && spot.fret <= frets ? { ...n, home: spot } : n;
  });
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
