import { expect, shot, signIn, test } from "./fixtures";

test("a teacher reads the class review, picks one round and opens a student's progress", async ({ page }) => {
  await signIn(page, "rafe@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  await page.goto("/teach/classes/demo-class-thu/review");
  await expect(page.getByRole("heading", { name: "Class review · Thursday Improvers" })).toBeVisible();
  // Thursday reads in G major: the F♯ is what they keep missing.
  const reteach = page.locator("section", { has: page.getByRole("heading", { name: "Notes to reteach" }) });
  await expect(reteach.getByText(/^F♯\d$/).first()).toBeVisible();
  await expect(reteach.getByText("not read yet").first()).toBeVisible();
  // The heatmap is drawn on staves (engraved) and on the fretboard, with words beside it.
  await expect(page.locator("figure[role=img] svg").first()).toBeVisible();
  await expect(page.getByRole("img", { name: /Note heatmap on the fretboard/ })).toBeVisible();
  const everyone = page.getByRole("table", { name: /Every student/ });
  await expect(everyone).toBeVisible();
  await shot(page, "class-review");

  // Every student pages in the browser…
  const boards = page.locator("section", { has: page.getByRole("heading", { name: "Leaderboards" }) });
  await boards.getByLabel("Rows per page").selectOption("5");
  await expect(everyone.getByRole("rowheader")).toHaveCount(5);
  await page.getByRole("navigation", { name: "Every student: pages" }).getByRole("button", { name: "Next" }).click();
  await expect(page.getByRole("navigation", { name: "Every student: pages" })).toContainText("Page 2 of 2");
  await everyone.getByRole("button", { name: /^Student/ }).click();
  await expect(everyone.getByRole("columnheader", { name: /^Student/ })).toHaveAttribute("aria-sort", "ascending");

  // …the rounds are sorted and filtered by the server, through links and a form.
  const rounds = page.getByRole("table", { name: /Rounds of this class/ });
  await expect(rounds.getByRole("rowheader")).toHaveCount(5);
  await rounds.getByRole("columnheader", { name: /^Answers/ }).getByRole("link").click();
  await expect(page).toHaveURL(/sort=answers&dir=asc/);
  await expect(rounds.getByRole("columnheader", { name: /^Answers/ })).toHaveAttribute("aria-sort", "ascending");
  const answerCounts = (await rounds.locator("tbody tr td:nth-child(4)").allTextContents()).map(Number);
  expect(answerCounts).toEqual([...answerCounts].sort((a, b) => a - b));
  await page.getByPlaceholder("Filter rounds by title").fill("no such round");
  await page.getByRole("button", { name: "Show" }).click();
  await expect(rounds).toContainText("No rows match “no such round”.");
  await page.goto("/teach/classes/demo-class-thu/review");

  await page.getByRole("combobox", { name: /^Round/ }).selectOption({ index: 1 });
  await expect(page).toHaveURL(/round=demo-round-thu-5/);
  await expect(page.getByRole("link", { name: /Export CSV \(this round\)/ })).toBeVisible();

  const download = page.waitForEvent("download");
  await page.getByRole("link", { name: /Export CSV/ }).click();
  expect((await download).suggestedFilename()).toMatch(/^fretcall-Thursday-Improvers-\d{4}-\d{2}-\d{2}\.csv$/);

  await page.getByRole("table", { name: /Every student/ }).getByRole("link").first().click();
  await expect(page.getByRole("heading", { name: "Personal bests" })).toBeVisible();
  await expect(page.getByText("Accuracy per round")).toBeVisible();
  await expect(page.locator(".recharts-line").first()).toBeVisible();
  await shot(page, "student-progress");
});

test("the labels of a student's progress charts never overlap, on a phone or a laptop", async ({ page }) => {
  await signIn(page, "rafe@larkspur.example");
  await expect(page).toHaveURL(/\/teach$/);
  for (const viewport of [{ width: 360, height: 740 }, { width: 1280, height: 900 }]) {
    await page.setViewportSize(viewport);
    await page.goto("/teach/classes/demo-class-tue/students/demo-student-1");
    for (const title of ["Accuracy per round", "Median time per round"]) {
      const chart = page.locator("figure", { has: page.getByText(title, { exact: true }) });
      await expect(chart.locator("[data-chart-label]").first()).toBeVisible();
      // The values over the points and the axes' numbers and dates.
      const labels = chart.locator("[data-chart-label], .recharts-cartesian-axis-tick text");
      const boxes = (await labels.evaluateAll((els) => els.map((e) => e.getBoundingClientRect().toJSON()))) as DOMRect[];
      expect(boxes.length).toBeGreaterThan(4);
      for (let i = 0; i < boxes.length; i++) {
        for (let j = i + 1; j < boxes.length; j++) {
          const [a, b] = [boxes[i]!, boxes[j]!];
          const overlap = a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;
          expect(overlap, `${title} at ${viewport.width} px: labels ${i} and ${j} overlap`).toBe(false);
        }
      }
    }
  }
});
