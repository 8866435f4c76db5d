import { DEMO_PASSWORD, expect, readMail, shot, signIn, startStudio, test } from "./fixtures";

test("the landing page loads its own font and no other host", async ({ page }) => {
  await page.goto("/");
  await expect(page.getByRole("heading", { name: /Read the note/ })).toBeVisible();
  const family = await page.evaluate(async () => {
    await document.fonts.ready;
    return [...document.fonts].filter((f) => f.status === "loaded").map((f) => f.family);
  });
  expect(family.join(",")).toContain("Fredoka");
  await shot(page, "landing");
});

test("a teacher signs in, lands on their classes, and signs out", async ({ page }) => {
  await signIn(page, "rafe@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  await expect(page.getByRole("heading", { name: "Tuesday Beginners" })).toBeVisible();
  await shot(page, "teacher-dashboard");
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page).toHaveURL(/\/$/);
  await page.goto("/teach");
  await expect(page).toHaveURL(/\/signin\?redirectTo=%2Fteach/);
});

test("a wrong password is refused with a clear message", async ({ page }) => {
  await signIn(page, "saoirse@larkspur.example", "not my password");
  await expect(page.getByRole("alert")).toContainText("That e-mail and password don't match an account.");
});

test("a student lands on their own home; the teacher pages refuse them", async ({ page }) => {
  await signIn(page, "amani@larkspur.example");
  await expect(page).toHaveURL(/\/me$/);
  const res = await page.goto("/teach");
  expect(res?.status()).toBe(403);
  await expect(page.getByText("This page is for teacher accounts.")).toBeVisible();
});

test("a new teacher starts a studio; empty fields get clear errors first", async ({ page }) => {
  await page.goto("/signup");
  await page.getByRole("button", { name: "Create studio" }).click();
  await expect(page.getByText("Enter your studio's name.")).toBeVisible();
  await page.getByLabel("Studio or school name").fill("Harbourlight Guitar Studio");
  await page.getByLabel("Your name").fill("Bettany Rusk");
  await page.getByLabel("E-mail").fill("bettany@harbourlight.example");
  await page.getByLabel("Password", { exact: true }).fill("strings and frets");
  await page.getByLabel("Password again").fill("strings and frets");
  await shot(page, "signup");
  await page.getByRole("button", { name: "Create studio" }).click();
  await expect(page.getByText("Open the link in it within 24 hours")).toBeVisible();
  const mail = (await readMail()).find((m) => m.to.includes("bettany@harbourlight.example"));
  const link = new URL(mail!.text.match(/https?:\/\/\S+\/signup\?studio=\S+/)![0]);
  await page.goto(link.pathname + link.search);
  await page.getByRole("button", { name: "Create my studio" }).click();
  await expect(page).toHaveURL(/\/admin$/);
  await expect(page.getByRole("heading", { name: "Your school" })).toBeVisible();
});

test("password reset through the captured e-mail", async ({ page }) => {
  await page.goto("/forgot");
  await page.getByLabel("E-mail").fill("saoirse@larkspur.example");
  await page.getByRole("button", { name: "Send reset link" }).click();
  await expect(page.getByText("a reset link is on its way")).toBeVisible();
  const mail = (await readMail()).find((m) => m.to.includes("saoirse@larkspur.example"));
  const link = mail!.text.match(/https?:\/\/\S+\/reset\/\S+/)![0];
  await page.goto(new URL(link).pathname);
  await page.getByLabel("New password", { exact: true }).fill("a fresh reading password");
  await page.getByLabel("New password again").fill("a fresh reading password");
  await page.getByRole("button", { name: "Save new password" }).click();
  await expect(page.getByText("Your password is changed.")).toBeVisible();
  await signIn(page, "saoirse@larkspur.example", "a fresh reading password");
  await expect(page).toHaveURL(/\/teach$/);
  // The demo teacher's password goes back, so later tests can sign her in.
  await page.goto("/settings/password");
  await page.getByLabel("Current password").fill("a fresh reading password");
  await page.getByLabel("New password", { exact: true }).fill(DEMO_PASSWORD);
  await page.getByLabel("New password again").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Change password" }).click();
  await expect(page.getByText("Your password is changed.")).toBeVisible();
});

test("a teacher signs another browser out from Settings and changes the password", async ({ browser, page }) => {
  const email = `ilse-${Date.now()}@marrowgate.example`;
  const other = await browser.newContext();
  const laptop = await other.newPage();
  await startStudio(laptop, { studio: "Marrowgate Strings", name: "Ilse Penhallow", email, password: "first long password" });

  // The same account on a second browser (the test's own page).
  await signIn(page, email, "first long password");
  await expect(page).toHaveURL(/\/admin$/);

  await laptop.getByRole("link", { name: "Settings" }).click();
  await expect(laptop.getByRole("heading", { name: "Signed-in devices" })).toBeVisible();
  await expect(laptop.getByText("this device")).toHaveCount(1);
  await expect(laptop.getByRole("button", { name: /Sign out (here|there)/ })).toHaveCount(2);
  await shot(laptop, "settings-devices");
  await laptop.getByRole("button", { name: "Sign out there" }).click();
  await expect(laptop.getByText("That device is signed out.")).toBeVisible();
  await page.goto("/admin");
  await expect(page).toHaveURL(/\/signin\?redirectTo=%2Fadmin/);

  await laptop.getByRole("link", { name: "Password" }).click();
  await laptop.getByLabel("Current password").fill("not the password");
  await laptop.getByLabel("New password", { exact: true }).fill("second long password");
  await laptop.getByLabel("New password again").fill("second long password");
  await laptop.getByRole("button", { name: "Change password" }).click();
  await expect(laptop.getByText("That isn't your current password.")).toBeVisible();
  await laptop.getByLabel("Current password").fill("first long password");
  await laptop.getByLabel("New password", { exact: true }).fill("second long password");
  await laptop.getByLabel("New password again").fill("second long password");
  await laptop.getByRole("button", { name: "Change password" }).click();
  await expect(laptop.getByText("Your password is changed.")).toBeVisible();
  await shot(laptop, "settings-password");
  await other.close();
  await signIn(page, email, "second long password");
  await expect(page).toHaveURL(/\/admin$/);
});
