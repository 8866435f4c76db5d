/**
 * What a room is set up with, fixed before the first player joins and stored with the room, so
 * the prompt order survives a crash and replay never depends on how the engine draws today.
 */
import type { Reading } from "~/music/fretboard";
import { keyAlter } from "~/music/keys";
import type { NoteNaming } from "~/music/naming";
import { parsePitch, pitchMidi, pitchToString } from "~/music/pitch";
import { buildPool, drawPrompts, type PoolNote, type ReadingSpec } from "~/music/pools";
import { UserError } from "~/lib/userError";
import type { Melody, Mode } from "./messages";

export class RoomConfigError extends UserError {}

/** A pool note with the key signature it is shown in. */
export interface PromptNote extends PoolNote {
  keyFifths: number;
}

export interface TeamsConfig {
  count: number;
  /** "points": snake draft on points from earlier rounds; "round-robin": by join order. */
  balance: "points" | "round-robin";
}

export interface RoomConfig {
  code: string;
  mode: Mode;
  tuning: string;
  frets: number;
  reading: Reading;
  /** Only the home spot earns full points (see scoring.ts). */
  homeOnly: boolean;
  prompts: PromptNote[];
  answerMs: number;
  /** Shortest wait between scheduling a prompt and showing it ("get ready"). */
  countdownMs: number;
  /** Standings after every N prompts; 0 = only at the end. */
  standingsEvery: number;
  /** Reveal and standings move on by themselves after this long; null = the host presses next. */
  autoAdvanceMs: number | null;
  maxPlayers: number;
  /** Tune walk: revealed when the room ends. */
  tuneName: string | null;
  /** Tune walk: the walk as written, one note per prompt (the stage draws it up to the asked note); rooms before it have none. */
  sheet?: Melody;
  teams: TeamsConfig | null;
  /** How the pads' feedback names notes: the school's naming when the room opened (rooms before it: letters). */
  naming?: NoteNaming;
}

export const ROOM_DEFAULTS = {
  homeOnly: true,
  answerMs: 10_000,
  countdownMs: 3_000,
  standingsEvery: 5,
  autoAdvanceMs: null,
  maxPlayers: 60,
} as const;

export const ANSWER_MS_RANGE = [3_000, 60_000] as const;
export const MAX_PROMPTS = 200;
export const TEAM_COUNT_RANGE = [2, 8] as const;

type Settings = Pick<RoomConfig, "code" | "mode"> &
  Partial<Pick<RoomConfig, "homeOnly" | "answerMs" | "countdownMs" | "standingsEvery" | "autoAdvanceMs" | "maxPlayers" | "tuneName" | "sheet" | "teams">>;

/** Fills in defaults and checks that the settings make a playable room; throws RoomConfigError with a clear message. */
export function roomConfig(spec: ReadingSpec, settings: Settings, prompts: PromptNote[]): RoomConfig {
  const config: RoomConfig = {
    ...ROOM_DEFAULTS,
    tuneName: null,
    teams: null,
    ...settings,
    tuning: spec.tuning,
    frets: spec.frets,
    reading: spec.reading,
    prompts,
  };
  const [minAnswer, maxAnswer] = ANSWER_MS_RANGE;
  if (prompts.length === 0 || prompts.length > MAX_PROMPTS) throw new RoomConfigError(`A room needs 1 to ${MAX_PROMPTS} prompts, not ${prompts.length}.`);
  if (config.answerMs < minAnswer || config.answerMs > maxAnswer) throw new RoomConfigError(`Answer time must be ${minAnswer / 1000}–${maxAnswer / 1000} s.`);
  if (config.mode === "tune-walk" && !config.tuneName) throw new RoomConfigError("A Tune walk needs the tune's name.");
  if (config.sheet && config.sheet.notes.length !== prompts.length) throw new RoomConfigError("A Tune walk's sheet needs one note per prompt.");
  if (config.mode === "teams") {
    const [min, max] = TEAM_COUNT_RANGE;
    if (config.teams === null || config.teams.count < min || config.teams.count > max) throw new RoomConfigError(`Teams needs ${min} to ${max} teams.`);
  } else if (config.teams !== null) {
    throw new RoomConfigError("Teams can only be set for the Teams mode.");
  }
  return config;
}

