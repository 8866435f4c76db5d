import type { Browser, Page, WebSocketRoute } from "@playwright/test";
import { expect as baseExpect, shot, signIn, test } from "./fixtures";

// Four browsers and the server share the machine; give each step room on a busy one.
const expect = baseExpect.configure({ timeout: 15_000 });

const PHONE = { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true };

async function hostRound(page: Page, mode: "Sprint" | "Full neck" | "Tune walk" | "Teams", prompts: number, more?: (page: Page) => Promise<void>) {
  await signIn(page, "rafe@larkspur.example");
  // The sign-in form posts; wait for its redirect so the session cookie is set before going on.
  await expect(page).toHaveURL(/\/teach$/);
  await page.goto("/host");
  // A one-off round: it reads the standard home-spot map the test looks answers up in, and leaves the demo classes' reviews alone.
  await page.getByLabel("Class", { exact: true }).selectOption({ label: "No class (a one-off round)" });
  await page.getByRole("radio", { name: new RegExp(mode) }).check();
  // A Tune walk plays its bars whole: the form has no number of notes for it.
  if (mode !== "Tune walk") await page.getByLabel("Number of notes").fill(String(prompts));
  await page.getByLabel("Seconds per note").fill("20");
  await more?.(page);
  await page.getByRole("button", { name: "Open the room" }).click();
  await expect(page).toHaveURL(/\/stage\//);
  const code = (await page.getByLabel(/^Room code/).first().getAttribute("aria-label"))!.replace(/Room code |\s/g, "");
  return code;
}

async function joinOnPhone(browser: Browser, code: string, nickname: string, viewport = PHONE.viewport, prepare?: (page: Page) => Promise<unknown>) {
  const context = await browser.newContext({ ...PHONE, viewport });
  const page = await context.newPage();
  await prepare?.(page);
  await page.goto("/join");
  await page.getByLabel("Room code").fill(code.toLowerCase());
  await page.getByRole("button", { name: "Join" }).click();
  await expect(page).toHaveURL(new RegExp(`/play/${code}`));
  await page.getByLabel("Nickname").fill(nickname);
  await page.getByRole("button", { name: "Join" }).click();
  await expect(page.getByText("You're in. Watch the class screen.")).toBeVisible();
  return page;
}

/** The written note on the stage, and where it is played, from the public API. */
async function currentNote(stage: Page) {
  const written = await stage.locator("[data-written]").getAttribute("data-written");
  const map = await (await stage.request.get("/api/v1/spot-map?position=5&tuning=standard")).json();
  const spots = await (await stage.request.get(`/api/v1/spots?note=${encodeURIComponent(written!)}&tuning=standard&frets=15`)).json();
  const home = map.spots.find((s: { written: string }) => s.written === written) ?? map.spots.find((s: { writtenMidi?: number }) => s.writtenMidi === spots.midi + 12);
  return { written: written!, home: home as { string: number; fret: number }, spots: spots.spots as { string: number; fret: number }[] };
}

const tapSpot = (pad: Page, spot: { string: number; fret: number }) =>
  pad.getByRole("button", { name: `string ${spot.string}, ${spot.fret === 0 ? "open" : `fret ${spot.fret}`}`, exact: true }).click();

// Six notes, because the room shows standings after every fifth reveal.
const SPRINT_NOTES = 6;

test("a teacher and three phones play a whole Sprint round", async ({ page: stage, browser }) => {
  test.setTimeout(240_000);
  await stage.setViewportSize({ width: 1280, height: 800 });
  const code = await hostRound(stage, "Sprint", SPRINT_NOTES);
  const pads = await Promise.all(["Ash", "Bea", "Cy"].map((n) => joinOnPhone(browser, code, n)));
  await expect(stage.getByText("Players (3)")).toBeVisible();
  await shot(stage, "stage-lobby");
  await shot(pads[0]!, "pad-waiting");
  await stage.getByRole("button", { name: "Start", exact: true }).click();
  for (let i = 0; i < SPRINT_NOTES; i++) {
    await expect(stage.getByText(`Note ${i + 1} of ${SPRINT_NOTES}`)).toBeVisible();
    const note = await currentNote(stage);
    for (const pad of pads) await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
    if (i === 0) {
      await shot(stage, "stage-prompt");
      await shot(pads[0]!, "pad-open");
    }
    if (i === 1) {
      // One player mirrors the neck, another turns the phone on its side; both keep answering.
      const hand = pads[1]!.getByRole("button", { name: /Left-handed neck/ });
      await hand.click();
      await expect(hand).toHaveAttribute("aria-pressed", "true");
      await pads[2]!.setViewportSize({ width: 844, height: 390 });
      await shot(pads[1]!, "pad-left-handed");
      await shot(pads[2]!, "pad-landscape");
    }
    await tapSpot(pads[0]!, note.home);
    await tapSpot(pads[1]!, { string: note.home.string === 1 ? 2 : note.home.string - 1, fret: note.home.fret });
    await tapSpot(pads[2]!, note.home);
    await expect(pads[0]!.getByText("Home spot!")).toBeVisible();
    if (i === 0) {
      await shot(pads[0]!, "pad-right");
      await shot(pads[1]!, "pad-wrong");
    }
    await expect(stage.getByText("3/3")).toBeVisible();
    if (i === 0) await shot(stage, "stage-reveal");
    await stage.getByRole("button", { name: "Next", exact: true }).click();
    if (i === 4) {
      await expect(stage.getByRole("heading", { name: "Standings", exact: true })).toBeVisible();
      await shot(stage, "stage-standings");
      await stage.getByRole("button", { name: "Next", exact: true }).click();
    }
  }
  await expect(stage.getByText("Round complete")).toBeVisible();
  await expect(stage.getByText("Final standings")).toBeVisible();
  await shot(stage, "stage-final");
  await expect(pads[0]!.getByText(`${SPRINT_NOTES} of ${SPRINT_NOTES} home spots`)).toBeVisible();
  await expect(pads[0]!.getByText(/take a break to rest your hands/i)).toBeVisible();
  await shot(pads[0]!, "pad-ended");
  await stage.getByRole("link", { name: "See note-by-note results" }).click();
  await expect(stage.getByRole("heading", { name: "Longest streaks" })).toBeVisible();
  await shot(stage, "results");
});

test("a Full neck round: the class covers every spot of a pitch together", async ({ page: stage, browser }) => {
  test.setTimeout(120_000);
  // Three notes is the smallest round the host form allows; the first one is enough to cover its spots.
  const code = await hostRound(stage, "Full neck", 3);
  const pads = await Promise.all(["Dee", "Eli"].map((n) => joinOnPhone(browser, code, n)));
  await stage.getByRole("button", { name: "Start", exact: true }).click();
  const note = await currentNote(stage);
  // From the first prompt, both screens set Full neck's own task, not a home spot.
  const task = `Find every spot of this note: ${note.spots.length} on this neck`;
  await expect(stage.getByText(task)).toBeVisible();
  for (const pad of pads) await expect(pad.getByText(task)).toBeVisible();
  for (const pad of pads) await expect(pad.getByText("home spot")).toHaveCount(0);
  // Each phone takes every other spot; the pads scroll to reach frets outside the position.
  for (const [i, spot] of note.spots.entries()) await tapSpot(pads[i % 2]!, spot);
  await expect(stage.getByText(`Spots found: ${note.spots.length} of ${note.spots.length}`)).toBeVisible();
  await shot(stage, "stage-full-neck");
});

/** Every pad taps the home spot of each note until the round ends; returns how many notes there were. */
async function playHomeSpots(stage: Page, pads: Page[]) {
  let notes = 0;
  for (; ; notes++) {
    await stage.getByRole("button", { name: notes === 0 ? "Start" : "Next", exact: true }).click();
    const done = stage.getByText("Round complete");
    await expect(stage.getByText(`Note ${notes + 1} of`).or(done)).toBeVisible();
    if (await done.isVisible()) return notes;
    const note = await currentNote(stage);
    for (const pad of pads) await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
    for (const pad of pads) await tapSpot(pad, note.home);
    await expect(stage.getByText(`${pads.length}/${pads.length}`)).toBeVisible();
  }
}

test("a Tune walk round plays a melody's first bar and names the tune at the end", async ({ page: stage, browser }) => {
  test.setTimeout(180_000);
  let tune = "";
  const code = await hostRound(stage, "Tune walk", 3, async (page) => {
    const select = page.getByRole("combobox", { name: "Tune", exact: true });
    tune = (await select.locator("option:checked").textContent())!;
    await page.getByLabel("From bar").fill("1");
    await page.getByLabel("To bar").fill("1");
  });
  const pads = await Promise.all(["Fen", "Gil"].map((n) => joinOnPhone(browser, code, n)));
  const notes = await playHomeSpots(stage, pads);
  expect(notes).toBeGreaterThan(0);
  await expect(stage.getByRole("heading", { name: `Round complete — the tune was “${tune}”` })).toBeVisible();
  await expect(pads[0]!.getByText(`${notes} of ${notes} home spots`)).toBeVisible();
  await shot(stage, "stage-tune-walk-end");
});

test("a Tune walk's stage engraves the melody so far at the show time, never a later note", async ({ page: stage, browser }) => {
  test.setTimeout(180_000);
  await stage.setViewportSize({ width: 1366, height: 768 });
  const code = await hostRound(stage, "Tune walk", 3, async (page) => {
    await page.getByRole("combobox", { name: "Tune", exact: true }).selectOption({ label: "Lantern Walk" });
    await page.getByLabel("From bar").fill("1");
    await page.getByLabel("To bar").fill("2");
  });
  const pad = await joinOnPhone(browser, code, "Ivo");
  // Lantern Walk bars 1–2: E4 G4 A4 G4 | C5 (half) B4 A4. Walked up to the first note of bar 2.
  const spoken = ["E 4 quarter", "G 4 quarter", "A 4 quarter", "G 4 quarter", "C 5 half"];
  const ready = stage.getByText("Get ready…");
  const melody = stage.getByTestId("tune-staff");
  const drawn = stage.locator(".vf-stavenote");
  for (let k = 1; k <= spoken.length; k++) {
    await stage.getByRole("button", { name: k === 1 ? "Start" : "Next", exact: true }).click();
    await expect(stage.getByText(`Note ${k} of 7`)).toBeVisible();
    await expect(ready).toBeVisible();
    // Before the show time: nothing of the melody on the page, drawn or in words.
    const before = { html: await stage.locator("body").innerHTML(), aria: await stage.locator("body").ariaSnapshot() };
    expect(await drawn.count()).toBe(0);
    expect(before.html).not.toContain("tune-staff");
    expect(before.aria).not.toContain(spoken[k - 1]!);
    await expect(ready).toBeVisible();

    // At the show time: the bars so far, engraved, the asked note marked and last; no later note.
    await expect(melody.locator(".vf-stavenote")).toHaveCount(k);
    await expect(melody.locator(".vf-asked-note")).toHaveCount(1);
    const words = (await melody.getAttribute("aria-label"))!;
    expect(words.endsWith(`${spoken[k - 1]}.`)).toBe(true);
    for (const later of ["B 4", "D 4", "F 4"]) expect(words).not.toContain(later);
    if (k === spoken.length) {
      expect(words).toBe(`Treble clef with an 8 below; 4/4 time; bar 1: ${spoken.slice(0, 4).join(", ")}; bar 2: ${spoken[4]}.`);
      await expect(melody.locator(".vf-stave")).toHaveCount(2);
      // Projector size: a staff space of 15 px, the whole drawing inside a 1366×768 screen.
      const staff = (await melody.locator(".vf-stave").first().boundingBox())!;
      const box = (await melody.locator("svg").boundingBox())!;
      expect(staff.height).toBeGreaterThanOrEqual(55);
      expect(box.x + box.width).toBeLessThanOrEqual(1366);
      expect(box.y + box.height).toBeLessThanOrEqual(768);
      await shot(stage, "stage-tune-walk-melody");
    }
    const note = await currentNote(stage);
    await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
    await tapSpot(pad, note.home);
    // The reveal keeps the melody so far.
    await expect(stage.getByText(`string ${note.home.string}, ${note.home.fret === 0 ? "open" : `fret ${note.home.fret}`}`)).toBeVisible();
    await expect(melody.locator(".vf-asked-note")).toHaveCount(1);
    await expect(melody.locator(".vf-stavenote")).toHaveCount(k);
  }
  await shot(stage, "stage-tune-walk-reveal");
});

test("a Teams round splits the class into even teams and ranks the teams", async ({ page: stage, browser }) => {
  test.setTimeout(180_000);
  const code = await hostRound(stage, "Teams", 3, async (page) => page.getByLabel("Number of teams").fill("2"));
  const names = ["Hal", "Ivo", "Jun", "Kai"];
  const pads = await Promise.all(names.map((n) => joinOnPhone(browser, code, n)));
  // Already in the lobby each phone names its team, and the stage lists the same player under that team.
  await expect(stage.getByRole("heading", { name: "Team Nut (2)" })).toBeVisible();
  await expect(stage.getByRole("heading", { name: "Team Saddle (2)" })).toBeVisible();
  for (const [i, pad] of pads.entries()) {
    const team = (await pad.getByText(/^Team (Nut|Saddle)$/).textContent())!;
    const group = stage.locator("div").filter({ has: stage.getByRole("heading", { name: `${team} (2)` }) }).last();
    await expect(group.getByRole("listitem").filter({ hasText: names[i]! })).toBeVisible();
  }
  await shot(stage, "stage-teams-lobby");
  await shot(pads[0]!, "pad-team");
  expect(await playHomeSpots(stage, pads)).toBe(3);
  await expect(stage.getByRole("heading", { name: "Teams", exact: true })).toBeVisible();
  // Two teams of two: each row names its size.
  await expect(stage.getByText(/\(2\)$/)).toHaveCount(2);
  await shot(stage, "stage-teams-end");
});

test("a reloaded stage shows the screen it had, phase by phase", async ({ page: stage, browser }) => {
  test.setTimeout(240_000);
  await stage.setViewportSize({ width: 1280, height: 800 });
  const code = await hostRound(stage, "Sprint", SPRINT_NOTES);
  const pad = await joinOnPhone(browser, code, "Lu");
  const button = (name: string) => stage.getByRole("button", { name, exact: true });
  const paused = stage.getByText("Paused", { exact: true });
  const secondsLeft = stage.locator("p", { hasText: /s left$/ });

  await expect(stage.getByText("Players (1)")).toBeVisible();
  await stage.reload();
  await expect(stage.getByText("Players (1)")).toBeVisible();
  await expect(button("Start")).toBeVisible();

  // Paused during the countdown (or just after): the note and the time left stay as they were.
  await button("Start").click();
  await button("Pause").click();
  await expect(paused).toBeVisible();
  const held = await secondsLeft.textContent();
  await stage.reload();
  await expect(paused).toBeVisible();
  await expect(stage.getByText(`Note 1 of ${SPRINT_NOTES}`)).toBeVisible();
  await expect(secondsLeft).toHaveText(held!);
  await expect(button("Resume")).toBeVisible();

  await button("Resume").click();
  await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
  await stage.reload();
  await expect(stage.getByText(`Note 1 of ${SPRINT_NOTES}`)).toBeVisible();
  await expect(stage.getByText("0/1")).toBeVisible();
  await expect(button("Skip")).toBeVisible();
  await expect(paused).toBeHidden();

  const note = await currentNote(stage);
  await tapSpot(pad, note.home);
  await expect(stage.getByText("1/1")).toBeVisible();
  await stage.reload();
  await expect(stage.getByText("1/1")).toBeVisible();
  await expect(stage.getByText(`string ${note.home.string}, ${note.home.fret === 0 ? "open" : `fret ${note.home.fret}`}`)).toBeVisible();
  await expect(button("Next")).toBeVisible();
  // The phone, reloaded too, still shows its verdict beside the reveal.
  await pad.reload();
  await expect(pad.getByText("Home spot!")).toBeVisible();

  for (let i = 2; i <= 5; i++) {
    await button("Next").click();
    await expect(stage.getByText(`Note ${i} of ${SPRINT_NOTES}`)).toBeVisible();
    await button("Skip").click();
    await expect(stage.getByText("0/1")).toBeVisible();
  }
  await button("Next").click();
  const standings = stage.getByRole("heading", { name: "Standings", exact: true });
  await expect(standings).toBeVisible();
  await stage.reload();
  await expect(standings).toBeVisible();
  await expect(button("Next")).toBeVisible();
  await button("Pause").click();
  await stage.reload();
  await expect(paused).toBeVisible();
  await expect(standings).toBeVisible();
  await expect(button("Resume")).toBeVisible();

  await button("End").click();
  await button("Really end?").click();
  await expect(stage.getByText("Round complete")).toBeVisible();
  await stage.reload();
  await expect(stage.getByText("Round complete")).toBeVisible();
  await expect(stage.getByText("Final standings")).toBeVisible();
  await expect(stage.getByRole("link", { name: "See note-by-note results" })).toBeVisible();
  await expect(stage.getByRole("alert")).toHaveCount(0);
});

test("a 360 px phone in portrait shows the whole of fifth position with its stretches, fret numbers and full targets", async ({ page: stage, browser }) => {
  test.setTimeout(120_000);
  const code = await hostRound(stage, "Sprint", 5);
  const pad = await joinOnPhone(browser, code, "Dee", { width: 360, height: 640 });
  // Home spots reach one fret either side of the position (B on string 3, fret 4 in fifth position).
  for (const fret of [4, 9]) {
    for (let string = 1; string <= 6; string++) {
      const box = (await pad.getByRole("button", { name: `string ${string}, fret ${fret}`, exact: true }).boundingBox())!;
      expect(box.width, `string ${string}, fret ${fret}`).toBeGreaterThanOrEqual(44);
      expect(box.height).toBeGreaterThanOrEqual(44);
      expect(box.x).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width).toBeLessThanOrEqual(360);
      expect(box.y + box.height).toBeLessThanOrEqual(640);
    }
  }
  for (let fret = 4; fret <= 9; fret++) {
    const label = (await pad.locator(`[data-fret-label="${fret}"]`).boundingBox())!;
    expect(label.x).toBeGreaterThanOrEqual(0);
    expect(label.x + label.width).toBeLessThanOrEqual(360);
    expect(label.y + label.height).toBeLessThanOrEqual(640);
  }
  await shot(pad, "pad-360-position");
});

