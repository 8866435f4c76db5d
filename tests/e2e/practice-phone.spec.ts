import type { Locator, Page } from "@playwright/test";
import { expect, signIn, test } from "./fixtures";

type Spot = { string: number; fret: number };
const VIEWPORTS = [
  { width: 360, height: 640 },
  { width: 390, height: 664 },
];

/** A box lies wholly inside the viewport (no scrolling needed to see it). */
async function inView(page: Page, what: Locator, name: string) {
  const { width, height } = page.viewportSize()!;
  const box = (await what.boundingBox())!;
  expect(box, name).not.toBeNull();
  expect(box.x, `${name}: left edge`).toBeGreaterThanOrEqual(0);
  expect(box.y, `${name}: top edge`).toBeGreaterThanOrEqual(0);
  expect(box.x + box.width, `${name}: right edge`).toBeLessThanOrEqual(width);
  expect(box.y + box.height, `${name}: bottom edge`).toBeLessThanOrEqual(height);
  return box;
}

const spotButton = (page: Page, s: Spot) => page.getByRole("button", { name: new RegExp(`^string ${s.string}, fret ${s.fret}(,|$)`) });

/** After an answer the neck marks the home spot, and its button's name says so. */
const homeSpot = (page: Page) => page.getByRole("button", { name: /, home spot$/ });

for (const viewport of VIEWPORTS) {
  test(`on a ${viewport.width}×${viewport.height} phone the note, the instruction and the whole position are in view; after the answer, the feedback, the home spot and Next note`, async ({ browser }) => {
    const context = await browser.newContext({ viewport, isMobile: true, hasTouch: true });
    const page = await context.newPage();
    await signIn(page, "amani@larkspur.example");
    await expect(page).toHaveURL(/\/me$/);
    // Free practice in a position no assignment asks for.
    await page.goto("/me/practice?position=5&count=5");
    await page.getByRole("button", { name: "Start practising" }).click();
    const staff = page.locator("[data-written] figure");
    await expect(staff).toBeVisible();
    expect(await page.evaluate(() => window.scrollY)).toBe(0);
    await inView(page, staff, "staff");
    await inView(page, page.getByText("Tap the home spot of this note"), "instruction");
    // Fifth position with its one-fret stretches (frets 4–9): every target, at least 44 px, and every fret number.
    for (let fret = 4; fret <= 9; fret++) {
      for (let string = 1; string <= 6; string++) {
        const box = await inView(page, spotButton(page, { string, fret }), `string ${string}, fret ${fret}`);
        // Sub-pixel layout: 43.99997 px is a 44 px target.
        expect(Math.round(box.width)).toBeGreaterThanOrEqual(44);
        expect(Math.round(box.height)).toBeGreaterThanOrEqual(44);
      }
      await inView(page, page.locator(`[data-fret-label="${fret}"]`), `fret number ${fret}`);
    }

    // Nothing before the answer gives the reason away: not in the text, nor a label, title or hidden element.
    const before = await page.content();
    expect(before).not.toContain("Why this note");
    // The sixth string at the position's stretch: rarely the home spot, so usually a miss to explain.
    await spotButton(page, { string: 6, fret: 4 }).click();
    await inView(page, page.getByRole("status").filter({ hasText: /Home spot/ }), "feedback");
    await inView(page, homeSpot(page), "the home spot");
    const reason = page.getByText("Why this note:");
    await expect(reason).toBeVisible();
    const reasonText = (await reason.locator("..").innerText()).replace("Why this note:", "").trim();
    expect(reasonText.length).toBeGreaterThan(5);
    expect(before).not.toContain(reasonText);
    // Next note is under the thumb: in view, at the bottom of the screen, one tap.
    const next = page.getByRole("button", { name: "Next note" });
    const box = await inView(page, next, "Next note");
    expect(box.y + box.height).toBeGreaterThan(viewport.height - 80);
    await page.screenshot({ path: `tests/.tmp/screenshots/practice-phone-${viewport.width}-answered.png` });
    await next.click();
    await expect(page.getByText("Note 2 of 5")).toBeVisible();
    await inView(page, staff, "the next note's staff");
    await inView(page, page.getByText("Tap the home spot of this note"), "the next instruction");
    await expect(page.getByText("Why this note:")).toHaveCount(0);
    await context.close();
  });
}

test("practice counts toward the assignment whether started from it or from the same set in the list, and the page names it", async ({ browser }) => {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  await signIn(page, "amani@larkspur.example");
  await expect(page).toHaveURL(/\/me$/);
  const mine = (await (await page.request.get("/api/v1/me/assignments")).json()) as { assignments: { id: string; title: string; status: string }[] };

  /** Starts a session, answers one note at its home spot, and gives the assignment the stored answer counts toward. */
  async function practiseOne() {
    const since = Date.now();
    await page.getByRole("button", { name: "Start practising" }).click();
    await spotButton(page, { string: 3, fret: 5 }).click();
    await expect(homeSpot(page)).toBeVisible();
    await expect(page.getByText("All answers saved")).toBeVisible({ timeout: 15_000 });
    const { answers } = (await (await page.request.get(`/api/v1/practice/answers?since=${since}`)).json()) as { answers: { assignmentId: string | null }[] };
    expect(answers).toHaveLength(1);
    return answers[0]!.assignmentId;
  }

  // From the assignment on her home page.
  const card = page.locator("li", { has: page.getByRole("heading", { name: "Naturals in fifth position" }) });
  await card.getByRole("link", { name: "Practise" }).click();
  await expect(page).toHaveURL(/assignment=/);
  const named = page.locator("[data-counts-toward]");
  await expect(named).toContainText("Counts toward your assignment Naturals in fifth position (Tuesday Beginners, due");
  const assignment = mine.assignments.find((a) => a.title === "Naturals in fifth position")!;
  expect(await practiseOne()).toBe(assignment.id);

  // The same ready-made set from her practice list: the same assignment, named the same way.
  await page.goto("/me/practice");
  await page.locator('a[href$="?preset=ready-naturals-5"]').click();
  await expect(page).toHaveURL(/preset=ready-naturals-5/);
  await expect(named).toContainText("Counts toward your assignment Naturals in fifth position");
  await page.screenshot({ path: "tests/.tmp/screenshots/practice-counts-toward.png" });
  expect(await practiseOne()).toBe(assignment.id);

  // A set no assignment of hers asks for counts toward nothing, and says nothing.
  await page.goto("/me/practice?position=7");
  await expect(page.getByRole("button", { name: "Start practising" })).toBeVisible();
  await expect(named).toHaveCount(0);
  expect(await practiseOne()).toBeNull();
  await context.close();
});
