import { describe, expect, it } from "vitest";
import { isNoteNaming, noteName, type NoteNaming } from "./naming";
import { parsePitch } from "./pitch";

const name = (written: string, naming: NoteNaming, octave = false) => noteName(parsePitch(written), naming, { octave });
/** Rows of a written note and its name in letters, solfège and German. */
const table = (rows: [string, string, string, string][], octave = false) =>
  it.each(rows)("%s: %s, %s, %s", (written, letters, solfege, german) => {
    expect(name(written, "letters", octave)).toBe(letters);
    expect(name(written, "solfege", octave)).toBe(solfege);
    expect(name(written, "german", octave)).toBe(german);
  });

// Every natural, in each naming. Letters: common practice in English, no source. Fixed-do solfège
// (C is always Do, "Si" not "Ti"): from memory, as taught in French, Italian and Spanish schools.
// German: from memory, as German school music theory writes them (H for B natural).
describe("the naturals", () => {
  table([
    ["C4", "C", "Do", "C"],
    ["D4", "D", "Re", "D"],
    ["E4", "E", "Mi", "E"],
    ["F4", "F", "Fa", "F"],
    ["G4", "G", "Sol", "G"],
    ["A4", "A", "La", "A"],
    ["B4", "B", "Si", "H"],
  ]);
});

// Sharps and flats. Solfège takes the signs after the syllable (from memory). German: -is for a
// sharp, -es for a flat, a vowel letter takes only -s (Es, As), double signs repeat the ending;
// from memory, the forms found in any German "Allgemeine Musiklehre".
describe("sharps and flats", () => {
  table([
    ["C#4", "C♯", "Do♯", "Cis"],
    ["D#4", "D♯", "Re♯", "Dis"],
    ["E#4", "E♯", "Mi♯", "Eis"],
    ["F#4", "F♯", "Fa♯", "Fis"],
    ["G#4", "G♯", "Sol♯", "Gis"],
    ["A#4", "A♯", "La♯", "Ais"],
    ["Cb4", "C♭", "Do♭", "Ces"],
    ["Db4", "D♭", "Re♭", "Des"],
    ["Eb4", "E♭", "Mi♭", "Es"],
    ["Fb4", "F♭", "Fa♭", "Fes"],
    ["Gb4", "G♭", "Sol♭", "Ges"],
    ["Ab4", "A♭", "La♭", "As"],
    ["F##4", "F𝄪", "Fa𝄪", "Fisis"],
    ["Dbb4", "D𝄫", "Re𝄫", "Deses"],
    ["Ebb4", "E𝄫", "Mi𝄫", "Eses"],
    ["Abb4", "A𝄫", "La𝄫", "Asas"],
  ]);
});

// The German B family, where English and German differ (from memory): B♮ is H, B♭ is B,
// B𝄫 is Heses, B♯ His, B𝄪 Hisis.
describe("German B and H", () => {
  it.each([
    ["B4", "H"],
    ["Bb4", "B"],
    ["Bbb4", "Heses"],
    ["B#4", "His"],
    ["B##4", "Hisis"],
  ])("%s is %s", (written, german) => {
    expect(name(written, "german")).toBe(german);
  });
  it("a letters B♭ and a German B are the same written note", () => {
    expect(name("Bb3", "letters")).toBe("B♭");
    expect(name("Bb3", "german")).toBe("B");
  });
});

describe("octave numbers", () => {
  // Scientific numbering (ISO 16 / ASA: middle C is C4) in every naming, so one written note has one number.
  table([
    ["G4", "G4", "Sol4", "G4"],
    ["F#5", "F♯5", "Fa♯5", "Fis5"],
    ["Bb3", "B♭3", "Si♭3", "B3"],
    ["B3", "B3", "Si3", "H3"],
    ["E2", "E2", "Mi2", "E2"],
  ], true);
});

describe("isNoteNaming", () => {
  it("knows the three namings and nothing else", () => {
    expect(["letters", "solfege", "german"].every(isNoteNaming)).toBe(true);
    expect(isNoteNaming("Solfège")).toBe(false);
    expect(isNoteNaming(undefined)).toBe(false);
  });
});
