import { describe, expect, it } from "vitest";
import { NoteDetector, type HeardNote } from "./detector";
import { mix, pluck, roomNoise, type PluckOptions } from "./synth";

// Ground truth by the test's own arithmetic: 12-TET from A4 = 440 Hz (ISO 16), MIDI 1.0 numbers (A4 = 69, E2 = 40).
const hzOf = (midi: number, cents = 0) => 440 * Math.pow(2, (midi - 69) / 12 + cents / 1200);
const SR = 48_000;
// The caller's clock starts anywhere; the detector must keep to it.
const CLOCK_MS = 10_000;
// Plucked partials are stretched by string stiffness, so a real or synthetic string reads a few cents sharp of its
// fundamental; readings within this of the fundamental are right (a tuner's usual display step is 1–5 cents, from memory).
const CENTS_TOLERANCE = 8;
// The attack is placed to the sample in the synthetic signal; the detector must find it within this.
const ONSET_TOLERANCE_MS = 3;

function listen(samples: Float32Array, opts: { chunk?: number; sampleRate?: number } = {}): HeardNote[] {
  const sampleRate = opts.sampleRate ?? SR;
  const chunk = opts.chunk ?? 128;
  const detector = new NoteDetector({ sampleRate });
  const heard: HeardNote[] = [];
  for (let i = 0; i < samples.length; i += chunk) {
    heard.push(...detector.push(samples.subarray(i, i + chunk), CLOCK_MS + (i * 1000) / sampleRate));
  }
  return heard;
}

/** One note plucked at 200 ms in a buffer of 1.2 s. */
const note = (midi: number, extra: Partial<PluckOptions> = {}) => pluck({ hz: hzOf(midi), seconds: 1.2, sampleRate: SR, startSeconds: 0.2, ...extra });

describe("NoteDetector: the guitar's range, E2 to E6 sounding", () => {
  // Every note from the open low E (MIDI 40) to E6 (MIDI 88), the 24th fret of string 1.
  const range = Array.from({ length: 49 }, (_, i) => 40 + i);
  it.each(range)("MIDI %i is heard once, at its pitch, from its attack", (midi) => {
    const heard = listen(note(midi));
    expect(heard).toHaveLength(1);
    expect(heard[0]!.midi).toBe(midi);
    expect(Math.abs(heard[0]!.cents)).toBeLessThanOrEqual(CENTS_TOLERANCE);
    expect(Math.abs(heard[0]!.onsetMs - (CLOCK_MS + 200))).toBeLessThanOrEqual(ONSET_TOLERANCE_MS);
    // Counted once stable (90 ms) after half a 42 ms window is past the attack, within a few 5 ms hops.
    expect(heard[0]!.countedMs - heard[0]!.onsetMs).toBeGreaterThanOrEqual(90);
    expect(heard[0]!.countedMs - heard[0]!.onsetMs).toBeLessThanOrEqual(140);
  });

  it.each([
    [40, 20], [40, -20], [45, 20], [52, -20], [57, 20], [64, -20], [71, 20], [76, -20], [88, 20],
  ])("MIDI %i detuned %i cents keeps its note and reads the detuning", (midi, cents) => {
    const heard = listen(note(midi, { hz: hzOf(midi, cents) }));
    expect(heard).toHaveLength(1);
    expect(heard[0]!.midi).toBe(midi);
    expect(Math.abs(heard[0]!.cents - cents)).toBeLessThanOrEqual(CENTS_TOLERANCE);
    expect(heard[0]!.hz / hzOf(midi, cents)).toBeCloseTo(1, 2);
  });

  it("hears the same at 44.1 kHz and in any block size", () => {
    const at44 = pluck({ hz: hzOf(43), seconds: 1.2, sampleRate: 44_100, startSeconds: 0.2 });
    for (const chunk of [128, 1000, 4410]) {
      const heard = listen(at44, { chunk, sampleRate: 44_100 });
      expect(heard.map((n) => n.midi)).toEqual([43]);
      expect(Math.abs(heard[0]!.onsetMs - (CLOCK_MS + 200))).toBeLessThanOrEqual(ONSET_TOLERANCE_MS);
    }
  });
});

describe("NoteDetector: octave errors on the low strings", () => {
  // E2, F2, G2, A2, B2, C3, D3 (MIDI 1.0: 40, 41, 43, 45, 47, 48, 50): the open and low-fret notes of strings 6 and 5.
  const low = [40, 41, 43, 45, 47, 48, 50];
  it.each(low)("MIDI %i with a weak fundamental (−26 dB) and a strong 2nd harmonic is not heard an octave up", (midi) => {
    const heard = listen(note(midi, { fundamentalGain: 0.05, secondHarmonicGain: 2  }));
    expect(heard.map((n) => n.midi)).toEqual([midi]);
  });

  it.each(low)("MIDI %i with no fundamental at all is still heard at its pitch, as the ear hears it", (midi) => {
    const heard = listen(note(midi, { fundamentalGain: 0  }));
    expect(heard.map((n) => n.midi)).toEqual([midi]);
  });

  it.each([52, 55, 59, 64, 76])("MIDI %i, a real octave higher, is not pulled down to a subharmonic", (midi) => {
    // Plucked at the middle, a string has only odd partials: the pattern most like a note an octave lower with a gap.
    const heard = listen(note(midi, { pluckPosition: 0.5  }));
    expect(heard.map((n) => n.midi)).toEqual([midi]);
  });
});

