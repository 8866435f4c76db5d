import { z } from "zod";
import { MODES, type Mode } from "~/game/messages";
import { TEAM_COUNT_RANGE } from "~/game/roomConfig";
import { KEYS } from "~/music/keys";
import type { ReadingSpec } from "~/music/pools";
import { readingPreset } from "~/reading/presets";
import { MODE_NAMES, parseReadingSet, readingSetFields, type ParsedReadingSet, type ReadingSetSpec } from "~/reading/spec";

// An empty box means "from the start" / "to the end".
const optionalBar = z.preprocess((v) => (v === "" ? undefined : v), z.coerce.number().int("A whole bar number.").min(1, "Bars count from 1.").max(9999).optional());

/** The quick setup form for hosting a round: a reading set not saved yet, plus what only a round needs. Parse it with parseReadingSet. */
export const quickSetupSchema = z
  .object({
    mode: z.enum(MODES, "Choose a mode."),
    ...readingSetFields,
    teams: z.coerce.number().int().min(TEAM_COUNT_RANGE[0]).max(TEAM_COUNT_RANGE[1]).default(2),
    tuneId: z.string().max(64).optional(),
    // Tune walk over part of a tune: bars from…to, inclusive.
    fromBar: optionalBar,
    toBar: optionalBar,
    classId: z.string().max(64).optional(),
  })
  .refine((v) => v.mode !== "tune-walk" || Boolean(v.tuneId), { path: ["tuneId"], message: "Choose a tune for the Tune walk." })
  .refine((v) => !v.fromBar || !v.toBar || v.fromBar <= v.toBar, { path: ["toBar"], message: "The last bar comes after the first." });

export type QuickSetup = z.infer<typeof quickSetupSchema>;
export type ParsedSetup = ParsedReadingSet<QuickSetup>;

/** The quick form starts where the ready-made progression starts. */
export const QUICK_DEFAULTS: QuickSetup = { ...readingPreset("ready-naturals-5")!.spec, teams: 2 };

/** A setup written in code (the demo's rounds): parsed as a posted one is; one that fails is a mistake in that code. */
export function parsedSetup(setup: QuickSetup): ParsedSetup {
  const parsed = parseReadingSet(quickSetupSchema, setup);
  if (!parsed.ok) throw new Error(`Not a playable setup: ${JSON.stringify(parsed.errors)}`);
  return parsed;
}

/** Hosting from a reading set: the set's settings, for this class; its spec and pool carry over unchanged. */
export function setupFromSet({ set, spec, pool }: ParsedReadingSet<ReadingSetSpec>, classId: string | undefined, teams = QUICK_DEFAULTS.teams): ParsedSetup {
  return { set: { ...set, teams, classId }, spec, pool };
}

/**
 * A round's title, which tells it apart wherever rounds are listed (stage, dashboard, class review, results):
 * its class, the set it read, the mode, the key and the position. Never the tune: a Tune walk names it only at the end.
 */
export function roundTitle(r: { className?: string | null; setName?: string | null; mode: Mode; spec: Pick<ReadingSpec, "keyFifths" | "accidentals" | "position"> }): string {
  const key = KEYS.find((k) => k.mode === "major" && k.fifths === r.spec.keyFifths)?.name ?? "C major";
  // A Tune walk reads its tune's own key, with whatever accidentals the tune has.
  const reads = r.mode === "tune-walk" ? key : r.spec.accidentals === "naturals" ? "naturals" : r.spec.accidentals === "chromatic" ? `${key} with accidentals` : key;
  return [r.className, r.setName, MODE_NAMES[r.mode], reads, `position ${r.spec.position}`].filter(Boolean).join(" · ");
}
