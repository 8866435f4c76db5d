import type { Browser, BrowserContext, Page } from "@playwright/test";
import { audit } from "./axe";
import { expect as baseExpect, signIn, test } from "./fixtures";

// The machine is shared: give each step room.
const expect = baseExpect.configure({ timeout: 15_000 });
test.use({ actionTimeout: 15_000 });

const VIEWPORTS = {
  phone: { viewport: { width: 360, height: 640 }, isMobile: true, hasTouch: true },
  projector: { viewport: { width: 1366, height: 768 } },
} as const;

// Every page of app/routes.ts that renders HTML, by who may see it (the token pages with a token that is no longer good).
const PAGES = {
  visitor: ["/", "/signin", "/signup", "/forgot", "/reset/no-such-token", "/card/no-such-token", "/invite/no-such-token", "/explore?note=A4&position=5", "/join", "/no-such-page"],
  student: ["/me", "/me/join-class", "/me/practice", "/me/rhythm/lantern-walk", "/settings/devices", "/settings/password"],
  teacher: [
    "/teach",
    "/teach/classes/demo-class-tue",
    "/teach/classes/demo-class-thu/maps?position=5&tuning=standard",
    "/teach/sets",
    "/teach/sets/new",
    "/teach/sets/demo-set-tue-1",
    "/teach/classes/demo-class-thu/review",
    "/teach/classes/demo-class-tue/students/demo-student-1",
    "/teach/classes/demo-class-tue/assignments",
    "/teach/classes/demo-class-tue/assignments/new",
    "/teach/classes/demo-class-tue/cards",
    "/teach/classes/demo-class-tue/cards/print",
    "/teach/tunes",
    "/teach/tunes/lantern-walk",
    "/host",
    "/settings/tokens",
  ],
  admin: ["/admin", "/admin/outbox", "/admin/students/demo-student-1"],
} as const;

const ACCOUNTS = { student: "amani@larkspur.example", teacher: "rafe@larkspur.example", admin: "admin@larkspur.example" } as const;

async function signedIn(browser: Browser, options: object, email?: string): Promise<Page> {
  // The app's Content-Security-Policy (rightly) refuses the injected audit script. Reduced motion: colours are
  // judged as they rest, not halfway through a fade on a busy machine (the pages honour the setting).
  const context: BrowserContext = await browser.newContext({ ...options, bypassCSP: true, reducedMotion: "reduce" });
  const page = await context.newPage();
  if (email) {
    await signIn(page, email);
    await expect(page).not.toHaveURL(/\/signin/);
  }
  return page;
}

const spot = /^string \d, (open|fret \d+)$/;

/** Answers on a neck with the keyboard alone: Tab reaches one spot, an arrow moves along the neck, Enter taps. */
async function tapByKeyboard(page: Page) {
  const spots = page.getByRole("button", { name: spot });
  // The neck is one tab stop (a roving tab index): exactly one of its spots takes the focus from Tab.
  await expect(spots.and(page.locator('[tabindex="0"]'))).toHaveCount(1);
  await spots.and(page.locator('[tabindex="0"]')).focus();
  await page.keyboard.press("ArrowRight");
  await expect(spots.and(page.locator(":focus"))).toHaveCount(1);
  await page.keyboard.press("Enter");
}

for (const [name, options] of Object.entries(VIEWPORTS)) {
  test(`every page passes the WCAG 2.1 AA audit on a ${name}`, async ({ browser }) => {
    test.setTimeout(300_000);
    const failures: string[] = [];
    const check = async (page: Page, where: string) => failures.push(...(await audit(page, `${name} ${where}`)));
    const pages = {
      visitor: await signedIn(browser, options),
      student: await signedIn(browser, options, ACCOUNTS.student),
      teacher: await signedIn(browser, options, ACCOUNTS.teacher),
      admin: await signedIn(browser, options, ACCOUNTS.admin),
    };
    for (const [role, paths] of Object.entries(PAGES)) {
      const page = pages[role as keyof typeof pages];
      for (const path of paths) {
        await page.goto(path);
        await check(page, `${role} ${path}`);
      }
    }

    // Practice: a note asked, then the feedback and the reason after an answer.
    const practice = pages.student;
    await practice.goto("/me/practice?preset=ready-naturals-5&count=5");
    await practice.getByRole("button", { name: "Start practising" }).click();
    await check(practice, "student practice asking");
    // Play mode's explanation before the microphone, and the tune-up check (its microphone not started here).
    await practice.getByRole("button", { name: "Play on my guitar" }).click();
    await check(practice, "student practice, play on my guitar");
    await practice.getByRole("button", { name: "Tune up and start" }).click();
    await expect(practice.getByRole("heading", { name: "Tune up first" })).toBeVisible();
    await check(practice, "student practice, tune-up");
    await practice.getByRole("button", { name: "Skip the tune-up" }).click();
    await practice.getByRole("button", { name: "Answer by tapping instead" }).click();
    await tapByKeyboard(practice);
    await expect(practice.getByRole("button", { name: "Next note" })).toBeVisible();
    await check(practice, "student practice after an answer");

    // A live round: the stage and a pad in the lobby, during a prompt, at the reveal, and the results.
    const stage = pages.teacher;
    await stage.goto("/host");
    await stage.getByLabel("Class", { exact: true }).selectOption({ label: "No class (a one-off round)" });
    await stage.getByLabel("Number of notes").fill("3");
    await stage.getByLabel("Seconds per note").fill("30");
    await stage.getByRole("button", { name: "Open the room" }).click();
    await expect(stage).toHaveURL(/\/stage\//);
    const code = (await stage.getByLabel(/^Room code/).first().getAttribute("aria-label"))!.replace(/Room code |\s/g, "");
    const pad = pages.visitor;
    await pad.goto(`/play/${code}`);
    await pad.getByLabel("Nickname").fill("Wren");
    await pad.getByRole("button", { name: "Join" }).click();
    await expect(pad.getByText("You're in. Watch the class screen.")).toBeVisible();
    await expect(stage.getByText("Players (1)")).toBeVisible();
    await check(stage, "stage lobby");
    await check(pad, "pad lobby");
    await stage.getByRole("button", { name: "Start", exact: true }).click();
    await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
    await expect(stage.locator("[data-written]")).toBeVisible();
    // Once the note shows, a screen reader reads it: the staff's text alternative names a note after the key signature.
    await expect(stage.getByRole("img", { name: /key signature [^;]+; .+/ })).toHaveCount(1);
    await check(stage, "stage prompt");
    await check(pad, "pad prompt");
    await tapByKeyboard(pad);
    await expect(stage.getByText("1/1")).toBeVisible();
    await check(stage, "stage reveal");
    await check(pad, "pad reveal");
    await stage.getByRole("button", { name: "End", exact: true }).click();
    await stage.getByRole("button", { name: "Really end?" }).click();
    await stage.getByRole("link", { name: "See note-by-note results" }).click();
    await expect(stage.getByRole("heading", { name: "Longest streaks" })).toBeVisible();
    await check(stage, "results");
    await check(pad, "pad ended");

    expect(failures, "WCAG 2.1 AA violations").toEqual([]);
  });
}
