import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { countByImpact, describeViolations, isSerious, runAxe, type AxeReport } from '../helpers/axe';
import { modelWorkspace } from '../integration/embeds/fixtures';
import { DEMO_USERS, DEMO_WORKSPACE } from '@/lib/demo/accounts';

/**
 * WCAG 2.1 AA in a real browser: axe-core on the calculator (the seeded demo, and
 * fixture calculators on a paid plan for the many answers: light and dark, 320 px and
 * 1280 px, before and after an answer, with field errors, with the unusual-values notice
 * and with the report form open), on the studio's main pages and on the support console;
 * then a keyboard-only journey, the chart's text alternative and reduced motion.
 * Every axe run is written to test-results/axe-summary.json.
 */
let browser: Browser;
const reports: AxeReport[] = [];
let lightToken = '';
let darkToken = '';
let demoToken = '';
let demoAccent = { accentColor: '', theme: 'light' as 'light' | 'dark' };
const settings = { userId: 0, workspaceId: 0, embedId: 0 };
const demo = { ownerId: 0, staffId: 0, workspaceId: 0, datasetId: 0, fitId: 0, modelId: 0, embedId: 0 };

const FIELDS = ['Average speed (km/h)', 'Weekly distance (km)', 'Climbing per ride (m)'];
const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];

