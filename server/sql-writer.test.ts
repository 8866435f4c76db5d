import { createClient } from "@libsql/client";
import { mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Worker } from "node:worker_threads";
import { afterEach, describe, expect, it } from "vitest";
import { SqlWriter } from "./sql-writer";

let dir: string;
let writer: SqlWriter;

async function open() {
  dir = mkdtempSync(join(tmpdir(), "fretcall-writer-"));
  const url = `file:${join(dir, "w.db")}`;
  writer = new SqlWriter({ url });
  await writer.ready;
  await writer.run([{ sql: "CREATE TABLE t (id INTEGER PRIMARY KEY, body TEXT NOT NULL)", args: [] }]);
  return { url, file: join(dir, "w.db"), reader: createClient({ url }) };
}

afterEach(async () => {
  await writer.close();
  rmSync(dir, { recursive: true, force: true });
});

describe("SqlWriter", () => {
  it("commits batches in the order they were handed over, each as one transaction", async () => {
    const { reader } = await open();
    const runs = Array.from({ length: 20 }, (_, i) => writer.run([{ sql: "INSERT INTO t (id, body) VALUES (?, ?)", args: [i, `row ${i}`] }]));
    await Promise.all(runs);
    const rows = await reader.execute("SELECT id FROM t ORDER BY rowid");
    expect(rows.rows.map((r) => r.id)).toEqual(Array.from({ length: 20 }, (_, i) => i));
    reader.close();
  });

  it("a failing batch keeps none of its statements, says why, and the next batch still commits", async () => {
    const { reader } = await open();
    const bad = writer.run([
      { sql: "INSERT INTO t (id, body) VALUES (1, 'kept only with its batch')", args: [] },
      { sql: "INSERT INTO t (id, body) VALUES (2, NULL)", args: [] },
    ]);
    await expect(bad).rejects.toThrow(/NOT NULL/);
    await writer.run([{ sql: "INSERT INTO t (id, body) VALUES (3, 'after')", args: [] }]);
    const rows = await reader.execute("SELECT id FROM t");
    expect(rows.rows.map((r) => r.id)).toEqual([3]);
    reader.close();
  });

  it("starts a new thread for the next batch when its thread has died", async () => {
    const { reader } = await open();
    // Ended while idle: ending a thread inside a database call is not something to do on purpose.
    await (writer as unknown as { worker: Worker }).worker.terminate();
    await writer.run([{ sql: "INSERT INTO t (id, body) VALUES (2, 'y')", args: [] }]);
    const rows = await reader.execute("SELECT id FROM t WHERE id = 2");
    expect(rows.rows).toHaveLength(1);
    reader.close();
  });

  it("copies the WAL back into the database file without being asked", async () => {
    const { file, reader } = await open();
    const before = statSync(file).size;
    const body = "x".repeat(2_000);
    await writer.run(Array.from({ length: 200 }, (_, i) => ({ sql: "INSERT INTO t (id, body) VALUES (?, ?)", args: [i, body] })));
    // The checkpointer runs every second; 200 rows of 2 kB are well over 100 pages.
    await new Promise((r) => setTimeout(r, 2_500));
    expect(statSync(file).size).toBeGreaterThan(before + 100 * 4096);
    reader.close();
  });
});
