/**
 * First load on a phone on a crowded network: JavaScript bytes and time to usable for the pages a student meets
 * first, beside the not-found page (React, React Router, the root layout and shell only) measured in the same run.
 * Each load gets a cold cache (a new browser context), Chromium's "Fast 3G" network profile and a 4× CPU slowdown,
 * through the DevTools protocol. Loopback only: the production build serves in this process on 127.0.0.1.
 *
 *   npm run build && npx tsx bench/pageload.ts [runs=3]
 *
 * Usable means the page's main control is hydrated and enabled (the signal per page is in PAGES); each figure is
 * the median of the runs. Prints figures and pass/fail against the goals; asserts nothing.
 */
import { chromium, type Browser, type BrowserContext } from "@playwright/test";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { median } from "~/lib/median";
import { startServer } from "../server/index";
import { openTestRoom } from "../server/scripted-rooms";
import { seedDemo } from "../server/seed";

const RUNS = Number(process.argv[2] ?? 3);
/**
 * Chromium DevTools' "Fast 3G" preset: 1.6 Mbps down and 750 kbps up, each scaled by its 0.9 packet factor, and
 * 150 ms × 3.75 = 562.5 ms of latency. The protocol takes bytes per second.
 */
const FAST_3G = { offline: false, latency: 562.5, downloadThroughput: (1.6e6 / 8) * 0.9, uploadThroughput: (750e3 / 8) * 0.9 };
const CPU_SLOWDOWN = 4;
/** The goals, against the baseline page of the same run (issue 16). */
const JS_RATIO_GOAL = 1.25;
/** One round trip for the socket on this profile. */
const SOCKET_ALLOWANCE_S = 0.8;
const PRACTICE_ALLOWANCE_S = 1;
const STAFF_GOAL_S = 4;
const WAIT_MS = 90_000;
const FLAGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run"];

/** In-page tests, evaluated on every DOM change until true; `hydrated` is the root layout's own signal. */
const hydrated = `document.documentElement.hasAttribute("data-hydrated")`;
const enabledButton = (text: string) =>
  `${hydrated} && [...document.querySelectorAll("button")].find((b) => b.textContent.trim() === ${JSON.stringify(text)} && !b.disabled)`;

interface PageSpec {
  name: string;
  path: string;
  /** What "usable" means on this page; its value is also what `then` clicks. */
  usable: string;
  allowanceS: number;
  jsGoal: boolean;
  student?: boolean;
  /** Clicked the moment the page is usable; then `drawn` is timed from the navigation's start too. */
  drawn?: string;
}

interface Sample {
  jsBeforeUsable: number;
  jsInAll: number;
  hydrated: number;
  usable: number;
  drawn: number | null;
}

/**
 * Marks `name` with performance.now() the first time `test` holds; `then(value)` runs at that moment. Written into
 * the script's text, not eval'd: the page's Content-Security-Policy forbids eval.
 */
const watchScript = (marks: [name: string, test: string, then?: string][]) => `
  window.__marks = {};
  const pending = [${marks.map(([name, test, then]) => `[${JSON.stringify(name)}, () => (${test}), (value) => { ${then ?? ""} }]`).join(", ")}];
  const check = () => {
    for (const [name, test, then] of pending) {
      if (name in window.__marks) continue;
      const value = test();
      if (!value) continue;
      window.__marks[name] = performance.now();
      then(value);
    }
  };
  new MutationObserver(check).observe(document, { subtree: true, childList: true, attributes: true });
`;

/** JavaScript bodies as transferred (gzip), up to `until` ms after the navigation started, or all of them. */
const JS_BYTES = `(until) => performance.getEntriesByType("resource")
  .filter((e) => /\\.m?js(\\?|$)/.test(e.name) && (until === null || e.responseEnd <= until))
  .reduce((sum, e) => sum + e.encodedBodySize, 0)`;

async function loadOnce(browser: Browser, baseUrl: string, spec: PageSpec, studentState: Awaited<ReturnType<BrowserContext["storageState"]>>): Promise<Sample> {
  const context = await browser.newContext({
    baseURL: baseUrl,
    viewport: { width: 390, height: 844 },
    isMobile: true,
    hasTouch: true,
    ...(spec.student ? { storageState: studentState } : {}),
  });
  try {
    const page = await context.newPage();
    const cdp = await context.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.setCacheDisabled", { cacheDisabled: true });
    await cdp.send("Network.emulateNetworkConditions", FAST_3G);
    await cdp.send("Emulation.setCPUThrottlingRate", { rate: CPU_SLOWDOWN });
    await page.addInitScript({
      content: watchScript([
        ["hydrated", hydrated],
        ["usable", spec.usable, spec.drawn ? "value.click()" : undefined],
        ...(spec.drawn ? [["drawn", spec.drawn] as [string, string]] : []),
      ]),
    });
    await page.goto(spec.path, { waitUntil: "commit" });
    const last = spec.drawn ? "drawn" : "usable";
    await page
      .waitForFunction((name) => name in ((window as unknown as { __marks: object }).__marks ?? {}), last, { timeout: WAIT_MS, polling: 200 })
      .catch((error: Error) => {
        throw new Error(`${spec.name}: not ${last} within ${WAIT_MS / 1000} s (${error.message})`);
      });
    // Whatever the page still fetches after it is usable (the practice staff's engraver) counts toward "in all".
    await page.waitForLoadState("networkidle", { timeout: WAIT_MS });
    const marks = await page.evaluate(() => (window as unknown as { __marks: Record<string, number> }).__marks);
    const bytes = (until: number | null) => page.evaluate(`(${JS_BYTES})(${until})`) as Promise<number>;
    return {
      jsBeforeUsable: await bytes(marks.usable!),
      jsInAll: await bytes(null),
      hydrated: marks.hydrated! / 1000,
      usable: marks.usable! / 1000,
      drawn: marks.drawn === undefined ? null : marks.drawn / 1000,
    };
  } finally {
    await context.close();
  }
}

