/**
 * The room state machine, as a pure reducer: reduce(state, event, env) → { state, effects, wakeAt }.
 *
 *   lobby ──start──▶ prompt ──all answered / time up / skip──▶ reveal ──next──▶ prompt …
 *                      │                                         │ every `standingsEvery` prompts
 *                      │                                         ▼
 *                      │                                     standings ──next──▶ prompt …
 *   prompt, reveal, standings ──pause──▶ paused ──resume──▶ (where it was)
 *   any phase ──end (or next after the last reveal)──▶ ended
 *
 * "prompt" has two moments: the countdown until showAt, when answers are refused, and the open
 * window from showAt to the deadline. The note stays secret in the countdown: the prompt tells
 * everyone when, the stage alone gets the note with it (to draw it off-screen), and the pads get
 * the note from the step at showAt (`run.shownAt`), which the room's timer wakes for.
 *
 * Driving it: the hub turns every socket message, connect and disconnect into a RoomEvent, calls
 * reduce with the current server time, then carries out the effects in order — the "store-…" ones
 * first (what to write to SQLite: the record for the room's log, and the seat, answer or end it
 * brought; app/rooms/store.server.ts turns them into rows), then "send" and "close". It keeps one
 * timer at `wakeAt` and sends a "tick" when it fires. Everything the reducer decides depends only
 * on (state, event, env), so replaying the stored records (replay()) rebuilds the same state —
 * same scores, same streaks — after a crash.
 *
 * What the state reads as (the note asked, its answers, who is in) and the messages that show it,
 * snapshot included, are in roomView.ts.
 */
import type { Spot } from "~/music/fretboard";
import { diagnose, type Diagnosis } from "~/music/mistakes";
import type { NoteNaming } from "~/music/naming";
import { resolveTuning } from "~/music/tuning";
import { reactionTime, scheduleShowAt } from "./clock";
import { cleanNickname, uniqueNickname } from "./nickname";
import {
  CLOSE_CODES,
  ERROR_CODES,
  type CloseCode,
  type ErrorCode,
  type HostAction,
  type Pausable,
  type Phase,
  type ServerMessage,
} from "./protocol";
import type { PromptNote, RoomConfig } from "./roomConfig";
import { scoreAnswer, scoreFind, verdictOf, type Verdict } from "./scoring";
import { standings } from "./standings";
import { ackMessage, active, allSpots, answeredIds, answeredMessage, endMessages, EVERYONE, findPlayer, fullNeck, note, noteMessage, PADS, pausedMessage, player, progressMessage, promptAnswers, promptMessage, revealMessage, roster, sameSpot, snapshot, STAGE } from "./roomView";

/** Answers may arrive this long after the deadline if they were tapped before it (radio latency). */
export const LATE_GRACE_MS = 300;

// ---- state ---------------------------------------------------------------------------------

export interface Player {
  id: string;
  nickname: string;
  /** Bearer secret that lets this phone take its seat back after a reconnect. */
  seatToken: string;
  online: boolean;
  removed: boolean;
  team: number | null;
  points: number;
  streak: number;
  longestStreak: number;
}

export interface Answer {
  playerId: string;
  promptId: string;
  index: number;
  spot: Spot;
  /** Tap time in server clock (already bounded by clock.ts) and receive time. */
  tapAt: number;
  at: number;
  reactionMs: number;
  diagnosis: Diagnosis;
  verdict: Verdict;
  points: number;
  streak: number;
  /** Full neck: whether this spot was new to the class. */
  found: "new" | "already" | null;
}

export interface PromptRun {
  index: number;
  promptId: string;
  showAt: number;
  deadline: number;
  /** Open time used before a pause; counts towards reaction time after resume. */
  creditedMs: number;
  /** When the note went to the pads (the step at showAt); null before it, and again after a pause (the note hides until the new showAt). */
  shownAt: number | null;
  /** Full neck: spots found so far, and players whose miss ended their turn. */
  found: Spot[];
  out: string[];
  /** Set when the prompt closes, so a reveal rebuilt later shows the same counts. */
  /** Counted as the prompt closes: unanswered includes the offline players who gave no answer. */
  closed: { of: number; unanswered: number; offline: number } | null;
}

