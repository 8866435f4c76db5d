import { sql } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { assignments, classes, memberships, readingSets, rooms } from "~/db/schema";
import { firstSteps, type SchoolCounts } from "./firstSteps";

/** The school's first steps: one query of counts, all scoped to the school. */
export async function schoolFirstSteps(db: Db, orgId: string) {
  const [row] = await db
    .select({
      classes: sql<number>`(select count(*) from ${classes} where ${classes.orgId} = ${orgId})`,
      students: sql<number>`(select count(*) from ${memberships} join ${classes} on ${classes.id} = ${memberships.classId}
        where ${classes.orgId} = ${orgId} and ${memberships.role} = 'student')`,
      readingSets: sql<number>`(select count(*) from ${readingSets} where ${readingSets.orgId} = ${orgId})`,
      rounds: sql<number>`(select count(*) from ${rooms} where ${rooms.orgId} = ${orgId})`,
      assignments: sql<number>`(select count(*) from ${assignments} where ${assignments.orgId} = ${orgId})`,
      firstClassId: sql<string | null>`(select ${classes.id} from ${classes} where ${classes.orgId} = ${orgId} order by ${classes.name} limit 1)`,
    })
    .from(sql`(select 1)`);
  const { firstClassId, ...counts } = row!;
  return firstSteps(counts satisfies SchoolCounts, firstClassId);
}
