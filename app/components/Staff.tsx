// A treble staff with written notes, drawn as our own SVG: clef, key signature, whole notes with their signs and
// ledger lines. It needs no engraver and no font, so it is in the server's HTML and on screen with the page;
// VexFlow (./tuneRender.ts) is only for whole tunes.
import { useMemo } from "react";
import type { PrintedAccidental } from "~/music/keys";
import { toPitch, type Pitch } from "~/music/pitch";
import { STAFF_GLYPHS } from "./staffGlyphs";
import { accidentalFor, ledgerExtent, staffPosition, staffWords } from "./staffText";

export type StaffSize = "stage" | "reveal" | "card" | "phone";

/**
 * Heights of the drawing. The stage's prompt fills well over a third of the screen so it reads from the back row;
 * at the reveal it shrinks to leave room for the neck.
 */
const SIZE_CLASS: Record<StaffSize, string> = {
  stage: "h-[58vh] min-h-56",
  reveal: "h-[26vh] min-h-40",
  card: "h-40",
  phone: "h-28",
};

export interface StaffNoteSpec {
  written: string | Pitch;
  /** The sign to print, exactly as given; null prints none; left out, the key signature decides. */
  accidental?: PrintedAccidental | null;
}

export interface StaffProps {
  notes: StaffNoteSpec[];
  keyFifths?: number;
  /** Guitar music's treble clef with a small 8 below; false for a plain treble clef (concert pitch). */
  octaveClef?: boolean;
  size?: StaffSize;
  /** Notes per line: a longer row wraps onto more staves, each with its clef and key, so none runs off a phone. */
  wrapAt?: number;
  className?: string;
}

interface StaffNote {
  pitch: Pitch;
  printed: PrintedAccidental | null;
}

export function Staff({ notes, keyFifths = 0, octaveClef = true, size = "card", wrapAt = Infinity, className = "" }: StaffProps) {
  const resolved = useMemo(
    () =>
      notes.map((n): StaffNote => {
        const pitch = toPitch(n.written);
        return { pitch, printed: n.accidental === undefined ? accidentalFor(pitch, keyFifths) : n.accidental };
      }),
    // Callers build `notes` inline, so its content, not its identity, decides when to work them out again.
    [JSON.stringify(notes), keyFifths],
  );
  const lines = Math.max(1, Math.ceil(resolved.length / wrapAt));
  return (
    <figure role="img" aria-label={staffWords(resolved, keyFifths, octaveClef)} data-drawn="" className={`relative flex flex-wrap items-center justify-center ${className}`}>
      {Array.from({ length: lines }, (_, i) => (
        // min-w-0 lets a wide drawing shrink to the page instead of pushing past its edge.
        <div key={i} aria-hidden="true" className={`flex min-w-0 max-w-full items-center justify-center ${SIZE_CLASS[size]}`}>
          <StaffLine notes={lines === 1 ? resolved : resolved.slice(i * wrapAt, (i + 1) * wrapAt)} fifths={keyFifths} octaveClef={octaveClef} />
        </div>
      ))}
    </figure>
  );
}

// Geometry in staff spaces (the glyphs' own unit); y grows downward from the top line (F5) to the bottom line (E4) at 4.
const SIDE = 0.5;
const CLEF_X = SIDE + 0.5;
/** The G clef curls round the second line (G4). */
const CLEF_LINE_Y = 3;
const AFTER_CLEF = 0.8;
const KEY_GAP = 0.15;
/** Room for one note: its widest sign (a double flat), a small gap, the notehead and space after it. */
const NOTE_ROOM = 5;
const HEAD_X = 2.4;
const SIGN_GAP = 0.25;
/** SMuFL's engraving defaults (Bravura's metadata): staff lines 0.13 spaces thick, ledger lines 0.16, 0.4 spaces past the head. */
const STAFF_LINE = 0.13;
const LEDGER_LINE = 0.16;
const LEDGER_OVERHANG = 0.4;

/** Where each sharp or flat of a key signature sits on the treble staff (staffPosition), in the order written (common practice, no source). */
const SHARP_PLACES = [8, 5, 9, 6, 3, 7, 4];
const FLAT_PLACES = [4, 7, 3, 6, 2, 5, 1];

