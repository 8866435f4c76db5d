// Moving a time heard by the audio context into the page's performance.now() clock, minus the input path's delay.

/** A pair of readings of the two clocks taken at the same moment of the audio thread's processing. */
export interface ClockStamp {
  contextMs: number;
  performanceMs: number;
}

export interface AudioContextTimes {
  currentTime: number;
  baseLatency?: number;
  outputLatency?: number;
  getOutputTimestamp?: () => { contextTime?: number; performanceTime?: number };
}

/**
 * getOutputTimestamp pairs a context time with the moment that frame leaves the loudspeaker; the audio thread
 * processed that frame earlier by the output path's latency (baseLatency + outputLatency), and the microphone's
 * samples processed with it were captured earlier still, by the input latency (subtracted in `heardAtMs`).
 * Without it, currentTime read now is the frame being processed now.
 */
export function stampClocks(context: AudioContextTimes, nowMs: number): ClockStamp {
  const stamp = context.getOutputTimestamp?.();
  if (stamp && typeof stamp.contextTime === "number" && typeof stamp.performanceTime === "number" && stamp.performanceTime > 0) {
    const outputMs = ((context.baseLatency ?? 0) + (context.outputLatency ?? 0)) * 1000;
    return { contextMs: stamp.contextTime * 1000, performanceMs: stamp.performanceTime - outputMs };
  }
  return { contextMs: context.currentTime * 1000, performanceMs: nowMs };
}

/** When a sound heard at `contextMs` reached the microphone, in performance.now() time. */
export function heardAtMs(contextMs: number, stamp: ClockStamp, inputLatencyMs: number): number {
  return stamp.performanceMs + (contextMs - stamp.contextMs) - inputLatencyMs;
}

/**
 * The input path's delay: the track's own `latency` setting where the browser reports it (Chromium does); otherwise
 * the context's baseLatency, the buffering the browser adds on its side, as the nearest figure it gives.
 */
export function inputLatencyMs(trackLatencySeconds: number | undefined, baseLatencySeconds: number | undefined): number {
  if (typeof trackLatencySeconds === "number" && Number.isFinite(trackLatencySeconds) && trackLatencySeconds >= 0) {
    return trackLatencySeconds * 1000;
  }
  return typeof baseLatencySeconds === "number" && Number.isFinite(baseLatencySeconds) ? Math.max(0, baseLatencySeconds * 1000) : 0;
}
