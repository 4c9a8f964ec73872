import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';
import type { AxeResults, ImpactValue, Result } from 'axe-core';

/**
 * axe-core run inside the page by playwright-core: the library's source is evaluated in
 * every frame (through the DevTools protocol, so the page's CSP does not block it; no
 * script tag is added), then `axe.run` checks the whole document, frames included,
 * against the WCAG 2.0/2.1 level A and AA rules.
 */
const axeSource: string = createRequire(import.meta.url)('axe-core').source;

export const WCAG21_AA_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];

export interface AxeViolation {
  id: string;
  impact: ImpactValue | null;
  help: string;
  nodes: { target: string; summary: string }[];
}

export interface AxeReport {
  name: string;
  url: string;
  violations: AxeViolation[];
  passes: number;
  incomplete: number;
}

async function inject(page: Page): Promise<void> {
  for (const frame of page.frames()) {
    if (frame.isDetached()) continue;
    await frame.evaluate(`${axeSource}\n;undefined`).catch(() => undefined);
  }
}

const short = (r: Result): AxeViolation => ({
  id: r.id,
  impact: r.impact ?? null,
  help: r.help,
  nodes: r.nodes.map((n) => ({ target: n.target.join(' '), summary: (n.failureSummary ?? '').replace(/\s+/g, ' ').slice(0, 300) })),
});

/** Run axe on the page as it is now. `name` labels the run in the summary. */
export async function runAxe(page: Page, name: string): Promise<AxeReport> {
  await inject(page);
  const results = (await page.evaluate(
    (tags) => (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<AxeResults> } }).axe.run(document, { runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] }),
    WCAG21_AA_TAGS,
  )) as AxeResults;
  return { name, url: page.url(), violations: results.violations.map(short), passes: results.passes.length, incomplete: results.incomplete.length };
}

export const isSerious = (v: AxeViolation) => v.impact === 'serious' || v.impact === 'critical';

/** Violations in words, for a failing assertion's message and the run's log. */
export function describeViolations(report: AxeReport, only: (v: AxeViolation) => boolean = () => true): string {
  const lines = report.violations.filter(only).map((v) => `  [${v.impact}] ${v.id}: ${v.help}\n${v.nodes.map((n) => `      ${n.target} — ${n.summary}`).join('\n')}`);
  return lines.length ? `${report.name} (${report.url}):\n${lines.join('\n')}` : `${report.name}: no violations`;
}

/** Counts by impact over several runs: what the accessibility summary prints. */
export function countByImpact(reports: AxeReport[]): Record<string, number> {
  const counts: Record<string, number> = { critical: 0, serious: 0, moderate: 0, minor: 0 };
  for (const r of reports) for (const v of r.violations) counts[v.impact ?? 'minor'] += v.nodes.length;
  return counts;
}