const dir = mkdtempSync(join(tmpdir(), "fretcall-pageload-"));
const server = await startServer({
  NODE_ENV: "production",
  PORT: "0",
  HOST: "127.0.0.1",
  LOG_LEVEL: "warn",
  SESSION_SECRET: "bench-secret-0123456789abcdef0123456789",
  MAIL_CAPTURE: "1",
  MAIL_DIR: join(dir, "mail"),
  DATABASE_URL: `file:${join(dir, "bench.db")}`,
});
const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", args: FLAGS });
try {
  await seedDemo(server.services.db);
  // Same-origin checks compare against the address the browser uses.
  const baseUrl = server.url.replace("localhost", "127.0.0.1");
  const room = await openTestRoom(server.services.db);

  // The student signs in once, unthrottled; each practice load starts from that cookie with a cold cache.
  const signIn = await browser.newContext({ baseURL: baseUrl });
  const form = await signIn.newPage();
  await form.goto("/signin");
  await form.getByLabel("E-mail").fill(DEMO_SCHOOL.studentWithSignIn.email);
  await form.getByLabel("Password").fill(DEMO_PASSWORD);
  await form.getByRole("button", { name: "Sign in" }).click();
  await form.waitForURL(/\/me$/);
  const studentState = await signIn.storageState();
  await signIn.close();

  const pages: PageSpec[] = [
    { name: "baseline: not-found", path: "/no-such-page", usable: hydrated, allowanceS: 0, jsGoal: false },
    { name: "pad /play/<code>", path: `/play/${room.code}`, usable: enabledButton("Join"), allowanceS: SOCKET_ALLOWANCE_S, jsGoal: true },
    { name: "join /join", path: "/join", usable: enabledButton("Join"), allowanceS: SOCKET_ALLOWANCE_S, jsGoal: true },
    {
      name: "practice (ready-made set)",
      path: "/me/practice?preset=ready-g-major-5&count=5",
      usable: enabledButton("Start practising"),
      allowanceS: PRACTICE_ALLOWANCE_S,
      jsGoal: false,
      student: true,
      drawn: `document.querySelector("[data-written] figure[data-drawn]")`,
    },
  ];
  const samples = new Map(pages.map((p) => [p.name, [] as Sample[]]));
  // Interleaved, so a slow moment of a shared machine falls on every page alike.
  for (let run = 0; run < RUNS; run++) for (const spec of pages) samples.get(spec.name)!.push(await loadOnce(browser, baseUrl, spec, studentState));

  const mid = (name: string, pick: (s: Sample) => number | null) => median(samples.get(name)!.map(pick).filter((v): v is number => v !== null));
  const base = { js: mid(pages[0]!.name, (s) => s.jsBeforeUsable)!, usable: mid(pages[0]!.name, (s) => s.usable)! };
  const kib = (bytes: number) => (bytes / 1024).toFixed(1);
  console.log(`\nFirst load, cold cache, Fast 3G (${FAST_3G.latency} ms, 1.6 Mbps down), CPU ${CPU_SLOWDOWN}× slower; median of ${RUNS} runs\n`);
  console.log("| page | JS gzip before usable, KiB | in all, KiB | × baseline | hydrated s | usable s | goal s | staff drawn s | pass |");
  console.log("|---|---|---|---|---|---|---|---|---|");
  for (const spec of pages) {
    const js = mid(spec.name, (s) => s.jsBeforeUsable)!;
    const usable = mid(spec.name, (s) => s.usable)!;
    const drawn = mid(spec.name, (s) => s.drawn);
    const isBase = spec === pages[0];
    const goal = base.usable + spec.allowanceS;
    const ok = isBase || ((!spec.jsGoal || js <= JS_RATIO_GOAL * base.js) && usable <= goal && (drawn === null || drawn <= STAFF_GOAL_S));
    console.log(
      `| ${spec.name} | ${kib(js)} | ${kib(mid(spec.name, (s) => s.jsInAll)!)} | ${(js / base.js).toFixed(2)}${spec.jsGoal ? ` (≤ ${JS_RATIO_GOAL})` : ""} | ${mid(spec.name, (s) => s.hydrated)!.toFixed(2)} | ${usable.toFixed(2)} | ${isBase ? "—" : `≤ ${goal.toFixed(2)}`} | ${drawn === null ? "—" : `${drawn.toFixed(2)} (≤ ${STAFF_GOAL_S})`} | ${isBase ? "baseline" : ok ? "pass" : "FAIL"} |`,
    );
  }
} finally {
  await browser.close();
  await server.close();
  rmSync(dir, { recursive: true, force: true });
}
