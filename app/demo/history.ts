/**
 * Past rounds for the demo school, so the class review has a term behind it: five weekly Sprints
 * per class, played by scripted students through the real room reducer, stored exactly as the live
 * hub stores them (event log, seats, answer rows). The students improve week by week; a few stay
 * stuck on particular notes (F♯ in G major, B♭ in F major, notes on ledger lines). Seeded, so every
 * seed gives the same answers; only the dates follow today's date.
 */
import type { Db } from "~/db/client.server";
import { rooms } from "~/db/schema";
import { reduce, initialState, type RoomEvent, type RoomState } from "~/game/room";
import { ROOM_CODE_ALPHABET, ROOM_CODE_LENGTH } from "~/game/roomCode";
import type { PromptNote } from "~/game/roomConfig";
import { spotsFor, spotsForSounding, soundingMidi, type Spot } from "~/music/fretboard";
import { keyAlter } from "~/music/keys";
import { parsePitch } from "~/music/pitch";
import { seededRandom } from "~/music/pools";
import { resolveTuning } from "~/music/tuning";
import { classSpotMap } from "~/reading/spotMaps.server";
import { configFromSetup } from "~/rooms/rooms.server";
import { parsedSetup, QUICK_DEFAULTS, type QuickSetup } from "~/rooms/setup";
import { RoomLog, writeStatements, type StepWrites } from "~/rooms/store.server";
import { DEMO_SCHOOL as S } from "./school";

const WEEK = 7 * 24 * 60 * 60 * 1000;
const SESSIONS = 5;
const TUNING = resolveTuning("standard");

/** What each class reads over the weeks (the last one a step harder), and which letters trip whom. */
const PLANS: Record<string, { weeks: Partial<QuickSetup>[]; trouble: string }> = {
  "demo-class-tue": {
    weeks: [{}, {}, {}, {}, { ledgerLines: true }],
    trouble: "ledger",
  },
  "demo-class-thu": {
    weeks: [{ accidentals: "key", keyFifths: 1 }, { accidentals: "key", keyFifths: 1 }, { accidentals: "key", keyFifths: 1 }, { accidentals: "key", keyFifths: 1 }, { accidentals: "key", keyFifths: 1, ledgerLines: true }],
    trouble: "F",
  },
  "demo-class-sat": {
    weeks: [{}, {}, { accidentals: "key", keyFifths: -1 }, { accidentals: "key", keyFifths: -1 }, { accidentals: "key", keyFifths: -1 }],
    trouble: "B",
  },
};

interface Student {
  id: string;
  name: string;
  /** Chance of a home-spot answer in week 1, and how much it grows per week. */
  skill: number;
  growth: number;
  /** Stuck on the class's trouble notes: they go on misreading them. */
  stuck: boolean;
  /** Typical reaction time in week 1, ms. */
  pace: number;
}

type Rng = () => number;

function code(random: Rng) {
  return Array.from({ length: ROOM_CODE_LENGTH }, () => ROOM_CODE_ALPHABET[Math.floor(random() * ROOM_CODE_ALPHABET.length)]).join("");
}

/**
 * A spot for a wrong answer of a believable kind (the reducer then names the mistake): a student
 * stuck on the key signature plays the letter without it; others slip to another spot, a fret or a
 * string off, an octave off or further.
 */
function missSpot(note: PromptNote, random: Rng, keySlip: boolean, frets: number): Spot {
  const { home } = note;
  const signature = keyAlter(note.keyFifths, parsePitch(note.written).letter);
  const onNeck = (s: Spot) => s.string >= 1 && s.string <= TUNING.strings.length && s.fret >= 0 && s.fret <= frets;
  const unsigned = { string: home.string, fret: home.fret - signature };
  if (keySlip && signature !== 0 && onNeck(unsigned)) return unsigned;
  const side = random() < 0.5 ? 1 : -1;
  const slips: (() => Spot[])[] = [
    () => spotsFor(note.written, { tuning: TUNING, frets }).filter((s) => s.string !== home.string || s.fret !== home.fret),
    () => [{ string: home.string, fret: home.fret + side }],
    () => [{ string: home.string + side, fret: home.fret }],
    () => spotsForSounding(soundingMidi(note.writtenMidi) + 12 * side, TUNING, frets),
    () => [{ string: home.string, fret: home.fret + 3 * side }],
  ];
  const pick = [0, 0, 1, 1, 1, 2, 2, 3, 4][Math.floor(random() * 9)]!;
  return slips[pick]!().find(onNeck) ?? { string: home.string, fret: home.fret === frets ? frets - 1 : home.fret + 1 };
}

/** Ledger-line notes, or the class's letter where the key signature changes it (F in G major, B in F major). */
function isTrouble(note: PromptNote, trouble: string) {
  if (trouble === "ledger") return note.ledger;
  const letter = parsePitch(note.written).letter;
  return letter === trouble && note.printedAccidental === null && keyAlter(note.keyFifths, letter) !== 0;
}

