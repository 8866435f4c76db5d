import { describe, expect, it } from "vitest";
import { isRoomCode, newRoomCode } from "~/game/roomCode";
import { looksLikeRoomCode, newJoinCode, normaliseJoinCode } from "./joinCode";

describe("class join codes", () => {
  it("are four letters, a dash and four digits, never the shape of a room code", () => {
    for (let i = 0; i < 200; i++) {
      const code = newJoinCode();
      expect(code).toMatch(/^[CFGHJKMNPRTWXY]{4}-[34679]{4}$/);
      expect(isRoomCode(normaliseJoinCode(code))).toBe(false);
      expect(newRoomCode()).not.toMatch(/^[A-Z]{4}-?[0-9]{4}$/);
    }
  });

  it("are found however they are typed", () => {
    expect(normaliseJoinCode("kmnp 3479")).toBe("KMNP-3479");
    expect(normaliseJoinCode(" kmnp-3479 ")).toBe("KMNP-3479");
    expect(normaliseJoinCode("KMNP3479")).toBe("KMNP-3479");
  });

  it("leave codes of the old shape as they were stored", () => {
    expect(normaliseJoinCode("thuimp")).toBe("THUIMP");
    expect(normaliseJoinCode("THU-IMP")).toBe("THUIMP");
  });

  it("tell a room code apart", () => {
    expect(looksLikeRoomCode("kmn prt")).toBe(true);
    expect(looksLikeRoomCode("THUIMP")).toBe(false);
    expect(looksLikeRoomCode("KMNP-3479")).toBe(false);
  });
});
