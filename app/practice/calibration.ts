/**
 * Play-along calibration for the rhythm pass by playing, pure. The student hears a count-in, then plays any note
 * (muted strings are fine) on each of CALIBRATION_PLAYED clicks. The microphone path adds a delay the browser does
 * not fully report (converter, buffers, a Bluetooth headset), so the typical gap between a click and the onset we
 * hear is measured and later subtracted from every played onset. It also absorbs a steady lead or lag of the
 * player's own, exactly as a band leader would count a player in: what the rhythm pass then judges is evenness
 * against the beat.
 *
 * The rule:
 * - Each played click owns the onsets from MIN_OFFSET_MS before it to MAX_OFFSET_MS after it (at CALIBRATION_BPM
 *   these windows never overlap, so no onset belongs to two clicks); the first onset in the window is the attack,
 *   later ones are the same note ringing or noise. Onsets outside every window are stray.
 * - The figure is the median offset of the matched clicks after dropping outliers (more than OUTLIER_MS from the
 *   first median: a missed click caught by the next sound). A median, not a mean, so one stray pluck cannot move it.
 * - At least MIN_MATCHED clicks must be left, and their spread (median absolute deviation) at most MAX_SPREAD_MS;
 *   otherwise the student is asked to try again, told why.
 */
import { median } from "~/lib/median";

export const CALIBRATION_BPM = 80;
/** Clicks to listen to before playing along: one bar of four. */
export const CALIBRATION_COUNT_IN = 4;
export const CALIBRATION_PLAYED = 8;
export const MIN_MATCHED = 6;
/**
 * A player anticipating the click rarely leads it by more than a few tens of ms (from memory: the "negative mean
 * asynchrony" of tapping studies); 150 ms leaves room. A delay over 400 ms is no longer a fair thing to subtract:
 * the student would be hearing their own notes a beat behind.
 */
export const MIN_OFFSET_MS = -150;
export const MAX_OFFSET_MS = 400;
export const OUTLIER_MS = 80;
/** Half the rhythm pass's on-time window (ON_TIME_MS = 80): a figure less steady than that would blur the grades. */
export const MAX_SPREAD_MS = 40;
/** After this long the figure is offered for renewal (a new phone, new headphones); it is still used meanwhile. */
export const CALIBRATION_STALE_DAYS = 60;

export interface CalibrationRun {
  /** Every click, ms from the first: the count-in, then the clicks played along. */
  clicks: { at: number; accent: boolean }[];
  /** The clicks the student plays along with. */
  played: number[];
  /** When to stop listening: one beat after the last played click. */
  endMs: number;
}

export function calibrationRun(bpm = CALIBRATION_BPM): CalibrationRun {
  const beat = 60_000 / bpm;
  const clicks = Array.from({ length: CALIBRATION_COUNT_IN + CALIBRATION_PLAYED }, (_, k) => ({ at: k * beat, accent: k % 4 === 0 }));
  const played = clicks.slice(CALIBRATION_COUNT_IN).map((c) => c.at);
  return { clicks, played, endMs: played.at(-1)! + beat };
}

export type Calibration =
  | { ok: true; offsetMs: number; spreadMs: number; matched: number; of: number }
  | { ok: false; reason: string; matched: number; of: number };

/** Onsets are ms from the first click (any order). */
export function measureOffset(played: readonly number[], onsets: readonly number[]): Calibration {
  const sorted = [...onsets].filter(Number.isFinite).sort((a, b) => a - b);
  const owned = new Set<number>();
  const offsets: number[] = [];
  for (const click of played) {
    const j = sorted.findIndex((t, k) => !owned.has(k) && t - click >= MIN_OFFSET_MS && t - click <= MAX_OFFSET_MS);
    if (j === -1) continue;
    owned.add(j);
    offsets.push(sorted[j]! - click);
  }
  const of = played.length;
  const stray = sorted.filter((t) => !played.some((c) => t - c >= MIN_OFFSET_MS && t - c <= MAX_OFFSET_MS)).length;
  const first = median(offsets);
  const kept = first === null ? [] : offsets.filter((o) => Math.abs(o - first) <= OUTLIER_MS);
  if (kept.length < MIN_MATCHED) {
    const noise = stray > of / 2 ? " We heard many sounds between the clicks: a quieter room helps." : "";
    return {
      ok: false,
      matched: kept.length,
      of,
      reason: `We heard a steady note on ${kept.length} of the ${of} clicks; at least ${MIN_MATCHED} are needed. Play one short note on every click after the count-in, and keep the phone near the guitar.${noise}`,
    };
  }
  const offsetMs = median(kept)!;
  const spreadMs = median(kept.map((o) => Math.abs(o - offsetMs)))!;
  if (spreadMs > MAX_SPREAD_MS) {
    return {
      ok: false,
      matched: kept.length,
      of,
      reason: `Your notes wandered about ${Math.round(spreadMs)} ms around the click (at most ${MAX_SPREAD_MS} ms gives a fair figure). Play short, sharp notes right on each click and try again.`,
    };
  }
  return { ok: true, offsetMs: Math.round(offsetMs), spreadMs: Math.round(spreadMs), matched: kept.length, of };
}

/**
 * Played onsets as the rhythm pass's taps: the onsets are ms from the first count-in click (the listening hook has
 * already taken off the input latency the browser reports); the calibrated delay comes off too. From here on they
 * are scored exactly like taps. The server applies it to what the phone heard, so a stored pass keeps both.
 */
export function playedTaps(onsetsMs: readonly number[], offsetMs: number): number[] {
  return onsetsMs.map((t) => t - offsetMs);
}

export interface StoredCalibration {
  offsetMs: number;
  /** ms since 1970: when it was measured. */
  at: number;
}

/** The figure kept on the device; anything unreadable or out of range counts as none. */
export function parseStoredCalibration(text: string | null): StoredCalibration | null {
  if (!text) return null;
  try {
    const value = JSON.parse(text) as Partial<StoredCalibration> | null;
    const { offsetMs, at } = value ?? {};
    if (typeof offsetMs !== "number" || !Number.isInteger(offsetMs) || offsetMs < MIN_OFFSET_MS || offsetMs > MAX_OFFSET_MS) return null;
    if (typeof at !== "number" || !Number.isFinite(at) || at <= 0) return null;
    return { offsetMs, at };
  } catch {
    return null;
  }
}

export function isStale(stored: StoredCalibration, now: number): boolean {
  return now - stored.at > CALIBRATION_STALE_DAYS * 86_400_000;
}
