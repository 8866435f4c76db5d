// Keys, key signatures, accidentals within a bar, spelling a pitch as a reader expects, and the treble staff.
import {
  checkPitch,
  displayPitchClass,
  LETTER_SEMITONES,
  LETTERS,
  MusicError,
  parsePitch,
  pitchMidi,
  type Letter,
  type Pitch,
} from "./pitch";

export interface Key {
  id: string /* "G-major", "E-minor" */;
  name: string /* "G major" */;
  tonic: string;
  mode: "major" | "minor";
  fifths: number /* −7..7 */;
}

// The 15 keys a signature can show, from seven flats to seven sharps.
const MAJOR_TONICS = ["Cb", "Gb", "Db", "Ab", "Eb", "Bb", "F", "C", "G", "D", "A", "E", "B", "F#", "C#"];

function makeKey(tonic: string, mode: Key["mode"], fifths: number): Key {
  const name = `${displayPitchClass(parsePitch(`${tonic}4`))} ${mode}`;
  return { id: `${tonic}-${mode}`, name, tonic, mode, fifths };
}

/**
 * A major key's relative minor is its sixth degree: five letters and nine half steps up (common practice, no
 * source). Worked out here rather than taken from a music library, which the pad would otherwise download.
 */
function relativeMinorTonic(majorTonic: string): string {
  const { letter, alter } = parsePitch(`${majorTonic}4`);
  const minorLetter = LETTERS[(LETTERS.indexOf(letter) + 5) % 7]!;
  const minorAlter = ((LETTER_SEMITONES[letter] + alter + 9 - LETTER_SEMITONES[minorLetter] + 18) % 12) - 6;
  return minorLetter + (minorAlter > 0 ? "#" : "b").repeat(Math.abs(minorAlter));
}

// MAJOR_TONICS runs round the circle of fifths, so each key's place in it is its signature: Cb −7 … C# +7.
const majors = MAJOR_TONICS.map((t, i) => ({ major: makeKey(t, "major", i - 7), minorTonic: relativeMinorTonic(t) }));
export const KEYS: Key[] = [
  ...majors.map((m) => m.major),
  ...majors.map((m) => makeKey(m.minorTonic, "minor", m.major.fifths)),
];

export function checkFifths(fifths: number): number {
  if (!Number.isInteger(fifths) || fifths < -7 || fifths > 7) {
    throw new MusicError(`A key signature has from 7 flats (−7) to 7 sharps (7), not ${String(fifths)}.`);
  }
  return fifths;
}

const SHARP_ORDER: readonly Letter[] = ["F", "C", "G", "D", "A", "E", "B"];
const FLAT_ORDER: readonly Letter[] = ["B", "E", "A", "D", "G", "C", "F"];

/** +1, −1 or 0: what the signature with `fifths` (sharps > 0, flats < 0) does to every note of this letter. */
export function keyAlter(fifths: number, letter: Letter): number {
  checkFifths(fifths);
  if (fifths > 0) return SHARP_ORDER.indexOf(letter) < fifths ? 1 : 0;
  if (fifths < 0) return FLAT_ORDER.indexOf(letter) < -fifths ? -1 : 0;
  return 0;
}

export type PrintedAccidental = "sharp" | "flat" | "natural" | "double-sharp" | "double-flat";
export interface StaffNote {
  letter: Letter;
  octave: number;
  accidental?: PrintedAccidental;
}
const ACCIDENTAL_ALTER: Readonly<Record<PrintedAccidental, number>> = {
  "double-flat": -2, flat: -1, natural: 0, sharp: 1, "double-sharp": 2,
};

/**
 * Pitches of one bar as read. Rule (modern engraving practice): a printed accidental holds for the same letter in
 * the same octave until the bar line; other octaves of that letter still follow the key signature; a natural
 * cancels the signature the same way. Accidentals are absolute: a sharp on B in F major means B♯, not B♮.
 */
