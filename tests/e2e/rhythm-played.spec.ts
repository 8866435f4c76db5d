// The rhythm pass by playing, in a Chromium of its own whose fake microphone plays a WAV file this test writes:
// the latency check, a pass played and stopped, a pass played to the end, and the teacher seeing it as played.
import type { Browser } from "@playwright/test";
import { pluck } from "~/listen/synth";
import { audit } from "./axe";
import { expect, signIn, test } from "./fixtures";
import { launchWithMicrophone } from "./microphone";
import { steadyTune } from "./practising";

const SAMPLE_RATE = 48_000;
// A pluck every 375 ms, half a beat at the check's 80 bpm (750 ms): whenever the looping file starts, every click's
// window (150 ms before it to 400 ms after, 550 ms long) holds a pluck, always at the same distance from the click.
const PERIOD_S = 0.375;
const NOTES_HZ = [110, 146.83]; // A2 and D3 sounding (12-TET from A4 = 440 Hz, ISO 16: 440 / 4, 440 × 2^(−7/12) / 2)

function microphoneSound(): Float32Array {
  const plucks = Array.from({ length: 8 }, (_, i) => pluck({ hz: NOTES_HZ[i % 2]!, seconds: PERIOD_S, sampleRate: SAMPLE_RATE, decaySeconds: 0.2, seed: i + 1 }));
  const all = new Float32Array(plucks.reduce((n, p) => n + p.length, 0));
  plucks.reduce((at, p) => (all.set(p, at), at + p.length), 0);
  return all;
}

let browser: Browser;
test.beforeAll(async () => {
  browser = await launchWithMicrophone("rhythm-microphone", microphoneSound(), SAMPLE_RATE);
});
test.afterAll(() => browser.close());

test("a student checks the microphone's delay, plays a rhythm pass on the guitar, and the teacher sees it as played", async ({ baseURL }) => {
  test.setTimeout(120_000);
  const context = await browser.newContext({ baseURL, viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const foreign: string[] = [];
  context.on("request", (req) => {
    if (!["localhost", "127.0.0.1"].includes(new URL(req.url()).hostname) && !/^(data|blob):/.test(req.url())) foreign.push(req.url());
  });
  const page = await context.newPage();
  await signIn(page, "amani@larkspur.example");
  await expect(page).toHaveURL(/\/me$/);
  await steadyTune(page, "lantern-walk");
  await page.goto("/me/rhythm/lantern-walk");

  // The check comes first, and says before asking that the sound stays on the phone.
  await page.getByLabel("Play it on my guitar").click();
  await expect(page.getByText("never sent or stored")).toBeVisible();
  await page.getByRole("button", { name: "Start the clicks" }).click();
  await expect(page.getByRole("status").filter({ hasText: "Listening" })).toBeVisible();
  await expect(page.getByRole("button", { name: "Stop listening" })).toBeVisible();
  // Four clicks to listen, eight to play along: 12 × 750 ms, then a beat more.
  await expect(page.getByText(/Microphone delay: -?\d+ ms/)).toBeVisible({ timeout: 20_000 });
  await expect(page.getByRole("button", { name: "Stop listening" })).toHaveCount(0);
  const stored = await page.evaluate(() => JSON.parse(localStorage.getItem("fretcall.rhythm-latency") ?? "null") as { offsetMs: number } | null);
  expect(stored?.offsetMs).toEqual(expect.any(Number));

  // Stop while playing: the microphone goes off and nothing is stored.
  const before = (await (await page.request.get("/api/v1/practice/rhythm?tune=lantern-walk")).json()).passes.length;
  await page.getByLabel("Tempo").selectOption("120");
  await page.getByRole("button", { name: "Start the count-in" }).click();
  await expect(page.getByText("Play each note")).toBeVisible();
  await page.getByRole("button", { name: "Stop listening" }).click();
  await expect(page.getByRole("button", { name: "Start the count-in" })).toBeVisible();
  expect((await (await page.request.get("/api/v1/practice/rhythm?tune=lantern-walk")).json()).passes).toHaveLength(before);

  // A whole pass at 120 bpm: (4 + 32) beats × 500 ms, then a beat more.
  await page.getByRole("button", { name: "Start the count-in" }).click();
  await expect(page.getByText("Bar 1")).toBeVisible({ timeout: 5_000 });
  await expect(page.getByRole("heading", { name: /^Score \d+ %/ })).toBeVisible({ timeout: 30_000 });
  await expect(page.getByText("Saved.")).toBeVisible();
  await expect(page.getByText("played on the guitar").first()).toBeVisible();
  await expect(page.getByRole("button", { name: "Stop listening" })).toHaveCount(0);
  const [newest] = (await (await page.request.get("/api/v1/practice/rhythm?tune=lantern-walk")).json()).passes;
  expect(newest).toMatchObject({ input: "played", latencyMs: stored!.offsetMs });
  // A pluck every 375 ms against notes of one and two beats at 500 ms: some notes were heard.
  expect(newest.notes.some((n: { tapMs: number | null }) => n.tapMs !== null)).toBe(true);

  const teacher = await browser.newContext({ baseURL });
  const teacherPage = await teacher.newPage();
  await signIn(teacherPage, "rafe@larkspur.example");
  await expect(teacherPage).toHaveURL(/\/teach$/);
  await teacherPage.goto("/teach/classes/demo-class-tue/students/demo-student-1");
  await expect(teacherPage.getByRole("heading", { name: "Rhythm passes" })).toBeVisible();
  await expect(teacherPage.getByRole("cell", { name: "Played on the guitar" }).first()).toBeVisible();
  expect(foreign, "requests to other hosts").toEqual([]);
  await Promise.all([context.close(), teacher.close()]);
});

test("the playing controls pass the WCAG 2.1 AA audit", async ({ baseURL }) => {
  // The audit script is injected, which the app's Content-Security-Policy (rightly) refuses.
  const context = await browser.newContext({ baseURL, bypassCSP: true, reducedMotion: "reduce", viewport: { width: 360, height: 640 }, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  await signIn(page, "amani@larkspur.example");
  await expect(page).toHaveURL(/\/me$/);
  await steadyTune(page, "lantern-walk");
  await page.goto("/me/rhythm/lantern-walk");
  await page.evaluate(() => localStorage.removeItem("fretcall.rhythm-latency"));
  await page.reload();
  const failures: string[] = [];
  await page.getByLabel("Play it on my guitar").click();
  await expect(page.getByRole("button", { name: "Start the clicks" })).toBeVisible();
  failures.push(...(await audit(page, "latency check")));
  await page.getByRole("button", { name: "Start the clicks" }).click();
  await expect(page.getByRole("button", { name: "Stop listening" })).toBeVisible();
  failures.push(...(await audit(page, "latency check listening")));
  await page.getByRole("button", { name: "Stop listening" }).click();
  await page.evaluate(() => localStorage.setItem("fretcall.rhythm-latency", JSON.stringify({ offsetMs: 60, at: Date.now() })));
  await page.reload();
  await page.getByLabel("Play it on my guitar").click();
  await expect(page.getByText("Microphone delay: 60 ms")).toBeVisible();
  failures.push(...(await audit(page, "played pass ready")));
  expect(failures).toEqual([]);
  await context.close();
});
