// Roster rows from a CSV file or a form: parsing and the row-by-row checks, shared by the preview
// and the import (which re-checks everything, since the confirmed rows come back from the browser).
import Papa from "papaparse";
import { z } from "zod";
import { email as emailSchema, NAME_MAX } from "~/auth/schemas";
import { cleanName, skeleton } from "~/lib/names";
import { plural } from "~/lib/plural";

export const CSV_MAX_BYTES = 100_000;
export const CSV_MAX_ROWS = 200;

export interface RosterRow {
  /** The row's line in the file (the header is line 1), or 0 for a student added by hand. */
  line: number;
  name: string;
  email: string;
}

/** A problem with a row, on the column it is about (the single-student form shows it beside that field). */
export interface RowProblem {
  field: "name" | "email";
  message: string;
}

export interface CheckedRow extends RosterRow {
  errors: RowProblem[];
}

/** Who is already in the class, and e-mails that belong to accounts this roster may not reuse. */
export interface RosterContext {
  names: Iterable<string>;
  emails: Iterable<string>;
  /** E-mail → why it can't be used (for example another school's account). */
  blockedEmails?: ReadonlyMap<string, string>;
}

const NAME_HEADERS = ["name", "display name", "student", "student name", "nickname"];
const EMAIL_HEADERS = ["email", "e-mail", "e-mail address", "email address", "mail"];

export type ParsedCsv = { ok: true; rows: RosterRow[] } | { ok: false; error: string };

/** Reads a roster CSV: a header line naming a name column (and optionally an e-mail column), then one student a line. */
export function parseRosterCsv(text: string): ParsedCsv {
  if (text.length > CSV_MAX_BYTES) return { ok: false, error: `The file is too large (at most ${CSV_MAX_BYTES / 1000} KB).` };
  if (text.includes("\u0000")) return { ok: false, error: "This isn't a CSV text file. Save the sheet as CSV and try again." };
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ""), { skipEmptyLines: "greedy" });
  const [header, ...body] = parsed.data;
  if (!header) return { ok: false, error: "The file is empty." };
  const heads = header.map((h) => h.trim().toLowerCase());
  const nameCol = heads.findIndex((h) => NAME_HEADERS.includes(h));
  const emailCol = heads.findIndex((h) => EMAIL_HEADERS.includes(h));
  if (nameCol < 0) {
    return { ok: false, error: "The first line must name the columns, for example: name,email (the e-mail column is optional)." };
  }
  if (body.length === 0) return { ok: false, error: "The file has a header line but no students." };
  if (body.length > CSV_MAX_ROWS) return { ok: false, error: `The file has ${plural(body.length, "student")}; import at most ${CSV_MAX_ROWS} at a time.` };
  // Papaparse reports the record index; with quoted line breaks a record can span lines, so count from the parse.
  const lineOf = lineNumbers(parsed.data.length, text);
  return {
    ok: true,
    rows: body.map((cells, i) => ({
      line: lineOf[i + 1] ?? i + 2,
      name: (cells[nameCol] ?? "").trim(),
      email: emailCol >= 0 ? (cells[emailCol] ?? "").trim() : "",
    })),
  };
}

/** Line of each record, assuming one record a line when the counts agree (the usual case), else 1, 2, 3… */
function lineNumbers(records: number, text: string): number[] {
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  const filled = lines.map((l, i) => ({ l, i })).filter(({ l }) => l.trim() !== "");
  return filled.length === records ? filled.map(({ i }) => i + 1) : Array.from({ length: records }, (_, i) => i + 1);
}

/** Checks each row on its own and against the rows before it and the class as it is now. */
export function checkRosterRows(rows: readonly RosterRow[], ctx: RosterContext): CheckedRow[] {
  // Names that look alike ("Ana" and a Cyrillic "Аna") would be two students no one can tell apart.
  const classNames = new Set([...ctx.names].map(skeleton));
  const classEmails = new Set([...ctx.emails].map((e) => e.toLowerCase()));
  const seenNames = new Map<string, number>();
  const seenEmails = new Map<string, number>();
  return rows.map((row) => {
    const errors: RowProblem[] = [];
    const problem = (field: RowProblem["field"], message: string) => errors.push({ field, message });
    const clean = cleanName(row.name, { what: "a name", max: NAME_MAX, empty: "Missing name." });
    const name = clean.ok ? clean.name : row.name.normalize("NFC").trim().replace(/\s+/g, " ");
    const email = row.email.trim().toLowerCase();
    if (!clean.ok) problem("name", clean.message);
    if (email) {
      const check = emailSchema.safeParse(email);
      if (!check.success) problem("email", check.error.issues[0]?.message ?? "Bad e-mail address.");
    }
    const key = skeleton(name);
    const where = (line: number) => (line > 0 ? `line ${line}` : "an earlier row");
    if (name && seenNames.has(key)) problem("name", `Same name as ${where(seenNames.get(key)!)}.`);
    if (email && seenEmails.has(email)) problem("email", `Same e-mail as ${where(seenEmails.get(email)!)}.`);
    if (name && classNames.has(key)) problem("name", "A student with this name is already in the class.");
    else if (email && classEmails.has(email)) problem("email", "A student with this e-mail is already in the class.");
    const blocked = email ? ctx.blockedEmails?.get(email) : undefined;
    if (blocked) problem("email", blocked);
    if (name && !seenNames.has(key)) seenNames.set(key, row.line);
    if (email && !seenEmails.has(email)) seenEmails.set(email, row.line);
    return { line: row.line, name, email, errors };
  });
}

/** A confirmed row as the browser sends it back; anything else is refused before checking. */
export const rosterRowSchema = z.object({
  line: z.number().int().min(0).max(100_000),
  name: z.string().max(1000),
  email: z.string().max(1000),
});
