/**
 * Every rate limit of the server, in one place. Counters live where `createLimits` is told: in
 * memory for one process (a restart only forgives early), or in Redis when several nodes share
 * them (app/cluster/shared.server.ts), so a guesser gains nothing by being spread over the nodes.
 *
 * Addresses are the client's real address (TRUST_PROXY decides how far X-Forwarded-For is
 * believed), and a whole school may sit behind one: per-address limits are generous, and what
 * protects one account is counted per account *and* address, so a stranger's failures never
 * lock its owner out.
 */
import { RateLimiterRes, type RateLimiterAbstract } from "rate-limiter-flexible";
import { data } from "react-router";
import { memoryLimiter, type MakeLimiter } from "~/cluster/shared.server";
import { plural } from "~/lib/plural";

const MINUTE = 60;
const HOUR = 60 * MINUTE;

/** A limiter with the sentence a person reads when it refuses, given the wait. */
export interface Limit {
  limiter: RateLimiterAbstract;
  message: (wait: string) => string;
}

export function createLimits(makeLimiter: MakeLimiter = memoryLimiter) {
  const limit = (keyPrefix: string, points: number, duration: number, message: Limit["message"]): Limit => ({
    limiter: makeLimiter({ keyPrefix, points, duration }),
    message,
  });
  return {
    signIn: {
      /** Failed sign-ins of one account from one address: the guesser is slowed, nobody else. */
      pair: limit("signin-pair", 5, 15 * MINUTE, (w) => `Too many failed sign-ins for this account from here. Try again in ${w}.`),
      /** Failed sign-ins of one account from anywhere: past this every attempt waits a moment more, none is refused. */
      account: limit("signin-account", 50, 15 * MINUTE, (w) => `Sign-ins to this account are slowed for ${w}.`),
      /** Failed sign-ins from one address, any account: generous, a school shares one address. */
      address: limit("signin-address", 200, 15 * MINUTE, (w) => `Too many failed sign-ins from this network. Try again in ${w}.`),
    },
    cards: {
      /** Failed sign-ins with one class code from one address: a guesser of personal codes is slowed, nobody else. */
      pair: limit("cards-pair", 10, 15 * MINUTE, (w) => `Too many wrong codes for this class from here. Try again in ${w}.`),
      /** Failed card sign-ins with one class code from anywhere: past this each attempt waits a moment, none is refused. */
      class: limit("cards-class", 100, 15 * MINUTE, (w) => `Sign-ins with this class code are slowed for ${w}.`),
      /** Failed card sign-ins and card links that open nothing, per address: generous, a class shares one address. */
      address: limit("cards-address", 100, 15 * MINUTE, (w) => `Too many wrong sign-in card codes from this network. Try again in ${w}.`),
    },
    signUp: limit("signup", 10, HOUR, (w) => `Too many new studios from this network. Try again in ${w}.`),
    reset: {
      // Reset mails are rare; a low per-account limit stops the form being used to flood an inbox.
      account: limit("reset-account", 3, HOUR, (w) => `Too many reset requests for this address. Try again in ${w}.`),
      address: limit("reset-address", 30, HOUR, (w) => `Too many reset requests from this network. Try again in ${w}.`),
    },
    /** Invitation e-mails per sender (a class's CSV import counts one per student). */
    invitations: limit("invitations", 300, HOUR, (w) => `Too many invitations sent for now. Try again in ${w}.`),
    /** Room-code look-ups that found no open room, per address: guessing codes is slow, typos are fine. */
    roomLookups: limit("room-lookups", 60, 10 * MINUTE, (w) => `Too many room codes tried from this network. Try again in ${w}.`),
    /** New WebSocket connections per address: a class reconnecting after a Wi-Fi drop fits easily. */
    sockets: limit("sockets", 300, MINUTE, (w) => `Too many connections from this network. Try again in ${w}.`),
    seats: {
      /** Seats one connection may take in a row (each join asks for a new one). */
      socket: limit("seats-socket", 5, MINUTE, (w) => `This phone joined too often. Try again in ${w}.`),
      address: limit("seats-address", 200, 10 * MINUTE, (w) => `Too many phones joined from this network. Try again in ${w}.`),
    },
  };
}

export type Limits = ReturnType<typeof createLimits>;

/** A refusal: whole seconds to wait and the sentence to show. */
export interface Refusal {
  retryAfter: number;
  message: string;
}

/** "40 seconds", "1 minute", "12 minutes". */
export function waitWords(seconds: number) {
  if (seconds < 60) return plural(seconds, "second");
  const minutes = Math.ceil(seconds / 60);
  return plural(minutes, "minute");
}

function refusal(l: Limit, res: RateLimiterRes): Refusal {
  const retryAfter = Math.max(1, Math.ceil(res.msBeforeNext / 1000));
  return { retryAfter, message: l.message(waitWords(retryAfter)) };
}

/** Counts `points` against the key; the refusal when that goes over the limit. */
export async function take(l: Limit, key: string, points = 1): Promise<Refusal | undefined> {
  try {
    await l.limiter.consume(key, points);
    return undefined;
  } catch (error) {
    if (error instanceof RateLimiterRes) return refusal(l, error);
    throw error;
  }
}

/** Whether the key is already over the limit, without counting anything. */
export async function peek(l: Limit, key: string): Promise<Refusal | undefined> {
  const res = await l.limiter.get(key);
  return res && res.consumedPoints >= l.limiter.points ? refusal(l, res) : undefined;
}

/** The first refusal of several checks (all of them are counted). */
export async function firstRefusal(checks: Promise<Refusal | undefined>[]) {
  return (await Promise.all(checks)).find(Boolean);
}

export function clientAddress(request: Request): string {
  // Set by the Express entry from the socket (and trusted proxies), never from a client's copy.
  return request.headers.get("x-fretcall-client-address") ?? "unknown";
}

export type TooMany<T> = ReturnType<typeof data<T>>;

/** The 429 a route returns (not throws), so the page shows the sentence as its form message. */
export function tooMany<T>(refused: Refusal, body: T): TooMany<T> {
  return data(body, { status: 429, headers: { "Retry-After": String(refused.retryAfter) } });
}

/**
 * A route's `headers` export: the document answer keeps the Retry-After of a 429 (returned, or
 * thrown to the error boundary); everything else is the parent's, as without an export.
 */
export function retryAfterHeaders(args: { parentHeaders: Headers; actionHeaders: Headers; loaderHeaders: Headers; errorHeaders?: Headers }): HeadersInit {
  const headers = new Headers(args.parentHeaders);
  const value = [args.errorHeaders, args.actionHeaders, args.loaderHeaders].map((h) => h?.get("Retry-After")).find(Boolean);
  if (value) headers.set("Retry-After", value);
  return headers;
}
