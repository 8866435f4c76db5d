// Why a tap was wrong, in words a student understands.
import { checkReading, soundingMidi, spotSounding, spotsForSounding, writtenMidiFor, type Reading, type Spot } from "./fretboard";
import { checkFifths, keyAlter, spellInKey } from "./keys";
import { displayPitch, displayPitchClass, MusicError, parsePitch, pitchMidi, type Pitch } from "./pitch";
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
 * else; "no-answer" is the live round's word for a prompt left unanswered.
 */
export const MISTAKE_ICONS: Record<MistakeKind | "no-answer", string> = {
  "home-spot": "✓",
  "other-spot": "◐",
  "octave-off": "⇅",
  "key-signature-miss": "♯?",
  "accidental-miss": "♮?",
  "half-step-off": "½",
  "string-over": "⇵",
  "wide-miss": "✗",
  "no-answer": "…",
};

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
}): Diagnosis {
  const { note, tapped, tuning } = input;
  const fifths = checkFifths(input.keyFifths);
  const reading = checkReading(input.reading);
  const homeOnly = input.homeOnly ?? false;
  const written = checkNote(note);
  const expected = soundingMidi(note.writtenMidi, reading);
  const semitones = spotSounding(tapped, tuning) - expected;
  const home = `Home spot: ${spotWords(note.home)}.`;
  const playedWritten = writtenMidiFor(expected + semitones, reading);
  const played = displayPitchClass(spellInKey(playedWritten, fifths));
  const wanted = displayPitchClass(written);
  const result = (kind: MistakeKind, message: string): Diagnosis => {
    const pitchRight = semitones === 0;
    return { kind, pitchRight, correct: kind === "home-spot" || (kind === "other-spot" && !homeOnly), semitones, message };
  };

  if (sameSpot(tapped, note.home)) return result("home-spot", `Right note on its home spot.`);
  if (semitones === 0) {
    return result(
      "other-spot",
      homeOnly
        ? `Right note, but your home spot is ${spotWords(note.home)}.`
        : `Right note. In this position its home spot is ${spotWords(note.home)}.`,
    );
  }
  if (semitones % 12 === 0) {
    const octaves = Math.abs(semitones) / 12;
    return result(
      "octave-off",
      `Right letter, but ${octaves === 1 ? "an octave" : `${octaves} octaves`} too ${semitones > 0 ? "high" : "low"}: ` +
        `you played ${displayPitch(spellInKey(playedWritten, fifths))}, the note is ${displayPitch(written)}. ${home}`,
    );
  }
  const signature = keyAlter(fifths, written.letter);
  if (note.printedAccidental === null) {
    // Only the written letter played without the key's sharp or flat is a key-signature miss. A slip
    // to the neighbouring letter (B→C, E→F) or a sign the key does not give is a half step off:
    // nothing shows the student misread the signature.
    if (signature !== 0 && semitones === -signature) {
      return result("key-signature-miss", `The key signature makes this ${wanted}; you played ${written.letter}. ${home}`);
    }
  } else {
    // Misreading the sign: playing the letter as the signature has it, as a natural, or with the opposite sign.
    const playedAlter = written.alter + semitones;
    if ([signature, 0, -written.alter].includes(playedAlter)) {
      return result(
        "accidental-miss",
        `The ${note.printedAccidental} sign before this note makes it ${wanted}; you played ${played}. ${home}`,
      );
    }
  }
  const neighbour = spotsForSounding(expected, tuning, MAX_FRETS)
    .sort((a, b) => Number(sameSpot(b, note.home)) - Number(sameSpot(a, note.home)))
    .find((s) => s.fret === tapped.fret && Math.abs(s.string - tapped.string) === 1);
  if (neighbour) {
    return result(
      "string-over",
      `Right fret, wrong string: ${wanted} is on string ${neighbour.string}; you played string ${tapped.string}. ${home}`,
    );
  }
  const direction = semitones > 0 ? "high" : "low";
  if (Math.abs(semitones) === 1) {
    return result("half-step-off", `A half step (one fret) too ${direction}: you played ${played}, the note is ${wanted}. ${home}`);
  }
  return result(
    "wide-miss",
    `You played ${played}, ${Math.abs(semitones)} half steps ${semitones > 0 ? "above" : "below"} ${wanted}. ${home}`,
  );
}
