// A student answers practice by playing on a guitar into a fake microphone, and the teacher's pages show those
// answers as played. The microphone is Chromium's fake capture device, fed a WAV file this test writes with the
// app's own plucked-string synthesis (it loops the file, so silence separates the notes).
import type { Browser } from "@playwright/test";
import { mix, pluck, roomNoise } from "~/listen/synth";
import { expect, signIn, test } from "./fixtures";
import { launchWithMicrophone } from "./microphone";

const PORT = Number(process.env.E2E_PORT ?? 3210);
const SAMPLE_RATE = 48_000;
const GAP_SECONDS = 2.8;

// The set reads one note, written C5 (MIDI 1.0: 72). Guitar sounds an octave below written (common practice,
// no source), so the right pitch sounds C4 = 60; frequencies by 12-TET from A4 = 440 Hz (ISO 16): 440 · 2^((m − 69) / 12).
const hz = (midi: number) => 440 * 2 ** ((midi - 69) / 12);
const PLAYED = [
  { midi: 60, kind: "home-spot" }, // right
  { midi: 72, kind: "octave-off" }, // as written: an octave too high
  { midi: 61, kind: "half-step-off" }, // C♯4
] as const;

function microphoneSound(): Float32Array {
  const tracks = PLAYED.map(({ midi }, i) =>
    pluck({ hz: hz(midi), seconds: GAP_SECONDS * PLAYED.length, sampleRate: SAMPLE_RATE, startSeconds: 0.6 + i * GAP_SECONDS, decaySeconds: 0.5, seed: i + 1 }),
  );
  // Each pluck dies away well before the next: the detector waits for silence or a new attack between notes.
  return mix(...tracks, roomNoise({ seconds: GAP_SECONDS * PLAYED.length, sampleRate: SAMPLE_RATE, rms: 0.002 }));
}

let listeningBrowser: Browser;
test.beforeAll(async () => {
  listeningBrowser = await launchWithMicrophone("play-mode-microphone", microphoneSound(), SAMPLE_RATE, ["--autoplay-policy=no-user-gesture-required"]);
});
test.afterAll(() => listeningBrowser.close());

test("a student answers a reading set by playing, and the teacher sees the answers as played", async ({ page: teacher }) => {
  test.setTimeout(120_000);
  // The teacher makes a one-note reading set, so every prompt is written C5.
  await signIn(teacher, "rafe@larkspur.example");
  await expect(teacher).toHaveURL(/\/teach$/);
  await teacher.goto("/teach/sets/new");
  await teacher.getByLabel("Name", { exact: true }).fill("Play test: C5 only");
  await teacher.getByLabel("Class", { exact: true }).selectOption("demo-class-tue");
  await teacher.getByLabel("Lowest written note", { exact: true }).fill("C5");
  await teacher.getByLabel("Highest written note", { exact: true }).fill("C5");
  await teacher.getByRole("button", { name: "Save reading set" }).click();
  await expect(teacher).toHaveURL(/\/teach\/sets\?done=/);
  const setId = new URL(teacher.url()).searchParams.get("set")!;

  const context = await listeningBrowser.newContext({ baseURL: `http://localhost:${PORT}`, viewport: { width: 390, height: 844 } });
  const foreign: string[] = [];
  context.on("request", (req) => {
    const url = new URL(req.url());
    if (!["data:", "blob:"].includes(url.protocol) && !["localhost", "127.0.0.1"].includes(url.hostname)) foreign.push(req.url());
  });
  const student = await context.newPage();
  const errors: string[] = [];
  student.on("pageerror", (e) => errors.push(e.message));
  await signIn(student, "amani@larkspur.example");
  await expect(student).toHaveURL(/\/me$/);
  const since = Date.now();
  await student.goto(`/me/practice?set=${setId}&count=5`);
  await student.getByRole("button", { name: "Start practising" }).click();
  await expect(student.locator("[data-written]")).toHaveAttribute("data-written", "C5");

  await student.getByRole("button", { name: "Play on my guitar" }).click();
  // Before the microphone is asked for: where the sound goes, and that the string cannot be heard.
  await expect(student.getByText("never sent or stored").first()).toBeVisible();
  await expect(student.getByText("cannot tell which string").first()).toBeVisible();
  await student.getByRole("button", { name: "Tune up and start" }).click();
  await expect(student.getByRole("heading", { name: "Tune up first" })).toBeVisible();
  await student.getByRole("button", { name: "Skip the tune-up" }).click();
  await expect(student.getByRole("status").filter({ hasText: "Listening" })).toBeVisible();
  await expect(student.getByRole("button", { name: "Stop listening" })).toBeVisible();
  await expect(student.getByText("Play this note on your guitar")).toBeVisible();

  // The looping file plays right, octave off, half step off, ...: each counted note answers the note shown,
  // and the next note comes by itself.
  await expect(student.getByRole("heading", { name: "Session done" })).toBeVisible({ timeout: 60_000 });
  // Done: the microphone is off again.
  await expect(student.getByRole("button", { name: "Stop listening" })).toHaveCount(0);
  await expect(student.getByText("All answers saved")).toBeVisible({ timeout: 15_000 });
  const stored = (await (await student.request.get(`/api/v1/practice/answers?since=${since}`)).json()) as {
    answers: { input: string; heardMidi: number | null; kind: string; string: number | null; reactionMs: number }[];
  };
  expect(stored.answers).toHaveLength(5);
  for (const a of stored.answers) {
    expect(a).toMatchObject({ input: "played", string: null });
    const expected = PLAYED.find((p) => p.midi === a.heardMidi);
    expect(expected, `heard MIDI ${a.heardMidi}`).toBeDefined();
    expect(a.kind).toBe(expected!.kind);
  }
  expect(new Set(stored.answers.map((a) => a.kind))).toEqual(new Set(PLAYED.map((p) => p.kind)));
  await context.close();
  expect(foreign, "requests to other hosts").toEqual([]);
  expect(errors, "errors on the student's page").toEqual([]);

  // The teacher's pages: the student's latest answers say "Played" with what was heard; the class review counts them.
  await teacher.goto("/teach/classes/demo-class-tue/students/demo-student-1");
  const recent = teacher.getByRole("table", { name: /Recent practice answers/ });
  await expect(recent.getByRole("row").filter({ hasText: "Played" }).filter({ hasText: "octave off" }).first()).toBeVisible();
  await expect(recent.getByRole("row").filter({ hasText: "Played" }).filter({ hasText: "half step off" }).first()).toBeVisible();
  await expect(recent.getByRole("row").filter({ hasText: "Played" }).filter({ hasText: "right note" }).first()).toBeVisible();
  await teacher.goto("/teach/classes/demo-class-tue/review");
  const mix = teacher.getByRole("table", { name: /Practice by student/ });
  await expect(mix.getByRole("columnheader", { name: /Played/ })).toBeVisible();
  const right = stored.answers.filter((a) => a.kind === "home-spot").length;
  await expect(mix.getByRole("row").filter({ hasText: "Amani" })).toContainText(`5 (${Math.round((right / 5) * 100)} % right)`);
});
