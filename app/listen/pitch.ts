// Heard frequencies as equal-tempered notes: the inverse of app/music's midiFrequency, with a reference that can move.
import { midiFrequency, MusicError } from "~/music/pitch";

/** ISO 16 concert pitch; the tune-up check states it. */
export const A4_HZ = 440;
const A4_MIDI = 69;

function checkHz(hz: number, what: string): number {
  if (typeof hz !== "number" || !Number.isFinite(hz) || hz <= 0) {
    throw new MusicError(`${what} must be a positive number of hertz, not ${String(hz)}.`);
  }
  return hz;
}

/** Fractional MIDI number of a frequency in 12-TET: 440 Hz → 69, 445 Hz → about 69.2. */
export function hzToMidi(hz: number, a4Hz = A4_HZ): number {
  return A4_MIDI + 12 * Math.log2(checkHz(hz, "A frequency") / checkHz(a4Hz, "The reference A4"));
}

/** Frequency of a (possibly fractional) MIDI number, with A4 at `a4Hz`. */
export function midiToHz(midi: number, a4Hz = A4_HZ): number {
  return midiFrequency(midi) * (checkHz(a4Hz, "The reference A4") / A4_HZ);
}

/** The nearest equal-tempered note and how far the sound is from it: cents within ±50, positive = sharp. */
export function nearestNote(hz: number, a4Hz = A4_HZ): { midi: number; cents: number } {
  const exact = hzToMidi(hz, a4Hz);
  const midi = Math.round(exact);
  return { midi, cents: (exact - midi) * 100 };
}

/** Cents from `fromHz` up to `toHz` (negative when lower). */
export function centsBetween(fromHz: number, toHz: number): number {
  return 1200 * Math.log2(checkHz(toHz, "A frequency") / checkHz(fromHz, "A frequency"));
}
