/**
 * The live-round hub: a thin transport over the game reducer (app/game/room.ts). It holds the
 * sockets (rate limit, clock pings, the session behind each), turns their messages into room
 * events for the room they are in (server/live-room.ts: reducer step, write, delivery in order),
 * and keeps the open rooms in memory; a room not in memory (after a restart) is rebuilt from its
 * log by the room store (app/rooms/store.server.ts).
 */
import { nanoid } from "nanoid";
import type { IncomingMessage } from "node:http";
import type { WebSocket, WebSocketServer } from "ws";
import type { SessionStorage } from "~/auth/session.server";
import type { Db } from "~/db/client.server";
import { emptyClock, estimate, recordPong, reportPong, tapServerTime } from "~/game/clock";
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
import { playerBySeatToken, snapshot } from "~/game/room";
import { hostKeyMatches } from "~/rooms/rooms.server";
import { RoomStore } from "~/rooms/store.server";
import { LiveRoom, send, type Conn, type RoomHost } from "./live-room";
import { SqlWriter } from "./sql-writer";
import { seatRefusal } from "./seat-limits";

/** A socket that has not said `hello` (or `join`) by then is closed with CLOSE_CODES.helloTimeout. */
export const HELLO_TIMEOUT_MS = 10_000;

/** An `error` to one socket: what it sent was refused, and nothing changed. */
const refuse = (conn: Conn, code: ErrorCode, message: string) => send(conn, JSON.stringify({ type: "error", code, message } satisfies ServerMessage));

export class Hub implements RoomHost {
  readonly store: RoomStore;
  private readonly sql: SqlWriter;
  closing = false;
  /** Tests shorten it. */
  helloTimeoutMs = HELLO_TIMEOUT_MS;
  private readonly live = new Map<string, Promise<LiveRoom | undefined>>();

  constructor(
    db: Db,
    private readonly secret: string,
    private readonly sessions: SessionStorage,
    /** The database the writer thread opens for itself: the same one as `db`. */
    target: { url: string; authToken?: string },
  ) {
    this.sql = new SqlWriter(target);
    this.store = new RoomStore(db, this.sql);
  }

