import { describe, expect, it } from "vitest";
import { spotsFor, type Spot } from "~/music/fretboard";
import { noteName } from "~/music/naming";
import { parsePitch } from "~/music/pitch";
import { seededRandom, type ReadingSpec } from "~/music/pools";
import { resolveTuning } from "~/music/tuning";
import { CLOSE_CODES, ERROR_CODES, HOST_ACTIONS, serverMessageSchema, type HostAction, type Phase, type ServerMessage } from "./protocol";
import { initialState, isStoreEffect, LATE_GRACE_MS, needsLead, playerBySeatToken, reduce, replay, type Answer, type Effect, type RoomEvent, type RoomRecord, type RoomState } from "./room";
import { snapshot } from "./roomView";
import { drawnPrompts, roomConfig, tunePrompts, walkSheet, type PromptNote, type RoomConfig } from "./roomConfig";
import { playerSummaries } from "./standings";

const SPEC: ReadingSpec = { position: 5, tuning: "standard", frets: 15, reading: "guitar", keyFifths: 0, accidentals: "naturals", ledgerLines: false };
const T0 = 1_000_000;
const COUNTDOWN = 3_000;
const ANSWER = 10_000;

type Settings = Parameters<typeof roomConfig>[1];

function config(settings: Partial<Settings> = {}, prompts: PromptNote[] = drawnPrompts(SPEC, 6, 42)): RoomConfig {
  return roomConfig(SPEC, { code: "KMNPRT", mode: "sprint", countdownMs: COUNTDOWN, answerMs: ANSWER, standingsEvery: 0, ...settings }, prompts);
}

const home = (n: PromptNote): Spot => ({ string: n.home.string, fret: n.home.fret });
const same = (a: Spot, b: Spot) => a.string === b.string && a.fret === b.fret;
const spots = (n: PromptNote) => spotsFor(n.written, { tuning: resolveTuning("standard"), frets: SPEC.frets, reading: "guitar" });
const otherSpot = (n: PromptNote): Spot | undefined => spots(n).find((s) => !same(s, home(n)));
/** A half step above the home spot: always the wrong pitch. */
const wrongSpot = (n: PromptNote): Spot => ({ string: n.home.string, fret: n.home.fret + 1 });

function deepFreeze(value: unknown): void {
  if (typeof value !== "object" || value === null || Object.isFrozen(value)) return;
  Object.freeze(value);
  for (const v of Object.values(value)) deepFreeze(v);
}

/** Drives the reducer like the hub would, checking every outgoing message against the protocol schema. */
class Room {
  state: RoomState;
  records: RoomRecord[] = [];
  /** Answers the steps asked to store, in order. */
  stored: Answer[] = [];
  effects: Effect[] = [];
  now = T0;

  constructor(readonly config: RoomConfig) {
    this.state = initialState(config);
  }

  do(event: RoomEvent, at = this.now, leadMs?: number): Effect[] {
    this.now = at;
    // Frozen, so a reducer that touched its input would throw here (modules are strict).
    deepFreeze(this.state);
    const step = reduce(this.state, event, leadMs === undefined ? { now: at } : { now: at, leadMs });
    for (const e of step.effects) {
      if (e.kind === "store-event") this.records.push(e.record);
      if (e.kind === "store-answer") this.stored.push(e.answer);
      if (e.kind === "send") serverMessageSchema.parse(e.message);
    }
    expect(step.effects.filter((e) => e.kind === "store-event").length).toBeLessThanOrEqual(1);
    // Writes come first, led by the record; none without one.
    const writes = step.effects.filter(isStoreEffect);
    if (writes.length > 0) expect(writes.map((e) => e.kind === "store-event")).toEqual([true, ...writes.slice(1).map(() => false)]);
    expect(step.effects.slice(0, writes.length)).toEqual(writes);
    this.state = step.state;
    this.effects = step.effects;
    return step.effects;
  }

  join(id: string, nickname = id, at = this.now) {
    return this.do({ type: "join", playerId: id, seatToken: `seat-${id}-0123456789abcdef`, nickname }, at);
  }
  host(action: HostAction, at = this.now, priorPoints?: Record<string, number>) {
    return this.do(priorPoints ? { type: "host", action, priorPoints } : { type: "host", action }, at);
  }
  tap(id: string, spot: Spot, at = this.now, promptId = this.state.run!.promptId) {
    return this.do({ type: "answer", playerId: id, promptId, spot, tapAt: at }, at);
  }
  /** Jump to the moment the current prompt is shown, plus `after` ms. */
  shown(after = 0) {
    return this.state.run!.showAt + after;
  }
  note(): PromptNote {
    return this.config.prompts[this.state.run!.index]!;
  }
  sent(type?: ServerMessage["type"]) {
    return this.effects.flatMap((e) => (e.kind === "send" && (type === undefined || e.message.type === type) ? [e] : []));
  }
  player(id: string) {
    return this.state.players.find((p) => p.id === id)!;
  }
}

function errorOf(effects: Effect[]): string | undefined {
  for (const e of effects) {
    if (e.kind !== "send") continue;
    if (e.message.type === "error") return e.message.code;
    if (e.message.type === "answer-ack" && !e.message.accepted) return e.message.code;
  }
  return undefined;
}

function started(settings: Partial<Settings> = {}, players = ["ana", "ben"], prompts?: PromptNote[]): Room {
  const room = new Room(config(settings, prompts));
  for (const p of players) room.join(p);
  room.host("start");
  return room;
}

