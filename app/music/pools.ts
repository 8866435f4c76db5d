// Reading sets turned into note pools, and reproducible weighted prompt draws.
import { checkReading, checkString, type Reading } from "./fretboard";
import { checkFifths, keyAlter, ledgerLineCount, spellInKey } from "./keys";
import { MusicError, parsePitch, pitchMidi, pitchToString } from "./pitch";
import { defaultSpotMap, type HomeSpot } from "./positions";
import { checkFrets, resolveTuning, type Tuning } from "./tuning";

/** naturals: no signature, no accidentals; key: the key's own notes; chromatic: every pitch. */
export type Accidentals = "naturals" | "key" | "chromatic";
const ACCIDENTAL_CHOICES: readonly Accidentals[] = ["naturals", "key", "chromatic"];

export interface ReadingSpec {
  position: number;
  tuning: string;
  frets: number;
  reading: Reading;
  strings?: number[];
  lowest?: string;
  highest?: string;
  keyFifths: number;
  accidentals: Accidentals;
  ledgerLines: boolean;
}

export interface PoolNote {
  written: string /* ASCII spelling */;
  writtenMidi: number;
  home: HomeSpot;
  ledger: boolean;
  printedAccidental: "sharp" | "flat" | "natural" | null /* what the staff must show given keyFifths */;
}

function rangeEnd(text: string | undefined, which: "Lowest" | "Highest"): number | undefined {
  if (text === undefined) return undefined;
  try {
    return pitchMidi(parsePitch(text));
  } catch (error) {
    throw new MusicError(`${which} note: ${(error as Error).message}`);
  }
}

function checkStrings(strings: number[], tuning: Tuning): Set<number> {
  if (!Array.isArray(strings) || strings.length === 0) throw new MusicError("Choose at least one string, or leave strings out for all.");
  return new Set(strings.map((s) => checkString(s, tuning)));
}

/** Notes of a reading set, low to high, each spelt as a reader expects in the key and placed on its home spot. */
export function buildPool(spec: ReadingSpec): PoolNote[] {
  if (typeof spec !== "object" || spec === null) throw new MusicError("A reading set is missing.");
  const tuning = resolveTuning(spec.tuning);
  const frets = checkFrets(spec.frets);
  const reading = checkReading(spec.reading);
  const fifths = checkFifths(spec.keyFifths);
  if (!ACCIDENTAL_CHOICES.includes(spec.accidentals)) {
    throw new MusicError(`Accidentals must be one of ${ACCIDENTAL_CHOICES.join(", ")}, not ${JSON.stringify(spec.accidentals)}.`);
  }
  if (typeof spec.ledgerLines !== "boolean") throw new MusicError("Say whether ledger lines are allowed (true or false).");
  if (spec.accidentals === "naturals" && fifths !== 0) {
    throw new MusicError('"Naturals" reads without a key signature: set the key to C major / A minor, or choose "key".');
  }
  const strings = spec.strings === undefined ? undefined : checkStrings(spec.strings, tuning);
  const lowest = rangeEnd(spec.lowest, "Lowest") ?? -Infinity;
  const highest = rangeEnd(spec.highest, "Highest") ?? Infinity;
  if (lowest > highest) throw new MusicError(`The lowest note ${spec.lowest} is above the highest note ${spec.highest}.`);

  const pool: PoolNote[] = [];
  for (const home of defaultSpotMap(spec.position, tuning, { frets, reading }).spots) {
    if (strings && !strings.has(home.string)) continue;
    if (home.writtenMidi < lowest || home.writtenMidi > highest) continue;
    const pitch = spellInKey(home.writtenMidi, fifths);
    // Major-key spellings never use doubles (keys.test.ts checks), so one sign is always enough.
    const printedAccidental =
      pitch.alter === keyAlter(fifths, pitch.letter) ? null : pitch.alter > 0 ? "sharp" : pitch.alter < 0 ? "flat" : "natural";
    if (spec.accidentals !== "chromatic" && printedAccidental !== null) continue;
    const ledger = ledgerLineCount(pitch) > 0;
    if (ledger && !spec.ledgerLines) continue;
    pool.push({ written: pitchToString(pitch), writtenMidi: home.writtenMidi, home, ledger, printedAccidental });
  }
  if (pool.length === 0) {
    throw new MusicError(
      `No notes fit this reading set (position ${spec.position}, ${tuning.name}${strings ? `, strings ${[...strings].join(", ")}` : ""}` +
        `${spec.lowest || spec.highest ? `, ${spec.lowest ?? "lowest"} to ${spec.highest ?? "highest"}` : ""}` +
        `${spec.ledgerLines ? "" : ", no ledger lines"}): allow more strings, a wider range or ledger lines.`,
    );
  }
  return pool;
}

/** mulberry32: tiny, fast, and the same sequence on server and phone for the same seed. */
export function seededRandom(seed: number): () => number {
  if (!Number.isFinite(seed)) throw new MusicError(`A seed must be a finite number, not ${String(seed)}.`);
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const MAX_PROMPTS = 10_000;

/**
 * `count` prompts drawn with probability proportional to weight (default 1; give weak notes more), never the same
 * note twice in a row when the pool has more than one. Same pool, count, seed and weights → same prompts.
 */
export function drawPrompts(pool: PoolNote[], count: number, seed: number, weights?: Record<number, number>): PoolNote[] {
  if (!Array.isArray(pool) || pool.length === 0) throw new MusicError("Cannot draw prompts from an empty pool.");
  if (!Number.isInteger(count) || count < 0 || count > MAX_PROMPTS) {
    throw new MusicError(`Prompt count must be a whole number from 0 to ${MAX_PROMPTS}, not ${String(count)}.`);
  }
  for (const [midi, weight] of Object.entries(weights ?? {})) {
    if (!Number.isFinite(weight) || weight < 0) {
      throw new MusicError(`The weight for MIDI ${midi} must be zero or more, not ${String(weight)}.`);
    }
  }
  const random = seededRandom(seed);
  const prompts: PoolNote[] = [];
  let previous: number | undefined;
  for (let i = 0; i < count; i++) {
    const others = pool.filter((n) => n.writtenMidi !== previous);
    const choices = others.length > 0 ? others : pool;
    const given = choices.map((n) => weights?.[n.writtenMidi] ?? 1);
    // If every remaining note weighs 0 (all mastered), draw evenly rather than stall the round.
    const used = given.some((w) => w > 0) ? given : given.map(() => 1);
    let r = random() * used.reduce((a, b) => a + b, 0);
    let pick = used.findLastIndex((w) => w > 0); // guards against rounding leaving r just above 0
    for (let j = 0; j < choices.length; j++) {
      r -= used[j]!;
      if (r < 0) {
        pick = j;
        break;
      }
    }
    prompts.push(choices[pick]!);
    previous = choices[pick]!.writtenMidi;
  }
  return prompts;
}
