import { describe, expect, it } from "vitest";
import { cleanName, nameField, skeleton } from "./names";

const opts = { what: "a name", max: 60 };

describe("cleanName", () => {
  it.each([
    ["Amani K.", "Amani K."],
    ["  Amani   K. ", "Amani K."],
    ["Amani\tK.\r\n", "Amani K."], // white space of any kind becomes one space
    ["Zoe\u0308", "Zoë"], // NFC: decomposed input is composed
    ["Tiếng Việt", "Tiếng Việt"],
    ["ที่", "ที่"], // Thai: two marks on one letter
    ["किं", "किं"],
    ["小林", "小林"],
    ["a\u0301\u0302\u0303", "a\u0301\u0302\u0303".normalize("NFC")], // three marks: still allowed
  ])("accepts %j as %j", (raw, name) => {
    expect(cleanName(raw, opts)).toEqual({ ok: true, name });
  });

  it.each([
    ["\u202Egnp.exe", /text-direction control characters \(U\+202E\)/],
    ["Ana\u202C", /text-direction control characters \(U\+202C\)/],
    ["\u2066Ana\u2069", /text-direction control characters \(U\+2066\)/],
    ["Ana\u200E", /text-direction control characters \(U\+200E\)/],
    ["Ana\u200F", /text-direction control characters \(U\+200F\)/],
    ["Ana\u061C", /text-direction control characters \(U\+061C\)/],
    ["A\u200Bna", /invisible characters \(U\+200B\)/],
    ["An\u200Ca", /invisible characters \(U\+200C\)/],
    ["Amir\u200D", /invisible characters \(U\+200D\)/],
    ["Ana\u2060", /invisible characters \(U\+2060\)/],
    ["\uFEFFAna", /invisible characters \(U\+FEFF\)/],
    ["Ana\u180E", /invisible characters \(U\+180E\)/],
    ["Ana\u00AD", /invisible characters \(U\+00AD\)/], // soft hyphen, another format character
    ["\u3164", /invisible characters \(U\+3164\)/], // Hangul filler: a "letter" that draws nothing
    ["Ana\u0000", /control characters \(U\+0000\)/],
    ["Ana\u0007", /control characters \(U\+0007\)/],
    ["Ana\u009B", /control characters \(U\+009B\)/],
    ["Ana\uE000", /private-use characters/],
    ["Z\u0301\u0302\u0303\u0304\u0305algo", /more than 3 accent marks on one letter/],
    ["", /Enter a name\./],
    ["   ", /Enter a name\./],
    ["x".repeat(61), /under 60 characters/],
  ])("refuses %j", (raw, message) => {
    const result = cleanName(raw, opts);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.message).toMatch(message);
  });

  it("as a form field gives the cleaned name or the message", () => {
    const field = nameField("the class's name", 60);
    expect(field.parse("  Tuesday   Beginners ")).toBe("Tuesday Beginners");
    const refused = field.safeParse("Tuesday\u202E");
    expect(refused.success).toBe(false);
    expect(refused.error?.issues[0]?.message).toMatch(/text-direction/);
    expect(field.safeParse("").error?.issues[0]?.message).toBe("Enter the class's name.");
  });
});

describe("skeleton", () => {
  it.each([
    ["Ana", "\u0410na"], // Cyrillic capital A
    ["Ana", "An\u0430"], // Cyrillic small a
    ["Oscar", "\u041Esc\u0430r"], // Cyrillic O and a
    ["Pepe", "\u0420\u0435\u0440\u0435"], // all Cyrillic
    ["Kai", "\u039A\u03B1\u03B9"], // Greek capital kappa, alpha, iota
    ["Nico", "\u039Dico"], // Greek capital nu
    ["Sam", "SAM"],
    ["Sam", "sam"],
    ["Ian", "lan"], // capital I and small l
    ["Bill", "Bi11"],
    ["Bob", "B0b"],
    ["Arne", "Ame"], // rn reads as m
    ["Ana", "\uFF21\uFF4E\uFF41"], // full-width letters
    ["Ana", "Ana".normalize("NFD")],
  ])("%j and %j look alike", (a, b) => {
    expect(skeleton(a)).toBe(skeleton(b));
  });

  it.each([
    ["Ana", "Anna"],
    ["ian", "lan"], // a dotted small i is not an l
    ["Zoe", "Zoë"],
    ["Sam", "Sam 2"],
    ["Юлия", "Юрий"],
  ])("%j and %j differ", (a, b) => {
    expect(skeleton(a)).not.toBe(skeleton(b));
  });
});
