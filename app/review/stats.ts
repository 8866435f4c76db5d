/**
 * Class review figures, pure: from the stored answer rows of a class's rounds (one round = one
 * room) to leaderboards, the note heatmap, mistake shares, notes to reteach and per-student
 * progress. No I/O, so every rule below is checked in stats.test.ts against hand-made answers.
 *
 * Rules, in one place:
 * - **Correct** = full credit, as the round scored it: the verdict the reducer gave, stored with
 *   each answer row (`verdict = "right"`). Nothing here re-derives it.
 * - **Accuracy** = correct ÷ answers given. Prompts a player did not answer are not rows, so they
 *   do not count (the live round already breaks the streak for them).
 * - **Median time** = median reaction time of the right-pitch answers (home or other spot): how fast
 *   a note is found once read, not how often it is read right.
 * - **Longest streak** = the largest value of the stored `streak` column (the streak after each
 *   answer). A streak only grows on an answer and only breaks to 0, so its peak is always right after
 *   an answer: this equals the reducer's own longestStreak without replaying the log.
 * - **Linking**: a student who played signed in is linked across rounds by account; a
 *   nickname-only seat counts only within its own round and is left out of cross-round figures.
 * - **Ranked** on the accuracy and time boards only with at least MIN_RANKED answers (resp. right-pitch
 *   answers), so one lucky tap does not top the board.
 */
import type { Spot } from "~/music/fretboard";
import { MISTAKE_LABELS, type MistakeKind } from "~/music/mistakes";
import type { RoomConfig } from "~/game/roomConfig";
import type { Verdict } from "~/game/scoring";
import { median } from "~/lib/median";

export const MIN_RANKED = 3;
/** Reteach: a note needs this many answers to be judged at all… */
export const RETEACH_MIN_SAMPLE = 5;
/** …and is "not yet read" below this accuracy. */
export const RETEACH_ACCURACY_BAR = 0.8;
export const RETEACH_SIZE = 5;

/** The shape of an `answers` row. */
export interface AnswerRow {
  roomId: string;
  playerId: string;
  promptIndex: number;
  written: string;
  writtenMidi: number;
  string: number;
  fret: number;
  kind: string;
  pitchRight: boolean;
  /** The round's verdict; null only for a row its room's log does not hold (counts as not right). */
  verdict: Verdict | null;
  points: number;
  reactionMs: number;
  streak: number;
  at: number;
}

/** A seat from `room_players`. */
export interface PlayerRow {
  id: string;
  roomId: string;
  userId: string | null;
  nickname: string;
}

/** A round of the class, reduced to what the figures need. */
export interface RoundInfo {
  id: string;
  title: string;
  startedAt: number;
  live: boolean;
  /** The home spot of each prompt, by prompt index. */
  homes: Spot[];
  /** Where it was read, to draw the fretboard. */
  position: number;
  tuning: string;
  frets: number;
}

export interface ReviewInput {
  rounds: RoundInfo[];
  players: PlayerRow[];
  answers: AnswerRow[];
}

export function roundInfo(room: { id: string; title: string; position: number; createdAt: Date; endedAt: Date | null; config: RoomConfig }): RoundInfo {
  return {
    id: room.id,
    title: room.title,
    startedAt: room.createdAt.getTime(),
    live: room.endedAt === null,
    homes: room.config.prompts.map((p) => ({ string: p.home.string, fret: p.home.fret })),
    position: room.position,
    tuning: room.config.tuning,
    frets: room.config.frets,
  };
}

/** Answer rows with full credit marked, and only those of the given rounds. */
interface Scored extends AnswerRow {
  correct: boolean;
}

function scoredRows(input: ReviewInput, rows: readonly AnswerRow[] = input.answers): Scored[] {
  const known = new Set(input.rounds.map((s) => s.id));
  return rows.filter((a) => known.has(a.roomId)).map((a) => ({ ...a, correct: a.verdict === "right" }));
}

// ---- per player ----------------------------------------------------------------------------

export interface Figures {
  points: number;
  answered: number;
  correct: number;
  accuracy: number;
  /** Right-pitch answers: what the median time is taken over. */
  rightPitch: number;
  medianMs: number | null;
  longestStreak: number;
}

