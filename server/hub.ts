/**
 * The live-round hub: a thin transport over the game reducer (app/game/room.ts). It holds the
 * sockets (rate limit, clock pings, the session behind each), turns their messages into room
 * events for the room they are in (server/live-room.ts: reducer step, write, delivery in order),
 * and keeps the open rooms in memory; a room not in memory (after a restart) is rebuilt from its
 * log by the room store (app/rooms/store.server.ts). In cluster mode it holds a room only under
 * its lease (server/cluster/leases.ts): taken before the room is loaded, and the room dropped when
 * the lease is lost.
 */
import { nanoid } from "nanoid";
import type { Redis } from "ioredis";
import type { IncomingMessage } from "node:http";
import type { WebSocket, WebSocketServer } from "ws";
import type { SessionStorage } from "~/auth/session.server";
import { memoryLocks, type Locks, type RoundNews } from "~/cluster/shared.server";
import type { Db } from "~/db/client.server";
import { ROUND_TRIP_PING_MS, estimate, noteSeenAt, pingFactor, recordPong, reportPong, tapServerTime, uplinkBound } from "~/game/clock";
import {
  CLOSE_CODES,
  ERROR_CODES,
  newRateBucket,
  parseClientMessage,
  takeToken,
  type ClientMessage,
  type ErrorCode,
  type ServerMessage,
} from "~/game/protocol";
import { cleanNickname } from "~/game/nickname";
import { playerBySeatToken } from "~/game/room";
import { snapshot } from "~/game/roomView";
import { endedRoomByCode, hostKeyMatches, idleRoomCodes, ROUND_OVER } from "~/rooms/rooms.server";
import { RoomStore } from "~/rooms/store.server";
import { Leases, RoomElsewhere } from "./cluster/leases";
import type { RedisLog } from "./cluster/redis";
import { addSeatRoundTrip, CLOSE_SERVICE_RESTART, LiveRoom, newSeatClock, ROOM_MOVED, seatFigures, send, sendNow, type Conn, type RoomHost } from "./live-room";
import { RoundTripTimer } from "./round-trips";
import { SqlWriter } from "./sql-writer";
import { seatRefusal } from "./seat-limits";

/** A socket that has not said `hello` (or `join`) by then is closed with CLOSE_CODES.helloTimeout. */
export const HELLO_TIMEOUT_MS = 10_000;
/**
 * How long a stopping server keeps its sockets open after telling them so: an answer already on its
 * way (sent before the pad heard) still gets its reply instead of crossing the close frame.
 * Longer than a slow classroom round trip.
 */
export const STOP_DRAIN_MS = 1_000;

/** An `error` to one socket: what it sent was refused, and nothing changed. */
const refuse = (conn: Conn, code: ErrorCode, message: string) => send(conn, JSON.stringify({ type: "error", code, message } satisfies ServerMessage));
/** The same for an answer, whose reply is always an `answer-ack`, so the pad knows which tap it concerns. */
const refuseAnswer = (conn: Conn, promptId: string, code: ErrorCode, message: string) =>
  send(conn, JSON.stringify({ type: "answer-ack", promptId, accepted: false, code, message } satisfies ServerMessage));

const refuseInOrder = (conn: Conn, reply: () => void) => (conn.room ? conn.room.inOrder(reply) : reply());

/** A room another node has (cluster mode) is not one to sweep here. */
const notHere = (error: unknown) => {
  if (error instanceof RoomElsewhere) return undefined;
  throw error;
};

/** The notice every socket gets as the server begins to stop, and the refusal of what arrives after it. */
const STOPPING_NOTICE = "The server is restarting. Reconnecting in a moment: taps wait until then.";
const STOPPING = "The server is restarting, so this was not stored. Send it again once reconnected.";

export class Hub implements RoomHost {
  readonly store: RoomStore;
  private readonly sql: SqlWriter;
  closing = false;
  /** Tests shorten these. */
  helloTimeoutMs = HELLO_TIMEOUT_MS;
  stopDrainMs = STOP_DRAIN_MS;
  private wss: WebSocketServer | null = null;
  /** Tests shorten it, to fill a window of round trips in seconds. */
  roundTripPingMs = ROUND_TRIP_PING_MS;
  private readonly live = new Map<string, Promise<LiveRoom | undefined>>();
  private sweeper: NodeJS.Timeout | null = null;
  /** Cluster mode: the leases this node holds its rooms under. */
  readonly leases?: Leases;

