/**
 * A cluster on this machine: redis-server, N Fretcall nodes sharing one SQLite file (WAL), and
 * nginx in front (./nginx.ts), each a child process on a free loopback port. Shared by
 * `npm run cluster` (./run.ts), the cluster tests (tests/cluster) and the cluster benchmark.
 * Every wait is bounded; stop() ends what was started, and a runner that exits early takes its
 * children with it (see killAllNow).
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdirSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { nginxConf } from "./nginx";
import { freePort, startRedisServer, type RedisServer } from "./redis-server";

export { freePort };

export const LOOPBACK = "127.0.0.1";
export const NGINX_BIN = "/usr/sbin/nginx";
// Generous: a node compiles its TypeScript at start, and on a shared two-core machine three at once take a while.
const START_WITHIN_MS = 240_000;
/** A graceful stop flushes the database; one that takes longer than this is killed. */
const STOP_WITHIN_MS = 15_000;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Children of this process, so an early exit of the runner leaves none behind. */
const running = new Set<ChildProcess>();
/** Kills every child at once (for an exit that cannot wait); a graceful stop is Proc.stop. */
export function killAllNow() {
  for (const child of running) child.kill("SIGKILL");
}
process.once("exit", killAllNow);

export class Proc {
  readonly exited: Promise<void>;
  /** The last lines the process wrote, for an error message. */
  tail = "";
  constructor(
    readonly name: string,
    readonly child: ChildProcess,
  ) {
    running.add(child);
    this.exited = new Promise((done) => child.once("exit", () => (running.delete(child), done())));
  }
  get pid() {
    return this.child.pid!;
  }
  get alive() {
    return this.child.exitCode === null && this.child.signalCode === null;
  }
  signal(signal: NodeJS.Signals) {
    if (this.alive) this.child.kill(signal);
  }
  /** SIGTERM (the nodes close their rooms and flush), SIGKILL if that takes too long. */
  async stop(signal: NodeJS.Signals = "SIGTERM") {
    if (!this.alive) return;
    this.child.kill("SIGCONT"); // a paused process cannot act on the signal
    this.child.kill(signal);
    const timer = setTimeout(() => this.child.kill("SIGKILL"), STOP_WITHIN_MS);
    await this.exited;
    clearTimeout(timer);
  }
}

