import { describe, expect, it } from "vitest";
import { heardAtMs, inputLatencyMs, stampClocks } from "./clock";

describe("stampClocks", () => {
  it("pairs the clocks at the moment of processing: the output timestamp minus the output path's latency", () => {
    // Frame at context 2.000 s leaves the speaker at page time 5040 ms; 10 ms base + 20 ms output latency before that it was processed.
    const stamp = stampClocks(
      { currentTime: 2.01, baseLatency: 0.01, outputLatency: 0.02, getOutputTimestamp: () => ({ contextTime: 2, performanceTime: 5040 }) },
      9999,
    );
    expect(stamp).toEqual({ contextMs: 2000, performanceMs: 5010 });
  });

  it.each([
    ["no getOutputTimestamp", undefined],
    ["a context not yet running (performanceTime 0)", () => ({ contextTime: 0, performanceTime: 0 })],
  ])("falls back to currentTime read now with %s", (_, getOutputTimestamp) => {
    expect(stampClocks({ currentTime: 1.5, baseLatency: 0.01, getOutputTimestamp }, 800)).toEqual({ contextMs: 1500, performanceMs: 800 });
  });
});

describe("heardAtMs", () => {
  it("moves a context time to page time and takes off the input latency", () => {
    // 250 ms after the stamp in the context clock is 250 ms after it on the page; the sound reached the microphone 12 ms before.
    expect(heardAtMs(2250, { contextMs: 2000, performanceMs: 5010 }, 12)).toBe(5248);
  });
});

describe("inputLatencyMs", () => {
  it.each([
    [0.012, 0.005, 12, "the track's own latency when the browser reports it"],
    [0, 0.005, 0, "a reported zero is a measurement, not a gap"],
    [undefined, 0.005, 5, "the context's base latency otherwise"],
    [Number.NaN, undefined, 0, "nothing at all: no correction"],
    [undefined, -1, 0, "never negative"],
  ])("%s, %s → %s ms (%s)", (track, base, expected, _why) => {
    expect(inputLatencyMs(track, base)).toBeCloseTo(expected, 9);
  });
});
