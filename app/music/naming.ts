// Note names the way a class says them: letters, fixed-do solfège or German.
import { DISPLAY_ACCIDENTALS, displayPitch, displayPitchClass, type Letter, type Pitch } from "./pitch";

export const NOTE_NAMINGS = ["letters", "solfege", "german"] as const;
export type NoteNaming = (typeof NOTE_NAMINGS)[number];
export const DEFAULT_NAMING: NoteNaming = "letters";

/** What a teacher or student picks from, with the seven naturals so the choice is plain. */
export const NOTE_NAMING_LABELS: Readonly<Record<NoteNaming, string>> = {
  letters: "Letters: C D E F G A B",
  solfege: "Solfège (fixed do): Do Re Mi Fa Sol La Si",
  german: "German: C D E F G A H (B is B♭)",
};

export function isNoteNaming(value: unknown): value is NoteNaming {
  return typeof value === "string" && (NOTE_NAMINGS as readonly string[]).includes(value);
}

const SOLFEGE: Readonly<Record<Letter, string>> = { C: "Do", D: "Re", E: "Mi", F: "Fa", G: "Sol", A: "La", B: "Si" };

/**
 * German names as German teachers write them: -is per sharp, -es per flat; a vowel letter takes
 * only "s" (Es, As; Eses, Asas); B natural is H, its flat is B and its double flat Heses.
 */
function german(letter: Letter, alter: number): string {
  const base = letter === "B" ? "H" : letter;
  if (alter > 0) return base + "is".repeat(alter);
  if (alter === 0) return base;
  if (letter === "B") return alter === -1 ? "B" : "Heses";
  if (letter === "A") return alter === -1 ? "As" : "Asas";
  return base + (letter === "E" ? "s" : "es") + (alter === -2 ? "es" : "");
}

/**
 * A note's name in words. The octave, when asked for, stays in scientific numbering (middle C is 4)
 * in every naming, so "Sol4" and "G4" are the same written note.
 */
export function noteName(p: Pitch, naming: NoteNaming = DEFAULT_NAMING, options: { octave?: boolean } = {}): string {
  const octave = options.octave ? String(p.octave) : "";
  switch (naming) {
    case "solfege":
      return `${SOLFEGE[p.letter]}${DISPLAY_ACCIDENTALS[p.alter]}${octave}`;
    case "german":
      return `${german(p.letter, p.alter)}${octave}`;
    default:
      return options.octave ? displayPitch(p) : displayPitchClass(p);
  }
}
