/**
 * Room codes: what a student types on a phone, read off the class screen from the back row.
 * The alphabet leaves out characters that look alike on a projector or in Fredoka
 * (0/O/D/Q, 1/I/L, 2/Z, 5/S, 8/B, U/V) and every vowel, so no code spells a word.
 * 19 characters ^ 6 ≈ 47 million codes: collisions among open rooms are rare, and the
 * server still checks for one before using a new code.
 */
import { customAlphabet } from "nanoid";

export const ROOM_CODE_ALPHABET = "34679CFGHJKMNPRTWXY";
export const ROOM_CODE_LENGTH = 6;

export const newRoomCode: () => string = customAlphabet(ROOM_CODE_ALPHABET, ROOM_CODE_LENGTH);

const VALID = new RegExp(`^[${ROOM_CODE_ALPHABET}]{${ROOM_CODE_LENGTH}}$`);

/** Upper-cases and drops the separators people add when copying a code ("kmn-prt", "KMN PRT"). */
export function normaliseRoomCode(typed: string): string {
  return typed.toUpperCase().replace(/[\s\-_.]/g, "");
}

export function isRoomCode(code: string): boolean {
  return VALID.test(code);
}

export type RoomCodeResult = { ok: true; code: string } | { ok: false; message: string };

export function parseRoomCode(typed: string): RoomCodeResult {
  const code = normaliseRoomCode(typed);
  if (code.length !== ROOM_CODE_LENGTH) {
    return { ok: false, message: `A room code has ${ROOM_CODE_LENGTH} characters; this one has ${code.length}.` };
  }
  const stray = [...code].find((c) => !ROOM_CODE_ALPHABET.includes(c));
  if (stray !== undefined) {
    return { ok: false, message: `Room codes never contain "${stray}". Check the code on the class screen.` };
  }
  return { ok: true, code };
}

/** Split in two halves so the stage can print it large and readable ("KMN PRT"). */
export function formatRoomCode(code: string): string {
  const half = ROOM_CODE_LENGTH / 2;
  return `${code.slice(0, half)} ${code.slice(half)}`;
}
