import { test as base, expect, type Page } from "@playwright/test";
import { readOutbox } from "~/mail/outbox.server";

export const DEMO_PASSWORD = "fretcall-demo";
export const MAIL_DIR = "tests/.tmp/e2e-mail";
/** The captured mail once it has settled: mail leaves after the answer, from a queue. */
export async function readMail() {
  let mail = await readOutbox(MAIL_DIR);
  for (;;) {
    await new Promise((done) => setTimeout(done, 250));
    const again = await readOutbox(MAIL_DIR);
    if (again.length === mail.length) return again;
    mail = again;
  }
}

/**
 * Every test records the hosts its pages asked for; any host but this one fails the test
 * (fonts, music font and scripts all ship with the app).
 */
export const test = base.extend<{ foreignRequests: string[] }>({
  foreignRequests: [
    async ({ context }, use) => {
      const foreign: string[] = [];
      context.on("request", (req) => {
        const url = new URL(req.url());
        if (["data:", "blob:"].includes(url.protocol)) return;
        if (url.hostname !== "localhost" && url.hostname !== "127.0.0.1") foreign.push(req.url());
      });
      await use(foreign);
      expect(foreign, "requests to other hosts").toEqual([]);
    },
    { auto: true },
  ],
});
export { expect };

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

export const shot = (page: Page, name: string) =>
  page.screenshot({ path: `tests/.tmp/screenshots/${name}.png`, fullPage: true });

/** Starts a studio through the pages as a person does: the form, the e-mailed link, the confirmation; ends on /admin. */
export async function startStudio(page: Page, f: { studio: string; name: string; email: string; password: string }) {
  await page.goto("/signup");
  await page.getByLabel("Studio or school name").fill(f.studio);
  await page.getByLabel("Your name").fill(f.name);
  await page.getByLabel("E-mail").fill(f.email);
  await page.getByLabel("Password", { exact: true }).fill(f.password);
  await page.getByLabel("Password again").fill(f.password);
  await page.getByRole("button", { name: "Create studio" }).click();
  await expect(page.getByText("Open the link in it within 24 hours")).toBeVisible();
  const mail = (await readMail()).find((m) => m.to.includes(f.email));
  const link = new URL(mail!.text.match(/https?:\/\/\S+\/signup\?studio=\S+/)![0]);
  await page.goto(link.pathname + link.search);
  await page.getByRole("button", { name: "Create my studio" }).click();
  await expect(page).toHaveURL(/\/admin$/);
}
