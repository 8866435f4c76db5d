// Demo reading sets (a couple per class) and one class's edited home-spot map, all invented for the demo.
import type { Db } from "~/db/client.server";
import { readingSets, spotMaps } from "~/db/schema";
import { defaultSpotMap } from "~/music/positions";
import { TUNINGS } from "~/music/tuning";
import { readingPreset } from "~/reading/presets";
import type { ReadingSetSpec } from "~/reading/spec";
import { DEMO_SCHOOL as S } from "./school";

const preset = (id: string) => readingPreset(id)!.spec;

const SETS: { id: string; classId: string | null; name: string; by: string; spec: ReadingSetSpec }[] = [
  { id: "demo-set-tue-1", classId: "demo-class-tue", name: "Week 1: naturals, top three strings", by: "demo-teacher-rafe", spec: { ...preset("ready-naturals-5"), strings: [1, 2, 3], prompts: 10 } },
  { id: "demo-set-tue-2", classId: "demo-class-tue", name: "Week 2: all six strings", by: "demo-teacher-rafe", spec: { ...preset("ready-naturals-5"), prompts: 15 } },
  { id: "demo-set-thu-1", classId: "demo-class-thu", name: "G major warm-up", by: "demo-teacher-rafe", spec: { ...preset("ready-g-major-5"), seconds: 8 } },
  { id: "demo-set-thu-2", classId: "demo-class-thu", name: "Accidentals, E4 to E5", by: "demo-teacher-rafe", spec: { ...preset("ready-accidentals-5"), lowest: "E4", highest: "E5", prompts: 16 } },
  { id: "demo-set-sat-1", classId: "demo-class-sat", name: "Saturday starter", by: "demo-teacher-saoirse", spec: { ...preset("ready-naturals-5"), mode: "teams", strings: [1, 2], prompts: 8, seconds: 15 } },
  { id: "demo-set-sat-2", classId: "demo-class-sat", name: "F major on the top strings", by: "demo-teacher-saoirse", spec: { ...preset("ready-f-major-5"), strings: [1, 2, 3] } },
  { id: "demo-set-school", classId: null, name: "End-of-term check: fifth position", by: "demo-admin", spec: { ...preset("ready-ledger-5"), prompts: 24 } },
];

/**
 * Tuesday Beginners play written B4 on string 4 at fret 9 rather than string 3 at fret 4: their teacher keeps the
 * hand from reaching back in week 1. Both are one-fret stretches of fifth position, so the map stays valid.
 */
export function demoEditedMap() {
  const map = defaultSpotMap(5, TUNINGS.standard);
  return { ...map, spots: map.spots.map((s) => (s.written === "B4" ? { ...s, string: 4, fret: 9 } : s)) };
}

export async function seedReading(db: Db) {
  await db.insert(readingSets).values(SETS.map(({ by, ...s }) => ({ ...s, orgId: S.id, createdBy: by, updatedAt: new Date() })));
  await db.insert(spotMaps).values({
    classId: "demo-class-tue",
    position: 5,
    tuning: "standard",
    map: demoEditedMap(),
    updatedBy: "demo-teacher-rafe",
    updatedAt: new Date(),
  });
}