export interface RoomState {
  config: RoomConfig;
  phase: Phase;
  locked: boolean;
  players: Player[];
  answers: Answer[];
  run: PromptRun | null;
  phaseSince: number;
  paused: { from: Pausable; at: number } | null;
  ended: "finished" | "host" | "idle" | null;
}

export function initialState(config: RoomConfig): RoomState {
  return { config, phase: "lobby", locked: false, players: [], answers: [], run: null, phaseSince: 0, paused: null, ended: null };
}

// ---- inputs and outputs --------------------------------------------------------------------

export type RoomEvent =
  | { type: "join"; playerId: string; seatToken: string; nickname: string }
  | { type: "online"; playerId: string }
  | { type: "offline"; playerId: string }
  /** seenAt: when the note reached this pad (server time, clock.noteSeenAt), which its reaction is timed from; absent, showAt. */
  | { type: "answer"; playerId: string; promptId: string; spot: Spot; tapAt: number; seenAt?: number; naming?: NoteNaming }
  /** priorPoints (by player id) is read on start, to balance Teams. */
  | { type: "host"; action: HostAction; priorPoints?: Record<string, number> }
  | { type: "remove"; playerId: string }
  /** The server came back after a crash: every socket is gone, play pauses until the host resumes. */
  | { type: "restart" }
  /** Nothing happened in the room for hours (server/hub.ts sweeps them): it ends as the host's "end" would. */
  | { type: "idle" }
  | { type: "tick" };

export interface RoomEnv {
  now: number;
  /** Network lead for a prompt scheduled by this event (clock.leadFor over the connected pads). */
  leadMs?: number;
}

export interface RoomRecord {
  env: RoomEnv;
  event: RoomEvent;
}

/** "everyone" = the stage and every connected pad of the room; "pads" = the pads alone. */
export type Audience = { to: "stage" } | { to: "player"; playerId: string } | { to: "pads" } | { to: "everyone" };

/** What a step writes: its record for the room's log, then the rows beside the log that it brought. */
export type StoreEffect =
  | { kind: "store-event"; record: RoomRecord }
  | { kind: "store-seat"; playerId: string; nickname: string }
  | { kind: "store-answer"; answer: Answer; note: PromptNote }
  | { kind: "store-end"; at: number };

export type Effect = StoreEffect | { kind: "send"; to: Audience; message: ServerMessage } | { kind: "close"; to: Audience; code: CloseCode };

/** The effects the hub carries out itself: messages and closes. */
export type Delivery = Exclude<Effect, StoreEffect>;

export const isStoreEffect = (e: Effect): e is StoreEffect => e.kind.startsWith("store-");

export interface Step {
  state: RoomState;
  effects: Effect[];
  /** When to send the next "tick", or null if nothing is timed. */
  wakeAt: number | null;
}

// ---- reducer -------------------------------------------------------------------------------

/** A working copy: the handlers below mutate it; the caller's state is never touched. */
interface Ctx {
  s: RoomState;
  env: RoomEnv;
  out: Effect[];
  send: (to: Audience, message: ServerMessage) => void;
  /** Rows this step writes beside its record; only accepted events add any. */
  writes: StoreEffect[];
  /** Players already copied in this step (see own()). */
  owned: Set<Player>;
}

/**
 * Whether a step of `event` from `state` can schedule a prompt, so needs the network lead
 * (env.leadMs): the hub leaves the lead out of every other step, as working it out reads every
 * pad's round trips. Inside a prompt only a host action can (a due deadline closes the prompt, and
 * "next" in the same step opens the next one); any event can from another phase (a due auto-advance).
 */
export const needsLead = (state: RoomState, event: RoomEvent): boolean => state.phase !== "prompt" || event.type === "host";