  constructor(
    db: Db,
    private readonly secret: string,
    private readonly sessions: SessionStorage,
    /** The database the writer thread opens for itself: the same one as `db`. */
    target: { url: string; authToken?: string },
    /** Cluster mode (REDIS_URL): the Redis client for leases, and this node's name and address. */
    cluster?: { redis: Redis; self: { nodeId: string; address: string }; log: RedisLog },
    /** Where stored answers are announced (every node's live class reviews hear it). */
    news?: RoundNews,
  ) {
    this.sql = new SqlWriter(target);
    this.store = new RoomStore(db, this.sql, news);
    if (cluster) {
      this.leases = new Leases(cluster.redis, cluster.self, this.store, cluster.log);
      this.leases.onLost = (roomId) => void this.lost(roomId);
    }
  }

  attach(wss: WebSocketServer) {
    this.wss = wss;
    wss.on("connection", (ws: WebSocket, req: IncomingMessage) => {
      const conn: Conn = {
        ws,
        openedAt: Date.now(),
        bucket: newRateBucket(Date.now()),
        sync: newSeatClock(),
        roundTrips: new RoundTripTimer(
          ws,
          () => conn.playerId !== null,
          (trip) => addSeatRoundTrip(conn.sync, trip),
          () => pingFactor(seatFigures(conn.sync, Date.now())),
          this.roundTripPingMs,
        ),
        userId: null,
        room: null,
        role: null,
        playerId: null,
        seated: false,
        listening: false,
        // Messages wait for the session look-up, so a signed-in student's join is linked to the account.
        queue: this.userIdOf(req).then((id) => void (conn.userId = id)),
      };
      ws.on("message", (data: Buffer) => {
        // A socket being closed (rate limit, replaced, removed) has nothing more to say.
        if (ws.readyState !== ws.OPEN) return;
        const receivedAt = Date.now();
        // Counted on arrival, so a flood is refused without queueing behind slower messages.
        const taken = takeToken(conn.bucket, receivedAt);
        conn.bucket = taken.bucket;
        if (taken.verdict === "close") return ws.close(CLOSE_CODES.rateLimited, "too many messages");
        if (taken.verdict === "refuse") return refuse(conn, ERROR_CODES.rateLimited, "Slow down: too many messages.");
        conn.queue = conn.queue
          // The frame's bytes as they came: parsing checks their size and decodes them once.
          .then(() => this.onMessage(conn, data, receivedAt))
          .catch((error: unknown) => {
            // Another node has the room, or Redis cannot say: the client reconnects (to the owner).
            if (error instanceof RoomElsewhere) return ws.close(error.closeCode, error.closeCode === CLOSE_SERVICE_RESTART ? ROOM_MOVED : "try again shortly");
            console.error("hub: message failed", error);
            refuse(conn, ERROR_CODES.badMessage, "The server could not handle that message.");
          });
      });
      // A socket that never enters a room holds a connection (and its address's share) for nothing.
      const silent = setTimeout(() => {
        if (!conn.room && ws.readyState === ws.OPEN) ws.close(CLOSE_CODES.helloTimeout, "no hello");
      }, this.helloTimeoutMs);
      silent.unref();
      ws.on("close", () => {
        clearTimeout(silent);
        this.leave(conn);
      });
      ws.on("error", () => ws.terminate());
    });
  }

  private async userIdOf(req: IncomingMessage): Promise<string | null> {
    try {
      const session = await this.sessions.getSession(req.headers.cookie);
      return session.get("userId") ?? null;
    } catch {
      return null;
    }
  }

  private async onMessage(conn: Conn, raw: Buffer, receivedAt: number) {
    const parsed = parseClientMessage(raw);
    if (!parsed.ok) {
      refuse(conn, parsed.error.code, parsed.error.message);
      if (parsed.close !== null) conn.ws.close(parsed.close, parsed.error.code);
      return;
    }
    await this.handle(conn, parsed.message, receivedAt);
  }

