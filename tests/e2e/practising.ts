// Practice steps shared by the browser tests: answering the note shown, and making a tune's notes steady
// so its rhythm pass opens (pitch first: earlier tests may leave some of them unsteady).
import type { Page } from "@playwright/test";
import { expect } from "./fixtures";

type Spot = { string: number; fret: number };

/** The note on the staff (data-written) and its home spot from the public spot-map API. */
async function noteOnStaff(page: Page) {
  const written = (await page.locator("[data-written]").getAttribute("data-written"))!;
  const map = (await (await page.request.get("/api/v1/spot-map?position=5&tuning=standard")).json()) as { spots: (Spot & { written: string })[] };
  const home = map.spots.find((s) => s.written === written)!;
  return { written, home };
}

const tap = (page: Page, spot: Spot) => page.getByRole("button", { name: `string ${spot.string}, fret ${spot.fret}`, exact: true }).click();

/** Answers the note shown: at its home spot, or a fret off (always a wrong pitch). */
export async function answer(page: Page, right: boolean) {
  const { home } = await noteOnStaff(page);
  await tap(page, right ? home : { string: home.string, fret: home.fret + 1 });
  const feedback = page.getByRole("status").filter({ hasText: right ? /Home spot!|other spot/ : /Home spot: string \d, fret \d+\./ });
  await expect(feedback).toBeVisible();
}

/**
 * Pitch first: the rhythm pass opens only once every note of the tune is steady, and earlier tests may have
 * unsteadied some. Steadying through the practice screen depends on how fast the machine answers (a home spot
 * over 3 s counts as slow), so this sends what the phone sends after two quick home spots at every spot of
 * fifth position, through the public practice API, and checks that the pass has opened.
 */
export async function steadyTune(page: Page, tuneId: string) {
  const open = async () => (await (await page.request.get(`/me/rhythm/${tuneId}`)).text()).includes("Start the count-in");
  if (await open()) return;
  const map = (await (await page.request.get("/api/v1/spot-map?position=5&tuning=standard")).json()) as { spots: (Spot & { written: string })[] };
  const now = Date.now();
  const answers = map.spots.flatMap((spot, i) =>
    [0, 1].map((n) => ({
      clientId: `steady-${now}-${i}-${n}`,
      source: `tune:${tuneId}`,
      position: 5,
      tuning: "standard",
      keyFifths: 0,
      written: spot.written,
      string: spot.string,
      fret: spot.fret,
      reactionMs: 900,
      at: now - 1000 + n * 500,
    })),
  );
  // The page is signed in on the site, so its origin is the site's (cross-site posts are refused).
  const res = await page.request.post("/api/v1/practice/answers", { data: { answers }, headers: { Origin: new URL(page.url()).origin } });
  expect(res.status(), await res.text()).toBe(200);
  expect(await open(), "the rhythm pass opens once every note of the tune is steady").toBe(true);
}
