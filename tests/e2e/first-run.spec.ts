import { expect, startStudio, test } from "./fixtures";
import type { Page } from "@playwright/test";

const steps = (page: Page) => page.getByRole("list", { name: "First steps" });
const done = (page: Page) => steps(page).locator("li[data-done=true]");

test("a new admin's first steps tick themselves as they work through them", async ({ page }) => {
  const email = `noor-${Date.now()}@first-run.example`;
  await startStudio(page, { studio: "Quillon Guitar Studio", name: "Noor Ellery", email, password: "first steps first" });

  // Nothing done yet; the admin's menu offers hosting; adding a teacher waits for a class, and says so.
  await expect(page.getByText("5 steps to go")).toBeVisible();
  await expect(done(page)).toHaveCount(0);
  await expect(page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Host a round" })).toBeAttached();
  await expect(page.getByText("Create a class first: a new teacher joins with their first class.")).toBeVisible();

  await steps(page).getByRole("link", { name: "Create a class" }).click();
  await page.getByLabel("Class name").fill("Monday Starters");
  await page.getByRole("button", { name: "Create class" }).click();
  await expect(page.getByText("Created Monday Starters.")).toBeVisible();
  await expect(done(page)).toHaveText([/Create a class/]);

  await steps(page).getByRole("link", { name: "Add students or print sign-in cards" }).click();
  await expect(page.getByRole("heading", { name: "Monday Starters" })).toBeVisible();
  await page.getByLabel("Name", { exact: true }).fill("Pip Q.");
  await page.getByRole("button", { name: "Add student" }).click();
  await expect(page.getByRole("rowheader", { name: "Pip Q." }).first()).toBeVisible();

  await page.goto("/teach");
  await expect(done(page)).toHaveText([/Create a class/, /Add students/]);
  await steps(page).getByRole("link", { name: "Host a first round" }).click();
  await page.getByRole("button", { name: "Host this set: Naturals in fifth position" }).click();
  await expect(page).toHaveURL(/\/stage\//);

  await page.goto("/teach");
  await expect(done(page)).toHaveText([/Create a class/, /Add students/, /Host a first round/]);
  await expect(page.getByText("2 steps to go")).toBeVisible();
});
