/**
 * A redis-server of its own on a free loopback port, for tests, benchmarks and `npm run cluster`
 * (several engineers' runs share this machine, so never a fixed port). Debian's package
 * (/usr/bin/redis-server); tests/ensure-redis.sh installs it when missing.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import { connect, createServer } from "node:net";

export const REDIS_SERVER = "/usr/bin/redis-server";

export interface RedisServer {
  url: string;
  port: number;
  /** Stops it (SIGTERM; SIGKILL for a crash). */
  stop(signal?: NodeJS.Signals): Promise<void>;
  /** Starts it again on the same port (and the same dir, so a persisted dataset is back). */
  start(): Promise<void>;
}

/** A loopback port free at this moment. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once("error", reject);
    probe.listen(0, "127.0.0.1", () => {
      const { port } = probe.address() as { port: number };
      probe.close(() => resolve(port));
    });
  });
}

/**
 * Starts redis-server. Without `dir` it keeps nothing on disk; with it, it writes an append-only
 * file there, so a restart finds its keys again (as a production Redis with persistence would).
 */
export async function startRedisServer(options: { dir?: string } = {}): Promise<RedisServer> {
  if (!existsSync(REDIS_SERVER)) throw new Error(`${REDIS_SERVER} is missing: run bash tests/ensure-redis.sh`);
  const port = await freePort();
  const persistence = options.dir ? ["--dir", options.dir, "--appendonly", "yes", "--appendfsync", "always"] : ["--appendonly", "no"];
  const args = ["--port", String(port), "--bind", "127.0.0.1", "--save", "", ...persistence, "--loglevel", "warning"];
  let child: ChildProcess | null = null;

  const start = () =>
    new Promise<void>((resolve, reject) => {
      const proc = spawn(REDIS_SERVER, args, { stdio: ["ignore", "pipe", "pipe"] });
      child = proc;
      let said = "";
      proc.stderr!.on("data", (chunk: Buffer) => void (said += chunk.toString()));
      proc.stdout!.on("data", (chunk: Buffer) => void (said += chunk.toString()));
      proc.once("exit", (code) => reject(new Error(`redis-server exited (${code}): ${said.trim()}`)));
      void waitForPort(port, 5_000).then(resolve, reject);
    });

  const stop = async (signal: NodeJS.Signals = "SIGTERM") => {
    const proc = child;
    child = null;
    if (!proc || proc.exitCode !== null || proc.signalCode !== null) return;
    const exited = new Promise<void>((done) => proc.once("exit", () => done()));
    proc.kill(signal);
    await exited;
  };

  await start();
  return { url: `redis://127.0.0.1:${port}`, port, stop, start };
}

/** Resolves once something accepts connections on the port. */
async function waitForPort(port: number, ms: number) {
  const until = Date.now() + ms;
  for (;;) {
    const open = await new Promise<boolean>((resolve) => {
      const socket = connect(port, "127.0.0.1");
      socket.once("connect", () => {
        socket.destroy();
        resolve(true);
      });
      socket.once("error", () => resolve(false));
    });
    if (open) return;
    if (Date.now() > until) throw new Error(`nothing listens on port ${port} after ${ms} ms`);
    await new Promise((r) => setTimeout(r, 25));
  }
}