describe("NoteDetector: a real room", () => {
  it.each([
    [40, 0.005], [45, 0.01], [55, 0.01], [64, 0.02], [76, 0.02],
  ])("MIDI %i through room noise at RMS %f", (midi, rms) => {
    const heard = listen(mix(note(midi), roomNoise({ seconds: 1.2, sampleRate: SR, rms, seed: midi })));
    expect(heard.map((n) => n.midi)).toEqual([midi]);
    expect(Math.abs(heard[0]!.cents)).toBeLessThanOrEqual(CENTS_TOLERANCE);
    expect(Math.abs(heard[0]!.onsetMs - (CLOCK_MS + 200))).toBeLessThanOrEqual(ONSET_TOLERANCE_MS);
  });

  it("noise alone is never a note", () => {
    expect(listen(roomNoise({ seconds: 2, sampleRate: SR, rms: 0.02 }))).toEqual([]);
    expect(listen(new Float32Array(SR))).toEqual([]);
  });

  it.each([
    [45, 50, "the open A string still ringing under a D3"],
    [40, 55, "the low E ringing under a G3"],
    [52, 57, "an E3 ringing under an A3 (a fourth apart)"],
    [57, 64, "an A3 ringing under an E4 (a fifth apart)"],
  ])("a second string ringing: %i then %i (%s)", (first, second) => {
    const ringing = pluck({ hz: hzOf(first), seconds: 1.6, sampleRate: SR, startSeconds: 0.1, decaySeconds: 3, seed: 2 });
    const played = pluck({ hz: hzOf(second), seconds: 1.6, sampleRate: SR, startSeconds: 0.7, seed: 3 });
    const heard = listen(mix(ringing, played, roomNoise({ seconds: 1.6, sampleRate: SR, rms: 0.003 })));
    expect(heard.map((n) => n.midi)).toEqual([first, second]);
    expect(Math.abs(heard[1]!.onsetMs - (CLOCK_MS + 700))).toBeLessThanOrEqual(ONSET_TOLERANCE_MS);
  });

  it("a quieter string ringing in sympathy (−12 dB) does not take over the played note", () => {
    const played = note(50);
    const sympathetic = note(45, { amplitude: 0.125, attackNoise: 0  });
    expect(listen(mix(played, sympathetic)).map((n) => n.midi)).toEqual([50]);
  });
});

describe("NoteDetector: each note counts once", () => {
  it("one long note, ringing for three seconds into the noise, counts once", () => {
    const long = pluck({ hz: hzOf(45), seconds: 4, sampleRate: SR, startSeconds: 0.2, decaySeconds: 2.5 });
    expect(listen(mix(long, roomNoise({ seconds: 4, sampleRate: SR, rms: 0.002 })))).toHaveLength(1);
  });

  it("the same note plucked again while it rings counts again, from the second attack", () => {
    const first = pluck({ hz: hzOf(52), seconds: 0.8, sampleRate: SR, startSeconds: 0.2 });
    const again = pluck({ hz: hzOf(52), seconds: 1.6, sampleRate: SR, startSeconds: 0.8, seed: 5 });
    // The pick stops the string as it plucks it again: the first sound ends where the second begins.
    first.fill(0, Math.round(0.8 * SR));
    const heard = listen(mix(first, again));
    expect(heard.map((n) => n.midi)).toEqual([52, 52]);
    expect(Math.abs(heard[1]!.onsetMs - (CLOCK_MS + 800))).toBeLessThanOrEqual(ONSET_TOLERANCE_MS);
  });

  it("a note, silence, then the same note counts twice", () => {
    const first = pluck({ hz: hzOf(57), seconds: 0.6, sampleRate: SR, startSeconds: 0.1, decaySeconds: 0.08 });
    const second = pluck({ hz: hzOf(57), seconds: 1.6, sampleRate: SR, startSeconds: 1.0 });
    const heard = listen(mix(first, second));
    expect(heard.map((n) => n.midi)).toEqual([57, 57]);
    expect(Math.abs(heard[1]!.onsetMs - (CLOCK_MS + 1000))).toBeLessThanOrEqual(ONSET_TOLERANCE_MS);
  });

  it("a quick run of different notes counts each one", () => {
    const midis = [55, 57, 59, 60, 62];
    const parts = midis.map((midi, i) => {
      const full = pluck({ hz: hzOf(midi), seconds: 1.6, sampleRate: SR, startSeconds: 0.1 + i * 0.25, seed: i + 1 });
      // Each note is stopped by the next (fretting hand lifts): cut at the next attack.
      const end = Math.round((0.1 + (i + 1) * 0.25) * SR);
      if (i < midis.length - 1) full.fill(0, end);
      return full;
    });
    const heard = listen(mix(...parts));
    expect(heard.map((n) => n.midi)).toEqual(midis);
    heard.forEach((n, i) => expect(Math.abs(n.onsetMs - (CLOCK_MS + 100 + i * 250))).toBeLessThanOrEqual(ONSET_TOLERANCE_MS));
  });

  it("reset forgets the note in progress and the clock", () => {
    const detector = new NoteDetector({ sampleRate: SR });
    const sound = note(64);
    expect(detector.push(sound, 0)).toHaveLength(1);
    expect(detector.current?.midi).toBe(64);
    expect(detector.level).toBeGreaterThan(0);
    detector.reset();
    expect(detector.current).toBeNull();
    expect(detector.level).toBe(0);
    expect(detector.push(sound, 5000).map((n) => Math.round(n.onsetMs))).toEqual([5200]);
  });
});
