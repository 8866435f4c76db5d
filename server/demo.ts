// `npm run demo`: the production build with the invented demo school and mail captured locally.
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { networkInterfaces } from "node:os";
import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { loadEnv } from "~/env.server";
import { joinAddress, joinAddressNote } from "~/lib/joinAddress";
import { startServer } from "./index";
import { demoSignIns, ensureDemo } from "./seed";

// A secret kept beside the demo database, so demo sign-ins survive a restart.
const secretFile = "data/demo-session-secret";
mkdirSync("data", { recursive: true });
if (!existsSync(secretFile)) writeFileSync(secretFile, randomBytes(32).toString("hex"), { mode: 0o600 });

const overrides = {
  NODE_ENV: "production",
  MAIL_CAPTURE: "1",
  SESSION_SECRET: process.env.SESSION_SECRET ?? readFileSync(secretFile, "utf8").trim(),
};
const env = loadEnv({ ...process.env, ...overrides });
const db = await openDb(env.DATABASE_URL, env.DATABASE_AUTH_TOKEN);
await migrateDb(db);
// `npm run seed` puts a fresh copy back.
const kept = await ensureDemo(db);
await closeDb(db);

const running = await startServer(overrides);
console.log(`\nFretcall demo: ${DEMO_SCHOOL.name}${kept ? " (as the last run left it; npm run seed starts it afresh)" : ""}\nOpen ${running.url}\n\nSign in with (password for all: ${DEMO_PASSWORD}):`);
for (const [role, email] of demoSignIns()) console.log(`  ${role.padEnd(8)} ${email}`);
// What a stage opened at that address will project for the phones.
const join = joinAddress({ publicUrl: env.publicUrlSet ? env.PUBLIC_URL : undefined, requestUrl: running.url, interfaces: networkInterfaces() });
console.log(`\nPhones join at ${join.origin}/join. ${joinAddressNote(join)}`);
console.log(`\nE-mail is captured, not sent: the admin's Outbox page shows it. Stop with Ctrl+C.`);
for (const signal of ["SIGTERM", "SIGINT"] as const) {
  process.once(signal, () => running.close().then(() => process.exit(0)));
}
