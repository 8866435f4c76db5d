/**
 * Fixed-window attempt counter kept in memory: enough for one server process, and a restart
 * only forgives attempts early. Keys are e.g. "account:sam@example.org" or "address:203.0.113.5".
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

/** Every key an attempt counts against; the attempt is refused if any is over its limit. */
export function checkLimits(limiter: RateLimiter, keys: string[]): number {
  return Math.max(0, ...keys.map((k) => limiter.hit(k)));
}

export function clientAddress(request: Request): string {
  // Set by our Express entry from the socket, never from a client header.
  return request.headers.get("x-fretcall-client-address") ?? "unknown";
}
