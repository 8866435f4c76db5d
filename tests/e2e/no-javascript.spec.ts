// With JavaScript off every form still posts: a teacher picks a class and opens a room, a student
// joins it by room code, and the live parts say plainly that they need JavaScript.
import type { Browser, Page } from "@playwright/test";
import { expect, signIn, test } from "./fixtures";

/** A browser context with JavaScript off: forms post exactly as Chromium sends them, headers untouched. */
const noScript = (browser: Browser) => browser.newContext({ javaScriptEnabled: false });

/** Playwright's text matching skips what is inside <noscript>, so the notice is found by its place. */
const noScriptNotice = (page: Page) => page.locator("noscript [role=status]");

test("without JavaScript a teacher opens a room and a student joins it by room code", async ({ browser }) => {
  const teacher = await (await noScript(browser)).newPage();
  await signIn(teacher, "rafe@larkspur.example");
  await expect(teacher).toHaveURL(/\/teach$/);

  await teacher.goto("/host?class=demo-class-tue");
  // The class picker is a form of its own: without JavaScript its button applies the choice.
  await teacher.getByLabel("Class", { exact: true }).selectOption({ label: "No class (a one-off round)" });
  await teacher.getByRole("button", { name: "Use this class" }).click();
  await expect(teacher).toHaveURL(/\/host\?class=$/);
  await expect(teacher.getByLabel("Class", { exact: true })).toHaveValue("");
  await teacher.getByLabel("Number of notes").fill("5");
  await teacher.getByRole("button", { name: "Open the room" }).click();
  await expect(teacher).toHaveURL(/\/stage\//);
  await expect(noScriptNotice(teacher)).toHaveText(/The class screen of a live round needs JavaScript\./);
  const code = (await teacher.getByLabel(/^Room code/).first().getAttribute("aria-label"))!.replace(/Room code |\s/g, "");
  expect(code).toMatch(/^[A-Z0-9]{6}$/);

  const student = await (await noScript(browser)).newPage();
  await student.goto("/join");
  await student.getByLabel("Room code").fill("nope12");
  await student.getByRole("button", { name: "Join" }).click();
  await expect(student.getByRole("alert")).toBeVisible();
  await expect(student).toHaveURL(/\/join$/);
  await student.getByLabel("Room code").fill(code.toLowerCase());
  await student.getByRole("button", { name: "Join" }).click();
  await expect(student).toHaveURL(new RegExp(`/play/${code}$`));
  await expect(noScriptNotice(student)).toHaveText(/Playing a live round needs JavaScript\./);
});

test("without JavaScript a teacher saves a reading set", async ({ browser }) => {
  const teacher = await (await noScript(browser)).newPage();
  await signIn(teacher, "rafe@larkspur.example");
  await expect(teacher).toHaveURL(/\/teach$/);
  await teacher.goto("/teach/sets");
  await teacher.getByRole("link", { name: "New reading set" }).click();
  // Typed with stray spaces: the name is tidied on the server, as every name is.
  await teacher.getByLabel("Name", { exact: true }).fill("  Fifth   position, no JS ");
  await teacher.getByRole("button", { name: "Save reading set" }).click();
  await expect(teacher).toHaveURL(/\/teach\/sets\?done=/);
  await expect(teacher.getByText("Saved “Fifth position, no JS”.")).toBeVisible();
});
