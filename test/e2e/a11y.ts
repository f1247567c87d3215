/**
 * axe-core in the page under test: WCAG 2.0/2.1/2.2 A and AA rules (and axe's best practices for
 * landmarks and regions), run against the live document. Each finding names its rule, impact and nodes.
 */
import fs from 'node:fs';
import type { Page } from 'playwright-core';

const AXE_SOURCE = fs.readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

export interface AxeFinding {
  id: string;
  impact: 'minor' | 'moderate' | 'serious' | 'critical' | null;
  help: string;
  nodes: string[];
}

/** Every violation axe finds on the page as it is now. */
export async function axeViolations(page: Page): Promise<AxeFinding[]> {
  const has = await page.evaluate(() => typeof (window as unknown as { axe?: unknown }).axe !== 'undefined');
  // evaluated through the DevTools protocol: the app's Content-Security-Policy (script-src 'self') stays as it is
  if (!has) await page.evaluate(AXE_SOURCE);
  return page.evaluate(async () => {
    const axe = (
      window as unknown as {
        axe: {
          run(
            ctx: unknown,
            opts: unknown,
          ): Promise<{ violations: { id: string; impact: AxeFinding['impact']; help: string; nodes: { target: unknown[] }[] }[] }>;
        };
      }
    ).axe;
    const r = await axe.run(document, {
      runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa', 'best-practice'] },
      resultTypes: ['violations'],
    });
    return r.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.map((n) => n.target.join(' ')) }));
  });
}

/** Only the serious and critical ones: those fail a screen. */
export const serious = (list: AxeFinding[]) => list.filter((v) => v.impact === 'serious' || v.impact === 'critical');

/** One line per finding, for messages and logs. */
export const describeFindings = (list: AxeFinding[]) =>
  list.map((v) => `${v.impact} ${v.id} (${v.nodes.length} nodes: ${v.nodes.slice(0, 4).join(', ')}): ${v.help}`).join('\n');
