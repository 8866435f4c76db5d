/**
 * The live-round hub: a thin transport over the game reducer (app/game/room.ts). It turns socket
 * messages into room events, writes what the reducer asks to persist to SQLite — batched, one
 * transaction per batch — and only then carries out the sends, so nothing a phone was told is
 * ever lost. A room not in memory (after a restart) is rebuilt by replaying its log.
 */
import { eq, sql } from "drizzle-orm";
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
import { initialState, playerBySeat, reduce, snapshot, type Audience, type Effect, type RoomEvent, type RoomState } from "~/game/room";
import type { RoomConfig } from "~/game/roomConfig";
import { loadRoomState } from "~/rooms/log.server";
import { hostKeyMatches, openRoomByCode } from "~/rooms/rooms.server";

interface Conn {
  ws: WebSocket;
  bucket: RateBucket;
  clock: ClockState;
  estimate: ClockEstimate | null;
  userId: string | null;
  room: LiveRoom | null;
  role: "host" | "player" | null;
  playerId: string | null;
}

type Write = Parameters<Db["batch"]>[0][number];

/** Collects the writes of every room that arrive in one turn of the event loop into one transaction. */
class BatchWriter {
  private pending: { writes: Write[]; done: (error?: unknown) => void }[] = [];
  private scheduled = false;
  private flushing: Promise<void> = Promise.resolve();

  constructor(private readonly db: Db) {}

  write(writes: Write[]): Promise<void> {
    return new Promise((resolve, reject) => {
      this.pending.push({ writes, done: (error) => (error ? reject(error) : resolve()) });
      if (!this.scheduled) {
        this.scheduled = true;
        setImmediate(() => {
          this.scheduled = false;
          this.flushing = this.flushing.then(() => this.flush());
        });
      }
    });
  }

  private async flush() {
    const jobs = this.pending;
    this.pending = [];
    if (jobs.length === 0) return;
    const all = jobs.flatMap((j) => j.writes) as [Write, ...Write[]];
    try {
      await this.db.batch(all);
      for (const j of jobs) j.done();
    } catch (error) {
      for (const j of jobs) j.done(error);
    }
  }

  /** Resolves when everything handed over so far is written. */
  async drain() {
    while (this.pending.length > 0 || this.scheduled) await new Promise((r) => setImmediate(r));
    await this.flushing;
  }
}

class LiveRoom {
  readonly stage = new Set<Conn>();
  readonly pads = new Map<string, Conn>();
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

  dispatch(event: RoomEvent, extra: { userId?: string | null } = {}) {
    // Once the hub is closing, sockets going away are not news to record.
    if (this.hub.closing) return;
    const now = Date.now();
    const before = this.state;
    const leadMs = leadFor([...this.pads.values()].map((c) => c.estimate));
    const step = reduce(before, event, { now, leadMs });
    this.state = step.state;
    const writes = this.writesFor(before, step.state, step.effects, extra.userId ?? null);
    const written = writes.length > 0 ? this.hub.writer.write(writes) : Promise.resolve();
    const effects = step.effects.filter((e) => e.kind !== "persist");
    this.tail = this.tail
      .then(() => written)
      .then(
        () => this.deliver(effects),
        (error: unknown) => this.recover(error),
      );
    this.schedule(step.wakeAt);
  }

  private writesFor(before: RoomState, after: RoomState, effects: Effect[], userId: string | null): Write[] {
    const { db } = this.hub;
    const writes: Write[] = [];
    for (const effect of effects) {
      if (effect.kind !== "persist") continue;
      this.seq += 1;
      writes.push(db.insert(roomEvents).values({ roomId: this.id, seq: this.seq, at: effect.record.env.now, event: effect.record }));
    }
    for (const p of after.players.slice(before.players.length)) {
      writes.push(db.insert(roomPlayers).values({ id: p.id, roomId: this.id, nickname: p.nickname, userId }));
    }
    const prompts = after.config.prompts;
    for (const a of after.answers.slice(before.answers.length)) {
      const note = prompts[a.index]!;
      writes.push(
        db.insert(answers).values({
          roomId: this.id,
          playerId: a.playerId,
          promptIndex: a.index,
          written: note.written,
          writtenMidi: note.writtenMidi,
          string: a.spot.string,
          fret: a.spot.fret,
          kind: a.diagnosis.kind,
          pitchRight: a.diagnosis.pitchRight,
          points: a.points,
          reactionMs: Math.round(a.reactionMs),
          streak: a.streak,
          at: a.at,
        }),
      );
    }
    if (after.phase === "ended" && before.phase !== "ended") {
      writes.push(db.update(rooms).set({ endedAt: new Date() }).where(eq(rooms.id, this.id)));
    }
    return writes;
  }