function figuresOf(rows: readonly Scored[]): Figures {
  const correct = rows.filter((a) => a.correct).length;
  const times = rows.filter((a) => a.pitchRight).map((a) => a.reactionMs);
  return {
    points: rows.reduce((sum, a) => sum + a.points, 0),
    answered: rows.length,
    correct,
    accuracy: rows.length === 0 ? 0 : correct / rows.length,
    rightPitch: times.length,
    medianMs: median(times),
    longestStreak: Math.max(0, ...rows.map((a) => a.streak)),
  };
}

export interface PlayerFigures extends Figures {
  /** The account id, or `seat:<playerId>` for a nickname-only seat. */
  key: string;
  userId: string | null;
  nickname: string;
}

const keyOf = (p: PlayerRow) => p.userId ?? `seat:${p.id}`;

/**
 * Figures per player, grouped by account (a student who re-joined from another phone has two seats
 * but is one player) — within the given rounds, and only linked players when `linkedOnly`.
 */
function playersOf(input: ReviewInput, roundIds: ReadonlySet<string>, linkedOnly: boolean): PlayerFigures[] {
  const seats = input.players.filter((p) => roundIds.has(p.roomId) && (!linkedOnly || p.userId !== null));
  const byKey = new Map<string, { userId: string | null; nickname: string; seatIds: Set<string> }>();
  for (const p of seats) {
    const entry = byKey.get(keyOf(p)) ?? { userId: p.userId, nickname: p.nickname, seatIds: new Set<string>() };
    entry.seatIds.add(p.id);
    byKey.set(keyOf(p), entry);
  }
  const rows = scoredRows(input).filter((a) => roundIds.has(a.roomId));
  return [...byKey].map(([key, e]) => ({ key, userId: e.userId, nickname: e.nickname, ...figuresOf(rows.filter((a) => e.seatIds.has(a.playerId))) }));
}

export function roundPlayers(input: ReviewInput, roundId: string): PlayerFigures[] {
  return playersOf(input, new Set([roundId]), false);
}

// ---- leaderboards --------------------------------------------------------------------------

export interface Leaderboards {
  points: PlayerFigures[];
  streak: PlayerFigures[];
  accuracy: PlayerFigures[];
  speed: PlayerFigures[];
}

const byName = (a: PlayerFigures, b: PlayerFigures) => a.nickname.localeCompare(b.nickname);

export function leaderboards(players: readonly PlayerFigures[]): Leaderboards {
  return {
    points: [...players].sort((a, b) => b.points - a.points || b.longestStreak - a.longestStreak || byName(a, b)),
    streak: [...players].sort((a, b) => b.longestStreak - a.longestStreak || b.points - a.points || byName(a, b)),
    accuracy: players.filter((p) => p.answered >= MIN_RANKED).sort((a, b) => b.accuracy - a.accuracy || b.answered - a.answered || byName(a, b)),
    speed: players
      .filter((p) => p.medianMs !== null && p.rightPitch >= MIN_RANKED)
      .sort((a, b) => a.medianMs! - b.medianMs! || byName(a, b)),
  };
}

// ---- most improved -------------------------------------------------------------------------

export interface Improvement {
  userId: string;
  nickname: string;
  /** Accuracy in the round, in the student's previous round of this class, and the difference. */
  now: number;
  before: number;
  delta: number;
  previousRoundId: string;
}

/**
 * Most improved since the previous round: for every linked student with at least MIN_RANKED answers
 * in `roundId`, accuracy there minus accuracy in the latest earlier round of the class where they
 * also gave at least MIN_RANKED answers. Largest rise first; only students who rose are listed (no earlier
 * round, the same accuracy or a drop is not an improvement).
 */
export function mostImproved(input: ReviewInput, roundId: string): Improvement[] {
  const ordered = [...input.rounds].sort((a, b) => a.startedAt - b.startedAt);
  const at = ordered.findIndex((s) => s.id === roundId);
  if (at < 0) return [];
  const earlier = ordered.slice(0, at).reverse();
  const perRound = new Map(ordered.slice(0, at + 1).map((s) => [s.id, new Map(playersOf(input, new Set([s.id]), true).map((p) => [p.userId!, p]))]));
  const out: Improvement[] = [];
  for (const p of perRound.get(roundId)!.values()) {
    if (p.answered < MIN_RANKED) continue;
    const prev = earlier.map((s) => ({ s, f: perRound.get(s.id)!.get(p.userId!) })).find((x) => x.f && x.f.answered >= MIN_RANKED);
    if (!prev || p.accuracy <= prev.f!.accuracy) continue;
    out.push({ userId: p.userId!, nickname: p.nickname, now: p.accuracy, before: prev.f!.accuracy, delta: p.accuracy - prev.f!.accuracy, previousRoundId: prev.s.id });
  }
  return out.sort((a, b) => b.delta - a.delta || a.nickname.localeCompare(b.nickname));
}

