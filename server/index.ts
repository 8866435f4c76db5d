import compression from "compression";
import express from "express";
import helmet from "helmet";
import { randomBytes } from "node:crypto";
import { createServer, type IncomingHttpHeaders, type IncomingMessage, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { memoryShared } from "~/cluster/shared.server";
import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { loadEnv, nodeAddressOf, type Env } from "~/env.server";
import { createLogger } from "~/log.server";
import { openRoomByCode } from "~/rooms/rooms.server";
import { createMailer } from "~/mail/mailer.server";
import { SCHEDULE_EVERY_MS, startMailSchedule } from "~/practice/mail.server";
import { createServices, type Services } from "~/services.server";
import type { createAppHandler } from "./app";
import { limitBodies } from "./body-limit";
import { requestLog } from "./request-log";
import { admitSocket, rememberSocket } from "./seat-limits";
import { startMailCatcher } from "./mail-catcher";
import { ScoreReader } from "./score-reader";
import { Hub } from "./hub";
import { attachSockets } from "./sockets";
import { divertToOwner } from "./cluster/forward";
import { closeRedis, connectRedis } from "./cluster/redis";
import { openShared } from "./cluster/shared";

export interface RunningServer {
  url: string;
  port: number;
  services: Services;
  hub: Hub;
  server: Server;
  close(): Promise<void>;
}

/**
 * Same-origin check for state-changing requests and WebSocket upgrades (CSRF and cross-site
 * sockets). Browsers say where a request comes from in Sec-Fetch-Site; older ones only in Origin,
 * which some send as "null" on same-origin posts (e.g. under a no-referrer policy), so Origin is
 * the fallback and "null" is refused only when Sec-Fetch-Site can't vouch for the request.
 */
export function sameOrigin(headers: IncomingHttpHeaders) {
  const site = headers["sec-fetch-site"];
  if (site) return site === "same-origin" || site === "none"; // "none": typed or bookmarked by the user
  const origin = headers.origin;
  if (!origin) return true; // non-browser clients send neither; cookies alone never authorise them cross-site
  try {
    return new URL(origin).host === headers.host;
  } catch {
    return false;
  }
}

/**
 * The client's address: the socket's peer, or, when that is a trusted proxy, the address it
 * names in X-Forwarded-For, walking back through trusted hops (the rule Express applies for
 * `trust proxy`, so HTTP requests and WebSocket upgrades key their limits alike).
 */
export function clientAddressOf(req: IncomingMessage, trust: (address: string, hop: number) => boolean) {
  const forwarded = String(req.headers["x-forwarded-for"] ?? "")
    .split(",")
    .map((a) => a.trim())
    .filter(Boolean)
    .reverse();
  const chain = [req.socket.remoteAddress ?? "unknown", ...forwarded];
  let hop = 0;
  while (hop < chain.length - 1 && trust(chain[hop]!, hop)) hop += 1;
  return chain[hop]!;
}

/** Starts Fretcall: its services, the HTTP app, the WebSocket hub, and a close() that stops them all in order. */
export async function startServer(overrides: Record<string, string | undefined> = {}): Promise<RunningServer> {
  const env: Env = loadEnv({ ...process.env, ...overrides });
  const parts = await openParts(env);
  const app = express();
  const trust = guardRequests(app, env, parts.services);
  const closeVite = await mountApp(app, env, parts.services);
  const server = createServer(app);
  const sockets = openSockets(server, parts, trust);
  await new Promise<void>((done) => server.listen(env.PORT, env.HOST, done));
  const port = (server.address() as AddressInfo).port;
  // Known only now when PORT is 0 (tests); no room is claimed before the first socket.
  if (parts.self) parts.self.address = nodeAddressOf(env, port);

  let closing: Promise<void> | undefined;
  const close = () =>
    (closing ??= (async () => {
      const stopped = new Promise<void>((done) => server.close(() => done()));
      await parts.hub.close();
      await sockets.close();
      server.closeAllConnections();
      await stopped;
      await closeVite();
      await parts.close();
    })());

  return { url: `http://localhost:${port}`, port, services: parts.services, hub: parts.hub, server, close };
}

/** The database, mail, upload reader, services and hub, ready before the first request. */
async function openParts(env: Env) {
  const db = await openDb(env.DATABASE_URL, env.DATABASE_AUTH_TOKEN);
  // Cluster mode: rate limits, round news and locks in Redis (docs/decisions/0009-several-nodes.md).
  const shared = env.REDIS_URL ? await openShared(env.REDIS_URL, createLogger(env.LOG_LEVEL)) : memoryShared();
  // Nodes starting together migrate one at a time; the others then find nothing left to apply.
  await shared.locks.inTurn("migrate", () => migrateDb(db));
  const catcher = env.mailCapture ? await startMailCatcher(env.MAIL_DIR) : undefined;
  const mailer = createMailer(catcher?.url ?? env.SMTP_URL!, env.MAIL_FROM);
  const scores = new ScoreReader();
  const services = createServices(env, db, mailer, scores.read, shared);
  // Assignment notices, reminders and weekly digests (app/practice/mail.server.ts).
  const practiceMail = startMailSchedule(db, mailer, env.PUBLIC_URL, SCHEDULE_EVERY_MS, shared.locks);
  // Cluster mode: rooms are held under Redis leases (server/cluster/leases.ts).
  const self = env.REDIS_URL ? { nodeId: env.NODE_ID, address: env.NODE_ADDRESS ?? "" } : undefined;
  const redis = env.REDIS_URL ? connectRedis(env.REDIS_URL, "leases", services.log) : undefined;
  const cluster = redis && self && { redis, self, log: services.log };
  const hub = new Hub(db, env.SESSION_SECRET, services.sessions, { url: env.DATABASE_URL, authToken: env.DATABASE_AUTH_TOKEN }, cluster, services.rounds);
  await hub.ready();
  hub.startIdleSweep(env.ROOM_IDLE_HOURS * 3_600_000, shared.locks);
  const close = async () => {
    await practiceMail.stop();
    await scores.close();
    if (redis) await closeRedis(redis);
    await shared.close();
    services.mailer.close();
    await catcher?.close();
    await closeDb(db);
  };
  return { db, services, hub, self, close };
}

type Trust = (address: string, hop: number) => boolean;

/** Logging, client address, security headers, compression, the same-origin check and /healthz; returns the proxy trust rule. */
function guardRequests(app: express.Express, env: Env, services: Services): Trust {
  const production = env.NODE_ENV === "production";
  app.disable("x-powered-by");
  app.set("trust proxy", env.trustProxy);
  const trust = app.get("trust proxy fn") as Trust;
  const overHttps = new URL(env.PUBLIC_URL).protocol === "https:";
  app.use(requestLog(services.log));
  app.use((req, res, next) => {
    res.locals.cspNonce = randomBytes(16).toString("base64");
    // Rate limits key on this; a client-sent copy of the header is overwritten.
    req.headers["x-fretcall-client-address"] = clientAddressOf(req, trust);
    // Plain http on a school network must keep working, so HSTS only when served over https.
    if (overHttps || req.secure) res.setHeader("Strict-Transport-Security", "max-age=31536000; includeSubDomains");
    next();
  });
  app.use(
    helmet({
      // Vite's development client injects inline scripts, so the strict policy is for production.
      contentSecurityPolicy: production
        ? {
            directives: {
              defaultSrc: ["'self'"],
              scriptSrc: ["'self'", (_req, res) => `'nonce-${(res as express.Response).locals.cspNonce}'`],
              styleSrc: ["'self'", "'unsafe-inline'"],
              imgSrc: ["'self'", "data:", "blob:"],
              fontSrc: ["'self'", "data:"],
              connectSrc: ["'self'"],
              workerSrc: ["'self'", "blob:"],
              upgradeInsecureRequests: null,
            },
          }
        : false,
      strictTransportSecurity: false,
      // Same-origin requests carry the full referrer and a real Origin; other sites get nothing.
      referrerPolicy: { policy: "same-origin" },
    }),
  );
  app.use(compression());
  app.use((req, res, next) => {
    if (["GET", "HEAD", "OPTIONS"].includes(req.method)) return next();
    if (sameOrigin(req.headers)) {
      // An opaque "null" Origin vouched for by Sec-Fetch-Site says nothing more; React Router's own
      // check would read it as another site.
      if (req.headers.origin === "null") delete req.headers.origin;
      return next();
    }
    const message = "This form was sent from another website, so it was refused. Open Fretcall itself and try again.";
    if (req.accepts(["json", "html"]) === "html" && !req.path.startsWith("/api/")) res.status(403).type("html").send(`<!doctype html><title>Refused · Fretcall</title><p>${message}</p>`);
    else res.status(403).json({ error: message });
  });
  app.get("/healthz", async (_req, res) => {
    try {
      await services.db.$client.execute("SELECT 1");
      res.json({ status: "ok", uptimeSeconds: Math.round(process.uptime()) });
    } catch (error) {
      res.status(503).json({ status: "error", error: String(error) });
    }
  });
  return trust;
}

/** The React Router app behind the body limits: the built one in production, through Vite's middleware in development. */
async function mountApp(app: express.Express, env: Env, services: Services) {
  const production = env.NODE_ENV === "production";
  let closeVite = async () => {};
  if (production) {
    app.use("/assets", express.static("build/client/assets", { immutable: true, maxAge: "1y" }));
    app.use(express.static("build/client", { maxAge: "1h" }));
    const build = (await import(pathToFileURL(resolve("build/server/index.js")).href)) as {
      createAppHandler: typeof createAppHandler;
    };
    app.use(limitBodies(build.createAppHandler(services)));
  } else {
    const vite = await import("vite").then((v) => v.createServer({ server: { middlewareMode: true } }));
    closeVite = () => vite.close();
    app.use(vite.middlewares);
    app.use(async (req, res, next) => {
      try {
        const mod = (await vite.ssrLoadModule("./server/app.ts")) as { createAppHandler: typeof createAppHandler };
        await limitBodies(mod.createAppHandler(services))(req, res, next);
      } catch (error) {
        if (error instanceof Error) vite.ssrFixStacktrace(error);
        next(error);
      }
    });
  }
  return closeVite;
}

/** The WebSocket server on the same port, its upgrades checked for origin and rate, handed to the hub. */
function openSockets(server: Server, { services, hub }: Awaited<ReturnType<typeof openParts>>, trust: Trust) {
  // Frames up to 64 KiB reach the protocol parser, which refuses anything over MAX_MESSAGE_BYTES
  // with its own documented close code; larger frames are cut off by ws itself (1009).
  const sockets = attachSockets(server, {
    allowOrigin: (req) => sameOrigin(req.headers),
    admit: (req) => admitSocket(services.limits, clientAddressOf(req, trust)),
    divert: hub.leases && divertToOwner(hub.leases, async (code) => (await openRoomByCode(services.db, code))?.id),
    maxPayload: 64 * 1024,
  });
  hub.attach(sockets.wss);
  sockets.wss.on("connection", (ws, req) => rememberSocket(ws, services.limits, clientAddressOf(req, trust)));
  return sockets;
}

// Run directly (npm run dev / npm start), not when imported by tests.
if (process.argv[1] && resolve(process.argv[1]) === resolve("server/index.ts")) {
  startServer()
    .then((running) => {
      running.services.log.info(`Fretcall is listening on ${running.url}`);
      for (const signal of ["SIGTERM", "SIGINT"] as const) {
        process.once(signal, () => {
          running.services.log.info(`${signal}: closing connections and flushing the database…`);
          running.close().then(() => process.exit(0));
        });
      }
    })
    .catch((error: unknown) => {
      console.error(error instanceof Error ? error.message : error);
      process.exit(1);
    });
}
