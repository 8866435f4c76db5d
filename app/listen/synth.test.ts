import { describe, expect, it } from "vitest";
import { encodeWav, mix, pluck, roomNoise } from "./synth";

describe("pluck", () => {
  it("is silent before its attack, peaks after it and decays", () => {
    const sound = pluck({ hz: 110, seconds: 1, sampleRate: 8000, startSeconds: 0.25, decaySeconds: 0.3 });
    expect(sound).toHaveLength(8000);
    expect(sound.subarray(0, 2000).every((x) => x === 0)).toBe(true);
    const rms = (a: Float32Array) => Math.sqrt(a.reduce((s, x) => s + x * x, 0) / a.length);
    expect(rms(sound.subarray(2000, 2400))).toBeGreaterThan(3 * rms(sound.subarray(7600)));
  });

  it("is the same for the same seed", () => {
    const a = pluck({ hz: 220, seconds: 0.1, sampleRate: 8000, seed: 3 });
    expect(pluck({ hz: 220, seconds: 0.1, sampleRate: 8000, seed: 3 })).toEqual(a);
    expect(pluck({ hz: 220, seconds: 0.1, sampleRate: 8000, seed: 4 })).not.toEqual(a);
  });
});

describe("roomNoise and mix", () => {
  it("has the asked RMS and sums tracks to the longest", () => {
    const noise = roomNoise({ seconds: 1, sampleRate: 48_000, rms: 0.02 });
    expect(Math.sqrt(noise.reduce((s, x) => s + x * x, 0) / noise.length)).toBeCloseTo(0.02, 3);
    expect(Array.from(mix(Float32Array.of(1, 2), Float32Array.of(0.5)))).toEqual([1.5, 2]);
  });
});

describe("encodeWav", () => {
  it("writes a 16-bit PCM mono RIFF/WAVE file (the canonical 44-byte header, from memory)", () => {
    const bytes = encodeWav(Float32Array.of(0, 1, -1, 2, 0.5), 44_100);
    const view = new DataView(bytes.buffer);
    const text = (at: number, n: number) => String.fromCharCode(...bytes.subarray(at, at + n));
    expect(bytes).toHaveLength(44 + 10);
    expect([text(0, 4), text(8, 4), text(12, 4), text(36, 4)]).toEqual(["RIFF", "WAVE", "fmt ", "data"]);
    expect(view.getUint32(4, true)).toBe(36 + 10);
    expect([view.getUint16(20, true), view.getUint16(22, true), view.getUint32(24, true)]).toEqual([1, 1, 44_100]);
    expect([view.getUint32(28, true), view.getUint16(32, true), view.getUint16(34, true)]).toEqual([88_200, 2, 16]);
    expect(view.getUint32(40, true)).toBe(10);
    // Full scale both ways, out-of-range clipped, half scale rounded.
    expect([0, 1, 2, 3, 4].map((i) => view.getInt16(44 + 2 * i, true))).toEqual([0, 32767, -32768, 32767, 16384]);
  });
});