  private async handle(conn: Conn, m: ClientMessage, receivedAt: number) {
    if (m.type === "ping") {
      const sync = conn.sync;
      if (m.last) sync.clock = reportPong(sync.clock, m.last.t0, m.last.t3);
      sync.estimate = estimate(sync.clock);
      const pong = { t0: m.t0, t1: receivedAt, t2: Date.now() };
      sync.clock = recordPong(sync.clock, pong);
      return sendNow(conn, JSON.stringify({ type: "pong", ...pong } satisfies ServerMessage));
    }
    // Once stopping, nothing more is written: every message that would change a room is refused
    // at once (an answer with its own ack), so no client waits for a reply that never comes.
    if (this.closing) {
      // After the room's earlier deliveries, so it cannot overtake an ack still being written.
      if (m.type === "answer") return refuseInOrder(conn, () => refuseAnswer(conn, m.promptId, ERROR_CODES.stopping, STOPPING));
      return refuse(conn, ERROR_CODES.stopping, STOPPING);
    }
    if (m.type === "hello") return this.hello(conn, m);
    if (m.type === "join") {
      const refused = await seatRefusal(conn.ws);
      if (refused) return refuse(conn, ERROR_CODES.rateLimited, refused.message);
      return this.join(conn, m.room, m.nickname);
    }
    const room = conn.room;
    if (m.type === "answer") {
      if (!room || conn.role !== "player" || !conn.playerId) return refuseAnswer(conn, m.promptId, ERROR_CODES.notJoined, "Join the room before answering.");
      const seat = conn.sync;
      const figures = seatFigures(seat, receivedAt);
      const tapAt = tapServerTime({ estimate: seat.estimate, uplinkMs: uplinkBound(figures), connectedAt: conn.openedAt }, m.tapAt, receivedAt);
      const run = room.state.run;
      const seenAt = run?.promptId === m.promptId && run.shownAt !== null ? noteSeenAt(run.shownAt, figures) : undefined;
      return room.dispatch({ type: "answer", playerId: conn.playerId, promptId: m.promptId, spot: m.spot, tapAt, seenAt, naming: m.naming });
    }
    if (!room) return refuse(conn, ERROR_CODES.notJoined, "Say hello to a room first.");
    if (conn.role !== "host") return refuse(conn, ERROR_CODES.notHost, "Only the teacher's stage can do that.");
    if (m.type === "remove") return room.dispatch({ type: "remove", playerId: m.playerId });
    // Only Teams balanced on points needs the class's history, so only then is it read.
    const priorPoints = m.action === "start" && room.state.config.teams?.balance === "points" ? await this.store.priorPoints(room.id) : undefined;
    room.dispatch({ type: "host", action: m.action, priorPoints });
  }

  private async hello(conn: Conn, m: Extract<ClientMessage, { type: "hello" }>) {
    const room = await this.room(m.room);
    if (!room) {
      const gone = await this.noRoom(conn, m.room);
      return conn.ws.close(CLOSE_CODES.roomGone, gone);
    }
    if (m.role === "host" && !hostKeyMatches(this.secret, room.id, m.hostKey)) {
      refuse(conn, ERROR_CODES.unauthorised, "That stage key is not valid for this room.");
      return conn.ws.close(CLOSE_CODES.unauthorised, "bad host key");
    }
    const seated = m.role === "player" && m.seatToken ? playerBySeatToken(room.state, m.seatToken) : undefined;
    if (m.role === "player" && m.seatToken && !seated) {
      refuse(conn, ERROR_CODES.unknownPlayer, "That seat is no longer in this room. Join again.");
    }
    this.leave(conn);
    conn.room = room;
    conn.role = m.role;
    if (seated) return this.takeSeat(conn, room, seated.id);
    if (m.role === "host") room.stage.add(conn);
    // The room as it is once every event before this hello is delivered.
    const state = room.state;
    const who = m.role === "host" ? ({ role: "host" } as const) : ({ role: "player", playerId: null } as const);
    room.inOrder(() => {
      if (conn.room !== room) return;
      conn.listening = m.role === "host";
      for (const msg of snapshot(state, who, Date.now())) send(conn, JSON.stringify(msg));
      if (state.phase === "ended") conn.ws.close(CLOSE_CODES.roomGone, "the room has ended");
    });
  }