test("the reveal reads from the back of the room at 1366×768: large counts on the neck, legend in view, offline counted apart", async ({ page: stage, browser }) => {
  test.setTimeout(120_000);
  await stage.setViewportSize({ width: 1366, height: 768 });
  const code = await hostRound(stage, "Sprint", 5);
  const pads = await Promise.all(["Lu", "Mo", "Ny"].map((n) => joinOnPhone(browser, code, n)));
  await stage.getByRole("button", { name: "Start", exact: true }).click();
  const note = await currentNote(stage);
  for (const pad of pads) await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
  // One phone drops out: the stage counts it apart from those still to answer.
  await pads[2]!.context().close();
  await expect(stage.getByText("1 offline")).toBeVisible();
  await tapSpot(pads[0]!, note.home);
  await tapSpot(pads[1]!, note.home);
  await expect(stage.getByText("2/3")).toBeVisible();
  // The count of answers on the home spot sits in a badge beside its mark, in lettering for the back row.
  const badge = stage.locator('[data-heat-count="2"]');
  await expect(badge).toBeVisible();
  expect(Number.parseFloat(await badge.evaluate((el) => getComputedStyle(el).fontSize))).toBeGreaterThanOrEqual(20);
  const legend = (await stage.locator("[data-legend]").boundingBox())!;
  expect(legend.y + legend.height).toBeLessThanOrEqual(768);
  await expect(stage.getByText("1 offline")).toBeVisible();
  await stage.screenshot({ path: "tests/.tmp/screenshots/stage-reveal-1366.png" });
});

