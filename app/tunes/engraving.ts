// How a tune is engraved, decided without drawing anything: which notes and rests each bar holds and with which
// written values, the signs the bar-aware spelling routine prints, ties, tuplets, beam groups from the meter, bar
// lines and repeats, and where systems break. app/components/tuneRender.ts only hands these decisions to VexFlow.
import { writeStaffBar, type PrintedAccidental } from "~/music/keys";
import { parsePitch, spokenPitch, type Pitch } from "~/music/pitch";
import type { TuneBar } from "~/music/musicxml";
import type { StoredScore, Tune } from "./builtin";

/** Integer time: 960 ticks to the quarter note divide evenly into 64th notes (60) and triplets down to the 32nd (80). */
export const TICKS_PER_QUARTER = 960;
const toTicks = (quarters: number) => Math.round(quarters * TICKS_PER_QUARTER);

/** Written note values as VexFlow names them (w = whole … 64 = sixty-fourth). */
export type NoteValue = "w" | "h" | "q" | "8" | "16" | "32" | "64";
const VALUE_TICKS: Readonly<Record<NoteValue, number>> = { w: 3840, h: 1920, q: 960, 8: 480, 16: 240, 32: 120, 64: 60 };
const VALUE_WORDS: Readonly<Record<NoteValue, string>> = { w: "whole", h: "half", q: "quarter", 8: "eighth", 16: "sixteenth", 32: "32nd", 64: "64th" };

interface Written {
  value: NoteValue;
  dots: 0 | 1;
  /** Three in the time of two (a triplet member takes two thirds of its written value). */
  triplet: boolean;
  ticks: number;
}
// Longest first (an object's numeric keys would come first, so the order is spelled out).
const VALUES: readonly NoteValue[] = ["w", "h", "q", "8", "16", "32", "64"];
const PLAIN: Written[] = VALUES.flatMap((value) => [
  { value, dots: 1 as const, triplet: false, ticks: VALUE_TICKS[value] * 1.5 },
  { value, dots: 0 as const, triplet: false, ticks: VALUE_TICKS[value] },
]).filter((w) => Number.isInteger(w.ticks));
const TRIPLET: Written[] = (["h", "q", "8", "16", "32"] as NoteValue[]).map((value) => ({ value, dots: 0, triplet: true, ticks: (VALUE_TICKS[value] * 2) / 3 }));

export interface EngravedEvent {
  kind: "note" | "rest";
  /** ASCII spelling of a note ("C#5"); null for a rest. */
  written: string | null;
  value: NoteValue;
  dots: 0 | 1;
  triplet: boolean;
  /** Ticks from the bar's first written beat (for a pickup, from its first note, not from the meter's downbeat). */
  start: number;
  ticks: number;
  /** The sign printed before the note (writeStaffBar); never on the continuation of a tie. */
  accidental: PrintedAccidental | null;
  /** Tied to the next note event, which may sit in the next bar. */
  tieToNext: boolean;
  /** The tune note this is (part of): the same index for every piece of a note split at a beat or bar line. */
  noteIndex: number | null;
  /** Notes with the same group are beamed together where their values allow (one beat of the meter). */
  beamGroup: number;
  /** Consecutive triplet members bracketed together share a number; null outside a triplet. */
  tuplet: number | null;
  /** A bar of silence: one whole rest in the middle of the bar, whatever the meter. */
  wholeBar: boolean;
}

export type VoltaPart = "begin" | "mid" | "end" | "begin-end" | "open-end" | "begin-open-end";

export interface EngravedBar {
  /** 1-based, as tune notes count bars. */
  bar: number;
  keyFifths: number;
  /** The key signature changes at this bar (the first bar always shows its key at the start of its system). */
  keyChange: boolean;
  beats: number;
  beatType: number;
  /** The time signature is printed here: the first bar and every change. */
  showTime: boolean;
  pickup: boolean;
  repeatStart: boolean;
  repeatEnd: boolean;
  /** Last bar of the tune: a final bar line. */
  final: boolean;
  volta: { part: VoltaPart; number: string } | null;
  /** Stops before its end (the stage's melody so far, cut at the asked note): no closing bar line. */
  open?: boolean;
  events: EngravedEvent[];
  /** Room the bar's notes need, in VexFlow units (10 to a staff space), before it is stretched to fill a line. */
  minWidth: number;
}

