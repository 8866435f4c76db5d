/**
 * The live-round hub: a thin transport over the game reducer (app/game/room.ts). It turns socket
 * messages into room events, has what the reducer asks to persist written to SQLite on the writer
 * thread — batched, one transaction per batch — and carries out the sends in order, an ack only
 * once its answer is on disk, so nothing a phone was told it had is ever lost. A room not in
 * memory (after a restart) is rebuilt by replaying its log.
 */
import type { InStatement, InValue } from "@libsql/client";
import { eq, getTableColumns, getTableName, inArray, sql, type InferInsertModel, type Table } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { IncomingMessage } from "node:http";
import type { WebSocket, WebSocketServer } from "ws";
import type { SessionStorage } from "~/auth/session.server";
import type { Db } from "~/db/client.server";
import { answers, roomEvents, roomPlayers, rooms, users } from "~/db/schema";
import { emptyClock, estimate, leadFor, recordPong, reportPong, tapServerTime, type ClockEstimate, type ClockState } from "~/game/clock";
import {
  CLOSE_CODES,
  ERROR_CODES,
  newRateBucket,
  parseClientMessage,
  takeToken,
  type ClientMessage,
  type ErrorCode,
  type RateBucket,
  type ServerMessage,
} from "~/game/protocol";
import { cleanNickname } from "~/game/nickname";
import { initialState, playerBySeat, reduce, snapshot, type Audience, type Effect, type RoomEvent, type RoomState } from "~/game/room";
import type { RoomConfig } from "~/game/roomConfig";
import { loadRoomState } from "~/rooms/log.server";
import { hostKeyMatches, openRoomByCode } from "~/rooms/rooms.server";
import { stepRows, type StepRows } from "~/rooms/stepRows";
import { SqlWriter } from "./sql-writer";
import { seatRefusal } from "./seat-limits";

interface Conn {
  ws: WebSocket;
  bucket: RateBucket;
  clock: ClockState;
  estimate: ClockEstimate | null;
  userId: string | null;
  room: LiveRoom | null;
  role: "host" | "player" | null;
  playerId: string | null;
  /** Set once the socket's welcome is on its way: room messages before that would arrive ahead of it. */
  listening: boolean;
  /** One socket's messages are handled one at a time, in the order they came. */
  queue: Promise<void>;
}

/** RFC 6455 §7.4.1: the server hit a condition it cannot go on from; clients reconnect. */
const CLOSE_SERVER_ERROR = 1011;

/** What one reducer step adds to SQLite: its event records and the rows beside them. */
interface StepWrites extends StepRows {
  events: (typeof roomEvents.$inferInsert)[];
  roomId: string;
}

/** Rows per multi-row INSERT: well under SQLite's 32 766 bound parameters for the widest table (13 columns). */
const ROWS_PER_INSERT = 500;

function chunks<T>(rows: T[]): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < rows.length; i += ROWS_PER_INSERT) out.push(rows.slice(i, i + ROWS_PER_INSERT));
  return out;
}

/**
 * One multi-row INSERT built straight from the table's columns: for thousands of rows, drizzle's
 * query builder cost more CPU than SQLite itself (profiled under bench/live.ts).
 */
function insertRows<T extends Table>(table: T, rows: InferInsertModel<T>[]): InStatement {
  const columns = Object.entries(getTableColumns(table)).filter(([key]) => key in rows[0]!);
  const tuple = `(${columns.map(() => "?").join(", ")})`;
  return {
    sql: `INSERT INTO "${getTableName(table)}" (${columns.map(([, c]) => `"${c.name}"`).join(", ")}) VALUES ${rows.map(() => tuple).join(", ")}`,
    args: rows.flatMap((row) =>
      columns.map(([key, c]) => {
        const value = (row as Record<string, unknown>)[key];
        return (value === null || value === undefined ? null : c.mapToDriverValue(value)) as InValue;
      }),
    ),
  };
}

