// Written pitches in scientific pitch notation: parsing, spelling for display and speech, MIDI and frequency.
import { UserError } from "~/lib/userError";

/** Every bad input to the music engine throws this, with a message a teacher can act on. */
export class MusicError extends UserError {
  constructor(message: string) {
    super(message);
    this.name = "MusicError";
  }
}

export type Letter = "C" | "D" | "E" | "F" | "G" | "A" | "B";
export interface Pitch {
  letter: Letter;
  alter: number /* -2..2 */;
  octave: number;
}

export const LETTERS: readonly Letter[] = ["C", "D", "E", "F", "G", "A", "B"];
/** Semitones of each natural above C in the same octave. */
export const LETTER_SEMITONES: Readonly<Record<Letter, number>> = { C: 0, D: 2, E: 4, F: 5, G: 7, A: 9, B: 11 };

// MIDI covers 0..127, i.e. C-1..G9; anything outside cannot be sounded or stored.
const MIN_OCTAVE = -1;
const MAX_OCTAVE = 9;

const ACCIDENTAL_SYMBOLS: Readonly<Record<string, number>> = {
  "#": 1, "♯": 1, x: 2, "𝄪": 2, b: -1, "♭": -1, "𝄫": -2,
};
const ASCII_ACCIDENTALS: Readonly<Record<number, string>> = { [-2]: "bb", [-1]: "b", 0: "", 1: "#", 2: "##" };
export const DISPLAY_ACCIDENTALS: Readonly<Record<number, string>> = { [-2]: "𝄫", [-1]: "♭", 0: "", 1: "♯", 2: "𝄪" };
const SPOKEN_ACCIDENTALS: Readonly<Record<number, string>> = {
  [-2]: " double flat", [-1]: " flat", 0: "", 1: " sharp", 2: " double sharp",
};

function parseAccidental(text: string, whole: string): number {
  // The natural sign is accepted alone, as a reader may copy it from a score.
  if (text === "" || text === "♮") return 0;
  let alter = 0;
  let sign = 0;
  for (const ch of Array.from(text)) {
    const step = ACCIDENTAL_SYMBOLS[ch];
    if (step === undefined) {
      throw new MusicError(`"${whole}": "${ch}" is not an accidental; use #, b, x or ## and bb (or ♯ ♭ 𝄪 𝄫).`);
    }
    if (sign !== 0 && Math.sign(step) !== sign) {
      throw new MusicError(`"${whole}" mixes sharps and flats; write one kind of accidental.`);
    }
    sign = Math.sign(step);
    alter += step;
  }
  if (Math.abs(alter) > 2) {
    throw new MusicError(`"${whole}" has more than a double ${alter > 0 ? "sharp" : "flat"}; at most two are allowed.`);
  }
  return alter;
}

/** Parses "F#5", "Db4", "Fx4", "F##4", "Cb5", "Bbb3", "F♯5", "D♭4", "F𝄪4", "B𝄫3" (letter case is ignored). */
export function parsePitch(text: string): Pitch {
  if (typeof text !== "string") throw new MusicError(`A pitch must be text such as "F#4", not ${typeof text}.`);
  const whole = text.trim();
  if (whole === "") throw new MusicError('Empty pitch: write a note such as "F#4" (middle C is C4).');
  const letter = whole[0]!.toUpperCase();
  if (!(LETTERS as readonly string[]).includes(letter)) {
    throw new MusicError(`"${whole}" is not a pitch: it must start with a letter A to G.`);
  }
  const match = /^(.*?)(-?\d+)$/u.exec(whole.slice(1));
  if (!match) throw new MusicError(`"${whole}" has no octave number: write e.g. "${letter}4" (middle C is C4).`);
  const alter = parseAccidental(match[1]!, whole);
  const octave = Number(match[2]);
  return checkPitch({ letter: letter as Letter, alter, octave }, `"${whole}"`);
}

function midiOf(p: Pitch): number {
  return 12 * (p.octave + 1) + LETTER_SEMITONES[p.letter] + p.alter;
}

/** Guards a Pitch object that came from outside (JSON, forms) and returns it unchanged. */
export function checkPitch(p: Pitch, label = "The pitch"): Pitch {
  if (typeof p !== "object" || p === null || !(LETTERS as readonly string[]).includes(p.letter)) {
    throw new MusicError(`${label}: the letter must be one of A to G.`);
  }
  if (!Number.isInteger(p.alter) || Math.abs(p.alter) > 2) {
    throw new MusicError(`${label}: the accidental must be between a double flat and a double sharp.`);
  }
  if (!Number.isInteger(p.octave) || p.octave < MIN_OCTAVE || p.octave > MAX_OCTAVE) {
    throw new MusicError(`${label}: the octave must be a whole number from ${MIN_OCTAVE} to ${MAX_OCTAVE}.`);
  }
  const midi = midiOf(p);
  if (midi < 0 || midi > 127) throw new MusicError(`${label} is outside the MIDI range C-1 to G9.`);
  return p;
}

/** Accepts either form callers hold: text from a form or a Pitch from the engine. */
export function toPitch(written: string | Pitch): Pitch {
  return typeof written === "string" ? parsePitch(written) : checkPitch(written);
}

/** ASCII canonical form, so stored text round-trips through parsePitch: "Fx4" becomes "F##4". */
export function pitchToString(p: Pitch): string {
  return `${p.letter}${ASCII_ACCIDENTALS[p.alter]}${p.octave}`;
}

/** Staff-style symbols for screens: "F♯5", "B♭3", "F𝄪4". */
export function displayPitch(p: Pitch): string {
  return `${displayPitchClass(p)}${p.octave}`;
}

/** Letter and accidental without octave, as a teacher names a note: "F♯". */
export function displayPitchClass(p: Pitch): string {
  return `${p.letter}${DISPLAY_ACCIDENTALS[p.alter]}`;
}

/** Words for screen readers and spoken prompts: "F sharp 5". */
export function spokenPitch(p: Pitch): string {
  return `${p.letter}${SPOKEN_ACCIDENTALS[p.alter]} ${p.octave}`;
}

/** MIDI note number, middle C (C4) = 60; the octave belongs to the letter, so Cb4 = 59 and B#3 = 60. */
export function pitchMidi(p: Pitch): number {
  return midiOf(checkPitch(p));
}

/** Equal-tempered frequency in hertz with A4 (MIDI 69) = 440 Hz. */
export function midiFrequency(midi: number): number {
  if (typeof midi !== "number" || !Number.isFinite(midi)) {
    throw new MusicError(`A MIDI note number must be a finite number, not ${String(midi)}.`);
  }
  return 440 * 2 ** ((midi - 69) / 12);
}
