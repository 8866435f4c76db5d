// MusicXML 4.0 (partwise, .musicxml/.xml or compressed .mxl) to a single melody line for Tune walk.
import { Unzip, UnzipInflate } from "fflate";
import { XMLParser, XMLValidator } from "fast-xml-parser";
import { checkFifths, spellInKey, type PrintedAccidental } from "./keys";
import { checkPitch, LETTERS, MusicError, pitchMidi, pitchToString, type Letter, type Pitch } from "./pitch";
import { readTempo, type ScoreTempo } from "./tempo";

export interface TuneNote {
  written: string /* ASCII spelling */;
  writtenMidi: number;
  pitch: Pitch;
  bar: string /* the measure's number attribute, as printed */;
  barIndex: number /* 0-based order of the measure */;
  onset: number /* quarter notes from the start */;
  duration: number /* quarter notes, ties merged */;
  /** Made of notes tied together (MusicXML 4.0 <tie>): one note to play, however many bars it spans. */
  tied: boolean;
  keyFifths: number;
  printedAccidental: PrintedAccidental | null;
}
/** One measure as the score has it. */
export interface TuneBar {
  number: string;
  /** Quarter notes from the start of the score. */
  start: number;
  /** What the bar holds, in quarter notes (a pickup or an incomplete last bar holds less than its meter). */
  length: number;
  /** The time signature in force (4/4 when the score gives none). */
  beats: number;
  beatType: number;
  keyFifths: number;
  /** A short first bar (MusicXML implicit="yes", or shorter than its meter). */
  pickup: boolean;
  /** Repeat bar lines as written (MusicXML 4.0 <barline><repeat direction>); not expanded. Absent when none. */
  repeatStart?: true;
  repeatEnd?: true;
  /** A volta bracket opening or closing over this bar (MusicXML 4.0 <ending number type>); "open" ends without a hook. */
  ending?: { number: string; start: boolean; end: "hook" | "open" | null };
}
/** What the melody line does not include, for the teacher to see. */
export interface LeftOut {
  graceNotes: number;
  /** Cue notes keep their time in the line, as rests. */
  cueNotes: number;
  /** Lower notes of chords (the top note is kept). */
  chordNotes: number;
  /** Notes of lower voices under a held melody note. */
  lowerVoiceNotes: number;
  /** Names of the parts not read. */
  otherParts: string[];
}
export interface ScorePart {
  id: string;
  name: string;
  notes: number;
}
export interface Tune {
  title: string | null;
  part: string /* part name, or its id */;
  partId: string;
  /** Every part of the score with its number of melody notes; the teacher may pick another. */
  parts: ScorePart[];
  bars: number;
  measures: TuneBar[];
  notes: TuneNote[];
  leftOut: LeftOut;
  /** The first tempo the score marks, or null (the student then picks one). */
  tempo: ScoreTempo | null;
}

/*
 * Limits keep a hostile or mistaken upload from exhausting memory or time. Sizing: one melody note
 * as notation programs export it (pitch, duration, voice, type, stem, beam, layout attributes) is
 * 250–500 bytes of XML, so even a long study of 2 000 notes is about 1 MB, and a guitar part that
 * repeats every note on a TAB staff about 2 MB; the tunes a class reads are 20–200 KB. 3 MB leaves
 * half as much again. The densest legal file at the limit takes 2–3 s to read on a busy 2-core
 * machine, on the score reader's own thread (server/score-reader.ts, bench/upload-stall.ts).
 */
export const MAX_XML_CHARS = 3 * 1024 * 1024;
/** A plain .musicxml upload is its own text; a compressed .mxl is smaller. */
export const MAX_FILE_BYTES = MAX_XML_CHARS;
const MAX_ZIP_ENTRIES = 500;
/** A melody played at a note a second for over an hour. */
export const MAX_NOTES = 5_000;
/** MusicXML's deepest real nesting (score, part, measure, note, notations, technical, …) is about 8. */
export const MAX_DEPTH = 32;
// Fed to the inflater in small slices, so one push can expand to at most a few MB before the limit is checked.
const ZIP_SLICE = 4096;
const megabytes = (n: number) => `${n / 1024 / 1024} MB`;
export const FILE_TOO_BIG = `A score file may be at most ${megabytes(MAX_FILE_BYTES)}.`;