export function reduce(state: RoomState, event: RoomEvent, env: RoomEnv): Step {
  const s: RoomState = { ...state, players: [...state.players], run: state.run && { ...state.run } };
  const out: Effect[] = [];
  const ctx: Ctx = { s, env, out, send: (to, message) => out.push({ kind: "send", to, message }), writes: [], owned: new Set() };
  const timed = applyDue(ctx);
  const accepted = handle(ctx, event);
  if (!timed && (!accepted || event.type === "tick")) return { state, effects: out, wakeAt: wakeAt(state) };
  return { state: s, effects: [{ kind: "store-event", record: { env, event } }, ...ctx.writes, ...out], wakeAt: wakeAt(s) };
}

/** Rebuilds a room from its config and stored records (then send { type: "restart" }). */
export function replay(config: RoomConfig, records: readonly RoomRecord[]): RoomState {
  return records.reduce((state, r) => reduce(state, r.event, r.env).state, initialState(config));
}

export function wakeAt(s: RoomState): number | null {
  if (s.phase === "prompt" && s.run) return s.run.shownAt !== null ? s.run.deadline + LATE_GRACE_MS : s.run.showAt;
  if ((s.phase === "reveal" || s.phase === "standings") && s.config.autoAdvanceMs !== null) return s.phaseSince + s.config.autoAdvanceMs;
  return null;
}

function applyDue(ctx: Ctx): boolean {
  // The note goes out before anything else this step does, so no ack or reveal overtakes it.
  const showing = ctx.s.phase === "prompt" && ctx.s.run!.shownAt === null && ctx.env.now >= ctx.s.run!.showAt;
  if (showing) show(ctx);
  const due = wakeAt(ctx.s);
  if (due === null || ctx.env.now < due) return showing;
  if (ctx.s.phase === "prompt") closePrompt(ctx, false);
  else advance(ctx);
  return true;
}

/** Returns whether the event was accepted; refusals only send an error. */
function handle(ctx: Ctx, e: RoomEvent): boolean {
  switch (e.type) {
    case "join":
      return join(ctx, e);
    case "online":
    case "offline":
      return setOnline(ctx, e.playerId, e.type === "online");
    case "answer":
      return answer(ctx, e);
    case "host":
      return host(ctx, e.action, e.priorPoints ?? {});
    case "remove":
      return remove(ctx, e.playerId);
    case "restart":
      for (const p of ctx.s.players) own(ctx, p).online = false;
      if (ctx.s.phase === "prompt" || ctx.s.phase === "reveal" || ctx.s.phase === "standings") pause(ctx);
      return true;
    case "idle":
      if (ctx.s.phase === "ended") return false;
      end(ctx, "idle");
      return true;
    case "tick":
      return true;
  }
}

/** The player's working copy, made on its first change: an event copies only the players it changes, not the class. */
function own(ctx: Ctx, p: Player): Player {
  if (ctx.owned.has(p)) return p;
  const copy = { ...p };
  ctx.s.players[ctx.s.players.indexOf(p)] = copy;
  ctx.owned.add(copy);
  return copy;
}

function refuse(ctx: Ctx, to: Audience, code: ErrorCode, message: string): false {
  ctx.send(to, { type: "error", code, message });
  return false;
}

// ---- players -------------------------------------------------------------------------------

