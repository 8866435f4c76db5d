import { describe, expect, it } from "vitest";
import {
  displayPitch,
  midiFrequency,
  MusicError,
  parsePitch,
  pitchMidi,
  pitchToString,
  spokenPitch,
  toPitch,
  type Pitch,
} from "./pitch";

describe("parsePitch", () => {
  it.each([
    ["F#5", { letter: "F", alter: 1, octave: 5 }],
    ["Db4", { letter: "D", alter: -1, octave: 4 }],
    ["Fx4", { letter: "F", alter: 2, octave: 4 }],
    ["F##4", { letter: "F", alter: 2, octave: 4 }],
    ["Cb5", { letter: "C", alter: -1, octave: 5 }],
    ["Bbb3", { letter: "B", alter: -2, octave: 3 }],
    ["F♯5", { letter: "F", alter: 1, octave: 5 }],
    ["D♭4", { letter: "D", alter: -1, octave: 4 }],
    ["F𝄪4", { letter: "F", alter: 2, octave: 4 }],
    ["B𝄫3", { letter: "B", alter: -2, octave: 3 }],
    ["E♮4", { letter: "E", alter: 0, octave: 4 }],
    [" g4 ", { letter: "G", alter: 0, octave: 4 }],
    ["bb3", { letter: "B", alter: -1, octave: 3 }],
    ["C-1", { letter: "C", alter: 0, octave: -1 }],
  ])("%s", (text, pitch) => {
    expect(parsePitch(text)).toEqual(pitch);
  });

  it.each([
    ["", /Empty pitch/],
    ["   ", /Empty pitch/],
    ["H4", /must start with a letter A to G/],
    ["F#", /has no octave number/],
    ["F#b4", /mixes sharps and flats/],
    ["F###4", /more than a double sharp/],
    ["Bbbb3", /more than a double flat/],
    ["F?4", /"\?" is not an accidental/],
    ["C10", /octave must be a whole number from -1 to 9/],
    ["Cb-1", /outside the MIDI range/],
    ["G#9", /outside the MIDI range/],
  ])("rejects %j", (text, message) => {
    expect(() => parsePitch(text)).toThrow(MusicError);
    expect(() => parsePitch(text)).toThrow(message);
  });

  it("rejects non-text and malformed Pitch objects with a MusicError", () => {
    expect(() => parsePitch(42 as unknown as string)).toThrow(/must be text/);
    expect(() => toPitch({ letter: "H", alter: 0, octave: 4 } as unknown as Pitch)).toThrow(/letter must be one of A to G/);
    expect(() => toPitch({ letter: "C", alter: 3, octave: 4 })).toThrow(/between a double flat and a double sharp/);
    expect(() => toPitch({ letter: "C", alter: 0, octave: 4.5 })).toThrow(/octave must be a whole number/);
  });
});

describe("spelling", () => {
  it.each([
    ["F#5", "F#5", "F♯5", "F sharp 5"],
    ["Bb3", "Bb3", "B♭3", "B flat 3"],
    ["Fx4", "F##4", "F𝄪4", "F double sharp 4"],
    ["B𝄫3", "Bbb3", "B𝄫3", "B double flat 3"],
    ["C4", "C4", "C4", "C 4"],
  ])("%s → %s, %s, %s", (text, ascii, display, spoken) => {
    const p = parsePitch(text);
    expect(pitchToString(p)).toBe(ascii);
    expect(displayPitch(p)).toBe(display);
    expect(spokenPitch(p)).toBe(spoken);
    expect(parsePitch(pitchToString(p))).toEqual(p);
  });
});

describe("pitchMidi", () => {
  it.each([
    ["C4", 60], // MIDI 1.0 Detailed Specification: middle C = note 60
    ["A4", 69], // MIDI 1.0 Detailed Specification: A440 = note 69
    ["C-1", 0], // MIDI 1.0 Detailed Specification: lowest note 0
    ["G9", 127], // MIDI 1.0 Detailed Specification: highest note 127
    ["Cb4", 59], // common practice, no source: C flat is a half step below C, the octave follows the letter
    ["B#3", 60], // common practice, no source: B sharp 3 is middle C
    ["E#4", 65],
    ["Fb4", 64],
    ["Bbb3", 57],
    ["Fx4", 67],
  ])("%s = %i", (text, midi) => {
    expect(pitchMidi(parsePitch(text))).toBe(midi);
  });
});

describe("midiFrequency", () => {
  it.each([
    [69, 440], // ISO 16:1975: A4 = 440 Hz
    [81, 880], // ISO 16 A4 plus one octave (frequency doubles)
    [57, 220], // ISO 16 A4 minus one octave
    [60, 261.6255653005986], // 12-TET from ISO 16: 440 × 2^(−9/12)
  ])("MIDI %i = %f Hz", (midi, hz) => {
    expect(midiFrequency(midi)).toBeCloseTo(hz, 9);
  });

  it("rejects a non-number", () => {
    expect(() => midiFrequency(Number.NaN)).toThrow(/finite number/);
  });
});
