// axe-core from node_modules, injected into a page: the serious and critical
// violations, as "rule: targets" lines (an empty list is a pass).
import fs from "node:fs";
import path from "node:path";
import type { Page } from "playwright-core";

export async function seriousViolations(page: Page, include?: string): Promise<string[]> {
  // Next.js streams a page's metadata after its content: the <title> can come a moment after the
  // text a test waited for (seen once in CI as "document-title"). Waiting for it here keeps that
  // rule honest: a page that never gets a title still fails it, after 10 s.
  await page.waitForFunction(() => document.title.trim() !== "", undefined, { timeout: 10_000 }).catch(() => undefined);
  await page.addScriptTag({ content: fs.readFileSync(path.resolve("node_modules/axe-core/axe.min.js"), "utf8") });
  const result = (await page.evaluate(async (scope) => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<unknown> } }).axe;
    return axe.run(scope ? { include: [scope] } : document, { resultTypes: ["violations"] });
  }, include ?? null)) as { violations: { id: string; impact: string | null; nodes: { target: string[] }[] }[] };
  return result.violations.filter((v) => v.impact === "serious" || v.impact === "critical").map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
}