/** Bars from…to (1-based, inclusive), the first opening its line with the meter as well as the clef and key. */
export function barsBetween(bars: EngravedBar[], from: number, to: number): EngravedBar[] {
  return bars.filter((b) => b.bar >= from && b.bar <= to).map((b, i) => (i === 0 ? { ...b, showTime: true, keyChange: false } : b));
}

/**
 * A Tune walk's melody so far: bars from…the one where the asked note starts, that bar cut just after it, so
 * neither a later note nor a rest standing in for one is drawn.
 */
export function barsSoFar(bars: EngravedBar[], from: number, asked: number): EngravedBar[] {
  const at = bars.findIndex((b) => b.events.some((e) => e.noteIndex === asked));
  const last = bars[at];
  if (!last) return [];
  const end = last.events.findLastIndex((e) => e.noteIndex === asked) + 1;
  const events = last.events.slice(0, end);
  const cut = { ...last, events, final: false, open: end < last.events.length, minWidth: barWidth(events) };
  return barsBetween([...bars.slice(0, at), cut], from, Infinity);
}

/** Beat groups from the meter: dotted quarters in 6/8, 9/8, 12/8; the whole bar in 3/8; otherwise one beat. */
export function beamGroupTicks(beats: number, beatType: number): number {
  const beat = (4 * TICKS_PER_QUARTER) / beatType;
  if (beatType === 8 && beats % 3 === 0) return 3 * beat;
  if (beatType >= 8) return 2 * beat;
  return beat;
}

/**
 * Written values for a stretch of `ticks` starting `metric` ticks after the downbeat (common practice, no source):
 * a note starting off a beat group is tied at the group's end so the beat stays visible; the rest is written
 * largest value first, a single dot allowed. A length off the binary grid is written as triplets; lengths fitting
 * neither grid (quintuplets and the like) are rounded to the nearest 64th.
 */
export function writtenValues(metric: number, ticks: number, group: number): Written[] {
  const toBeat = group - (metric % group);
  if (toBeat === group || ticks <= toBeat) return greedy(ticks);
  return [...greedy(toBeat), ...greedy(ticks - toBeat)];
}

function greedy(ticks: number): Written[] {
  const out: Written[] = [];
  let left = ticks % 60 === 0 || ticks % 80 !== 0 ? Math.max(60, Math.round(ticks / 60) * 60) : ticks;
  const table = left % 60 === 0 ? PLAIN : TRIPLET;
  while (left > 0) {
    const fit = table.find((w) => w.ticks <= left) ?? table.at(-1)!;
    out.push(fit);
    left -= fit.ticks;
  }
  return out;
}

interface Window {
  measure: Pick<TuneBar, "beats" | "beatType" | "keyFifths" | "pickup"> & Partial<Pick<TuneBar, "repeatStart" | "repeatEnd" | "ending">>;
  start: number;
  ticks: number;
}

/** Each bar's window in ticks: from a stored score's measures, or (built-in tunes, older uploads) bar after bar in x/4. */
function windows(tune: EngraveInput, onsets: number[]): Window[] {
  const measures = tune.score?.measures;
  if (measures && measures.length > 0) {
    return measures.map((m, i) => {
      const full = toTicks((m.beats * 4) / m.beatType);
      const held = toTicks(m.length);
      // A pickup, or a last bar that completes it, is as long as it holds; other bars are full whatever they hold.
      const ticks = held > 0 && (m.pickup || i === measures.length - 1) ? held : Math.max(held, full);
      return { measure: m, start: toTicks(m.start), ticks };
    });
  }
  const bars = Math.max(0, ...tune.notes.map((n) => n.bar));
  const full = toTicks(tune.beatsPerBar);
  return Array.from({ length: bars }, (_, i) => ({
    measure: { beats: tune.beatsPerBar, beatType: 4, keyFifths: tune.keyFifths, pickup: false },
    start: i * full,
    ticks: Math.max(full, ...tune.notes.map((n, k) => (n.bar === i + 1 ? onsets[k]! + toTicks(n.beats) - i * full : 0))),
  }));
}

export type EngraveInput = Pick<Tune, "notes" | "keyFifths" | "beatsPerBar"> & { score?: Pick<StoredScore, "measures"> | null };