const SIGN_GLYPH: Record<PrintedAccidental, keyof typeof STAFF_GLYPHS> = {
  sharp: "accidentalSharp",
  flat: "accidentalFlat",
  natural: "accidentalNatural",
  "double-sharp": "accidentalDoubleSharp",
  "double-flat": "accidentalDoubleFlat",
};

const yOf = (position: number) => 4 - position / 2;

function Glyph({ name, x, y }: { name: keyof typeof STAFF_GLYPHS; x: number; y: number }) {
  return <path d={STAFF_GLYPHS[name].d} transform={`translate(${x} ${y})`} />;
}

/** One staff line's drawing, scaled to its box's height. */
function StaffLine({ notes, fifths, octaveClef }: { notes: StaffNote[]; fifths: number; octaveClef: boolean }) {
  const clef = octaveClef ? STAFF_GLYPHS.gClef8vb : STAFF_GLYPHS.gClef;
  const signature = (fifths > 0 ? SHARP_PLACES : FLAT_PLACES).slice(0, Math.abs(fifths));
  const signGlyph = STAFF_GLYPHS[fifths > 0 ? "accidentalSharp" : "accidentalFlat"];
  const keyX = CLEF_X + clef.width + AFTER_CLEF;
  const notesX = keyX + signature.length * (signGlyph.width + KEY_GAP) + (signature.length > 0 ? AFTER_CLEF : 0);
  // Room for at least one note, so an empty staff (a prompt before its note shows) is the size it will be.
  const width = notesX + NOTE_ROOM * Math.max(1, notes.length) + SIDE;
  // Room for guitar's usual range (two ledger lines above, three below, and the clef's 8) keeps the staff the same
  // size from note to note; notes beyond it grow the drawing. The extra half space keeps a sign on the last ledger line whole.
  const { above, below } = ledgerExtent(notes.map((n) => n.pitch));
  const top = -(Math.max(2, above) + 1.5);
  const height = 4 + Math.max(3, below) + 1.5 - top;
  return (
    <svg
      viewBox={`0 ${top} ${width} ${height}`}
      aria-hidden="true"
      focusable="false"
      className="h-full max-w-full fill-ink stroke-ink"
      style={{ width: "auto", aspectRatio: `${width} / ${height}` }}
    >
      <g className="staff-lines" strokeWidth={STAFF_LINE}>
        {[0, 1, 2, 3, 4].map((y) => (
          <line key={y} x1={SIDE} x2={width - SIDE} y1={y} y2={y} />
        ))}
      </g>
      <g stroke="none">
        <Glyph name={octaveClef ? "gClef8vb" : "gClef"} x={CLEF_X} y={CLEF_LINE_Y} />
        {signature.map((place, i) => (
          <Glyph key={i} name={fifths > 0 ? "accidentalSharp" : "accidentalFlat"} x={keyX + i * (signGlyph.width + KEY_GAP)} y={yOf(place)} />
        ))}
      </g>
      {notes.map((note, i) => {
        const position = staffPosition(note.pitch);
        const headX = notesX + i * NOTE_ROOM + HEAD_X;
        const head = STAFF_GLYPHS.noteheadWhole;
        const sign = note.printed ? SIGN_GLYPH[note.printed] : null;
        // Ledger lines on the even places (lines) between the staff and the note.
        const ledgers: number[] = [];
        for (let p = 10; p <= position; p += 2) ledgers.push(p);
        for (let p = -2; p >= position; p -= 2) ledgers.push(p);
        return (
          <g key={i} className="staff-note">
            {ledgers.map((p) => (
              <line key={p} x1={headX - LEDGER_OVERHANG} x2={headX + head.width + LEDGER_OVERHANG} y1={yOf(p)} y2={yOf(p)} strokeWidth={LEDGER_LINE} />
            ))}
            <g stroke="none">
              {sign ? <Glyph name={sign} x={headX - SIGN_GAP - STAFF_GLYPHS[sign].width} y={yOf(position)} /> : null}
              <Glyph name="noteheadWhole" x={headX} y={yOf(position)} />
            </g>
          </g>
        );
      })}
    </svg>
  );
}
