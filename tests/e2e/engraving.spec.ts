import type { Browser, Locator, Page } from "@playwright/test";
import { expect, signIn, test } from "./fixtures";

const PHONE = { viewport: { width: 360, height: 740 }, isMobile: true, hasTouch: true };
const SHOTS = process.env.E2E_SHOTS;

/** A signed-in page on a 360 px phone, at the landing page the role signs in to. */
async function onPhone(browser: Browser, email: string, landing: RegExp) {
  const context = await browser.newContext(PHONE);
  const page = await context.newPage();
  await signIn(page, email);
  await expect(page).toHaveURL(landing);
  return { context, page };
}

/** Every staff drawing on the page ends inside the page's width: nothing runs off the right edge. */
async function staffsInside(page: Page, staffs: Locator) {
  await expect(staffs.first()).toBeVisible();
  const width = page.viewportSize()!.width;
  for (const svg of await staffs.all()) {
    const box = (await svg.boundingBox())!;
    expect(box.x).toBeGreaterThanOrEqual(0);
    expect(box.x + box.width).toBeLessThanOrEqual(width);
  }
  // Nor does anything else make the page scroll sideways.
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width);
}

// Hand-made MusicXML 4.0 (plain treble clef, so <pitch> is the written note): 6/8 with a two-eighth pickup
// (implicit="yes"), C♯5 then C5 in one bar, a dotted quarter, a rest, triplets in 2/4 and a tie over the bar line.
const note = (step: string, octave: number, duration: number, extra = "") => {
  const alter = extra.includes("sharp") ? "<alter>1</alter>" : "";
  return `<note><pitch><step>${step}</step>${alter}<octave>${octave}</octave></pitch><duration>${duration}</duration>${extra.replace("sharp", "")}</note>`;
};
const SCORE = `<?xml version="1.0" encoding="UTF-8"?>
<score-partwise version="4.0">
  <work><work-title>Engraving check</work-title></work>
  <part-list><score-part id="P1"><part-name>Guitar</part-name></score-part></part-list>
  <part id="P1">
    <measure number="0" implicit="yes"><attributes><divisions>6</divisions><key><fifths>0</fifths></key><time><beats>6</beats><beat-type>8</beat-type></time><clef><sign>G</sign><line>2</line></clef></attributes>
      ${note("E", 5, 3)}${note("D", 5, 3)}</measure>
    <measure number="1">${note("C", 5, 3, "sharp")}${note("C", 5, 3)}${note("D", 5, 3)}${note("E", 5, 9, "<dot/>")}</measure>
    <measure number="2">${note("F", 5, 3)}${note("E", 5, 3)}${note("D", 5, 3)}<note><rest/><duration>9</duration></note></measure>
    <measure number="3"><attributes><time><beats>2</beats><beat-type>4</beat-type></time></attributes>${note("C", 5, 2)}${note("D", 5, 2)}${note("E", 5, 2)}${note("G", 5, 6, '<tie type="start"/>')}</measure>
    <measure number="4">${note("G", 5, 12, '<tie type="stop"/>')}</measure>
  </part>
</score-partwise>`;

test("an uploaded melody is engraved as written and wraps on a phone", async ({ browser }) => {
  const { context, page } = await onPhone(browser, "rafe@larkspur.example", /\/teach$/);
  await page.goto("/teach/tunes");
  await page.getByLabel("MusicXML file").setInputFiles({ name: "engraving.musicxml", mimeType: "application/xml", buffer: Buffer.from(SCORE) });
  await page.getByRole("button", { name: /Upload/ }).click();
  await expect(page.getByRole("heading", { name: "Engraving check" })).toBeVisible();
  const staff = page.getByTestId("tune-staff");
  const svg = staff.locator("svg");
  await expect(svg).toBeVisible();
  if (SHOTS) await page.screenshot({ path: `${SHOTS}/tune-phone.png`, fullPage: true });
  await staffsInside(page, svg);
  // Five bars do not fit on one 360 px line.
  expect(Number(await svg.getAttribute("data-systems"))).toBeGreaterThan(1);
  // The words say what the engraving draws: the natural on the second C, dotted values, the rest and triplets.
  const words = (await staff.getAttribute("aria-label"))!;
  expect(words).toContain("C sharp 5 eighth, C 5 (natural sign) eighth");
  expect(words).toContain("E 5 dotted quarter");
  expect(words).toContain("dotted quarter rest");
  expect(words).toContain("C 5 eighth triplet, D 5 eighth triplet, E 5 eighth triplet, G 5 quarter tied");
  expect(words).toContain("(now 2/4)");
  // Wider, the same bars are laid out again on fewer lines: here all on one.
  const phoneSystems = Number(await svg.getAttribute("data-systems"));
  await page.setViewportSize({ width: 1280, height: 800 });
  await expect.poll(async () => Number(await svg.getAttribute("data-systems"))).toBeLessThan(phoneSystems);
  await expect(svg).toHaveAttribute("data-systems", "1");
  if (SHOTS) await page.screenshot({ path: `${SHOTS}/tune-wide.png`, fullPage: true });
  await context.close();
});

test("no staff runs off the right edge of a 360 px phone: reading-set preview, practice, rhythm pass", async ({ browser }) => {
  const { context, page: teacher } = await onPhone(browser, "rafe@larkspur.example", /\/teach$/);
  await teacher.goto("/teach/sets/new");
  await expect(teacher.getByTestId("pool-preview")).toContainText("notes from");
  if (SHOTS) await teacher.screenshot({ path: `${SHOTS}/set-preview-phone.png`, fullPage: true });
  await staffsInside(teacher, teacher.getByTestId("pool-preview").locator("svg").first());
  await teacher.goto("/teach/tunes/lantern-walk");
  await staffsInside(teacher, teacher.getByTestId("tune-staff").locator("svg"));
  await context.close();

  const { context: phone, page: student } = await onPhone(browser, "amani@larkspur.example", /\/me$/);
  await student.goto("/me/rhythm/lantern-walk");
  await staffsInside(student, student.getByTestId("tune-staff").locator("svg"));
  await student.goto("/me/practice?tune=lantern-walk");
  await student.getByRole("button", { name: "Start practising" }).click();
  await staffsInside(student, student.locator("[data-written] svg"));
  if (SHOTS) await student.screenshot({ path: `${SHOTS}/practice-phone.png`, fullPage: true });
  await phone.close();
});
