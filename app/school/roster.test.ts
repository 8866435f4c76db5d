import { describe, expect, it } from "vitest";
import { checkRosterRows, CSV_MAX_ROWS, parseRosterCsv } from "./roster";

describe("parseRosterCsv", () => {
  it("reads a header in any case, an optional e-mail column, quotes, a BOM and blank lines", () => {
    const csv = '\uFEFFE-mail,Name,Instrument\r\nlumi@x.example,"Lumi, P.",guitar\r\n\r\n,Teo R.\r\n';
    expect(parseRosterCsv(csv)).toEqual({
      ok: true,
      rows: [
        { line: 2, name: "Lumi, P.", email: "lumi@x.example" },
        { line: 4, name: "Teo R.", email: "" },
      ],
    });
  });

  it("accepts a name-only file", () => {
    const parsed = parseRosterCsv("nickname\nAsh\nBirch\n");
    expect(parsed.ok && parsed.rows.map((r) => r.name)).toEqual(["Ash", "Birch"]);
  });

  it.each([
    ["", "The file is empty."],
    ["first,last\nAda,B\n", "The first line must name the columns"],
    ["name,email\n", "no students"],
    [`name\n${"x\n".repeat(CSV_MAX_ROWS + 1)}`, "import at most 200"],
    ["name\n" + "a".repeat(100_001), "too large"],
  ])("refuses %j with a clear message", (csv, message) => {
    const parsed = parseRosterCsv(csv);
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.error).toContain(message);
  });
});

describe("checkRosterRows", () => {
  const ctx = { names: ["Amani K."], emails: ["bram@x.example"], blockedEmails: new Map([["t@x.example", "Used by another account."]]) };
  const row = (line: number, name: string, email = "") => ({ line, name, email });

  it("passes good rows, tidying spaces and e-mail case", () => {
    expect(checkRosterRows([row(2, "  Cleo   V. ", "Cleo@X.example")], ctx)).toEqual([
      { line: 2, name: "Cleo V.", email: "cleo@x.example", errors: [] },
    ]);
  });

  it("explains each problem row by row", () => {
    const checked = checkRosterRows(
      [
        row(2, "", "a@x.example"),
        row(3, "Dee", "not-an-address"),
        row(4, "x".repeat(61)),
        row(5, "Eve", "eve@x.example"),
        row(6, "eve", "other@x.example"),
        row(7, "Fay", "EVE@x.example"),
        row(8, "amani k."),
        row(9, "Gus", "bram@x.example"),
        row(10, "Hal", "t@x.example"),
        row(11, "\u202Eeve"),
        row(12, "Iv\u200Bo"),
        row(13, "\u0410mani K."), // Cyrillic А: looks like Amani K., already in the class
        row(14, "\u0415ve"), // Cyrillic Е: looks like Eve on line 5
      ],
      ctx,
    );
    expect(checked.map((r) => r.errors.map((e) => `${e.field}: ${e.message}`))).toEqual([
      ["name: Missing name."],
      ["email: That doesn't look like an e-mail address."],
      ["name: Keep a name under 60 characters."],
      [],
      ["name: Same name as line 5."],
      ["email: Same e-mail as line 5."],
      ["name: A student with this name is already in the class."],
      ["email: A student with this e-mail is already in the class."],
      ["email: Used by another account."],
      ["name: Names can't contain text-direction control characters (U+202E)."],
      ["name: Names can't contain invisible characters (U+200B)."],
      ["name: Same name as line 8.", "name: A student with this name is already in the class."],
      ["name: Same name as line 5."],
    ]);
  });
});