/** The pad's connection through a switch: cut, its socket drops and reconnects are refused until it is restored. */
async function wifiSwitch(page: Page) {
  let online = true;
  const sockets = new Set<WebSocketRoute>();
  await page.routeWebSocket(/\/ws(\?.*)?$/, (ws) => {
    if (!online) return ws.close();
    ws.connectToServer();
    sockets.add(ws);
  });
  return {
    cut: async () => {
      online = false;
      for (const ws of sockets) await ws.close();
      sockets.clear();
    },
    restore: () => void (online = true),
  };
}

test("a tap made while the phone is offline is sent when it is back: sending…, then counted, or too late with the reason", async ({ page: stage, browser }) => {
  test.setTimeout(180_000);
  await stage.setViewportSize({ width: 1280, height: 800 });
  const code = await hostRound(stage, "Sprint", 3);
  let wifi: Awaited<ReturnType<typeof wifiSwitch>> | undefined;
  const pad = await joinOnPhone(browser, code, "Noor", PHONE.viewport, async (page) => (wifi = await wifiSwitch(page)));
  const other = await joinOnPhone(browser, code, "Omar");
  await expect(stage.getByText("Players (2)")).toBeVisible();
  await stage.getByRole("button", { name: "Start", exact: true }).click();

  // Offline while the note is up: the tap waits, and says so.
  await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
  let note = await currentNote(stage);
  await wifi!.cut();
  await expect(pad.getByText("reconnecting…")).toBeVisible();
  await tapSpot(pad, note.home);
  await expect(pad.getByText("Sending your tap… It goes as soon as the connection is back.")).toBeVisible();
  await expect(pad.getByText("Home spot!")).toBeHidden();
  wifi!.restore();
  await expect(pad.getByText("Home spot!")).toBeVisible({ timeout: 20_000 });
  await expect(pad.getByText(/Counted · total \d+ points/)).toBeVisible();
  await expect(stage.getByText("1/2")).toBeVisible();
  await tapSpot(other, note.home);
  await stage.getByRole("button", { name: "Next", exact: true }).click();

  // Offline again, and the prompt closes before the tap gets through: too late, and why.
  await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
  note = await currentNote(stage);
  await wifi!.cut();
  await tapSpot(pad, note.home);
  await expect(pad.getByText(/Sending your tap…/)).toBeVisible();
  await tapSpot(other, note.home);
  await expect(stage.getByRole("button", { name: "Next", exact: true })).toBeVisible();
  wifi!.restore();
  await expect(pad.getByText("✗ Not counted. Too late: time was up and the answer was shown before your tap reached the server.")).toBeVisible({ timeout: 20_000 });
  await expect(pad.getByText("Home spot!")).toBeHidden();
});