/**
 * Group commit: the writes of every room go to the writer thread as one transaction of a few
 * multi-row INSERTs (one statement per table, not one per row). While a transaction is on its way
 * to the disk, what arrives meanwhile waits and goes next as one, so the busier the school, the
 * more answers share each commit — and the event loop never waits for the disk.
 */
class BatchWriter {
  private pending: { writes: StepWrites; room: LiveRoom; done: (error: unknown) => void }[] = [];
  /** A flush is scheduled or running; what arrives now goes in the next one. */
  private busy = false;
  private idle: (() => void)[] = [];

  constructor(
    private readonly db: Db,
    private readonly sql: SqlWriter,
  ) {}

  /** Resolves with null once committed, or with the error (never rejects: the room handles it in order). */
  write(writes: StepWrites, room: LiveRoom): Promise<unknown> {
    return new Promise((resolve) => {
      this.pending.push({ writes, room, done: resolve });
      // Every event of this turn of the event loop joins the first flush.
      if (!this.busy) {
        this.busy = true;
        setImmediate(() => void this.flush());
      }
    });
  }

  private async flush() {
    while (this.pending.length > 0) {
      const jobs = this.pending;
      this.pending = [];
      // Later decisions of a room whose write failed were built on what was lost: never commit them.
      const ok = jobs.filter((j) => !j.room.broken);
      for (const j of jobs) if (j.room.broken) j.done(new Error("an earlier write of this room failed"));
      if (ok.length === 0) continue;
      try {
        await this.sql.run(this.statements(ok.map((j) => j.writes)));
        for (const j of ok) j.done(null);
      } catch (error) {
        for (const j of ok) {
          j.room.broken = true;
          j.done(error);
        }
      }
    }
    this.busy = false;
    for (const resolve of this.idle.splice(0)) resolve();
  }

  private statements(writes: StepWrites[]): InStatement[] {
    const ended = writes.filter((w) => w.ended).map((w) => w.roomId);
    const ending = ended.length > 0 ? this.db.update(rooms).set({ endedAt: new Date() }).where(inArray(rooms.id, ended)).toSQL() : null;
    // Seats before answers: an answer's row refers to its seat's.
    return [
      ...chunks(writes.flatMap((w) => w.events)).map((rows) => insertRows(roomEvents, rows)),
      ...chunks(writes.flatMap((w) => w.players)).map((rows) => insertRows(roomPlayers, rows)),
      ...chunks(writes.flatMap((w) => w.answers)).map((rows) => insertRows(answers, rows)),
      ...(ending ? [{ sql: ending.sql, args: ending.params as InValue[] }] : []),
    ];
  }

  /** Resolves when everything handed over so far is written. */
  drain(): Promise<void> {
    return this.busy ? new Promise((resolve) => this.idle.push(resolve)) : Promise.resolve();
  }
}

class LiveRoom {
  readonly stage = new Set<Conn>();
  readonly pads = new Map<string, Conn>();
  /** A write failed: this copy of the room is no longer what the database holds. */
  broken = false;
  private dropped = false;
  private timer: NodeJS.Timeout | null = null;
  /** Deliveries wait for their own write and for every earlier delivery, so order is kept. */
  private tail: Promise<void> = Promise.resolve();

  constructor(
    private readonly hub: Hub,
    readonly id: string,
    readonly code: string,
    public state: RoomState,
    private seq: number,
  ) {}

