import { createClient, type Client } from "@libsql/client";
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
  const client = createClient({ url, authToken });
  if (url.startsWith("file:")) {
    // Waiting for a lock comes first: the hub's threads open the same file at the same time, and
    // switching a new file to WAL needs it to themselves for a moment.
    await client.execute("PRAGMA busy_timeout = 5000");
    await client.execute("PRAGMA journal_mode = WAL");
    // Every commit reaches the disk before it returns: an acknowledged answer survives a power cut too.
    await client.execute("PRAGMA synchronous = FULL");
    // Deleted rows are overwritten, not just unlinked: a deleted student's name leaves the file.
    await client.execute("PRAGMA secure_delete = ON");
  }
  await client.execute("PRAGMA foreign_keys = ON");
  return drizzle(client, { schema }) as Db;
}

/** The SQL migrations, then the data steps that need the app's own code (each idempotent). */
export async function migrateDb(db: Db, migrationsFolder = MIGRATIONS_FOLDER) {
  await migrate(db, { migrationsFolder });
  await fillAnswerVerdicts(db);
}

/** Writes the WAL back into the main file so a stopped server leaves one self-contained file. */
export async function closeDb(db: Db) {
  try {
    await db.$client.execute("PRAGMA wal_checkpoint(TRUNCATE)");
  } catch {
    // Remote databases have no WAL to checkpoint.
  }
  db.$client.close();
}
