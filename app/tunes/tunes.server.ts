import { and, eq } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { tunes } from "~/db/schema";
import { cleanName } from "~/lib/names";
import { parseScoreFile, type Tune as ParsedScore } from "~/music/musicxml";
import { MusicError } from "~/music/pitch";
import { BUILTIN_TUNES, builtinTune, type Tune, type TuneNote } from "./builtin";

export const TITLE_MAX = 80;

/** One melody line as Fretcall keeps it: pitch, length in beats, bar number (1-based). */
export function toStoredTune(score: ParsedScore, title: string): Omit<Tune, "id" | "composer"> {
  const notes: TuneNote[] = score.notes.map((n) => ({ pitch: n.written, beats: n.duration, bar: n.barIndex + 1 }));
  return {
    title,
    keyFifths: score.notes[0]?.keyFifths ?? 0,
    // Bars are kept as written; the count-in of a rhythm pass uses a bar of four beats.
    beatsPerBar: 4,
    notes,
  };
}

/** Parses an upload and stores it; a MusicError from the parser carries the message for the teacher. */
export async function saveUploadedTune(db: Db, user: SessionUser, bytes: Uint8Array, typedTitle: string) {
  const score = parseScoreFile(bytes);
  // A typed title is the teacher's and is checked as it is; the score's own is cut to fit.
  const clean = cleanName(typedTitle.trim() || [...(score.title || "Untitled tune")].slice(0, TITLE_MAX).join(""), { what: "the title", max: TITLE_MAX });
  if (!clean.ok) throw new MusicError(`The tune's title can't be used: ${clean.message}`);
  const title = clean.name;
  const stored = toStoredTune(score, title);
  const id = nanoid();
  await db.insert(tunes).values({
    id,
    orgId: user.orgId,
    title: stored.title,
    composer: "",
    keyFifths: stored.keyFifths,
    beatsPerBar: stored.beatsPerBar,
    notes: stored.notes,
    createdBy: user.id,
  });
  return { id, title, notes: stored.notes.length, bars: score.bars };
}

const fromRow = (row: typeof tunes.$inferSelect): Tune => ({
  id: row.id,
  title: row.title,
  composer: row.composer,
  keyFifths: row.keyFifths,
  beatsPerBar: row.beatsPerBar,
  notes: row.notes,
});

/** The school's uploaded tunes after the built-in ones. */
export async function tunesFor(db: Db, orgId: string): Promise<(Tune & { builtin: boolean })[]> {
  const rows = await db.select().from(tunes).where(eq(tunes.orgId, orgId)).orderBy(tunes.title);
  return [...BUILTIN_TUNES.map((t) => ({ ...t, builtin: true })), ...rows.map((r) => ({ ...fromRow(r), builtin: false }))];
}

/** A built-in tune, or one of this school's uploads. */
export async function findTune(db: Db, orgId: string, id: string): Promise<(Tune & { builtin: boolean }) | undefined> {
  const builtin = builtinTune(id);
  if (builtin) return { ...builtin, builtin: true };
  const [row] = await db.select().from(tunes).where(and(eq(tunes.id, id), eq(tunes.orgId, orgId)));
  return row ? { ...fromRow(row), builtin: false } : undefined;
}

export async function deleteTune(db: Db, orgId: string, id: string) {
  const gone = await db.delete(tunes).where(and(eq(tunes.id, id), eq(tunes.orgId, orgId))).returning({ id: tunes.id });
  return gone.length > 0;
}

/** The notes of bars from…to (inclusive), for a Tune walk over part of a tune. */
export function barRange(tune: Tune, from: number, to: number): TuneNote[] {
  return tune.notes.filter((n) => n.bar >= from && n.bar <= to);
}