function join(ctx: Ctx, e: Extract<RoomEvent, { type: "join" }>): boolean {
  const { s } = ctx;
  const to = player(e.playerId);
  if (s.players.some((p) => p.id === e.playerId)) return setOnline(ctx, e.playerId, true);
  if (s.phase === "ended") return refuse(ctx, to, ERROR_CODES.roomEnded, "This room has ended.");
  if (s.locked) return refuse(ctx, to, ERROR_CODES.roomLocked, "The teacher has locked this room.");
  if (seatsTaken(s) >= s.config.maxPlayers) return refuse(ctx, to, ERROR_CODES.roomFull, `This room is full (${s.config.maxPlayers} players).`);
  const clean = cleanNickname(e.nickname);
  if (!clean.ok) return refuse(ctx, to, ERROR_CODES.badNickname, clean.message);
  const nickname = uniqueNickname(clean.nickname, active(s).map((p) => p.nickname));
  // A team from the lobby on, so each player knows theirs before the start (which deals the teams again, balanced).
  const team = s.config.teams !== null ? smallestTeam(s, s.config.teams.count) : null;
  s.players.push({ id: e.playerId, nickname, seatToken: e.seatToken, online: true, removed: false, team, points: 0, streak: 0, longestStreak: 0 });
  ctx.writes.push({ kind: "store-seat", playerId: e.playerId, nickname });
  catchUp(ctx, e.playerId);
  return true;
}

/**
 * Seats that count toward maxPlayers: a seat that went offline without ever answering holds no
 * place, so pages that joined and left (or a script's ghosts) never lock a real student out.
 */
function seatsTaken(s: RoomState): number {
  const answered = new Set(s.answers.map((a) => a.playerId));
  return active(s).filter((p) => p.online || answered.has(p.id)).length;
}

function setOnline(ctx: Ctx, playerId: string, online: boolean): boolean {
  const found = findPlayer(ctx.s, playerId);
  if (!found) return refuse(ctx, player(playerId), ERROR_CODES.unknownPlayer, "That seat is no longer in this room. Join again.");
  own(ctx, found).online = online;
  // The stage counts offline players apart from those still to answer.
  if (ctx.s.phase === "prompt") ctx.send(STAGE, answeredMessage(ctx.s));
  if (online) catchUp(ctx, playerId);
  else {
    ctx.send(EVERYONE, roster(ctx.s));
    closeIfDone(ctx);
  }
  return true;
}

/** The pad's snapshot, with the roster going to everyone instead (it just changed for all). */
function catchUp(ctx: Ctx, playerId: string): void {
  for (const message of snapshot(ctx.s, { role: "player", playerId }, ctx.env.now)) {
    if (message.type !== "roster") ctx.send(player(playerId), message);
  }
  ctx.send(EVERYONE, roster(ctx.s));
}

function remove(ctx: Ctx, playerId: string): boolean {
  const found = findPlayer(ctx.s, playerId);
  if (!found) return refuse(ctx, STAGE, ERROR_CODES.unknownPlayer, "No such player in this room.");
  const p = own(ctx, found);
  p.removed = true;
  p.online = false;
  ctx.out.push({ kind: "close", to: player(playerId), code: CLOSE_CODES.removed });
  ctx.send(EVERYONE, roster(ctx.s));
  closeIfDone(ctx);
  return true;
}

/** The player whose seat token a reconnecting phone presents; removed players have none. */
export function playerBySeatToken(s: RoomState, seatToken: string): Player | undefined {
  return s.players.find((p) => p.seatToken === seatToken && !p.removed);
}

// ---- host ----------------------------------------------------------------------------------

function host(ctx: Ctx, action: HostAction, priorPoints: Record<string, number>): boolean {
  const { s } = ctx;
  const wrong = (what: string) => refuse(ctx, STAGE, ERROR_CODES.wrongPhase, `Cannot ${what} during ${s.phase}.`);
  if (s.phase === "ended") return refuse(ctx, STAGE, ERROR_CODES.roomEnded, "This room has ended.");
  switch (action) {
    case "start":
      if (s.phase !== "lobby") return wrong("start");
      if (active(s).length === 0) return refuse(ctx, STAGE, ERROR_CODES.noPlayers, "Wait for at least one player to join.");
      if (s.config.teams !== null) assignTeams(ctx, s.config.teams, priorPoints);
      openPrompt(ctx, 0);
      return true;
    case "pause":
      if (s.phase !== "prompt" && s.phase !== "reveal" && s.phase !== "standings") return wrong("pause");
      pause(ctx);
      ctx.send(EVERYONE, pausedMessage(s));
      return true;
    case "resume":
      if (s.phase !== "paused") return wrong("resume");
      resume(ctx);
      return true;
    case "skip":
      if (s.phase !== "prompt") return wrong("skip");
      closePrompt(ctx, true);
      return true;
    case "next":
      if (s.phase !== "reveal" && s.phase !== "standings") return wrong("move on");
      advance(ctx);
      return true;
    case "end":
      end(ctx, "host");
      return true;
    case "lock":
    case "unlock":
      s.locked = action === "lock";
      ctx.send(EVERYONE, roster(s));
      return true;
    case "clear-offline":
      // As if each were removed; they have no socket to close.
      for (const p of active(s)) if (!p.online) own(ctx, p).removed = true;
      ctx.send(EVERYONE, roster(s));
      return true;
  }
}

