// Where written notes sit on the neck.
import { MusicError, pitchMidi, toPitch, type Pitch } from "./pitch";
import { checkFrets, MAX_FRETS, type Tuning } from "./tuning";

/** guitar: the treble clef with a small 8 below, so sounding = written − 12; concert: sounding = written. */
export type Reading = "guitar" | "concert";
export interface Spot {
  string: number /* 1 = highest */;
  fret: number;
}

const GUITAR_OCTAVE = 12;

export function checkReading(reading: Reading): Reading {
  if (reading !== "guitar" && reading !== "concert") {
    throw new MusicError(`Reading must be "guitar" (sounds an octave below written) or "concert", not ${JSON.stringify(reading)}.`);
  }
  return reading;
}

export function soundingMidi(writtenMidi: number, reading: Reading = "guitar"): number {
  return checkReading(reading) === "guitar" ? writtenMidi - GUITAR_OCTAVE : writtenMidi;
}

/** Inverse of soundingMidi: which written note a sounding pitch is read as. */
export function writtenMidiFor(sounding: number, reading: Reading = "guitar"): number {
  return checkReading(reading) === "guitar" ? sounding + GUITAR_OCTAVE : sounding;
}

/** Every (string, fret) that sounds this MIDI note on a neck with `frets` frets, string 1 first. */
export function spotsForSounding(soundingMidi: number, tuning: Tuning, frets: number): Spot[] {
  checkFrets(frets);
  const spots: Spot[] = [];
  tuning.strings.forEach((open, i) => {
    const fret = soundingMidi - open;
    if (fret >= 0 && fret <= frets) spots.push({ string: i + 1, fret });
  });
  return spots;
}

/** Every spot for a written note; enharmonic spellings (C#4, Db4) share spots because only the MIDI number counts. */
export function spotsFor(written: string | Pitch, opts: { tuning: Tuning; frets: number; reading?: Reading }): Spot[] {
  return spotsForSounding(soundingMidi(pitchMidi(toPitch(written)), opts.reading), opts.tuning, opts.frets);
}

export function checkString(string: number, tuning: Tuning): number {
  if (!Number.isInteger(string) || string < 1 || string > tuning.strings.length) {
    throw new MusicError(`String ${String(string)} is not on this neck: ${tuning.name} has strings 1 to ${tuning.strings.length}.`);
  }
  return string;
}

/** Guards a spot from outside (a tap, a teacher's edit) against the tuning; returns it unchanged. */
export function checkSpot(spot: Spot, tuning: Tuning): Spot {
  if (typeof spot !== "object" || spot === null || !Number.isInteger(spot.string) || !Number.isInteger(spot.fret)) {
    throw new MusicError("A spot needs a whole-number string and fret.");
  }
  checkString(spot.string, tuning);
  if (spot.fret < 0 || spot.fret > MAX_FRETS) {
    throw new MusicError(`Fret ${spot.fret} is not on a neck: frets run from 0 (open string) to ${MAX_FRETS}.`);
  }
  return spot;
}

/** MIDI note a spot sounds. */
export function spotSounding(spot: Spot, tuning: Tuning): number {
  checkSpot(spot, tuning);
  return tuning.strings[spot.string - 1]! + spot.fret;
}

/** Distance from the nut to fret n for scale length L: each fret shortens the string by a factor of 2^(−1/12). */
export function fretDistance(n: number, scaleLength: number): number {
  if (!Number.isFinite(n) || n < 0) throw new MusicError(`Fret number must be zero or more, not ${String(n)}.`);
  if (!Number.isFinite(scaleLength) || scaleLength <= 0) {
    throw new MusicError(`Scale length must be a positive number, not ${String(scaleLength)}.`);
  }
  return scaleLength * (1 - 2 ** (-n / 12));
}
