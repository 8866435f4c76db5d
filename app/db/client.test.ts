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
});