/**
 * What reading an upload gives: the melody and the file deflated for keeping (zlib; a smaller write on the
 * event loop's database connection), or the words that tell the teacher why not.
 */
export type ScoreReading = { ok: true; score: Tune; kept: Uint8Array } | { ok: false; error: string };
/** Reads an uploaded score away from the event loop (server/score-reader.ts); `kept` bytes come from an earlier reading. */
export type ReadScore = (bytes: Uint8Array, options?: { partId?: string; kept?: boolean }) => Promise<ScoreReading>;

type XmlNode = Record<string, unknown>;

const parser = new XMLParser({
  preserveOrder: true, // backup/forward only make sense in document order
  ignoreAttributes: false,
  attributeNamePrefix: "",
  parseTagValue: false,
  parseAttributeValue: false,
  trimValues: true,
  maxNestedTags: MAX_DEPTH,
});

function tagOf(node: XmlNode): string | undefined {
  return Object.keys(node).find((k) => k !== ":@");
}
function kids(node: XmlNode | undefined): XmlNode[] {
  const tag = node && tagOf(node);
  const value = tag ? node[tag] : undefined;
  return Array.isArray(value) ? (value as XmlNode[]) : [];
}
function find(node: XmlNode | undefined, tag: string): XmlNode | undefined {
  return kids(node).find((k) => tagOf(k) === tag);
}
function findAll(node: XmlNode | undefined, tag: string): XmlNode[] {
  return kids(node).filter((k) => tagOf(k) === tag);
}
function textOf(node: XmlNode | undefined): string | undefined {
  const t = kids(node).find((k) => "#text" in k)?.["#text"];
  return t === undefined ? undefined : String(t);
}
function attr(node: XmlNode | undefined, name: string): string | undefined {
  const value = (node?.[":@"] as Record<string, unknown> | undefined)?.[name];
  return value === undefined ? undefined : String(value);
}

