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
 */

export const CLOCK_WINDOW = 24;
export const CLOCK_KEEP = 12;
/** Pongs remembered while waiting for the pad to report their arrival. */
export const PENDING_PONGS = 4;
/** Slack over the worst kept round trip allowed for the uplink of an answer. */
export const UPLINK_SLACK_MS = 50;
/** Never allow more than this much uplink time, however slow the pings were. */
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
  /** Lowest round trip among the kept samples. */
  bestDelayMs: number;
  /** Highest round trip among the kept samples. */
  worstDelayMs: number;
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
    bestDelayMs: sampleDelay(kept[0]!),
    worstDelayMs: sampleDelay(kept[kept.length - 1]!),
    samples: clock.samples.length,
  };
}

/**
 * Server time of a tap the pad stamped at `tapClientMs`, bounded by what physics allows:
 * - not later than `receivedAt` (the answer cannot arrive before it was sent);
 * - not earlier than `receivedAt − uplink`, where uplink = worst kept round trip + slack,
 *   capped at MAX_UPLINK_MS: one leg cannot outlast a whole round trip measured on the same
 *   network, so an honest tap lands inside, and a pad whose clock (or code) claims an earlier
 *   tap gains at most that window.
 * Without any sample the pad's stamp is not trusted at all and the receive time is used.
 */
export function tapServerTime(est: ClockEstimate | null, tapClientMs: number, receivedAt: number): number {
  if (est === null) return receivedAt;
  const uplink = Math.min(est.worstDelayMs + UPLINK_SLACK_MS, MAX_UPLINK_MS);
  return Math.min(Math.max(tapClientMs + est.offsetMs, receivedAt - uplink), receivedAt);
}

/** Reaction time: tap (server time) − showAt, clamped to [0, limitMs]. */
export function reactionTime(tapAt: number, showAt: number, limitMs: number): number {
  return Math.min(Math.max(tapAt - showAt, 0), limitMs);
}

/**
 * Lead time before a prompt is shown, long enough for the prompt message to reach the slowest
 * pad so every phone and the stage reveal the note together: worst estimated one-way delay
 * (half its worst kept round trip) + margin, within [MIN_LEAD_MS, MAX_LEAD_MS] so one phone on
 * a terrible link cannot stall the class.
 */
export function leadFor(estimates: readonly (ClockEstimate | null)[]): number {
  const oneWay = Math.max(0, ...estimates.map((e) => (e === null ? UNSYNCED_ONE_WAY_MS : e.worstDelayMs / 2)));
  return clampLead(oneWay + LEAD_MARGIN_MS);
}

const clampLead = (ms: number): number => Math.min(Math.max(ms, MIN_LEAD_MS), MAX_LEAD_MS);

/** showAt for a prompt scheduled at `now`: the class countdown or the network lead, whichever is longer. */
export function scheduleShowAt(now: number, leadMs: number, countdownMs: number): number {
  return now + Math.max(countdownMs, clampLead(leadMs));
}
