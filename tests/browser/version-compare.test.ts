/**
 * Comparing versions in the studio, as the demo owner: the seeded demo calculator serves
 * v1 and has a second, not served v2 (lib/demo/second-version.ts). From the calculator's
 * version list, Serve v2 first asks (Compare first or Serve now); Compare opens the
 * comparison: matched groups with shifts in the fields' units, the group only v2 has,
 * the heat map of best groups and the changed share in words. Nothing is served here,
 * so the other tests keep the demo calculator as seeded.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot } from '../helpers/browser';
import { DEMO_USERS, DEMO_WORKSPACE } from '@/lib/demo/accounts';

let browser: Browser;
let page: Page;
let embedId = 0;
let servedId = 0;
let secondId = 0;

beforeAll(async () => {
  browser = await launchBrowser();
  const { Embed, ModelVersion, Workspace } = await import('@/models');
  const demo = await Workspace.findOne({ where: { slug: DEMO_WORKSPACE.slug } });
  const embed = demo ? await Embed.findOne({ where: { workspaceId: demo.id }, order: [['id', 'ASC']] }) : null;
  if (!embed) throw new Error('the test stack has no seeded demo calculator');
  embedId = embed.id;
  servedId = embed.activeVersionId!;
  const second = await ModelVersion.findOne({ where: { embedId: embed.id, number: 2 } });
  if (!second) throw new Error('the seeded demo calculator has no second version');
  secondId = second.id;

  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  page = await context.newPage();
  await page.goto(appUrl(`/signin?callbackUrl=${encodeURIComponent(`/studio/calculators/${embedId}`)}`));
  await page.getByLabel('E-mail').fill(DEMO_USERS.owner.email);
  await page.getByLabel('Password').fill(DEMO_USERS.owner.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(new RegExp(`/studio/calculators/${embedId}$`));
});

afterAll(async () => {
  await browser?.close();
});

async function heatMapDrawn(p: Page) {
  await p.waitForSelector('[data-testid="compare-heat-map"][data-chart-ready="true"] svg');
}

describe('comparing two versions of the demo calculator', () => {
  it('asks before serving a version, offering to compare first', async () => {
    const versions = page.locator('#versions');
    await versions.getByRole('button', { name: 'Serve v2' }).click();
    const ask = versions.getByRole('group', { name: 'Serve v2?' });
    await ask.waitFor();
    await expect(ask.getByRole('link', { name: 'Compare first' }).getAttribute('href')).resolves.toBe(`/studio/calculators/${embedId}/compare?from=${servedId}&to=${secondId}`);
    await expect(ask.getByRole('button', { name: 'Serve now' }).count()).resolves.toBe(1);
    await versions.scrollIntoViewIfNeeded();
    await screenshot(page, 'compare-serve-asks');
    await ask.getByRole('button', { name: 'Cancel' }).click();
    await ask.waitFor({ state: 'detached' });
  });

  it('Compare opens the matched groups, the group only v2 has, the heat map and the changed share', async () => {
    await page.locator('#versions').getByRole('link', { name: /^Compare v2/ }).click();
    await page.waitForURL(new RegExp(`/studio/calculators/${embedId}/compare\\?from=${servedId}&to=${secondId}$`));
    await expect(page.locator('h1').textContent()).resolves.toBe('Compare v1 (served) with v2');

    const pairs = page.getByTestId('compare-pairs');
    await expect(pairs.locator('tbody tr').count()).resolves.toBe(4);
    const header = await pairs.locator('thead').textContent();
    expect(header).toContain('Average speed');
    expect(header).toContain('km/h');
    for (const name of ['Easy social', 'Steady tourers', 'Hill chasers', 'Fast pack']) {
      // the same name on both sides of its row: the matching found the group again
      await expect(pairs.locator('tbody tr').filter({ hasText: name }).locator('td').nth(0).textContent()).resolves.toBe(name);
      await expect(pairs.locator('tbody tr').filter({ hasText: name }).first().locator('td').nth(1).textContent()).resolves.toBe(name);
    }
    const unmatched = await page.getByTestId('compare-unmatched').textContent();
    expect(unmatched).toMatch(/Only in v2, with no partner in v1:/);

    await heatMapDrawn(page);
    const cells = await page.locator('[data-testid="compare-heat-map"] svg path[aria-roledescription="rect mark"], [data-testid="compare-heat-map"] svg g.mark-rect path').count();
    expect(cells).toBeGreaterThanOrEqual(20);
    await expect(page.getByTestId('compare-changed').textContent()).resolves.toMatch(/^\d+(\.\d)?% of the rows \(\d+ of 410\) would change group/);
    await expect(page.getByTestId('compare-note').textContent()).resolves.toMatch(/describes the two models, not the people/);
    await screenshot(page, 'compare-versions');
  });

  it('offers to serve v2 with a confirm step (not taken here)', async () => {
    await page.getByTestId('compare-serve').getByRole('button', { name: 'Serve v2' }).click();
    const confirm = page.getByRole('group', { name: 'Confirm serving v2' });
    await confirm.waitFor();
    await expect(confirm.textContent()).resolves.toContain('You can serve v1 again at any time');
    await screenshot(page, 'compare-serve-confirm');
    await confirm.getByRole('button', { name: 'Not now' }).click();
    await confirm.waitFor({ state: 'detached' });
  });

  it('reads at a phone width too', async () => {
    const narrow = await page.context().newPage();
    await narrow.setViewportSize({ width: 390, height: 844 });
    await narrow.goto(appUrl(`/studio/calculators/${embedId}/compare`));
    await heatMapDrawn(narrow);
    // the defaults are the served version against the newest other one
    await expect(narrow.locator('h1').textContent()).resolves.toBe('Compare v1 (served) with v2');
    await screenshot(narrow, 'compare-versions-narrow');
    await narrow.close();
  });
});
