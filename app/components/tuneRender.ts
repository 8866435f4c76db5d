// The VexFlow half of <TuneStaff>, loaded on demand: lays the engraved bars out in systems as wide as the host
// and draws them with VexFlow's own formatter. Every layout decision comes from app/tunes/engraving.ts.
import { BarlineType, Formatter, Stave, StaveTie, SVGContext, VoltaType } from "vexflow/bravura";
import { KEYS } from "~/music/keys";
import { barRoom, systemBreaks, tieEnds, type EngravedBar } from "~/tunes/engraving";
import { buildBar, type BuiltBar } from "./tuneModel";

// "vexflow/bravura" carries the Bravura and Academico fonts inline as data: URLs and registers them with
// document.fonts when it is evaluated; VexFlow.loadFonts() would fetch from a CDN instead, so it is never called.
// VexFlow measures glyphs with the font as it lays notes out, so drawing waits until the inline faces are decoded.
const fontsReady = Promise.all([document.fonts.load("30pt Bravura"), document.fonts.load("12pt Academico")]);

const INK = "#1f2a36";
const BRASS = "#d9a441";
const SIDE = 4;
// A system: a staff (its top line 40 units under its y) with room for two ledger lines and stems either side.
const SYSTEM_HEIGHT = 130;
const FIRST_TOP = 10;

const keySpec = (fifths: number) => KEYS.find((k) => k.mode === "major" && k.fifths === fifths)!.tonic;

const VOLTA: Readonly<Record<NonNullable<EngravedBar["volta"]>["part"], number>> = {
  begin: VoltaType.BEGIN,
  mid: VoltaType.MID,
  end: VoltaType.END,
  "begin-end": VoltaType.BEGIN_END,
  "open-end": VoltaType.MID,
  "begin-open-end": VoltaType.BEGIN,
};

function staveFor(bar: EngravedBar, previous: EngravedBar | undefined, opensSystem: boolean, x: number, y: number, width: number): Stave {
  const stave = new Stave(x, y, width);
  if (opensSystem) stave.addClef("treble", "default", "8vb");
  // A key change cancels the old signature with naturals where the new one drops a sign (VexFlow's cancel key).
  if (bar.keyChange) stave.addKeySignature(keySpec(bar.keyFifths), previous ? keySpec(previous.keyFifths) : undefined);
  else if (opensSystem && bar.keyFifths !== 0) stave.addKeySignature(keySpec(bar.keyFifths));
  if (bar.showTime) stave.addTimeSignature(`${bar.beats}/${bar.beatType}`);
  if (bar.repeatStart) stave.setBegBarType(BarlineType.REPEAT_BEGIN);
  if (bar.repeatEnd) stave.setEndBarType(BarlineType.REPEAT_END);
  else if (bar.final) stave.setEndBarType(BarlineType.END);
  else if (bar.open) stave.setEndBarType(BarlineType.NONE);
  if (bar.volta) stave.setVoltaType(VOLTA[bar.volta.part], bar.volta.part.startsWith("begin") ? `${bar.volta.number}.` : "", -5);
  return stave;
}

/**
 * Replaces the contents of `host` with the engraved tune, `scale` CSS pixels to a VexFlow unit, in as many systems
 * as the host's width needs. `asked` is the index of the tune note to mark, if any.
 */
export async function drawTune(host: HTMLElement, bars: EngravedBar[], options: { asked: number | null; scale: number; width?: number }): Promise<void> {
  await fontsReady;
  // A host not yet in the page (the stage draws ahead of the show time) has no width of its own: it is given one.
  const width = Math.max(120, (options.width ?? host.clientWidth) / options.scale);
  const line = width - 2 * SIDE;
  const systems = systemBreaks(bars, line);
  host.replaceChildren();
  const ctx = new SVGContext(host);
  ctx.setFillStyle(INK);
  ctx.setStrokeStyle(INK);

  const built = new Map<number, { model: BuiltBar; stave: Stave; system: number }>();
  let index = 0;
  systems.forEach((system, s) => {
    const rooms = system.map((bar, i) => barRoom(bar, i === 0));
    const used = rooms.reduce((a, b) => a + b, 0);
    // Full lines are stretched to the margin; a short last line only opens up a little, as in print.
    const stretch = s < systems.length - 1 ? line / used : Math.min(line / used, 1.5);
    let x = SIDE;
    system.forEach((bar, i) => {
      const stave = staveFor(bar, bars[index - 1], i === 0, x, FIRST_TOP + s * SYSTEM_HEIGHT, rooms[i]! * stretch);
      stave.setContext(ctx).draw();
      const model = buildBar(bar, options.asked);
      new Formatter().joinVoices([model.voice]).formatToStave([model.voice], stave);
      // Placed on the stave before drawing, so the mark can go behind the note.
      for (const note of model.notes) note.setStave(stave);
      for (const note of model.asked) markAsked(ctx, stave, note.getAbsoluteX(), note.getNoteHeadEndX() - note.getNoteHeadBeginX());
      model.voice.draw(ctx, stave);
      for (const beam of model.beams) beam.setContext(ctx).draw();
      for (const tuplet of model.tuplets) tuplet.setContext(ctx).draw();
      // Keyed by place in `bars`, as tieEnds counts: a range may start after bar 1.
      built.set(index++, { model, stave, system: s });
      x += rooms[i]! * stretch;
    });
  });

  // A tie over a system break is drawn as two halves: one off the end of the line, one into the next.
  for (const { from, to } of tieEnds(bars)) {
    const a = built.get(from[0])!;
    const b = built.get(to[0])!;
    const first = a.model.notes[from[1]]!;
    const last = b.model.notes[to[1]]!;
    const halves = a.system === b.system ? [{ firstNote: first, lastNote: last }] : [{ firstNote: first }, { lastNote: last }];
    for (const notes of halves) new StaveTie({ ...notes, firstIndexes: [0], lastIndexes: [0] }).setContext(ctx).draw();
  }

  const height = FIRST_TOP + systems.length * SYSTEM_HEIGHT;
  ctx.setViewBox(0, 0, width, height);
  const svg = ctx.svg;
  svg.removeAttribute("width");
  svg.removeAttribute("height");
  svg.setAttribute("aria-hidden", "true");
  svg.setAttribute("focusable", "false");
  svg.dataset.systems = String(systems.length);
  Object.assign(svg.style, { width: "100%", height: "auto", display: "block" });
}

/** A brass band behind the asked note and a sky-blue pointer above the staff: a shape as well as a colour. */
function markAsked(ctx: SVGContext, stave: Stave, x: number, head: number) {
  const top = stave.getYForLine(0);
  const bottom = stave.getYForLine(4);
  ctx.openGroup("asked-note");
  ctx.save();
  ctx.rect(x - 6, top - 22, head + 12, bottom - top + 44, { fill: BRASS, "fill-opacity": "0.35", stroke: "none", rx: "6" });
  ctx.beginPath();
  ctx.moveTo(x + head / 2 - 6, top - 34);
  ctx.lineTo(x + head / 2 + 6, top - 34);
  ctx.lineTo(x + head / 2, top - 24);
  ctx.closePath();
  ctx.setFillStyle("#2a6fa8");
  ctx.fill();
  ctx.restore();
  ctx.closeGroup();
}
