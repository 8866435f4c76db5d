// What a solo practice session reads: a reading set's pool or a tune's pitches, on the class's home spots, in the
// progression order the adaptive rule lets notes in by. Pure, so the page and the answers endpoint agree.
import { staffPosition } from "~/components/staffText";
import { keyAlter, ledgerLineCount } from "~/music/keys";
import { parsePitch, pitchMidi, pitchToString, type Pitch } from "~/music/pitch";
import type { PoolNote } from "~/music/pools";
import { homeSpotFor, type SpotMap } from "~/music/positions";

/** The sign the staff must print for a lone note under this key signature (as the music engine's pools do). */
export function printedAccidentalOf(pitch: Pitch, keyFifths: number): PoolNote["printedAccidental"] {
  if (pitch.alter === keyAlter(keyFifths, pitch.letter)) return null;
  return pitch.alter > 0 ? "sharp" : pitch.alter < 0 ? "flat" : "natural";
}

/** A written note on a map's home spot, or undefined when the position does not reach it. */
export function poolNoteOn(map: SpotMap, written: string, keyFifths: number): PoolNote | undefined {
  const pitch = parsePitch(written);
  const writtenMidi = pitchMidi(pitch);
  const home = homeSpotFor(map, writtenMidi);
  if (!home) return undefined;
  return { written: pitchToString(pitch), writtenMidi, home, ledger: ledgerLineCount(pitch) > 0, printedAccidental: printedAccidentalOf(pitch, keyFifths) };
}

const MIDDLE_LINE = staffPosition(parsePitch("B4"));

/**
 * Progression order of a reading set's notes: on the staff before ledger lines, the key's own notes before
 * written accidentals, then nearest the middle line first (the eye finds it fastest), lower before higher on a tie.
 */
export function setOrder(pool: readonly PoolNote[]): PoolNote[] {
  const distance = (n: PoolNote) => Math.abs(staffPosition(parsePitch(n.written)) - MIDDLE_LINE);
  return [...pool].sort(
    (a, b) =>
      Number(a.ledger) - Number(b.ledger) ||
      Number(a.printedAccidental !== null) - Number(b.printedAccidental !== null) ||
      distance(a) - distance(b) ||
      a.writtenMidi - b.writtenMidi,
  );
}

/**
 * A tune's pitches in order of first appearance (the opening notes are learnt first), each once, on the map's home
 * spots; pitches the position does not reach are listed in `outside` for a warning.
 */
export function tunePool(notes: readonly { pitch: string }[], keyFifths: number, map: SpotMap): { pool: PoolNote[]; outside: string[] } {
  const pool: PoolNote[] = [];
  const outside: string[] = [];
  const seen = new Set<number>();
  for (const { pitch } of notes) {
    const midi = pitchMidi(parsePitch(pitch));
    if (seen.has(midi)) continue;
    seen.add(midi);
    const note = poolNoteOn(map, pitch, keyFifths);
    if (note) pool.push(note);
    else outside.push(pitchToString(parsePitch(pitch)));
  }
  return { pool, outside };
}

/** One solo practice session, as the server plans it (practice.server.ts) and the phone runs it. */
export interface PracticePlan {
  /** What was practised, stored with each answer: "set:<id>", "preset:<id>", "tune:<id>" or "position:<n>". */
  source: string;
  title: string;
  position: number;
  tuning: string;
  frets: number;
  keyFifths: number;
  homeOnly: boolean;
  /** The class whose home-spot map is used (and checked again by the answers endpoint); null = default map. */
  classId: string | null;
  classMap: boolean;
  /** The assignment this practice counts toward (creditedAssignment), named on the page. */
  assignmentId: string | null;
  /** playedOnly: only answers played on a guitar count toward it (the page says so). */
  countsToward: { title: string; className: string; dueAt: number; playedOnly: boolean } | null;
  tuneId: string | null;
  /** In progression order. */
  notes: PoolNote[];
  /** Tune pitches the position does not reach. */
  outside: string[];
}