export function readStaffBar(fifths: number, notes: StaffNote[]): Pitch[] {
  checkFifths(fifths);
  if (!Array.isArray(notes)) throw new MusicError("A bar must be a list of notes.");
  const carried = new Map<string, number>();
  return notes.map((note, i) => {
    if (note?.accidental !== undefined && !Object.hasOwn(ACCIDENTAL_ALTER, note.accidental)) {
      throw new MusicError(`Note ${i + 1} of the bar: unknown accidental ${JSON.stringify(note.accidental)}.`);
    }
    const place = `${note?.letter}${note?.octave}`;
    if (note?.accidental !== undefined) carried.set(place, ACCIDENTAL_ALTER[note.accidental]);
    const alter = carried.get(place) ?? keyAlter(fifths, note?.letter);
    return checkPitch({ letter: note?.letter, alter, octave: note?.octave }, `Note ${i + 1} of the bar`);
  });
}

const ALTER_ACCIDENTAL: Readonly<Record<number, PrintedAccidental>> = { [-2]: "double-flat", [-1]: "flat", 0: "natural", 1: "sharp", 2: "double-sharp" };

/**
 * The signs to print for one bar's pitches, the inverse of readStaffBar (same rule: an accidental holds for its
 * letter and octave until the bar line; otherwise the key signature applies). A sign is printed exactly where a
 * reader would otherwise take another pitch — so C♯ then C♮ in one bar gets its natural. Courtesy rule (common
 * practice, no source): when `previousBar` altered a letter and octave away from the key, the first note of that
 * letter and octave in this bar prints its sign too, though the bar line already cancelled the alteration.
 */
export function writeStaffBar(fifths: number, pitches: readonly Pitch[], previousBar: readonly Pitch[] = []): StaffNote[] {
  checkFifths(fifths);
  const courtesy = new Set(previousBar.filter((p) => p.alter !== keyAlter(fifths, p.letter)).map((p) => `${p.letter}${p.octave}`));
  const carried = new Map<string, number>();
  return pitches.map((p) => {
    const place = `${p.letter}${p.octave}`;
    const expected = carried.get(place) ?? keyAlter(fifths, p.letter);
    const sign = p.alter !== expected || (courtesy.has(place) && !carried.has(place));
    carried.set(place, p.alter);
    const accidental = ALTER_ACCIDENTAL[p.alter];
    if (!accidental) throw new MusicError(`${p.letter}${p.octave} with an alteration of ${p.alter} cannot be written with one sign.`);
    return sign ? { letter: p.letter, octave: p.octave, accidental } : { letter: p.letter, octave: p.octave };
  });
}

function checkMidi(midi: number): number {
  if (!Number.isInteger(midi) || midi < 0 || midi > 127) {
    throw new MusicError(`A MIDI note number must be a whole number from 0 to 127, not ${String(midi)}.`);
  }
  return midi;
}

function pitchFromMidi(midi: number, letter: Letter, alter: number): Pitch {
  return { letter, alter, octave: Math.floor((midi - LETTER_SEMITONES[letter] - alter) / 12) - 1 };
}

type Spelling = { letter: Letter; alter: number };

/**
 * Spelling a reader expects for each pitch class: the key's own note when the pitch is diatonic; otherwise a
 * one-step change of a key note, choosing (1) in minor, the raised 6th or 7th degree, which keeps its letter
 * (G♯ in A minor, F𝄪 in G♯ minor); (2) the smaller accidental, so a natural beats a sharp or flat (F♮ in G major,
 * not E♯); (3) raising in sharp keys and C, lowering in flat keys (C♯ in G major, D♭ in F major).
 * Major keys never need a double.
 */