beforeAll(async () => {
  browser = await launchBrowser();
  const { publishNew, updateSettings } = await import('@/lib/embeds/service');
  const { Dataset, Embed, Fit, MixtureModel, User, Workspace } = await import('@/models');
  // A paid plan: these tests send a dozen answers, more than the demo's free plan gives a calculator in a minute.
  const ws = await modelWorkspace({ plan: 'lab' });
  const acting = { user: ws.owner, workspace: ws.workspace };
  lightToken = (await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Which ride group suits you?' })).embed.token;
  const dark = (await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Which ride group suits you?' })).embed;
  await updateSettings(acting, dark.id, { theme: 'dark', accentColor: '#e0a526' });
  darkToken = dark.token;
  const forSettings = (await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Accent colour check' })).embed;
  Object.assign(settings, { userId: ws.owner.id, workspaceId: ws.workspace.id, embedId: forSettings.id });

  const workspace = (await Workspace.findOne({ where: { slug: DEMO_WORKSPACE.slug } }))!;
  const first = { where: { workspaceId: workspace.id }, order: [['id', 'ASC']] as [string, string][] };
  const [embed, dataset, fit, model] = await Promise.all([Embed.findOne(first), Dataset.findOne(first), Fit.findOne(first), MixtureModel.findOne(first)]);
  if (!embed || !dataset || !fit || !model) throw new Error('the test stack has no seeded demo workspace');
  demoToken = embed.token;
  demoAccent = { accentColor: embed.accentColor, theme: embed.theme };
  Object.assign(demo, {
    workspaceId: workspace.id,
    embedId: embed.id,
    datasetId: dataset.id,
    fitId: fit.id,
    modelId: model.id,
    ownerId: (await User.findOne({ where: { email: DEMO_USERS.owner.email } }))!.id,
    staffId: (await User.findOne({ where: { email: DEMO_USERS.staff.email } }))!.id,
  });
});

afterAll(async () => {
  await browser?.close();
  const dir = path.resolve('test-results');
  fs.mkdirSync(dir, { recursive: true });
  fs.writeFileSync(path.join(dir, 'axe-summary.json'), JSON.stringify({ pages: reports.length, byImpact: countByImpact(reports), runs: reports }, null, 2));
  console.log(`[axe] ${reports.length} runs; violations by impact (nodes): ${JSON.stringify(countByImpact(reports))}`);
  for (const r of reports) if (r.violations.length) console.log(describeViolations(r));
});

/** Run axe, keep the report, save a screenshot, and fail on any serious or critical violation. */
async function check(page: Page, name: string): Promise<AxeReport> {
  const report = await runAxe(page, name);
  reports.push(report);
  await screenshot(page, `a11y-${name}`);
  expect(report.violations.filter(isSerious), describeViolations(report, isSerious)).toEqual([]);
  return report;
}

async function fill(page: Page, values: string[]) {
  for (const [i, label] of FIELDS.entries()) await page.getByLabel(label).fill(values[i]);
}

async function answer(page: Page, values: string[]) {
  await fill(page, values);
  await page.getByRole('button', { name: 'Show my groups' }).click();
  await page.waitForSelector('[data-testid="answer"]:not([data-stale]) [data-chart-ready="true"] svg');
}

async function openCalculator(context: BrowserContext, token: string): Promise<Page> {
  const page = await context.newPage();
  const res = await page.goto(appUrl(`/embed/${token}`));
  expect(res?.status()).toBe(200);
  await page.waitForSelector('[data-interactive="true"]');
  return page;
}

describe('axe-core on the calculator (WCAG 2.1 A and AA)', () => {
  it('the seeded demo calculator: before and after an answer, at 1280 px and 320 px', async () => {
    // The seed's accent and theme pass the accent rule the settings enforce.
    const { accentPasses } = await import('@/lib/embeds/contrast');
    expect(accentPasses(demoAccent.accentColor, demoAccent.theme), JSON.stringify(demoAccent)).toBe(true);
    for (const width of [1280, 320]) {
      const context = await browser.newContext({ viewport: { width, height: 900 } });
      const page = await openCalculator(context, demoToken);
      await check(page, `demo-${width}-before`);
      // One answer only: the demo is on the free plan, whose calculators answer 10 a minute.
      if (width === 1280) {
        await answer(page, ['27', '160', '450']);
        await check(page, `demo-${width}-answer`);
      }
      await context.close();
    }
  });

  for (const theme of ['light', 'dark'] as const) {
    for (const width of [320, 1280]) {
      it(`a ${theme} calculator at ${width} px: before, with field errors, after an answer, unusual values, report form open`, async () => {
        const context = await browser.newContext({ viewport: { width, height: 900 } });
        const page = await openCalculator(context, theme === 'light' ? lightToken : darkToken);
        const name = `${theme}-${width}`;
        await check(page, `${name}-1-before`);

        await page.getByRole('button', { name: 'Show my groups' }).click();
        await page.getByText('Enter Average speed.', { exact: true }).waitFor();
        await check(page, `${name}-2-field-errors`);

        await answer(page, ['31', '250', '640']);
        await check(page, `${name}-3-answer`);
        // Edited after the answer: the old answer is greyed out but must stay readable.
        await page.getByLabel(FIELDS[0]).fill('32');
        await page.getByTestId('stale-notice').waitFor();
        await check(page, `${name}-3b-stale`);

        await answer(page, ['44', '5', '2900']);
        await page.getByTestId('unusual-notice').waitFor();
        await check(page, `${name}-4-unusual`);

        await page.getByRole('button', { name: 'Report this calculator' }).click();
        await page.getByRole('button', { name: 'Send report' }).click();
        await page.getByText('Choose a reason.').waitFor();
        // The first invalid field of the report takes the focus and is described by its error.
        const reason = page.getByLabel('Reason');
        expect(await reason.evaluate((el) => el === document.activeElement)).toBe(true);
        expect(await page.locator(`[id="${await reason.getAttribute('aria-describedby')}"]`).textContent()).toBe('Choose a reason.');
        await check(page, `${name}-5-report-form`);
        await context.close();
      });
    }
  }
});

describe('axe-core on the studio and the support console', () => {
  it('the studio main pages, as the demo owner', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    await signInContext(context, demo.ownerId, demo.workspaceId);
    const page = await context.newPage();
    const pages: [string, string][] = [
      ['studio-home', '/studio'],
      ['studio-datasets', '/studio/datasets'],
      ['studio-dataset', `/studio/datasets/${demo.datasetId}`],
      ['studio-fits', '/studio/fits'],
      ['studio-fit', `/studio/fits/${demo.fitId}`],
      ['studio-models', '/studio/models'],
      ['studio-model', `/studio/models/${demo.modelId}`],
      ['studio-calculators', '/studio/calculators'],
      ['studio-calculator', `/studio/calculators/${demo.embedId}`],
      ['studio-billing', '/studio/billing'],
      ['studio-team', '/studio/team'],
    ];
    const failures: string[] = [];
    for (const [name, pathname] of pages) {
      const res = await page.goto(appUrl(pathname));
      expect(res?.status(), pathname).toBe(200);
      await settle(page);
      const report = await runAxe(page, name);
      reports.push(report);
      await screenshot(page, `a11y-${name}`);
      if (report.violations.some(isSerious)) failures.push(describeViolations(report, isSerious));
    }
    expect(failures, failures.join('\n')).toEqual([]);
    await context.close();
  });

  it('the calculator settings refuse a hard-to-see accent next to the colour field and offer the nearest readable one', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 1000 } });
    await signInContext(context, settings.userId, settings.workspaceId);
    const page = await context.newPage();
    await page.goto(appUrl(`/studio/calculators/${settings.embedId}`));
    const accent = page.getByLabel('Accent colour');
    // react-hook-form fills the fields when the form hydrates; a click before that would submit natively.
    await expect.poll(() => accent.inputValue(), { timeout: 30_000 }).toBe('#2f6f5e');
    await accent.fill('#f0c763');
    await page.getByRole('button', { name: 'Save settings' }).click();
    const error = page.getByTestId('accent-error');
    await error.waitFor();
    expect(await error.textContent()).toContain('#f0c763 is hard to see on the light theme');
    expect(await accent.getAttribute('aria-invalid')).toBe('true');
    expect(await accent.getAttribute('aria-describedby')).toBe(await error.getAttribute('id'));
    await check(page, 'studio-settings-accent-refused');
    const { Embed } = await import('@/models');
    expect((await Embed.findByPk(settings.embedId))!.accentColor).toBe('#2f6f5e');

    await page.getByRole('button', { name: 'Use #be8c12' }).click();
    expect(await accent.inputValue()).toBe('#be8c12');
    expect(await error.count()).toBe(0);
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByRole('status').filter({ hasText: 'Saved.' }).waitFor();
    expect((await Embed.findByPk(settings.embedId))!.accentColor).toBe('#be8c12');
    await screenshot(page, 'a11y-studio-settings-accent-saved');
    await context.close();
  });

  it('the support console, as support staff', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    await signInContext(context, demo.staffId);
    const page = await context.newPage();
    const failures: string[] = [];
    for (const [name, pathname] of [
      ['support-console', '/support'],
      ['support-calculator', `/support/calculators/${demo.embedId}`],
      ['support-audit', '/support/audit'],
    ] as const) {
      const res = await page.goto(appUrl(pathname));
      expect(res?.status(), pathname).toBe(200);
      await settle(page);
      const report = await runAxe(page, name);
      reports.push(report);
      await screenshot(page, `a11y-${name}`);
      if (report.violations.some(isSerious)) failures.push(describeViolations(report, isSerious));
    }
    expect(failures, failures.join('\n')).toEqual([]);
    await context.close();
  });
});