  private deliver(effects: Effect[]) {
    // Serialise each message once, however many sockets get it.
    const cache = new Map<ServerMessage, string>();
    const text = (m: ServerMessage) => {
      let t = cache.get(m);
      if (t === undefined) cache.set(m, (t = JSON.stringify(m)));
      return t;
    };
    for (const effect of effects) {
      if (effect.kind === "persist") continue;
      for (const conn of this.audience(effect.to)) {
        if (effect.kind === "send") send(conn, text(effect.message));
        else if (effect.kind === "close") {
          conn.ws.close(effect.code, "removed by the teacher");
          if (conn.playerId) this.pads.delete(conn.playerId);
        }
      }
    }
    if (this.state.phase === "ended") this.hub.forget(this);
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

  /** A failed write: what the reducer decided was not kept, so rebuild from the log and resync everyone. */
  private async recover(error: unknown) {
    console.error(`room ${this.code}: write failed, rebuilding from the database`, error);
    const loaded = await loadRoomState(this.hub.db, this.id);
    if (!loaded) return;
    this.state = loaded.state;
    this.seq = loaded.seq;
    const now = Date.now();
    for (const c of this.stage) for (const m of snapshot(this.state, { role: "host" }, now)) send(c, JSON.stringify(m));
    for (const [playerId, c] of this.pads) for (const m of snapshot(this.state, { role: "player", playerId }, now)) send(c, JSON.stringify(m));
    for (const c of this.stage) send(c, JSON.stringify(errorMessage(ERROR_CODES.badMessage, "The last action could not be saved; please do it again.")));
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

function send(conn: Conn, text: string) {
  if (conn.ws.readyState === conn.ws.OPEN) conn.ws.send(text);
}

export class Hub {
  readonly writer: BatchWriter;
  closing = false;
  private readonly live = new Map<string, Promise<LiveRoom | undefined>>();

  constructor(
    readonly db: Db,
    private readonly secret: string,
    private readonly sessions: SessionStorage,
  ) {
    this.writer = new BatchWriter(db);
  }

  attach(wss: WebSocketServer) {
    wss.on("connection", (ws: WebSocket, req: IncomingMessage) => {
      const conn: Conn = { ws, bucket: newRateBucket(Date.now()), clock: emptyClock(), estimate: null, userId: null, room: null, role: null, playerId: null };
      // Messages wait for the session look-up, so a signed-in student's join is linked to the account.
      const ready = this.userIdOf(req).then((id) => void (conn.userId = id));
      ws.on("message", (data: Buffer, isBinary: boolean) => {
        const receivedAt = Date.now();
        ready.then(() => this.onMessage(conn, isBinary ? data : data.toString("utf8"), receivedAt)).catch((error: unknown) => {
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
    const taken = takeToken(conn.bucket, receivedAt);
    conn.bucket = taken.bucket;
    if (taken.verdict === "close") return conn.ws.close(CLOSE_CODES.rateLimited, "too many messages");
    if (taken.verdict === "refuse") return send(conn, JSON.stringify(errorMessage(ERROR_CODES.rateLimited, "Slow down: too many messages.")));
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
    if (m.type === "join") return this.join(conn, m.room, m.nickname);
    const room = conn.room;
    if (!room) return send(conn, JSON.stringify(errorMessage(ERROR_CODES.notJoined, "Say hello to a room first.")));
    if (m.type === "answer") {
      if (conn.role !== "player" || !conn.playerId) return send(conn, JSON.stringify(errorMessage(ERROR_CODES.notJoined, "Join the room before answering.")));
      const tapAt = tapServerTime(conn.estimate, m.tapAt, receivedAt);
      return room.dispatch({ type: "answer", playerId: conn.playerId, promptId: m.promptId, spot: m.spot, tapAt });
    }
    if (conn.role !== "host") return send(conn, JSON.stringify(errorMessage(ERROR_CODES.notHost, "Only the teacher's stage can do that.")));
    if (m.type === "remove") return room.dispatch({ type: "remove", playerId: m.playerId });
    const priorPoints = m.action === "start" ? await this.priorPoints(room) : undefined;
    room.dispatch({ type: "host", action: m.action, priorPoints });
  }

  private async hello(conn: Conn, m: Extract<ClientMessage, { type: "hello" }>) {
    const room = await this.room(m.room);
    if (!room) {
      send(conn, JSON.stringify(errorMessage(ERROR_CODES.roomNotFound, "No open room has that code. Check the code on the class screen.")));
      return conn.ws.close(CLOSE_CODES.roomGone, "no such room");
    }
    const now = Date.now();
    if (m.role === "host") {
      if (!hostKeyMatches(this.secret, room.id, m.hostKey)) {
        send(conn, JSON.stringify(errorMessage(ERROR_CODES.unauthorised, "That stage key is not valid for this room.")));
        return conn.ws.close(CLOSE_CODES.unauthorised, "bad host key");
      }
      this.leave(conn);
      conn.room = room;
      conn.role = "host";
      room.stage.add(conn);
      for (const msg of snapshot(room.state, { role: "host" }, now)) send(conn, JSON.stringify(msg));
      return;
    }
    const seated = m.seat ? playerBySeat(room.state, m.seat) : undefined;
    if (m.seat && !seated) {
      send(conn, JSON.stringify(errorMessage(ERROR_CODES.unknownPlayer, "That seat is no longer in this room. Join again.")));
    }
    this.leave(conn);
    conn.room = room;
    conn.role = "player";
    if (seated) return this.takeSeat(conn, room, seated.id);
    for (const msg of snapshot(room.state, { role: "player", playerId: null }, now)) send(conn, JSON.stringify(msg));
  }

  private takeSeat(conn: Conn, room: LiveRoom, playerId: string) {
    const previous = room.pads.get(playerId);
    if (previous && previous !== conn) {
      previous.playerId = null;
      previous.ws.close(CLOSE_CODES.replaced, "seat taken by another connection");
    }
    conn.playerId = playerId;
    room.pads.set(playerId, conn);
    room.dispatch({ type: "online", playerId });
  }

  private async join(conn: Conn, code: string, typed: string) {
    const room = conn.room?.code === code ? conn.room : await this.room(code);
    if (!room) return send(conn, JSON.stringify(errorMessage(ERROR_CODES.roomNotFound, "No open room has that code. Check the code on the class screen.")));
    if (conn.playerId && room.pads.get(conn.playerId) === conn) {
      return send(conn, JSON.stringify(errorMessage(ERROR_CODES.badMessage, "This phone has already joined the room.")));
    }
    // A signed-in student plays under their own name, linked to their account.
    const account = conn.userId ? await this.studentName(conn.userId) : undefined;
    this.leave(conn);
    const playerId = nanoid(12);
    conn.room = room;
    conn.role = "player";
    conn.playerId = playerId;
    room.pads.set(playerId, conn);
    room.dispatch({ type: "join", playerId, seat: nanoid(32), nickname: account ?? typed }, { userId: account ? conn.userId : null });
    // A refused join leaves no seat behind.
    if (!room.state.players.some((p) => p.id === playerId)) {
      void room.settled().then(() => {
        if (room.pads.get(playerId) === conn) room.pads.delete(playerId);
        conn.playerId = null;
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
    if (conn.role === "host") room.stage.delete(conn);
    if (conn.playerId && room.pads.get(conn.playerId) === conn) {
      room.pads.delete(conn.playerId);
      if (room.state.players.some((p) => p.id === conn.playerId && !p.removed)) room.dispatch({ type: "offline", playerId: conn.playerId });
    }
    conn.room = null;
    conn.role = null;
    conn.playerId = null;
  }

  /** The live room for a code: from memory, or rebuilt from SQLite (then told the server restarted). */
  private room(code: string): Promise<LiveRoom | undefined> {
    let found = this.live.get(code);
    if (!found) {
      found = this.loadRoom(code);
      this.live.set(code, found);
      void found.then((r) => {
        if (!r) this.live.delete(code);
      });
    }
    return found;
  }

  private async loadRoom(code: string) {
    const row = await openRoomByCode(this.db, code);
    if (!row) return undefined;
    const loaded = await loadRoomState(this.db, row.id);
    const state = loaded?.state ?? initialState(row.config as RoomConfig);
    const room = new LiveRoom(this, row.id, row.code, state, loaded?.seq ?? 0);
    if ((loaded?.seq ?? 0) > 0) room.dispatch({ type: "restart" });
    return room;
  }

  forget(room: LiveRoom) {
    room.stop();
    this.live.delete(room.code);
  }

  /** Stops timers and waits until every accepted event is in the database. */
  async close() {
    this.closing = true;
    for (const r of this.live.values()) (await r)?.stop();
    await Promise.all([...this.live.values()].map(async (r) => (await r)?.settled()));
    await this.writer.drain();
  }
}
