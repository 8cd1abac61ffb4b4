/**
 * axe-core in the page under test (Debian's Chromium through playwright-core): WCAG 2.0–2.2 A and AA
 * rules. Serious and critical violations are failures; moderate and minor ones are printed.
 */
import fs from 'node:fs';
import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';

const require = createRequire(import.meta.url);
const AXE_SOURCE = fs.readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

export const AXE_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa'];

export interface AxeFinding {
  id: string;
  impact: string | null;
  help: string;
  targets: string[];
  summary: string;
}

/** Runs axe on the page as it is now; returns the failures (serious, critical) and the rest. */
export async function runAxe(page: Page): Promise<{ failures: AxeFinding[]; notes: AxeFinding[] }> {
  // Evaluated through the DevTools protocol: the page's Content-Security-Policy refuses inline scripts.
  if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(AXE_SOURCE);
  const violations = await page.evaluate(async (tags) => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: any[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] });
    return result.violations.map((v) => ({
      id: v.id as string,
      impact: v.impact as string | null,
      help: v.help as string,
      targets: v.nodes.slice(0, 6).map((n: any) => String(n.target.join(' '))),
      summary: String(v.nodes[0]?.failureSummary ?? '').split('\n').slice(0, 3).join(' '),
    }));
  }, AXE_TAGS);
  const serious = (f: AxeFinding) => f.impact === 'serious' || f.impact === 'critical';
  return { failures: violations.filter(serious), notes: violations.filter((f) => !serious(f)) };
}

export function describeFindings(where: string, findings: AxeFinding[]): string {
  return findings.map((f) => `${where}: [${f.impact}] ${f.id} — ${f.help}\n    ${f.targets.join('\n    ')}\n    ${f.summary}`).join('\n');
}