test("the stage shows no note, drawn or named, until its show time, and hides it while paused", async ({ page: stage, browser }) => {
  test.setTimeout(120_000);
  await stage.setViewportSize({ width: 1280, height: 800 });
  const code = await hostRound(stage, "Sprint", 5);
  const pad = await joinOnPhone(browser, code, "Ola");
  await stage.getByRole("button", { name: "Start", exact: true }).click();
  const ready = stage.getByText("Get ready…");
  const drawn = stage.locator(".staff-note");
  await expect(ready).toBeVisible();
  // The empty staff (clef and key) is drawn with the prompt: our own SVG, nothing to load.
  await expect(stage.locator(".staff-lines")).toHaveCount(1);
  const body = stage.locator("body");
  const before = { text: await body.innerText(), aria: await body.ariaSnapshot(), html: await body.innerHTML() };
  expect(await drawn.count()).toBe(0);
  expect(await stage.locator("[data-written]").count()).toBe(0);
  // Still counting down once all of it was read: everything above was taken before the show time.
  await expect(ready).toBeVisible();
  await shot(stage, "stage-get-ready");

  await expect(drawn).toHaveCount(1);
  await expect(ready).toBeHidden();
  const written = (await stage.locator("[data-written]").getAttribute("data-written"))!;
  // The staff's words name the note once it shows: "…; key signature none; G 4, second line."
  const label = (await stage.getByRole("img", { name: /^Treble clef/ }).getAttribute("aria-label"))!;
  const words = label.split("; ").at(-1)!.replace(/\.$/, "");
  expect(words).toMatch(/^[A-G]/);
  for (const name of [words, words.split(",")[0]!]) {
    expect(before.text).not.toContain(name);
    expect(before.aria).not.toContain(name);
  }
  expect(before.text).not.toMatch(new RegExp(`\\b${written}\\b`));
  expect(before.html).not.toContain(`data-written="${written}"`);

  // Paused, the note leaves the stage (the pad never draws it) and comes back after a new countdown.
  await stage.getByRole("button", { name: "Pause" }).click();
  await expect(stage.getByText("Paused", { exact: true })).toBeVisible();
  await expect(drawn).toHaveCount(0);
  await expect(stage.locator("[data-written]")).toHaveCount(0);
  await expect(pad.getByText("Paused: wait for the teacher to go on")).toBeVisible();
  await stage.reload();
  await expect(stage.getByText("Paused", { exact: true })).toBeVisible();
  await expect(stage.locator(".staff-lines")).toHaveCount(1);
  await expect(drawn).toHaveCount(0);
  await stage.getByRole("button", { name: "Resume", exact: true }).click();
  await expect(drawn).toHaveCount(1);
  await expect(stage.locator("[data-written]")).toHaveAttribute("data-written", written);
  await expect(pad.getByText("Find the note on the class screen")).toBeVisible();
});
