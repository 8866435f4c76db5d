import { fileURLToPath } from "node:url";
import { expect, shot, signIn, test } from "./fixtures";

const ROSTER = fileURLToPath(new URL("./fixtures/roster.csv", import.meta.url));

test("a teacher imports a roster CSV: sees the row errors, confirms, and finds the students on the roster", async ({ page }) => {
  await signIn(page, "rafe@larkspur.example");
  await page.getByRole("link", { name: "Thursday Improvers" }).click();
  await expect(page.getByRole("heading", { level: 1, name: "Thursday Improvers" })).toBeVisible();
  await expect(page.getByText("THUIMP")).toBeVisible();

  await page.getByLabel("CSV file").setInputFiles(ROSTER);
  await page.getByRole("button", { name: "Preview" }).click();
  const preview = page.getByRole("table", { name: "Rows of the uploaded file" });
  await expect(page.getByText("3 of 7 rows can be imported.")).toBeVisible();
  for (const problem of [
    "Missing name.",
    "That doesn't look like an e-mail address.",
    "Same name as line 6.",
    "A student with this name is already in the class.",
  ]) {
    await expect(preview.getByText(problem)).toBeVisible();
  }
  await expect(page.getByLabel("Import line 5: Teodor B.")).toBeDisabled();
  // The teacher leaves one good row out.
  await page.getByLabel("Import line 2: Runa T.").uncheck();
  await shot(page, "roster-import-preview");

  await page.getByRole("button", { name: "Import the ticked students" }).click();
  await expect(page.getByText("Imported 2 students.")).toBeVisible();
  const roster = page.getByRole("table", { name: /Students in Thursday Improvers/ });
  await expect(roster.getByRole("rowheader", { name: "Sefa W." })).toBeVisible();
  await expect(roster.getByRole("rowheader", { name: "Uma C." })).toBeVisible();
  await expect(roster.getByRole("rowheader", { name: "Runa T." })).toHaveCount(0);
  await expect(roster.getByRole("row", { name: /Sefa W\./ })).toContainText("Invited");

  // The table filters and sorts in the browser.
  await page.getByPlaceholder("Filter students").fill("uma");
  await expect(roster.getByRole("rowheader")).toHaveText(["Uma C."]);
  await page.getByPlaceholder("Filter students").fill("");
  await roster.getByRole("button", { name: /^Name/ }).click();
  await expect(roster.getByRole("columnheader", { name: /^Name/ })).toHaveAttribute("aria-sort", "descending");
  // …and pages: ten students, five to a page (the roster's own pager: the class hub above has one too).
  const rosterCard = page.locator("section", { has: roster });
  await rosterCard.getByLabel("Rows per page").selectOption("5");
  await expect(roster.getByRole("rowheader")).toHaveCount(5);
  await expect(roster.getByRole("rowheader").first()).toHaveText("Uma C.");
  await rosterCard.getByRole("button", { name: "Next" }).click();
  await expect(rosterCard.getByText("Page 2 of 2")).toBeVisible();
  await expect(roster.getByRole("rowheader")).toHaveCount(5);
  await shot(page, "roster-after-import");
});

test("the CSV preview scrolls into view when it appears, on a phone too", async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 700 });
  await signIn(page, "saoirse@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  await page.goto("/teach/classes/demo-class-sat");
  await page.getByLabel("CSV file").setInputFiles(ROSTER);
  await page.getByRole("button", { name: "Preview" }).click();
  const heading = page.getByRole("heading", { name: "Check the import" });
  await expect(heading).toBeFocused();
  const box = (await heading.boundingBox())!;
  expect(box.y).toBeGreaterThanOrEqual(0);
  expect(box.y + box.height).toBeLessThanOrEqual(700);
  expect(await page.evaluate(() => window.scrollY)).toBeGreaterThan(0);
});
