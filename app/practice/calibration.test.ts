import { describe, expect, it } from "vitest";
import { BUILTIN_TUNES } from "~/tunes/builtin";
import { calibrationRun, isStale, measureOffset, parseStoredCalibration, playedTaps } from "./calibration";
import { scoreTaps, timeline } from "./rhythm";

// At 80 bpm a beat is 60 000 / 80 = 750 ms (independent arithmetic). Four count-in clicks at 0, 750, 1500, 2250;
// the eight played along at 3000, 3750, …, 3000 + 7 × 750 = 8250.
const PLAYED = [3000, 3750, 4500, 5250, 6000, 6750, 7500, 8250];
const heard = (offsets: number[]) => PLAYED.map((c, i) => c + offsets[i]!);

describe("the calibration run", () => {
  it("80 bpm: a bar of count-in, then eight clicks to play along with, listening until a beat after the last", () => {
    const run = calibrationRun();
    expect(run.clicks).toHaveLength(12);
    expect(run.played).toEqual(PLAYED);
    expect(run.clicks.filter((c) => c.accent).map((c) => c.at)).toEqual([0, 3000, 6000]);
    // 8250 + 750.
    expect(run.endMs).toBe(9000);
  });
});

describe("measuring the delay", () => {
  it.each([
    // Sorted 110 115 118 120 120 122 125 130: median (120 + 120) / 2 = 120; deviations 10 5 2 0 0 2 5 10,
    // sorted 0 0 2 2 5 5 10 10: median (2 + 5) / 2 = 3.5, rounded 4.
    { what: "a steady 120 ms late", offsets: [110, 120, 130, 115, 125, 120, 118, 122], offsetMs: 120, spreadMs: 4, matched: 8 },
    // One click missed and a sound 390 ms after it caught instead: 390 − 100 > 80, dropped; seven of 100 remain.
    { what: "one missed click caught by a late sound", offsets: [100, 100, 100, 390, 100, 100, 100, 100], offsetMs: 100, spreadMs: 0, matched: 7 },
    // A player ahead of the click: a negative figure, which adds time back to every onset. Sorted −35 −32 −30 −30
    // −30 −30 −28 −25: median −30; deviations sorted 0 0 0 0 2 2 5 5: median (0 + 2) / 2 = 1.
    { what: "playing a little ahead", offsets: [-30, -25, -35, -30, -30, -28, -32, -30], offsetMs: -30, spreadMs: 1, matched: 8 },
    // Odd count after dropping: 55 55 60 60 60 65 65 → median 60; deviations 5 5 0 0 0 5 5 → median 5.
    { what: "a 200 ms outlier among seven", offsets: [55, 60, 65, 60, 260, 55, 65, 60], offsetMs: 60, spreadMs: 5, matched: 7 },
  ])("$what → $offsetMs ms", ({ offsets, offsetMs, spreadMs, matched }) => {
    expect(measureOffset(PLAYED, heard(offsets))).toEqual({ ok: true, offsetMs, spreadMs, matched, of: 8 });
  });

  it("takes the attack, not the same note heard again while it rings", () => {
    // Each note heard at +80 and again at +200: +200 is still this click's window (−150…+400), and 750 − 200 = 550
    // before the next click, outside that click's window.
    const onsets = PLAYED.flatMap((c) => [c + 200, c + 80]);
    expect(measureOffset(PLAYED, onsets)).toMatchObject({ ok: true, offsetMs: 80, matched: 8 });
  });

  it("ignores what is played during the count-in", () => {
    // 2250 + 100 = 2350 is 650 ms before the first played click: outside its window.
    const onsets = [100, 850, 1600, 2350, ...heard([90, 90, 90, 90, 90, 90, 90, 90])];
    expect(measureOffset(PLAYED, onsets)).toMatchObject({ ok: true, offsetMs: 90 });
  });

  it("too few notes heard: asks again, saying how many and why", () => {
    const result = measureOffset(PLAYED, heard([100, 100, 100, 100, 100]).slice(0, 5));
    expect(result).toMatchObject({ ok: false, matched: 5, of: 8 });
    expect(!result.ok && result.reason).toContain("on 5 of the 8 clicks; at least 6 are needed");
    expect(!result.ok && result.reason).not.toContain("quieter room");
  });

  it("sounds only between the clicks: none matched, and the room is named", () => {
    // +500 after a click is 750 − 500 = 250 ms before the next: outside both windows, so all eight are stray.
    const result = measureOffset(PLAYED, heard(Array(8).fill(500)));
    expect(result).toMatchObject({ ok: false, matched: 0 });
    expect(!result.ok && result.reason).toContain("quieter room");
  });

  it("too scattered to trust: asks again with the spread", () => {
    // 40 and 160 alternating: median (40 + 160) / 2 = 100, every deviation 60 > 40.
    const result = measureOffset(PLAYED, heard([40, 160, 40, 160, 40, 160, 40, 160]));
    expect(result).toMatchObject({ ok: false, matched: 8 });
    expect(!result.ok && result.reason).toContain("about 60 ms around the click (at most 40 ms");
  });
});

describe("played notes are scored exactly like taps", () => {
  const tune = BUILTIN_TUNES.find((t) => t.id === "lantern-walk")!;
  const onsets = timeline(tune, 90).onsets;
  // A mixed pass: on time, close, early, late, one missed, one extra tap between notes.
  const taps = onsets.map((t, i) => t + [0, 40, -120, 200, -300, 10][i % 6]!).filter((_, i) => i !== 3);
  taps.push(onsets[5]! + 330);

  it.each([0, 137, -30])("heard %i ms late, the calibrated delay taken off: the same score as the taps", (delay) => {
    const played = playedTaps(
      taps.map((t) => t + delay),
      delay,
    );
    expect(scoreTaps(tune, 90, played)).toEqual(scoreTaps(tune, 90, taps));
  });

  it("without calibration the same notes score worse: the delay matters", () => {
    expect(scoreTaps(tune, 90, playedTaps(taps.map((t) => t + 137), 0)).score).toBeLessThan(scoreTaps(tune, 90, taps).score);
  });
});

describe("the figure kept on the device", () => {
  it.each([
    { text: '{"offsetMs":85,"at":1700000000000}', want: { offsetMs: 85, at: 1_700_000_000_000 } },
    { text: '{"offsetMs":-150,"at":1}', want: { offsetMs: -150, at: 1 } },
    { text: null, want: null },
    { text: "", want: null },
    { text: "not json", want: null },
    { text: "null", want: null },
    { text: '{"offsetMs":401,"at":1}', want: null },
    { text: '{"offsetMs":85.5,"at":1}', want: null },
    { text: '{"offsetMs":"85","at":1}', want: null },
    { text: '{"offsetMs":85}', want: null },
  ])("$text → $want", ({ text, want }) => {
    expect(parseStoredCalibration(text)).toEqual(want);
  });

  it("is offered for renewal after 60 days (60 × 86 400 000 ms), still used before", () => {
    const at = 1_700_000_000_000;
    expect(isStale({ offsetMs: 80, at }, at + 60 * 86_400_000)).toBe(false);
    expect(isStale({ offsetMs: 80, at }, at + 60 * 86_400_000 + 1)).toBe(true);
  });
});
