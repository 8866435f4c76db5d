import type { Browser, Page } from "@playwright/test";
import { expect, shot, signIn, test } from "./fixtures";

const PHONE = { viewport: { width: 360, height: 640 }, isMobile: true, hasTouch: true };
const MM = 96 / 25.4;
type Spot = { string: number; fret: number };

/** Pages in a PDF Chromium printed. */
const pdfPages = (pdf: Buffer) => pdf.toString("latin1").match(/\/Type\s*\/Page(?!s)/g)?.length ?? 0;

/** A phone that practises one note of a ready-made set and gets its home spot right. */
async function practiseOneNote(page: Page) {
  await page.goto("/me/practice?preset=ready-naturals-5&count=5");
  await page.getByRole("button", { name: "Start practising" }).click();
  const written = (await page.locator("[data-written]").getAttribute("data-written"))!;
  const map = (await (await page.request.get("/api/v1/spot-map?position=5&tuning=standard")).json()) as { spots: (Spot & { written: string })[] };
  const home = map.spots.find((s) => s.written === written)!;
  await page.getByRole("button", { name: `string ${home.string}, fret ${home.fret}`, exact: true }).click();
  await expect(page.getByRole("status").filter({ hasText: /Home spot!/ })).toBeVisible();
  await expect(page.getByText("All answers saved")).toBeVisible();
}

async function phone(browser: Browser) {
  const context = await browser.newContext(PHONE);
  return { context, page: await context.newPage() };
}

test("a teacher prints sign-in cards, and phones sign in with one by its link and by its codes, then practise", async ({ browser, page }) => {
  await signIn(page, "saoirse@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  // Two more nickname-only students make eleven: a full page of ten and one over.
  await page.goto("/teach/classes/demo-class-sat");
  for (const name of ["Aurel M.", "Bettina K."]) {
    await page.getByLabel("Name", { exact: true }).fill(name);
    await page.getByRole("button", { name: "Add student" }).click();
    await expect(page.getByText(`Added ${name}`)).toBeVisible();
  }
  await page.getByRole("link", { name: "Sign-in cards" }).click();
  await expect(page.getByRole("heading", { name: "Sign-in cards for Saturday Youth Guitar" })).toBeVisible();
  // Every student without a card is ticked.
  await expect(page.getByRole("checkbox", { name: "Card for Quill E." })).toBeChecked();
  await page.getByRole("button", { name: "Issue and print the ticked cards" }).click();

  const cards = page.locator("article[data-card-url]");
  await expect(cards).toHaveCount(11);
  await expect(cards.first().getByRole("img", { name: "QR code that signs Aurel M. in" })).toBeVisible();
  await shot(page, "cards-sheet");

  // Printed: 90 × 50 mm cards, two to a row, ten to a sheet of A4 or Letter (eleven take two); nothing else on it.
  await page.emulateMedia({ media: "print" });
  const boxes = await cards.evaluateAll((els) => els.map((el) => el.getBoundingClientRect().toJSON() as DOMRect));
  for (const box of boxes) {
    expect(box.width).toBeCloseTo(90 * MM, 0);
    expect(box.height).toBeCloseTo(50 * MM, 0);
  }
  expect(new Set(boxes.map((b) => Math.round(b.x))).size).toBe(2);
  await expect(page.getByRole("button", { name: "Print the cards" })).toBeHidden();
  for (const format of ["A4", "Letter"]) expect(pdfPages(await page.pdf({ format }))).toBe(2);
  await page.emulateMedia({ media: "screen" });

  const first = { path: new URL((await cards.nth(0).getAttribute("data-card-url"))!).pathname, name: "Aurel M." };
  const second = { code: (await cards.nth(1).locator("[data-personal-code]").textContent())!, name: "Bettina K." };
  const classCode = (await cards.nth(1).locator("[data-class-code]").textContent())!;

  // By the link: the card asks, one tap signs in, and the phone practises.
  const byLink = await phone(browser);
  await byLink.page.goto(first.path);
  await byLink.page.getByRole("button", { name: `✓ Sign in as ${first.name}` }).click();
  await expect(byLink.page).toHaveURL(/\/me$/);
  await practiseOneNote(byLink.page);
  await shot(byLink.page, "cards-practised-by-link");

  // By typing the codes on the sign-in page.
  const byCodes = await phone(browser);
  await byCodes.page.goto("/signin");
  await byCodes.page.getByLabel("Class code").fill(classCode.toLowerCase());
  await byCodes.page.getByLabel("Personal code").fill(second.code);
  await byCodes.page.getByRole("button", { name: "Use my card" }).click();
  await expect(byCodes.page).toHaveURL(/\/me$/);
  await practiseOneNote(byCodes.page);

  // The teacher sees both phones and signs one out; it is sent to sign in again.
  await page.goto("/teach/classes/demo-class-sat/cards");
  await expect(page.getByRole("row", { name: /Aurel M\./ })).toContainText("last used");
  await page.getByRole("button", { name: /Sign out Bettina K\.'s/ }).click();
  await expect(page.getByText("That device is signed out")).toBeVisible();
  await byCodes.page.goto("/me");
  await expect(byCodes.page).toHaveURL(/\/signin/);

  await byLink.context.close();
  await byCodes.context.close();
});