function pause(ctx: Ctx): void {
  const { s } = ctx;
  s.paused = { from: s.phase as Pausable, at: ctx.env.now };
  // A paused prompt hides its note (no studying it while the clock stands); it shows again at the new showAt.
  if (s.phase === "prompt") s.run!.shownAt = null;
  s.phase = "paused";
}

/** A paused prompt comes back with a fresh countdown and the open time it had left. */
function resume(ctx: Ctx): void {
  const { s, env } = ctx;
  const paused = s.paused!;
  s.phase = paused.from;
  s.paused = null;
  s.phaseSince = env.now;
  ctx.send(EVERYONE, { type: "resumed", phase: paused.from });
  if (paused.from === "prompt") {
    const run = s.run!;
    run.creditedMs += Math.max(0, Math.min(paused.at, run.deadline) - run.showAt);
    run.showAt = scheduleShowAt(env.now, env.leadMs ?? 0, s.config.countdownMs);
    run.deadline = run.showAt + s.config.answerMs - run.creditedMs;
    sendPrompt(ctx);
  }
}

function advance(ctx: Ctx): void {
  const { s } = ctx;
  const next = s.run!.index + 1;
  const every = s.config.standingsEvery;
  if (next >= s.config.prompts.length) end(ctx, "finished");
  else if (s.phase === "reveal" && every > 0 && next % every === 0) {
    s.phase = "standings";
    s.phaseSince = ctx.env.now;
    ctx.send(EVERYONE, standings(s, false));
  } else openPrompt(ctx, next);
}

function end(ctx: Ctx, reason: NonNullable<RoomState["ended"]>): void {
  const { s } = ctx;
  s.phase = "ended";
  s.ended = reason;
  s.paused = null;
  s.phaseSince = ctx.env.now;
  ctx.writes.push({ kind: "store-end", at: ctx.env.now });
  for (const message of endMessages(s, STAGE)) ctx.send(STAGE, message);
  for (const p of active(s)) for (const message of endMessages(s, player(p.id))) ctx.send(player(p.id), message);
  ctx.out.push({ kind: "close", to: EVERYONE, code: CLOSE_CODES.roomGone });
}

// ---- teams ---------------------------------------------------------------------------------

/** Snake draft (0,1,2,2,1,0,…) on earlier points, or plain round-robin in join order. */
function assignTeams(ctx: Ctx, teams: NonNullable<RoomConfig["teams"]>, priorPoints: Record<string, number>): void {
  const players = active(ctx.s).map((p) => own(ctx, p));
  const order = teams.balance === "points" ? [...players].sort((a, b) => (priorPoints[b.id] ?? 0) - (priorPoints[a.id] ?? 0)) : players;
  order.forEach((p, i) => {
    const lap = Math.floor(i / teams.count);
    const seat = i % teams.count;
    p.team = teams.balance === "points" && lap % 2 === 1 ? teams.count - 1 - seat : seat;
  });
}

/** Late joiners go to the team with fewest members (lowest number on a tie). */
function smallestTeam(s: RoomState, count: number): number {
  const sizes = Array.from({ length: count }, (_, t) => active(s).filter((p) => p.team === t).length);
  return sizes.indexOf(Math.min(...sizes));
}

