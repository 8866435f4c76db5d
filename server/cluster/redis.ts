/**
 * The one way a node connects to Redis (cluster mode, REDIS_URL). Each use opens its own client
 * with the options its role needs, so a subscriber's blocking mode or a queued publish never
 * delays a lease renewal.
 */
import { Redis } from "ioredis";

/**
 * - `leases`: ownership and fencing. A command fails at once while Redis is down (no offline queue,
 *   no retry of a sent command, a short command timeout): a renewal that cannot be confirmed must
 *   count as not renewed, well inside the lease's few seconds.
 * - `shared`: rate limits, locks and publishing. Fails fast too, so callers fall back (the rate
 *   limiter to its insurance limiter in memory) instead of holding a request.
 * - `subscriber`: publish/subscribe listening. Its SUBSCRIBE waits for a connection (offline queue)
 *   and is renewed by ioredis after each reconnect.
 */
export type RedisRole = "leases" | "shared" | "subscriber";

/** What a Redis client logs through: the server's pino logger fits. */
export interface RedisLog {
  info(message: string): void;
  warn(message: string): void;
}

/** Reconnect quickly (a lease lapses in ~3 s), never give up, never hammer a Redis that is down. */
export const reconnectDelayMs = (attempt: number) => Math.min(50 * 2 ** Math.min(attempt, 10), 500);

const failFast = { enableOfflineQueue: false, maxRetriesPerRequest: 0, commandTimeout: 1_000 } as const;

const byRole = {
  leases: failFast,
  shared: failFast,
  subscriber: { enableOfflineQueue: true, maxRetriesPerRequest: null, autoResubscribe: true },
} as const;

/** Redis's address without the password a URL may carry, for logs. */
export function redisLabel(url: string) {
  try {
    const u = new URL(url);
    return `${u.protocol}//${u.host}${u.pathname.length > 1 ? u.pathname : ""}`;
  } catch {
    return "redis";
  }
}

/**
 * A client for `role`, connecting at once and reconnecting for ever. Its state is logged once per
 * change (reachable / unreachable), not on every failed attempt.
 */
export function connectRedis(url: string, role: RedisRole, log: RedisLog = console): Redis {
  const client = new Redis(url, {
    ...byRole[role],
    connectionName: `fretcall-${role}`,
    connectTimeout: 2_000,
    retryStrategy: reconnectDelayMs,
  });
  const where = `Redis (${role}, ${redisLabel(url)})`;
  let up: boolean | undefined;
  const becomes = (now: boolean, detail = "") => {
    if (up === now) return;
    up = now;
    if (now) log.info(`${where} is reachable`);
    else log.warn(`${where} is unreachable${detail ? `: ${detail}` : ""}; retrying`);
  };
  client.on("ready", () => becomes(true));
  // Without an "error" listener ioredis prints every failed attempt; the state change says enough.
  client.on("error", (error: Error) => becomes(false, error.message));
  client.on("close", () => becomes(false));
  return client;
}

/** Resolves when `client` is ready, or rejects after `ms` (a node that starts without Redis says so). */
export function redisReady(client: Redis, ms = 5_000): Promise<void> {
  if (client.status === "ready") return Promise.resolve();
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => {
      client.off("ready", onReady);
      reject(new Error(`Redis did not answer within ${ms} ms`));
    }, ms);
    const onReady = () => {
      clearTimeout(timer);
      resolve();
    };
    client.once("ready", onReady);
  });
}

/** Closes a client: QUIT when connected (pending replies arrive), at once otherwise. */
export async function closeRedis(client: Redis) {
  if (client.status === "ready") {
    await client.quit().catch(() => client.disconnect());
  } else {
    client.disconnect();
  }
}
