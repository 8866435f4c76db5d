/**
 * One live room in memory: each event goes through the reducer (app/game/room.ts), what the step
 * writes goes to the room store, and its messages go out in the order of the events — an answer's
 * ack or a seat only once its write is on disk. Also the room's one timer, and what happens when a
 * write fails.
 */
import type { Socket } from "node:net";
import type { WebSocket } from "ws";
import {
  emptyClock,
  leadFor,
  networkFigures,
  ROUND_TRIP_WINDOW_MS,
  type ClockEstimate,
  type ClockState,
  type NetworkFigures,
  type RoundTrip,
} from "~/game/clock";
import { CLOSE_CODES, type RateBucket, type ServerMessage } from "~/game/protocol";
import { isStoreEffect, needsLead, reduce, type Audience, type Delivery, type RoomEvent, type RoomState } from "~/game/room";
import { isFenced, type RoomLog, type RoomStore, type StoredRoom } from "~/rooms/store.server";
import type { RoundTripTimer } from "./round-trips";

/**
 * One seat's clock sync: the pad's ping reports (they set its offset) and the round trips the
 * server timed itself (they bound its claimed tap times). Kept by the room per seat, so a pad that
 * reconnects keeps them when its socket is replaced.
 */
export interface SeatClock {
  clock: ClockState;
  estimate: ClockEstimate | null;
  trips: RoundTrip[];
  /**
   * networkFigures of `trips`, kept because every room step reads them; undefined once a round trip
   * came since (a pad's pongs come every second, its figures are read far less often). See seatFigures.
   */
  figures: NetworkFigures | null | undefined;
}

export const newSeatClock = (): SeatClock => ({ clock: emptyClock(), estimate: null, trips: [], figures: undefined });

/**
 * Keeps a seat's timed round trip (an impossible one is dropped), and drops those that left the
 * window; its figures are sorted out again when next read. In place: this runs on every pong.
 */
export function addSeatRoundTrip(sync: SeatClock, trip: RoundTrip) {
  if (!(trip.ms >= 0)) return;
  const trips = sync.trips;
  let old = 0;
  while (old < trips.length && trips[old]!.at <= trip.at - ROUND_TRIP_WINDOW_MS) old++;
  if (old > 0) trips.splice(0, old);
  trips.push(trip);
  sync.figures = undefined;
}

/** networkFigures of a seat's round trips at `now`, sorted out only after a new one came or an old one left the window. */
export function seatFigures(sync: SeatClock, now: number): NetworkFigures | null {
  const oldest = sync.trips[0];
  if (oldest !== undefined && oldest.at <= now - ROUND_TRIP_WINDOW_MS) {
    sync.trips = sync.trips.filter((t) => t.at > now - ROUND_TRIP_WINDOW_MS);
    sync.figures = undefined;
  }
  if (sync.figures === undefined) sync.figures = networkFigures(sync.trips, now);
  return sync.figures;
}

/** One socket: a stage or a pad, and where it is. */
export interface Conn {
  ws: WebSocket;
  /** Server time the socket opened: a tap claimed before it was made while disconnected. */
  openedAt: number;
  bucket: RateBucket;
  /** Its own until it holds a seat, then the seat's (LiveRoom.clocks). */
  sync: SeatClock;
  roundTrips: RoundTripTimer;
  userId: string | null;
  room: LiveRoom | null;
  role: "host" | "player" | null;
  playerId: string | null;
  /** The socket has held a seat: it may never join for another (one socket, one seat). */
  seated: boolean;
  /** Set once the socket's welcome is on its way: room messages before that would arrive ahead of it. */
  listening: boolean;
  /** One socket's messages are handled one at a time, in the order they came. */
  queue: Promise<void>;
  /** A message the next of its kind replaces, held to the end of the turn (see sendLatest). */
  held?: ServerMessage | null;
}

/** RFC 6455 §7.4.1: the server hit a condition it cannot go on from; clients reconnect. */
const CLOSE_SERVER_ERROR = 1011;
/** RFC 6455 §7.4.1 (IANA registry): "service restart"; clients reconnect, here to the room's new owner. */
export const CLOSE_SERVICE_RESTART = 1012;
/** Why a room's sockets are closed when another node has taken the room. */
export const ROOM_MOVED = "the room moved to another server; reconnect";