/** Onsets in ticks: stored with an upload's score; built-in tunes follow one another within each bar. */
function noteOnsets(tune: EngraveInput): number[] {
  const full = toTicks(tune.beatsPerBar);
  const within = new Map<number, number>();
  return tune.notes.map((n) => {
    if (n.onset !== undefined && tune.score) return toTicks(n.onset);
    const at = within.get(n.bar) ?? 0;
    within.set(n.bar, at + toTicks(n.beats));
    return (n.bar - 1) * full + at;
  });
}

export function engraveTune(tune: EngraveInput): EngravedBar[] {
  const onsets = noteOnsets(tune);
  const bars = windows(tune, onsets);
  let previousPitches: Pitch[] = [];
  let ending: string | null = null;
  return bars.map((w, i) => {
    const { measure: m } = w;
    const group = beamGroupTicks(m.beats, m.beatType);
    // A pickup starts part-way into its meter, so its beat groups count from the downbeat it leads to.
    const lead = m.pickup ? toTicks((m.beats * 4) / m.beatType) - w.ticks : 0;
    const events: Omit<EngravedEvent, "accidental" | "tuplet">[] = [];
    const place = (from: number, to: number, note: { written: string; index: number } | null, tieOut: boolean) => {
      const pieces = writtenValues(lead + from, to - from, group);
      let at = from;
      pieces.forEach((p, k) => {
        events.push({
          kind: note ? "note" : "rest",
          written: note?.written ?? null,
          value: p.value,
          dots: p.dots,
          triplet: p.triplet,
          start: at,
          ticks: p.ticks,
          tieToNext: note !== null && (k < pieces.length - 1 || tieOut),
          noteIndex: note?.index ?? null,
          beamGroup: Math.floor((lead + at) / group),
          wholeBar: false,
        });
        at += p.ticks;
      });
    };
    let cursor = 0;
    const firstPiece = new Set<number>();
    tune.notes.forEach((n, index) => {
      const from = Math.max(onsets[index]! - w.start, 0);
      const to = Math.min(onsets[index]! + toTicks(n.beats) - w.start, w.ticks);
      if (to <= from || onsets[index]! - w.start >= w.ticks) return;
      if (from > cursor) place(cursor, from, null, false);
      if (onsets[index]! >= w.start) firstPiece.add(events.length);
      place(from, to, { written: n.pitch, index }, onsets[index]! + toTicks(n.beats) - w.start > w.ticks);
      cursor = to;
    });
    if (events.length === 0) {
      events.push({ kind: "rest", written: null, value: "w", dots: 0, triplet: false, start: 0, ticks: w.ticks, tieToNext: false, noteIndex: null, beamGroup: 0, wholeBar: true });
    } else if (cursor < w.ticks) {
      place(cursor, w.ticks, null, false);
    }

    // Signs for the notes that start here (a tie's continuation carries its sign over without printing it).
    const keyFifths = m.keyFifths;
    const previous = bars[i - 1]?.measure.keyFifths ?? keyFifths;
    const starting = [...firstPiece];
    const pitches = starting.map((k) => parsePitch(events[k]!.written!));
    const signs = writeStaffBar(keyFifths, pitches, previous === keyFifths ? previousPitches : []);
    previousPitches = pitches;
    const accidentals = new Map(starting.map((k, s) => [k, signs[s]!.accidental ?? null]));

    const volta = voltaOf(m.ending, ending);
    ending = volta && !volta.part.includes("end") ? volta.number : null;
    const engraved = events.map((e, k) => ({ ...e, accidental: accidentals.get(k) ?? null, tuplet: null as number | null }));
    groupTriplets(engraved);
    return {
      bar: i + 1,
      keyFifths,
      keyChange: i > 0 && previous !== keyFifths,
      beats: m.beats,
      beatType: m.beatType,
      showTime: i === 0 || bars[i - 1]!.measure.beats !== m.beats || bars[i - 1]!.measure.beatType !== m.beatType,
      pickup: m.pickup,
      repeatStart: m.repeatStart === true,
      repeatEnd: m.repeatEnd === true,
      final: i === bars.length - 1,
      volta,
      events: engraved,
      minWidth: barWidth(engraved),
    };
  });
}

/** The bracket over a bar, from the <ending> marks read into the bar and whether a bracket is still open. */
function voltaOf(mark: TuneBar["ending"], open: string | null): EngravedBar["volta"] {
  if (mark?.start) {
    const part: VoltaPart = mark.end === "hook" ? "begin-end" : mark.end === "open" ? "begin-open-end" : "begin";
    return { part, number: mark.number };
  }
  if (open === null) return null;
  if (mark?.end) return { part: mark.end === "hook" ? "end" : "open-end", number: open };
  return { part: "mid", number: open };
}

