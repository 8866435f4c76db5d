import { describe, expect, it } from "vitest";
import { parseMusicXml } from "~/music/musicxml";
import { BUILTIN_TUNES } from "./builtin";
import { barRoom, barsSoFar, engraveTune, systemBreaks, tuneWords, writtenValues, type EngravedBar } from "./engraving";
import { toStoredTune } from "./tunes.server";

// Hand-made MusicXML 4.0 fixtures with a plain treble clef, so <pitch> is the written note. Divisions 12 per quarter
// let eighths (6), sixteenths (3) and triplet eighths (4) all be whole numbers (MusicXML 4.0 <divisions>).
const xml = (bars: string[], attributes = "<time><beats>4</beats><beat-type>4</beat-type></time>") => `<?xml version="1.0" encoding="UTF-8"?>
<score-partwise version="4.0">
  <part-list><score-part id="P1"><part-name>Guitar</part-name></score-part></part-list>
  <part id="P1">${bars
    .map((body, i) => {
      const implicit = body.startsWith("pickup:");
      const inner = implicit ? body.slice("pickup:".length) : body;
      const head = i === 0 ? `<attributes><divisions>12</divisions><key><fifths>0</fifths></key>${attributes}<clef><sign>G</sign><line>2</line></clef></attributes>` : "";
      return `<measure number="${implicit ? 0 : i + 1}"${implicit ? ' implicit="yes"' : ""}>${head}${inner}</measure>`;
    })
    .join("")}</part>
</score-partwise>`;
const n = (pitch: string, duration: number, extra = "") => {
  const [, step, accidental, octave] = /^([A-G])(#|b)?(\d)$/.exec(pitch)!;
  const alter = accidental === "#" ? "<alter>1</alter>" : accidental === "b" ? "<alter>-1</alter>" : "";
  return `<note><pitch><step>${step}</step>${alter}<octave>${octave}</octave></pitch><duration>${duration}</duration>${extra}</note>`;
};
const rest = (duration: number) => `<note><rest/><duration>${duration}</duration></note>`;
const engrave = (text: string) => engraveTune(toStoredTune(parseMusicXml(text), "Fixture"));
const shape = (bar: EngravedBar) =>
  bar.events.map((e) => `${e.kind === "rest" ? "rest" : e.written}:${e.value}${".".repeat(e.dots)}${e.triplet ? "/3" : ""}${e.tieToNext ? "~" : ""}`);

describe("engraveTune: accidentals from the bar-aware routine (writeStaffBar)", () => {
  const bars = engrave(xml([`${n("C#5", 12)}${n("C5", 12)}${n("C5", 24)}`, n("C5", 48), n("C5", 48)]));

  it("draws C♯ then C♮ in one bar with the natural, holds the natural, and prints a courtesy natural after the bar line", () => {
    // MusicXML 4.0 <alter> gives the sounding alteration; the printed sign is Fretcall's rule (writeStaffBar).
    expect(bars[0]!.events.map((e) => e.accidental)).toEqual(["sharp", "natural", null]);
    expect(bars[1]!.events.map((e) => e.accidental)).toEqual(["natural"]); // courtesy: bar 1 had C♯5
    expect(bars[2]!.events.map((e) => e.accidental)).toEqual([null]);
  });

  it("prints no sign again on the continuation of a tie", () => {
    const tied = engrave(xml([`${rest(36)}${n("F#5", 12, '<tie type="start"/>')}`, `${n("F#5", 12, '<tie type="stop"/>')}${n("F#5", 12)}${rest(24)}`]));
    expect(shape(tied[1]!)).toEqual(["F#5:q", "F#5:q", "rest:h"]);
    // The tied quarter of bar 2 is the same note as bar 1's last (<tie type="start"/>…"stop"): no sign; the next F♯ needs one.
    expect(tied[1]!.events.map((e) => e.accidental)).toEqual([null, "sharp", null]);
    expect(tied[0]!.events.at(-1)!.tieToNext).toBe(true);
  });
});

describe("engraveTune: durations", () => {
  it("writes dotted notes, rests inside a bar, and triplets under one bracket", () => {
    const bars = engrave(
      xml([
        `${n("E5", 18, "<dot/>")}${n("D5", 6)}${rest(12)}${n("C5", 12)}`,
        // <time-modification> 3 in 2: each triplet eighth lasts 12 × 2/3 = 4 divisions.
        `${[n("C5", 4), n("D5", 4), n("E5", 4)].join("")}${n("F5", 12)}${n("G5", 24)}`,
      ]),
    );
    expect(shape(bars[0]!)).toEqual(["E5:q.", "D5:8", "rest:q", "C5:q"]);
    expect(shape(bars[1]!)).toEqual(["C5:8/3", "D5:8/3", "E5:8/3", "F5:q", "G5:h"]);
    expect(bars[1]!.events.map((e) => e.tuplet)).toEqual([0, 0, 0, null, null]);
  });

  it("ties a note over the bar line and at the beat when it starts off the beat", () => {
    // 3/4: a half note starting on the "and" of beat 1 is written eighth + dotted quarter tied at beat 2.
    const bars = engrave(xml([`${n("A4", 6)}${n("B4", 24)}${n("C5", 6, '<tie type="start"/>')}`, `${n("C5", 36, '<tie type="stop"/>')}`], "<time><beats>3</beats><beat-type>4</beat-type></time>"));
    expect(shape(bars[0]!)).toEqual(["A4:8", "B4:8~", "B4:q.", "C5:8~"]);
    expect(shape(bars[1]!)).toEqual(["C5:h."]);
  });

  it("fills an empty bar with one whole-bar rest whatever the meter", () => {
    const bars = engrave(xml([n("G4", 36), rest(36), n("G4", 36)], "<time><beats>3</beats><beat-type>4</beat-type></time>"));
    expect(bars[1]!.events).toMatchObject([{ kind: "rest", value: "w", wholeBar: true }]);
  });

  it.each([
    // [ticks from the downbeat, ticks, beat group, written]
    [0, 1440, 960, ["q.", 0]],
    [480, 960, 960, ["8", "8"]],
    [0, 320, 960, ["8/3"]],
  ])("writtenValues(%i, %i, %i)", (at, ticks, group, expected) => {
    const got = writtenValues(at, ticks, group).map((w) => `${w.value}${w.dots ? "." : ""}${w.triplet ? "/3" : ""}`);
    expect(got).toEqual(expected.filter((e) => e !== 0));
  });
});

describe("engraveTune: beams, pickups, bar lines", () => {
  const eighths = [..."CDEFGA"].map((l) => n(`${l}5`, 6)).join("");
  it("groups six eighths by dotted quarter in 6/8 and by quarter in 3/4", () => {
    // Common practice, no source: beams show the beat, and 6/8's beat is the dotted quarter (MusicXML 4.0 <time>).
    const sixEight = engrave(xml([eighths], "<time><beats>6</beats><beat-type>8</beat-type></time>"));
    const threeFour = engrave(xml([eighths], "<time><beats>3</beats><beat-type>4</beat-type></time>"));
    expect(sixEight[0]!.events.map((e) => e.beamGroup)).toEqual([0, 0, 0, 1, 1, 1]);
    expect(threeFour[0]!.events.map((e) => e.beamGroup)).toEqual([0, 0, 1, 1, 2, 2]);
  });

  it("draws a pickup as short as it is, its beat groups counted from the downbeat it leads to", () => {
    // implicit="yes" (MusicXML 4.0 <measure>): a pickup, not a full bar. Two eighths before a 6/8 downbeat are
    // the second dotted-quarter beat's last two eighths, so they share a beam group.
    const bars = engrave(xml([`pickup:${n("E5", 6)}${n("F5", 6)}`, n("G5", 36)], "<time><beats>6</beats><beat-type>8</beat-type></time>"));
    expect(bars[0]).toMatchObject({ pickup: true, showTime: true });
    expect(shape(bars[0]!)).toEqual(["E5:8", "F5:8"]);
    expect(bars[0]!.events.map((e) => e.beamGroup)).toEqual([1, 1]);
    expect(shape(bars[1]!)).toEqual(["G5:h."]);
  });

  it("keeps repeat bar lines and volta brackets as written, and key and time changes", () => {
    const bars = engrave(
      xml([
        `<barline location="left"><bar-style>heavy-light</bar-style><repeat direction="forward"/></barline>${n("C5", 48)}`,
        `<barline location="left"><ending number="1" type="start"/></barline>${n("D5", 48)}`,
        `${n("E5", 48)}<barline location="right"><bar-style>light-heavy</bar-style><ending number="1" type="stop"/><repeat direction="backward"/></barline>`,
        `<barline location="left"><ending number="2" type="start"/></barline><attributes><key><fifths>1</fifths></key><time><beats>3</beats><beat-type>4</beat-type></time></attributes>${n("F#5", 36)}<barline location="right"><ending number="2" type="discontinue"/></barline>`,
        n("G5", 36),
      ]),
    );
    // <repeat direction="forward"|"backward"> and <ending type="start"|"stop"|"discontinue"> (MusicXML 4.0 <barline>).
    expect(bars.map((b) => [b.repeatStart, b.repeatEnd, b.volta])).toEqual([
      [true, false, null],
      [false, false, { part: "begin", number: "1" }],
      [false, true, { part: "end", number: "1" }],
      [false, false, { part: "begin-open-end", number: "2" }],
      [false, false, null],
    ]);
    expect(bars.map((b) => [b.keyChange, b.showTime, b.final])).toEqual([
      [false, true, false],
      [false, false, false],
      [false, false, false],
      [true, true, false],
      [false, false, true],
    ]);
    expect(bars[3]!.events[0]!.accidental).toBeNull(); // F♯ is in the new key of G
  });
});

describe("engraveTune: built-in tunes and systems", () => {
  const lantern = engraveTune(BUILTIN_TUNES[0]!);

  it("engraves a built-in tune bar after bar in its meter", () => {
    expect(lantern).toHaveLength(8);
    expect(shape(lantern[1]!)).toEqual(["C5:h", "B4:q", "A4:q"]);
    expect(shape(lantern[3]!)).toEqual(["E4:h.", "G4:q"]);
    expect(lantern[7]!.final).toBe(true);
  });

  it("wraps into several systems on a 360 px phone and fewer on a projector, never past the line", () => {
    const phone = systemBreaks(lantern, 340);
    const projector = systemBreaks(lantern, 1800);
    expect(phone.length).toBeGreaterThanOrEqual(3);
    expect(projector).toHaveLength(1);
    for (const system of phone) {
      const used = system.reduce((sum, bar, i) => sum + barRoom(bar, i === 0), 0);
      expect(used).toBeLessThanOrEqual(340);
    }
    expect(phone.flat().map((b) => b.bar)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
  });

  it("says the engraving in words", () => {
    expect(tuneWords(lantern.slice(0, 1))).toBe("Treble clef with an 8 below; 4/4 time; bar 1: E 4 quarter, G 4 quarter, A 4 quarter, G 4 quarter.");
  });
});

describe("barsSoFar: a Tune walk's melody so far", () => {
  const lantern = engraveTune(BUILTIN_TUNES[0]!);
  it("ends just after the asked note, with no rests standing in for the notes to come and no closing bar line", () => {
    // Lantern Walk walked from bar 2, asked at the third note of bar 3 (F4, the tune's tenth): "C5:2 B4:1 A4:1", "G4:1 E4:1 F4:1 D4:1".
    const bars = barsSoFar(lantern, 2, 9);
    expect(bars.map((b) => b.bar)).toEqual([2, 3]);
    expect(shape(bars[1]!)).toEqual(["G4:q", "E4:q", "F4:q"]);
    expect(bars[1]!.open).toBe(true);
    expect(bars[1]!.final).toBe(false);
    expect(bars[0]!.showTime).toBe(true);
  });

  it("keeps a whole bar whole when the asked note ends it, rests inside it included", () => {
    const bars = barsSoFar(engrave(xml([n("G4", 12) + rest(12) + n("A4", 24), n("B4", 48)])), 1, 1);
    expect(bars).toHaveLength(1);
    expect(shape(bars[0]!)).toEqual(["G4:q", "rest:q", "A4:h"]);
    expect(bars[0]!.open).toBe(false);
  });
});
