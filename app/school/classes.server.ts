import { and, count, eq, sql } from "drizzle-orm";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { classes, memberships, users } from "~/db/schema";

export interface ClassSummary {
  id: string;
  name: string;
  students: number;
  teachers: string;
}

/** The classes a user may see: all of the school's for an admin, otherwise those they belong to. */
export async function classesFor(db: Db, user: SessionUser): Promise<ClassSummary[]> {
  const studentCount = db
    .select({ classId: memberships.classId, n: count().as("n") })
    .from(memberships)
    .where(eq(memberships.role, "student"))
    .groupBy(memberships.classId)
    .as("student_count");
  const teacherNames = db
    .select({
      classId: memberships.classId,
      names: sql<string>`group_concat(${users.displayName}, ', ')`.as("names"),
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.role, "teacher"))
    .groupBy(memberships.classId)
    .as("teacher_names");
  const base = db
    .select({
      id: classes.id,
      name: classes.name,
      students: sql<number>`coalesce(${studentCount.n}, 0)`,
      teachers: sql<string>`coalesce(${teacherNames.names}, '')`,
    })
    .from(classes)
    .leftJoin(studentCount, eq(studentCount.classId, classes.id))
    .leftJoin(teacherNames, eq(teacherNames.classId, classes.id));
  const rows =
    user.role === "admin"
      ? await base.where(eq(classes.orgId, user.orgId))
      : await base.innerJoin(memberships, and(eq(memberships.classId, classes.id), eq(memberships.userId, user.id)));
  return rows.sort((a, b) => a.name.localeCompare(b.name));
}
