import { describe, expect, it } from "vitest";
import { ROOM_CODE_ALPHABET, ROOM_CODE_LENGTH, formatRoomCode, isRoomCode, newRoomCode, normaliseRoomCode, parseRoomCode } from "./roomCode";

describe("room code alphabet", () => {
  it.each(["0", "O", "D", "Q", "1", "I", "L", "2", "Z", "5", "S", "8", "B", "U", "V", "A", "E"])("leaves out look-alike or vowel %s", (c) => {
    expect(ROOM_CODE_ALPHABET).not.toContain(c);
  });

  it("has no repeated characters", () => {
    expect(new Set(ROOM_CODE_ALPHABET).size).toBe(ROOM_CODE_ALPHABET.length);
  });

  it("generates codes of the right length from the alphabet only", () => {
    for (let i = 0; i < 500; i++) {
      const code = newRoomCode();
      expect(code).toHaveLength(ROOM_CODE_LENGTH);
      expect(isRoomCode(code)).toBe(true);
    }
  });
});

describe("normaliseRoomCode / parseRoomCode", () => {
  it.each([
    ["kmnprt", "KMNPRT"],
    ["KMN PRT", "KMNPRT"],
    ["kmn-prt", "KMNPRT"],
    ["  k m n_p.r t ", "KMNPRT"],
  ])("%j → %s", (typed, code) => {
    expect(normaliseRoomCode(typed)).toBe(code);
    expect(parseRoomCode(typed)).toEqual({ ok: true, code });
  });

  it.each([
    ["KMNPR", /6 characters; this one has 5/],
    ["KMNPRTW", /this one has 7/],
    ["", /this one has 0/],
    ["KMNPR0", /never contain "0"/],
    ["kmnpro", /never contain "O"/],
  ])("refuses %j clearly", (typed, message) => {
    const result = parseRoomCode(typed);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.message).toMatch(message);
  });

  it("formats for the stage in two halves", () => {
    expect(formatRoomCode("KMNPRT")).toBe("KMN PRT");
  });
});
