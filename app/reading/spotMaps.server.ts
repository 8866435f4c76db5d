// A class's own home-spot maps (one per position and tuning); without one the class reads the default map.
import { and, eq } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { spotMaps } from "~/db/schema";
import { validateSpotMap, type SpotMap, type SpotMapProblem } from "~/music/positions";
import { resolveTuning } from "~/music/tuning";

const where = (classId: string, position: number, tuningId: string) =>
  and(eq(spotMaps.classId, classId), eq(spotMaps.position, position), eq(spotMaps.tuning, tuningId));

/** The class's saved map, or undefined. A stored map the engine no longer accepts is ignored rather than played. */
export async function classSpotMap(db: Db, classId: string, position: number, tuning: string): Promise<SpotMap | undefined> {
  const t = resolveTuning(tuning);
  const [row] = await db.select({ map: spotMaps.map }).from(spotMaps).where(where(classId, position, t.id));
  const map = row?.map;
  return map && validateSpotMap(map, t).length === 0 ? map : undefined;
}

/** Stores the map only when the engine finds no problem; otherwise returns the problems and stores nothing. */
export async function saveClassSpotMap(db: Db, classId: string, map: SpotMap, userId: string): Promise<SpotMapProblem[]> {
  const tuning = resolveTuning(map.tuning);
  const problems = validateSpotMap(map, tuning);
  if (problems.length > 0) return problems;
  const row = { classId, position: map.position, tuning: tuning.id, map, updatedBy: userId, updatedAt: new Date() };
  await db
    .insert(spotMaps)
    .values(row)
    .onConflictDoUpdate({ target: [spotMaps.classId, spotMaps.position, spotMaps.tuning], set: { map, updatedBy: userId, updatedAt: row.updatedAt } });
  return [];
}

export async function resetClassSpotMap(db: Db, classId: string, position: number, tuning: string) {
  await db.delete(spotMaps).where(where(classId, position, resolveTuning(tuning).id));
}
