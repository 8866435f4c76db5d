import { eq } from "drizzle-orm";
import { migrate } from "drizzle-orm/libsql/migrator";
import { cpSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { QUICK_DEFAULTS } from "~/rooms/setup";
import { seedDemo } from "../../server/seed";
import { closeDb, migrateDb, MIGRATIONS_FOLDER, openDb, type Db } from "./client.server";
import { answers, roomEvents, roomPlayers, rooms } from "./schema";

const freshUrl = (name: string) => `file:${join(mkdtempSync(join(tmpdir(), "fretcall-mig-")), name)}`;

/** The migrations folder as it was before `tag` (that migration and later ones left out). */
function migrationsBefore(tag: string) {
  const dir = mkdtempSync(join(tmpdir(), "fretcall-drizzle-"));
  cpSync(MIGRATIONS_FOLDER, dir, { recursive: true });
  const journalPath = join(dir, "meta", "_journal.json");
  const journal = JSON.parse(readFileSync(journalPath, "utf8")) as { entries: { tag: string }[] };
  const at = journal.entries.findIndex((e) => e.tag === tag);
  expect(at).toBeGreaterThan(0);
  writeFileSync(journalPath, JSON.stringify({ ...journal, entries: journal.entries.slice(0, at) }));
  return dir;
}

/** Copies one demo round into a database of the older shape, raw, as the server of then stored it. */
async function copyOldRound(from: Db, to: Db, roomId: string, kept: object) {
  const [room] = await from.select().from(rooms).where(eq(rooms.id, roomId));
  const exec = (sql: string, args: (string | number | null)[]) => to.$client.execute({ sql, args });
  for (const table of ["organisations", "users", "classes"]) {
    // Columns added after the older shape (organisations.note_naming) are left out: they did not exist then.
    const then = new Set((await to.$client.execute(`PRAGMA table_info(${table})`)).rows.map((c) => String(c.name)));
    for (const row of (await from.$client.execute(`SELECT * FROM ${table}`)).rows) {
      const cols = Object.keys(row).filter((c) => c !== "length" && then.has(c));
      await exec(`INSERT INTO ${table} (${cols.join(", ")}) VALUES (${cols.map(() => "?").join(", ")})`, cols.map((c) => row[c] as string | number | null));
    }
  }
  await exec("INSERT INTO rooms (id, code, org_id, host_user_id, class_id, title, mode, position, config, ended_at, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)", [
    room!.id, room!.code, room!.orgId, room!.hostUserId, room!.classId, room!.title, room!.mode, room!.position, JSON.stringify({ ...room!.config, ...kept }), room!.endedAt?.getTime() ?? null, room!.createdAt.getTime(),
  ]);
  for (const e of await from.select().from(roomEvents).where(eq(roomEvents.roomId, roomId))) await exec("INSERT INTO room_events VALUES (?, ?, ?, ?)", [e.roomId, e.seq, e.at, JSON.stringify(e.event)]);
  for (const p of await from.select().from(roomPlayers).where(eq(roomPlayers.roomId, roomId))) await exec("INSERT INTO room_players (id, room_id, user_id, nickname) VALUES (?, ?, ?, ?)", [p.id, p.roomId, p.userId, p.nickname]);
  const rows = await from.select().from(answers).where(eq(answers.roomId, roomId));
  for (const a of rows) {
    await exec("INSERT INTO answers (room_id, player_id, prompt_index, written, written_midi, string, fret, kind, pitch_right, points, reaction_ms, streak, at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)", [
      a.roomId, a.playerId, a.promptIndex, a.written, a.writtenMidi, a.string, a.fret, a.kind, a.pitchRight ? 1 : 0, a.points, a.reactionMs, a.streak, a.at,
    ]);
  }
  return rows;
}

describe("migrating rounds stored before verdicts and the setup column", () => {
  it("moves the kept setup out of config, keeps every row of the round, and fills the verdicts from its log", async () => {
    const demo = await openDb(freshUrl("demo.db"));
    await migrateDb(demo);
    await seedDemo(demo);
    const [round] = await demo.select({ id: rooms.id }).from(rooms).where(eq(rooms.mode, "sprint")).limit(1);

    const old = await openDb(freshUrl("old.db"));
    // SQL only: the start-up data steps are written for today's tables.
    await migrate(old, { migrationsFolder: migrationsBefore("0004_stored_verdicts_and_setup") });
    const setup = { ...QUICK_DEFAULTS, classId: undefined };
    const before = await copyOldRound(demo, old, round!.id, { setup, sourceName: "Week 2" });
    await migrateDb(old);

    const [room] = await old.select().from(rooms).where(eq(rooms.id, round!.id));
    expect(room!.setup).toEqual(JSON.parse(JSON.stringify(setup)));
    expect(room!.sourceName).toBe("Week 2");
    expect(room!.config).not.toHaveProperty("setup");
    expect(room!.config).not.toHaveProperty("sourceName");
    expect(room!.config.prompts.length).toBeGreaterThan(0);
    // Rebuilding the rooms table must not cascade into the rows that refer to it.
    expect(await old.$count(roomEvents, eq(roomEvents.roomId, round!.id))).toBeGreaterThan(0);
    expect(await old.$count(roomPlayers, eq(roomPlayers.roomId, round!.id))).toBeGreaterThan(0);
    const after = await old.select().from(answers).where(eq(answers.roomId, round!.id));
    const key = (a: { playerId: string; promptIndex: number; string: number; fret: number }) => `${a.playerId}/${a.promptIndex}/${a.string}/${a.fret}`;
    const sorted = <T extends Parameters<typeof key>[0]>(list: T[]) => [...list].sort((a, b) => key(a).localeCompare(key(b)));
    expect(sorted(after)).toEqual(sorted(before));
    await Promise.all([closeDb(demo), closeDb(old)]);
  });
});