/** Client components hydrated and charts drawn (pages with live progress never go network-idle). */
async function settle(page: Page) {
  await page.waitForLoadState('load');
  await page.waitForTimeout(800);
  await page
    .locator('[data-chart-ready="true"], svg')
    .first()
    .waitFor({ timeout: 3000 })
    .catch(() => undefined);
}

/** What has the focus: its id, label-ish name, position, and how the focus shows. */
async function focused(page: Page) {
  return page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null;
    if (!el || el === document.body) return null;
    const css = getComputedStyle(el);
    const box = el.getBoundingClientRect();
    return {
      tag: el.tagName.toLowerCase(),
      id: el.id,
      name: el.getAttribute('aria-label') ?? (el.id ? document.querySelector(`label[for="${el.id}"]`)?.textContent : null) ?? el.textContent?.trim() ?? '',
      top: box.top + window.scrollY,
      left: box.left,
      outline: css.outlineStyle !== 'none' && Number.parseFloat(css.outlineWidth) >= 2 ? `${css.outlineWidth} ${css.outlineStyle} ${css.outlineColor}` : '',
      ring: css.boxShadow !== 'none' ? css.boxShadow : '',
    };
  });
}

describe('the calculator with the keyboard only', () => {
  it('tabs in visual order with a visible focus, Enter submits, errors are announced, linked and focused', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await openCalculator(context, lightToken);

    // Tab order: the three fields, the button, then the report link, each below the one before.
    const order = [];
    for (let i = 0; i < 5; i++) {
      await page.keyboard.press('Tab');
      order.push((await focused(page))!);
    }
    expect(order.map((f) => f.name?.replace(/\s+/g, ' ').trim())).toEqual([...FIELDS, 'Show my groups', 'Report this calculator']);
    for (let i = 1; i < order.length; i++) expect(order[i].top, `${order[i].name} is below ${order[i - 1].name}`).toBeGreaterThan(order[i - 1].top);
    // Visible focus: a ring (box-shadow) on the fields, a 2 px outline on the buttons.
    for (const f of order) expect(f.outline || f.ring, `${f.name} shows its focus`).not.toBe('');
    expect(order[0].ring).toMatch(/rgb\(47, 111, 94\)/);
    expect(order[3].outline).toMatch(/^2px solid rgb\(47, 111, 94\)$/);
    await screenshot(page, 'a11y-keyboard-focus-report-link');

    // Back to the first field; Enter with nothing typed: every field is invalid, described by its error, and announced.
    await page.keyboard.press('Shift+Tab');
    await page.keyboard.press('Shift+Tab');
    await page.keyboard.press('Shift+Tab');
    await page.keyboard.press('Shift+Tab');
    expect((await focused(page))!.name).toMatch(/^Average speed/);
    await page.keyboard.press('Enter');
    const region = (i: number) => page.getByTestId(`error-region-${FEATURES[i]}`);
    await expect.poll(() => region(2).textContent()).toBe('Enter Climbing per ride.');
    for (const [i, label] of FIELDS.entries()) {
      const input = page.getByLabel(label);
      expect(await input.getAttribute('aria-invalid')).toBe('true');
      const described = (await input.getAttribute('aria-describedby'))!.split(' ');
      const error = page.locator(`[id="${described[0]}"]`);
      expect(await error.textContent()).toBe(`Enter ${label.replace(/ \(.*\)$/, '')}.`);
      // The error appeared inside a live region that was there before it (so it is spoken), the field's own one.
      expect(await region(i).getAttribute('aria-live')).toBe('polite');
      expect(await error.evaluate((el) => el.parentElement?.getAttribute('data-testid'))).toBe(`error-region-${FEATURES[i]}`);
    }
    expect((await focused(page))!.name).toMatch(/^Average speed/);
    await screenshot(page, 'a11y-keyboard-errors');

    // Type by keyboard: a good speed, a bad distance, a good climb; Enter moves the focus to the distance.
    await page.keyboard.type('31');
    await page.keyboard.press('Tab');
    await page.keyboard.type('lots');
    await page.keyboard.press('Tab');
    await page.keyboard.type('640');
    await page.keyboard.press('Enter');
    await expect.poll(async () => (await focused(page))?.name).toMatch(/^Weekly distance/);
    await expect.poll(() => region(1).textContent()).toBe('Weekly distance must be a number.');
    expect(await region(0).textContent()).toBe('');
    expect(await region(2).textContent()).toBe('');
    expect(await page.getByLabel(FIELDS[0]).getAttribute('aria-invalid')).toBeNull();
    const distance = page.getByLabel(FIELDS[1]);
    expect(await distance.getAttribute('aria-invalid')).toBe('true');
    expect(await page.locator(`[id="${(await distance.getAttribute('aria-describedby'))!.split(' ')[0]}"]`).textContent()).toBe('Weekly distance must be a number.');

    // Fix it and press Enter again: the answer arrives in the polite live region, the errors are gone.
    await page.keyboard.press('ControlOrMeta+a');
    await page.keyboard.type('250');
    await page.keyboard.press('Enter');
    await page.waitForSelector('[data-chart-ready="true"] svg');
    for (const i of [0, 1, 2]) expect(await region(i).textContent()).toBe('');
    const result = page.locator('section[aria-live="polite"]');
    expect(await result.getByRole('heading', { level: 2 }).textContent()).toMatch(/^Most like: /);
    expect(await distance.getAttribute('aria-invalid')).toBeNull();
    await screenshot(page, 'a11y-keyboard-answer');
    await context.close();
  });
});