export class LiveRoom {
  readonly stage = new Set<Conn>();
  readonly pads = new Map<string, Conn>();
  /** By player id; outlives the sockets that hold the seat. */
  readonly clocks = new Map<string, SeatClock>();
  readonly id: string;
  readonly code: string;
  state: RoomState;
  private readonly log: RoomLog;
  private dropped = false;
  private timer: NodeJS.Timeout | null = null;
  /** Deliveries wait for their own write and for every earlier delivery, so order is kept. */
  private tail: Promise<void> = Promise.resolve();

  constructor(
    private readonly hub: RoomHost,
    stored: StoredRoom,
  ) {
    ({ id: this.id, code: this.code, state: this.state, log: this.log } = stored);
  }

  /** `now` is only given for a restart, which happens when the room last recorded something. */
  dispatch(event: RoomEvent, extra: { userId?: string | null; now?: number } = {}) {
    // Once the hub is closing, sockets going away are not news to record; a broken copy records nothing more.
    if (this.hub.closing || this.log.broken) return;
    const now = extra.now ?? Date.now();
    const env = needsLead(this.state, event) ? { now, leadMs: leadFor(Array.from(this.pads.values(), (c) => seatFigures(c.sync, now))) } : { now };
    const step = reduce(this.state, event, env);
    this.state = step.state;
    const written = this.hub.store.write(this.log, step.effects, extra.userId ?? null);
    const effects = step.effects.filter((e): e is Delivery => !isStoreEffect(e));
    const ended = step.effects.some((e) => e.kind === "store-end");
    // What confirms something a client sent (an answer's ack, a seat) or closes sockets goes out
    // only once it is on disk. The rest (prompts, reveals, standings, rosters) goes out as soon as
    // everything before it has: should the server stop before it is written, the room resumes
    // from the step before, and nothing a client was told it had is missing.
    const confirms = event.type === "answer" || event.type === "join" || effects.some((e) => e.kind === "close");
    if (!confirms) void written.then((error) => error && this.fail(error));
    this.inOrder(async () => {
      if (confirms) {
        const error = await written;
        if (error) return this.fail(error);
      }
      this.deliver(effects);
      if (ended) this.hub.forget(this);
    });
    this.schedule(step.wakeAt);
  }

  /** Runs `step` after every earlier delivery, so nothing overtakes an ack that is still being written. */
  inOrder(step: () => void | Promise<void>) {
    this.tail = this.tail.then(step).catch((error: unknown) => console.error(`room ${this.code}: delivery failed`, error));
  }

  private deliver(effects: Delivery[]) {
    // Serialise and encode each message once, however many sockets get it.
    const cache = new Map<ServerMessage, Buffer>();
    const text = (m: ServerMessage) => {
      let t = cache.get(m);
      if (t === undefined) cache.set(m, (t = Buffer.from(JSON.stringify(m))));
      return t;
    };
    for (const effect of effects) {
      for (const conn of this.audience(effect.to)) {
        if (!conn.listening) continue;
        if (effect.kind === "send") {
          if (effect.message.type === "answered") sendLatest(conn, effect.message);
          else send(conn, text(effect.message));
        }
        else if (effect.kind === "close") {
          writeHeld(conn);
          conn.ws.close(effect.code, effect.code === CLOSE_CODES.removed ? "removed by the teacher" : "the room has ended");
          if (conn.playerId) this.pads.delete(conn.playerId);
          conn.playerId = null;
        }
      }
    }
  }

  private audience(a: Audience): Conn[] {
    switch (a.to) {
      case "stage":
        return [...this.stage];
      case "player": {
        const c = this.pads.get(a.playerId);
        return c ? [c] : [];
      }
      case "pads":
        return [...this.pads.values()];
      case "everyone":
        return [...this.stage, ...this.pads.values()];
    }
  }

