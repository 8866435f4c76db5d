/**
 * Class join codes: given out once by the teacher and typed at home, so they must never be taken
 * for the room code of a live round (six characters on the class screen). A join code is four
 * letters, a dash and four digits ("KMNP-3479"), drawn from the room codes' look-alike-free
 * characters. Codes made before this shape (six characters, such as "THUIMP") keep working.
 * 14⁴ × 5⁴ ≈ 24 million codes; the server checks a new one against every class before using it.
 */
import { customAlphabet } from "nanoid";
import { isRoomCode, normaliseRoomCode, ROOM_CODE_ALPHABET } from "~/game/roomCode";

const LETTERS = ROOM_CODE_ALPHABET.replace(/[^A-Z]/g, "");
const DIGITS = ROOM_CODE_ALPHABET.replace(/[^0-9]/g, "");
const letters = customAlphabet(LETTERS, 4);
const digits = customAlphabet(DIGITS, 4);

export const newJoinCode = (): string => `${letters()}-${digits()}`;

/** What was typed, as stored: upper case, separators dropped, and the dash put back in a new-shape code. */
export function normaliseJoinCode(typed: string): string {
  const bare = normaliseRoomCode(typed);
  return /^[A-Z]{4}[0-9]{4}$/.test(bare) ? `${bare.slice(0, 4)}-${bare.slice(4)}` : bare;
}

/** A student who typed a live round's room code instead gets told where that code goes. */
export const looksLikeRoomCode = (typed: string) => isRoomCode(normaliseRoomCode(typed));