// ---- prompts and answers -------------------------------------------------------------------

/** Prompt ids count from p1. */
const promptIdOf = (index: number) => `p${index + 1}`;
/** The index a prompt id stands for, or null if no round could have asked it. */
function promptIndexOf(id: string): number | null {
  const n = /^p([1-9][0-9]{0,5})$/.exec(id);
  return n ? Number(n[1]) - 1 : null;
}

function openPrompt(ctx: Ctx, index: number): void {
  const { s, env } = ctx;
  const showAt = scheduleShowAt(env.now, env.leadMs ?? 0, s.config.countdownMs);
  s.run = { index, promptId: promptIdOf(index), showAt, deadline: showAt + s.config.answerMs, creditedMs: 0, shownAt: null, found: [], out: [], closed: null };
  s.phase = "prompt";
  s.phaseSince = env.now;
  sendPrompt(ctx);
}

/** When, to everyone; what, to the stage alone until showAt. */
function sendPrompt(ctx: Ctx): void {
  ctx.send(EVERYONE, promptMessage(ctx.s));
  ctx.send(STAGE, noteMessage(ctx.s, STAGE));
}

/** showAt has come: the pads get the note. */
function show(ctx: Ctx): void {
  ctx.s.run!.shownAt = ctx.env.now;
  ctx.send(PADS, noteMessage(ctx.s, PADS));
}

