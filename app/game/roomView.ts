/**
 * What a room's state reads as: the questions the reducer and the messages both ask of it (who is
 * in, the note asked, the answers to it) and every message that shows it to a stage or pad,
 * snapshot included. Pure functions of the state; the rules that change it are in room.ts.
 */
import { spotsFor, type Spot } from "~/music/fretboard";
import { MISTAKE_LABELS, type MistakeKind } from "~/music/mistakes";
import { resolveTuning } from "~/music/tuning";
import type { ServerMessage, ServerMessageOf } from "./protocol";
import type { Answer, Audience, Player, RoomState } from "./room";
import { melodyAt, type PromptNote } from "./roomConfig";
import { playerSummaries, standings } from "./standings";

export const STAGE: Audience = { to: "stage" };
export const EVERYONE: Audience = { to: "everyone" };
export const PADS: Audience = { to: "pads" };
export const player = (playerId: string): Audience => ({ to: "player", playerId });

export const active = (s: RoomState) => s.players.filter((p) => !p.removed);
export const findPlayer = (s: RoomState, id: string) => s.players.find((p) => p.id === id && !p.removed);

export const note = (s: RoomState): PromptNote => s.config.prompts[s.run!.index]!;

/**
 * The answers to the prompt in progress. Answers are only taken for that prompt, so they are the
 * tail of `s.answers`: found in O(class size) however long the round has run.
 */
export function promptAnswers(s: RoomState): Answer[] {
  const id = s.run!.promptId;
  let i = s.answers.length;
  while (i > 0 && s.answers[i - 1]!.promptId === id) i--;
  return s.answers.slice(i);
}
export const sameSpot = (a: Spot, b: Spot) => a.string === b.string && a.fret === b.fret;
export const allSpots = (s: RoomState, n: PromptNote) => spotsFor(n.written, { tuning: resolveTuning(s.config.tuning), frets: s.config.frets, reading: s.config.reading });
export const fullNeck = (s: RoomState) => s.config.mode === "full-neck";

export const answeredIds = (s: RoomState) => new Set(promptAnswers(s).map((a) => a.playerId));

export function roster(s: RoomState): ServerMessageOf<"roster"> {
  return {
    type: "roster",
    locked: s.locked,
    max: s.config.maxPlayers,
    players: active(s).map((p) => ({ playerId: p.id, nickname: p.nickname, online: p.online, team: p.team })),
  };
}

/** Nothing in it tells the note: pads get it in the countdown. */
export function promptMessage(s: RoomState): ServerMessageOf<"prompt"> {
  const run = s.run!;
  return {
    type: "prompt",
    phase: s.phase,
    promptId: run.promptId,
    index: run.index,
    total: s.config.prompts.length,
    mode: s.config.mode,
    showAt: run.showAt,
    deadline: run.deadline,
    answerMs: s.config.answerMs,
  };
}

/** Everything that tells the note, the count of its spots included; for the stage, a Tune walk's melody so far. */
export function noteMessage(s: RoomState, to: Audience): ServerMessageOf<"note"> {
  const n = note(s);
  const sheet = to.to === "stage" ? s.config.sheet : undefined;
  return {
    type: "note",
    promptId: s.run!.promptId,
    written: n.written,
    keyFifths: n.keyFifths,
    printedAccidental: n.printedAccidental,
    ledger: n.ledger,
    spotsToFind: fullNeck(s) ? allSpots(s, n).length : null,
    ...(sheet ? { melody: melodyAt(sheet, s.run!.index) } : {}),
  };
}

export function ackMessage(a: Answer, p: Player): ServerMessageOf<"answer-ack"> {
  return {
    type: "answer-ack",
    promptId: a.promptId,
    accepted: true,
    points: a.points,
    total: p.points,
    streak: a.streak,
    reactionMs: a.reactionMs,
    diagnosis: { kind: a.diagnosis.kind, pitchRight: a.diagnosis.pitchRight, semitones: a.diagnosis.semitones, message: a.diagnosis.message },
    found: a.found,
  };
}

export const answeredMessage = (s: RoomState): ServerMessageOf<"answered"> => {
  const answered = answeredIds(s);
  // Offline players who haven't answered are counted apart: the teacher waits for the others, not for them.
  const offline = active(s).filter((p) => !p.online && !answered.has(p.id)).length;
  return { type: "answered", promptId: s.run!.promptId, count: answered.size, of: active(s).length, offline };
};