function buildSpellings(fifths: number, mode: Key["mode"]): Spelling[] {
  // A fifth up is four letters up, so the major tonic's letter index is 4 × fifths (mod 7).
  const majorTonic = (((4 * fifths) % 7) + 7) % 7;
  const raisedMinorDegrees = [LETTERS[(majorTonic + 3) % 7], LETTERS[(majorTonic + 4) % 7]];
  const direction = fifths >= 0 ? 1 : -1;
  const best: { spelling: Spelling; score: number }[] = [];
  for (const letter of LETTERS) {
    const base = keyAlter(fifths, letter);
    for (const change of [0, 1, -1]) {
      const pc = (((LETTER_SEMITONES[letter] + base + change) % 12) + 12) % 12;
      const score =
        change === 0
          ? -1
          : (mode === "minor" && change === 1 && raisedMinorDegrees.includes(letter) ? 0 : 100) +
            Math.abs(base + change) * 10 +
            (change === direction ? 0 : 1);
      if (best[pc] === undefined || score < best[pc].score) best[pc] = { spelling: { letter, alter: base + change }, score };
    }
  }
  return best.map((b) => b.spelling);
}

// 15 keys × 2 modes of 12 entries, filled on first use so spelling in a hot loop is a lookup.
const spellingTables = new Map<string, Spelling[]>();

export function spellInKey(midi: number, fifths: number, mode: Key["mode"] = "major"): Pitch {
  checkMidi(midi);
  checkFifths(fifths);
  if (mode !== "major" && mode !== "minor") throw new MusicError(`A key's mode is "major" or "minor", not ${JSON.stringify(mode)}.`);
  const id = `${fifths}${mode}`;
  let table = spellingTables.get(id);
  if (!table) spellingTables.set(id, (table = buildSpellings(fifths, mode)));
  const { letter, alter } = table[midi % 12]!;
  return pitchFromMidi(midi, letter, alter);
}

/** Spelling used where no key applies (home-spot maps, messages): C major's choice, i.e. sharps. */
export function defaultSpelling(midi: number): Pitch {
  return spellInKey(midi, 0);
}

/** "G-major", "G major", "F♯ major", "Em", "E minor", "bbm", "G" (a bare tonic is major). */
export function resolveKey(idOrName: string): Key {
  if (typeof idOrName !== "string") throw new MusicError("A key must be named in text, such as \"G major\" or \"Em\".");
  const match = /^([A-Ga-g])([#♯b♭]?)[\s_-]*(major|maj|minor|min|m)?$/iu.exec(idOrName.trim());
  if (!match) {
    throw new MusicError(`"${idOrName}" is not a key: write a tonic and mode such as "G major", "E minor" or "Em".`);
  }
  const tonic = match[1]!.toUpperCase() + ({ "♯": "#", "♭": "b" }[match[2]!] ?? match[2]!.toLowerCase());
  const mode: Key["mode"] = ["m", "min", "minor"].includes((match[3] ?? "").toLowerCase()) ? "minor" : "major";
  const found = KEYS.find((k) => k.id === `${tonic}-${mode}`);
  if (found) return found;
  const pitchClass = (t: string) => pitchMidi(parsePitch(`${t}4`)) % 12;
  const twin = KEYS.find((k) => k.mode === mode && pitchClass(k.tonic) === pitchClass(tonic));
  throw new MusicError(
    `${tonic} ${mode} needs more than 7 sharps or flats, so Fretcall does not offer it${twin ? `; use its enharmonic twin ${twin.name}` : ""}.`,
  );
}

// Treble staff in steps (octave × 7 + letter index): D4 hangs below the bottom line E4, G5 sits on the top line F5.
const LOWEST_FREE_STEP = 4 * 7 + 1; // D4
const HIGHEST_FREE_STEP = 5 * 7 + 4; // G5

/** How many ledger lines a written pitch needs on the treble staff (0 from D4 to G5); the letter counts, not the sound. */
export function ledgerLineCount(p: Pitch): number {
  const step = p.octave * 7 + LETTERS.indexOf(p.letter);
  if (step < LOWEST_FREE_STEP) return Math.ceil((LOWEST_FREE_STEP - step) / 2);
  if (step > HIGHEST_FREE_STEP) return Math.ceil((step - HIGHEST_FREE_STEP) / 2);
  return 0;
}
