import { closeDb, openDb } from "~/db/client.server";
import { classes, memberships, users } from "~/db/schema";
import { playedRound, quick } from "../constructed-class";
import { expect, signIn, test } from "./fixtures";

const SCHOOL = "demo-larkspur";
const TEACHER = "demo-teacher-rafe";

/** A class of five in the demo school, four of whom read step 1 well; written into the served database. */
async function constructClass() {
  const db = await openDb("file:tests/.tmp/e2e.db");
  const classId = `hub-class-${Date.now()}`;
  const names = ["Ada", "Bo", "Cy", "Di", "Ed"];
  const ids = Object.fromEntries(names.map((n) => [n, `${classId}-${n}`]));
  await db.insert(users).values(names.map((n) => ({ id: ids[n]!, orgId: SCHOOL, role: "student" as const, displayName: `${n} H.` })));
  await db.insert(classes).values({ id: classId, orgId: SCHOOL, name: "Constructed Readers", joinCode: classId.slice(-6).toUpperCase() });
  await db.insert(memberships).values([{ classId, userId: TEACHER, role: "teacher" as const }, ...names.map((n) => ({ classId, userId: ids[n]!, role: "student" as const }))]);
  const slow = () => ({ home: true, ms: 6_000 });
  await playedRound(db, { n: 1, orgId: SCHOOL, hostId: TEACHER, classId }, Object.fromEntries(names.map((n) => [n, { userId: ids[n]!, play: n === "Ed" ? slow : quick }])));
  await closeDb(db);
  return classId;
}

test("the class hub says a constructed class is ready for the next step and hosts it in one click", async ({ page }) => {
  const classId = await constructClass();
  await signIn(page, "rafe@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  await page.goto(`/teach/classes/${classId}`);
  const line = page.getByTestId("class-ready");
  await expect(line).toContainText("Current step: step 1, Naturals in fifth position");
  await expect(line).toContainText("4 of 5 students read it well");
  await expect(line).toContainText("Ready for the next step");
  // Ed finds every home spot but slowly: the median, not only the spots, decides.
  const hub = page.getByRole("table", { name: "Each student at the current step" });
  await expect(hub.getByRole("row", { name: /Ed H\./ })).toContainText("Working on it");
  // Sorting by the step puts the one still working on it first.
  await hub.getByRole("button", { name: /Current step/ }).click();
  await expect(hub.getByRole("row").nth(1)).toContainText("Ed H.");
  await page.getByRole("button", { name: "Host step 2: One sharp: G major" }).click();
  await expect(page).toHaveURL(/\/stage\//);
});
