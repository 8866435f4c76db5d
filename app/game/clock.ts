/**
 * Clock sync between a phone (pad) and the server, NTP-style, so reaction times are measured
 * from the moment the note appears to the moment of the tap — not to the moment the answer
 * crawled through the classroom Wi-Fi.
 *
 * One sample: the pad sends ping at t0 (pad clock), the server receives it at t1 and answers at
 * t2 (server clock), the pad receives the pong at t3 (pad clock).
 *   offset = ((t1 − t0) + (t2 − t3)) / 2   (server clock − pad clock)
 *   delay  = (t3 − t0) − (t2 − t1)         (round trip spent on the network)
 * Since neither leg can take negative time, each sample also proves
 *   t2 − t3 ≤ true offset ≤ t1 − t0,
 * an interval of width `delay` around its offset. The estimate keeps the CLOCK_KEEP
 * lowest-delay samples of the last CLOCK_WINDOW (low delay = little room for queueing error;
 * recent = phone clocks drift by 20–50 ppm, a few ms over 24 samples taken 2 s apart) and takes
 * the middle of the intersection of their intervals, which is tighter than any single sample.
 * If the intervals do not meet (the pad's clock was stepped), it falls back to the offset of
 * the lowest-delay sample.
 *
 * The server never trusts the pad's arithmetic: it records the t1/t2 it sent and forms a sample
 * only when the pad reports the t3 of a pong the server really sent (see recordPong/reportPong).
 * Those samples set the offset only. t0 and t3 are the pad's word, so their round trips bound
 * nothing: how long a leg may take comes from round trips the server timed itself (RoundTrip,
 * WebSocket-level pings a page script cannot hold back), see uplinkBound.
 */

export const CLOCK_WINDOW = 24;
export const CLOCK_KEEP = 12;
/** Pongs remembered while waiting for the pad to report their arrival. */
export const PENDING_PONGS = 4;
/** How often the server pings each seated pad at WebSocket level to time its round trips. */
export const ROUND_TRIP_PING_MS = 1_000;
/** Round trips older than this no longer speak for the pad's network. */
export const ROUND_TRIP_WINDOW_MS = 60_000;
/**
 * A seat whose window is full is pinged this many times less often (every 2 s), a seat on a steady
 * link (steadyLink) this many (every 5 s, its window then holds 12, still above STEADY_SAMPLES):
 * a whole school's pings were the hub's largest cost (profiled under bench/live.ts).
 */
export const FULL_PING_FACTOR = 2;
export const STEADY_PING_FACTOR = 5;
/**
 * Round trips that make a full window. At one every 2 s a minute holds 30, whose p95 (the 29th,
 * nearest rank) leaves out the slowest one as the 57th of 60 leaves out three: either way a hold-up
 * on more than 1 round trip in 15 counts, so a full window needs no more samples than this.
 */
export const FULL_WINDOW_SAMPLES = 30;
/** Round trips in the window before a link can count as steady (its p95 is then at most its slowest). */
export const STEADY_SAMPLES = 10;
/**
 * A link is steady while its window's p95 round trip is within this of its fastest. A bursty link
 * (hold-ups on more than 5 % of round trips, the case ROUND_TRIP_PERCENTILE is there for) never is,
 * so it keeps its full minute of samples; on a steady one, fewer samples move the bound by at most this.
 */
export const STEADY_SPREAD_MS = 50;
/**
 * The round trip of the window that bounds a leg (nearest rank). Say each frame is held up H ms
 * (a Wi-Fi retransmission) with probability q each way, so about 2q of round trips show it. Above
 * 2q = 5 % the percentile includes the hold-up and a held-up answer loses nothing; below, a tap
 * loses H only when its own frame is held (probability q ≤ 2.5 %): on average at most
 * 0.025 × 300 = 7.5 ms for 300 ms hold-ups. p90 would double that; p99 means nothing with 60
 * samples a minute. And a pad cannot widen it without its pongs really being late on ≥ 5 % of
 * the server's pings.
 */
