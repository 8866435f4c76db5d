import type { Browser, Page } from "@playwright/test";
import { noteName, type NoteNaming } from "~/music/naming";
import { parsePitch } from "~/music/pitch";
import { expect, shot, signIn, test } from "./fixtures";

const PHONE = { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true };

async function setSchoolNaming(browser: Browser, naming: NoteNaming) {
  const context = await browser.newContext();
  const page = await context.newPage();
  await signIn(page, "admin@larkspur.example");
  await expect(page).not.toHaveURL(/signin/);
  await page.goto("/admin");
  await page.getByLabel("How Fretcall names notes in words").selectOption(naming);
  await page.getByRole("button", { name: "Save", exact: true }).click();
  await expect(page.getByText(/Notes are now named/)).toBeVisible();
  await context.close();
}

/** Taps a fret above the home spot of the note on the staff (always a wrong pitch) and gives the feedback and the note. */
async function missOnce(page: Page) {
  const written = (await page.locator("[data-written]").getAttribute("data-written"))!;
  const map = (await (await page.request.get("/api/v1/spot-map?position=5&tuning=standard")).json()) as { spots: { written: string; string: number; fret: number }[] };
  const home = map.spots.find((s) => s.written === written)!;
  await page.getByRole("button", { name: `string ${home.string}, fret ${home.fret + 1}`, exact: true }).click();
  const feedback = page.getByRole("status").filter({ hasText: /Home spot: string \d, fret \d+\./ });
  await expect(feedback).toBeVisible();
  return { feedback, pitch: parsePitch(written) };
}

/** The asked note as the feedback names it: "the note is Sol.", "makes this Fa♯;", "makes it Si♭;". */
const named = (name: string) => new RegExp(`(?:is|this|it) ${name}[.;]`, "u");

test("a school that names notes in solfège sees Sol; a student who picks letters on the device sees G", async ({ browser }) => {
  test.setTimeout(120_000);
  await setSchoolNaming(browser, "solfege");
  try {
    const context = await browser.newContext(PHONE);
    const page = await context.newPage();
    await signIn(page, "amani@larkspur.example");
    await expect(page).toHaveURL(/\/me$/);

    // The explorer is rendered on the server in the school's naming.
    await page.goto("/explore?note=G5");
    await expect(page.getByText("Written Sol5")).toBeVisible();

    await page.goto("/me/practice?preset=ready-naturals-5&count=20");
    await page.getByRole("button", { name: "Start practising" }).click();
    const first = await missOnce(page);
    await expect(first.feedback).toContainText(named(noteName(first.pitch, "solfege")));
    await shot(page, "naming-solfege-feedback");

    // This phone's own choice overrides the school's, for this student's screens only.
    await page.getByLabel("Note names on this device").selectOption("letters");
    await page.getByRole("button", { name: "Next note" }).click();
    const second = await missOnce(page);
    await expect(second.feedback).toContainText(named(noteName(second.pitch, "letters")));
    await page.goto("/explore?note=G5");
    await expect(page.getByText("Written G5")).toBeVisible();
    await shot(page, "naming-letters-explorer");
    await context.close();
  } finally {
    await setSchoolNaming(browser, "letters");
  }
});
