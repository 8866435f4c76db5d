import { createClient, type Client, type InArgs, type InStatement, type ResultSet, type Transaction, type TransactionMode } from "@libsql/client";
import { drizzle, type LibSQLDatabase } from "drizzle-orm/libsql";
import { migrate } from "drizzle-orm/libsql/migrator";
import type { BaseSQLiteDatabase } from "drizzle-orm/sqlite-core";
import { mkdirSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { fillAnswerVerdicts } from "~/rooms/verdicts.server";
import * as schema from "./schema";

export type Db = LibSQLDatabase<typeof schema> & { $client: Client };
/** The database or an open transaction on it, for helpers a transaction also calls. */
export type Writer = BaseSQLiteDatabase<"async", unknown, typeof schema>;

// The server always runs from the project root (npm scripts), in development and from the build.
export const MIGRATIONS_FOLDER = resolve("drizzle");

const BUSY_TIMEOUT_MS = 5000;

/**
 * Opens a database client: the server's one, and the live hub's writer thread's own. An embedded
 * file gets WAL (readers never block the writer during a round) and foreign keys; a remote libSQL
 * URL is used as it is.
 */
export async function openDb(url: string, authToken?: string): Promise<Db> {
  if (url.startsWith("file:")) {
    const path = url.slice("file:".length);
    if (path !== ":memory:") mkdirSync(dirname(resolve(path)), { recursive: true });
  }
  // Every connection waits for locks, not only the first: the client opens more connections for
  // transactions and concurrent calls, and the hub's threads open the same file at the same time
  // (switching a new file to WAL needs it to themselves for a moment). Remote clients ignore it.
  const client = createClient({ url, authToken, timeout: BUSY_TIMEOUT_MS });
  if (url.startsWith("file:")) takeTurnsToWrite(client, resolve(url.slice("file:".length)));
  if (url.startsWith("file:")) {
    await client.execute("PRAGMA journal_mode = WAL");
    // Every commit reaches the disk before it returns: an acknowledged answer survives a power cut too.
    await client.execute("PRAGMA synchronous = FULL");
    // Deleted rows are overwritten, not just unlinked: a deleted student's name leaves the file.
    await client.execute("PRAGMA secure_delete = ON");
  }
  await client.execute("PRAGMA foreign_keys = ON");
  return drizzle(client, { schema }) as Db;
}

/** The tail of each database file's queue of this thread's writers. */
const writeQueues = new Map<string, Promise<unknown>>();

/**
 * A transaction keeps the file's write lock across awaits. Another connection of this same thread
 * that then waited for the lock would wait synchronously, stalling the event loop the transaction
 * needs to finish, and fail after the timeout. So this thread's writers queue here (asynchronously)
 * and the busy timeout serves other threads and processes. Reads never wait (WAL).
 */
function takeTurnsToWrite(client: Client, file: string) {
  const inTurn = <T>(work: () => Promise<T>): Promise<T> => {
    const run = (writeQueues.get(file) ?? Promise.resolve()).then(work, work);
    writeQueues.set(file, run.catch(() => undefined));
    return run;
  };
  const isRead = (stmt: InStatement) => /^\s*(select|explain)\b/i.test(typeof stmt === "string" ? stmt : stmt.sql);
  const { batch, migrate, executeMultiple } = client;
  const transaction = client.transaction.bind(client) as (mode?: TransactionMode) => Promise<Transaction>;
  const execute = client.execute.bind(client) as (stmt: InStatement) => Promise<ResultSet>;
  // Drizzle always passes one statement object; the (sql, args) form is folded into one.
  client.execute = ((stmt: InStatement, args?: InArgs) => {
    const one: InStatement = typeof stmt === "string" && args ? { sql: stmt, args } : stmt;
    return isRead(one) ? execute(one) : inTurn(() => execute(one));
  }) as Client["execute"];
  client.batch = (stmts, mode) => inTurn(() => batch.call(client, stmts, mode));
  client.migrate = (stmts) => inTurn(() => migrate.call(client, stmts));
  client.executeMultiple = (sql) => inTurn(() => executeMultiple.call(client, sql));
  // A write transaction holds its turn until it commits, rolls back or is closed.
  client.transaction = ((mode?: TransactionMode) => {
    if (mode === "read") return transaction(mode);
    return new Promise<Transaction>((opened, failed) => {
      void inTurn(
        () =>
          new Promise<void>((done) => {
            transaction(mode).then(
              (tx) => opened(endingTurn(tx, done)),
              (error: unknown) => {
                done();
                failed(error);
              },
            );
          }),
      );
    });
  }) as Client["transaction"];
}

function endingTurn(tx: Transaction, done: () => void): Transaction {
  const { commit, rollback, close } = tx;
  tx.commit = () => commit.call(tx).finally(done);
  tx.rollback = () => rollback.call(tx).finally(done);
  tx.close = () => {
    try {
      close.call(tx);
    } finally {
      done();
    }
  };
  return tx;
}

/** The SQL migrations, then the data steps that need the app's own code (each idempotent). */
export async function migrateDb(db: Db, migrationsFolder = MIGRATIONS_FOLDER) {
  await migrate(db, { migrationsFolder });
  await fillAnswerVerdicts(db);
}

/**
 * Writes the WAL back into the main file so a stopped server leaves one self-contained file. Other
 * nodes sharing the file may still be reading or writing: then it does what it can without waiting
 * for them (the last node to stop leaves the file whole).
 */
export async function closeDb(db: Db) {
  try {
    // One call, so both run on the same connection of the client's pool.
    await db.$client.executeMultiple("PRAGMA busy_timeout = 0; PRAGMA wal_checkpoint(TRUNCATE);");
  } catch {
    // Remote databases have no WAL to checkpoint.
  }
  db.$client.close();
}