describe("lobby", () => {
  it("welcomes a player with a seat and tells everyone the roster", () => {
    const room = new Room(config());
    const effects = room.join("p1", "  Sam  ");
    expect(effects[0]).toMatchObject({ kind: "store-event" });
    const welcome = room.sent("welcome")[0]!;
    expect(welcome.to).toEqual({ to: "player", playerId: "p1" });
    expect(welcome.message).toMatchObject({ role: "player", phase: "lobby", you: { playerId: "p1", nickname: "Sam", seatToken: "seat-p1-0123456789abcdef", team: null } });
    expect(room.sent("roster").map((e) => e.to)).toEqual([{ to: "everyone" }]);
    expect(playerBySeatToken(room.state, "seat-p1-0123456789abcdef")?.id).toBe("p1");
  });

  it("de-duplicates nicknames and refuses bad ones without changing state", () => {
    const room = new Room(config());
    room.join("p1", "Sam");
    room.join("p2", "sam");
    expect(room.player("p2").nickname).toBe("sam 2");
    const before = room.state;
    const effects = room.join("p3", "x");
    expect(errorOf(effects)).toBe(ERROR_CODES.badNickname);
    expect(effects.some(isStoreEffect)).toBe(false);
    expect(room.state).toBe(before);
  });

  it("a locked room refuses joins until unlocked", () => {
    const room = new Room(config());
    room.host("lock");
    expect(errorOf(room.join("p1"))).toBe(ERROR_CODES.roomLocked);
    room.host("unlock");
    expect(errorOf(room.join("p1"))).toBeUndefined();
  });

  it("a full room refuses joins", () => {
    const room = new Room(config({ maxPlayers: 2 }));
    room.join("a1");
    room.join("a2");
    expect(errorOf(room.join("a3"))).toBe(ERROR_CODES.roomFull);
  });

  it("counts an offline seat toward the room's capacity only if it ever answered", () => {
    const room = new Room(config({ maxPlayers: 2 }));
    room.join("a1");
    room.join("a2");
    room.host("start");
    room.tap("a1", { string: 6, fret: 0 }, room.state.run!.showAt + 100);
    room.do({ type: "offline", playerId: "a1" });
    room.do({ type: "offline", playerId: "a2" });
    expect(errorOf(room.join("a3"))).toBeUndefined();
    expect(errorOf(room.join("a4"))).toBe(ERROR_CODES.roomFull);
    room.host("clear-offline");
    expect(room.state.players.filter((p) => !p.removed).map((p) => p.id)).toEqual(["a3"]);
  });

  it("cannot start without players", () => {
    const room = new Room(config());
    expect(errorOf(room.host("start"))).toBe(ERROR_CODES.noPlayers);
    expect(room.state.phase).toBe("lobby");
  });

  it("never mutates the state it is given", () => {
    const room = started();
    const frozen = structuredClone(room.state);
    const before = room.state;
    room.tap("ana", home(room.note()), room.shown(500));
    expect(before).toEqual(frozen);
  });
});