  attach(wss: WebSocketServer) {
    wss.on("connection", (ws: WebSocket, req: IncomingMessage) => {
      const conn: Conn = {
        ws,
        bucket: newRateBucket(Date.now()),
        clock: emptyClock(),
        estimate: null,
        userId: null,
        room: null,
        role: null,
        playerId: null,
        seated: false,
        listening: false,
        // Messages wait for the session look-up, so a signed-in student's join is linked to the account.
        queue: this.userIdOf(req).then((id) => void (conn.userId = id)),
      };
      ws.on("message", (data: Buffer, isBinary: boolean) => {
        // A socket being closed (rate limit, replaced, removed) has nothing more to say.
        if (ws.readyState !== ws.OPEN) return;
        const receivedAt = Date.now();
        // Counted on arrival, so a flood is refused without queueing behind slower messages.
        const taken = takeToken(conn.bucket, receivedAt);
        conn.bucket = taken.bucket;
        if (taken.verdict === "close") return ws.close(CLOSE_CODES.rateLimited, "too many messages");
        if (taken.verdict === "refuse") return refuse(conn, ERROR_CODES.rateLimited, "Slow down: too many messages.");
        conn.queue = conn.queue
          .then(() => this.onMessage(conn, isBinary ? data : data.toString("utf8"), receivedAt))
          .catch((error: unknown) => {
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

  private async onMessage(conn: Conn, raw: string | Buffer, receivedAt: number) {
    const parsed = parseClientMessage(typeof raw === "string" ? raw : new Uint8Array(raw));
    if (!parsed.ok) {
      refuse(conn, parsed.error.code, parsed.error.message);
      if (parsed.close !== null) conn.ws.close(parsed.close, parsed.error.code);
      return;
    }
    await this.handle(conn, parsed.message, receivedAt);
  }

  private async handle(conn: Conn, m: ClientMessage, receivedAt: number) {
    if (m.type === "ping") {
      if (m.last) conn.clock = reportPong(conn.clock, m.last.t0, m.last.t3);
      conn.estimate = estimate(conn.clock);
      const pong = { t0: m.t0, t1: receivedAt, t2: Date.now() };
      conn.clock = recordPong(conn.clock, pong);
      return send(conn, JSON.stringify({ type: "pong", ...pong } satisfies ServerMessage));
    }
    if (m.type === "hello") return this.hello(conn, m);
    if (m.type === "join") {
      const refused = await seatRefusal(conn.ws);
      if (refused) return refuse(conn, ERROR_CODES.rateLimited, refused.message);
      return this.join(conn, m.room, m.nickname);
    }
    const room = conn.room;
    if (!room) return refuse(conn, ERROR_CODES.notJoined, "Say hello to a room first.");
    if (m.type === "answer") {
      if (conn.role !== "player" || !conn.playerId) return refuse(conn, ERROR_CODES.notJoined, "Join the room before answering.");
      const tapAt = tapServerTime(conn.estimate, m.tapAt, receivedAt);
      return room.dispatch({ type: "answer", playerId: conn.playerId, promptId: m.promptId, spot: m.spot, tapAt });
    }
    if (conn.role !== "host") return refuse(conn, ERROR_CODES.notHost, "Only the teacher's stage can do that.");
    if (m.type === "remove") return room.dispatch({ type: "remove", playerId: m.playerId });
    // Only Teams balanced on points needs the class's history, so only then is it read.
    const priorPoints = m.action === "start" && room.state.config.teams?.balance === "points" ? await this.store.priorPoints(room.id) : undefined;
    room.dispatch({ type: "host", action: m.action, priorPoints });
  }

  private async hello(conn: Conn, m: Extract<ClientMessage, { type: "hello" }>) {
    const room = await this.room(m.room);
    if (!room) {
      refuse(conn, ERROR_CODES.roomNotFound, "No open room has that code. Check the code on the class screen.");
      return conn.ws.close(CLOSE_CODES.roomGone, "no such room");
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
    room.inOrder(() => void (conn.listening = conn.room === room));
  }

  /** The join path, whole: a pad asks for a new seat under a nickname. */
  private async join(conn: Conn, code: string, typed: string) {
    const room = await this.room(code);
    if (!room) return refuse(conn, ERROR_CODES.roomNotFound, "No open room has that code. Check the code on the class screen.");
    // Checked on the socket's whole life, not its present seat: hello in between (which leaves the seat) must not free it to join again.
    if (conn.seated) return refuse(conn, ERROR_CODES.badMessage, "This connection already has a seat: say hello with its seat token.");
    // A signed-in student of the room's school plays under their own name, linked to their account (in
    // another school's room, as a guest); a name that is not a valid nickname (too long, odd characters)
    // must not lock them out, so the typed one is used then.
    const account = conn.userId ? await this.store.studentName(conn.userId, room.id) : undefined;
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
      room.inOrder(() => {
        if (room.pads.get(playerId) === conn) room.pads.delete(playerId);
      });
    }
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
    const stored = await this.store.open(code);
    if (!stored) return undefined;
    const room = new LiveRoom(this, stored);
    // The room stopped with the server, so it pauses as of its last record: time the server was
    // down is not taken from the prompt in progress (nor does the prompt close for it).
    if (stored.lastAt !== null) room.dispatch({ type: "restart" }, { now: stored.lastAt });
    return room;
  }

  forget(room: LiveRoom) {
    room.stop();
    const entry = this.live.get(room.code);
    // Only if no newer copy of the room has been loaded since.
    void entry?.then((r) => r === room && this.live.get(room.code) === entry && this.live.delete(room.code));
  }

  /** Resolves once the writer thread has the database open; rejects if it cannot open it. */
  ready() {
    return this.sql.ready;
  }

  /** Stops timers and waits until every accepted event is in the database. */
  async close() {
    this.closing = true;
    for (const r of this.live.values()) (await r)?.stop();
    await Promise.all([...this.live.values()].map(async (r) => (await r)?.settled()));
    await this.store.drain();
    await this.sql.close();
  }
}