/**
 * Brackets runs of triplet members: a bracket closes once its members fill three of the smallest member's values
 * (three triplet eighths, or a triplet quarter and eighth, make one quarter note's time).
 */
function groupTriplets(events: EngravedEvent[]) {
  let group = 0;
  let filled = 0;
  let smallest = Infinity;
  events.forEach((e, k) => {
    if (!e.triplet) return;
    e.tuplet = group;
    filled += e.ticks;
    smallest = Math.min(smallest, e.ticks);
    if (filled % (3 * smallest) === 0 || !events[k + 1]?.triplet) {
      group++;
      filled = 0;
      smallest = Infinity;
    }
  });
}

// Room per written value, in VexFlow units; a sign or a dot takes a little more.
const VALUE_ROOM: Readonly<Record<NoteValue, number>> = { w: 48, h: 40, q: 34, 8: 30, 16: 26, 32: 24, 64: 22 };
const BAR_PADDING = 20;
function barWidth(events: EngravedEvent[]): number {
  return BAR_PADDING + events.reduce((sum, e) => sum + VALUE_ROOM[e.value] + (e.accidental ? 16 : 0) + 8 * e.dots, 0);
}

/** Room at a bar's start for the clef, a key signature and a time signature, in VexFlow units. */
export function headerWidth(clef: boolean, keyFifths: number | null, time: boolean): number {
  return (clef ? 38 : 0) + (keyFifths === null ? 0 : 10 * Math.abs(keyFifths) + (keyFifths === 0 ? 0 : 10)) + (time ? 28 : 0);
}

/** The room a bar takes when it opens a system (clef and key) or follows another on it. */
export function barRoom(bar: EngravedBar, opensSystem: boolean): number {
  const key = opensSystem || bar.keyChange ? bar.keyFifths : null;
  return bar.minWidth + headerWidth(opensSystem, key, bar.showTime);
}

/**
 * Bars per system for a line `width` units wide: as many as fit, at least one (a bar wider than the line is
 * drawn alone and shrunk to fit).
 */
export function systemBreaks(bars: EngravedBar[], width: number): EngravedBar[][] {
  const systems: EngravedBar[][] = [];
  let used = 0;
  for (const bar of bars) {
    const current = systems.at(-1);
    if (current && used + barRoom(bar, false) <= width) {
      current.push(bar);
      used += barRoom(bar, false);
    } else {
      systems.push([bar]);
      used = barRoom(bar, true);
    }
  }
  return systems;
}

/** Ties between consecutive note events, within a bar or over a bar line: [bar, event] of each end. */
export function tieEnds(bars: EngravedBar[]): { from: [number, number]; to: [number, number] }[] {
  const events = bars.flatMap((b, i) => b.events.map((e, k) => ({ e, at: [i, k] as [number, number] })));
  return events.flatMap(({ e, at }, n) => {
    const next = events.slice(n + 1).find((x) => x.e.kind === "note");
    return e.tieToNext && next ? [{ from: at, to: next.at }] : [];
  });
}

const valueWords = (e: EngravedEvent) => `${e.dots ? "dotted " : ""}${VALUE_WORDS[e.value]}${e.triplet ? " triplet" : ""}`;

/** The engraving in words, bar by bar, for screen readers: "Bar 1: G 4 quarter, rest eighth, …". */
export function tuneWords(bars: EngravedBar[]): string {
  const first = bars[0];
  const head = first ? `Treble clef with an 8 below; ${first.beats}/${first.beatType} time` : "Treble clef with an 8 below";
  const list = bars.map((b) => {
    const events = b.events.map((e) =>
      e.kind === "rest" ? (e.wholeBar ? "bar rest" : `${valueWords(e)} rest`) : `${spokenPitch(parsePitch(e.written!))}${e.accidental === "natural" ? " (natural sign)" : ""} ${valueWords(e)}${e.tieToNext ? " tied" : ""}`,
    );
    const time = b.showTime && b.bar > 1 ? ` (now ${b.beats}/${b.beatType})` : "";
    return `bar ${b.bar}${time}: ${events.join(", ")}`;
  });
  return `${head}; ${list.join("; ")}.`;
}
