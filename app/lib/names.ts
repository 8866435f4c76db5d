/**
 * Every name a person types (roster and display names, nicknames, class, reading-set and tune
 * names) goes through here, so nobody can pass for someone else or hide text in a name:
 *
 * - NFC-normalised, trimmed, runs of white space (tabs and line breaks included) made one space;
 * - refused, with a message naming the problem: control characters, text-direction controls,
 *   zero-width and other invisible characters (every format character, Unicode category Cf, and
 *   the few blank-looking letters), private-use characters, and more than MAX_MARKS combining
 *   marks stacked on one letter ("Zalgo" text that runs over the lines around it).
 *
 * `skeleton` is what two names are compared by where looking alike counts as the same name (a
 * room's nicknames, a class's roster): case folded and common look-alike letters mapped to one.
 */
import { z } from "zod";

/** Up to three: Thai, Devanagari and decomposed Vietnamese letters use two or three marks on one letter. */
export const MAX_MARKS = 3;

export type NameResult = { ok: true; name: string } | { ok: false; message: string };

const hex = (c: string) => `U+${c.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}`;

// Unicode's bidirectional formatting characters (UAX #9): they reorder the text around them.
const BIDI = /[\u061C\u200E\u200F\u202A-\u202E\u2066-\u2069]/u;
// Letters and symbols that draw as nothing, beside the format characters (Cf) refused as a class.
const BLANK_LOOKING = /[\u115F\u1160\u3164\uFFA0\u2800\u180E]/u;

/** The first thing wrong with the characters of `name`, or null. */
export function nameProblem(name: string): string | null {
  for (const c of name) {
    if (BIDI.test(c)) return `Names can't contain text-direction control characters (${hex(c)}).`;
    if (/\p{Cc}/u.test(c)) return `Names can't contain control characters (${hex(c)}).`;
    if (/\p{Cf}/u.test(c) || BLANK_LOOKING.test(c)) return `Names can't contain invisible characters (${hex(c)}).`;
    if (/\p{Co}/u.test(c)) return `Names can't contain private-use characters (${hex(c)}).`;
  }
  let marks = 0;
  for (const c of name) {
    marks = /\p{M}/u.test(c) ? marks + 1 : 0;
    if (marks > MAX_MARKS) return `Names can't stack more than ${MAX_MARKS} accent marks on one letter.`;
  }
  return null;
}

interface NameRules {
  /** Names the field in messages: "the class's name". */
  what: string;
  max: number;
  min?: number;
  /** The message for an empty name, when "Enter <what>." is not the page's own wording. */
  empty?: string;
}

/** NFC, trimmed and single-spaced; the characters checked. */
export function cleanName(raw: string, { what, max, min = 1, empty }: NameRules): NameResult {
  // White space first, so a tab or line break becomes a space instead of a refused control
  // character; JavaScript counts U+FEFF as white space, but it is an invisible character here.
  const name = raw.normalize("NFC").replace(/[^\S\uFEFF]+/gu, " ").replace(/^ | $/g, "");
  const problem = nameProblem(name);
  if (problem) return { ok: false, message: problem };
  const length = [...name].length;
  if (length === 0 && empty) return { ok: false, message: empty };
  if (length < min) return { ok: false, message: min === 1 ? `Enter ${what}.` : `${capital(what)} needs at least ${min} characters.` };
  if (length > max) return { ok: false, message: `Keep ${what} under ${max} characters.` };
  return { ok: true, name };
}

const capital = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** A form field holding a name: cleaned as cleanName does, or one clear message. */
export function nameField(what: string, max: number, empty?: string) {
  return z.string().transform((raw, ctx) => {
    const result = cleanName(raw, { what, max, empty });
    if (result.ok) return result.name;
    ctx.addIssue({ code: "custom", message: result.message });
    return z.NEVER;
  });
}

/**
 * Look-alikes of Latin letters, from memory of how they are drawn in common sans-serif fonts
 * (Unicode's confusables list works the same way, far more broadly). Cyrillic and Greek capitals
 * and small letters that draw like a Latin one, a few Latin variants, and the digits and capital I
 * that pass for small letters. Applied before case folding: capital I and small l look alike, small i does not.
 */
const LOOK_ALIKES: Record<string, string> = {
  // Cyrillic
  А: "a", В: "b", Е: "e", К: "k", М: "m", Н: "h", О: "o", Р: "p", С: "c", Т: "t", Х: "x", У: "y",
  Ѕ: "s", І: "l", Ј: "j", Ԛ: "q", Ԝ: "w", Ү: "y", Ӏ: "l",
  а: "a", е: "e", о: "o", р: "p", с: "c", у: "y", х: "x", ѕ: "s", і: "i", ј: "j", һ: "h", ԁ: "d",
  ԛ: "q", ԝ: "w", ѵ: "v", ү: "y", ӏ: "l", к: "k",
  // Greek
  Α: "a", Β: "b", Ε: "e", Ζ: "z", Η: "h", Ι: "l", Κ: "k", Μ: "m", Ν: "n", Ο: "o", Ρ: "p", Τ: "t", Υ: "y", Χ: "x",
  ο: "o", ν: "v", α: "a", ι: "i", κ: "k", ρ: "p", υ: "u", χ: "x", γ: "y",
  // Latin variants, digits and the capital I
  ı: "i", ɑ: "a", ɡ: "g", ǀ: "l", ɩ: "i", I: "l", "1": "l", "0": "o", "|": "l",
};

/**
 * What a name looks like, for telling apart names a reader could not: "Ana" (Latin), "Аna"
 * (Cyrillic А) and "ANA" share one. NFKC first, so full-width and styled letters count as the plain ones.
 */
export function skeleton(name: string): string {
  const mapped = [...name.normalize("NFKC")].map((c) => LOOK_ALIKES[c] ?? c).join("");
  // "rn" reads as "m" at a glance, so both count as "m".
  return mapped.toLowerCase().replace(/\s+/gu, " ").trim().replace(/rn/g, "m");
}
