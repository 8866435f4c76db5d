import { copyFileSync } from "node:fs";
import { randomBytes } from "node:crypto";

// A private, already-migrated database for every test file, so files can run in parallel.
const file = `tests/.tmp/db-${process.env.VITEST_POOL_ID ?? "0"}-${randomBytes(4).toString("hex")}.db`;
copyFileSync("tests/.tmp/template.db", file);
process.env.DATABASE_URL = `file:${file}`;
