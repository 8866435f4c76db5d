/**
 * Everything a live room keeps in SQLite, in one place: which rows a reducer step writes (from its
 * "store-…" effects, app/game/room.ts), the SQL for them, group commit, and the reads the hub needs
 * (a room to rebuild, a student's name, the class's earlier points). The live hub and the demo
 * history both write through here, so both store the same rows.
 */
import type { InStatement, InValue } from "@libsql/client";
import { and, eq, getTableColumns, getTableName, inArray, sql, type InferInsertModel, type Table } from "drizzle-orm";
import { memoryRoundNews, type RoundNews } from "~/cluster/shared.server";
import type { Db } from "~/db/client.server";
import { answers, roomEvents, roomFenceChecks, roomLeases, roomPlayers, rooms, users } from "~/db/schema";
import { initialState, type Effect, type RoomState } from "~/game/room";
import type { RoomConfig } from "~/game/roomConfig";
import { loadRoomState } from "./log.server";
import { openRoomByCode } from "./rooms.server";

/** What one reducer step adds to SQLite: its numbered record, and the rows beside the log. */
export interface StepWrites {
  roomId: string;
  events: (typeof roomEvents.$inferInsert)[];
  players: (typeof roomPlayers.$inferInsert)[];
  answers: (typeof answers.$inferInsert)[];
  endedAt: Date | null;
}

/** One room's log: numbers its records and turns each step's store effects into rows. */
export class RoomLog {
  /** A write failed: later steps were decided on what was lost, so none of them is written. */
  broken = false;

  constructor(
    readonly roomId: string,
    /** The last sequence number used. */
    private seq = 0,
    /** Cluster mode: the fence this node took the room with; every write checks it is still the room's. */
    readonly fence: number | null = null,
  ) {}

  /** `userId` links the seats this step created to the signed-in student who joined. Null when the step writes nothing. */
  rows(effects: readonly Effect[], userId: string | null): StepWrites | null {
    const roomId = this.roomId;
    const w: StepWrites = { roomId, events: [], players: [], answers: [], endedAt: null };
    for (const e of effects) {
      if (e.kind === "store-event") w.events.push({ roomId, seq: ++this.seq, at: e.record.env.now, event: e.record });
      else if (e.kind === "store-seat") w.players.push({ id: e.playerId, roomId, nickname: e.nickname, userId });
      else if (e.kind === "store-end") w.endedAt = new Date(e.at);
      else if (e.kind === "store-answer") {
        const { answer: a, note } = e;
        w.answers.push({
          roomId,
          playerId: a.playerId,
          promptIndex: a.index,
          written: note.written,
          writtenMidi: note.writtenMidi,
          string: a.spot.string,
          fret: a.spot.fret,
          kind: a.diagnosis.kind,
          pitchRight: a.diagnosis.pitchRight,
          verdict: a.verdict,
          points: a.points,
          reactionMs: Math.round(a.reactionMs),
          streak: a.streak,
          at: a.at,
        });
      }
    }
    return w.events.length > 0 ? w : null;
  }
}

/** Rows per multi-row INSERT: well under SQLite's 32 766 bound parameters for the widest table (14 columns). */
const ROWS_PER_INSERT = 500;