describe("prompt and answers", () => {
  it("start schedules the first prompt after the countdown (or the network lead, if longer)", () => {
    const room = started();
    expect(room.state.phase).toBe("prompt");
    const prompt = room.sent("prompt")[0]!;
    expect(prompt.to).toEqual({ to: "everyone" });
    expect(prompt.message).toMatchObject({ promptId: "p1", index: 0, total: 6, showAt: T0 + COUNTDOWN, deadline: T0 + COUNTDOWN + ANSWER });
    expect(room.sent("note")).toEqual([{ kind: "send", to: { to: "stage" }, message: expect.objectContaining({ promptId: "p1", spotsToFind: null }) }]);

    const slow = new Room(config({ countdownMs: 0 }));
    slow.join("ana");
    slow.do({ type: "host", action: "start" }, T0, 800);
    expect(slow.state.run!.showAt).toBe(T0 + 800);
  });

  it("needs the network lead only for a step that can schedule a prompt", () => {
    // What a step decides, leaving out its record (which holds the env it was given).
    const decided = (...args: Parameters<typeof reduce>) => {
      const step = reduce(...args);
      return { ...step, effects: step.effects.filter((e) => e.kind !== "store-event") };
    };
    const room = started({ autoAdvanceMs: 2_000 }, ["ana", "ben"]);
    const p = room.note();
    const inPrompt = room.state;
    const late = inPrompt.run!.deadline + LATE_GRACE_MS;
    // Inside a prompt, whatever the event and even past the deadline, the lead changes nothing, and needsLead says so.
    const events: RoomEvent[] = [
      { type: "answer", playerId: "ana", promptId: "p1", spot: home(p), tapAt: room.shown(100) },
      { type: "tick" },
      { type: "offline", playerId: "ben" },
      { type: "remove", playerId: "ben" },
      { type: "join", playerId: "cy", seatToken: "seat-cy-0123456789abcdef", nickname: "cy" },
    ];
    for (const e of events) {
      expect(needsLead(inPrompt, e)).toBe(false);
      for (const now of [room.shown(100), late]) expect(decided(inPrompt, e, { now, leadMs: 1_500 })).toEqual(decided(inPrompt, e, { now }));
    }
    // A host's "next" in the step that closes the prompt at its deadline opens the next one: it needs the lead.
    const next: RoomEvent = { type: "host", action: "next" };
    expect(needsLead(inPrompt, next)).toBe(true);
    expect(reduce(inPrompt, next, { now: late, leadMs: 1_500 }).state.run!.showAt).toBe(late + COUNTDOWN);
    expect(reduce({ ...inPrompt, config: { ...inPrompt.config, countdownMs: 0 } }, next, { now: late, leadMs: 1_500 }).state.run!.showAt).toBe(late + 1_500);
    // From the reveal, a due auto-advance opens the next prompt on any event.
    room.do({ type: "tick" }, late);
    expect(room.state.phase).toBe("reveal");
    expect(needsLead(room.state, { type: "tick" })).toBe(true);
  });

  it("times an answer from when the note reached that pad, never from before the show time", () => {
    const room = started();
    room.do({ type: "tick" }, room.shown(0));
    const at = room.shown(1_000);
    room.do({ type: "answer", playerId: "ana", promptId: room.state.run!.promptId, spot: home(room.note()), tapAt: at, seenAt: room.shown(150) }, at);
    room.do({ type: "answer", playerId: "ben", promptId: room.state.run!.promptId, spot: home(room.note()), tapAt: at, seenAt: room.shown(-500) }, at);
    expect(room.state.answers.map((a) => [a.playerId, a.reactionMs])).toEqual([
      ["ana", 850],
      ["ben", 1_000],
    ]);
  });

  it("scores a home-spot answer and acknowledges it", () => {
    const room = started();
    room.tap("ana", home(room.note()), room.shown(1_000));
    const ack = room.sent("answer-ack")[0]!;
    expect(ack.to).toEqual({ to: "player", playerId: "ana" });
    expect(ack.message).toMatchObject({ accepted: true, points: 950, total: 950, streak: 1, reactionMs: 1_000, diagnosis: { kind: "home-spot", pitchRight: true } });
    expect(room.sent("answered")[0]).toMatchObject({ to: { to: "stage" }, message: { count: 1, of: 2, offline: 0 } });
  });

  it.each<[string, (r: Room) => Effect[], string]>([
    ["during the countdown", (r) => r.tap("ana", home(r.note()), r.shown(-10)), ERROR_CODES.notOpen],
    ["a second answer", (r) => (r.tap("ana", home(r.note()), r.shown(100)), r.tap("ana", wrongSpot(r.note()), r.shown(200))), ERROR_CODES.alreadyAnswered],
    ["for another prompt", (r) => r.tap("ana", home(r.note()), r.shown(100), "p9"), ERROR_CODES.wrongPrompt],
    ["tapped after the deadline", (r) => r.tap("ana", home(r.note()), r.state.run!.deadline + 1), ERROR_CODES.tooLate],
    ["after the grace period", (r) => r.tap("ana", home(r.note()), r.state.run!.deadline + LATE_GRACE_MS), ERROR_CODES.tooLate],
    ["from someone who never joined", (r) => r.tap("zed", home(r.note()), r.shown(100)), ERROR_CODES.notJoined],
    ["off the neck", (r) => r.tap("ana", { string: 7, fret: 3 }, r.shown(100)), ERROR_CODES.spotOffNeck],
    ["beyond the last fret", (r) => r.tap("ana", { string: 1, fret: 16 }, r.shown(100)), ERROR_CODES.spotOffNeck],
    ["while paused", (r) => (r.host("pause", r.shown(100)), r.tap("ana", home(r.note()), r.shown(200))), ERROR_CODES.paused],
  ])("refuses an answer %s with a clear code", (_, act, code) => {
    const room = started();
    const effects = act(room);
    expect(errorOf(effects)).toBe(code);
    const ack = effects.find((e) => e.kind === "send" && e.message.type === "answer-ack");
    expect(ack).toMatchObject({ message: { accepted: false, message: expect.any(String) } });
  });

  it.each<[string, (r: Room) => Effect[], string, RegExp]>([
    ["for a prompt already revealed", (r) => (r.host("skip", r.shown(100)), r.tap("ana", home(r.note()), r.shown(200))), ERROR_CODES.tooLate, /answer was shown/],
    [
      "for a prompt the round has moved past",
      (r) => (r.host("skip", r.shown(100)), r.host("next", r.shown(200)), r.tap("ana", home(r.note()), r.now + 10, "p1")),
      ERROR_CODES.tooLate,
      /moved on/,
    ],
    ["for a prompt not asked yet", (r) => r.tap("ana", home(r.note()), r.shown(100), "p2"), ERROR_CODES.wrongPrompt, /no prompt "p2"/],
    ["after the round is over", (r) => (r.host("end", r.shown(100)), r.tap("ana", home(r.note()), r.shown(200), "p1")), ERROR_CODES.roomEnded, /round is over/],
  ])("refuses an answer that reaches it %s, saying why", (_, act, code, reason) => {
    const room = started();
    const effects = act(room);
    const refusal = effects.find((e) => e.kind === "send" && e.message.type === "answer-ack");
    expect(refusal).toMatchObject({ to: { to: "player", playerId: "ana" }, message: { accepted: false, code, message: expect.stringMatching(reason) } });
    expect(room.stored).toEqual([]);
  });

  it("answers a resent answer that was already stored with the same ack, and stores it once", () => {
    const room = started();
    room.tap("ana", home(room.note()), room.shown(1_000));
    const first = room.sent("answer-ack")[0]!.message;
    room.tap("ben", wrongSpot(room.note()), room.shown(1_200));
    expect(room.state.phase).toBe("reveal");
    // Ana's connection dropped before her ack arrived: she sends it again after the prompt closed.
    const effects = room.tap("ana", home(room.note()), room.shown(1_000));
    expect(effects.filter(isStoreEffect)).toEqual([]);
    expect(room.sent()).toEqual([{ kind: "send", to: { to: "player", playerId: "ana" }, message: first }]);
    room.host("next", room.shown(2_000));
    room.tap("ana", home(room.config.prompts[0]!), room.now, "p1");
    expect(room.sent("answer-ack")[0]!.message).toEqual(first);
    expect(room.stored.filter((a) => a.playerId === "ana")).toHaveLength(1);
  });

  it("accepts an answer tapped before the deadline that arrives within the grace period", () => {
    const room = started();
    const deadline = room.state.run!.deadline;
    const effects = room.do({ type: "answer", playerId: "ana", promptId: "p1", spot: home(room.note()), tapAt: deadline - 5 }, deadline + 200);
    expect(errorOf(effects)).toBeUndefined();
    expect(room.state.answers[0]!.reactionMs).toBe(ANSWER - 5);
  });

  it("closes as soon as every online player has answered, offline players aside", () => {
    const room = started({}, ["ana", "ben", "cy"]);
    room.do({ type: "offline", playerId: "cy" });
    // The stage hears at once that one player is offline, counted apart from those still to answer.
    expect(room.sent("answered").at(-1)!.message).toMatchObject({ count: 0, of: 3, offline: 1 });
    room.tap("ana", home(room.note()), room.shown(300));
    expect(room.state.phase).toBe("prompt");
    room.tap("ben", wrongSpot(room.note()), room.shown(400));
    expect(room.state.phase).toBe("reveal");
    const reveal = room.sent("reveal")[0]!.message;
    expect(reveal).toMatchObject({ answered: 2, of: 3, offline: 1, home: home(room.note()) });
    if (reveal.type !== "reveal") throw new Error("expected a reveal");
    expect(reveal.counts["home-spot"]).toBe(1);
    expect(reveal.counts["no-answer"]).toBe(0);
    expect(reveal.heat).toHaveLength(2);
    expect(reveal.otherSpots.some((s) => same(s, home(room.note())))).toBe(false);
  });

  it("names the note in the pads' feedback as the room's school does", () => {
    const room = new Room({ ...config(), naming: "solfege" });
    room.join("ana");
    room.host("start");
    room.tap("ana", wrongSpot(room.note()), room.shown(300));
    const ack = room.sent("answer-ack")[0]!.message;
    if (ack.type !== "answer-ack" || !ack.accepted) throw new Error("expected an accepted answer");
    // A fret above a natural of C major: the note is named in solfège (app/music/naming.ts).
    expect(ack.diagnosis.message).toContain(`the note is ${noteName(parsePitch(room.note().written), "solfege")}.`);
  });

  it("names the note as the student's own phone chose, when its answer says so", () => {
    const room = new Room({ ...config(), naming: "solfege" });
    room.join("ana");
    room.host("start");
    const at = room.shown(300);
    room.do({ type: "answer", playerId: "ana", promptId: room.state.run!.promptId, spot: wrongSpot(room.note()), tapAt: at, naming: "german" }, at);
    const ack = room.sent("answer-ack")[0]!.message;
    if (ack.type !== "answer-ack" || !ack.accepted) throw new Error("expected an accepted answer");
    expect(ack.diagnosis.message).toContain(`the note is ${noteName(parsePitch(room.note().written), "german")}.`);
  });

  it("closes at the deadline: online non-answerers lose their streak, offline ones keep it", () => {
    const room = started({}, ["ana", "ben", "cy"]);
    for (const id of ["ana", "ben", "cy"]) room.tap(id, home(room.note()), room.shown(100));
    room.host("next");
    room.do({ type: "offline", playerId: "cy" });
    room.tap("ana", home(room.note()), room.shown(100));
    const wake = room.state.run!.deadline + LATE_GRACE_MS;
    expect(reduce(room.state, { type: "tick" }, { now: wake - 1 }).effects).toEqual([]);
    room.do({ type: "tick" }, wake);
    expect(room.state.phase).toBe("reveal");
    expect([room.player("ana").streak, room.player("ben").streak, room.player("cy").streak]).toEqual([2, 0, 1]);
  });

  it("partial points for the right pitch at another spot keep the streak", () => {
    const prompts = drawnPrompts(SPEC, 40, 7).filter((n) => otherSpot(n) !== undefined).slice(0, 2);
    const room = started({}, ["ana"], prompts);
    room.tap("ana", home(room.note()), room.shown(0));
    room.host("next");
    room.tap("ana", otherSpot(room.note())!, room.shown(0));
    expect(room.state.answers[1]).toMatchObject({ verdict: "partial", points: 500, streak: 1, diagnosis: { kind: "other-spot" } });
  });

  it("with home spot only off, any spot of the right pitch scores in full", () => {
    const prompts = drawnPrompts(SPEC, 40, 7).filter((n) => otherSpot(n) !== undefined).slice(0, 1);
    const room = started({ homeOnly: false }, ["ana"], prompts);
    room.tap("ana", otherSpot(room.note())!, room.shown(0));
    expect(room.state.answers[0]).toMatchObject({ verdict: "right", points: 1000, streak: 1 });
  });
});

