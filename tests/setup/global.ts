import { mkdirSync, rmSync } from "node:fs";
import { closeDb, migrateDb, openDb } from "~/db/client.server";

export const TMP = "tests/.tmp";
export const TEMPLATE_DB = `${TMP}/template.db`;

/** Migrates one template database; each test file then works on its own copy (tests/setup/worker.ts). */
export default async function setup() {
  rmSync(TMP, { recursive: true, force: true });
  mkdirSync(TMP, { recursive: true });
  const db = await openDb(`file:${TEMPLATE_DB}`);
  await migrateDb(db);
  await closeDb(db);
}
