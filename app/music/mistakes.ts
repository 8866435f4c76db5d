// Why a tap was wrong, in words a student understands.
import { checkReading, soundingMidi, spotSounding, spotsForSounding, writtenMidiFor, type Reading, type Spot } from "./fretboard";
import { checkFifths, keyAlter, spellInKey } from "./keys";
import { noteName, type NoteNaming } from "./naming";
import { MusicError, parsePitch, pitchMidi, type Pitch } from "./pitch";
import type { PoolNote } from "./pools";
import { MAX_FRETS, type Tuning } from "./tuning";

export type MistakeKind =
  | "home-spot"
  | "other-spot"
  | "octave-off"
  | "key-signature-miss"
  | "accidental-miss"
  | "half-step-off"
  | "string-over"
  | "wide-miss";

export const MISTAKE_LABELS: Record<MistakeKind, string> = {
  "home-spot": "home spot",
  "other-spot": "other spot",
  "octave-off": "octave off",
  "key-signature-miss": "key-signature miss",
  "accidental-miss": "accidental miss",
  "half-step-off": "half step off",
  "string-over": "string over",
  "wide-miss": "wide miss",
};

/**
 * An icon per mistake kind beside its label, so a colour-blind player reads the same as everyone
 * else; "no-answer" is the live round's word for a prompt left unanswered. Names of the app's own
 * drawn icons (app/components/Icon.tsx): the shipped font has none of these signs.
 */
export const MISTAKE_ICONS = {
  "home-spot": "check",
  "other-spot": "otherSpot",
  "octave-off": "octave",
  "key-signature-miss": "sharp",
  "accidental-miss": "natural",
  "half-step-off": "halfStep",
  "string-over": "stringOver",
  "wide-miss": "cross",
  "no-answer": "noAnswer",
} as const satisfies Record<MistakeKind | "no-answer", string>;

export interface Diagnosis {
  kind: MistakeKind;
  pitchRight: boolean;
  /** Whether the tap scores: the home spot always, another spot of the right pitch unless homeOnly. */
  correct: boolean;
  semitones: number /* tapped − expected sounding */;
  message: string /* plain words */;
}

const spotWords = (s: Spot) => `string ${s.string}, fret ${s.fret}`;
const sameSpot = (a: Spot, b: Spot) => a.string === b.string && a.fret === b.fret;

function checkNote(note: PoolNote): Pitch {
  if (typeof note !== "object" || note === null || typeof note.home !== "object" || note.home === null) {
    throw new MusicError("The expected note is missing or has no home spot.");
  }
  const written = parsePitch(note.written);
  if (pitchMidi(written) !== note.writtenMidi) {
    throw new MusicError(`The expected note "${note.written}" does not match its MIDI number ${String(note.writtenMidi)}.`);
  }
  return written;
}

interface Context {
  note: PoolNote;
  written: Pitch;
  fifths: number;
  reading: Reading;
  expected: number /* sounding MIDI of the written note */;
  semitones: number /* answered − expected sounding */;
  homeOnly: boolean;
  naming?: NoteNaming;
}

function context(input: { note: PoolNote; keyFifths: number; reading: Reading; homeOnly?: boolean; naming?: NoteNaming }, sounding: (expected: number) => number): Context {
  const fifths = checkFifths(input.keyFifths);
  const reading = checkReading(input.reading);
  const written = checkNote(input.note);
  const expected = soundingMidi(input.note.writtenMidi, reading);
  return { note: input.note, written, fifths, reading, expected, semitones: sounding(expected) - expected, homeOnly: input.homeOnly ?? false, naming: input.naming };
}

const resultOf =
  (c: Context) =>
  (kind: MistakeKind, message: string): Diagnosis => ({
    kind,
    pitchRight: c.semitones === 0,
    correct: kind === "home-spot" || (kind === "other-spot" && !c.homeOnly),
    semitones: c.semitones,
    message,
  });

const nameIn = (c: Context) => (p: Pitch, octave = false) => noteName(p, c.naming, { octave });
const playedName = (c: Context, octave = false) => nameIn(c)(spellInKey(writtenMidiFor(c.expected + c.semitones, c.reading), c.fifths), octave);

/**
 * The misreadings a wrong pitch shows, whatever the spot: octave off (right letter), key-signature miss,
 * accidental miss (both say what on the page was misread). `hint` ends each message (where to play it).
 */
