// The VexFlow half of <Staff>, loaded on demand so pages without a staff never download the engraver.
// "vexflow/bravura" carries the Bravura and Academico fonts inline as data: URLs and registers them with
// document.fonts when it is evaluated; VexFlow.loadFonts() would fetch from a CDN instead, so it is never called.
import { Accidental, Formatter, StaveNote, Stave, SVGContext } from "vexflow/bravura";
import { KEYS, type PrintedAccidental } from "~/music/keys";
import type { Pitch } from "~/music/pitch";
import { ledgerExtent } from "./staffText";

// VexFlow measures glyphs with the font as it lays notes out, so drawing waits until the inline faces are decoded.
const fontsReady = Promise.all([document.fonts.load("30pt Bravura"), document.fonts.load("12pt Academico")]);

const ACCIDENTAL_CODES: Readonly<Record<PrintedAccidental, string>> = {
  sharp: "#",
  flat: "b",
  natural: "n",
  "double-sharp": "##",
  "double-flat": "bb",
};

// VexFlow units: 10 per staff space; the stave draws its top line 40 below its own y.
const SPACE = 10;
const TOP_LINE_Y = 4 * SPACE;
const BOTTOM_LINE_Y = TOP_LINE_Y + 4 * SPACE;
const NOTE_ROOM = 56;
const SIDE = 6;

export interface StaffDrawing {
  notes: { pitch: Pitch; printed: PrintedAccidental | null }[];
  fifths: number;
  octaveClef: boolean;
}

/** Replaces the contents of `host` with an SVG staff that scales to the host's height. */
export async function drawStaff(host: HTMLElement, drawing: StaffDrawing): Promise<void> {
  await fontsReady;
  host.replaceChildren();
  const ctx = new SVGContext(host);
  ctx.setFillStyle("#1f2a36");
  ctx.setStrokeStyle("#1f2a36");

  const stave = new Stave(SIDE, 0, 0);
  stave.addClef("treble", "default", drawing.octaveClef ? "8vb" : undefined);
  const tonic = KEYS.find((k) => k.mode === "major" && k.fifths === drawing.fifths)?.tonic;
  if (tonic && drawing.fifths !== 0) stave.addKeySignature(tonic);
  const width = stave.getNoteStartX() - SIDE + NOTE_ROOM * Math.max(1, drawing.notes.length) + SPACE;
  stave.setWidth(width);
  stave.setContext(ctx).draw();

  const notes = drawing.notes.map(({ pitch, printed }) => {
    const note = new StaveNote({
      keys: [`${pitch.letter.toLowerCase()}/${pitch.octave}`],
      duration: "w",
      clef: "treble",
    });
    if (printed) note.addModifier(new Accidental(ACCIDENTAL_CODES[printed]), 0);
    return note;
  });
  if (notes.length > 0) Formatter.FormatAndDraw(ctx, stave, notes);

  // Room for guitar's usual range (two ledger lines above, three below, and the clef's 8) keeps the staff the
  // same size from note to note; notes beyond it grow the drawing.
  const { above, below } = ledgerExtent(drawing.notes.map((n) => n.pitch));
  const top = TOP_LINE_Y - SPACE * (Math.max(2, above) + 1);
  const bottom = BOTTOM_LINE_Y + SPACE * (Math.max(3, below) + 1);
  const total = width + 2 * SIDE;
  ctx.setViewBox(0, top, total, bottom - top);
  const svg = ctx.svg;
  svg.removeAttribute("width");
  svg.removeAttribute("height");
  svg.setAttribute("aria-hidden", "true");
  svg.setAttribute("focusable", "false");
  Object.assign(svg.style, {
    height: "100%",
    width: "auto",
    maxWidth: "100%",
    aspectRatio: `${total} / ${bottom - top}`,
  });
}