/** Output goes to this process's stderr, prefixed, unless `quiet` (tests keep only the last lines for errors). */
function start(name: string, command: string, args: string[], env: NodeJS.ProcessEnv, quiet: boolean): Proc {
  const child = spawn(command, args, {
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  const proc = new Proc(name, child);
  for (const stream of [child.stdout!, child.stderr!]) {
    stream.setEncoding("utf8");
    stream.on("data", (text: string) => {
      proc.tail = (proc.tail + text).slice(-4_000);
      if (!quiet) for (const line of text.split("\n").filter(Boolean)) process.stderr.write(`[${name}] ${line}\n`);
    });
  }
  return proc;
}

async function until(what: Proc, ready: () => Promise<boolean>) {
  const deadline = Date.now() + START_WITHIN_MS;
  while (Date.now() < deadline) {
    if (!what.alive) throw new Error(`${what.name} exited while starting:\n${what.tail}`);
    if (await ready().catch(() => false)) return;
    await sleep(100);
  }
  what.signal("SIGKILL");
  throw new Error(`${what.name} did not start within ${START_WITHIN_MS / 1000} s:\n${what.tail}`);
}

export async function httpOk(url: string) {
  const res = await fetch(url, { signal: AbortSignal.timeout(2_000) });
  return res.ok;
}

export interface NodeSettings {
  port: number;
  id: string;
  databaseUrl: string;
  /** Unset: a node on its own (no leases), as a single school runs it. */
  redisUrl?: string;
  /** PUBLIC_URL, if set: links in mail and the join address the stage projects (else the stage's own address). */
  publicUrl?: string;
  secret: string;
  /** Extra environment (mail capture, log level…). */
  env?: Record<string, string>;
  quiet?: boolean;
}

/** One Fretcall node: server/index.ts on the production build, reachable by the others at its NODE_ADDRESS. */
export async function startNode(s: NodeSettings) {
  const address = `${LOOPBACK}:${s.port}`;
  const env = {
    ...process.env,
    NODE_ENV: "production",
    HOST: LOOPBACK,
    PORT: String(s.port),
    DATABASE_URL: s.databaseUrl,
    ...(s.redisUrl ? { REDIS_URL: s.redisUrl } : {}),
    NODE_ID: s.id,
    NODE_ADDRESS: address,
    ...(s.publicUrl ? { PUBLIC_URL: s.publicUrl } : {}),
    SESSION_SECRET: s.secret,
    // nginx and the nodes by address, not a hop count: a socket forwarded to its room's owner passes
    // one hop more than one that nginx sent straight there.
    TRUST_PROXY: "loopback",
    ...s.env,
  };
  const proc = start(s.id, process.execPath, ["--import", "tsx", "server/index.ts"], env, s.quiet ?? false);
  await until(proc, () => httpOk(`http://${address}/healthz`));
  return Object.assign(proc, { address, port: s.port, nodeId: s.id });
}
export type NodeProc = Awaited<ReturnType<typeof startNode>>;

/** nginx as a child (not a daemon), its configuration, pid and temporary files under `prefix`. */
export async function startNginx(port: number, nodes: string[], prefix: string, { quiet = false, host = LOOPBACK } = {}) {
  mkdirSync(prefix, { recursive: true });
  const conf = join(prefix, "nginx.conf");
  writeFileSync(conf, nginxConf({ listen: `${host}:${port}`, nodes, prefix: resolve(prefix) }));
  const args = ["-c", resolve(conf), "-p", resolve(prefix), "-e", "stderr", "-g", `daemon off; pid ${resolve(prefix, "nginx.pid")};`];
  const proc = start("nginx", NGINX_BIN, args, process.env, quiet);
  await until(proc, () => httpOk(`http://${host === "0.0.0.0" ? LOOPBACK : host}:${port}/healthz`));
  return proc;
}

export interface LocalCluster {
  /** The address to open: nginx. */
  url: string;
  nginx: Proc;
  /** Stopped and started again on its port by the tests. */
  redis: RedisServer;
  nodes: NodeProc[];
  stop(): Promise<void>;
}

/**
 * Starts redis-server, `nodes` Fretcall nodes and nginx, on free loopback ports, over a database
 * that is already migrated (and seeded, if wanted); if any part fails, what started is stopped.
 */
export async function startCluster(opts: {
  nodes: number;
  databaseUrl: string;
  secret: string;
  /** nginx's files go here. */
  dir: string;
  /** nginx's port (a free one if not given) and address (loopback if not given). */
  port?: number;
  host?: string;
  publicUrl?: string;
  env?: Record<string, string>;
  quiet?: boolean;
}): Promise<LocalCluster> {
  const quiet = opts.quiet ?? false;
  const port = opts.port ?? (await freePort());
  const url = `http://${LOOPBACK}:${port}`;
  const redis = await startRedisServer();
  const killRedis = () => void redis.stop("SIGKILL");
  process.once("exit", killRedis);
  const started: Proc[] = [];
  try {
    // The database is migrated already, so the nodes' own checks at start find nothing to do and may run at once.
    const starting = Array.from({ length: opts.nodes }, async (_, i) =>
      startNode({
        port: await freePort(),
        id: `node-${i + 1}`,
        databaseUrl: opts.databaseUrl,
        redisUrl: redis.url,
        publicUrl: opts.publicUrl,
        secret: opts.secret,
        env: opts.env,
        quiet,
      }),
    );
    const settled = await Promise.allSettled(starting);
    const nodes = settled.flatMap((r) => (r.status === "fulfilled" ? [r.value] : []));
    started.push(...nodes);
    const failed = settled.find((r) => r.status === "rejected");
    if (failed) throw failed.reason;
    const nginx = await startNginx(
      port,
      nodes.map((n) => n.address),
      join(opts.dir, "nginx"),
      { quiet, host: opts.host },
    );
    started.push(nginx);
    return {
      url,
      nginx,
      redis,
      nodes,
      async stop() {
        // nginx first, so no new request reaches a stopping node; Redis last, so nodes release their leases.
        await nginx.stop();
        await Promise.all(nodes.map((n) => n.stop()));
        await redis.stop();
        process.off("exit", killRedis);
      },
    };
  } catch (error) {
    await Promise.all(started.map((p) => p.stop("SIGKILL")));
    await redis.stop("SIGKILL");
    throw error;
  }
}
