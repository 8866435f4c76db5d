import { describe, expect, it } from "vitest";
import { parseMusicXml } from "~/music/musicxml";
import { BUILTIN_TUNES, type TuneNote } from "~/tunes/builtin";
import { toStoredTune } from "~/tunes/tunes.server";
import { beatMs, DEFAULT_TEMPO, defaultTempo, gradeOf, scoreTaps, timeline } from "./rhythm";

const n = (pitch: string, beats: number, bar: number) => ({ pitch, beats, bar });
const lantern = BUILTIN_TUNES.find((t) => t.id === "lantern-walk")!;
/** A tune without a stored score: bars of four quarter notes. */
const plain = (notes: TuneNote[], beatsPerBar = 4) => ({ notes, beatsPerBar });

describe("the timeline", () => {
  it("tempo 90: a beat is 60 000 / 90 = 666.7 ms, and the tune starts after one bar of count-in", () => {
    expect(beatMs(90)).toBeCloseTo(666.667, 3);
    // Lantern Walk, 4/4, bar 1 "E4:1 G4:1 A4:1 G4:1", bar 2 "C5:2 B4:1 A4:1".
    // Count-in: 4 beats × 666.7 = 2666.7 ms. Then each onset is the one before plus its length:
    //   E4 2666.7, G4 3333.3, A4 4000.0, G4 4666.7, C5 5333.3 (bar 2 starts at 8 × 666.7),
    //   B4 5333.3 + 2 × 666.7 = 6666.7 (C5 lasts two beats), A4 7333.3.
    const t = timeline(lantern, 90);
    expect(t.onsets.slice(0, 7).map(Math.round)).toEqual([2667, 3333, 4000, 4667, 5333, 6667, 7333]);
    // 8 bars × 4 beats = 32 beats after the count-in: (4 + 32) × 666.7 = 24 000 ms.
    expect(Math.round(t.endMs)).toBe(24_000);
    // A click on every beat, the count-in included: 36, accented on each bar line (every 4th).
    expect(t.clicks).toHaveLength(36);
    expect(t.clicks.filter((c) => c.accent).map((c) => Math.round(c.at))).toEqual([0, 2667, 5333, 8000, 10667, 13333, 16000, 18667, 21333]);
  });

  it("tempo 60 in 3/4: a beat is exactly 1000 ms, the count-in 3000 ms", () => {
    // Harbour Bells bar 1 "G4:1 B4:1 D5:1", bar 2 "F#5:2 E5:1": onsets 3000, 4000, 5000, 6000, then 6000 + 2000.
    const harbour = BUILTIN_TUNES.find((t) => t.id === "harbour-bells")!;
    expect(timeline(harbour, 60).onsets.slice(0, 5)).toEqual([3000, 4000, 5000, 6000, 8000]);
  });

  it("a short first bar is a pickup: it ends on the next bar line, inside the count-in", () => {
    // 4/4 at 120 bpm: a beat is 60 000 / 120 = 500 ms, the count-in 4 × 500 = 2000 ms.
    // Pickup of one beat (bar 0: G4:1) lands on the count-in's fourth beat: (4 − 1) × 500 = 1500 ms;
    // bar 1 (C5:4) starts on the bar line at 2000 ms.
    expect(timeline(plain([n("G4", 1, 0), n("C5", 4, 1)]), 120).onsets).toEqual([1500, 2000]);
  });

  it("a bar that does not fill up leaves its rest at the end; a skipped bar number is a bar of rest", () => {
    // 4/4 at 120 bpm (500 ms a beat). Bar 1: E4:4 → 2000. Bar 2: C5:2 G4:1 (a beat of rest after) → 4000, 5000.
    // Bar 3 starts on its bar line: (4 + 8) × 500 = 6000. Bar 4 is all rest, so bar 5's A4 is at (4 + 16) × 500 = 10 000.
    const notes = [n("E4", 4, 1), n("C5", 2, 2), n("G4", 1, 2), n("E4", 4, 3), n("A4", 1, 5)];
    expect(timeline(plain(notes), 120).onsets).toEqual([2000, 4000, 5000, 6000, 10_000]);
  });

  it("refuses a tempo outside 40–160 bpm and a tune without notes", () => {
    expect(() => beatMs(20)).toThrow(/40 to 160/);
    expect(() => timeline(plain([]), 90)).toThrow(/no notes/);
  });
});

