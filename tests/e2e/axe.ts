import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import type { Page } from "@playwright/test";

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
// WCAG 2.1 AA: the A and AA rules of 2.0 and 2.1, nothing from best practice or AAA.
const WCAG_AA = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"];

type Violation = { id: string; help: string; nodes: { target: string[]; failureSummary?: string }[] };

/**
 * Runs axe-core's WCAG 2.1 AA rules on the page as it stands and returns one readable line per failing element
 * ("where: rule — target — why"), empty when the page passes.
 */
export async function audit(page: Page, where: string): Promise<string[]> {
  // Judge the page people use, after its scripts have run: hydration may still change it while axe reads it.
  await page.locator("html[data-hydrated]").waitFor({ state: "attached" });
  // Text mid-fade has less contrast than it will have: judge the page once its finite animations are over.
  await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== "running" || a.effect?.getTiming().iterations === Infinity));
  if (!(await page.evaluate(() => "axe" in window))) await page.addScriptTag({ content: AXE_SOURCE });
  const violations = await page.evaluate(async (tags) => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: Violation[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: "tag", values: tags } });
    return result.violations.map((v) => ({ id: v.id, help: v.help, nodes: v.nodes.map((n) => ({ target: n.target, failureSummary: n.failureSummary })) }));
  }, WCAG_AA);
  return violations.flatMap((v) =>
    v.nodes.map((n) => `${where}: ${v.id} (${v.help}) — ${n.target.join(" ")} — ${(n.failureSummary ?? "").replace(/\s+/g, " ").trim()}`),
  );
}