describe("the note stays secret until it shows", () => {
  /** What a pad could read: every message to a player, to the pads or to everyone. */
  const toPads = (effects: Effect[]) => effects.flatMap((e) => (e.kind === "send" && e.to.to !== "stage" ? [e.message] : []));
  /** Whether messages tell the note: its spelling, or any field that narrows it down. */
  const tells = (messages: ServerMessage[], n: PromptNote) => {
    const text = JSON.stringify(messages);
    return text.includes(`"${n.written}"`) || /"(written|printedAccidental|ledger|keyFifths|spotsToFind|home|otherSpots|found)"/.test(text);
  };

  it("the prompt says when, the stage alone gets the note with it, the pads get it at showAt", () => {
    const room = started({ mode: "full-neck" });
    const n = room.note();
    expect(tells(toPads(room.effects), n)).toBe(false);
    expect(room.sent("note").map((e) => e.to)).toEqual([{ to: "stage" }]);
    expect(room.sent("note")[0]!.message).toMatchObject({ promptId: "p1", written: n.written, keyFifths: n.keyFifths, printedAccidental: n.printedAccidental, ledger: n.ledger });
    // The room wakes at showAt to send it.
    expect(reduce(room.state, { type: "tick" }, { now: T0 }).wakeAt).toBe(room.shown(0));
    expect(room.do({ type: "tick" }, room.shown(-1))).toEqual([]);
    const shown = room.do({ type: "tick" }, room.shown(0));
    expect(shown[0]).toMatchObject({ kind: "store-event" });
    expect(room.sent()).toEqual([{ kind: "send", to: { to: "pads" }, message: expect.objectContaining({ type: "note", written: n.written, spotsToFind: spots(n).length }) }]);
    expect(reduce(room.state, { type: "tick" }, { now: room.now }).wakeAt).toBe(room.state.run!.deadline + LATE_GRACE_MS);
    // Sent once.
    expect(room.do({ type: "tick" }, room.shown(10))).toEqual([]);
  });

  it("an answer that beats the timer to showAt finds the note sent ahead of its ack", () => {
    const room = started();
    room.tap("ana", home(room.note()), room.shown(0));
    expect(room.sent().map((e) => [e.message.type, e.to.to])).toEqual([
      ["note", "pads"],
      ["answer-ack", "player"],
      ["answered", "stage"],
    ]);
  });

  it("catching up: a pad gets the note only while it shows, the stage always", () => {
    const room = started({ mode: "full-neck" }, ["ana", "ben"]);
    const n = room.note();
    const pad = () => snapshot(room.state, { role: "player", playerId: "ana" }, room.now);
    const stranger = () => snapshot(room.state, { role: "player", playerId: null }, room.now);
    const stage = () => snapshot(room.state, { role: "host" }, room.now).map((m) => m.type);
    expect(tells(pad(), n) || tells(stranger(), n)).toBe(false);
    expect(stage()).toContain("note");
    // A pad coming back in the countdown: no note in its catch-up either.
    room.do({ type: "offline", playerId: "ana" }, room.shown(-500));
    room.do({ type: "online", playerId: "ana" }, room.shown(-400));
    expect(tells(toPads(room.effects), n)).toBe(false);

    room.tap("ana", spots(n)[0]!, room.shown(1_000));
    expect(pad().map((m) => m.type)).toEqual(["welcome", "roster", "prompt", "note", "progress", "answer-ack"]);
    // Paused, the note hides again: a pad reconnecting now does not get it (nor the finds that give it away;
    // ana's own ack tells her only where she tapped).
    room.host("pause", room.shown(2_000));
    expect(tells(snapshot(room.state, { role: "player", playerId: "ben" }, room.now), n)).toBe(false);
    expect(pad().map((m) => m.type)).toEqual(["welcome", "roster", "prompt", "answer-ack", "paused"]);
    expect(stage()).toEqual(["welcome", "roster", "prompt", "note", "answered", "progress", "paused"]);
    const resumed = room.host("resume", room.now + 30_000);
    expect(tells(toPads(resumed), n)).toBe(false);
    expect(reduce(room.state, { type: "tick" }, { now: room.now }).wakeAt).toBe(room.shown(0));
    room.do({ type: "tick" }, room.shown(0));
    expect(room.sent("note").map((e) => e.to)).toEqual([{ to: "pads" }]);
    expect(pad().map((m) => m.type)).toContain("note");
  });

  it("a prompt paused in its countdown shows its note at the new showAt, not the old one", () => {
    const room = started();
    const first = room.shown(0);
    room.host("pause", first - 1_000);
    expect(room.do({ type: "tick" }, first + 100)).toEqual([]);
    room.host("resume", first + 5_000);
    expect(room.shown(0)).toBeGreaterThan(first + 5_000);
    expect(errorOf(room.tap("ana", home(room.note()), room.shown(-1)))).toBe(ERROR_CODES.notOpen);
    expect(room.sent("note")).toEqual([]);
  });
});

