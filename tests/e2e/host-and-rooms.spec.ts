import type { Browser, BrowserContextOptions, Page } from "@playwright/test";
import { expect as baseExpect, signIn, test } from "./fixtures";

// The server and several browsers share a small machine: give each step room.
const expect = baseExpect.configure({ timeout: 15_000 });

const PHONE: BrowserContextOptions = { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true };
const QUICK = {
  intent: "quick",
  mode: "sprint",
  position: "5",
  tuning: "standard",
  frets: "15",
  accidentals: "naturals",
  keyFifths: "0",
  homeOnly: "on",
  prompts: "3",
  seconds: "20",
  teams: "2",
  classId: "",
};

/** The demo teacher opens a one-off Sprint room straight from the host form's post; returns its code. */
async function openRoom(stage: Page) {
  await signIn(stage, "rafe@larkspur.example");
  await expect(stage).toHaveURL(/\/teach$/);
  const origin = new URL(stage.url()).origin;
  const res = await stage.request.post("/host", { form: QUICK, headers: { Origin: origin }, maxRedirects: 0 });
  expect(res.status()).toBe(302);
  await stage.goto(res.headers()["location"]!);
  return (await stage
    .getByLabel(/^Room code/)
    .first()
    .getAttribute("aria-label"))!.replace(/Room code |\s/g, "");
}

async function phone(browser: Browser) {
  const context = await browser.newContext(PHONE);
  // Counts audio contexts the page makes: a pad that stays silent never makes one.
  await context.addInitScript(() => {
    const w = window as unknown as { AudioContext: typeof AudioContext; audioContexts: number };
    w.audioContexts = 0;
    const Real = w.AudioContext;
    w.AudioContext = class extends Real {
      constructor(options?: AudioContextOptions) {
        super(options);
        w.audioContexts += 1;
      }
    };
  });
  return context.newPage();
}

async function joinAs(pad: Page, code: string, nickname: string) {
  await pad.goto(`/play/${code}`);
  await pad.getByLabel("Nickname").fill(nickname);
  await pad.getByRole("button", { name: "Join" }).click();
  await expect(pad.getByText("You're in. Watch the class screen.")).toBeVisible();
}

const anySpot = (pad: Page, fret: number) => pad.getByRole("button", { name: `string 1, fret ${fret}`, exact: true }).click();
const audioContexts = (pad: Page) => pad.evaluate(() => (window as unknown as { audioContexts: number }).audioContexts);

for (const javaScriptEnabled of [true, false]) {
  test(`the host form shows only the chosen mode's fields and explains naturals with a key (JavaScript ${javaScriptEnabled ? "on" : "off"})`, async ({
    browser,
  }) => {
    const page = await (await browser.newContext({ javaScriptEnabled })).newPage();
    await signIn(page, "rafe@larkspur.example");
    await expect(page).toHaveURL(/\/teach$/);
    await page.goto("/host");
    // By role: a label that wraps a select also holds its options' words.
    const field = (name: string) => page.getByRole("combobox", { name, exact: true }).or(page.getByRole("spinbutton", { name, exact: true }));
    const mode = (name: string) => page.getByRole("radio", { name: new RegExp(name) }).check();

    await mode("Sprint");
    await expect(field("Number of notes")).toBeVisible();
    await expect(field("Key signature")).toBeVisible();
    for (const hidden of ["Tune", "From bar", "Number of teams"]) await expect(field(hidden)).toBeHidden();

    await mode("Tune walk");
    for (const shown of ["Tune", "From bar", "To bar", "Seconds per note"]) await expect(field(shown)).toBeVisible();
    for (const hidden of ["Number of notes", "Key signature", "Notes to read", "Number of teams"]) await expect(field(hidden)).toBeHidden();
    await expect(page.getByText("A Tune walk plays every note of these bars in order")).toBeVisible();

    await mode("Full neck");
    await expect(field("Number of notes")).toBeVisible();
    await expect(page.getByText("Only the home spot earns full points")).toBeHidden();

    await mode("Teams");
    await expect(field("Number of teams")).toBeVisible();

    // Naturals only beside a key of two sharps: the reason shows next to the fields before anything is sent…
    const clash = page.getByText("“Naturals only” is read without a key signature.");
    await expect(clash).toBeHidden();
    await field("Key signature").selectOption({ label: "D major · 2 ♯" });
    await expect(clash).toBeVisible();
    await field("Notes to read").selectOption("key");
    await expect(clash).toBeHidden();
    // …and the server refuses the pair with the same words, opening no room.
    await field("Notes to read").selectOption("naturals");
    await page.getByRole("button", { name: "Open the room" }).click();
    await expect(page).toHaveURL(/\/host/);
    await expect(clash).toBeVisible();
  });
}