function answer(ctx: Ctx, e: Extract<RoomEvent, { type: "answer" }>): boolean {
  const { s, env } = ctx;
  const run = s.run;
  const no = (code: ErrorCode, message: string): false => {
    ctx.send(player(e.playerId), { type: "answer-ack", promptId: e.promptId, accepted: false, code, message });
    return false;
  };
  const p = findPlayer(s, e.playerId);
  if (!p) return no(ERROR_CODES.notJoined, "Join the room before answering.");
  // A pad sends an answer again when its connection dropped before the reply: if it was stored, the
  // reply is its ack once more and nothing is stored twice. (Only an earlier prompt needs the long search.)
  const asked = promptIndexOf(e.promptId);
  const current = run !== null && run.promptId === e.promptId;
  const same = (a: Answer) => a.playerId === p.id && a.promptId === e.promptId && sameSpot(a.spot, e.spot);
  const stored = asked === null ? undefined : (current ? promptAnswers(s) : s.answers).find(same);
  if (stored) {
    ctx.send(player(p.id), ackMessage(stored, p));
    return false;
  }
  if (s.phase === "ended") return no(ERROR_CODES.roomEnded, "Too late: the round is over.");
  if (run === null || asked === null || asked > run.index) return no(ERROR_CODES.wrongPrompt, `This round has no prompt "${e.promptId}" (yet).`);
  if (asked < run.index) return no(ERROR_CODES.tooLate, "Too late: that note closed before your tap reached the server, and the round has moved on.");
  if (s.phase === "paused" && s.paused?.from === "prompt") return no(ERROR_CODES.paused, "The round is paused: your tap goes in when it goes on.");
  if (s.phase !== "prompt") return no(ERROR_CODES.tooLate, "Too late: time was up and the answer was shown before your tap reached the server.");
  if (e.tapAt > run.deadline) return no(ERROR_CODES.tooLate, "Too late: you tapped after time was up.");
  if (env.now < run.showAt) return no(ERROR_CODES.notOpen, "The note is not showing yet.");
  const tuning = resolveTuning(s.config.tuning);
  if (e.spot.string > tuning.strings.length || e.spot.fret > s.config.frets) {
    return no(ERROR_CODES.spotOffNeck, `That spot is not on this neck (${tuning.strings.length} strings, ${s.config.frets} frets).`);
  }
  const mine = promptAnswers(s).filter((a) => a.playerId === p.id);
  if (fullNeck(s)) {
    if (run.out.includes(p.id)) return no(ERROR_CODES.turnOver, "A miss ended your turn on this prompt.");
    if (mine.some((a) => sameSpot(a.spot, e.spot))) return no(ERROR_CODES.alreadyAnswered, "You already tapped that spot.");
  } else if (mine.length > 0) {
    return no(ERROR_CODES.alreadyAnswered, "You already answered this prompt.");
  }

  const n = note(s);
  // Timed from when the note reached this phone: a slow link must not cost a student the time its frame took.
  const reactionMs = Math.min(s.config.answerMs, run.creditedMs + reactionTime(e.tapAt, Math.max(run.showAt, e.seenAt ?? run.showAt), s.config.answerMs));
  const diagnosis = diagnose({ note: n, keyFifths: n.keyFifths, tapped: e.spot, tuning, reading: s.config.reading, homeOnly: s.config.homeOnly && !fullNeck(s), naming: e.naming ?? s.config.naming });
  let scored: { verdict: Verdict; points: number; streak: number; found: Answer["found"] };
  if (fullNeck(s)) {
    const fresh = diagnosis.pitchRight && !run.found.some((f) => sameSpot(f, e.spot));
    if (fresh) run.found = [...run.found, e.spot];
    if (!diagnosis.pitchRight) run.out = [...run.out, p.id];
    scored = {
      verdict: diagnosis.pitchRight ? "right" : "wrong",
      points: fresh ? scoreFind(reactionMs, s.config.answerMs) : 0,
      streak: p.streak,
      found: diagnosis.pitchRight ? (fresh ? "new" : "already") : null,
    };
  } else {
    const verdict = verdictOf(diagnosis, s.config.homeOnly);
    const score = scoreAnswer({ verdict, reactionMs, answerMs: s.config.answerMs, streakBefore: p.streak });
    scored = { verdict, points: score.points, streak: score.streak, found: null };
  }
  const me = own(ctx, p);
  me.points += scored.points;
  me.streak = scored.streak;
  me.longestStreak = Math.max(me.longestStreak, me.streak);
  const record: Answer = { playerId: p.id, promptId: run.promptId, index: run.index, spot: e.spot, tapAt: e.tapAt, at: env.now, reactionMs, diagnosis, ...scored };
  s.answers = [...s.answers, record];
  ctx.writes.push({ kind: "store-answer", answer: record, note: n });

  ctx.send(player(p.id), ackMessage(record, me));
  ctx.send(STAGE, answeredMessage(s));
  if (scored.found === "new") ctx.send(EVERYONE, progressMessage(s));
  closeIfDone(ctx);
  return true;
}

/** Closes the prompt early when nothing more can happen: everyone online answered (or, in Full neck, all spots found or everyone is out). */
function closeIfDone(ctx: Ctx): void {
  const { s } = ctx;
  if (s.phase !== "prompt") return;
  const run = s.run!;
  const waiting = active(s).filter((p) => p.online);
  const answered = answeredIds(s);
  const done = fullNeck(s)
    ? run.found.length === allSpots(s, note(s)).length || (waiting.length > 0 && waiting.every((p) => run.out.includes(p.id)))
    : waiting.length > 0 && waiting.every((p) => answered.has(p.id));
  if (done) closePrompt(ctx, false);
}

/** A skipped prompt keeps the points already given but breaks nobody's streak. */
function closePrompt(ctx: Ctx, skipped: boolean): void {
  const { s } = ctx;
  const run = s.run!;
  const answered = answeredIds(s);
  const missing = active(s).filter((p) => !answered.has(p.id));
  if (!skipped && !fullNeck(s)) for (const p of missing) if (p.online) own(ctx, p).streak = 0;
  run.closed = { of: active(s).length, unanswered: missing.length, offline: missing.filter((p) => !p.online).length };
  s.phase = "reveal";
  s.phaseSince = ctx.env.now;
  ctx.send(EVERYONE, revealMessage(s));
}
