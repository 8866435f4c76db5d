import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { gradebookRows, toCsv } from "./csv";

const figures = { points: 10, answered: 2, correct: 1, accuracy: 0.5, rightPitch: 1, medianMs: 1234, longestStreak: 1 };

describe("gradebook CSV", () => {
  it("neutralises cells a spreadsheet would run as formulas", () => {
    const names = ["=HYPERLINK(\"http://x.example\")", "+1+1", "-2+3", "@SUM(A1)", "\tTab", "\rCR", "Plain name", "Mid=dle"];
    const csv = toCsv(names.map((n) => ["Class", "Week 1", "2025-01-01", n, "yes", -5, 1, 1, 50, 1.5, 2]));
    const parsed = Papa.parse<string[]>(csv, { skipEmptyLines: true }).data.slice(1);
    expect(parsed.map((r) => r[3])).toEqual(["'=HYPERLINK(\"http://x.example\")", "'+1+1", "'-2+3", "'@SUM(A1)", "'\tTab", "'\rCR", "Plain name", "Mid=dle"]);
    // Numbers are numbers, even negative ones: not text a spreadsheet could run.
    expect(parsed[0]![5]).toBe("-5");
  });

  it("neutralises every line of a multi-line cell that starts a formula", () => {
    const names = ["Amy\n=HYPERLINK(\"http://x.example\")", "Amy\r\n+1", "Amy\r-1", "a\n@SUM(A1)\n\tb", "=1\n=2", "\r=1", "Amy\nBo = 1"];
    const csv = toCsv(names.map((n) => ["Class", "Week 1", "2025-01-01", n, "yes", 1, 1, 1, 50, 1.5, 2]));
    const parsed = Papa.parse<string[]>(csv, { skipEmptyLines: true }).data.slice(1);
    expect(parsed.map((r) => r[3])).toEqual(["Amy\n'=HYPERLINK(\"http://x.example\")", "Amy\r\n'+1", "Amy\r'-1", "a\n'@SUM(A1)\n'\tb", "'=1\n'=2", "'\r'=1", "Amy\nBo = 1"]);
    // No line of any cell, read on its own, starts with a formula character.
    for (const cell of parsed.flat()) for (const line of cell.split(/\r\n|\r|\n/)) expect(line).not.toMatch(/^[=+@\t]|^-\D/);
  });

  it("writes one row per student with accuracy in percent and time in seconds", () => {
    const rows = gradebookRows("Tuesday", { title: "Sprint", startedAt: Date.UTC(2025, 0, 7) }, [
      { key: "u", userId: "u", nickname: "Zed", ...figures },
      { key: "seat:1", userId: null, nickname: "Amy", ...figures, medianMs: null },
    ]);
    expect(rows).toEqual([
      ["Tuesday", "Sprint", "2025-01-07", "Amy", "nickname only", 10, 2, 1, 50, "", 1],
      ["Tuesday", "Sprint", "2025-01-07", "Zed", "yes", 10, 2, 1, 50, 1.23, 1],
    ]);
    expect(toCsv(rows).split("\r\n")[0]).toBe("class,round,date,student,account,points,answers,correct,accuracy %,median time s,longest streak");
  });
});
