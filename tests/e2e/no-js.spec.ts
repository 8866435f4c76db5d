import { expect, signIn, test } from "./fixtures";

test.describe("with JavaScript off", () => {
  test.use({ javaScriptEnabled: false });

  test("a teacher signs in through the plain form and lands on their classes", async ({ page }) => {
    await signIn(page, "rafe@larkspur.example");
    await expect(page).toHaveURL(/\/teach$/);
    await expect(page.getByRole("heading", { name: "Tuesday Beginners" })).toBeVisible();
  });
});

test("a form posted to Fretcall from another site is refused with a clear message", async ({ page, baseURL }) => {
  // 127.0.0.1 and localhost are different sites to the browser; this page is made up by the test.
  const elsewhere = `${baseURL!.replace("localhost", "127.0.0.1")}/elsewhere`;
  await page.route(elsewhere, (route) =>
    route.fulfill({
      contentType: "text/html",
      body: `<form method="post" action="${baseURL}/signin">
        <input name="email" value="rafe@larkspur.example"><input name="password" value="fretcall-demo">
        <button>Win a guitar</button></form>`,
    }),
  );
  await page.goto(elsewhere);
  const answer = page.waitForResponse(`${baseURL}/signin`);
  await page.getByRole("button", { name: "Win a guitar" }).click();
  expect((await answer).status()).toBe(403);
  await expect(page.getByText("This form was sent from another website, so it was refused.")).toBeVisible();
  await page.goto("/teach");
  await expect(page).toHaveURL(/\/signin\?redirectTo=%2Fteach/);
});
