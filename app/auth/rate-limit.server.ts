/**
 * Fixed-window attempt counter kept in memory: enough for one server process, and a restart
 * only forgives attempts early.
 */
export class RateLimiter {
  private readonly hits = new Map<string, { count: number; resetAt: number }>();

  constructor(
    readonly limit: number,
    readonly windowMs: number,
    private readonly now: () => number = Date.now,
  ) {}

  /** Counts one attempt; returns the seconds to wait when over the limit, or 0 when allowed. */
  hit(key: string): number {
    const now = this.now();
    const entry = this.hits.get(key);
    if (!entry || entry.resetAt <= now) {
      this.hits.set(key, { count: 1, resetAt: now + this.windowMs });
      this.prune(now);
      return 0;
    }
    entry.count += 1;
    return entry.count > this.limit ? Math.ceil((entry.resetAt - now) / 1000) : 0;
  }

  reset(key: string) {
    this.hits.delete(key);
  }

  private prune(now: number) {
    if (this.hits.size < 10_000) return;
    for (const [key, entry] of this.hits) if (entry.resetAt <= now) this.hits.delete(key);
  }
}

export interface AttemptLimits {
  account: RateLimiter;
  address: RateLimiter;
}

/** Counts an attempt against both the account and the client address; returns seconds to wait, or 0. */
export function checkLimits(limits: AttemptLimits, account: string, request: Request): number {
  return Math.max(limits.account.hit(account), limits.address.hit(clientAddress(request)));
}

export function clientAddress(request: Request): string {
  // Set by our Express entry from the socket, never from a client header.
  return request.headers.get("x-fretcall-client-address") ?? "unknown";
}
