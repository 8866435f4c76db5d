import { demoEditedMap } from "~/demo/reading";
import { expect, readMail, shot, signIn, test } from "./fixtures";

const PHONE = { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true };
const TITLE = "Ten notes before Tuesday";
const GOAL_NOTES = 10;

test("a teacher sets an assignment; the student sees it, practises it on a phone, and the teacher sees it done", async ({ page: teacher, browser }) => {
  test.setTimeout(120_000);
  await teacher.setViewportSize({ width: 1280, height: 900 });
  await signIn(teacher, "rafe@larkspur.example");
  await expect(teacher).toHaveURL(/\/teach$/);

  // The teacher sets it: a ready-made set, the whole class, a small goal, the default due date.
  await teacher.goto("/teach/classes/demo-class-tue/assignments");
  await expect(teacher.getByRole("heading", { name: "Assignments · Tuesday Beginners" })).toBeVisible();
  await teacher.getByRole("link", { name: /Set an assignment/ }).click();
  // A wrong entry first: a clear message beside its field, and nothing typed is lost.
  await teacher.getByLabel("Title (optional)").fill(TITLE);
  await teacher.getByLabel("Notes in a row").fill("2");
  await teacher.getByRole("button", { name: "Set the assignment" }).click();
  await expect(teacher.getByText("Choose what to practise: a reading set, a ready-made set or a tune.")).toBeVisible();
  await expect(teacher.getByText("Notes: a whole number from 5 to 500.")).toBeVisible();
  await expect(teacher.getByLabel("Title (optional)")).toHaveValue(TITLE);
  await shot(teacher, "assignment-form-errors");

  await teacher.getByLabel("Reading set or tune").selectOption("preset:ready-naturals-5");
  await teacher.getByLabel("Notes in a row").fill(String(GOAL_NOTES));
  await teacher.getByLabel("Percent correct").fill("90");
  await teacher.getByLabel("Median time under (s)").fill("10");
  await teacher.getByRole("button", { name: "Set the assignment" }).click();
  await expect(teacher.getByText("Assignment set. A notice was e-mailed to 1 student.")).toBeVisible();
  const card = teacher.locator("article", { has: teacher.getByRole("heading", { name: TITLE }) });
  await expect(card.getByText("0 of 8 done")).toBeVisible();
  await shot(teacher, "assignments-teacher-set");

  // Amani, the demo student with an e-mail, got the notice with the practice link.
  const notice = (await readMail()).find((m) => m.subject === `New assignment: ${TITLE}`);
  expect(notice?.to).toEqual(["amani@larkspur.example"]);
  const link = new URL(/https?:\/\/\S+\/me\/practice\?assignment=\S+/.exec(notice!.text)![0]);

  // On her phone she sees it on her home page, not started, and opens it from there.
  const phone = await (await browser.newContext(PHONE)).newPage();
  await signIn(phone, "amani@larkspur.example");
  await expect(phone).toHaveURL(/\/me$/);
  await expect(phone.getByRole("heading", { name: "Open assignments" })).toBeVisible();
  const mine = phone.locator("li", { has: phone.getByRole("heading", { name: TITLE }) });
  await expect(mine.getByText("Not started")).toBeVisible();
  await expect(mine.getByText(`Goal: ${GOAL_NOTES} notes in a row at 90 % correct, median under 10 s`)).toBeVisible();
  await shot(phone, "assignments-student-home");
  await mine.getByRole("link", { name: /Practise/ }).click();
  await expect(phone).toHaveURL(new RegExp(`/me/practice\\?assignment=${link.searchParams.get("assignment")}$`));

  // She answers every note on its home spot: Tuesday Beginners read with their class's own map (the demo's edited one).
  const map = demoEditedMap();
  await phone.getByRole("button", { name: "Start practising" }).click();
  for (let i = 0; i < GOAL_NOTES; i++) {
    if (i > 0) await phone.getByRole("button", { name: "Next note" }).click();
    const written = await phone.locator("[data-written]").getAttribute("data-written");
    const home = map.spots.find((s) => s.written === written)!;
    await phone.getByRole("button", { name: `string ${home.string}, fret ${home.fret}`, exact: true }).click();
    await expect(phone.getByText("Home spot!")).toBeVisible();
  }
  await expect(phone.getByText("saved")).toBeVisible({ timeout: 15_000 });
  await shot(phone, "assignments-student-practised");

  // The teacher's list now shows her done; her home page says so too.
  await expect(async () => {
    await teacher.reload();
    await expect(card.locator('tr[data-student="Amani K."]')).toContainText("Done", { timeout: 1_000 });
  }).toPass({ timeout: 15_000 });
  await expect(card.getByText("1 of 8 done")).toBeVisible();
  await shot(teacher, "assignments-teacher-done");
  await phone.goto("/me");
  await expect(mine).toContainText("Done");
  await expect(mine.getByRole("link", { name: /Practise/ })).toHaveCount(0);
});
