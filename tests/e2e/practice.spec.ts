import type { Page } from "@playwright/test";
import { expect, shot, signIn, test } from "./fixtures";
import { answer, steadyTune } from "./practising";

const PHONE = { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true };

async function practisedSince(page: Page, since: number) {
  const body = (await (await page.request.get(`/api/v1/practice/answers?since=${since}`)).json()) as { answers: { kind: string; clientId: string }[] };
  return body.answers;
}

test("the rhythm pass of a steady tune counts in, takes taps and shows early and late per note", async ({ browser }) => {
  const context = await browser.newContext(PHONE);
  const page = await context.newPage();
  await signIn(page, "amani@larkspur.example");
  await expect(page).toHaveURL(/\/me$/);
  await steadyTune(page, "lantern-walk");
  await page.goto("/me/rhythm/lantern-walk");
  await page.getByLabel("Tempo").selectOption("120");
  await shot(page, "rhythm-ready");
  await page.getByRole("button", { name: "Start the count-in" }).click();
  const pad = page.getByRole("button", { name: "Tap each note" });
  await expect(pad).toBeVisible();
  await expect(page.getByText("Bar 1")).toBeVisible({ timeout: 5_000 });
  // The whole tune is engraved, and the note to tap now carries its mark (band and pointer) as well as its colour.
  await expect(page.getByTestId("tune-staff").locator(".vf-asked-note")).toHaveCount(1);
  await shot(page, "rhythm-playing");
  // Roughly in time: one tap a beat (120 bpm = 500 ms) for the first bars; the rest of the tune goes untapped.
  for (let i = 0; i < 8; i++) {
    await pad.dispatchEvent("pointerdown");
    await page.waitForTimeout(500);
  }
  await expect(page.getByRole("heading", { name: /^Score \d+ %/ })).toBeVisible({ timeout: 30_000 });
  await expect(page.getByText("Saved.")).toBeVisible();
  await expect(page.getByText("missed").first()).toBeVisible();
  await shot(page, "rhythm-results");
  await context.close();
});

test("a student practises on a phone, loses the connection for two answers, and every answer arrives", async ({ browser }) => {
  const context = await browser.newContext(PHONE);
  const page = await context.newPage();
  await signIn(page, "amani@larkspur.example");
  await expect(page).toHaveURL(/\/me$/);
  await expect(page.getByText(/days? in a row/)).toBeVisible();
  await shot(page, "student-home");

  const since = Date.now();
  await page.goto("/me/practice?preset=ready-naturals-5&count=5");
  await page.getByRole("button", { name: "Start practising" }).click();
  // The reason names the note: it waits for the answer.
  await expect(page.getByText("Why this note:")).toHaveCount(0);

  // Three answers online: right, wrong, right.
  await answer(page, true);
  await expect(page.getByText("Why this note:")).toBeVisible();
  await shot(page, "practice-right");
  await page.getByRole("button", { name: "Next note" }).click();
  await answer(page, false);
  await shot(page, "practice-wrong");
  await page.getByRole("button", { name: "Next note" }).click();
  await answer(page, true);
  await expect(page.getByText("All answers saved")).toBeVisible();
  await expect.poll(async () => (await practisedSince(page, since)).length).toBe(3);

  // The connection drops: two more answers wait on the phone.
  await context.setOffline(true);
  await page.getByRole("button", { name: "Next note" }).click();
  await answer(page, true);
  await page.getByRole("button", { name: "Next note" }).click();
  await answer(page, false);
  await expect(page.getByText(/2 answers waiting \(offline/)).toBeVisible();
  expect(await page.evaluate(() => JSON.parse(localStorage.getItem("fretcall-practice-queue:demo-student-1") ?? "[]").length)).toBe(2);
  // The session ends with the summary and the reminder to rest, offline or not.
  await expect(page.getByText("Rest your hands.")).toBeVisible();
  await expect(page.getByText("Keep headphone volume moderate.")).toBeVisible();
  await shot(page, "practice-offline-summary");

  // Back online: the queue empties by itself, and the server has all five, diagnosed by itself.
  await context.setOffline(false);
  await expect(page.getByText("All answers saved")).toBeVisible({ timeout: 15_000 });
  const stored = await practisedSince(page, since);
  expect(stored).toHaveLength(5);
  expect(stored.filter((a) => a.kind === "home-spot" || a.kind === "other-spot")).toHaveLength(3);
  expect(await page.evaluate(() => JSON.parse(localStorage.getItem("fretcall-practice-queue:demo-student-1") ?? "[]").length)).toBe(0);
  await context.close();
});
