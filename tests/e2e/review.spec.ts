import { expect, shot, signIn, test } from "./fixtures";

test("a teacher reads the class review, picks one round and opens a student's progress", async ({ page }) => {
  await signIn(page, "rafe@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  await page.goto("/teach/classes/demo-class-thu/review");
  await expect(page.getByRole("heading", { name: "Class review · Thursday Improvers" })).toBeVisible();
  // Thursday reads in G major: the F♯ is what they keep missing.
  const reteach = page.locator("section", { has: page.getByRole("heading", { name: "Notes to reteach" }) });
  await expect(reteach.getByText(/^F♯\d$/).first()).toBeVisible();
  await expect(reteach.getByText("not read yet").first()).toBeVisible();
  // The heatmap is drawn on staves (engraved) and on the fretboard, with words beside it.
  await expect(page.locator("figure[role=img] svg").first()).toBeVisible();
  await expect(page.getByRole("img", { name: /Note heatmap on the fretboard/ })).toBeVisible();
  await expect(page.getByRole("table", { name: /Every student/ })).toBeVisible();
  await shot(page, "class-review");

  await page.getByLabel("Round").selectOption({ index: 1 });
  await expect(page).toHaveURL(/round=demo-round-thu-5/);
  await expect(page.getByRole("link", { name: /Export CSV \(this round\)/ })).toBeVisible();

  const download = page.waitForEvent("download");
  await page.getByRole("link", { name: /Export CSV/ }).click();
  expect((await download).suggestedFilename()).toMatch(/^fretcall-Thursday-Improvers-\d{4}-\d{2}-\d{2}\.csv$/);

  await page.getByRole("table", { name: /Every student/ }).getByRole("link").first().click();
  await expect(page.getByRole("heading", { name: "Personal bests" })).toBeVisible();
  await expect(page.getByText("Accuracy per round")).toBeVisible();
  await expect(page.locator(".recharts-line").first()).toBeVisible();
  await shot(page, "student-progress");
});