/** A computed CSS colour as #rrggbb, an rgba() one laid over `under` (#rrggbb). */
function solid(css: string, under: string): string {
  const m = /rgba?\(([\d.]+), ([\d.]+), ([\d.]+)(?:, ([\d.]+))?\)/.exec(css);
  if (!m) throw new Error(`not an rgb colour: ${css}`);
  const a = m[4] === undefined ? 1 : Number(m[4]);
  const base = [1, 3, 5].map((i) => Number.parseInt(under.slice(i, i + 2), 16));
  return `#${[m[1], m[2], m[3]].map((v, i) => Math.round(Number(v) * a + base[i] * (1 - a)).toString(16).padStart(2, '0')).join('')}`;
}

describe('fields and focus rings stand out (WCAG 1.4.11, 3:1)', () => {
  it('calculator fields in light and dark, studio fields and their focus ring', async () => {
    const { contrastRatio } = await import('@/lib/embeds/contrast');
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    await signInContext(context, demo.ownerId, demo.workspaceId);
    const css = (page: Page, selector: string) =>
      page.locator(selector).first().evaluate((el) => {
        const s = getComputedStyle(el);
        return { border: s.borderTopColor, background: s.backgroundColor, shadow: s.boxShadow };
      });
    for (const [token, page_, field] of [[lightToken, '#ffffff', '#ffffff'], [darkToken, '#151924', '#1c2130']] as const) {
      const page = await openCalculator(context, token);
      const { border } = await css(page, 'input[inputmode="decimal"]');
      const edge = solid(border, field);
      expect(Math.min(contrastRatio(edge, field), contrastRatio(edge, page_)), `${border} on ${field}/${page_}`).toBeGreaterThanOrEqual(3);
      await page.close();
    }
    const studio = await context.newPage();
    await studio.goto(appUrl(`/studio/datasets/${demo.datasetId}`));
    const input = studio.locator('input.pw-input').first();
    const before = await css(studio, 'input.pw-input');
    expect(contrastRatio(solid(before.border, '#ffffff'), '#ffffff'), before.border).toBeGreaterThanOrEqual(3);
    await input.focus();
    const focusedCss = await css(studio, 'input.pw-input');
    // The ring is the shadow layer with a spread (Tailwind also lays empty ones and a 0 px offset).
    const layers = focusedCss.shadow.split(/,(?![^(]*\))/).map((l) => l.trim());
    const ring = layers.map((l) => /^(rgba?\([^)]*\)) .* (\d+(?:\.\d+)?)px$/.exec(l)).find((m) => m && Number(m[2]) > 0)?.[1] ?? '';
    expect(contrastRatio(solid(ring, '#ffffff'), '#ffffff'), focusedCss.shadow).toBeGreaterThanOrEqual(3);
    await context.close();
  });
});

