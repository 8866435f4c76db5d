import { describe, expect, it } from "vitest";
import { clampVolume, DEFAULT_PREFS, MAX_VOLUME_DB, MIN_VOLUME_DB, parseSoundPrefs, pluckSamples } from "./sound";

describe("sound preferences", () => {
  it("defaults to −12 dB, not muted", () => {
    expect(DEFAULT_PREFS).toEqual({ volumeDb: -12, muted: false, padSound: false });
    expect(parseSoundPrefs(null)).toEqual(DEFAULT_PREFS);
  });
  it("never lets a stored volume above the cap through", () => {
    expect(parseSoundPrefs(JSON.stringify({ volumeDb: 0, muted: false })).volumeDb).toBe(MAX_VOLUME_DB);
    expect(clampVolume(12)).toBe(MAX_VOLUME_DB);
    expect(clampVolume(-100)).toBe(MIN_VOLUME_DB);
    expect(clampVolume(Number.NaN)).toBe(-12);
    expect(clampVolume(-20.4)).toBe(-20);
  });
  it("survives whatever a browser may hold", () => {
    expect(parseSoundPrefs("not json")).toEqual(DEFAULT_PREFS);
    expect(parseSoundPrefs("null")).toEqual(DEFAULT_PREFS);
    expect(parseSoundPrefs(JSON.stringify({ volumeDb: "loud", muted: "yes" }))).toEqual(DEFAULT_PREFS);
    expect(parseSoundPrefs(JSON.stringify({ volumeDb: -30, muted: true }))).toEqual({ volumeDb: -30, muted: true, padSound: false });
    expect(parseSoundPrefs(JSON.stringify({ volumeDb: -30, muted: false, padSound: true })).padSound).toBe(true);
  });
});

/** Fundamental by autocorrelation with parabolic interpolation between lags. */
function measuredFrequency(samples: Float32Array, sampleRate: number, expected: number): number {
  const from = Math.floor((sampleRate / expected) * 0.8);
  const to = Math.ceil((sampleRate / expected) * 1.2);
  const start = Math.floor(sampleRate * 0.1);
  const windowLength = Math.floor(sampleRate * 0.3);
  const corr = (lag: number) => {
    let sum = 0;
    for (let i = start; i < start + windowLength; i++) sum += samples[i]! * samples[i + lag]!;
    return sum;
  };
  let best = from;
  for (let lag = from; lag <= to; lag++) if (corr(lag) > corr(best)) best = lag;
  const [a, b, c] = [corr(best - 1), corr(best), corr(best + 1)];
  return sampleRate / (best + (0.5 * (a - c)) / (a - 2 * b + c));
}

// A deterministic noise source, so the measured pitch does not vary from run to run.
function lcg(seed: number) {
  let s = seed;
  return () => (s = (s * 1664525 + 1013904223) % 2 ** 32) / 2 ** 32;
}

describe("pluckSamples", () => {
  const rate = 44_100;
  it.each([82.41, 329.63, 659.26, 1318.51])("sounds %f Hz within 5 cents", (hz) => {
    const samples = pluckSamples(hz, rate, 1, lcg(7));
    const cents = 1200 * Math.log2(measuredFrequency(samples, rate, hz) / hz);
    expect(Math.abs(cents)).toBeLessThan(5);
  });
  it("stays within full scale, decays, and ends silent", () => {
    const s = pluckSamples(196, rate, 1.8, lcg(3));
    expect(s.length).toBe(Math.round(1.8 * rate));
    const rms = (a: number, b: number) => Math.sqrt(s.slice(a, b).reduce((t, v) => t + v * v, 0) / (b - a));
    expect(Math.max(...s.map(Math.abs))).toBeLessThanOrEqual(0.8 + 1e-6);
    expect(rms(rate * 1.2, rate * 1.4)).toBeLessThan(rms(0, rate * 0.2) / 10);
    expect(Math.abs(s[s.length - 1]!)).toBeLessThan(1e-3);
  });
});
