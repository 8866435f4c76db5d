import { describe, expect, it } from "vitest";
import { MusicError } from "~/music/pitch";
import { centsBetween, hzToMidi, midiToHz, nearestNote } from "./pitch";

// Ground truth by the test's own arithmetic: 12-TET, f = 440 · 2^((n − 69) / 12) with A4 = 440 Hz (ISO 16)
// and A4 = MIDI 69, middle C = MIDI 60 (MIDI 1.0 note numbers).
const tet = (n: number, a4 = 440) => a4 * Math.pow(2, (n - 69) / 12);

describe("hzToMidi and midiToHz", () => {
  it.each([
    [440, 69], // ISO 16: A4 = 440 Hz; MIDI 1.0: A4 = 69
    [261.6255653, 60], // middle C, MIDI 1.0 = 60; frequency by 12-TET arithmetic
    [82.4068892, 40], // E2, the low string (12-TET arithmetic from A4 = 440)
    [1318.510228, 88], // E6 (12-TET arithmetic)
    [880, 81], // an octave doubles the frequency (independent arithmetic)
  ])("%f Hz is MIDI %i", (hz, midi) => {
    expect(hzToMidi(hz)).toBeCloseTo(midi, 6);
    expect(midiToHz(midi)).toBeCloseTo(hz, 4);
  });

  it("moves with the reference: at A4 = 442 Hz, 442 Hz is A4 (independent arithmetic)", () => {
    expect(hzToMidi(442, 442)).toBeCloseTo(69, 9);
    expect(midiToHz(60, 442)).toBeCloseTo(tet(60, 442), 9);
  });

  it.each([0, -5, Number.NaN, Number.POSITIVE_INFINITY])("refuses %f Hz with a clear error", (hz) => {
    expect(() => hzToMidi(hz)).toThrow(MusicError);
    expect(() => hzToMidi(440, hz)).toThrow(/reference A4/);
  });
});

describe("nearestNote", () => {
  it.each([
    [tet(40) * Math.pow(2, 20 / 1200), 40, 20], // E2 20 cents sharp (12-TET arithmetic)
    [tet(40) * Math.pow(2, -20 / 1200), 40, -20], // E2 20 cents flat
    [tet(64) * Math.pow(2, 49 / 1200), 64, 49], // just under the half step: still E4
    [tet(64) * Math.pow(2, 51 / 1200), 65, -49], // just over: F4
    [445, 69, 1200 * Math.log2(445 / 440)], // 19.56 cents sharp of A4 (independent arithmetic)
  ])("%f Hz → MIDI %i at %f cents", (hz, midi, cents) => {
    const note = nearestNote(hz);
    expect(note.midi).toBe(midi);
    expect(note.cents).toBeCloseTo(cents, 6);
  });

  it("measures cents between two frequencies: an octave is 1200 (definition of the cent)", () => {
    expect(centsBetween(220, 440)).toBeCloseTo(1200, 9);
    expect(centsBetween(440, 220)).toBeCloseTo(-1200, 9);
  });
});