describe('the membership chart for screen readers', () => {
  it('reads the probabilities as a list; the drawn chart is hidden from assistive technology', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await openCalculator(context, lightToken);
    await answer(page, ['31', '250', '640']);
    const chart = page.getByTestId('membership-chart');
    expect(await chart.getAttribute('aria-hidden')).toBe('true');
    const list = page.getByRole('list', { name: 'Membership probability per group' });
    const items = await list.getByRole('listitem').allTextContents();
    expect(items).toHaveLength(3);
    for (const item of items) expect(item).toMatch(/^(Easy social|Steady club|Hill lovers)(over 99%|under 1%|\d{1,2}%)$/);
    // What a screen reader gets from the answer: the headline and the list, no SVG graphics.
    const tree = await page.locator('section[aria-label="Result"]').ariaSnapshot();
    expect(tree).toContain('list "Membership probability per group"');
    const listTree = await list.ariaSnapshot();
    expect(listTree.match(/- listitem/g)).toHaveLength(3);
    for (const item of items) expect(listTree).toContain(item.replace(/(over 99%|under 1%|\d{1,2}%)$/, ''));
    expect(tree).not.toMatch(/graphics|img/);
    await context.close();
  });
});

describe('reduced motion', () => {
  const transition = (page: Page, selector: string) => page.locator(selector).first().evaluate((el) => getComputedStyle(el).transitionDuration);

  it('the calculator and the studio drop transitions when the visitor asks for less motion', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    await signInContext(context, demo.ownerId, demo.workspaceId);
    const page = await openCalculator(context, lightToken);
    const studio = await context.newPage();
    await studio.goto(appUrl('/studio'));

    // Without the preference, the button fades and the studio cards move.
    expect(await transition(page, 'button[type="submit"]')).not.toBe('0s');
    expect(await transition(studio, 'a.pw-card')).not.toBe('0s');

    await page.emulateMedia({ reducedMotion: 'reduce' });
    await studio.emulateMedia({ reducedMotion: 'reduce' });
    expect(await transition(page, 'button[type="submit"]')).toBe('0s');
    expect(await transition(studio, 'a.pw-card')).toBe('0s');
    expect(await transition(studio, 'nav a')).toBe('0s');
    // The stale-answer fade is a transition too.
    await answer(page, ['31', '250', '640']);
    await page.getByLabel(FIELDS[0]).fill('32');
    await page.getByTestId('stale-notice').waitFor();
    expect(await transition(page, '[data-testid="answer"] [class*="grayscale"]')).toBe('0s');
    expect(await page.evaluate(() => document.getAnimations().filter((a) => a.playState === 'running').length)).toBe(0);
    await context.close();
  });
});
