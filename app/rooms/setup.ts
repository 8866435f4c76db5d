import { z } from "zod";
import { MODES } from "~/game/protocol";
import { TEAM_COUNT_RANGE, type PromptNote } from "~/game/roomConfig";
import { homeSpotFor, type SpotMap } from "~/music/positions";
import { readingPreset } from "~/reading/presets";
import { poolCheck, readingSetFields, type ReadingSetSpec } from "~/reading/spec";

// An empty box means "from the start" / "to the end".
const optionalBar = z.preprocess((v) => (v === "" ? undefined : v), z.coerce.number().int("A whole bar number.").min(1, "Bars count from 1.").max(9999).optional());

/** The quick setup form for hosting a round: a reading set not saved yet, plus what only a round needs. */
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
  .refine((v) => !v.fromBar || !v.toBar || v.fromBar <= v.toBar, { path: ["toBar"], message: "The last bar comes after the first." })
  .superRefine(poolCheck);

export type QuickSetup = z.infer<typeof quickSetupSchema>;

/** The quick form starts where the ready-made progression starts. */
export const QUICK_DEFAULTS: QuickSetup = { ...readingPreset("ready-naturals-5")!.spec, teams: 2 };

/** Hosting from a reading set: the set's settings, for this class. */
export function setupFromSet(spec: ReadingSetSpec, classId: string | undefined, teams = QUICK_DEFAULTS.teams): QuickSetup {
  return { ...spec, teams, classId };
}

/**
 * A class that moved some home spots reads with its own map: each prompt's home (which diagnosis and
 * scoring go by) becomes the class's spot. A pitch the map doesn't reach, or a spot beyond this neck, keeps the default.
 */
export function withSpotMap(prompts: PromptNote[], map: SpotMap | undefined, frets: number): PromptNote[] {
  if (!map) return prompts;
  return prompts.map((p) => {
    const spot = homeSpotFor(map, p.writtenMidi);
    return spot && spot.fret <= frets ? { ...p, home: spot } : p;
  });
}