function parseXml(text: string, what: string): XmlNode[] {
  if (text.length > MAX_XML_CHARS) throw new MusicError(`${what} is larger than ${megabytes(MAX_XML_CHARS)} of text; a melody needs far less.`);
  // A DOCTYPE naming the public MusicXML DTD is normal; one declaring its own entities (an internal
  // subset) is how entity-expansion attacks start, and no score needs it.
  if (/<!DOCTYPE[^>[]*\[/iu.test(text) || /<!ENTITY/iu.test(text)) {
    throw new MusicError(`${what} declares its own XML entities (a DOCTYPE with [ … ]); MusicXML needs none. Export the score again from your notation program.`);
  }
  const valid = XMLValidator.validate(text);
  if (valid !== true) throw new MusicError(`${what} is not well-formed XML (line ${valid.err.line}): ${valid.err.msg}`);
  try {
    return parser.parse(text) as XmlNode[];
  } catch (error) {
    if (/nested tags/iu.test((error as Error).message)) throw new MusicError(`${what} nests its elements more than ${MAX_DEPTH} levels deep; a MusicXML score needs about 8.`);
    throw new MusicError(`${what} could not be read as XML: ${(error as Error).message}`);
  }
}

const ACCIDENTAL_NAMES: Readonly<Record<string, PrintedAccidental>> = {
  sharp: "sharp",
  flat: "flat",
  natural: "natural",
  "double-sharp": "double-sharp",
  "sharp-sharp": "double-sharp",
  "flat-flat": "double-flat",
  "double-flat": "double-flat",
};

interface RawNote extends TuneNote {
  tieStart: boolean;
  tieStop: boolean;
}

function positiveNumber(text: string | undefined, what: string): number {
  const n = Number(text);
  if (text === undefined || !Number.isFinite(n) || n < 0) throw new MusicError(`${what} must be a number of zero or more, not ${JSON.stringify(text)}.`);
  return n;
}

/** Standard tuning, low string first: a TAB staff without <staff-details> is read with it. */
const STANDARD_TAB: readonly number[] = [40, 45, 50, 55, 59, 64];

/**
 * A <transpose> as (diatonic steps, semitones) within an octave: a transposing part is read at concert
 * pitch in its own written range, so an octave in the transposition (guitar's, a tenor saxophone's) is dropped.
 */
function transposition(node: XmlNode | undefined): { steps: number; semitones: number } | null {
  if (!node) return null;
  const octaves = Number(textOf(find(node, "octave-change")) ?? 0);
  let steps = Number(textOf(find(node, "diatonic")) ?? 0) + 7 * octaves;
  let semitones = Number(textOf(find(node, "chromatic")) ?? 0) + 12 * octaves;
  if (![steps, semitones].every(Number.isInteger)) return null;
  while (steps <= -7) (steps += 7), (semitones += 12);
  while (steps >= 7) (steps -= 7), (semitones -= 12);
  return steps === 0 && semitones === 0 ? null : { steps, semitones };
}

function transposePitch(p: Pitch, t: { steps: number; semitones: number }, where: string): Pitch {
  const index = LETTERS.indexOf(p.letter) + t.steps;
  const letter = LETTERS[((index % 7) + 7) % 7]!;
  const octave = p.octave + Math.floor(index / 7);
  const midi = pitchMidi(p) + t.semitones;
  return checkPitch({ letter, octave, alter: midi - pitchMidi({ letter, octave, alter: 0 }) }, where);
}

/** Concert key of a transposing part: a transposition by (d steps, c semitones) moves the key 7c − 12d fifths. */
function concertFifths(fifths: number, t: { steps: number; semitones: number } | null): number {
  if (!t) return fifths;
  const moved = fifths + 7 * t.semitones - 12 * t.steps;
  return moved > 7 ? moved - 12 : moved < -7 ? moved + 12 : moved;
}

interface PartReading {
  notes: RawNote[];
  measures: TuneBar[];
  graceNotes: number;
  cueNotes: number;
}

/**
 * Every pitched, sounding note of one part, in document order, with times in quarter notes
 * (MusicXML 4.0: <duration> counts <divisions> per quarter note; <backup>/<forward> move the time cursor;
 * a <chord/> note starts with the note before it).
 */
function readPart(part: XmlNode): PartReading {
  const notes: RawNote[] = [];
  const measures: TuneBar[] = [];
  let divisions: number | undefined;
  let writtenFifths = 0;
  let meter = { beats: 4, beatType: 4 };
  let transpose: ReturnType<typeof transposition> = null;
  let graceNotes = 0;
  let cueNotes = 0;
  // MusicXML encodes sounding pitch under an octave clef, so guitar's treble-8vb (clef-octave-change −1) is read
  // an octave up to get the written note; TAB is written an octave above sounding too.
  const clefShift = new Map<string, number>(); // staff number → octaves to add
  const tabTuning = new Map<string, number[]>(); // staff number → open strings, low first (MIDI)
  let barStart = 0;
  findAll(part, "measure").forEach((measure, barIndex) => {
    const bar = attr(measure, "number") ?? String(barIndex + 1);
    const where = `Bar ${bar}`;
    let cursor = 0;
    let longest = 0;
    let lastOnset = 0;
    const quarters = (node: XmlNode) => {
      if (divisions === undefined) throw new MusicError(`${where}: a duration comes before <divisions> says how long a quarter note is.`);
      return positiveNumber(textOf(find(node, "duration")), `${where}: duration`) / divisions;
    };
    const fifthsNow = () => concertFifths(writtenFifths, transpose);
    const signs: Pick<TuneBar, "repeatStart" | "repeatEnd" | "ending"> = {};
    for (const item of kids(measure)) {
      const tag = tagOf(item);
      if (tag === "barline") readBarline(item, signs);
      else if (tag === "attributes") {
        const d = textOf(find(item, "divisions"));
        if (d !== undefined) {
          divisions = positiveNumber(d, `${where}: divisions`);
          if (divisions === 0) throw new MusicError(`${where}: divisions must be more than 0.`);
        }
        const f = textOf(find(find(item, "key"), "fifths"));
        if (f !== undefined) {
          try {
            writtenFifths = checkFifths(Number(f));
          } catch (error) {
            throw new MusicError(`${where}: ${(error as Error).message}`);
          }
        }
        const time = find(item, "time");
        if (time && !find(time, "senza-misura")) {
          // Composite meters such as 3+2 add up (MusicXML 4.0 <beats>).
          const beats = (textOf(find(time, "beats")) ?? "").split("+").reduce((sum, b) => sum + Number(b), 0);
          const beatType = Number(textOf(find(time, "beat-type")));
          if (!(beats > 0) || ![1, 2, 4, 8, 16, 32].includes(beatType)) throw new MusicError(`${where}: the time signature must be a number of beats over 1, 2, 4, 8, 16 or 32.`);
          meter = { beats, beatType };
        }
        if (find(item, "transpose")) transpose = transposition(find(item, "transpose"));
        for (const clef of findAll(item, "clef")) {
          const sign = textOf(find(clef, "sign"));
          const change = Number(textOf(find(clef, "clef-octave-change")) ?? 0);
          clefShift.set(attr(clef, "number") ?? "1", sign === "TAB" ? 1 : sign === "G" ? -change : 0);
          if (sign === "TAB" && !tabTuning.has(attr(clef, "number") ?? "1")) tabTuning.set(attr(clef, "number") ?? "1", [...STANDARD_TAB]);
        }
        for (const details of findAll(item, "staff-details")) {
          const tunings = findAll(details, "staff-tuning");
          if (tunings.length === 0) continue;
          // <staff-tuning line="1"> is the lowest line, the lowest string (MusicXML 4.0 staff-tuning).
          const open = tunings
            .map((t) => ({ line: Number(attr(t, "line")), step: textOf(find(t, "tuning-step")) as Letter, alter: Number(textOf(find(t, "tuning-alter")) ?? 0), octave: Number(textOf(find(t, "tuning-octave"))) }))
            .sort((a, b) => a.line - b.line)
            .map((t) => pitchMidi(checkPitch({ letter: t.step, alter: t.alter, octave: t.octave }, `${where}: staff tuning`)));
          tabTuning.set(attr(details, "number") ?? "1", open);
        }
      } else if (tag === "backup") {
        cursor -= quarters(item);
        if (cursor < -1e-9) throw new MusicError(`${where}: <backup> goes back past the start of the bar.`);
      } else if (tag === "forward") {
        cursor += quarters(item);
      } else if (tag === "note") {
        // Grace notes take no time (MusicXML 4.0: a <grace/> note has no <duration>): left out.
        if (find(item, "grace")) {
          graceNotes++;
          continue;
        }
        const isChord = find(item, "chord") !== undefined;
        const duration = quarters(item);
        const onset = isChord ? lastOnset : cursor;
        if (!isChord) {
          lastOnset = cursor;
          cursor += duration;
        }
        longest = Math.max(longest, cursor);
        // Cue notes take time in their voice but are not played (MusicXML 4.0 <cue/>): a rest in the line.
        if (find(item, "cue")) {
          cueNotes++;
          continue;
        }
        const staff = textOf(find(item, "staff")) ?? "1";
        const technical = find(find(item, "notations"), "technical");
        const string = textOf(find(technical, "string"));
        const fret = textOf(find(technical, "fret"));
        const pitchNode = find(item, "pitch");
        let pitch: Pitch;
        if (tabTuning.has(staff) && string !== undefined && fret !== undefined) {
          // A TAB note: the open string plus the fret sounds; guitar reads it an octave higher.
          const open = tabTuning.get(staff)!;
          const line = open.length + 1 - Number(string); // string 1 is the highest, on the top line
          if (!Number.isInteger(line) || line < 1 || line > open.length || !/^\d{1,2}$/u.test(fret)) throw new MusicError(`${where}: string ${string}, fret ${fret} is not on this TAB staff.`);
          pitch = spellInKey(open[line - 1]! + Number(fret) + 12, fifthsNow());
        } else if (pitchNode) {
          const step = textOf(find(pitchNode, "step")) as Letter;
          const alter = Number(textOf(find(pitchNode, "alter")) ?? 0);
          if (!Number.isInteger(alter)) throw new MusicError(`${where}: microtonal alter ${alter} cannot be played on frets.`);
          const soundOctave = Number(textOf(find(pitchNode, "octave")));
          const shift = clefShift.get(staff) ?? 0;
          pitch = checkPitch({ letter: step, alter, octave: soundOctave + shift }, where);
          if (transpose) pitch = transposePitch(pitch, transpose, where);
        } else {
          continue; // rests and unpitched (percussion) notes
        }
        const printed = textOf(find(item, "accidental"));
        const ties = findAll(item, "tie").map((t) => attr(t, "type"));
        notes.push({
          written: pitchToString(pitch),
          writtenMidi: pitchMidi(pitch),
          pitch,
          bar,
          barIndex,
          onset: barStart + onset,
          duration,
          tied: false,
          keyFifths: fifthsNow(),
          printedAccidental: printed === undefined ? null : (ACCIDENTAL_NAMES[printed] ?? null),
          tieStart: ties.includes("start"),
          tieStop: ties.includes("stop"),
        });
        if (notes.length > MAX_NOTES) throw new MusicError(`A part has more than ${MAX_NOTES} notes; a melody for a class needs far fewer.`);
      }
    }
    const full = (meter.beats * 4) / meter.beatType;
    measures.push({
      number: bar,
      start: barStart,
      length: longest,
      ...meter,
      keyFifths: fifthsNow(),
      pickup: barIndex === 0 && (attr(measure, "implicit") === "yes" || (longest > 0 && longest < full - EPSILON)),
      ...signs,
    });
    barStart += longest;
  });
  return { notes, measures, graceNotes, cueNotes };
}

const EPSILON = 1e-6;

/**
 * Repeat signs and volta brackets of one <barline> (MusicXML 4.0): <repeat direction="forward"> opens a repeat
 * (at the bar's left), "backward" closes one (at its right); <ending type="start"> opens a bracket numbered
 * by its number attribute ("1", "1, 2"), "stop" closes it with a hook, "discontinue" without one.
 */
function readBarline(barline: XmlNode, signs: Pick<TuneBar, "repeatStart" | "repeatEnd" | "ending">) {
  const direction = attr(find(barline, "repeat"), "direction");
  if (direction === "forward") signs.repeatStart = true;
  if (direction === "backward") signs.repeatEnd = true;
  const ending = find(barline, "ending");
  const type = attr(ending, "type");
  if (!ending || !type) return;
  signs.ending ??= { number: (attr(ending, "number") ?? "").slice(0, 16), start: false, end: null };
  if (type === "start") signs.ending.start = true;
  if (type === "stop") signs.ending.end = "hook";
  if (type === "discontinue") signs.ending.end = "open";
}

/** Merges tied notes into one, then keeps the highest note at each onset and drops lower voices under a held note. */
function topLine(raw: RawNote[]): { line: TuneNote[]; chordNotes: number; lowerVoiceNotes: number } {
  const merged: RawNote[] = [];
  for (const note of raw) {
    const open = note.tieStop
      ? merged.find((m) => m.tieStart && m.writtenMidi === note.writtenMidi && Math.abs(m.onset + m.duration - note.onset) < EPSILON)
      : undefined;
    if (open) {
      open.duration += note.duration;
      open.tieStart = note.tieStart;
      open.tied = true;
    } else {
      merged.push({ ...note });
    }
  }
  merged.sort((a, b) => a.onset - b.onset || b.writtenMidi - a.writtenMidi);
  const line: TuneNote[] = [];
  let chordNotes = 0;
  let lowerVoiceNotes = 0;
  for (const note of merged) {
    const last = line.at(-1);
    if (last && Math.abs(last.onset - note.onset) < EPSILON) {
      // A lower note of the same chord; the same pitch again (a TAB staff doubling the notation) is no loss.
      if (note.writtenMidi !== last.writtenMidi) chordNotes++;
      continue;
    }
    if (last && note.onset < last.onset + last.duration - EPSILON) {
      if (note.writtenMidi < last.writtenMidi) {
        lowerVoiceNotes++; // an inner voice under a held melody note
        continue;
      }
      last.duration = note.onset - last.onset; // the melody moves up before the held note ends
    }
    const { tieStart: _start, tieStop: _stop, ...kept } = note;
    line.push(kept);
  }
  return { line, chordNotes, lowerVoiceNotes };
}

/**
 * The first tempo in the score, looking in the given parts in order (the one read first: a tempo is often
 * written in the top part only). MusicXML 4.0: <direction><direction-type><metronome> holds <beat-unit>,
 * <beat-unit-dot/> and <per-minute>; <sound tempo> (in a direction or a measure) counts quarter notes a minute.
 * Later tempo changes are not followed.
 */
function firstTempo(parts: XmlNode[]): ScoreTempo | null {
  for (const part of parts) {
    for (const measure of findAll(part, "measure")) {
      for (const item of kids(measure)) {
        const tag = tagOf(item);
        if (tag !== "direction" && tag !== "sound") continue;
        const metronome = findAll(item, "direction-type").map((d) => find(d, "metronome")).find((m) => m !== undefined);
        const sound = tag === "sound" ? item : find(item, "sound");
        const tempo = readTempo({
          beatUnit: textOf(find(metronome, "beat-unit")),
          dots: findAll(metronome, "beat-unit-dot").length,
          perMinute: textOf(find(metronome, "per-minute")),
          soundTempo: attr(sound, "tempo"),
        });
        if (tempo) return tempo;
      }
    }
  }
  return null;
}

/**
 * Reads the melody (top line) of one part from MusicXML text: the part with id `partId`, or by default
 * the first part that has notes.
 */
export function parseMusicXml(text: string, partId?: string): Tune {
  if (typeof text !== "string") throw new MusicError("A MusicXML score must be text.");
  const doc = parseXml(text, "This MusicXML file");
  const root = doc.find((n) => tagOf(n) === "score-partwise" || tagOf(n) === "score-timewise");
  if (!root) throw new MusicError("This file is not a MusicXML score: it has no <score-partwise> element.");
  if (tagOf(root) === "score-timewise") {
    throw new MusicError("Timewise MusicXML is not supported: export the score as partwise MusicXML (the usual kind).");
  }
  const partNodes = findAll(root, "part");
  if (partNodes.length === 0) throw new MusicError("This score has no parts.");
  const scoreParts = findAll(find(root, "part-list"), "score-part");
  const read = partNodes.map((node) => {
    const id = attr(node, "id") ?? "";
    const reading = readPart(node);
    const top = topLine(reading.notes);
    const name = textOf(find(scoreParts.find((p) => attr(p, "id") === id), "part-name")) ?? id;
    return { id, name, reading, top };
  });
  const chosen = partId === undefined ? read.find((p) => p.top.line.length > 0) : read.find((p) => p.id === partId);
  if (!chosen) {
    throw new MusicError(partId === undefined ? "No part of this score has notes to read (only rests or percussion)." : `This score has no part "${partId}".`);
  }
  if (chosen.top.line.length === 0) throw new MusicError(`The part "${chosen.name}" has no notes to read (only rests or percussion).`);
  return {
    title: textOf(find(find(root, "work"), "work-title")) ?? textOf(find(root, "movement-title")) ?? null,
    part: chosen.name,
    partId: chosen.id,
    parts: read.map((p) => ({ id: p.id, name: p.name, notes: p.top.line.length })),
    bars: chosen.reading.measures.length,
    measures: chosen.reading.measures,
    notes: chosen.top.line,
    leftOut: {
      graceNotes: chosen.reading.graceNotes,
      cueNotes: chosen.reading.cueNotes,
      chordNotes: chosen.top.chordNotes,
      lowerVoiceNotes: chosen.top.lowerVoiceNotes,
      otherParts: read.filter((p) => p !== chosen).map((p) => p.name),
    },
    tempo: firstTempo([partNodes[read.indexOf(chosen)]!, ...partNodes.filter((_, i) => read[i] !== chosen)]),
  };
}

function decodeText(bytes: Uint8Array, what: string): string {
  // MusicXML is UTF-8 or UTF-16; the byte-order mark tells which.
  const encoding = bytes[0] === 0xff && bytes[1] === 0xfe ? "utf-16le" : bytes[0] === 0xfe && bytes[1] === 0xff ? "utf-16be" : "utf-8";
  try {
    return new TextDecoder(encoding, { fatal: true }).decode(bytes);
  } catch {
    throw new MusicError(`${what} is not valid ${encoding.toUpperCase()} text.`);
  }
}

/** The XML files of a .mxl archive; other entries (images, PDFs) are never inflated. */
function unzipXml(bytes: Uint8Array): Map<string, Uint8Array> {
  const chunks = new Map<string, Uint8Array[]>();
  let total = 0;
  let entries = 0;
  let failure: MusicError | undefined;
  const unzip = new Unzip((file) => {
    if (++entries > MAX_ZIP_ENTRIES) {
      failure ??= new MusicError(`This .mxl archive has more than ${MAX_ZIP_ENTRIES} files.`);
      return;
    }
    if (!/\.(xml|musicxml)$/iu.test(file.name)) return;
    const parts: Uint8Array[] = [];
    chunks.set(file.name, parts);
    file.ondata = (error, chunk) => {
      if (error) {
        failure ??= new MusicError(`"${file.name}" in the .mxl archive is damaged: ${error.message}`);
        return;
      }
      total += chunk.length;
      if (total > MAX_XML_CHARS) {
        failure ??= new MusicError(`This .mxl archive unpacks to more than ${megabytes(MAX_XML_CHARS)}; a melody needs far less.`);
        file.terminate();
        return;
      }
      parts.push(chunk);
    };
    file.start();
  });
  unzip.register(UnzipInflate);
  try {
    for (let i = 0; i < bytes.length && !failure; i += ZIP_SLICE) {
      unzip.push(bytes.subarray(i, i + ZIP_SLICE), i + ZIP_SLICE >= bytes.length);
    }
  } catch (error) {
    throw new MusicError(`This .mxl file is not a readable zip archive: ${(error as Error).message}`);
  }
  if (failure) throw failure;
  if (entries === 0) throw new MusicError("This .mxl file is not a readable zip archive: no files found in it.");
  const files = new Map<string, Uint8Array>();
  for (const [name, parts] of chunks) {
    const whole = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
    parts.reduce((at, p) => (whole.set(p, at), at + p.length), 0);
    files.set(name, whole);
  }
  return files;
}

/** Reads a compressed .mxl: META-INF/container.xml names the score inside. */
export function parseMxl(bytes: Uint8Array, partId?: string): Tune {
  const files = unzipXml(bytes);
  const container = files.get("META-INF/container.xml");
  if (!container) throw new MusicError("This .mxl archive has no META-INF/container.xml, so its score cannot be found.");
  const doc = parseXml(decodeText(container, "META-INF/container.xml"), "META-INF/container.xml");
  const rootfiles = findAll(find(doc.find((n) => tagOf(n) === "container"), "rootfiles"), "rootfile");
  // The first rootfile is the score; later ones may be other renderings (e.g. PDF).
  const path = rootfiles.map((r) => attr(r, "full-path")).find((p) => p !== undefined);
  if (!path) throw new MusicError("META-INF/container.xml names no score (no <rootfile full-path=…>).");
  const score = files.get(path);
  if (!score) throw new MusicError(`The .mxl archive names "${path}" as its score, but does not contain it.`);
  return parseMusicXml(decodeText(score, `"${path}"`), partId);
}

/** An uploaded score file of either kind, told apart by content rather than by name. */
export function parseScoreFile(bytes: Uint8Array, partId?: string): Tune {
  if (!(bytes instanceof Uint8Array) || bytes.length === 0) throw new MusicError("The score file is empty.");
  if (bytes.length > MAX_FILE_BYTES) throw new MusicError(FILE_TOO_BIG);
  const isZip = bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04; // "PK\3\4"
  return isZip ? parseMxl(bytes, partId) : parseMusicXml(decodeText(bytes, "The score file"), partId);
}