describe("phase transitions", () => {
  const reach: Record<Exclude<Phase, "lobby">, (r: Room) => void> = {
    prompt: () => {},
    reveal: (r) => r.host("skip"),
    standings: (r) => (r.host("skip"), r.host("next")),
    paused: (r) => r.host("pause"),
    ended: (r) => r.host("end"),
  };
  const legal: Record<Phase, HostAction[]> = {
    lobby: ["start", "lock", "unlock", "clear-offline", "end"],
    prompt: ["pause", "skip", "lock", "unlock", "clear-offline", "end"],
    reveal: ["pause", "next", "lock", "unlock", "clear-offline", "end"],
    standings: ["pause", "next", "lock", "unlock", "clear-offline", "end"],
    paused: ["resume", "lock", "unlock", "clear-offline", "end"],
    ended: [],
  };
  const cases = (Object.keys(legal) as Phase[]).flatMap((phase) => HOST_ACTIONS.map((action) => [phase, action, legal[phase].includes(action)] as const));

  it.each(cases)("%s + %s → accepted %s", (phase, action, ok) => {
    const room = new Room(config({ standingsEvery: 1 }));
    room.join("ana");
    if (phase !== "lobby") {
      room.host("start");
      reach[phase](room);
    }
    expect(room.state.phase).toBe(phase);
    const before = room.state;
    const effects = room.host(action);
    if (ok) {
      expect(errorOf(effects)).toBeUndefined();
      expect(effects[0]).toMatchObject({ kind: "store-event" });
    } else {
      expect(errorOf(effects)).toBe(phase === "ended" ? ERROR_CODES.roomEnded : ERROR_CODES.wrongPhase);
      expect(room.state).toBe(before);
    }
  });

  it("shows standings every N prompts and ends after the last reveal", () => {
    const room = started({ standingsEvery: 2 }, ["ana"], drawnPrompts(SPEC, 3, 1));
    const seen: Phase[] = [];
    while (room.state.phase !== "ended") {
      seen.push(room.state.phase);
      if (room.state.phase === "prompt") room.tap("ana", home(room.note()), room.shown(0));
      else room.host("next");
    }
    expect(seen).toEqual(["prompt", "reveal", "prompt", "reveal", "standings", "prompt", "reveal"]);
    expect(room.sent("standings").map((e) => e.message)).toMatchObject([{ final: true }, { final: true }]);
    expect(room.sent("ended")[0]!.message).toMatchObject({ reason: "finished", summaries: [{ playerId: "ana", answered: 3, correct: 3 }] });
    expect(room.effects.at(-1)).toEqual({ kind: "close", to: { to: "everyone" }, code: CLOSE_CODES.roomGone });
  });

  it("reveal and standings move on by themselves with autoAdvanceMs", () => {
    const room = started({ autoAdvanceMs: 5_000, standingsEvery: 1 }, ["ana"], drawnPrompts(SPEC, 2, 1));
    room.tap("ana", home(room.note()), room.shown(0));
    const revealAt = room.now;
    expect(reduce(room.state, { type: "tick" }, { now: revealAt }).wakeAt).toBe(revealAt + 5_000);
    room.do({ type: "tick" }, revealAt + 5_000);
    expect(room.state.phase).toBe("standings");
    room.do({ type: "tick" }, revealAt + 10_000);
    expect(room.state.phase).toBe("prompt");
    expect(room.state.run!.index).toBe(1);
  });

  it("pause and resume: fresh countdown, open time already used counts towards reaction time", () => {
    const room = started({}, ["ana", "ben"]);
    room.host("pause", room.shown(4_000));
    expect(room.sent("paused")).toHaveLength(1);
    expect(reduce(room.state, { type: "tick" }, { now: room.now + 60_000 }).wakeAt).toBeNull();
    const resumeAt = room.now + 60_000;
    room.host("resume", resumeAt);
    expect(room.sent().map((e) => [e.message.type, e.to.to])).toEqual([
      ["resumed", "everyone"],
      ["prompt", "everyone"],
      ["note", "stage"],
    ]);
    expect(room.state.run).toMatchObject({ showAt: resumeAt + COUNTDOWN, deadline: resumeAt + COUNTDOWN + ANSWER - 4_000, creditedMs: 4_000 });
    room.tap("ana", home(room.note()), room.shown(1_000));
    expect(room.state.answers[0]!.reactionMs).toBe(5_000);
  });

  it("skip reveals at once, keeps points given and breaks no streak", () => {
    const room = started({}, ["ana", "ben"]);
    room.tap("ana", home(room.note()), room.shown(0));
    room.tap("ben", home(room.note()), room.shown(0));
    room.host("next");
    room.tap("ana", home(room.note()), room.shown(0));
    room.host("skip");
    expect(room.state.phase).toBe("reveal");
    expect([room.player("ana").streak, room.player("ben").streak]).toEqual([2, 1]);
  });

  it("removing a player closes their socket, frees the seat and can close the prompt", () => {
    const room = started({}, ["ana", "ben"]);
    room.tap("ana", home(room.note()), room.shown(0));
    const effects = room.do({ type: "remove", playerId: "ben" });
    expect(effects).toContainEqual({ kind: "close", to: { to: "player", playerId: "ben" }, code: CLOSE_CODES.removed });
    expect(room.state.phase).toBe("reveal");
    expect(playerBySeatToken(room.state, "seat-ben-0123456789abcdef")).toBeUndefined();
    expect(errorOf(room.do({ type: "online", playerId: "ben" }))).toBe(ERROR_CODES.unknownPlayer);
    expect(playerSummaries(room.state).map((s) => s.playerId)).toEqual(["ana"]);
  });

  it("every message that changes the phase carries it, and the stage's snapshot shows the same screen", () => {
    const room = new Room(config({ standingsEvery: 2 }));
    room.join("ana");
    room.join("ben");
    /** What a stage that folds the messages of a step (or of a snapshot) believes. */
    const screen = (messages: ServerMessage[], from: { phase: Phase | null; pausedFrom: string | null; last: string | null }) =>
      messages.reduce(
        (view, m) => ({
          phase: "phase" in m ? m.phase : view.phase,
          pausedFrom: m.type === "paused" || m.type === "welcome" ? m.pausedFrom : m.type === "resumed" ? null : view.pausedFrom,
          last: ["prompt", "reveal", "standings", "ended"].includes(m.type) ? m.type : view.last,
        }),
        from,
      );
    let live = screen(snapshot(room.state, { role: "host" }, room.now), { phase: null, pausedFrom: null, last: null });
    const steps: (() => unknown)[] = [
      () => room.host("start"),
      () => room.host("pause"),
      () => room.host("resume"),
      () => room.tap("ana", home(room.note()), room.shown(100)),
      () => room.tap("ben", home(room.note()), room.shown(200)),
      () => room.host("pause"),
      () => room.host("resume"),
      () => room.host("next"),
      () => room.host("skip"),
      () => room.host("next"),
      () => room.host("pause"),
      () => room.host("resume"),
      () => room.host("end"),
    ];
    const seen = new Set<string>();
    for (const step of steps) {
      step();
      const toStage = room.sent().filter((e) => e.to.to !== "player").map((e) => e.message);
      for (const m of toStage) if ("phase" in m) expect(m.phase).toBe(room.state.phase);
      live = screen(toStage, live);
      expect(live.phase).toBe(room.state.phase);
      expect(live.pausedFrom).toBe(room.state.paused?.from ?? null);
      // A reloaded stage: the snapshot alone gives the same phase and the same screen.
      const reloaded = screen(snapshot(room.state, { role: "host" }, room.now), { phase: null, pausedFrom: null, last: null });
      expect(reloaded).toEqual(live);
      seen.add(room.state.phase === "paused" ? `paused in ${room.state.paused!.from}` : room.state.phase);
    }
    expect([...seen].sort()).toEqual(["ended", "paused in prompt", "paused in reveal", "paused in standings", "prompt", "reveal", "standings"]);
  });

  it("a reconnecting pad gets the prompt and its own answer back", () => {
    const room = started({}, ["ana", "ben"]);
    room.tap("ana", home(room.note()), room.shown(700));
    room.do({ type: "offline", playerId: "ana" });
    room.do({ type: "online", playerId: "ana" });
    expect(room.sent().filter((e) => e.to.to === "player").map((e) => e.message.type)).toEqual(["welcome", "prompt", "note", "answer-ack"]);
    expect(snapshot(room.state, { role: "host" }, room.now).map((m) => m.type)).toEqual(["welcome", "roster", "prompt", "note", "answered"]);
    expect(snapshot(room.state, { role: "player", playerId: null }, room.now)[0]).toMatchObject({ type: "welcome", you: null });
  });

  it("restart after a crash marks everyone offline and pauses play", () => {
    const room = started();
    room.do({ type: "restart" });
    expect(room.state.phase).toBe("paused");
    expect(room.state.players.every((p) => !p.online)).toBe(true);
  });
});