export const ROUND_TRIP_PERCENTILE = 0.95;
/** Allowed over the measured bound: the pad's own time from tap to send, the server's from socket to handler. */
export const UPLINK_SLACK_MS = 10;
/** Never allow more than this much uplink time, however slow the round trips were. */
export const MAX_UPLINK_MS = 1_000;
/** Assumed one-way delay of a pad that has not synced yet (used for scheduling only). */
export const UNSYNCED_ONE_WAY_MS = 250;
export const LEAD_MARGIN_MS = 100;
export const MIN_LEAD_MS = 300;
export const MAX_LEAD_MS = 1_500;

export interface ClockSample {
  t0: number;
  t1: number;
  t2: number;
  t3: number;
}

export interface ClockEstimate {
  /** Add to a pad time to get server time. */
  offsetMs: number;
  samples: number;
}

/** A round trip the server timed itself: a WebSocket ping it sent at `at − ms` answered at `at` (server time). */
export interface RoundTrip {
  at: number;
  ms: number;
}

/** What the server saw of one pad's network over the last ROUND_TRIP_WINDOW_MS. */
export interface NetworkFigures {
  /** The ROUND_TRIP_PERCENTILE round trip. */
  highMs: number;
  /** The fastest round trip: twice the link's one-way floor, links being roughly symmetric. */
  lowMs: number;
  samples: number;
}

export interface ClockState {
  samples: ClockSample[];
  pending: Omit<ClockSample, "t3">[];
}

export const emptyClock = (): ClockState => ({ samples: [], pending: [] });

export const sampleOffset = (s: ClockSample): number => (s.t1 - s.t0 + (s.t2 - s.t3)) / 2;
export const sampleDelay = (s: ClockSample): number => s.t3 - s.t0 - (s.t2 - s.t1);

/** Adds a measured sample; impossible ones (negative round trip, server time running backwards) are dropped. */
export function addSample(clock: ClockState, sample: ClockSample): ClockState {
  if (sample.t2 < sample.t1 || sampleDelay(sample) < 0) return clock;
  return { ...clock, samples: [...clock.samples, sample].slice(-CLOCK_WINDOW) };
}

/** Server side: remember a pong just sent. */
export function recordPong(clock: ClockState, pong: { t0: number; t1: number; t2: number }): ClockState {
  return { ...clock, pending: [...clock.pending, pong].slice(-PENDING_PONGS) };
}

/** Server side: the pad says the pong answering its ping `t0` arrived at `t3`. Unknown t0s are ignored. */
export function reportPong(clock: ClockState, t0: number, t3: number): ClockState {
  const pong = clock.pending.find((p) => p.t0 === t0);
  if (pong === undefined) return clock;
  return addSample({ ...clock, pending: clock.pending.filter((p) => p !== pong) }, { ...pong, t3 });
}

export function estimate(clock: ClockState): ClockEstimate | null {
  if (clock.samples.length === 0) return null;
  const kept = [...clock.samples].sort((a, b) => sampleDelay(a) - sampleDelay(b)).slice(0, CLOCK_KEEP);
  const low = Math.max(...kept.map((s) => s.t2 - s.t3));
  const high = Math.min(...kept.map((s) => s.t1 - s.t0));
  return {
    offsetMs: low <= high ? (low + high) / 2 : sampleOffset(kept[0]!),
    samples: clock.samples.length,
  };
}

/** The figures of the round trips still in the window at `now`; null when there are none. */
export function networkFigures(trips: readonly RoundTrip[], now: number): NetworkFigures | null {
  // A typed array sorts numbers without a comparator: the hub reads every pad's figures as a prompt is scheduled.
  const ms = new Float64Array(trips.length);
  let n = 0;
  for (const t of trips) if (t.at > now - ROUND_TRIP_WINDOW_MS) ms[n++] = t.ms;
  if (n === 0) return null;
  const sorted = ms.subarray(0, n).sort();
  return { highMs: sorted[Math.ceil(ROUND_TRIP_PERCENTILE * n) - 1]!, lowMs: sorted[0]!, samples: n };
}

/**
 * Whether a seat's link is steady enough to be timed every STEADY_PING_FACTOR pings. A round trip
 * that jumps (a hold-up, a slower network after a reconnect) widens the spread and brings back
 * the full rate; with only 12 samples in a slow window its p95 is its slowest, so one jump does.
 */
export const steadyLink = (n: NetworkFigures | null): boolean => n !== null && n.samples >= STEADY_SAMPLES && n.highMs - n.lowMs <= STEADY_SPREAD_MS;

