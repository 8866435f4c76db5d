// Several nodes on one machine share one SQLite file in WAL mode: each process's writer thread
// waits for the others' commits (busy timeout) and each checkpointer copies the WAL back beside
// them, without one breaking the other (docs/decisions/0009-several-nodes.md).
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import { describe, expect, it } from "vitest";
import { closeDb, openDb } from "~/db/client.server";
import { SqlWriter } from "../../server/sql-writer";
import { startLibsqlStandIn } from "../cluster/libsql-stand-in";

interface Report {
  node: string;
  sent: number;
  acked: number;
  failures: string[];
  /** Slowest wait from handing a batch over to its commit. */
  max: number;
}

/** A child process with its own SqlWriter (tests/cluster/sql-writer-child.ts): ready, then told to go. */
function node(url: string, name: string, forMs: number) {
  const child = spawn(process.execPath, ["--import", "tsx", "tests/cluster/sql-writer-child.ts", url, name, String(forMs), "20"], { stdio: ["pipe", "pipe", "pipe"] });
  let stdout = "";
  let stderr = "";
  child.stderr.on("data", (c: Buffer) => (stderr += c.toString()));
  const ready = new Promise<void>((resolve) =>
    child.stdout.on("data", (c: Buffer) => {
      stdout += c.toString();
      if (stdout.startsWith("ready\n")) resolve();
    }),
  );
  const done = new Promise<{ report: Report; stderr: string; code: number | null }>((resolve) =>
    child.once("exit", (code) => resolve({ report: JSON.parse(stdout.trim().split("\n").pop() || "{}") as Report, stderr, code })),
  );
  return { ready, go: () => child.stdin.end("go\n"), done };
}

describe("one SQLite file, two processes", () => {
  // Starting two processes that load tsx and two threads each takes a while on a busy machine.
  it("keeps every acknowledged batch of both writers, once, while both checkpointers run", { timeout: 120_000 }, async () => {
    const url = `file:tests/.tmp/shared-${randomBytes(4).toString("hex")}.db`;
    const db = await openDb(url);
    await db.$client.execute("CREATE TABLE stress (node TEXT NOT NULL, batch INTEGER NOT NULL, row INTEGER NOT NULL, PRIMARY KEY (node, batch, row))");

    // Both start writing at the same moment and go on past a few checkpoints (one a second each).
    const nodes = [node(url, "a", 3_500), node(url, "b", 3_500)];
    await Promise.all(nodes.map((n) => n.ready));
    for (const n of nodes) n.go();
    const [a, b] = await Promise.all(nodes.map((n) => n.done));

    for (const { report, stderr, code } of [a, b]) {
      expect(code).toBe(0);
      expect(stderr).not.toMatch(/checkpoint|busy|locked/i);
      expect(report.failures).toEqual([]);
      expect(report.acked).toBe(report.sent);
      expect(report.sent).toBeGreaterThan(50);
      // Waiting for the other process's commits is short: nowhere near the 5 s busy timeout.
      expect(report.max).toBeLessThan(2_500);
    }
    const rows = await db.$client.execute("SELECT node, count(*) AS n, count(DISTINCT batch) AS batches FROM stress GROUP BY node ORDER BY node");
    expect(rows.rows.map((r) => [r.node, Number(r.n), Number(r.batches)])).toEqual([
      ["a", a.report.sent * 3, a.report.sent],
      ["b", b.report.sent * 3, b.report.sent],
    ]);
    // The checkpointers kept the WAL short: what is left fits in a checkpoint now.
    const [checkpoint] = (await db.$client.execute("PRAGMA wal_checkpoint(PASSIVE)")).rows;
    expect(Number(checkpoint!.busy)).toBe(0);
    await closeDb(db);
  });
});

describe("a remote database (libSQL server)", () => {
  it("gets the writer's batches as transactions and no checkpoints or file settings", async () => {
    const file = `tests/.tmp/remote-${randomBytes(4).toString("hex")}.db`;
    const local = await openDb(`file:${file}`);
    await local.$client.execute("CREATE TABLE stress (node TEXT NOT NULL, batch INTEGER NOT NULL, row INTEGER NOT NULL, PRIMARY KEY (node, batch, row))");
    const remote = await startLibsqlStandIn(file);
    const writer = new SqlWriter({ url: remote.url, authToken: "test-token" });
    await writer.ready;
    for (let batch = 0; batch < 3; batch++) await writer.run([0, 1].map((row) => ({ sql: "INSERT INTO stress VALUES (?, ?, ?)", args: ["r", batch, row] })));
    // A failing statement rolls its whole batch back.
    await expect(writer.run([{ sql: "INSERT INTO stress VALUES ('r', 9, 0)", args: [] }, { sql: "INSERT INTO stress VALUES ('r', 0, 0)", args: [] }])).rejects.toThrow(/UNIQUE/);
    // Two checkpointer periods pass: a remote database has none to run.
    await new Promise((r) => setTimeout(r, 2_500));
    await writer.close();
    await remote.close();

    expect(Number((await local.$client.execute("SELECT count(*) AS n FROM stress WHERE node = 'r'")).rows[0]!.n)).toBe(6);
    expect(remote.seen.filter((sql) => /^BEGIN IMMEDIATE$/i.test(sql))).toHaveLength(4);
    expect(remote.seen.filter((sql) => /wal_checkpoint|journal_mode|synchronous|wal_autocheckpoint/i.test(sql))).toEqual([]);
    await closeDb(local);
  });
});
