import { describe, expect, it } from "vitest";
import { completedLate, creditedAssignment, goalWords, progressOf, progressWords, statusOf, type Goal, type PracticeRow } from "./progress";

// Constructed practice: one answer a second from T0, each a kind and a reaction time.
const T0 = Date.UTC(2026, 10, 2, 17, 0, 0);
const right = (ms = 1500): Omit<PracticeRow, "at"> => ({ kind: "home-spot", pitchRight: true, reactionMs: ms });
const miss = (ms = 3000): Omit<PracticeRow, "at"> => ({ kind: "wide-miss", pitchRight: false, reactionMs: ms });
const other = (ms = 1500): Omit<PracticeRow, "at"> => ({ kind: "other-spot", pitchRight: true, reactionMs: ms });
const played = (...answers: Omit<PracticeRow, "at">[]): PracticeRow[] => answers.map((a, i) => ({ ...a, at: T0 + i * 1000 }));
const times = <T,>(n: number, make: () => T) => Array.from({ length: n }, make);

const tenAt90Under2s: Goal = { notes: 10, accuracyPct: 90, medianMs: 2000 };

describe("assignment progress", () => {
  it("has nothing to judge before the first answer", () => {
    const p = progressOf(tenAt90Under2s, [], true);
    expect(p).toMatchObject({ answered: 0, notes: 0, window: 0, correct: 0, accuracy: 0, medianMs: null, completedAt: null });
    // No answers: no accuracy (0 of 0 is not 90 %), no median (so the time goal is not met either).
    expect(p.met).toEqual({ notes: false, accuracy: false, speed: false });
    expect(progressWords(tenAt90Under2s, p)).toBe("Not started");
  });

  it("judges a window shorter than the goal while the student is still getting there", () => {
    const goal: Goal = { notes: 10, accuracyPct: 80, medianMs: null };
    // 6 answers, 5 right: window = all 6; 5 × 100 = 500 ≥ 80 × 6 = 480, so accuracy is on track,
    // but 6 < 10 notes, so it is not done. No time goal: speed counts as met.
    const p = progressOf(goal, played(right(), right(), miss(), right(), right(), right()), true);
    expect(p).toMatchObject({ answered: 6, notes: 6, window: 6, correct: 5, medianMs: 1500, completedAt: null });
    expect(p.accuracy).toBeCloseTo(5 / 6);
    expect(p.met).toEqual({ notes: false, accuracy: true, speed: true });
    // floor(5 × 100 / 6) = floor(83.3) = 83.
    expect(progressWords(goal, p)).toBe("6 of 10 notes · 83 % correct ✓");
  });

  it("completes at the first answer that closes a window meeting every part, exactly on the bar", () => {
    // Answers 1–4 are misses, 5–14 home spots at 1.5 s. Windows of 10, by the answer that closes them:
    //   closes at 10 → answers 1–10: 6 right → 600 < 900, no
    //   closes at 11 → answers 2–11: 7 right, no;  closes at 12 → 8 right, no
    //   closes at 13 → answers 4–13: 9 right → 900 ≥ 90 × 10 = 900, yes; right-pitch times 9 × 1500 ms,
    //   median 1500 < 2000, yes → complete at answer 13 (T0 + 12 s), not at 14.
    const rows = played(...times(4, () => miss()), ...times(10, () => right()));
    const p = progressOf(tenAt90Under2s, rows, true);
    expect(p.completedAt).toBe(T0 + 12_000);
    expect(p).toMatchObject({ answered: 14, notes: 10, window: 10, correct: 9, accuracy: 0.9, medianMs: 1500 });
    expect(p.met).toEqual({ notes: true, accuracy: true, speed: true });
    expect(progressWords(tenAt90Under2s, p)).toBe("10 of 10 notes · 90 % correct ✓ · median 1.5 s ✓");
  });

  it("needs the median strictly under the time goal, and takes the mean of the middle two for an even count", () => {
    // 10 right answers, five at 1.8 s and five at 2.2 s: sorted, the middle two are 1800 and 2200,
    // median (1800 + 2200) / 2 = 2000, which is not under 2000 → not complete, speed not met.
    const slow = played(...times(5, () => right(1800)), ...times(5, () => right(2200)));
    const p = progressOf(tenAt90Under2s, slow, true);
    expect(p).toMatchObject({ correct: 10, medianMs: 2000, completedAt: null });
    expect(p.met).toEqual({ notes: true, accuracy: true, speed: false });
    expect(progressWords(tenAt90Under2s, p)).toBe("10 of 10 notes · 100 % correct ✓ · median 2 s (goal under 2 s)");
    // One more answer at 1.0 s: the window is now answers 2–11 = four at 1.8, five at 2.2, one at 1.0;
    // sorted 1000, 1800 ×4, 2200 ×5 → middle two 1800 and 2200 again → 2000, still no.
    expect(progressOf(tenAt90Under2s, [...slow, { ...right(1000), at: T0 + 10_000 }], true).completedAt).toBeNull();
  });

  it("counts another spot of the right pitch as correct only when homeOnly is off", () => {
    // 8 home spots + 2 other spots, all at 1.5 s.
    const rows = played(...times(8, () => right()), other(), other());
    // homeOnly (what assignments use): 8 of 10 correct → 800 < 900, not complete. Both other spots are right-pitch,
    // so the median is still over all 10 times: 1500.
    const homeOnly = progressOf(tenAt90Under2s, rows, true);
    expect(homeOnly).toMatchObject({ correct: 8, medianMs: 1500, completedAt: null });
    expect(homeOnly.met.accuracy).toBe(false);
    // Any spot: 10 of 10 → complete at the 10th answer (T0 + 9 s).
    expect(progressOf(tenAt90Under2s, rows, false)).toMatchObject({ correct: 10, completedAt: T0 + 9_000 });
  });

  it("keeps a completion when later practice is weaker, and reports the completing window", () => {
    // 10 right (complete at answer 10, T0 + 9 s), then 10 misses: the latest window would be 0 %,
    // but the figures stay those of answers 1–10.
    const p = progressOf(tenAt90Under2s, played(...times(10, () => right(1200)), ...times(10, () => miss())), true);
    expect(p).toMatchObject({ answered: 20, notes: 10, correct: 10, accuracy: 1, medianMs: 1200, completedAt: T0 + 9_000 });
  });

  it("orders answers by time, whatever order the rows came in", () => {
    // Given newest first: 5 right (the last five answers), then 5 misses (the first five).
    const rows = played(...times(5, () => miss()), ...times(5, () => right())).reverse();
    const goal: Goal = { notes: 5, accuracyPct: 100, medianMs: null };
    // In time order the first full-marks window of 5 is answers 6–10, closed by answer 10 at T0 + 9 s.
    expect(progressOf(goal, rows, true).completedAt).toBe(T0 + 9_000);
  });

  it("says open, overdue or done, and whether it was done late", () => {
    const due = T0 + 60_000;
    expect(statusOf({ completedAt: null }, due, due)).toBe("open"); // due time itself is still in time
    expect(statusOf({ completedAt: null }, due, due + 1)).toBe("overdue");
    expect(statusOf({ completedAt: T0 }, due, due + 1)).toBe("done");
    expect(completedLate({ completedAt: T0 }, due)).toBe(false);
    expect(completedLate({ completedAt: due + 5 }, due)).toBe(true);
    expect(completedLate({ completedAt: null }, due)).toBe(false);
  });

  it("puts the goal in the teacher's words", () => {
    expect(goalWords({ notes: 40, accuracyPct: 90, medianMs: 2000 })).toBe("40 notes in a row at 90 % correct, median under 2 s");
    expect(goalWords({ notes: 20, accuracyPct: 85, medianMs: null })).toBe("20 notes in a row at 85 % correct");
    expect(goalWords({ notes: 20, accuracyPct: 85, medianMs: 2500 })).toBe("20 notes in a row at 85 % correct, median under 2.5 s");
  });
});