/** How many times less often than ROUND_TRIP_PING_MS a seat with these figures is pinged: 1, FULL_PING_FACTOR or STEADY_PING_FACTOR. */
export function pingFactor(n: NetworkFigures | null): number {
  if (steadyLink(n)) return STEADY_PING_FACTOR;
  return n !== null && n.samples >= FULL_WINDOW_SAMPLES ? FULL_PING_FACTOR : 1;
}

/**
 * The longest one leg (up or down) the figures allow. A round trip is up + down, and down takes
 * at least the one-way floor, lowMs / 2 on a roughly symmetric link; so a leg held up like the
 * high round trip took at most highMs − lowMs / 2.
 */
const longestLeg = (n: NetworkFigures): number => n.highMs - n.lowMs / 2;

/** The most time an answer may have spent on its way up, by the server's own measurements; null without any. */
export function uplinkBound(n: NetworkFigures | null): number | null {
  return n === null ? null : Math.min(longestLeg(n) + UPLINK_SLACK_MS, MAX_UPLINK_MS);
}

/**
 * When the note reached a pad: it leaves the server at the show step (not before, to keep it secret)
 * and takes at least the link's one-way floor to arrive, lowMs / 2 on a roughly symmetric link. The
 * floor, not a high percentile, so a pad is never credited with a delay its frames did not have.
 */
export function noteSeenAt(shownAt: number, n: NetworkFigures | null): number {
  return shownAt + (n === null ? 0 : Math.min(n.lowMs / 2, MAX_UPLINK_MS));
}

/** What the server holds against a pad's claimed tap time. */
export interface TapCheck {
  /** The pad's clock, from its ping reports. */
  estimate: ClockEstimate | null;
  /** uplinkBound of the seat's round trips. */
  uplinkMs: number | null;
  /** When the socket the answer came on opened (server time). */
  connectedAt: number;
}

/**
 * Server time of a tap the pad stamped at `tapClientMs`, believed only as far as the server can vouch:
 * - not later than `receivedAt` (the answer cannot arrive before it was sent);
 * - not earlier than `receivedAt − uplinkMs`: the answer is sent at once, and its one leg took no
 *   longer than the server's own round trips allow, so an honest tap lands inside, and a pad whose
 *   clock (or code) claims an earlier tap gains at most that window;
 * - a tap claimed before the answer's socket opened was made while the pad was disconnected: its
 *   frame waited for a new connection, which the window does not cover, so all the server can
 *   vouch for is the arrival, `receivedAt`.
 * Without a clock estimate or a measured round trip the pad's stamp is not trusted at all and the receive time is used.
 */
export function tapServerTime(check: TapCheck, tapClientMs: number, receivedAt: number): number {
  if (check.estimate === null || check.uplinkMs === null) return receivedAt;
  const claimed = tapClientMs + check.estimate.offsetMs;
  if (claimed < check.connectedAt) return receivedAt;
  return Math.min(Math.max(claimed, receivedAt - check.uplinkMs), receivedAt);
}

/** Reaction time: tap (server time) − showAt, clamped to [0, limitMs]. */
export function reactionTime(tapAt: number, showAt: number, limitMs: number): number {
  return Math.min(Math.max(tapAt - showAt, 0), limitMs);
}

/**
 * Lead time before a prompt is shown, long enough for the prompt message to reach the slowest
 * pad so every phone and the stage reveal the note together: the longest leg the server measured
 * to any pad (as for an uplink) + margin, within [MIN_LEAD_MS, MAX_LEAD_MS] so one phone on a
 * terrible link cannot stall the class.
 */
export function leadFor(pads: readonly (NetworkFigures | null)[]): number {
  const oneWay = Math.max(0, ...pads.map((n) => (n === null ? UNSYNCED_ONE_WAY_MS : longestLeg(n))));
  return clampLead(oneWay + LEAD_MARGIN_MS);
}

const clampLead = (ms: number): number => Math.min(Math.max(ms, MIN_LEAD_MS), MAX_LEAD_MS);

/** showAt for a prompt scheduled at `now`: the class countdown or the network lead, whichever is longer. */
export function scheduleShowAt(now: number, leadMs: number, countdownMs: number): number {
  return now + Math.max(countdownMs, clampLead(leadMs));
}
