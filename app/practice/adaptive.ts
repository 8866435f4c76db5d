/**
 * The adaptive rule for solo practice: which written note comes next, and why. Pure (no I/O, no clock), so the
 * phone, the server and the tests all get the same answer from the same history.
 *
 * The rule, in one place (Leitner-style boxes, one per written pitch, counted by MIDI number: C♯ and D♭ share a
 * box because they share a home spot, and finding the spot is what is being learnt):
 *
 * 1. **Boxes 0–4.** A note enters in box 0. After each answer, in time order:
 *    - home spot within QUICK_MS (3 s, inclusive) → up one box (at most 4);
 *    - home spot but slower, or the right pitch at another spot → down one box (at least 0);
 *    - a wrong pitch (any other mistake kind) → back to box 0.
 *    So a note is only "steady" (box ≥ STEADY_BOX = 2) after at least two quick home spots in a row since its
 *    last miss, and one wrong pitch sends it back to the start.
 * 2. **Which notes are in play.** The pool comes in its progression order (see app/practice/pool.ts: first
 *    appearance in a tune; for a reading set, staff notes before ledger lines, key notes before accidentals,
 *    nearest the middle line first). A note is *active* once it has been answered at all. While fewer than
 *    START_NOTES are active, the first unanswered notes in order join until there are START_NOTES. After that a
 *    new note joins — one at a time, the next in order — only when every active note is steady.
 * 3. **Next note.** A note that has just joined (active but never answered) comes first, in order. Otherwise the
 *    active notes, leaving out the note just asked (no immediate repeats, unless it is the only one), are listed
 *    lowest box first (then least recently asked, then progression order) and one is drawn with weight
 *    2^(4 − box): 16, 8, 4, 2, 1 for boxes 0 to 4. A box-0 note is 16 times as likely as a box-4 one, yet
 *    steady notes still come back now and then for review. The draw takes a random number in [0, 1) — seeded
 *    by the caller (seededRandom from the music engine), so a session can be replayed — scales it by the total
 *    weight and walks the list: 0 always picks the first entry of the list.
 * 4. **Why.** Every choice carries a sentence for the student (see `reasonFor`): misses today first, then the
 *    last outcome, then where the note stands.
 */
import type { MistakeKind } from "~/music/mistakes";
import { noteName as nameIn, type NoteNaming } from "~/music/naming";
import { parsePitch } from "~/music/pitch";
import { staffPlace } from "~/components/staffText";
import { plural } from "~/lib/plural";

export const TOP_BOX = 4;
export const STEADY_BOX = 2;
export const QUICK_MS = 3000;
export const START_NOTES = 3;

/** One answer the rule learns from: a solo-practice row or a live-round answer of the same student. */
export interface PracticeAnswer {
  writtenMidi: number;
  kind: MistakeKind | string;
  reactionMs: number;
  at: number /* ms since the epoch */;
}

/** A note the session may ask, in the pool's progression order. */
export interface OrderedNote {
  written: string /* ASCII spelling as shown on the staff, e.g. "F#5" */;
  writtenMidi: number;
}

export type Outcome = "quick-home" | "slow-home" | "other-spot" | "miss";

export function outcomeOf(answer: Pick<PracticeAnswer, "kind" | "reactionMs">): Outcome {
  if (answer.kind === "home-spot") return answer.reactionMs <= QUICK_MS ? "quick-home" : "slow-home";
  return answer.kind === "other-spot" ? "other-spot" : "miss";
}

export function nextBox(box: number, outcome: Outcome): number {
  switch (outcome) {
    case "quick-home":
      return Math.min(TOP_BOX, box + 1);
    case "slow-home":
    case "other-spot":
      return Math.max(0, box - 1);
    case "miss":
      return 0;
  }
}

export interface NoteState {
  writtenMidi: number;
  box: number;
  answers: number;
  /** Wrong-pitch answers at or after `dayStart`. */
  missesToday: number;
  last: Outcome;
  lastAt: number;
}

/**
 * Boxes per written pitch after replaying the history in time order (answers with equal times keep their given
 * order). `dayStart` is the student's local midnight, for "today" in the reasons.
 */
export function noteStates(history: readonly PracticeAnswer[], dayStart: number): Map<number, NoteState> {
  const ordered = history.map((a, i) => ({ a, i })).sort((x, y) => x.a.at - y.a.at || x.i - y.i);
  const states = new Map<number, NoteState>();
  for (const { a } of ordered) {
    const outcome = outcomeOf(a);
    const s = states.get(a.writtenMidi);
    const box = nextBox(s?.box ?? 0, outcome);
    const missesToday = (s?.missesToday ?? 0) + (outcome === "miss" && a.at >= dayStart ? 1 : 0);
    states.set(a.writtenMidi, { writtenMidi: a.writtenMidi, box, answers: (s?.answers ?? 0) + 1, missesToday, last: outcome, lastAt: a.at });
  }
  return states;
}

/** Every note of `notes` in box ≥ STEADY_BOX; what unlocks a tune's rhythm pass. */
export function allSteady(notes: readonly { writtenMidi: number }[], states: Map<number, NoteState>): boolean {
  return notes.length > 0 && notes.every((n) => (states.get(n.writtenMidi)?.box ?? 0) >= STEADY_BOX);
}