  private takeSeat(conn: Conn, room: LiveRoom, playerId: string) {
    const previous = room.pads.get(playerId);
    if (previous && previous !== conn) {
      previous.playerId = null;
      previous.ws.close(CLOSE_CODES.replaced, "seat taken by another connection");
    }
    this.seat(conn, room, playerId);
    room.dispatch({ type: "online", playerId });
  }

  /** The socket holds the seat at once; room messages reach it from the event that welcomes it on. */
  private seat(conn: Conn, room: LiveRoom, playerId: string) {
    conn.playerId = playerId;
    conn.seated = true;
    room.pads.set(playerId, conn);
    // A seat taken back keeps its clock; a new seat starts from what its socket synced before joining.
    const kept = room.clocks.get(playerId);
    if (kept) conn.sync = kept;
    else room.clocks.set(playerId, conn.sync);
    conn.roundTrips.ping();
    room.inOrder(() => void (conn.listening = conn.room === room));
  }

  /** The join path, whole: a pad asks for a new seat under a nickname. */
  private async join(conn: Conn, code: string, typed: string) {
    const room = await this.room(code);
    if (!room) return void (await this.noRoom(conn, code));
    // Checked on the socket's whole life, not its present seat: hello in between (which leaves the seat) must not free it to join again.
    if (conn.seated) return refuse(conn, ERROR_CODES.badMessage, "This connection already has a seat: say hello with its seat token.");
    // A signed-in student of the room's school plays under their own name, linked to their account (in
    // another school's room, as a guest); a name that is not a valid nickname (too long, odd characters)
    // must not lock them out, so the typed one is used then.
    const account = conn.userId ? await this.store.studentName(conn.userId, room.id) : undefined;
    // The server may have begun stopping during the look-ups; the room would record nothing now.
    if (this.closing) return refuse(conn, ERROR_CODES.stopping, STOPPING);
    this.leave(conn);
    const playerId = nanoid(12);
    conn.room = room;
    conn.role = "player";
    this.seat(conn, room, playerId);
    const nickname = account !== undefined && cleanNickname(account).ok ? account : typed;
    room.dispatch({ type: "join", playerId, seatToken: nanoid(32), nickname }, { userId: account !== undefined ? conn.userId : null });
    // A refused join leaves no seat behind (the pad still gets the refusal, delivered in order).
    if (!room.state.players.some((p) => p.id === playerId)) {
      conn.playerId = null;
      conn.seated = false;
      room.clocks.delete(playerId);
      room.inOrder(() => {
        if (room.pads.get(playerId) === conn) room.pads.delete(playerId);
      });
    }
  }

  /** Refuses a code with no open room, telling a round that is over from a code that never was; returns the close reason. */
  private async noRoom(conn: Conn, code: string) {
    if (await endedRoomByCode(this.store.db, code)) {
      refuse(conn, ERROR_CODES.roomEnded, ROUND_OVER);
      return "the room has ended";
    }
    refuse(conn, ERROR_CODES.roomNotFound, "No open room has that code. Check the code on the class screen.");
    return "no such room";
  }

  private leave(conn: Conn) {
    const room = conn.room;
    if (!room) return;
    room.stage.delete(conn);
    if (conn.playerId && room.pads.get(conn.playerId) === conn) {
      room.pads.delete(conn.playerId);
      if (room.state.players.some((p) => p.id === conn.playerId && !p.removed)) room.dispatch({ type: "offline", playerId: conn.playerId });
    }
    conn.room = null;
    conn.role = null;
    conn.playerId = null;
    conn.listening = false;
  }

  /** The live room for a code: from memory, or rebuilt from SQLite (then told the server restarted). */
  private room(code: string): Promise<LiveRoom | undefined> {
    let found = this.live.get(code);
    if (!found) {
      found = this.loadRoom(code);
      this.live.set(code, found);
      // A code that is not open now (or failed to load) is looked up afresh next time.
      const drop = () => void (this.live.get(code) === found && this.live.delete(code));
      found.then((r) => r ?? drop(), drop);
    }
    return found;
  }

