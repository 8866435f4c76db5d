import { sql } from "drizzle-orm";
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { closeDb, migrateDb, openDb } from "./client.server";
import { organisations, users } from "./schema";

const freshUrl = () => `file:${join(mkdtempSync(join(tmpdir(), "fretcall-db-")), "empty.db")}`;

describe("database", () => {
  it("migrates an empty database to every table, and migrating again changes nothing", async () => {
    const db = await openDb(freshUrl());
    await migrateDb(db);
    await migrateDb(db);
    const tables = await db.all<{ name: string }>(sql`SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name`);
    expect(tables.map((t) => t.name)).toEqual(
      expect.arrayContaining(["organisations", "users", "classes", "memberships", "password_resets"]),
    );
    await closeDb(db);
  });

  it("uses WAL and enforces foreign keys, also after a transaction", async () => {
    const db = await openDb(freshUrl());
    await migrateDb(db);
    expect((await db.$client.execute("PRAGMA journal_mode")).rows[0]![0]).toBe("wal");
    await db.transaction(async (tx) => {
      await tx.insert(organisations).values({ id: "o1", name: "Studio" });
    });
    await expect(
      db.insert(users).values({ id: "u1", orgId: "no-such-org", role: "student", displayName: "Kit" }),
    ).rejects.toMatchObject({ cause: { message: expect.stringMatching(/FOREIGN KEY/) } });
    await closeDb(db);
  });

  it("makes every connection wait for locks: parallel writers from several clients never see SQLITE_BUSY", async () => {
    const url = freshUrl();
    const first = await openDb(url);
    await migrateDb(first);
    const clients = [first, await openDb(url), await openDb(url)];
    // Transactions take their own pooled connections (not the first one), so each must wait too.
    const work = clients.flatMap((db, c) =>
      Array.from({ length: 12 }, (_, i) =>
        i % 2
          ? db.transaction(async (tx) => {
              await tx.insert(organisations).values({ id: `t${c}-${i}`, name: "Studio" });
              await new Promise((done) => setTimeout(done, 5)); // hold the write lock across a turn of the loop
              await tx.insert(users).values({ id: `u${c}-${i}`, orgId: `t${c}-${i}`, role: "student", displayName: "Kit" });
            })
          : db.insert(organisations).values({ id: `p${c}-${i}`, name: "Studio" }),
      ),
    );
    const results = await Promise.allSettled(work);
    expect(results.filter((r) => r.status === "rejected")).toEqual([]);
    expect((await first.select().from(organisations)).length).toBe(36);
    for (const db of clients) await closeDb(db);
  });
});
