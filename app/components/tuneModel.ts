// VexFlow's model of an engraved tune (notes, rests, dots, signs, beams, tuplets, ties), built from the layout
// decisions in app/tunes/engraving.ts. It needs no page, so tests check it directly; tuneRender.ts draws it.
// Only "vexflow/bravura" is imported: plain "vexflow" would fetch its fonts from the internet.
import { Accidental, Beam, Dot, Fraction, StaveNote, Tuplet, Voice } from "vexflow/bravura";
import type { PrintedAccidental } from "~/music/keys";
import { parsePitch } from "~/music/pitch";
import { beamGroupTicks, TICKS_PER_QUARTER, type EngravedBar } from "~/tunes/engraving";

/** Sky, the information colour: the note being asked. It also gets a brass mark behind it (never colour alone). */
export const ASKED_COLOUR = "#2a6fa8";

/** VexFlow's names for the printed signs. */
export const ACCIDENTAL_CODES: Readonly<Record<PrintedAccidental, string>> = {
  sharp: "#",
  flat: "b",
  natural: "n",
  "double-sharp": "##",
  "double-flat": "bb",
};

export interface BuiltBar {
  bar: EngravedBar;
  /** One per engraved event, in order. */
  notes: StaveNote[];
  voice: Voice;
  beams: Beam[];
  tuplets: Tuplet[];
  /** Notes of the tune note being asked. */
  asked: StaveNote[];
}

export function buildBar(bar: EngravedBar, asked: number | null): BuiltBar {
  const notes = bar.events.map((e) => {
    const rest = e.kind === "rest";
    const pitch = rest ? null : parsePitch(e.written!);
    const note = new StaveNote({
      keys: [pitch ? `${pitch.letter.toLowerCase()}/${pitch.octave}` : "b/4"],
      duration: `${e.value}${rest ? "r" : ""}`,
      dots: e.dots,
      clef: "treble",
      autoStem: true,
      alignCenter: e.wholeBar,
    });
    if (e.accidental) note.addModifier(new Accidental(ACCIDENTAL_CODES[e.accidental]), 0);
    if (e.dots) Dot.buildAndAttach([note], { all: true });
    return note;
  });
  const askedNotes = notes.filter((_, k) => asked !== null && bar.events[k]!.noteIndex === asked);
  for (const note of askedNotes) note.setStyle({ fillStyle: ASKED_COLOUR, strokeStyle: ASKED_COLOUR });

  const tuplets: Tuplet[] = [];
  for (const id of new Set(bar.events.map((e) => e.tuplet).filter((t) => t !== null))) {
    const members = notes.filter((_, k) => bar.events[k]!.tuplet === id);
    tuplets.push(new Tuplet(members, { numNotes: 3, notesOccupied: 2, bracketed: true }));
  }

  // VexFlow's beaming, one beat group at a time, so the groups count from the meter's beats (a pickup included).
  const group = new Fraction(beamGroupTicks(bar.beats, bar.beatType), 4 * TICKS_PER_QUARTER).simplify();
  const beams = [...new Set(bar.events.map((e) => e.beamGroup))].flatMap((g) =>
    Beam.generateBeams(
      notes.filter((_, k) => bar.events[k]!.beamGroup === g),
      { groups: [group] },
    ),
  );

  const voice = new Voice({ numBeats: bar.beats, beatValue: bar.beatType }).setMode(Voice.Mode.SOFT).addTickables(notes);
  return { bar, notes, voice, beams, tuplets, asked: askedNotes };
}
