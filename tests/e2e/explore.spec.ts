import { expect, shot, test } from "./fixtures";

// The neck explorer is public and mostly used on phones; the fixture fails any test whose page asks another host.
test.use({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });

test("the neck explorer draws the written note on the staff", async ({ page }) => {
  await page.goto("/explore?note=A4&position=5");
  await expect(page.getByRole("heading", { name: "Written A4" })).toBeVisible();
  const staff = page.getByRole("img", { name: /Treble clef with an 8 below.*A 4/ });
  await expect(staff).toBeVisible();
  // The engraving loads after the words; it is drawn once its SVG is in the figure.
  await expect(staff.locator("svg").first()).toBeVisible();
  await shot(page, "explore");
});

test("tapping a fret on a phone marks it and says what it plays", async ({ page }) => {
  await page.goto("/explore?note=A4&position=5");
  const neck = page.getByRole("group", { name: /Spots for .*tap any spot to hear it/ });
  // The home spot of written A4 in fifth position: string 4, fret 7, marked as such.
  await expect(neck.getByRole("button", { name: "string 4, fret 7, home spot" })).toBeVisible();

  await neck.getByRole("button", { name: "string 3, fret 6", exact: true }).tap();
  await expect(page.getByText("String 3, fret 6 plays written C♯5")).toBeVisible();
  await expect(page.getByText("another pitch")).toBeVisible();
  await expect(neck.getByRole("button", { name: "string 3, fret 6, your tap" })).toBeVisible();

  await neck.getByRole("button", { name: "string 4, fret 7, home spot" }).tap();
  await expect(page.getByText("String 4, fret 7 plays written A4")).toBeVisible();
  await expect(page.getByText("same pitch as A4")).toBeVisible();
  await shot(page, "explore-tapped");
});

test("a bad parameter gets a clear error and keeps what was typed", async ({ page }) => {
  await page.goto("/explore?note=H9");
  const alert = page.getByRole("alert");
  await expect(alert).toContainText("These settings can't be shown yet");
  await expect(alert).toContainText("note");
  await expect(page.getByLabel("Written note")).toHaveValue("H9");
  await expect(page.getByRole("heading", { name: /^Written/ })).toHaveCount(0);
  await shot(page, "explore-error");

  const api = await page.request.get("/api/v1/spots?note=H9&tuning=standard");
  expect(api.status()).toBe(400);
  expect((await api.json()).error).toMatch(/^note: /);
});