test("the stage's reveal fits the screen whole: neck, six strings and legend", async ({ page: stage, browser }) => {
  test.setTimeout(120_000);
  await stage.setViewportSize({ width: 1366, height: 768 });
  const code = await openRoom(stage);
  const pad = await phone(browser);
  await joinAs(pad, code, "Ash");
  await stage.getByRole("button", { name: "Start", exact: true }).click();
  await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
  await anySpot(pad, 5);
  const neck = stage.locator('svg[aria-label^="Fretboard"]');
  const legend = stage.locator("[data-legend]");
  await expect(legend).toBeVisible();
  for (const size of [
    { width: 1366, height: 768 },
    { width: 1920, height: 1080 },
  ]) {
    await stage.setViewportSize(size);
    await expect(neck).toBeVisible();
    await stage.screenshot({ path: `tests/.tmp/screenshots/stage-reveal-${size.width}.png` });
    expect(await stage.evaluate(() => window.scrollY)).toBe(0);
    for (const part of [neck, legend]) {
      const box = (await part.boundingBox())!;
      expect(box.y, `top at ${size.width}×${size.height}`).toBeGreaterThanOrEqual(0);
      expect(box.y + box.height, `bottom at ${size.width}×${size.height}`).toBeLessThanOrEqual(size.height);
      expect(box.x + box.width, `right at ${size.width}×${size.height}`).toBeLessThanOrEqual(size.width);
    }
  }
});

test("a pad is silent until its player turns sound on, and remembers it; at the end it shows its own place", async ({ page: stage, browser }) => {
  test.setTimeout(120_000);
  await stage.setViewportSize({ width: 1280, height: 800 });
  const code = await openRoom(stage);
  const [first, second] = [await phone(browser), await phone(browser)];
  await joinAs(first, code, "Bea");
  await joinAs(second, code, "Cy");
  const sound = first.getByRole("button", { name: /^Sound/ });
  await expect(sound).toHaveAttribute("aria-pressed", "false");

  await stage.getByRole("button", { name: "Start", exact: true }).click();
  for (const pad of [first, second]) await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
  await anySpot(first, 5);
  await anySpot(second, 6);
  await expect(first.getByRole("status").filter({ hasText: /points/ })).toBeVisible();
  // A tap in a live round makes no sound by default: no audio context was ever created.
  expect(await audioContexts(first)).toBe(0);

  // Turned on (for headphones), the choice survives a reload, and the next tap sounds.
  await sound.click();
  await expect(sound).toHaveAttribute("aria-pressed", "true");
  await first.reload();
  await expect(first.getByRole("button", { name: /^Sound/ })).toHaveAttribute("aria-pressed", "true");
  await stage.getByRole("button", { name: "Next", exact: true }).click();
  for (const pad of [first, second]) await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
  await anySpot(first, 7);
  // Sounding makes the pad's audio context (the sound library may add its own on loading).
  await expect.poll(() => audioContexts(first)).toBeGreaterThan(0);

  // Ended early by the teacher: each phone shows where its player finished.
  await stage.getByRole("button", { name: "End", exact: true }).click();
  await stage.getByRole("button", { name: "Really end?" }).click();
  await expect(stage.getByText("Round complete")).toBeVisible();
  for (const [pad, name] of [
    [first, "Bea"],
    [second, "Cy"],
  ] as const) {
    // The rank the stage's final standings give this player (a tie shares a rank).
    const row = await stage
      .getByRole("listitem")
      .filter({ hasText: new RegExp(`^\\d+\\.${name}`) })
      .textContent();
    const rank = Number(row!.match(/^(\d+)\./)![1]);
    await expect(pad.getByTestId("own-place")).toHaveText(`${rank === 1 ? "1st" : "2nd"} of 2`);
  }
});

test("a signed-in student joins with one press, under their own name", async ({ page: stage, browser }) => {
  test.setTimeout(90_000);
  const code = await openRoom(stage);
  const context = await browser.newContext(PHONE);
  const student = await context.newPage();
  await signIn(student, "amani@larkspur.example");
  await expect(student).not.toHaveURL(/\/signin/);
  await student.goto("/join");
  await student.getByLabel("Room code").fill(code);
  await student.getByRole("button", { name: "Join" }).click();
  // No name to type and no second button: the pad is seated at once.
  await expect(student.getByText("You're in. Watch the class screen.")).toBeVisible();
  await expect(student.getByText("Amani K.")).toBeVisible();
  await expect(stage.getByText("Players (1)")).toBeVisible();
});

test("an ended room's code tells the phone the round is over", async ({ page: stage, browser }) => {
  const code = await openRoom(stage);
  await stage.getByRole("button", { name: "End", exact: true }).click();
  await stage.getByRole("button", { name: "Really end?" }).click();
  await expect(stage.getByText("Round complete")).toBeVisible();
  const pad = await phone(browser);
  await pad.goto("/join");
  await pad.getByLabel("Room code").fill(code);
  await pad.getByRole("button", { name: "Join" }).click();
  await expect(pad.getByText(/This round is over/)).toBeVisible();
  await pad.goto(`/play/${code}`);
  await expect(pad.getByRole("heading", { name: "Round over" })).toBeVisible();
});
