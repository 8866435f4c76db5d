/**
 * Nicknames: students are often minors and may play under a nickname only, so this is the one
 * piece of identity a room holds. Rules: a clean name (~/lib/names: NFC, no invisible or
 * direction characters, no stacked marks), 2–20 characters (code points), letters/digits/spaces
 * and - _ . ' only, no word from a short list of insults, and unique within the room ("Sam",
 * "Sam 2", "Sam 3"), where names that look alike ("Ana" and Cyrillic "Аna") count as the same.
 * The word list is deliberately small and mild; the teacher can still remove a player.
 */

import { cleanName, skeleton } from "~/lib/names";

export const NICKNAME_MIN = 2;
export const NICKNAME_MAX = 20;

// Whole words only, after folding the digits people swap for letters, so "Dumbledore" or "Scrapper" stay allowed.
const BLOCKED_WORDS = new Set(["crap", "damn", "dumb", "idiot", "jerk", "loser", "moron", "poop", "stupid", "sucks"]);

const LEET: Record<string, string> = { "0": "o", "1": "i", "3": "e", "4": "a", "5": "s", "7": "t" };

const ALLOWED = /^[\p{L}\p{M}\p{N} \-_.']+$/u;

export type NicknameResult = { ok: true; nickname: string } | { ok: false; message: string };

export function cleanNickname(raw: string): NicknameResult {
  const clean = cleanName(raw, { what: "a nickname", min: NICKNAME_MIN, max: Infinity });
  if (!clean.ok) return clean;
  const nickname = clean.name;
  const length = [...nickname].length;
  if (length > NICKNAME_MAX) return { ok: false, message: `A nickname can have at most ${NICKNAME_MAX} characters; this one has ${length}.` };
  if (!ALLOWED.test(nickname)) return { ok: false, message: "Use letters, numbers, spaces and - _ . ' only." };
  if (containsBlockedWord(nickname)) return { ok: false, message: "Please choose a friendlier nickname." };
  return { ok: true, nickname };
}

function containsBlockedWord(nickname: string): boolean {
  const folded = [...nickname.toLowerCase()].map((c) => LEET[c] ?? c).join("");
  return folded.split(/[^\p{L}]+/u).some((word) => BLOCKED_WORDS.has(word));
}

/**
 * Makes a clean nickname unique among `taken` (compared by skeleton, since "sam", "Sam" and a
 * Cyrillic "Ѕam" look the same on the stage) by adding the lowest free number, shortening the
 * base so the result still fits NICKNAME_MAX.
 */
export function uniqueNickname(nickname: string, taken: readonly string[]): string {
  const used = new Set(taken.map(skeleton));
  if (!used.has(skeleton(nickname))) return nickname;
  for (let n = 2; ; n++) {
    const suffix = ` ${n}`;
    const base = [...nickname].slice(0, NICKNAME_MAX - suffix.length).join("").trimEnd();
    const candidate = base + suffix;
    if (!used.has(skeleton(candidate))) return candidate;
  }
}