describe("scoring taps", () => {
  it.each([
    // offset = tap − expected; ±80 on time, ±160 close, else early/late
    [0, "on-time"],
    [80, "on-time"],
    [-81, "close"],
    [160, "close"],
    [-161, "early"],
    [250, "late"],
  ] as const)("an offset of %i ms is %s", (offset, grade) => expect(gradeOf(offset)).toBe(grade));

  it("a hand-worked pass: on time, close, late, early and missed, with the score", () => {
    // Lantern Walk bar 1 and 2 only, at 90 bpm: onsets 2666.7, 3333.3, 4000, 4666.7, 5333.3, 6666.7, 7333.3 (above).
    const notes = lantern.notes.slice(0, 7);
    const taps = [
      2700, //   E4: +33.3 → on time
      3450, //   G4: +116.7 → close
      4200, //   A4: +200 → late (window: half the 666.7 ms gap = 333.3 ms, capped at 400)
      4400, //   G4: −266.7 → early
      //         C5: no tap within ±333.3 of 5333.3 → missed
      6650, //   B4: −16.7 → on time
      7333, //   A4: −0.3 → on time
      9000, //   matches nothing (the last note's window ends at 7333.3 + 333.3) → extra
    ];
    const result = scoreTaps(plain(notes), 90, taps);
    expect(result.notes.map((r) => [r.grade, r.offsetMs])).toEqual([
      ["on-time", 33],
      ["close", 117],
      ["late", 200],
      ["early", -267],
      ["missed", null],
      ["on-time", -17],
      ["on-time", 0],
    ]);
    expect(result.extraTaps).toBe(1);
    // Points: 3 on time × 1 + 1 close × ½ − 1 extra × ½ = 3; 3 ÷ 7 notes = 42.9 % → 43.
    expect(result.score).toBe(43);
    // Mean of the six matched offsets: (33.3 + 116.7 + 200 − 266.7 − 16.7 − 0.3) ÷ 6 = 66.3 ÷ 6 = 11.05 → 11.
    expect(result.meanOffsetMs).toBe(11);
  });

  it("a perfect pass scores 100; no taps score 0; mashing the button cannot score well", () => {
    const notes = lantern.notes.slice(0, 4);
    const { onsets } = timeline(plain(notes), 90);
    expect(scoreTaps(plain(notes), 90, onsets).score).toBe(100);
    expect(scoreTaps(plain(notes), 90, []).score).toBe(0);
    // A tap every 50 ms from the first click to past the end: 4 near-perfect matches, but about 90 extras.
    const mash = Array.from({ length: 100 }, (_, i) => i * 50);
    expect(scoreTaps(plain(notes), 90, mash).score).toBe(0);
  });

  it("each tap serves one note only", () => {
    // Two notes 500 ms apart (120 bpm, 4/4: onsets 2000 and 2500); one tap at 2250 is exactly halfway.
    // It goes to the first note (late by 250 ms, window 250) and the second is missed.
    const result = scoreTaps(plain([n("C5", 1, 1), n("D5", 3, 1)]), 120, [2250]);
    expect(result.notes.map((r) => r.grade)).toEqual(["late", "missed"]);
  });
});

/**
 * An upload as stored (read by the MusicXML reader, kept by toStoredTune). Bars are written "C5:1.5 r:0.5 D5:1~"
 * in quarter notes ("r" a rest, "~" a tie to the next note); `meters` gives a bar's new time signature.
 */
