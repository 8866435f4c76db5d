// Saved reading sets. A set belongs to the school, and optionally to one class: a teacher sees the school-wide
// sets and those of the classes they teach; an admin sees all of the school's.
import { and, desc, eq, inArray, isNull, or } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { classes, readingSets } from "~/db/schema";
import { classesFor } from "~/school/classes.server";
import { readingPreset } from "./presets";
import { readingSetSpecSchema, describeReadingSet, type ReadingSetSpec } from "./spec";

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

function toSaved(row: { id: string; name: string; classId: string | null; className: string | null; spec: unknown; createdAt: Date; updatedAt: Date | null }): SavedSet {
  const parsed = readingSetSpecSchema.safeParse(row.spec);
  return {
    id: row.id,
    name: row.name,
    classId: row.classId,
    className: row.className,
    spec: parsed.success ? parsed.data : null,
    summary: parsed.success ? describeReadingSet(parsed.data) : `Needs an edit: ${parsed.error.issues[0]?.message ?? "it no longer checks out"}`,
    updatedAt: (row.updatedAt ?? row.createdAt).toISOString(),
  };
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
  return rows.map(toSaved);
}

/** One set the user may see, or undefined (callers answer 404, never a hint that it exists elsewhere). */
export async function setFor(db: Db, user: SessionUser, id: string): Promise<SavedSet | undefined> {
  const [row] = await db
    .select(columns)
    .from(readingSets)
    .leftJoin(classes, eq(classes.id, readingSets.classId))
    .where(and(eq(readingSets.id, id), await visibleFilter(db, user)));
  return row ? toSaved(row) : undefined;
}

/** Whether the user may file a set under this class (none = school-wide, always allowed). */
export async function mayUseClass(db: Db, user: SessionUser, classId: string | null | undefined) {
  return !classId || (await classesFor(db, user)).some((c) => c.id === classId);
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

/** What "host this set" opens from: a ready-made set by its id, or a saved one the user may see. */
export async function hostableSet(db: Db, user: SessionUser, id: string) {
  const preset = readingPreset(id);
  if (preset) return { spec: preset.spec, source: { name: preset.name } };
  const saved = await setFor(db, user, id);
  return saved?.spec ? { spec: saved.spec, source: { name: saved.name, readingSetId: saved.id } } : undefined;
}
