import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { loadEnv } from "~/env.server";

const env = loadEnv();
const db = await openDb(env.DATABASE_URL, env.DATABASE_AUTH_TOKEN);
await migrateDb(db);
await closeDb(db);
console.log(`Migrated ${env.DATABASE_URL}`);