function upload(bars: string[], meters: Record<number, string>, pickup = false, direction = "") {
  const body = bars
    .map((bar, i) => {
      const time = meters[i] ? `<time><beats>${meters[i]!.split("/")[0]}</beats><beat-type>${meters[i]!.split("/")[1]}</beat-type></time>` : "";
      const attributes = i === 0 || time ? `<attributes>${i === 0 ? "<divisions>4</divisions>" : ""}${time}</attributes>` : "";
      const notes = bar.split(" ").map((token) => {
        const [pitch, length] = token.split(":");
        const duration = `<duration>${Number(length!.replace("~", "")) * 4}</duration>`;
        if (pitch === "r") return `<note><rest/>${duration}</note>`;
        const ties = `${bars[i - 1]?.endsWith("~") && token === bar.split(" ")[0] ? '<tie type="stop"/>' : ""}${length!.endsWith("~") ? '<tie type="start"/>' : ""}`;
        return `<note><pitch><step>${pitch![0]}</step><octave>${pitch![1]}</octave></pitch>${duration}${ties}</note>`;
      });
      return `<measure number="${pickup ? i : i + 1}"${pickup && i === 0 ? ' implicit="yes"' : ""}>${attributes}${i === 0 ? direction : ""}${notes.join("")}</measure>`;
    })
    .join("");
  const text = `<score-partwise version="4.0"><part-list><score-part id="P1"><part-name>Melody</part-name></score-part></part-list><part id="P1">${body}</part></score-partwise>`;
  return toStoredTune(parseMusicXml(text), "test");
}
const ms = (xs: number[]) => xs.map((x) => Math.round(x * 10) / 10);

describe("the timeline of an upload read fully", () => {
  it("6/8 counts dotted quarters: at 60 bpm a beat is 1000 ms and a quarter 1000 ÷ 1.5 = 666.7 ms", () => {
    const t = timeline(upload(["C5:1.5 D5:0.5 E5:1", "F5:3"], { 0: "6/8" }), 60);
    // Count-in: 2 beats × 1000 = 2000. C5 at 2000; D5 after a dotted quarter, 2000 + 1.5 × 666.7 = 3000;
    // E5 after an eighth, 3000 + 0.5 × 666.7 = 3333.3; bar 2 at 2000 + 3 × 666.7 = 4000.
    expect(ms(t.onsets)).toEqual([2000, 3000, 3333.3, 4000]);
    // Two clicks a bar: count-in 0, 1000; bar 1 at 2000 (accent), 3000; bar 2 at 4000 (accent), 5000; ends at 6000.
    expect(t.clicks.map((c) => [Math.round(c.at), c.accent])).toEqual([[0, true], [1000, false], [2000, true], [3000, false], [4000, true], [5000, false]]);
    expect(Math.round(t.endMs)).toBe(6000);
    expect(t.countIn).toBe(2);
  });

  it("3/4 with a pickup and rests inside bars: rests are time between onsets", () => {
    // 120 bpm: a beat is 500 ms, the count-in 3 × 500 = 1500. The one-beat pickup G4 ends on the bar line: 1500 − 500 = 1000.
    // Bar 1 "r:1 C5:1 D5:1": C5 one beat in, 2000; D5 2500. Bar 2 "E5:2 r:1": 1500 + 3 × 500 = 3000. Bar 3 F5: 1500 + 6 × 500 = 4500.
    const tune = upload(["G4:1", "r:1 C5:1 D5:1", "E5:2 r:1", "F5:3"], { 0: "3/4" }, true);
    const t = timeline(tune, 120);
    expect(t.onsets).toEqual([1000, 2000, 2500, 3000, 4500]);
    // A perfect performance scores 100 (the old reading, which dropped rests, put C5 on the bar line at 1500).
    expect(scoreTaps(tune, 120, t.onsets).score).toBe(100);
  });

  it("cut time counts halves; 5/4 counts five quarters", () => {
    // 2/2 at 60: a beat (half note) 1000 ms, a quarter 500; count-in 2 beats = 2000. C5 2000, D5 2500, E5 3000, bar 2 at 2000 + 4 × 500 = 4000.
    const cut = timeline(upload(["C5:1 D5:1 E5:2", "F5:4"], { 0: "2/2" }), 60);
    expect(cut.onsets).toEqual([2000, 2500, 3000, 4000]);
    expect(cut.clicks.filter((c) => c.accent).map((c) => c.at)).toEqual([0, 2000, 4000]);
    // 5/4 at 100: a beat 600 ms, count-in 5 × 600 = 3000. C5 3000, D5 after 2 beats 4200, bar 2 at 3000 + 5 × 600 = 6000.
    const five = timeline(upload(["C5:2 D5:3", "E5:5"], { 0: "5/4" }), 100);
    expect(five.onsets).toEqual([3000, 4200, 6000]);
    expect(five.clicks).toHaveLength(5 + 10);
  });

  it("a tied note is one tap", () => {
    // 4/4 at 60: beat 1000, count-in 4000. C5 4000; D5 tied over the bar line (1 + 2 quarters) at 7000; E5 at 4000 + 6 × 1000 = 10 000.
    const tune = upload(["C5:3 D5:1~", "D5:2 E5:2"], { 0: "4/4" });
    expect(tune.notes.map((n) => [n.pitch, n.beats, n.tied])).toEqual([["C5", 3, false], ["D5", 3, true], ["E5", 2, false]]);
    const t = timeline(tune, 60);
    expect(t.onsets).toEqual([4000, 7000, 10_000]);
    // A tap where the tie continues (8000, the bar line) is an extra tap: 3 on time − ½ = 2.5 of 3 → 83.
    expect(scoreTaps(tune, 60, [...t.onsets, 8000]).score).toBe(83);
  });

  it("a meter change keeps the quarter note's length and clicks the new bar's beat", () => {
    // 2/4 at 120: a quarter 500 ms, count-in 2 × 500 = 1000. C5 1000, D5 1500; bar 2 (6/8) at 2000: E5 2000, F5 after a dotted quarter, 2750.
    const t = timeline(upload(["C5:1 D5:1", "E5:1.5 F5:1.5"], { 0: "2/4", 1: "6/8" }), 120);
    expect(t.onsets).toEqual([1000, 1500, 2000, 2750]);
    expect(t.clicks.map((c) => c.at)).toEqual([0, 500, 1000, 1500, 2000, 2750]);
  });
});

