// Words for what the staff shows, for screen readers and captions, and the staff geometry the drawing needs.
import { keyAlter, type PrintedAccidental } from "~/music/keys";
import { LETTERS, spokenPitch, type Pitch } from "~/music/pitch";
import { plural } from "~/lib/plural";

/** Half-steps of the staff (line, space, line …) above the bottom line E4: 0 = bottom line, 8 = top line F5. */
export function staffPosition(p: Pitch): number {
  return p.octave * 7 + LETTERS.indexOf(p.letter) - (4 * 7 + LETTERS.indexOf("E"));
}

const LINES = ["bottom line", "second line", "middle line", "fourth line", "top line"];
const SPACES = ["bottom space", "second space", "third space", "top space"];
const ORDINALS = ["first", "second", "third", "fourth", "fifth", "sixth", "seventh", "eighth"];
const ordinal = (n: number) => ORDINALS[n - 1] ?? `${n}th`;
const TOP_LINE = 8;

/** Where a written pitch sits on the treble staff: "top line", "second space", "first ledger line below". */
export function staffPlace(p: Pitch): string {
  const pos = staffPosition(p);
  if (pos >= 0 && pos <= TOP_LINE) return pos % 2 === 0 ? LINES[pos / 2]! : SPACES[(pos - 1) / 2]!;
  if (pos === TOP_LINE + 1) return "above the top line";
  if (pos === -1) return "below the bottom line";
  const above = pos > TOP_LINE;
  const side = above ? "above" : "below";
  const beyond = above ? pos - TOP_LINE : -pos;
  // Even distances land on a ledger line; odd ones sit just past the last ledger line needed.
  const ledger = ordinal(Math.floor(beyond / 2));
  return beyond % 2 === 0 ? `${ledger} ledger line ${side}` : `${side} the ${ledger} ledger line ${side}`;
}

/** Ledger lines a set of notes needs above and below the staff, for sizing the drawing. */
export function ledgerExtent(pitches: Pitch[]): { above: number; below: number } {
  const positions = pitches.map(staffPosition);
  return {
    above: Math.max(0, ...positions.map((pos) => Math.floor((pos - TOP_LINE) / 2))),
    below: Math.max(0, ...positions.map((pos) => Math.floor(-pos / 2))),
  };
}

const ALTER_SIGNS: Readonly<Record<number, PrintedAccidental>> = {
  [-2]: "double-flat",
  [-1]: "flat",
  0: "natural",
  1: "sharp",
  2: "double-sharp",
};

/** The sign a single note needs in front of it under this key signature, or null when the signature covers it. */
export function accidentalFor(p: Pitch, fifths: number): PrintedAccidental | null {
  return keyAlter(fifths, p.letter) === p.alter ? null : ALTER_SIGNS[p.alter]!;
}

export function keySignatureWords(fifths: number): string {
  if (fifths === 0) return "no sharps or flats";
  return fifths > 0 ? plural(fifths, "sharp") : plural(-fifths, "flat");
}

/** One written note as heard from the page: "F sharp 5, top line" (the printed sign is said when there is one). */
export function noteWords(p: Pitch, printed: PrintedAccidental | null): string {
  const sign = printed === "natural" ? " (natural sign)" : "";
  return `${spokenPitch(p)}${sign}, ${staffPlace(p)}`;
}

/** The whole staff in words, e.g. "Treble clef, sounding an octave lower; key signature 1 sharp; F sharp 5, top line." */
export function staffWords(
  notes: { pitch: Pitch; printed: PrintedAccidental | null }[],
  fifths: number,
  octaveClef: boolean,
): string {
  const clef = octaveClef ? "Treble clef with an 8 below, sounding an octave lower" : "Treble clef";
  const list = notes.map((n) => noteWords(n.pitch, n.printed)).join("; ");
  return `${clef}; key signature ${keySignatureWords(fifths)}${list ? `; ${list}` : ""}.`;
}