/** Sprint, Full neck and Teams: a seeded draw from a reading set's pool, already built. */
export function promptsFromPool(pool: PoolNote[], keyFifths: number, count: number, seed: number, weights?: Record<number, number>): PromptNote[] {
  return drawPrompts(pool, count, seed, weights).map((note) => ({ ...note, keyFifths }));
}

/** As promptsFromPool, building the pool from the spec. */
export function drawnPrompts(spec: ReadingSpec, count: number, seed: number, weights?: Record<number, number>): PromptNote[] {
  return promptsFromPool(buildPool(spec), spec.keyFifths, count, seed, weights);
}

/**
 * Tune walk: the tune's pitches in order (rhythm comes later, in the rhythm pass), each shown
 * alone on a staff with the key signature, so its accidental is printed whenever it differs
 * from what the signature gives that letter.
 */
export function tunePrompts(spec: ReadingSpec, notes: readonly string[]): PromptNote[] {
  const pool = buildPool({ ...spec, accidentals: "chromatic", ledgerLines: true, lowest: undefined, highest: undefined });
  return notes.map((text, i) => {
    const pitch = parsePitch(text);
    const writtenMidi = pitchMidi(pitch);
    const inReach = pool.find((n) => n.writtenMidi === writtenMidi);
    if (inReach === undefined) throw new RoomConfigError(`Note ${i + 1} (${text}) is out of reach in position ${spec.position}.`);
    if (Math.abs(pitch.alter) > 1) throw new RoomConfigError(`Note ${i + 1} (${text}): double sharps and flats are not used in Tune walks.`);
    const printed = pitch.alter === keyAlter(spec.keyFifths, pitch.letter) ? null : pitch.alter > 0 ? "sharp" : pitch.alter < 0 ? "flat" : "natural";
    return { ...inReach, written: pitchToString(pitch), printedAccidental: printed, keyFifths: spec.keyFifths };
  });
}

type SheetTune = Pick<Melody, "keyFifths" | "beatsPerBar"> & { score?: { measures: readonly NonNullable<Melody["measures"]>[number][] } };

/**
 * Tune walk: the walked notes as written (one per prompt, in order) with the score's bars up to the last of them, for
 * the stage to engrave the melody so far. Only the fields the stage draws are kept.
 */
export function walkSheet(tune: SheetTune, notes: readonly Melody["notes"][number][]): Melody {
  const lastBar = Math.max(...notes.map((n) => n.bar));
  return {
    from: notes[0]?.bar ?? 1,
    keyFifths: tune.keyFifths,
    beatsPerBar: tune.beatsPerBar,
    notes: notes.map((n) => ({ pitch: n.pitch, beats: n.beats, bar: n.bar, ...(n.onset === undefined ? {} : { onset: n.onset }), ...(n.tied ? { tied: true } : {}) })),
    measures:
      tune.score?.measures.slice(0, lastBar).map((m) => ({
        number: m.number,
        start: m.start,
        length: m.length,
        beats: m.beats,
        beatType: m.beatType,
        keyFifths: m.keyFifths,
        pickup: m.pickup,
        ...(m.repeatStart ? { repeatStart: true as const } : {}),
        ...(m.repeatEnd ? { repeatEnd: true as const } : {}),
        ...(m.ending ? { ending: { number: m.ending.number, start: m.ending.start, end: m.ending.end } } : {}),
      })) ?? null,
  };
}

/** The melody so far at prompt `index`: its notes up to that one and the bars they sit in, nothing after. */
export function melodyAt(sheet: Melody, index: number): Melody {
  const notes = sheet.notes.slice(0, index + 1);
  const bar = notes.at(-1)?.bar ?? sheet.from;
  return { ...sheet, notes, measures: sheet.measures?.slice(0, bar) ?? null };
}