export const pausedMessage = (s: RoomState): ServerMessageOf<"paused"> => ({ type: "paused", phase: "paused", pausedFrom: s.paused!.from, at: s.paused!.at });

export function progressMessage(s: RoomState): ServerMessageOf<"progress"> {
  return { type: "progress", promptId: s.run!.promptId, found: s.run!.found, total: allSpots(s, note(s)).length };
}

export function revealMessage(s: RoomState): ServerMessageOf<"reveal"> {
  const run = s.run!;
  const n = note(s);
  const taps = promptAnswers(s);
  const counts = Object.fromEntries([...Object.keys(MISTAKE_LABELS), "no-answer"].map((k) => [k, 0])) as Record<MistakeKind | "no-answer", number>;
  for (const a of taps) counts[a.diagnosis.kind] += 1;
  counts["no-answer"] = run.closed!.unanswered - run.closed!.offline;
  const heat = new Map<string, { string: number; fret: number; count: number }>();
  for (const a of taps) {
    const key = `${a.spot.string}:${a.spot.fret}`;
    heat.set(key, { ...a.spot, count: (heat.get(key)?.count ?? 0) + 1 });
  }
  return {
    type: "reveal",
    phase: s.phase,
    promptId: run.promptId,
    written: n.written,
    home: { string: n.home.string, fret: n.home.fret },
    otherSpots: allSpots(s, n).filter((spot) => !sameSpot(spot, n.home)),
    heat: [...heat.values()].sort((a, b) => a.string - b.string || a.fret - b.fret),
    counts,
    answered: new Set(taps.map((a) => a.playerId)).size,
    of: run.closed!.of,
    offline: run.closed!.offline,
  };
}

/** Final standings, then the summaries: all of them for the stage, only their own for a player. */
export function endMessages(s: RoomState, to: Audience): ServerMessage[] {
  const summaries = playerSummaries(s).filter((x) => to.to !== "player" || x.playerId === to.playerId);
  return [standings(s, true), { type: "ended", phase: "ended", reason: s.ended!, tuneName: s.config.tuneName, summaries }];
}

/**
 * Everything a stage or pad needs on (re)connecting, starting with welcome: the roster, then what
 * is on screen now — the prompt and its note (with the stage's answered count and the player's own
 * acks), the reveal beside its prompt, standings, pause, or the end — so a reloaded screen is the one
 * it had. A pad gets the note (and Full neck's finds, which give it away) only while it is shown.
 * A pad that has not joined yet passes playerId null.
 */
export function snapshot(s: RoomState, who: { role: "host" } | { role: "player"; playerId: string | null }, now: number): ServerMessage[] {
  const p = who.role === "player" && who.playerId !== null ? findPlayer(s, who.playerId) : undefined;
  const welcome: ServerMessage = {
    type: "welcome",
    role: who.role,
    room: s.config.code,
    phase: s.phase,
    pausedFrom: s.paused?.from ?? null,
    serverTime: now,
    you: p ? { playerId: p.id, nickname: p.nickname, seatToken: p.seatToken, team: p.team } : null,
  };
  const messages: ServerMessage[] = [welcome, roster(s)];
  const shown = s.phase === "paused" ? s.paused!.from : s.phase;
  if (shown === "prompt" || shown === "reveal") {
    messages.push(promptMessage(s));
    const told = who.role === "host" || s.run!.shownAt !== null;
    if (told) messages.push(noteMessage(s, who.role === "host" ? STAGE : PADS));
    if (who.role === "host") messages.push(answeredMessage(s));
    if (fullNeck(s) && told) messages.push(progressMessage(s));
    if (p) for (const a of promptAnswers(s).filter((x) => x.playerId === p.id)) messages.push(ackMessage(a, p));
    if (shown === "reveal") messages.push(revealMessage(s));
  } else if (shown === "standings") messages.push(standings(s, false));
  else if (shown === "ended") messages.push(...endMessages(s, who.role === "host" ? STAGE : player(p?.id ?? "")));
  if (s.phase === "paused") messages.push(pausedMessage(s));
  return messages;
}