export interface InPlay {
  /** Notes already answered, in progression order. */
  active: OrderedNote[];
  /** Notes that join now, never answered yet, in order. */
  joining: OrderedNote[];
  /** Why they join: the first notes of the set, or because every active note is steady. */
  joinReason: "first-notes" | "steady" | null;
}

/** Rule 2: which notes are in play. Duplicated pitches in the order count once (the first). */
export function notesInPlay(order: readonly OrderedNote[], states: Map<number, NoteState>): InPlay {
  const seen = new Set<number>();
  const unique = order.filter((n) => !seen.has(n.writtenMidi) && seen.add(n.writtenMidi));
  const active = unique.filter((n) => states.has(n.writtenMidi));
  const fresh = unique.filter((n) => !states.has(n.writtenMidi));
  if (active.length < START_NOTES) {
    const joining = fresh.slice(0, START_NOTES - active.length);
    return { active, joining, joinReason: joining.length ? "first-notes" : null };
  }
  const steady = active.every((n) => states.get(n.writtenMidi)!.box >= STEADY_BOX);
  const joining = steady ? fresh.slice(0, 1) : [];
  return { active, joining, joinReason: joining.length ? "steady" : null };
}

export const weightOf = (box: number) => 2 ** (TOP_BOX - box);

export interface Choice {
  note: OrderedNote;
  box: number;
  /** Plain words for the student: why this note now. */
  reason: string;
  /** The list the draw walked (rule 3), with weights, for the curious and for the tests. */
  candidates: { writtenMidi: number; box: number; weight: number }[];
}

/** How a student names a note on the page: its letter and sign, and where it sits: "F♯ (top line)". */
export function noteName(written: string, naming?: NoteNaming): string {
  const pitch = parsePitch(written);
  return `${nameIn(pitch, naming)} (${staffPlace(pitch)})`;
}

const times = (n: number) => (n === 1 ? "once" : n === 2 ? "twice" : `${n} times`);

/** Rule 4: misses today first, then the last outcome, then where the note stands. */
export function reasonFor(note: OrderedNote, state: NoteState | undefined, inPlay: InPlay, naming?: NoteNaming): string {
  const name = noteName(note.written, naming);
  if (!state) {
    if (inPlay.joinReason === "steady") {
      return `New note: ${name}. Your other ${plural(inPlay.active.length, "note")} ${inPlay.active.length === 1 ? "is" : "are"} steady (box ${STEADY_BOX} or higher), so it joins now.`;
    }
    return `${name} is one of your first notes here. Find its home spot.`;
  }
  if (state.missesToday >= 2) return `${name} keeps coming back: you missed it ${times(state.missesToday)} today.`;
  switch (state.last) {
    case "miss":
      return `${name} keeps coming back: you missed it last time.`;
    case "other-spot":
      return `${name} again: last time you played it at another spot. Look for its home spot.`;
    case "slow-home":
      return `${name} again: you found its home spot, but it took over ${QUICK_MS / 1000} seconds. Aim for quicker.`;
    case "quick-home":
      if (state.box === TOP_BOX) return `A quick check on ${name}: it is steady (box ${TOP_BOX} of ${TOP_BOX}).`;
      if (state.box >= STEADY_BOX) return `${name} is steady (box ${state.box} of ${TOP_BOX}); a quick review keeps it that way.`;
      return `${name} is climbing (box ${state.box} of ${TOP_BOX}): quick home spots make it steady.`;
  }
}

/**
 * Rule 3: the next note. `previous` is the written MIDI of the note just asked; `random` returns [0, 1).
 * Throws when the order is empty (a pool is never empty: the music engine refuses one).
 */
export function chooseNext(
  order: readonly OrderedNote[],
  states: Map<number, NoteState>,
  opts: { previous?: number; random: () => number; naming?: NoteNaming },
): Choice {
  if (order.length === 0) throw new Error("Nothing to practise: the note list is empty.");
  const inPlay = notesInPlay(order, states);
  const joining = inPlay.joining.find((n) => n.writtenMidi !== opts.previous);
  if (joining) return { note: joining, box: 0, reason: reasonFor(joining, undefined, inPlay, opts.naming), candidates: [] };

  const pool = inPlay.active.length > 0 ? inPlay.active : inPlay.joining;
  const others = pool.filter((n) => n.writtenMidi !== opts.previous);
  const listed = (others.length > 0 ? others : pool)
    .map((note, index) => {
      const state = states.get(note.writtenMidi);
      return { note, state, index, box: state?.box ?? 0 };
    })
    .sort((a, b) => a.box - b.box || (a.state?.lastAt ?? -Infinity) - (b.state?.lastAt ?? -Infinity) || a.index - b.index);
  const weights = listed.map((c) => weightOf(c.box));
  let r = opts.random() * weights.reduce((sum, w) => sum + w, 0);
  let pick = listed.length - 1; // guards against rounding leaving r just above 0
  for (let i = 0; i < listed.length; i++) {
    r -= weights[i]!;
    if (r < 0) {
      pick = i;
      break;
    }
  }
  const chosen = listed[pick]!;
  return {
    note: chosen.note,
    box: chosen.box,
    reason: reasonFor(chosen.note, chosen.state, inPlay, opts.naming),
    candidates: listed.map((c, i) => ({ writtenMidi: c.note.writtenMidi, box: c.box, weight: weights[i]! })),
  };
}
