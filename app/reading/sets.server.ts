// Saved reading sets. A set belongs to the school, and optionally to one class: a teacher sees the school-wide
// sets and those of the classes they teach; an admin sees all of the school's.
import { and, desc, eq, inArray, isNull, or } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { classes, readingSets } from "~/db/schema";
import { classesFor } from "~/school/classes.server";
import { readingPreset } from "./presets";
import { parseReadingSet, readingSetSpecSchema, describeReadingSet, type ParsedReadingSet, type ReadingSetSpec } from "./spec";

export interface SavedSet {
  id: string;
  name: string;
  classId: string | null;
  className: string | null;
  /** null when a stored set no longer passes the checks (it then needs an edit before hosting). */
  spec: ReadingSetSpec | null;
  summary: string;
  updatedAt: string;
}

async function visibleFilter(db: Db, user: SessionUser) {
  const inOrg = eq(readingSets.orgId, user.orgId);
  if (user.role === "admin") return inOrg;
  const mine = (await classesFor(db, user)).map((c) => c.id);
  return and(inOrg, or(isNull(readingSets.classId), mine.length ? inArray(readingSets.classId, mine) : undefined));
}

type Row = { id: string; name: string; classId: string | null; className: string | null; spec: unknown; createdAt: Date; updatedAt: Date | null };

/** A stored set parsed once: what lists show, and the parsed set (null when it needs an edit) for hosting or practice. */
function parsedRow(row: Row): { saved: SavedSet; reading: ParsedReadingSet | null } {
  const parsed = parseReadingSet(readingSetSpecSchema, row.spec);
  const saved = {
    id: row.id,
    name: row.name,
    classId: row.classId,
    className: row.className,
    spec: parsed.ok ? parsed.set : null,
    summary: parsed.ok ? describeReadingSet(parsed.set) : `Needs an edit: ${Object.values(parsed.errors)[0] ?? "it no longer checks out"}`,
    updatedAt: (row.updatedAt ?? row.createdAt).toISOString(),
  };
  return { saved, reading: parsed.ok ? parsed : null };
}

const columns = {
  id: readingSets.id,
  name: readingSets.name,
  classId: readingSets.classId,
  className: classes.name,
  spec: readingSets.spec,
  createdAt: readingSets.createdAt,
  updatedAt: readingSets.updatedAt,
};

export async function setsFor(db: Db, user: SessionUser): Promise<SavedSet[]> {
  const rows = await db
    .select(columns)
    .from(readingSets)
    .leftJoin(classes, eq(classes.id, readingSets.classId))
    .where(await visibleFilter(db, user))
    .orderBy(desc(readingSets.updatedAt), desc(readingSets.createdAt));
  return rows.map((row) => parsedRow(row).saved);
}

/** One set the user may see, with its parse; undefined when there is none (callers answer 404, never a hint that it exists elsewhere). */
export async function readingSetFor(db: Db, user: SessionUser, id: string) {
  const [row] = await db
    .select(columns)
    .from(readingSets)
    .leftJoin(classes, eq(classes.id, readingSets.classId))
    .where(and(eq(readingSets.id, id), await visibleFilter(db, user)));
  return row ? parsedRow(row) : undefined;
}

export async function setFor(db: Db, user: SessionUser, id: string): Promise<SavedSet | undefined> {
  return (await readingSetFor(db, user, id))?.saved;
}

export async function createSet(db: Db, user: SessionUser, input: { name: string; classId: string | null; spec: ReadingSetSpec }) {
  const id = nanoid();
  await db.insert(readingSets).values({ id, orgId: user.orgId, createdBy: user.id, updatedAt: new Date(), ...input });
  return id;
}

export async function updateSet(db: Db, id: string, input: { name: string; classId: string | null; spec: ReadingSetSpec }) {
  await db.update(readingSets).set({ ...input, updatedAt: new Date() }).where(eq(readingSets.id, id));
}

export async function deleteSet(db: Db, id: string) {
  await db.delete(readingSets).where(eq(readingSets.id, id));
}

/** What "host this set" opens from, parsed: a ready-made set by its id, or a saved one the user may see that still checks out. */
export async function hostableSet(db: Db, user: SessionUser, id: string) {
  const preset = readingPreset(id);
  if (preset) {
    const reading = parseReadingSet(readingSetSpecSchema, preset.spec);
    return reading.ok ? { reading, source: { name: preset.name } } : undefined;
  }
  const found = await readingSetFor(db, user, id);
  return found?.reading ? { reading: found.reading, source: { name: found.saved.name, readingSetId: found.saved.id } } : undefined;
}
