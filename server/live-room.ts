/**
 * One live room in memory: each event goes through the reducer (app/game/room.ts), what the step
 * writes goes to the room store, and its messages go out in the order of the events — an answer's
 * ack or a seat only once its write is on disk. Also the room's one timer, and what happens when a
 * write fails.
 */
import type { WebSocket } from "ws";
import { leadFor, type ClockEstimate, type ClockState } from "~/game/clock";
import { CLOSE_CODES, type RateBucket, type ServerMessage } from "~/game/protocol";
import { isStoreEffect, reduce, type Audience, type Delivery, type RoomEvent, type RoomState } from "~/game/room";
import type { RoomLog, RoomStore, StoredRoom } from "~/rooms/store.server";

/** One socket: a stage or a pad, and where it is. */
export interface Conn {
  ws: WebSocket;
  bucket: RateBucket;
  clock: ClockState;
  estimate: ClockEstimate | null;
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
}

/** RFC 6455 §7.4.1: the server hit a condition it cannot go on from; clients reconnect. */
const CLOSE_SERVER_ERROR = 1011;

export class LiveRoom {
  readonly stage = new Set<Conn>();
  readonly pads = new Map<string, Conn>();
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
    const leadMs = leadFor([...this.pads.values()].map((c) => c.estimate));
    const step = reduce(this.state, event, { now, leadMs });
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
        if (effect.kind === "send") send(conn, text(effect.message));
        else if (effect.kind === "close") {
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
    this.dropped = true;
    console.error(`room ${this.code}: write failed, dropping the room until it is rebuilt from the database`, error);
    this.hub.forget(this);
    for (const c of this.audience({ to: "everyone" })) c.ws.close(CLOSE_SERVER_ERROR, "could not save; reconnect");
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

/** A text frame; a Buffer is sent as it is (already UTF-8). */
export function send(conn: Conn, text: string | Buffer) {
  if (conn.ws.readyState === conn.ws.OPEN) conn.ws.send(text, { binary: false });
}
