// Search parameters of the neck explorer and of /api/v1/spots and /api/v1/spot-map: parsed with zod, checked by
// the music engine's own parsers, so every bad value gets the engine's plain-words message.
import { z } from "zod";
import { parseForm, type FieldErrors } from "~/lib/forms";
import { soundingMidi, spotsForSounding, type Reading } from "~/music/fretboard";
import { resolveKey } from "~/music/keys";
import { midiFrequency, MusicError, parsePitch, pitchMidi, pitchToString, type Pitch } from "~/music/pitch";
import { defaultSpotMap, positionWindow } from "~/music/positions";
import { checkFrets, MAX_FRETS, resolveTuning, type Tuning } from "~/music/tuning";

/** What the explorer shows with no parameters: third-space C in fifth position on a classical 19-fret neck. */
export const EXPLORER_DEFAULTS = {
  note: "C5",
  key: "C-major",
  tuning: "standard",
  frets: "19",
  position: "5",
  reading: "guitar",
};
export type ExplorerValues = typeof EXPLORER_DEFAULTS;

/** Runs an engine parser inside zod, turning its MusicError into an issue on that parameter. */
function viaEngine<T, R>(parse: (value: T) => R) {
  return (value: T, ctx: z.RefinementCtx<T>): R => {
    try {
      return parse(value);
    } catch (error) {
      if (!(error instanceof MusicError)) throw error;
      ctx.addIssue(error.message);
      return z.NEVER;
    }
  };
}

const text = (name: string) =>
  z
    .string({ error: `Give ${name}.` })
    .trim()
    .min(1, `Give ${name}.`);
const wholeNumber = (name: string) =>
  text(`a ${name}`).regex(/^\d+$/, `The ${name} must be a whole number.`).transform(Number);

const note = text('a note, such as "F#4" (middle C is C4)').transform(viaEngine(parsePitch));
const tuning = text("a tuning").transform(viaEngine(resolveTuning));
const frets = wholeNumber("number of frets").transform(viaEngine(checkFrets));
const position = wholeNumber("position").transform(viaEngine((n: number) => positionWindow(n).position));
const reading = z.enum(["guitar", "concert"], {
  error: 'Reading must be "guitar" (sounds an octave below written) or "concert".',
});
const key = text("a key, such as G major").transform(viaEngine(resolveKey));

/** Builds the position's default home-spot map, reporting a position that runs off the neck on `position`. */
function withMap<T extends { position: number; tuning: Tuning; frets: number; reading: Reading }>(
  q: T,
  ctx: z.RefinementCtx<T>,
) {
  try {
    return { ...q, map: defaultSpotMap(q.position, q.tuning, { frets: q.frets, reading: q.reading }) };
  } catch (error) {
    if (!(error instanceof MusicError)) throw error;
    ctx.addIssue({ code: "custom", message: error.message, path: ["position"] });
    return z.NEVER;
  }
}

const spotsSchema = z.object({
  note,
  tuning: tuning.prefault("standard"),
  frets: frets.prefault(String(MAX_FRETS)),
  reading: reading.prefault("guitar"),
});

const spotMapSchema = z
  .object({
    position,
    tuning: tuning.prefault("standard"),
    frets: frets.prefault(String(MAX_FRETS)),
    reading: reading.prefault("guitar"),
  })
  .transform(withMap);

const explorerSchema = z.object({ note, key, tuning, frets, position, reading }).transform(withMap);

export type Parsed<T> = { ok: true; data: T } | { ok: false; errors: FieldErrors };

function parseParams<S extends z.ZodType>(schema: S, params: URLSearchParams): Parsed<z.output<S>> {
  const form = new FormData();
  params.forEach((value, name) => form.append(name, value));
  return parseForm(schema, form);
}

export const parseSpotsQuery = (params: URLSearchParams) => parseParams(spotsSchema, params);
export const parseSpotMapQuery = (params: URLSearchParams) => parseParams(spotMapSchema, params);

/** The explorer fills gaps with its defaults, so a bare /explore shows something useful. */
export function parseExplorerQuery(
  params: URLSearchParams,
): { values: ExplorerValues } & Parsed<z.output<typeof explorerSchema>> {
  const values = { ...EXPLORER_DEFAULTS };
  for (const name of Object.keys(values) as (keyof ExplorerValues)[]) values[name] = params.get(name) ?? values[name];
  return { values, ...parseParams(explorerSchema, new URLSearchParams(values)) };
}

/** Where a written note sounds and every spot that plays it; the body of /api/v1/spots. */
export function noteOnNeck(q: { note: Pitch; tuning: Tuning; frets: number; reading: Reading }) {
  const writtenMidi = pitchMidi(q.note);
  const midi = soundingMidi(writtenMidi, q.reading);
  // Guitar music sounds whole octaves below written, so the sounding note keeps the written spelling.
  const sounding = { ...q.note, octave: q.note.octave - (writtenMidi - midi) / 12 };
  return {
    written: pitchToString(q.note),
    sounding: pitchToString(sounding),
    midi,
    frequency: Math.round(midiFrequency(midi) * 100) / 100,
    tuning: q.tuning.id,
    frets: q.frets,
    reading: q.reading,
    spots: spotsForSounding(midi, q.tuning, q.frets),
  };
}

/** Answers for the JSON API: the same question always has the same answer, so caches may keep it for a day. */
export function apiAnswer<T>(parsed: Parsed<T>, body: (data: T) => unknown): Response {
  if (!parsed.ok) {
    const error = Object.entries(parsed.errors)
      .map(([name, message]) => `${name}: ${message}`)
      .join(" ");
    return Response.json({ error }, { status: 400, headers: { "Cache-Control": "no-store" } });
  }
  return Response.json(body(parsed.data), { headers: { "Cache-Control": "public, max-age=86400" } });
}