  /** `now` is only given for a restart, which happens when the room last recorded something. */
  dispatch(event: RoomEvent, extra: { userId?: string | null; now?: number } = {}) {
    // Once the hub is closing, sockets going away are not news to record; a broken copy records nothing more.
    if (this.hub.closing || this.broken) return;
    const now = extra.now ?? Date.now();
    const before = this.state;
    const leadMs = leadFor([...this.pads.values()].map((c) => c.estimate));
    const step = reduce(before, event, { now, leadMs });
    this.state = step.state;
    const writes = this.writesFor(before, step.state, step.effects, extra.userId ?? null);
    const written = writes ? this.hub.writer.write(writes, this) : Promise.resolve(null);
    const effects = step.effects.filter((e) => e.kind !== "persist");
    const ended = writes?.ended === true;
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

  private writesFor(before: RoomState, after: RoomState, effects: Effect[], userId: string | null): StepWrites | null {
    const events: StepWrites["events"] = [];
    for (const effect of effects) {
      if (effect.kind !== "persist") continue;
      this.seq += 1;
      events.push({ roomId: this.id, seq: this.seq, at: effect.record.env.now, event: effect.record });
    }
    return events.length > 0 ? { roomId: this.id, events, ...stepRows(this.id, before, after, userId) } : null;
  }

  private deliver(effects: Effect[]) {
    // Serialise and encode each message once, however many sockets get it.
    const cache = new Map<ServerMessage, Buffer>();
    const text = (m: ServerMessage) => {
      let t = cache.get(m);
      if (t === undefined) cache.set(m, (t = Buffer.from(JSON.stringify(m))));
      return t;
    };
    for (const effect of effects) {
      if (effect.kind === "persist") continue;
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

const errorMessage = (code: ErrorCode, message: string): ServerMessage => ({ type: "error", code, message });

/** A text frame; a Buffer is sent as it is (already UTF-8). */
function send(conn: Conn, text: string | Buffer) {
  if (conn.ws.readyState === conn.ws.OPEN) conn.ws.send(text, { binary: false });
}

export class Hub {
  readonly writer: BatchWriter;
  private readonly sql: SqlWriter;
  closing = false;
  private readonly live = new Map<string, Promise<LiveRoom | undefined>>();

  constructor(
    readonly db: Db,
    private readonly secret: string,
    private readonly sessions: SessionStorage,
    /** The database the writer thread opens for itself: the same one as `db`. */
    target: { url: string; authToken?: string },
  ) {
    this.sql = new SqlWriter(target);
    this.writer = new BatchWriter(db, this.sql);
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
        if (taken.verdict === "refuse") return send(conn, JSON.stringify(errorMessage(ERROR_CODES.rateLimited, "Slow down: too many messages.")));
        conn.queue = conn.queue
          .then(() => this.onMessage(conn, isBinary ? data : data.toString("utf8"), receivedAt))
          .catch((error: unknown) => {
            console.error("hub: message failed", error);
            send(conn, JSON.stringify(errorMessage(ERROR_CODES.badMessage, "The server could not handle that message.")));
          });
      });
      ws.on("close", () => this.leave(conn));
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
      send(conn, JSON.stringify(errorMessage(parsed.error.code, parsed.error.message)));
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
      if (refused) return send(conn, JSON.stringify(errorMessage(ERROR_CODES.rateLimited, refused.message)));
      return this.join(conn, m.room, m.nickname);
    }
    const room = conn.room;
    if (!room) return send(conn, JSON.stringify(errorMessage(ERROR_CODES.notJoined, "Say hello to a room first.")));
    if (m.type === "answer") {
      if (conn.role !== "player" || !conn.playerId) return send(conn, JSON.stringify(errorMessage(ERROR_CODES.notJoined, "Join the room before answering.")));
      const tapAt = tapServerTime(conn.estimate, m.tapAt, receivedAt);
      return room.dispatch({ type: "answer", playerId: conn.playerId, promptId: m.promptId, spot: m.spot, tapAt });
    }
    if (conn.role !== "host") return send(conn, JSON.stringify(errorMessage(ERROR_CODES.notHost, "Only the teacher's stage can do that.")));
    if (m.type === "remove") return room.dispatch({ type: "remove", playerId: m.playerId });
    // Only Teams balanced on points needs the class's history, so only then is it read.
    const priorPoints = m.action === "start" && room.state.config.teams?.balance === "points" ? await this.priorPoints(room) : undefined;
    room.dispatch({ type: "host", action: m.action, priorPoints });
  }

  private async hello(conn: Conn, m: Extract<ClientMessage, { type: "hello" }>) {
    const room = await this.room(m.room);
    if (!room) {
      send(conn, JSON.stringify(errorMessage(ERROR_CODES.roomNotFound, "No open room has that code. Check the code on the class screen.")));
      return conn.ws.close(CLOSE_CODES.roomGone, "no such room");
    }
    if (m.role === "host" && !hostKeyMatches(this.secret, room.id, m.hostKey)) {
      send(conn, JSON.stringify(errorMessage(ERROR_CODES.unauthorised, "That stage key is not valid for this room.")));
      return conn.ws.close(CLOSE_CODES.unauthorised, "bad host key");
    }
    const seated = m.role === "player" && m.seat ? playerBySeat(room.state, m.seat) : undefined;
    if (m.role === "player" && m.seat && !seated) {
      send(conn, JSON.stringify(errorMessage(ERROR_CODES.unknownPlayer, "That seat is no longer in this room. Join again.")));
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
    room.pads.set(playerId, conn);
    room.inOrder(() => void (conn.listening = conn.room === room));
  }

  private async join(conn: Conn, code: string, typed: string) {
    const room = await this.room(code);
    if (!room) return send(conn, JSON.stringify(errorMessage(ERROR_CODES.roomNotFound, "No open room has that code. Check the code on the class screen.")));
    if (conn.playerId && room.pads.get(conn.playerId) === conn) {
      return send(conn, JSON.stringify(errorMessage(ERROR_CODES.badMessage, "This phone has already joined the room.")));
    }
    // A signed-in student plays under their own name, linked to their account; a name that is
    // not a valid nickname (too long, odd characters) must not lock them out, so the typed one is used then.
    const account = conn.userId ? await this.studentName(conn.userId) : undefined;
    this.leave(conn);
    const playerId = nanoid(12);
    conn.room = room;
    conn.role = "player";
    this.seat(conn, room, playerId);
    const nickname = account !== undefined && cleanNickname(account).ok ? account : typed;
    room.dispatch({ type: "join", playerId, seat: nanoid(32), nickname }, { userId: account !== undefined ? conn.userId : null });
    // A refused join leaves no seat behind (the pad still gets the refusal, delivered in order).
    if (!room.state.players.some((p) => p.id === playerId)) {
      conn.playerId = null;
      room.inOrder(() => {
        if (room.pads.get(playerId) === conn) room.pads.delete(playerId);
      });
    }
  }

  private async studentName(userId: string) {
    const [row] = await this.db.select({ name: users.displayName, role: users.role }).from(users).where(eq(users.id, userId));
    return row?.role === "student" ? row.name : undefined;
  }

  /** Points from the class's earlier rounds, by player of this room, to balance Teams. */
  private async priorPoints(room: LiveRoom): Promise<Record<string, number>> {
    const rows = await this.db
      .select({ playerId: roomPlayers.id, points: sql<number>`coalesce((SELECT sum(a.points) FROM answers a JOIN room_players p ON p.id = a.player_id WHERE p.user_id = ${roomPlayers.userId} AND a.room_id <> ${room.id}), 0)` })
      .from(roomPlayers)
      .where(eq(roomPlayers.roomId, room.id));
    return Object.fromEntries(rows.map((r) => [r.playerId, Number(r.points)]));
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
    const row = await openRoomByCode(this.db, code);
    if (!row) return undefined;
    const loaded = await loadRoomState(this.db, row.id);
    const state = loaded?.state ?? initialState(row.config as RoomConfig);
    const room = new LiveRoom(this, row.id, row.code, state, loaded?.seq ?? 0);
    // The room stopped with the server, so it pauses as of its last record: time the server was
    // down is not taken from the prompt in progress (nor does the prompt close for it).
    if (loaded?.lastAt != null) room.dispatch({ type: "restart" }, { now: loaded.lastAt });
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
    await this.writer.drain();
    await this.sql.close();
  }
}