function misread(c: Context, hint: string): Diagnosis | null {
  const { note, written, fifths, semitones } = c;
  const result = resultOf(c);
  const name = nameIn(c);
  const wanted = name(written);
  if (semitones % 12 === 0) {
    const octaves = Math.abs(semitones) / 12;
    return result(
      "octave-off",
      `Right letter, but ${octaves === 1 ? "an octave" : `${octaves} octaves`} too ${semitones > 0 ? "high" : "low"}: ` +
        `you played ${playedName(c, true)}, the note is ${name(written, true)}. ${hint}`,
    );
  }
  const signature = keyAlter(fifths, written.letter);
  if (note.printedAccidental === null) {
    // Only the written letter played without the key's sharp or flat is a key-signature miss. A slip
    // to the neighbouring letter (B→C, E→F) or a sign the key does not give is a half step off:
    // nothing shows the student misread the signature.
    if (signature !== 0 && semitones === -signature) {
      return result("key-signature-miss", `The key signature makes this ${wanted}; you played ${name({ ...written, alter: 0 })}. ${hint}`);
    }
  } else {
    // Misreading the sign: playing the letter as the signature has it, as a natural, or with the opposite sign.
    const playedAlter = written.alter + semitones;
    if ([signature, 0, -written.alter].includes(playedAlter)) {
      return result("accidental-miss", `The ${note.printedAccidental} sign before this note makes it ${wanted}; you played ${playedName(c)}. ${hint}`);
    }
  }
  return null;
}

/** How far off a wrong pitch is when nothing on the page explains it: half step off or wide miss. */
function distance(c: Context, hint: string): Diagnosis {
  const { semitones } = c;
  const wanted = nameIn(c)(c.written);
  if (Math.abs(semitones) === 1) {
    return resultOf(c)("half-step-off", `A half step (one fret) too ${semitones > 0 ? "high" : "low"}: you played ${playedName(c)}, the note is ${wanted}. ${hint}`);
  }
  return resultOf(c)("wide-miss", `You played ${playedName(c)}, ${Math.abs(semitones)} half steps ${semitones > 0 ? "above" : "below"} ${wanted}. ${hint}`);
}

/**
 * Names the mistake. When several fit, the first in this order wins, most specific cause first:
 * home spot → other spot → octave off (right letter) → key-signature miss → accidental miss (both say what on
 * the page was misread) → string over (the right fret, so the eye slipped a string) → half step off → wide miss.
 */
export function diagnose(input: {
  note: PoolNote;
  keyFifths: number;
  tapped: Spot;
  tuning: Tuning;
  reading: Reading;
  homeOnly?: boolean;
  /** How the message names notes: the school's or the student's choice (letters by default). */
  naming?: NoteNaming;
}): Diagnosis {
  const { note, tapped, tuning } = input;
  const c = context(input, () => spotSounding(tapped, tuning));
  const result = resultOf(c);
  const home = `Home spot: ${spotWords(note.home)}.`;
  if (sameSpot(tapped, note.home)) return result("home-spot", `Right note on its home spot.`);
  if (c.semitones === 0) {
    return result(
      "other-spot",
      c.homeOnly
        ? `Right note, but your home spot is ${spotWords(note.home)}.`
        : `Right note. In this position its home spot is ${spotWords(note.home)}.`,
    );
  }
  const misreading = misread(c, home);
  if (misreading) return misreading;
  const neighbour = spotsForSounding(c.expected, tuning, MAX_FRETS)
    .sort((a, b) => Number(sameSpot(b, note.home)) - Number(sameSpot(a, note.home)))
    .find((s) => s.fret === tapped.fret && Math.abs(s.string - tapped.string) === 1);
  if (neighbour) {
    return result(
      "string-over",
      `Right fret, wrong string: ${nameIn(c)(c.written)} is on string ${neighbour.string}; you played string ${tapped.string}. ${home}`,
    );
  }
  return distance(c, home);
}

/**
 * A note played on a guitar and heard by a microphone (`heardMidi`, sounding). A microphone cannot tell the
 * string, so the spot kinds (other spot, string over) never apply: a right pitch is stored as "home-spot" —
 * the full-credit kind every report counts — and the answer's input ("played") says the spot was not seen.
 * Order: right pitch → octave off → key-signature miss → accidental miss → half step off → wide miss.
 */
export function diagnosePlayed(input: { note: PoolNote; keyFifths: number; heardMidi: number; reading: Reading; naming?: NoteNaming }): Diagnosis {
  if (!Number.isInteger(input.heardMidi) || input.heardMidi < 0 || input.heardMidi > 127) {
    throw new MusicError(`A heard note is a MIDI number from 0 to 127, not ${String(input.heardMidi)}.`);
  }
  const c = context(input, () => input.heardMidi);
  const hint = `Its home spot: ${spotWords(input.note.home)}.`;
  if (c.semitones === 0) return resultOf(c)("home-spot", `Right note. A microphone cannot tell the string: play it at its home spot, ${spotWords(input.note.home)}.`);
  return misread(c, hint) ?? distance(c, hint);
}