describe("modes", () => {
  it("Tune walk: the tune's notes in order, name revealed only at the end", () => {
    const notes = drawnPrompts(SPEC, 5, 3).map((n) => n.written);
    const room = new Room(config({ mode: "tune-walk", tuneName: "Lantern Hill" }, tunePrompts(SPEC, notes)));
    room.join("ana");
    room.host("start");
    const written: string[] = [];
    while (room.state.phase !== "ended") {
      if (room.state.phase === "prompt") {
        written.push(room.note().written);
        expect(JSON.stringify(room.sent())).not.toContain("Lantern");
        room.tap("ana", home(room.note()), room.shown(0));
      } else room.host("next");
    }
    expect(written).toEqual(notes);
    expect(room.sent("ended")[0]!.message).toMatchObject({ tuneName: "Lantern Hill" });
  });

  it("Tune walk: the stage's note carries the melody so far, nothing later; pads never get it, nothing goes out early", () => {
    // An upload in 3/4 walked from bar 2: a pickup bar 1, then bar 2 (half, quarter) and bar 3 (rest, two quarters).
    const bar = (number: string, start: number, length: number, pickup = false) => ({ number, start, length, beats: 3, beatType: 4, keyFifths: 0, pickup });
    const measures = [bar("0", 0, 1, true), bar("1", 1, 3), bar("2", 4, 3)];
    const walked = [
      { pitch: "A4", beats: 2, bar: 2, onset: 1 },
      { pitch: "B4", beats: 1, bar: 2, onset: 3 },
      { pitch: "C5", beats: 1, bar: 3, onset: 5 },
      { pitch: "D5", beats: 1, bar: 3, onset: 6 },
    ];
    const sheet = walkSheet({ keyFifths: 0, beatsPerBar: 3, score: { measures } }, walked);
    const room = new Room(config({ mode: "tune-walk", tuneName: "Lantern Hill", sheet }, tunePrompts(SPEC, walked.map((n) => n.pitch))));
    room.join("ana");
    room.host("start");
    for (let k = 0; k < walked.length; k++) {
      // With the prompt, before showAt: the stage alone hears the note, with the notes up to this one and their bars.
      const early = room.sent("note");
      expect(early.map((e) => e.to)).toEqual([{ to: "stage" }]);
      const melody = early[0]!.message.type === "note" ? early[0]!.message.melody : undefined;
      expect(melody?.notes.map((n) => n.pitch)).toEqual(walked.slice(0, k + 1).map((n) => n.pitch));
      expect(melody?.from).toBe(2);
      expect(melody?.measures?.map((m) => m.number)).toEqual(k < 2 ? ["0", "1"] : ["0", "1", "2"]);
      for (const later of walked.slice(k + 1)) expect(JSON.stringify(early)).not.toContain(later.pitch);
      expect(JSON.stringify(room.sent())).not.toContain("Lantern");
      // At showAt the pads get the note alone: no melody.
      room.do({ type: "tick" }, room.shown(0));
      const padNotes = room.sent("note");
      expect(padNotes.map((e) => e.to)).toEqual([{ to: "pads" }]);
      expect(padNotes[0]!.message).not.toHaveProperty("melody");
      // A reloaded stage gets it again; a reloaded pad does not.
      const stageAgain = snapshot(room.state, { role: "host" }, room.now).find((m) => m.type === "note");
      expect(stageAgain).toMatchObject({ melody: { notes: walked.slice(0, k + 1).map((n) => ({ pitch: n.pitch })) } });
      expect(snapshot(room.state, { role: "player", playerId: "ana" }, room.now).find((m) => m.type === "note")).not.toHaveProperty("melody");
      room.tap("ana", home(room.note()), room.shown(10));
      room.host("next");
      if (room.state.phase === "standings") room.host("next");
    }
    expect(room.state.phase).toBe("ended");
  });

  it("Full neck: the class covers every spot; new finds score, repeats don't, a miss ends a turn", () => {
    const prompts = drawnPrompts(SPEC, 40, 9).filter((n) => spots(n).length >= 3).slice(0, 1);
    const room = started({ mode: "full-neck" }, ["ana", "ben", "cy"], prompts);
    const all = spots(room.note());
    expect(room.sent("note")[0]!.message).toMatchObject({ spotsToFind: all.length });

    room.tap("ana", all[0]!, room.shown(0));
    expect(room.state.answers[0]).toMatchObject({ points: 1000, found: "new", streak: 0 });
    expect(room.sent("progress")[0]!.message).toMatchObject({ found: [all[0]], total: all.length });
    room.tap("ben", all[0]!, room.shown(100));
    expect(room.state.answers[1]).toMatchObject({ points: 0, found: "already" });
    // The same spot again is a resend: its ack once more, nothing stored or scored again.
    room.tap("ana", all[0]!, room.shown(200));
    expect(room.sent("answer-ack")[0]!.message).toMatchObject({ accepted: true, points: 1000, found: "new" });
    expect(room.stored).toHaveLength(2);
    room.tap("cy", wrongSpot(room.note()), room.shown(300));
    expect(errorOf(room.tap("cy", all[1]!, room.shown(400)))).toBe(ERROR_CODES.turnOver);

    for (const [i, spot] of all.slice(1).entries()) {
      expect(room.state.phase).toBe("prompt");
      room.tap(i % 2 === 0 ? "ana" : "ben", spot, room.shown(1_000 + i));
    }
    expect(room.state.phase).toBe("reveal");
    expect(room.player("cy").points).toBe(0);
    expect(room.player("ana").points + room.player("ben").points).toBeGreaterThan(0);
  });

  it.each<["points" | "round-robin", Record<string, number>, Record<string, number>]>([
    ["round-robin", {}, { a: 0, b: 1, c: 0, d: 1, e: 0 }],
    // snake on prior points: d(90) e(70) | c(50) a(30) | b(10) → teams 0 1 | 1 0 | 0
    ["points", { a: 30, b: 10, c: 50, d: 90, e: 70 }, { d: 0, e: 1, c: 1, a: 0, b: 0 }],
  ])("Teams assigned at start by %s", (balance, prior, expected) => {
    const room = new Room(config({ mode: "teams", teams: { count: 2, balance } }));
    for (const id of ["a", "b", "c", "d", "e"]) room.join(id, `Kid ${id}`);
    room.host("start", room.now, prior);
    expect(Object.fromEntries(room.state.players.map((p) => [p.id, p.team]))).toEqual(expected);
  });

  it("Teams: late joiners fill the smallest team; team score is the mean of members' points", () => {
    const room = new Room(config({ mode: "teams", teams: { count: 2, balance: "round-robin" } }));
    for (const id of ["a", "b", "c"]) room.join(id, `Kid ${id}`);
    room.host("start");
    room.join("d", "Kid d");
    expect(room.player("d").team).toBe(1);
    room.tap("a", home(room.note()), room.shown(0)); // team 0: 1000
    room.tap("b", home(room.note()), room.shown(5_000)); // team 1: 750
    room.tap("c", wrongSpot(room.note()), room.shown(0)); // team 0: 0
    room.tap("d", home(room.note()), room.shown(10_000)); // team 1: 500
    room.host("end");
    const teams = room.sent("standings")[0]!.message;
    expect(teams).toMatchObject({ teams: [{ team: 1, name: "Saddle", points: 625, members: 2 }, { team: 0, name: "Nut", points: 500, members: 2 }] });
  });
});