/** Plays one round through the reducer and returns what the hub would have stored. */
function playRound(config: ReturnType<typeof configFromSetup>, roomId: string, start: number, week: number, present: Student[], trouble: string, random: Rng) {
  let state: RoomState = initialState(config);
  let now = start;
  const log = new RoomLog(roomId);
  const writes: StepWrites[] = [];
  const apply = (event: RoomEvent, userId: string | null = null) => {
    const step = reduce(state, event, { now, leadMs: 0 });
    const rows = log.rows(step.effects, userId);
    if (rows) writes.push(rows);
    state = step.state;
  };

  present.forEach((s, i) => {
    now += 1_500;
    apply({ type: "join", playerId: `${roomId}-p${i + 1}`, seatToken: `${roomId}-seat${i + 1}`, nickname: s.name }, s.id);
  });
  // `apply` replaces the state, which the compiler cannot see inside the loop.
  const phase = () => state.phase;
  const seatOf = new Map(present.map((s, i) => [s.id, `${roomId}-p${i + 1}`]));
  now += 5_000;
  apply({ type: "host", action: "start" });
  while (phase() === "prompt") {
    const run = state.run!;
    const note = config.prompts[run.index]!;
    const taps = present
      .filter(() => random() > 0.03)
      .map((s) => {
        const hard = isTrouble(note, trouble);
        const skill = Math.min(0.97, s.skill + s.growth * week) - (hard ? (s.stuck ? 0.45 : Math.max(0, 0.25 - 0.05 * week)) : 0);
        const right = random() < skill;
        const slow = (hard ? 1.5 : 1) * s.pace * (1 - 0.08 * week) * (0.6 + random() * 0.8);
        const spot = right ? note.home : missSpot(note, random, hard && trouble !== "ledger", config.frets);
        return { playerId: seatOf.get(s.id)!, spot, tapAt: run.showAt + Math.round(Math.min(config.answerMs - 200, Math.max(600, slow))) };
      })
      .sort((a, b) => a.tapAt - b.tapAt);
    for (const t of taps) {
      now = t.tapAt + 80;
      apply({ type: "answer", playerId: t.playerId, promptId: run.promptId, spot: { string: t.spot.string, fret: t.spot.fret }, tapAt: t.tapAt });
    }
    if (phase() === "prompt") {
      now = run.deadline + 400;
      apply({ type: "tick" });
    }
    now += 4_000;
    apply({ type: "host", action: "next" });
    if (phase() === "standings") {
      now += 6_000;
      apply({ type: "host", action: "next" });
    }
  }
  return writes;
}

export async function seedHistory(db: Db) {
  const random = seededRandom(20_250_901);
  const today = new Date();
  today.setUTCHours(17, 30, 0, 0);
  const students = S.students.map(([name, classId], i) => ({ id: `demo-student-${i + 1}`, name, classId }));
  for (const [c, cls] of S.classes.entries()) {
    const plan = PLANS[cls.id]!;
    const roster: Student[] = students
      .filter((s) => s.classId === cls.id)
      .map((s, i) => ({
        id: s.id,
        name: s.name,
        skill: 0.45 + random() * 0.35,
        growth: 0.05 + random() * 0.05,
        // The second and fifth student of each class keep stumbling on the class's trouble notes.
        stuck: i === 1 || i === 4,
        pace: 2_600 + random() * 2_400,
      }));
    for (let week = 0; week < SESSIONS; week++) {
      const roomId = `demo-round-${cls.id.replace("demo-class-", "")}-${week + 1}`;
      const start = today.getTime() - (SESSIONS - week) * WEEK + c * 60 * 60 * 1000;
      const setup: QuickSetup = { ...QUICK_DEFAULTS, classId: cls.id, ...plan.weeks[week] };
      const roomCode = code(random);
      // The class's own home-spot map, as a live round filed under the class would use it.
      const spotMap = await classSpotMap(db, cls.id, setup.position, setup.tuning);
      const config = configFromSetup(parsedSetup(setup), roomCode, 1_000 + c * 10 + week, spotMap);
      // Now and then somebody is away.
      const present = roster.filter(() => random() > 0.12);
      const writes = playRound(config, roomId, start, week, present, plan.trouble, random);
      // The round's writes end it (rooms.ended_at), as the hub's do.
      await db.insert(rooms).values({
        id: roomId,
        code: roomCode,
        orgId: S.id,
        hostUserId: cls.teacher,
        classId: cls.id,
        title: `Sprint · position ${setup.position}`,
        mode: setup.mode,
        position: setup.position,
        config,
        createdAt: new Date(start),
      });
      await db.$client.batch(writeStatements(db, writes), "write");
    }
  }
}
