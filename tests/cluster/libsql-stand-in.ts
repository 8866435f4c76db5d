/**
 * A small stand-in for a libSQL server, for tests of the remote-database path without one: the
 * Hrana 2 HTTP pipeline (JSON) that @libsql/client speaks for http:// URLs, executing on a local
 * file, one connection per stream (baton). It answers the requests the client sends for execute,
 * batch and transactions, and keeps every SQL text it was sent, so a test sees what reached it.
 */
import Database from "libsql";
import { randomUUID } from "node:crypto";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";

type Value = { type: "null" } | { type: "integer"; value: string } | { type: "float"; value: number } | { type: "text"; value: string } | { type: "blob"; base64: string };
interface Stmt {
  sql?: string;
  /** A text stored earlier on the stream by store_sql. */
  sql_id?: number;
  args?: Value[];
  named_args?: { name: string; value: Value }[];
}
type Cond = { type: "ok" | "error"; step: number } | { type: "not"; cond: Cond } | { type: "and" | "or"; conds: Cond[] } | { type: "is_autocommit" };
type Request =
  | { type: "execute"; stmt: Stmt }
  | { type: "batch"; batch: { steps: { condition?: Cond; stmt: Stmt }[] } }
  | { type: "store_sql"; sql_id: number; sql: string }
  | { type: "close_sql"; sql_id: number }
  | { type: "close" }
  | { type: "get_autocommit" };

interface Stream {
  db: Database.Database;
  texts: Map<number, string>;
}

const fromValue = (v: Value) =>
  v.type === "null" ? null : v.type === "integer" ? BigInt(v.value) : v.type === "float" ? v.value : v.type === "text" ? v.value : Buffer.from(v.base64, "base64");

function toValue(v: unknown): Value {
  if (v === null || v === undefined) return { type: "null" };
  if (typeof v === "bigint") return { type: "integer", value: String(v) };
  if (typeof v === "number") return Number.isInteger(v) ? { type: "integer", value: String(v) } : { type: "float", value: v };
  if (typeof v === "string") return { type: "text", value: v };
  return { type: "blob", base64: Buffer.from(v as Uint8Array).toString("base64") };
}

export interface LibsqlStandIn {
  url: string;
  /** Every SQL text received, in order. */
  seen: string[];
  close(): Promise<void>;
}

export async function startLibsqlStandIn(file: string): Promise<LibsqlStandIn> {
  const streams = new Map<string, Stream>();
  const seen: string[] = [];

  const run = ({ db, texts }: Stream, stmt: Stmt) => {
    const sql = stmt.sql ?? texts.get(stmt.sql_id!)!;
    seen.push(sql);
    const prepared = db.prepare(sql);
    const args = stmt.named_args?.length ? [Object.fromEntries(stmt.named_args.map((a) => [a.name.replace(/^[:@$]/, ""), fromValue(a.value)]))] : (stmt.args ?? []).map(fromValue);
    if (prepared.reader) {
      prepared.raw(true).safeIntegers(true);
      const rows = prepared.all(...args) as unknown[][];
      const cols = prepared.columns().map((c) => ({ name: c.name, decltype: c.type ?? null }));
      return { cols, rows: rows.map((r) => r.map(toValue)), affected_row_count: 0, last_insert_rowid: null };
    }
    const info = prepared.run(...args);
    return { cols: [], rows: [], affected_row_count: info.changes, last_insert_rowid: String(info.lastInsertRowid) };
  };
  const holds = (cond: Cond | undefined, ok: boolean[], db: Database.Database): boolean => {
    if (!cond) return true;
    if (cond.type === "ok") return ok[cond.step] === true;
    if (cond.type === "error") return ok[cond.step] === false;
    if (cond.type === "not") return !holds(cond.cond, ok, db);
    if (cond.type === "and") return cond.conds.every((c) => holds(c, ok, db));
    if (cond.type === "or") return cond.conds.some((c) => holds(c, ok, db));
    return !db.inTransaction;
  };
  const answer = (stream: Stream, req: Request) => {
    const { db } = stream;
    if (req.type === "close") return { type: "close" };
    if (req.type === "store_sql") {
      stream.texts.set(req.sql_id, req.sql);
      return { type: "store_sql" };
    }
    if (req.type === "close_sql") {
      stream.texts.delete(req.sql_id);
      return { type: "close_sql" };
    }
    if (req.type === "get_autocommit") return { type: "get_autocommit", is_autocommit: !db.inTransaction };
    if (req.type === "execute") return { type: "execute", result: run(stream, req.stmt) };
    const ok: boolean[] = [];
    const step_results: unknown[] = [];
    const step_errors: unknown[] = [];
    for (const step of req.batch.steps) {
      if (!holds(step.condition, ok, db)) {
        ok.push(false);
        step_results.push(null);
        step_errors.push(null);
        continue;
      }
      try {
        step_results.push(run(stream, step.stmt));
        step_errors.push(null);
        ok.push(true);
      } catch (error) {
        step_results.push(null);
        step_errors.push({ message: (error as Error).message, code: "SQLITE_ERROR" });
        ok.push(false);
      }
    }
    return { type: "batch", result: { step_results, step_errors } };
  };

  const server: Server = createServer((req, res) => {
    let body = "";
    req.on("data", (c: Buffer) => (body += c.toString()));
    req.on("end", () => {
      if (req.method !== "POST" || req.url !== "/v2/pipeline") return void res.writeHead(404).end();
      const { baton, requests } = JSON.parse(body) as { baton: string | null; requests: Request[] };
      const id = baton ?? randomUUID();
      let stream = streams.get(id);
      if (!stream) streams.set(id, (stream = { db: new Database(file, { timeout: 5_000 }), texts: new Map() }));
      let open = true;
      const results = requests.map((r) => {
        try {
          const response = answer(stream, r);
          if (r.type === "close") open = false;
          return { type: "ok", response };
        } catch (error) {
          return { type: "error", error: { message: (error as Error).message, code: "SQLITE_ERROR" } };
        }
      });
      if (!open) {
        stream.db.close();
        streams.delete(id);
      }
      res.writeHead(200, { "content-type": "application/json" }).end(JSON.stringify({ baton: open ? id : null, base_url: null, results }));
    });
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  return {
    url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`,
    seen,
    close: () =>
      new Promise((done) => {
        for (const { db } of streams.values()) db.close();
        server.closeAllConnections();
        server.close(() => done());
      }),
  };
}