function chunks<T>(list: readonly T[], size: number): T[][] {
  return Array.from({ length: Math.ceil(list.length / size) }, (_, i) => list.slice(i * size, (i + 1) * size));
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

/** The statements for the writes of any number of steps and rooms: one INSERT per table (and chunk), seats before answers. */
export function writeStatements(db: Db, writes: readonly StepWrites[]): InStatement[] {
  const insert = <T extends Table>(table: T, rows: InferInsertModel<T>[]) => chunks(rows, ROWS_PER_INSERT).map((part) => insertRows(table, part));
  // An answer's row refers to its seat's.
  return [
    ...insert(roomEvents, writes.flatMap((w) => w.events)),
    ...insert(roomPlayers, writes.flatMap((w) => w.players)),
    ...insert(answers, writes.flatMap((w) => w.answers)),
    ...writes.flatMap((w) => {
      if (!w.endedAt) return [];
      const q = db.update(rooms).set({ endedAt: w.endedAt }).where(eq(rooms.id, w.roomId)).toSQL();
      return [{ sql: q.sql, args: q.params as InValue[] }];
    }),
  ];
}

/**
 * The guard of a batch in cluster mode, run first in its transaction: fails the whole batch
 * (nothing of it kept) with a "fenced" error unless every fenced room's fence is still its log's.
 */
function fenceChecks(logs: readonly RoomLog[]): InStatement[] {
  const rows = [...new Set(logs)].flatMap((log) => (log.fence === null ? [] : [{ roomId: log.roomId, fence: log.fence }]));
  return rows.length > 0 ? [insertRows(roomFenceChecks, rows)] : [];
}

/** A write refused because another node has taken the room since this node's copy was loaded. */
export const isFenced = (error: unknown) => error instanceof Error && /\bfenced:/.test(error.message);

/** Runs one batch of statements as one transaction (server/sql-writer.ts, on a thread of its own). */
export interface SqlRunner {
  run(statements: InStatement[]): Promise<void>;
  /** The same, resolving with the last statement's rows. */
  query(statements: InStatement[]): Promise<unknown[][]>;
}

/** A room rebuilt from SQLite for the hub; `lastAt` is the server time of its last record (null if none). */
export interface StoredRoom {
  id: string;
  code: string;
  state: RoomState;
  log: RoomLog;
  lastAt: number | null;
}

export class RoomStore {
  private pending: { writes: StepWrites; log: RoomLog; done: (error: unknown) => void }[] = [];
  /** A flush is scheduled or running; what arrives now goes in the next one. */
  private busy = false;
  private idle: (() => void)[] = [];

  constructor(
    readonly db: Db,
    private readonly sql: SqlRunner,
    /** Told after each commit which rounds got answers or ended, for live class reviews on any node. */
    private readonly news: RoundNews = memoryRoundNews(),
  ) {}

  /**
   * The open room with this code, rebuilt from its log; undefined if no open room has it. In
   * cluster mode `claim` takes the room for this node first (it rejects if another node has it) and
   * gives the fence, so the log read is everything any earlier owner could still write.
   */
  async open(code: string, claim?: (roomId: string) => Promise<number>): Promise<StoredRoom | undefined> {
    const row = await openRoomByCode(this.db, code);
    if (!row) return undefined;
    const fence = claim ? await claim(row.id) : null;
    const loaded = await loadRoomState(this.db, row.id);
    const state = loaded?.state ?? initialState(row.config as RoomConfig);
    return { id: row.id, code: row.code, state, log: new RoomLog(row.id, loaded?.seq ?? 0, fence), lastAt: loaded?.lastAt ?? null };
  }

  /** Cluster mode: the room's fence now (0 if no node has taken it yet). */
  async fenceOf(roomId: string): Promise<number> {
    const [row] = await this.db.select({ fence: roomLeases.fence }).from(roomLeases).where(eq(roomLeases.roomId, roomId));
    return row?.fence ?? 0;
  }

  /**
   * Cluster mode: raises the room's fence from `seen` to the next number for `nodeId`, on the writer
   * thread (it waits for the file's write lock); false if the fence is no longer `seen`.
   */
  async advanceFence(roomId: string, seen: number, nodeId: string): Promise<boolean> {
    const rows = await this.sql.query([
      {
        sql: `INSERT INTO room_leases (room_id, fence, node_id, taken_at) VALUES (?, ?, ?, ?)
              ON CONFLICT (room_id) DO UPDATE SET fence = excluded.fence, node_id = excluded.node_id, taken_at = excluded.taken_at
              WHERE room_leases.fence = ? RETURNING fence`,
        args: [roomId, seen + 1, nodeId, Date.now(), seen],
      },
    ]);
    return rows.length === 1;
  }

  /** Of these logs, the ones whose room another node has taken since (its fence moved on). */
  private async fencedOf(logs: readonly RoomLog[]): Promise<Set<RoomLog>> {
    const fenced = logs.filter((l) => l.fence !== null);
    const ids = [...new Set(fenced.map((l) => l.roomId))];
    const rows = ids.length > 0 ? await this.db.select().from(roomLeases).where(inArray(roomLeases.roomId, ids)) : [];
    const now = new Map(rows.map((r) => [r.roomId, r.fence]));
    return new Set(fenced.filter((l) => now.get(l.roomId) !== l.fence));
  }

  /**
   * Group commit: the writes of every room go to the writer thread as one transaction of a few
   * multi-row INSERTs. While a transaction is on its way to the disk, what arrives meanwhile waits
   * and goes next as one, so the busier the school, the more answers share each commit — and the
   * event loop never waits for the disk. Resolves with null once committed (at once when the step
   * writes nothing), or with the error; never rejects, so the room handles it in order.
   */
  write(log: RoomLog, effects: readonly Effect[], userId: string | null): Promise<unknown> {
    const writes = log.rows(effects, userId);
    if (!writes) return Promise.resolve(null);
    return new Promise((resolve) => {
      this.pending.push({ writes, log, done: resolve });
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
      const ok = jobs.filter((j) => !j.log.broken);
      for (const j of jobs) if (j.log.broken) j.done(new Error("an earlier write of this room failed"));
      if (ok.length === 0) continue;
      try {
        await this.sql.run([...fenceChecks(ok.map((j) => j.log)), ...writeStatements(this.db, ok.map((j) => j.writes))]);
        for (const j of ok) j.done(null);
        const changed = new Set(ok.filter((j) => j.writes.answers.length > 0 || j.writes.endedAt).map((j) => j.writes.roomId));
        for (const roomId of changed) this.news.changed(roomId);
      } catch (error) {
        // A fenced room fails the whole batch: the other rooms' writes go again, without it.
        const fenced = isFenced(error) ? await this.fencedOf(ok.map((j) => j.log)) : undefined;
        const again: typeof ok = [];
        for (const j of ok) {
          if (fenced && fenced.size > 0 && !fenced.has(j.log)) again.push(j);
          else {
            j.log.broken = true;
            j.done(error);
          }
        }
        this.pending.unshift(...again);
      }
    }
    this.busy = false;
    for (const resolve of this.idle.splice(0)) resolve();
  }

  /** Resolves when everything handed over so far is written. */
  drain(): Promise<void> {
    return this.busy ? new Promise((resolve) => this.idle.push(resolve)) : Promise.resolve();
  }

  /** A signed-in student's display name; undefined for staff or an unknown account. */
  /** The account name of a student of the room's own school; in another school's room they are a guest. */
  async studentName(userId: string, roomId: string) {
    const [row] = await this.db
      .select({ name: users.displayName })
      .from(users)
      .innerJoin(rooms, eq(rooms.orgId, users.orgId))
      .where(and(eq(users.id, userId), eq(users.role, "student"), eq(rooms.id, roomId)));
    return row?.name;
  }

  /** Points from the class's earlier rounds, by player of this room, to balance Teams. */
  async priorPoints(roomId: string): Promise<Record<string, number>> {
    const rows = await this.db
      .select({ playerId: roomPlayers.id, points: sql<number>`coalesce((SELECT sum(a.points) FROM answers a JOIN room_players p ON p.id = a.player_id WHERE p.user_id = ${roomPlayers.userId} AND a.room_id <> ${roomId}), 0)` })
      .from(roomPlayers)
      .where(eq(roomPlayers.roomId, roomId));
    return Object.fromEntries(rows.map((r) => [r.playerId, Number(r.points)]));
  }
}
