import { describe, expect, it } from "vitest";
import { dayStreak, localDay, noteCells, sessionsOf, type AnswerSummaryRow } from "./summary";

// Times in UTC; a student in UTC+2 has getTimezoneOffset() = −120.
const utc = (d: number, h = 12, m = 0) => Date.UTC(2026, 2, d, h, m);

describe("day streak", () => {
  it("counts consecutive days up to today", () => {
    // 8, 9 and 10 March; now is the 10th: three days.
    expect(dayStreak([utc(8), utc(9), utc(10), utc(10, 13)], utc(10, 18), 0)).toEqual({ days: 3, practisedToday: true });
  });

  it("still counts through yesterday until today is over, and a gap ends it", () => {
    // 5, 7, 8 March; now is the 9th, nothing yet today: the streak is 7–8 = 2 (the 6th was missed).
    expect(dayStreak([utc(5), utc(7), utc(8)], utc(9, 8), 0)).toEqual({ days: 2, practisedToday: false });
    // Two days without practice: no streak.
    expect(dayStreak([utc(5)], utc(7), 0).days).toBe(0);
  });

  it("uses the student's own midnight", () => {
    // 22:30 UTC on the 8th is 00:30 on the 9th in UTC+2 (offset −120): with 9th 12:00 that is one day there, two in UTC.
    expect(localDay(utc(8, 22, 30), -120)).toBe(localDay(utc(9), -120));
    expect(dayStreak([utc(8, 22, 30), utc(9)], utc(9, 15), -120).days).toBe(1);
    expect(dayStreak([utc(8, 22, 30), utc(9)], utc(9, 15), 0).days).toBe(2);
  });
});

const row = (written: string, writtenMidi: number, kind: string, at: number, source = "preset:ready-naturals-5", reactionMs = 1000): AnswerSummaryRow => ({
  source, written, writtenMidi, kind, pitchRight: kind === "home-spot" || kind === "other-spot", reactionMs, at,
});

describe("sessions and notes", () => {
  it("splits sessions at a 30-minute gap or a change of material, newest first", () => {
    const rows = [
      row("C5", 72, "home-spot", utc(9, 10, 0)),
      row("D5", 74, "half-step-off", utc(9, 10, 1), undefined, 2000),
      row("E5", 76, "home-spot", utc(9, 10, 40), undefined, 3000), // 39 minutes later: a new session
      row("G4", 67, "home-spot", utc(9, 10, 41), "tune:lantern-walk"), // another material: a new session
    ];
    expect(sessionsOf(rows).map((s) => [s.source, s.answers, s.homeSpots, s.medianMs])).toEqual([
      ["tune:lantern-walk", 1, 1, 1000],
      ["preset:ready-naturals-5", 1, 1, 3000],
      // Median of the right-pitch answers only: C5's 1000 ms (D5 was a wrong pitch).
      ["preset:ready-naturals-5", 2, 1, 1000],
    ]);
  });

  it("gives each written note its accuracy (home spot = correct) and median time, on its home spot", () => {
    const rows = [row("C5", 72, "home-spot", 1, undefined, 800), row("C5", 72, "other-spot", 2, undefined, 1200), row("C5", 72, "wide-miss", 3)];
    const [cell] = noteCells(rows, () => ({ string: 3, fret: 5 }));
    // 1 of 3 on the home spot; median of the two right-pitch times (800, 1200) = 1000.
    expect(cell).toMatchObject({ written: "C5", answers: 3, correct: 1, medianMs: 1000, home: { string: 3, fret: 5 } });
    expect(cell!.accuracy).toBeCloseTo(1 / 3);
  });
});