  /**
   * A failed write: what the reducer decided was not kept. Drop this copy; its sockets reconnect
   * and the next hello rebuilds the room from the log (paused, as after a restart).
   */
  private fail(error: unknown) {
    if (this.dropped) return;
    // Fenced: another node has taken the room (cluster mode), so the sockets go to it.
    if (isFenced(error)) return this.drop(CLOSE_SERVICE_RESTART, ROOM_MOVED);
    console.error(`room ${this.code}: write failed, dropping the room until it is rebuilt from the database`, error);
    this.drop(CLOSE_SERVER_ERROR, "could not save; reconnect");
  }

  /** Drops this copy of the room: it writes nothing more, and its sockets are closed with `code` to reconnect. */
  drop(code: number, reason: string) {
    if (this.dropped) return;
    this.dropped = true;
    this.log.broken = true;
    this.hub.forget(this);
    for (const c of this.audience({ to: "everyone" })) c.ws.close(code, reason);
  }

  private schedule(wakeAt: number | null) {
    if (this.timer) clearTimeout(this.timer);
    this.timer = wakeAt === null ? null : setTimeout(() => this.dispatch({ type: "tick" }), Math.max(0, wakeAt - Date.now()));
  }

  stop() {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
  }

  settled() {
    return this.tail;
  }
}

/** What a room needs from the hub that holds it. */
export interface RoomHost {
  /** The server is stopping: sockets going away are not news to record. */
  readonly closing: boolean;
  readonly store: RoomStore;
  /** Drops the room from memory; the next hello rebuilds it from the database. */
  forget(room: LiveRoom): void;
}

/**
 * Sockets written to in this turn of the event loop. Each is corked on its first frame and all are
 * uncorked together once the turn's deliveries are done, so a stage that hears of 40 answers
 * committed together gets them in one write, not 40 (each write is a system call: under a class's
 * burst they were the hub's largest cost, profiled under bench/live.ts).
 */
const corked = new Set<Conn>();
function uncorkAll() {
  for (const conn of corked) {
    writeHeld(conn);
    conn.roundTrips.pingIfDue();
    socketOf(conn.ws).uncork();
  }
  corked.clear();
}

// ws keeps its socket private; cork/uncork nest, so ws's own per-frame cork stays inside ours.
const socketOf = (ws: WebSocket) => (ws as unknown as { _socket: Socket })._socket;

function corkForTurn(conn: Conn) {
  if (corked.has(conn)) return;
  socketOf(conn.ws).cork();
  if (corked.add(conn).size === 1) setImmediate(uncorkAll);
}

/** The held message goes out before anything sent after it, so nothing overtakes it. */
function writeHeld(conn: Conn) {
  const held = conn.held;
  if (!held) return;
  conn.held = null;
  if (conn.ws.readyState === conn.ws.OPEN) conn.ws.send(JSON.stringify(held), { binary: false });
}

/** A text frame; a Buffer is sent as it is (already UTF-8). */
export function send(conn: Conn, text: string | Buffer) {
  const ws = conn.ws;
  if (ws.readyState !== ws.OPEN) return;
  corkForTurn(conn);
  writeHeld(conn);
  ws.send(text, { binary: false });
}

/**
 * A message the next of its kind replaces (the stage's count of answers): held to the end of the
 * turn and serialised then, so a stage that hears of 40 answers committed together gets one count,
 * not 40. Whatever else is sent to the socket meanwhile goes after it, so the order is kept.
 */
export function sendLatest(conn: Conn, message: ServerMessage) {
  if (conn.ws.readyState !== conn.ws.OPEN) return;
  corkForTurn(conn);
  conn.held = message;
}

/** A frame stamped with the server's time (a clock pong): written at once, after what this turn held back for its socket. */
export function sendNow(conn: Conn, text: string) {
  const ws = conn.ws;
  if (ws.readyState !== ws.OPEN) return;
  const socket = socketOf(ws);
  // Still corked from this turn: what it held goes first, and all leaves in the one write below.
  if (!corked.delete(conn)) socket.cork();
  writeHeld(conn);
  ws.send(text, { binary: false });
  conn.roundTrips.pingIfDue();
  socket.uncork();
}