describe("which assignment practice counts toward", () => {
  const a = (id: string, material: string | null, status: "open" | "overdue" | "done", dueAt: number) => ({
    id,
    material: material === null ? null : { kind: material.split(":")[0]!, id: material.split(":")[1]! },
    status,
    dueAt,
  });
  const mine = [
    a("later", "set:s1", "open", 300),
    a("sooner", "set:s1", "open", 200),
    a("finished", "set:s1", "done", 100),
    a("tune", "tune:lantern-walk", "overdue", 50),
    a("deleted", null, "open", 10),
  ];
  it.each([
    ["the same set, however started: the unfinished one due soonest", "set:s1", null, "sooner"],
    ["a tune whose assignment is overdue (late work still counts)", "tune:lantern-walk", null, "tune"],
    ["material no assignment asks for", "preset:ready-naturals-5", null, undefined],
    ["a free position", "position:5", null, undefined],
    ["the assignment the student opened, even when another is due sooner", "set:s1", "later", "later"],
    ["the opened one even when finished (practising on after the goal)", "set:s1", "finished", "finished"],
  ])("%s", (_what, source, chosen, want) => {
    expect(creditedAssignment(mine, source, chosen)?.id).toBe(want);
  });
});

describe("an assignment that asks for played answers", () => {
  const goal = { notes: 3, accuracyPct: 100, medianMs: null, playedOnly: true };
  const row = (at: number, input?: "tap" | "played") => ({ kind: "home-spot", pitchRight: true, reactionMs: 900, at, input });
  it("leaves taps (and rows stored before inputs existed) out of the count", () => {
    const p = progressOf(goal, [row(1), row(2, "tap"), row(3, "played"), row(4, "tap"), row(5, "played")], true);
    expect(p).toMatchObject({ answered: 2, completedAt: null });
    expect(progressOf(goal, [row(1, "played"), row(2, "tap"), row(3, "played"), row(6, "played")], true).completedAt).toBe(6);
  });
  it("says so in the goal's words", () => {
    expect(goalWords(goal)).toBe("3 notes in a row at 100 % correct, played on a guitar");
  });
});
