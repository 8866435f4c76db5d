import { describe, expect, it } from "vitest";
import { NICKNAME_MAX, cleanNickname, uniqueNickname } from "./nickname";

describe("cleanNickname", () => {
  it.each([
    ["Sam", "Sam"],
    ["  Sam  ", "Sam"],
    ["Mia   de  Vries", "Mia de Vries"],
    ["Zoë", "Zoë"],
    ["Zoe\u0308", "Zoë"], // decomposed input is composed, so it de-duplicates with "Zoë"
    ["Jo-Ann O'Neil", "Jo-Ann O'Neil"],
    ["小林", "小林"],
    ["Ab", "Ab"],
    ["x".repeat(NICKNAME_MAX), "x".repeat(NICKNAME_MAX)],
    ["Dumbledore", "Dumbledore"], // contains a blocked word but not as a whole word
    ["Scrapper", "Scrapper"],
    ["Player 7", "Player 7"],
  ])("accepts %j as %j", (raw, nickname) => {
    expect(cleanNickname(raw)).toEqual({ ok: true, nickname });
  });

  it.each([
    ["", /at least 2/],
    ["  a  ", /at least 2/],
    ["x".repeat(NICKNAME_MAX + 1), /at most 20 characters; this one has 21/],
    ["Sam 🎸", /letters, numbers, spaces/],
    ["<b>Sam</b>", /letters, numbers, spaces/],
    ["Sam\u0000", /control characters/],
    ["Sam\u200B", /invisible characters/],
    ["\u202EmaS", /text-direction control/],
    ["Sa\u0301\u0302\u0303\u0304\u0305m", /accent marks/],
    ["idiot", /friendlier/],
    ["Big IDIOT", /friendlier/],
    ["1d10t", /friendlier/],
    ["stup1d-kid", /friendlier/],
    ["l0s3r", /friendlier/],
  ])("refuses %j", (raw, message) => {
    const result = cleanNickname(raw);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.message).toMatch(message);
  });
});

describe("uniqueNickname", () => {
  it.each<[string, string[], string]>([
    ["Sam", [], "Sam"],
    ["Sam", ["Mia"], "Sam"],
    ["Sam", ["Sam"], "Sam 2"],
    ["sam", ["Sam"], "sam 2"],
    ["Sam", ["Sam", "Sam 2"], "Sam 3"],
    ["Sam", ["Sam", "sam 2", "Sam 3"], "Sam 4"],
    ["Sam 2", ["Sam 2"], "Sam 2 2"],
    ["x".repeat(20), ["x".repeat(20)], `${"x".repeat(18)} 2`],
    ["abcdefghijklmnopq rs", ["abcdefghijklmnopq rs"], "abcdefghijklmnopq 2"],
    ["\u0410na", ["Ana"], "\u0410na 2"], // Cyrillic А looks like Latin A: the same name on the stage
    ["Ana", ["\u0410n\u0430"], "Ana 2"],
    ["Ana", ["Anna"], "Ana"],
  ])("%j among %j → %j", (nickname, taken, expected) => {
    const result = uniqueNickname(nickname, taken);
    expect(result).toBe(expected);
    expect([...result].length).toBeLessThanOrEqual(NICKNAME_MAX);
  });
});
