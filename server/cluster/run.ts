/**
 * `npm run cluster`: Fretcall as several nodes on this machine (docs/decisions/0009-cluster-routing.md):
 * redis-server, three nodes sharing one SQLite file (WAL) with the demo school, and nginx in front.
 * Ctrl+C stops everything. The children stay in this process's group, and any exit of this runner
 * kills them, so nothing is left behind.
 *
 *   npm run cluster                # nginx on port 8080 (PORT=…), three nodes (NODES=…)
 */
import { spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { networkInterfaces } from "node:os";
import { resolve } from "node:path";
import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { joinAddress, joinAddressNote } from "~/lib/joinAddress";
import { demoSignIns, ensureDemo } from "../seed";
import { startCluster } from "./local";

const DIR = "data/cluster";
const nodes = Number(process.env.NODES ?? 3);
const port = Number(process.env.PORT ?? 8080);
if (!Number.isInteger(nodes) || nodes < 1 || nodes > 16) throw new Error(`NODES must be 1 to 16, not ${process.env.NODES}`);

if (!existsSync("build/server/index.js")) {
  console.log("No production build yet: building…");
  if (spawnSync("npm", ["run", "build"], { stdio: "inherit" }).status !== 0) process.exit(1);
}

mkdirSync(DIR, { recursive: true });
// Kept beside the database, so sign-ins survive a restart of the cluster.
const secretFile = `${DIR}/session-secret`;
if (!existsSync(secretFile)) writeFileSync(secretFile, randomBytes(32).toString("hex"), { mode: 0o600 });
const secret = process.env.SESSION_SECRET ?? readFileSync(secretFile, "utf8").trim();

// One database for every node, migrated and seeded once before any node opens it.
const databaseUrl = `file:${resolve(DIR, "fretcall.db")}`;
const db = await openDb(databaseUrl);
await migrateDb(db);
const kept = await ensureDemo(db);
await closeDb(db);

const cluster = await startCluster({
  nodes,
  port,
  host: process.env.HOST ?? "0.0.0.0",
  publicUrl: process.env.PUBLIC_URL,
  databaseUrl,
  secret,
  dir: DIR,
  env: {
    MAIL_CAPTURE: "1",
    MAIL_DIR: resolve(DIR, "mail"),
    LOG_LEVEL: process.env.LOG_LEVEL ?? "warn",
  },
});

const url = `http://localhost:${port}`;
console.log(`\nFretcall cluster: ${DEMO_SCHOOL.name}${kept ? ` (as the last run left it; DATABASE_URL=${databaseUrl} npm run seed starts it afresh)` : ""}`);
console.log(`Open ${url}  (nginx → ${cluster.nodes.map((n) => `${n.nodeId} at ${n.address}`).join(", ")}; Redis at ${cluster.redis.url})`);
console.log(`\nSign in with (password for all: ${DEMO_PASSWORD}):`);
for (const [role, email] of demoSignIns()) console.log(`  ${role.padEnd(8)} ${email}`);
const join = joinAddress({
  publicUrl: process.env.PUBLIC_URL,
  requestUrl: url,
  interfaces: networkInterfaces(),
});
console.log(`\nPhones join at ${join.origin}/join. ${joinAddressNote(join)}`);
console.log(`\nTry a fail-over: kill -9 one node's process (pids ${cluster.nodes.map((n) => n.pid).join(", ")}); its rooms move to the others.`);
console.log(`E-mail is captured, not sent: the admin's Outbox page shows it. Stop with Ctrl+C.`);

let stopping = false;
for (const signal of ["SIGINT", "SIGTERM", "SIGHUP"] as const) {
  process.on(signal, () => {
    if (stopping) return;
    stopping = true;
    console.log(`\n${signal}: stopping nginx, the nodes (they flush the database) and Redis…`);
    void cluster.stop().then(() => process.exit(0));
  });
}