describe("the score's tempo is the rhythm pass's default", () => {
  const metronome = (unit: string, perMinute: number, dots = 0) =>
    `<direction><direction-type><metronome><beat-unit>${unit}</beat-unit>${"<beat-unit-dot/>".repeat(dots)}<per-minute>${perMinute}</per-minute></metronome></direction-type></direction>`;

  it("6/8 marked dotted quarter = 60 starts at 60, the pass's beat being the dotted quarter", () => {
    // MusicXML 4.0 <metronome>: per-minute counts the beat-unit (a dotted quarter, 1.5 quarters): 90 quarters a minute.
    const tune = upload(["C5:1.5 D5:1.5", "E5:3"], { 0: "6/8" }, false, metronome("quarter", 60, 1));
    expect(tune.score.tempo).toEqual({ quarterBpm: 90, marking: { beatUnit: "quarter", dots: 1, perMinute: 60 } });
    expect(defaultTempo(tune)).toBe(60);
    // At that default a beat lasts 1000 ms: count-in 2 × 1000, D5 a beat after C5.
    expect(timeline(tune, defaultTempo(tune)).onsets).toEqual([2000, 3000, 4000]);
  });

  it("a marking in another unit is counted in the meter's beat", () => {
    // 4/4 marked half = 60: 120 quarters a minute, and the pass counts quarters.
    expect(defaultTempo(upload(["C5:4"], { 0: "4/4" }, false, metronome("half", 60)))).toBe(120);
    // Cut time with only <sound tempo="120"> (quarters a minute): 120 ÷ 2 = 60 halves a minute.
    expect(defaultTempo(upload(["C5:2 D5:2"], { 0: "2/2" }, false, '<direction><sound tempo="120"/></direction>'))).toBe(60);
    // 3/8 marked eighth = 132 (not compound: the eighth is the beat) stays 132.
    expect(defaultTempo(upload(["C5:1.5"], { 0: "3/8" }, false, metronome("eighth", 132)))).toBe(132);
  });

  it("a pickup bar does not set the beat; a tempo beyond the pass's range is brought into it", () => {
    // The first full bar is 6/8, so the dotted quarter counts: quarter = 150 is 100 dotted quarters.
    expect(defaultTempo(upload(["G4:1.5", "C5:3"], { 0: "6/8" }, true, metronome("quarter", 150)))).toBe(100);
    expect(defaultTempo(upload(["C5:4"], { 0: "4/4" }, false, metronome("quarter", 200)))).toBe(160);
    expect(defaultTempo(upload(["C5:4"], { 0: "4/4" }, false, metronome("quarter", 30)))).toBe(40);
  });

  it("without a marking, and for built-in tunes, the pass starts at its steady default", () => {
    expect(defaultTempo(upload(["C5:4"], { 0: "4/4" }))).toBe(DEFAULT_TEMPO);
    expect(defaultTempo(lantern)).toBe(DEFAULT_TEMPO);
  });
});