// ---- notes ---------------------------------------------------------------------------------

export interface NoteCell {
  /** The written pitch as spelt on the page (F♯4 and G♭4 are different reading tasks). */
  written: string;
  writtenMidi: number;
  /** Its home spot in the round where it was first asked. */
  home: Spot | null;
  answers: number;
  correct: number;
  accuracy: number;
  medianMs: number | null;
  /** How often each mistake kind (home spot included) was given for this note. */
  kinds: Partial<Record<MistakeKind, number>>;
}

/** The note heatmap: accuracy and median time per written pitch, low to high. */
export function noteHeatmap(input: ReviewInput, rows: readonly AnswerRow[] = input.answers): NoteCell[] {
  const homes = new Map(input.rounds.map((s) => [s.id, s.homes]));
  const groups = new Map<string, Scored[]>();
  for (const a of scoredRows(input, rows)) groups.set(a.written, [...(groups.get(a.written) ?? []), a]);
  return [...groups]
    .map(([written, list]) => {
      const f = figuresOf(list);
      const first = list[0]!;
      return { written, writtenMidi: first.writtenMidi, home: homes.get(first.roomId)?.[first.promptIndex] ?? null, answers: f.answered, correct: f.correct, accuracy: f.accuracy, medianMs: f.medianMs, kinds: kindCounts(list) };
    })
    .sort((a, b) => a.writtenMidi - b.writtenMidi || a.written.localeCompare(b.written));
}

function kindCounts(rows: readonly Pick<AnswerRow, "kind">[]): Partial<Record<MistakeKind, number>> {
  const kinds: Partial<Record<MistakeKind, number>> = {};
  for (const a of rows) kinds[a.kind as MistakeKind] = (kinds[a.kind as MistakeKind] ?? 0) + 1;
  return kinds;
}

export interface PromptResult {
  index: number;
  written: string;
  answered: number;
  right: number;
  kinds: Partial<Record<MistakeKind, number>>;
}

/** Note by note through one round: for each prompt shown (in order), answers given, right, and the kinds given. */
export function promptResults(input: ReviewInput, roundId: string, shown: readonly { written: string }[]): PromptResult[] {
  const rows = scoredRows(input).filter((a) => a.roomId === roundId);
  return shown.map((note, index) => {
    const mine = rows.filter((a) => a.promptIndex === index);
    return { index, written: note.written, answered: mine.length, right: mine.filter((a) => a.correct).length, kinds: kindCounts(mine) };
  });
}

export interface MistakeShare {
  kind: MistakeKind;
  label: string;
  count: number;
  share: number;
}

/** Share of each kind among the answers given (every kind listed, home spot first). */
export function mistakeShares(rows: readonly Pick<AnswerRow, "kind">[]): MistakeShare[] {
  return (Object.keys(MISTAKE_LABELS) as MistakeKind[]).map((kind) => {
    const count = rows.filter((a) => a.kind === kind).length;
    return { kind, label: MISTAKE_LABELS[kind], count, share: rows.length === 0 ? 0 : count / rows.length };
  });
}

export interface Reteach extends NoteCell {
  reason: "not read yet" | "slow to find";
  /** The mistake most often made on it, if any. */
  commonMistake: MistakeKind | null;
}

/**
 * Notes to reteach, at most RETEACH_SIZE: only notes with at least RETEACH_MIN_SAMPLE answers are
 * judged. First those below RETEACH_ACCURACY_BAR, lowest accuracy first (slower first on a tie);
 * then, to fill the list, the slowest of the rest by median time. An empty list means too little data.
 */
export function reteachList(cells: readonly NoteCell[]): Reteach[] {
  const judged = cells.filter((c) => c.answers >= RETEACH_MIN_SAMPLE);
  const slowFirst = (a: NoteCell, b: NoteCell) => (b.medianMs ?? Infinity) - (a.medianMs ?? Infinity);
  const weak = judged.filter((c) => c.accuracy < RETEACH_ACCURACY_BAR).sort((a, b) => a.accuracy - b.accuracy || slowFirst(a, b));
  const slow = judged.filter((c) => c.accuracy >= RETEACH_ACCURACY_BAR && c.medianMs !== null).sort(slowFirst);
  const withWhy = (c: NoteCell, reason: Reteach["reason"]): Reteach => {
    const mistakes = (Object.entries(c.kinds) as [MistakeKind, number][]).filter(([k]) => k !== "home-spot").sort((a, b) => b[1] - a[1]);
    return { ...c, reason, commonMistake: mistakes[0]?.[0] ?? null };
  };
  return [...weak.map((c) => withWhy(c, "not read yet")), ...slow.map((c) => withWhy(c, "slow to find"))].slice(0, RETEACH_SIZE);
}

