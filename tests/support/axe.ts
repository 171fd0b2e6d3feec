/**
 * Accessibility check for browser tests: axe-core (node_modules/axe-core/axe.min.js) injected into
 * the page; returns the serious and critical violations, one line each (empty when there are none).
 *
 *   expect(await seriousViolations(page)).toEqual([]);
 */
import { createRequire } from "node:module";
import type { Page } from "playwright-core";

const axePath = createRequire(import.meta.url).resolve("axe-core/axe.min.js");

type Violation = { id: string; impact: string; help: string; nodes: { target: string[]; html?: string }[] };

export async function seriousViolations(p: Page): Promise<string[]> {
  await p.addScriptTag({ path: axePath });
  const result = (await p.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: Violation[] }> } }).axe;
    return axe.run(document, { resultTypes: ["violations"] });
  })) as { violations: Violation[] };
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map(
      (v) =>
        `${v.id} (${v.impact}): ${v.help} at ${v.nodes
          .slice(0, 3)
          .map((n) => `${n.target.join(" ")} ${n.html?.slice(0, 160) ?? ""}`)
          .join("; ")}`,
    );
}