  private async loadRoom(code: string) {
    const stored = await this.store.open(code, this.leases && ((roomId) => this.leases!.claim(roomId)));
    if (!stored) return undefined;
    const room = new LiveRoom(this, stored);
    // The room stopped with the server, so it pauses as of its last record: time the server was
    // down is not taken from the prompt in progress (nor does the prompt close for it).
    if (stored.lastAt !== null) room.dispatch({ type: "restart" }, { now: stored.lastAt });
    return room;
  }

  forget(room: LiveRoom) {
    room.stop();
    void this.leases?.release(room.id);
    const entry = this.live.get(room.code);
    // Only if no newer copy of the room has been loaded since.
    void entry?.then((r) => r === room && this.live.get(room.code) === entry && this.live.delete(room.code));
  }

  /** Cluster mode: another node has taken the room, so this copy goes and its sockets reconnect to it. */
  private async lost(roomId: string) {
    for (const entry of this.live.values()) {
      const room = await entry.catch(() => undefined);
      if (room?.id === roomId) room.drop(CLOSE_SERVICE_RESTART, ROOM_MOVED);
    }
  }

  /**
   * Rooms left open (a stage closed without "End", a server restarted mid-round) would hold their codes
   * and the class's results in limbo: every so often, rooms in which nothing was recorded for `idleMs`
   * end as the host's "end" would, through the reducer, so their answers and standings are kept.
   */
  startIdleSweep(idleMs: number, locks: Locks = memoryLocks()) {
    // One node of a cluster sweeps at a time: the others find the same rooms and would load them too.
    const sweep = () =>
      locks.ifFree("idle-sweep", async () => {
        if (this.closing) return;
        for (const code of await idleRoomCodes(this.store.db, Date.now() - idleMs)) {
          const room = await this.room(code).catch(notHere);
          if (room && !this.closing) room.dispatch({ type: "idle" });
        }
      });
    // A few sweeps per idle time, so a room ends at most a quarter late; never busier than 4 a second.
    const every = Math.min(10 * 60_000, Math.max(250, idleMs / 4));
    this.sweeper = setInterval(() => void sweep().catch((error: unknown) => console.error("hub: idle sweep failed", error)), every);
    this.sweeper.unref();
  }

  /** What the server holds on a seat's clock now (tests read it); undefined when the seat is not in memory. */
  async seatClock(code: string, playerId: string) {
    const sync = (await this.live.get(code))?.clocks.get(playerId);
    if (!sync) return undefined;
    const figures = seatFigures(sync, Date.now());
    return { offsetMs: sync.estimate?.offsetMs ?? null, figures, uplinkMs: uplinkBound(figures) };
  }

  /** Resolves once the writer thread has the database open; rejects if it cannot open it. */
  ready() {
    return this.sql.ready;
  }

  /**
   * Stops accepting changes and tells every socket (error `stopping`: keep taps for after the
   * reconnect), stops timers, waits until every accepted event is in the database and its ack is
   * sent, and gives answers already on their way STOP_DRAIN_MS to arrive and be refused.
   */
  async close() {
    this.closing = true;
    const notice = JSON.stringify({ type: "error", code: ERROR_CODES.stopping, message: STOPPING_NOTICE } satisfies ServerMessage);
    const sockets = [...(this.wss?.clients ?? [])].filter((ws) => ws.readyState === ws.OPEN);
    for (const ws of sockets) ws.send(notice);
    const drained = new Promise((done) => setTimeout(done, sockets.length > 0 ? this.stopDrainMs : 0));
    if (this.sweeper) clearInterval(this.sweeper);
    for (const r of this.live.values()) (await r)?.stop();
    await Promise.all([...this.live.values()].map(async (r) => (await r)?.settled()));
    await this.store.drain();
    // Written through, so the next owner rebuilds everything: let the rooms go at once, not after the TTL.
    await this.leases?.close();
    await Promise.all([this.sql.close(), drained]);
  }
}
