/**
 * The Redis-backed versions of what the nodes of a cluster share (app/cluster/shared.server.ts):
 * rate-limit counters, round news by publish/subscribe, and locks. docs/decisions/0009-several-nodes.md
 * lists what lives where and why.
 */
import { randomUUID } from "node:crypto";
import type { Redis } from "ioredis";
import { RateLimiterMemory, RateLimiterRedis } from "rate-limiter-flexible";
import { Listeners, type Locks, type MakeLimiter, type RoundNews, type Shared } from "~/cluster/shared.server";
import { closeRedis, connectRedis, redisReady, type RedisLog } from "./redis";

const PREFIX = "fretcall:";
/** A lock outlives a node that died holding it by at most this; its holder renews it every third of it. */
const LOCK_TTL_MS = 10_000;
/** How often a node waiting its turn asks again. */
const LOCK_RETRY_MS = 200;

/**
 * Counters in Redis, so every node counts toward one limit. While Redis is unreachable each node
 * counts in memory instead (the insurance limiter): limits then hold per node, which is looser by
 * the number of nodes but never refuses anyone for Redis's sake.
 */
export const redisLimiter =
  (client: Redis): MakeLimiter =>
  (options) =>
    new RateLimiterRedis({
      ...options,
      storeClient: client,
      keyPrefix: `${PREFIX}limit:${options.keyPrefix}`,
      // Without this a request would wait for a reconnect; the insurance answers at once instead.
      rejectIfRedisNotReady: true,
      insuranceLimiter: new RateLimiterMemory(options),
    });

/**
 * A channel per round. The subscriber connection (a subscribed Redis connection can do nothing
 * else) listens only to rounds someone here is watching; ioredis subscribes again after a reconnect.
 * A node hears its own news through Redis too, so a listener is called once per change.
 */
export function redisRoundNews(publisher: Redis, subscriber: Redis): RoundNews {
  const listeners = new Listeners();
  const channel = (roomId: string) => `${PREFIX}round:${roomId}`;
  const quietly = (what: string) => (error: unknown) => console.error(`round news: ${what} failed`, error);
  subscriber.on("message", (name: string) => name.startsWith(`${PREFIX}round:`) && listeners.call(name.slice(`${PREFIX}round:`.length)));
  return {
    changed(roomId) {
      // Nothing waits for Redis: with it away the news is lost, and the watchers' own polls catch up.
      if (publisher.status === "ready") publisher.publish(channel(roomId), "changed").catch(quietly("publish"));
    },
    listen(roomId, listener) {
      listeners.add(roomId, listener, () => void subscriber.subscribe(channel(roomId)).catch(quietly("subscribe")));
      return () => listeners.remove(roomId, listener, () => void subscriber.unsubscribe(channel(roomId)).catch(quietly("unsubscribe")));
    },
  };
}

// Renew or release only a lock still ours: another node may hold it since ours expired.
const RENEW = `if redis.call("get", KEYS[1]) == ARGV[1] then return redis.call("pexpire", KEYS[1], ARGV[2]) else return 0 end`;
const RELEASE = `if redis.call("get", KEYS[1]) == ARGV[1] then return redis.call("del", KEYS[1]) else return 0 end`;

/**
 * Locks as Redis keys set only if absent, with an expiry so a node that dies holding one frees it,
 * renewed while the work runs. They order work for efficiency, not for safety: nothing they guard
 * is wrong if done twice (the sweep ends an ended room no more; migrations check what is applied).
 */
export function redisLocks(client: Redis): Locks {
  const key = (name: string) => `${PREFIX}lock:${name}`;
  const hold = async <T>(name: string, token: string, work: () => Promise<T>) => {
    const renew = setInterval(() => void client.eval(RENEW, 1, key(name), token, LOCK_TTL_MS).catch(() => {}), LOCK_TTL_MS / 3);
    try {
      return await work();
    } finally {
      clearInterval(renew);
      await client.eval(RELEASE, 1, key(name), token).catch(() => {});
    }
  };
  const take = async (name: string, token: string) => (await client.set(key(name), token, "PX", LOCK_TTL_MS, "NX")) === "OK";
  return {
    async ifFree(name, work) {
      const token = randomUUID();
      // Redis away: the work waits for the next period rather than run on every node at once.
      if (client.status !== "ready" || !(await take(name, token).catch(() => false))) return false;
      await hold(name, token, work);
      return true;
    },
    async inTurn(name, work) {
      const token = randomUUID();
      while (!(await take(name, token).catch(() => false))) await new Promise((r) => setTimeout(r, LOCK_RETRY_MS));
      return hold(name, token, work);
    },
  };
}

/** What the nodes share, over two connections to Redis: commands, and the subscriber. */
export function redisShared(client: Redis, subscriber: Redis): Shared {
  return {
    limiter: redisLimiter(client),
    rounds: redisRoundNews(client, subscriber),
    locks: redisLocks(client),
    close: async () => void (await Promise.all([closeRedis(client), closeRedis(subscriber)])),
  };
}

/**
 * A node's shared state in cluster mode. It waits for Redis, so a node started without it says
 * so instead of serving with every limit in memory and migrating beside the others.
 */
export async function openShared(url: string, log: RedisLog): Promise<Shared> {
  const clients = [connectRedis(url, "shared", log), connectRedis(url, "subscriber", log)] as const;
  try {
    await Promise.all(clients.map((c) => redisReady(c)));
  } catch (error) {
    await Promise.all(clients.map(closeRedis));
    throw error;
  }
  return redisShared(...clients);
}