describe("summaries and standings", () => {
  it("points, accuracy, median reaction time, longest streak; ties share a rank", () => {
    const room = started({}, ["ana", "ben"], drawnPrompts(SPEC, 4, 5));
    // [right?, reaction ms] for ana and ben on each prompt
    const plan: [boolean, number][][] = [
      [[true, 1_000], [true, 1_000]],
      [[true, 2_000], [true, 2_000]],
      [[false, 3_000], [true, 3_000]],
      [[true, 4_000], [false, 4_000]],
    ];
    for (const row of plan) {
      row.forEach(([right, reaction], i) => {
        room.tap(i === 0 ? "ana" : "ben", right ? home(room.note()) : wrongSpot(room.note()), room.shown(reaction));
      });
      room.host("next");
    }
    expect(room.state.phase).toBe("ended");
    expect(playerSummaries(room.state)).toEqual([
      { playerId: "ana", nickname: "ana", points: expect.any(Number), answered: 4, correct: 3, accuracy: 0.75, medianReactionMs: 2_000, longestStreak: 2 },
      { playerId: "ben", nickname: "ben", points: expect.any(Number), answered: 4, correct: 3, accuracy: 0.75, medianReactionMs: 2_000, longestStreak: 3 },
    ]);
    const final = room.sent("standings")[0]!.message;
    if (final.type !== "standings") throw new Error("expected standings");
    expect(final.streaks.map((s) => [s.playerId, s.longestStreak])).toEqual([["ben", 3], ["ana", 2]]);
    const points = Object.fromEntries(final.points.map((r) => [r.playerId, r]));
    expect(points.ben!.points).toBeGreaterThan(points.ana!.points);
    expect(final.points[0]!.rank).toBe(1);

    const tie = started({}, ["ana", "ben"], drawnPrompts(SPEC, 1, 5));
    tie.tap("ana", home(tie.note()), tie.shown(500));
    tie.tap("ben", home(tie.note()), tie.shown(500));
    tie.host("end");
    const tied = tie.sent("standings")[0]!.message;
    expect(tied).toMatchObject({ points: [{ rank: 1 }, { rank: 1 }] });
  });

  it("a player's own end message carries only their summary", () => {
    const room = started({}, ["ana", "ben"]);
    room.host("end");
    const ends = room.sent("ended");
    expect(ends.find((e) => e.to.to === "stage")!.message).toMatchObject({ reason: "host", summaries: [{}, {}] });
    expect(ends.find((e) => e.to.to === "player" && e.to.playerId === "ben")!.message).toMatchObject({ summaries: [{ playerId: "ben" }] });
  });
});

