import { expect, shot, signIn, test } from "./fixtures";

test("a teacher builds a reading set, sees its preview, and hosts a round from it", async ({ page }) => {
  await signIn(page, "rafe@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  await page.goto("/teach/sets");
  await expect(page.getByRole("heading", { name: "Ready-made progression" })).toBeVisible();
  await shot(page, "reading-sets-list");

  await page.getByRole("link", { name: "New reading set" }).click();
  await expect(page).toHaveURL(/\/teach\/sets\/new$/);
  const preview = page.getByTestId("pool-preview");
  await expect(preview).toContainText("notes from");
  const naturals = await preview.locator("p").first().textContent();

  await page.getByLabel("Name", { exact: true }).fill("Week 3: G major, top strings");
  await page.getByLabel("Notes to read", { exact: true }).selectOption("key");
  await page.getByLabel("Key signature", { exact: true }).selectOption("1");
  for (const string of [4, 5, 6]) await page.getByRole("checkbox", { name: new RegExp(`^${string} \\(`) }).uncheck();
  // The preview follows the form: fewer notes on three strings.
  await expect(preview.locator("p").first()).not.toHaveText(naturals!);
  await expect(page.getByRole("img", { name: /key signature 1 sharp/ })).toBeVisible();

  // Inline validation: a bad range is named before anything is posted.
  await page.getByLabel("Lowest written note", { exact: true }).fill("H4");
  await expect(page.getByText(/Lowest note:/).first()).toBeVisible();
  await page.getByLabel("Lowest written note", { exact: true }).fill("");
  await shot(page, "reading-set-form");

  await page.getByRole("button", { name: "Save reading set" }).click();
  await expect(page).toHaveURL(/\/teach\/sets\?done=/);
  await expect(page.getByText("Saved “Week 3: G major, top strings”.")).toBeVisible();
  const id = new URL(page.url()).searchParams.get("set")!;

  await page.goto(`/host?set=${id}&class=demo-class-tue`);
  await expect(page.getByText(/Position 5 · Standard · G major, notes of the key/).first()).toBeVisible();
  await shot(page, "host-from-set");
  await page.getByRole("button", { name: "Host this set: Week 3: G major, top strings" }).click();
  await expect(page).toHaveURL(/\/stage\//);
  await expect(page.getByLabel(/^Room code/).first()).toBeVisible();
  await shot(page, "stage-from-set");
});

test("a teacher edits a class's home-spot map by tapping and sees the engine's check", async ({ page }) => {
  await signIn(page, "rafe@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  await page.goto("/teach/classes/demo-class-thu/maps?position=5&tuning=standard");
  await expect(page.getByText("The map checks out")).toBeVisible();
  await page.getByRole("button", { name: "C5", exact: true }).click();
  await page.getByRole("button", { name: /^string 1, fret 5/ }).click();
  await expect(page.getByText("This map can't be saved yet")).toBeVisible();
  await expect(page.getByText(/C5 is placed at string 1, fret 5, which plays/)).toBeVisible();
  await shot(page, "spot-map-problem");
});
