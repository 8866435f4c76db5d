import { and, eq, getTableColumns } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { tunes } from "~/db/schema";
import { cleanName } from "~/lib/names";
import type { ReadScore, Tune as ParsedScore } from "~/music/musicxml";
import { BUILTIN_TUNES, builtinTune, type StoredScore, type Tune, type TuneNote } from "./builtin";

export const TITLE_MAX = 80;

/** One melody line as Fretcall keeps it: pitch, length and onset in quarter notes, bar number (1-based), and the score's bars. */
export function toStoredTune(score: ParsedScore, title: string): Omit<Tune, "id" | "composer"> & { score: StoredScore } {
  const notes: TuneNote[] = score.notes.map((n) => ({ pitch: n.written, beats: n.duration, bar: n.barIndex + 1, onset: n.onset, tied: n.tied }));
  const firstFull = score.measures.find((m) => !m.pickup) ?? score.measures[0];
  return {
    title,
    keyFifths: score.notes[0]?.keyFifths ?? 0,
    // Kept for readers of the whole-tune meter: quarter notes in the first full bar (6/8 → 3).
    beatsPerBar: firstFull ? Math.max(1, Math.round((firstFull.beats * 4) / firstFull.beatType)) : 4,
    notes,
    score: { partId: score.partId, part: score.part, parts: score.parts, measures: score.measures, leftOut: score.leftOut, tempo: score.tempo },
  };
}

/** Reads an upload (off the event loop) and stores it with its file, or gives the reader's refusal for the teacher. */
export async function saveUploadedTune(db: Db, read: ReadScore, user: SessionUser, bytes: Uint8Array, typedTitle: string) {
  const reading = await read(bytes);
  if (!reading.ok) return reading;
  const { score } = reading;
  // A typed title is the teacher's and is checked as it is; the score's own is cut to fit.
  const clean = cleanName(typedTitle.trim() || [...(score.title || "Untitled tune")].slice(0, TITLE_MAX).join(""), { what: "the title", max: TITLE_MAX });
  if (!clean.ok) return { ok: false as const, error: `The tune's title can't be used: ${clean.message}` };
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
    score: stored.score,
    source: Buffer.from(reading.kept),
    createdBy: user.id,
  });
  return { ok: true as const, id, title, notes: stored.notes.length, bars: score.bars };
}

/** Reads a stored upload again with another of its parts. */
export async function choosePart(db: Db, read: ReadScore, orgId: string, id: string, partId: string) {
  const [row] = await db.select({ source: tunes.source, title: tunes.title }).from(tunes).where(and(eq(tunes.id, id), eq(tunes.orgId, orgId)));
  if (!row?.source) return { ok: false as const, error: "This tune's file was not kept; upload it again to choose another part." };
  const reading = await read(new Uint8Array(row.source), { partId, kept: true });
  if (!reading.ok) return reading;
  const stored = toStoredTune(reading.score, row.title);
  await db
    .update(tunes)
    .set({ keyFifths: stored.keyFifths, beatsPerBar: stored.beatsPerBar, notes: stored.notes, score: stored.score })
    .where(and(eq(tunes.id, id), eq(tunes.orgId, orgId)));
  return { ok: true as const };
}

const fromRow = (row: Omit<typeof tunes.$inferSelect, "source">): Tune => ({
  id: row.id,
  title: row.title,
  composer: row.composer,
  keyFifths: row.keyFifths,
  beatsPerBar: row.beatsPerBar,
  notes: row.notes,
  ...(row.score ? { score: row.score } : {}),
});

// Everything but the uploaded file, which only re-reading needs.
const { source: _source, ...listed } = getTableColumns(tunes);

/** The school's uploaded tunes after the built-in ones. */
export async function tunesFor(db: Db, orgId: string): Promise<(Tune & { builtin: boolean })[]> {
  const rows = await db.select(listed).from(tunes).where(eq(tunes.orgId, orgId)).orderBy(tunes.title);
  return [...BUILTIN_TUNES.map((t) => ({ ...t, builtin: true })), ...rows.map((r) => ({ ...fromRow(r), builtin: false }))];
}

/** A built-in tune, or one of this school's uploads. */
export async function findTune(db: Db, orgId: string, id: string): Promise<(Tune & { builtin: boolean }) | undefined> {
  const builtin = builtinTune(id);
  if (builtin) return { ...builtin, builtin: true };
  const [row] = await db.select(listed).from(tunes).where(and(eq(tunes.id, id), eq(tunes.orgId, orgId)));
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