describe("replay", () => {
  /** A messy seeded class: late joins, dropped phones, pauses, random taps, double taps, late taps. */
  function playMessyRoom(seed: number, settings: Partial<Settings>): Room {
    const rand = seededRandom(seed);
    const room = new Room(config({ standingsEvery: 3, ...settings }, drawnPrompts(SPEC, 8, seed)));
    const ids = ["p1", "p2", "p3", "p4", "p5", "p6"];
    for (const id of ids.slice(0, 4)) room.join(id, `Kid ${id}`, (room.now += 1_000));
    room.host("start", room.now, { p1: 300, p2: 900, p3: 100, p4: 500 });
    for (let step = 0; step < 400 && room.state.phase !== "ended"; step++) {
      const r = rand();
      room.now += Math.floor(rand() * 1_500);
      const id = ids[Math.floor(rand() * ids.length)]!;
      const known = room.state.players.some((p) => p.id === id);
      if (!known) room.join(id, `Kid ${id}`);
      else if (r < 0.05) room.do({ type: rand() < 0.5 ? "offline" : "online", playerId: id });
      else if (r < 0.07) room.host(room.state.phase === "paused" ? "resume" : "pause");
      else if (r < 0.08) room.host("skip");
      else if (room.state.phase === "prompt" || room.state.phase === "paused") {
        const n = room.note();
        const choice = [home(n), wrongSpot(n), ...spots(n)][Math.floor(rand() * (2 + spots(n).length))]!;
        const tapAt = Math.max(0, room.now - Math.floor(rand() * 200));
        room.do({ type: "answer", playerId: id, promptId: room.state.run!.promptId, spot: choice, tapAt }, room.now, Math.floor(rand() * 600));
      } else if (room.state.phase === "reveal" || room.state.phase === "standings") room.host("next");
      room.do({ type: "tick" });
    }
    return room;
  }

  it.each<[string, Partial<Settings>]>([
    ["Sprint", {}],
    ["Sprint, home spot only off", { homeOnly: false }],
    ["Full neck", { mode: "full-neck" }],
    ["Teams", { mode: "teams", teams: { count: 2, balance: "points" } }],
    ["Sprint with auto-advance", { autoAdvanceMs: 4_000 }],
  ])("%s: replaying the persisted records rebuilds identical scores and streaks", (_, settings) => {
    for (const seed of [11, 12, 13]) {
      const live = playMessyRoom(seed, settings);
      expect(live.state.answers.length).toBeGreaterThan(10);
      // The records go through SQLite as JSON.
      const stored = JSON.parse(JSON.stringify(live.records)) as RoomRecord[];
      const rebuilt = replay(live.config, stored);
      expect(rebuilt).toEqual(live.state);
      expect(playerSummaries(rebuilt)).toEqual(playerSummaries(live.state));
    }
  });

  it("resumes after a crash mid-game: rebuilt prefix + the rest of the events = the uninterrupted game", () => {
    const live = playMessyRoom(21, {});
    const cut = Math.floor(live.records.length / 2);
    const resumed = live.records.slice(cut).reduce((s, r) => reduce(s, r.event, r.env).state, replay(live.config, live.records.slice(0, cut)));
    expect(resumed).toEqual(live.state);
  });

  it("a step asks to store exactly the seats, answers and end it brought", () => {
    const live = playMessyRoom(31, { mode: "teams", teams: { count: 2, balance: "points" } });
    expect(live.stored).toEqual(live.state.answers);
    const room = new Room(config());
    expect(room.join("ana", "  Ana ").filter(isStoreEffect).slice(1)).toEqual([{ kind: "store-seat", playerId: "ana", nickname: "Ana" }]);
    expect(room.join("ana2", "Ana").filter(isStoreEffect).slice(1)).toEqual([{ kind: "store-seat", playerId: "ana2", nickname: "Ana 2" }]);
    room.host("start");
    const tapped = room.tap("ana", home(room.note()), room.shown(500)).filter(isStoreEffect);
    expect(tapped.map((e) => e.kind)).toEqual(["store-event", "store-answer"]);
    expect(tapped[1]).toEqual({ kind: "store-answer", answer: room.state.answers[0], note: room.config.prompts[0] });
    expect(room.host("end", room.now + 10).filter(isStoreEffect).slice(1)).toEqual([{ kind: "store-end", at: room.now }]);
  });

  it("refused events and idle ticks are not persisted", () => {
    const room = started();
    // The tick at showAt is not idle: it sends the note to the pads.
    room.do({ type: "tick" }, room.shown(0));
    const count = room.records.length;
    room.tap("zed", home(room.note()), room.shown(0));
    room.do({ type: "tick" }, room.shown(0));
    room.host("resume");
    expect(room.records).toHaveLength(count);
  });
});

describe("a room nobody uses", () => {
  it("ends as idle from any phase, keeping every answer, and tells everyone as an end does", () => {
    const room = started();
    room.tap("ana", home(room.note()), room.shown(500));
    const effects = room.do({ type: "idle" }, room.now + 3 * 3_600_000);
    expect(room.state).toMatchObject({ phase: "ended", ended: "idle" });
    expect(effects.filter(isStoreEffect).map((e) => e.kind)).toEqual(["store-event", "store-end"]);
    expect(room.sent("ended").map((e) => e.message)).toContainEqual(expect.objectContaining({ reason: "idle" }));
    expect(room.effects).toContainEqual({ kind: "close", to: { to: "everyone" }, code: CLOSE_CODES.roomGone });
    expect(room.stored).toHaveLength(1);
    // Replayed after a restart it is the same ended room; a second sweep changes and writes nothing.
    expect(replay(room.config, room.records)).toEqual(room.state);
    const before = room.state;
    expect(room.do({ type: "idle" }).some(isStoreEffect)).toBe(false);
    expect(room.state).toBe(before);
  });
});
