// The tune-up check's readings: which open string a sound is, how far off it is in words, and whether the whole guitar is off alike.
import { defaultSpelling } from "~/music/keys";
import { displayPitch } from "~/music/pitch";
import { TUNINGS } from "~/music/tuning";
import { A4_HZ, hzToMidi } from "./pitch";
import { plural } from "~/lib/plural";

/** Standard tuning's open strings as sounding MIDI numbers, index 0 = string 1 (E4) … index 5 = string 6 (E2). */
export const OPEN_STRINGS: readonly number[] = TUNINGS.standard.strings;

// Within 5 cents most listeners hear no beating against a tuned string (common practice, no source).
export const IN_TUNE_CENTS = 5;
// Beyond a quarter tone a player turns the peg a real amount, not "a little" (common practice, no source).
const A_LITTLE_CENTS = 25;

export interface StringReading {
  string: number /* 1..6, 1 = high E */;
  target: string /* the open string's note, e.g. "E2" */;
  cents: number /* positive = sharp */;
  words: string;
}

function centsWords(cents: number): string {
  const size = Math.round(Math.abs(cents));
  if (size <= IN_TUNE_CENTS) return `in tune (${size === 0 ? "spot on" : `${size} cents off`})`;
  const side = cents < 0 ? "flat" : "sharp";
  const turn = cents < 0 ? "tighten" : "loosen";
  if (size >= 100) {
    const halfSteps = Math.round(size / 100);
    return `about ${plural(halfSteps, "half step")} ${side} — ${turn} it a lot`;
  }
  return `${size} cents ${side} — ${turn} ${size <= A_LITTLE_CENTS ? "a little" : "it"}`;
}

/** "E2" for string 6. */
export function openStringName(string: number): string {
  return displayPitch(defaultSpelling(OPEN_STRINGS[string - 1]!));
}

/** The open string nearest to a heard frequency and how far the sound is from it. */
export function readString(hz: number, a4Hz = A4_HZ): StringReading {
  const heard = hzToMidi(hz, a4Hz);
  let index = 0;
  for (let i = 1; i < OPEN_STRINGS.length; i++) {
    if (Math.abs(heard - OPEN_STRINGS[i]!) < Math.abs(heard - OPEN_STRINGS[index]!)) index = i;
  }
  const target = OPEN_STRINGS[index]!;
  const cents = (heard - target) * 100;
  return { string: index + 1, target: openStringName(index + 1), cents, words: centsWords(cents) };
}

/** Readings off together by at most this much count as one offset (common practice, no source). */
const SAME_OFFSET_SPREAD_CENTS = 20;
// Fewer strings than this cannot tell a shifted guitar from two strings that happen to agree.
const MIN_STRINGS_FOR_OFFSET = 3;
// Below this a whole-guitar offset is not worth a hint (it is within the per-string "a little").
const MIN_OFFSET_CENTS = 10;

/** A hint when every read string is off by about the same amount, or null when they are not (or too few were read). */
export function wholeGuitarOffset(readings: { string: number; cents: number }[]): { cents: number; hint: string } | null {
  const latest = new Map<number, number>();
  for (const r of readings) if (Number.isFinite(r.cents)) latest.set(r.string, r.cents);
  const cents = [...latest.values()];
  if (cents.length < MIN_STRINGS_FOR_OFFSET) return null;
  const spread = Math.max(...cents) - Math.min(...cents);
  const mean = cents.reduce((a, b) => a + b, 0) / cents.length;
  if (spread > SAME_OFFSET_SPREAD_CENTS || Math.abs(mean) < MIN_OFFSET_CENTS) return null;
  const size = Math.round(Math.abs(mean));
  const side = mean < 0 ? "flat" : "sharp";
  const halfSteps = Math.round(mean / 100);
  if (halfSteps !== 0 && Math.abs(mean - halfSteps * 100) <= SAME_OFFSET_SPREAD_CENTS / 2) {
    const n = Math.abs(halfSteps);
    const steps = plural(n, "half step");
    return {
      cents: mean,
      hint:
        mean < 0
          ? `Every string is about ${steps} low: the guitar is tuned down. Tune each string up to the note shown, or your answers will read ${steps} flat.`
          : `Every string is about ${steps} high: is a capo on, or the guitar tuned up? Take the capo off or tune each string down to the note shown.`,
    };
  }
  // The reference the guitar matches, so the student can recognise a tuner set to another A.
  const reference = Math.round(A4_HZ * 2 ** (mean / 1200));
  return {
    cents: mean,
    hint: `Every string is about ${size} cents ${side}: the guitar seems tuned to A4 = ${reference} Hz instead of ${A4_HZ} Hz. Tune each string ${mean < 0 ? "up" : "down"} by about the same amount.`,
  };
}
