import { eq } from "drizzle-orm";
import { hashPassword } from "~/auth/password.server";
import { closeDb, migrateDb, openDb, type Db } from "~/db/client.server";
import { classes, memberships, organisations, users } from "~/db/schema";
import { seedDemoAssignments } from "~/demo/assignments";
import { seedHistory } from "~/demo/history";
import { seedDemoPractice } from "~/demo/practice";
import { seedReading } from "~/demo/reading";
import { DEMO_PASSWORD, DEMO_SCHOOL as S } from "~/demo/school";
import { loadEnv } from "~/env.server";

/** Replaces the demo school (and only it) with a fresh copy; other schools are untouched. */
export async function seedDemo(db: Db) {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db.delete(organisations).where(eq(organisations.id, S.id));
  const students = S.students.map(([displayName, classId], i) => ({
    id: `demo-student-${i + 1}`,
    displayName,
    classId,
    email: i === S.studentWithSignIn.index ? S.studentWithSignIn.email : null,
  }));
  await db.batch([
    db.insert(organisations).values({ id: S.id, name: S.name }),
    db.insert(users).values([
      { ...S.admin, orgId: S.id, role: "admin", passwordHash },
      ...S.teachers.map((t) => ({ ...t, orgId: S.id, role: "teacher" as const, passwordHash })),
      ...students.map((s) => ({
        id: s.id,
        orgId: S.id,
        role: "student" as const,
        displayName: s.displayName,
        email: s.email,
        passwordHash: s.email ? passwordHash : null,
      })),
    ]),
    db.insert(classes).values(S.classes.map((c) => ({ id: c.id, orgId: S.id, name: c.name, joinCode: c.joinCode }))),
    db.insert(memberships).values([
      ...S.classes.map((c) => ({ classId: c.id, userId: c.teacher, role: "teacher" as const })),
      ...students.map((s) => ({ classId: s.classId, userId: s.id, role: "student" as const })),
    ]),
  ]);
  await seedReading(db);
  await seedHistory(db);
  await seedDemoAssignments(db);
  await seedDemoPractice(db);
}

/**
 * Seeds the demo school only if it is not there yet, so a restarted demo keeps what was done in
 * it, live rooms included. Resolves true when it was kept.
 */
export async function ensureDemo(db: Db): Promise<boolean> {
  const [kept] = await db.select({ id: organisations.id }).from(organisations).where(eq(organisations.id, S.id));
  if (!kept) await seedDemo(db);
  return kept !== undefined;
}

export function demoSignIns() {
  return [
    ["admin", S.admin.email],
    ...S.teachers.map((t) => ["teacher", t.email]),
    ["student", S.studentWithSignIn.email],
  ] as const;
}

if (process.argv[1]?.endsWith("seed.ts")) {
  const env = loadEnv();
  const db = await openDb(env.DATABASE_URL, env.DATABASE_AUTH_TOKEN);
  await migrateDb(db);
  await seedDemo(db);
  await closeDb(db);
  console.log(`Seeded ${S.name} into ${env.DATABASE_URL}\n\nDemo sign-ins (password for all: ${DEMO_PASSWORD}):`);
  for (const [role, email] of demoSignIns()) console.log(`  ${role.padEnd(8)} ${email}`);
}