// ---- the class review ----------------------------------------------------------------------

export interface RoundOverview extends Pick<RoundInfo, "id" | "title" | "startedAt" | "live"> {
  players: number;
  answers: number;
  accuracy: number;
}

export interface ClassReview {
  rounds: RoundOverview[];
  /** null: across every round of the class (linked students only); else that one round (everyone). */
  roundId: string | null;
  leaderboards: Leaderboards;
  /** Since the previous round, for the chosen round or else the latest one. */
  mostImproved: Improvement[];
  heatmap: NoteCell[];
  mistakes: MistakeShare[];
  reteach: Reteach[];
}

export function classReview(input: ReviewInput, roundId: string | null = null): ClassReview {
  const rounds = [...input.rounds].sort((a, b) => b.startedAt - a.startedAt);
  const ids = new Set(roundId === null ? rounds.map((s) => s.id) : [roundId]);
  const scored = scoredRows(input);
  const overview = rounds.map((s) => {
    const rows = scored.filter((a) => a.roomId === s.id);
    return { id: s.id, title: s.title, startedAt: s.startedAt, live: s.live, players: input.players.filter((p) => p.roomId === s.id).length, answers: rows.length, accuracy: figuresOf(rows).accuracy };
  });
  const rows = input.answers.filter((a) => ids.has(a.roomId));
  const players = playersOf(input, ids, roundId === null);
  const heatmap = noteHeatmap(input, rows);
  const latest = roundId ?? overview.find((s) => s.answers > 0)?.id;
  return {
    rounds: overview,
    roundId,
    leaderboards: leaderboards(players),
    mostImproved: latest ? mostImproved(input, latest) : [],
    heatmap,
    mistakes: mistakeShares(rows),
    reteach: reteachList(heatmap),
  };
}

// ---- one student ---------------------------------------------------------------------------

export interface ProgressPoint extends Figures {
  roundId: string;
  title: string;
  startedAt: number;
}

export interface Best {
  value: number;
  roundId: string;
}

export interface StudentProgress {
  rounds: ProgressPoint[];
  bests: { points: Best | null; streak: Best | null; accuracy: Best | null; speed: Best | null };
  heatmap: NoteCell[];
}

/**
 * A linked student's figures per round they played (oldest first) and their personal bests: most
 * points and longest streak in one round, best accuracy and fastest median (with at least MIN_RANKED
 * answers that round); the earliest round wins a tie, as the one where the best was first reached.
 */
export function studentProgress(input: ReviewInput, userId: string): StudentProgress {
  const seats = input.players.filter((p) => p.userId === userId);
  const ordered = [...input.rounds].sort((a, b) => a.startedAt - b.startedAt).filter((s) => seats.some((p) => p.roomId === s.id));
  const scored = scoredRows(input);
  const seatIds = new Set(seats.map((p) => p.id));
  const rounds = ordered.map((s) => ({ roundId: s.id, title: s.title, startedAt: s.startedAt, ...figuresOf(scored.filter((a) => a.roomId === s.id && seatIds.has(a.playerId))) }));
  const best = (list: ProgressPoint[], value: (p: ProgressPoint) => number | null, higher: boolean): Best | null =>
    list.reduce<Best | null>((acc, p) => {
      const v = value(p);
      if (v === null || (acc && (higher ? v <= acc.value : v >= acc.value))) return acc;
      return { value: v, roundId: p.roundId };
    }, null);
  const ranked = rounds.filter((p) => p.answered >= MIN_RANKED);
  return {
    rounds,
    bests: {
      points: best(rounds, (p) => p.points, true),
      streak: best(rounds, (p) => p.longestStreak, true),
      accuracy: best(ranked, (p) => p.accuracy, true),
      speed: best(ranked, (p) => p.medianMs, false),
    },
    heatmap: noteHeatmap(input, input.answers.filter((a) => seatIds.has(a.playerId))),
  };
}
