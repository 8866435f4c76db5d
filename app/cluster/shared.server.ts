/**
 * What several Fretcall nodes must share besides the database (docs/decisions/0009-several-nodes.md):
 * rate-limit counters, news that a round changed, and locks for work only one node may do at a time.
 * These are the one-process versions, used when no REDIS_URL is set; server/cluster/shared.ts
 * builds the Redis-backed ones. app/ code sees only these interfaces, never Redis.
 */
import { RateLimiterMemory, type RateLimiterAbstract } from "rate-limiter-flexible";

/** The options every limit of app/auth/rate-limit.server.ts is made of. */
export interface LimiterOptions {
  keyPrefix: string;
  points: number;
  /** Seconds. */
  duration: number;
}

export type MakeLimiter = (options: LimiterOptions) => RateLimiterAbstract;

/**
 * "This round changed" (answers stored, or it ended), heard by every node: a teacher's live class
 * review on one node follows a round played on another. At most once: a listener that must not
 * miss a change also checks now and then.
 */
export interface RoundNews {
  changed(roomId: string): void;
  /** Calls `listener` on each change of the round; returns what stops it. */
  listen(roomId: string, listener: () => void): () => void;
}

export interface Locks {
  /**
   * Runs `work` unless another node is running work of the same name; resolves with whether it ran.
   * For periodic work that the next period catches up on (the idle-room sweep).
   */
  ifFree(name: string, work: () => Promise<void>): Promise<boolean>;
  /** Waits until no other node runs work of the same name, then runs it (migrations at start). */
  inTurn<T>(name: string, work: () => Promise<T>): Promise<T>;
}

export interface Shared {
  limiter: MakeLimiter;
  rounds: RoundNews;
  locks: Locks;
  /** Ends connections and timers (nothing for the one-process version). */
  close(): Promise<void>;
}

export const memoryLimiter: MakeLimiter = (options) => new RateLimiterMemory(options);

/** Listeners by key, for both versions of RoundNews: Redis delivers to them as this process does. */
export class Listeners {
  private readonly byKey = new Map<string, Set<() => void>>();

  /** Adds one; `first` runs when the key had none (the Redis version subscribes then). */
  add(key: string, listener: () => void, first: () => void = () => {}) {
    let set = this.byKey.get(key);
    if (!set) {
      this.byKey.set(key, (set = new Set()));
      first();
    }
    set.add(listener);
  }

  /** Removes one; `last` runs when the key has none left. */
  remove(key: string, listener: () => void, last: () => void = () => {}) {
    const set = this.byKey.get(key);
    if (!set?.delete(listener) || set.size > 0) return;
    this.byKey.delete(key);
    last();
  }

  call(key: string) {
    for (const listener of this.byKey.get(key) ?? []) listener();
  }
}

export function memoryRoundNews(): RoundNews {
  const listeners = new Listeners();
  return {
    changed: (roomId) => listeners.call(roomId),
    listen(roomId, listener) {
      listeners.add(roomId, listener);
      return () => listeners.remove(roomId, listener);
    },
  };
}

/** One process: a name is busy while this process runs work under it. */
export function memoryLocks(): Locks {
  const tails = new Map<string, Promise<unknown>>();
  const inTurn = <T>(name: string, work: () => Promise<T>): Promise<T> => {
    const run = (tails.get(name) ?? Promise.resolve()).then(work, work);
    const tail = run.then(
      () => undefined,
      () => undefined,
    );
    tails.set(name, tail);
    void tail.then(() => tails.get(name) === tail && tails.delete(name));
    return run;
  };
  return {
    async ifFree(name, work) {
      if (tails.has(name)) return false;
      await inTurn(name, work);
      return true;
    },
    inTurn,
  };
}

export function memoryShared(): Shared {
  return { limiter: memoryLimiter, rounds: memoryRoundNews(), locks: memoryLocks(), close: async () => {} };
}
