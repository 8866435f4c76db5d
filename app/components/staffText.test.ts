import { describe, expect, it } from "vitest";
import { parsePitch } from "~/music/pitch";
import { accidentalFor, keySignatureWords, ledgerExtent, noteWords, staffPlace, staffWords } from "./staffText";

describe("staffPlace", () => {
  // Treble staff lines E4 G4 B4 D5 F5, spaces F4 A4 C5 E5 (common practice, no source).
  it.each([
    ["E4", "bottom line"],
    ["F4", "bottom space"],
    ["G4", "second line"],
    ["A4", "second space"],
    ["B4", "middle line"],
    ["C5", "third space"],
    ["D5", "fourth line"],
    ["E5", "top space"],
    ["F5", "top line"],
    ["G5", "above the top line"],
    ["A5", "first ledger line above"],
    ["B5", "above the first ledger line above"],
    ["C6", "second ledger line above"],
    ["D4", "below the bottom line"],
    ["C4", "first ledger line below"],
    ["B3", "below the first ledger line below"],
    ["A3", "second ledger line below"],
    ["F3", "third ledger line below"],
    ["E3", "below the third ledger line below"],
  ])("%s sits on the %s", (note, place) => {
    expect(staffPlace(parsePitch(note))).toBe(place);
  });

  it("ignores the accidental: the letter decides the place", () => {
    expect(staffPlace(parsePitch("F#5"))).toBe("top line");
    expect(staffPlace(parsePitch("Fb5"))).toBe("top line");
    expect(staffPlace(parsePitch("Cb5"))).toBe("third space");
  });
});

describe("ledgerExtent", () => {
  it("counts ledger lines on each side, as ledgerLineCount in the music engine does", () => {
    expect(ledgerExtent(["E4", "F5", "G5", "D4"].map(parsePitch))).toEqual({ above: 0, below: 0 });
    expect(ledgerExtent(["A5", "E3"].map(parsePitch))).toEqual({ above: 1, below: 3 });
    expect(ledgerExtent(["C6", "B5"].map(parsePitch))).toEqual({ above: 2, below: 0 });
    expect(ledgerExtent([])).toEqual({ above: 0, below: 0 });
  });
});

describe("accidentalFor", () => {
  it("prints nothing when the key signature already gives the note", () => {
    expect(accidentalFor(parsePitch("F#4"), 1)).toBeNull(); // G major has F♯
    expect(accidentalFor(parsePitch("Bb4"), -1)).toBeNull(); // F major has B♭
    expect(accidentalFor(parsePitch("C4"), 0)).toBeNull();
  });
  it("prints the sign the key signature does not give", () => {
    expect(accidentalFor(parsePitch("F4"), 1)).toBe("natural");
    expect(accidentalFor(parsePitch("C#5"), 1)).toBe("sharp");
    expect(accidentalFor(parsePitch("Db5"), 0)).toBe("flat");
    expect(accidentalFor(parsePitch("F##4"), 2)).toBe("double-sharp");
    expect(accidentalFor(parsePitch("Bbb3"), -1)).toBe("double-flat");
  });
});

describe("words", () => {
  it("names key signatures", () => {
    expect(keySignatureWords(0)).toBe("no sharps or flats");
    expect(keySignatureWords(1)).toBe("1 sharp");
    expect(keySignatureWords(-3)).toBe("3 flats");
  });
  it("says a note and its place", () => {
    expect(noteWords(parsePitch("F#5"), "sharp")).toBe("F sharp 5, top line");
    expect(noteWords(parsePitch("F5"), "natural")).toBe("F 5 (natural sign), top line");
  });
  it("describes the whole staff", () => {
    const pitch = parsePitch("F#5");
    expect(staffWords([{ pitch, printed: null }], 1, true)).toBe(
      "Treble clef with an 8 below, sounding an octave lower; key signature 1 sharp; F sharp 5, top line.",
    );
    expect(staffWords([], 0, false)).toBe("Treble clef; key signature no sharps or flats.");
  });
});
