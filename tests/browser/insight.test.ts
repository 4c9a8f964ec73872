import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Frame, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { DEMO_USERS, DEMO_WORKSPACE } from '@/lib/demo/accounts';
import type { InsightReport } from '@/lib/insight/types';

/**
 * The subscriber's view of what visitors got: the seeded demo calculator is answered from
 * a host page on another origin, then its owner opens the insight tab (the new answers are
 * counted, the charts are drawn) and the comparison of its two versions.
 */
let browser: Browser;
let host: http.Server;
let hostOrigin = '';
let context: BrowserContext;
const demo = { token: '', embedId: 0, ownerId: 0, workspaceId: 0, origins: [] as string[] };

const hostPage = () => `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Club site</title></head>
<body style="margin:0;font-family:serif"><h1 style="margin:8px">Riverside club</h1>
<div id="slot" data-partwise-calculator="${demo.token}" data-partwise-title="Which ride group suits you?"></div>
<script src="${appUrl('/embed.js')}" async></script></body></html>`;

beforeAll(async () => {
  browser = await launchBrowser();
  host = await new Promise<http.Server>((resolve) => {
    const server = http.createServer((req, res) => {
      if (req.url !== '/') return void res.writeHead(404).end();
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' }).end(hostPage());
    });
    server.listen(0, '127.0.0.1', () => resolve(server));
  });
  hostOrigin = `http://localhost:${(host.address() as AddressInfo).port}`;
  const { Embed, User, Workspace } = await import('@/models');
  const workspace = (await Workspace.findOne({ where: { slug: DEMO_WORKSPACE.slug } }))!;
  const embed = (await Embed.findOne({ where: { workspaceId: workspace.id }, order: [['id', 'ASC']] }))!;
  Object.assign(demo, { token: embed.token, embedId: embed.id, workspaceId: workspace.id, origins: embed.allowedOrigins, ownerId: (await User.findOne({ where: { email: DEMO_USERS.owner.email } }))!.id });
  context = await browser.newContext({ viewport: { width: 1280, height: 1000 } });
  await signInContext(context, demo.ownerId, demo.workspaceId);
  // Through the app, so its caches learn of the new website at once.
  const res = await context.request.patch(appUrl(`/api/embeds/${demo.embedId}`), { data: { allowedOrigins: [...demo.origins, hostOrigin] } });
  expect(res.status()).toBe(200);
});

afterAll(async () => {
  await context?.request.patch(appUrl(`/api/embeds/${demo.embedId}`), { data: { allowedOrigins: demo.origins } }).catch(() => undefined);
  await browser?.close();
  host?.close();
});

async function report(days = 7): Promise<InsightReport> {
  const res = await context.request.get(appUrl(`/api/embeds/${demo.embedId}/insight?days=${days}`));
  expect(res.status()).toBe(200);
  return (await res.json()) as InsightReport;
}

const today = () => new Date().toISOString().slice(0, 10);
const answersOn = (r: InsightReport, day: string) => r.days.filter((d) => d.day === day).reduce((s, d) => s + d.answers, 0);
const binned = (r: InsightReport, feature: string) => r.fields.find((f) => f.feature === feature)!.visitors.reduce((s, c) => s + c, 0);

async function calculatorFrame(page: Page): Promise<Frame> {
  const handle = await page.waitForSelector('iframe[title="Which ride group suits you?"]');
  const frame = (await handle.contentFrame())!;
  await frame.waitForSelector('[data-interactive="true"]');
  return frame;
}

describe('answer insight and version comparison', () => {
  it('counts answers from a host page and shows them on the insight tab', async () => {
    const before = await report();
    expect(before.demo).toBe(true);
    expect(before.enabled).toBe(true);
    const speedBefore = binned(before, 'avg_speed_kmh');

    const visitor = await browser.newPage({ viewport: { width: 900, height: 900 } });
    await visitor.goto(`${hostOrigin}/`);
    const frame = await calculatorFrame(visitor);
    const rows = [
      ['24', '130', '420'],
      ['33', '260', '900'],
    ];
    for (const [speed, distance, climb] of rows) {
      await frame.getByLabel('Average speed (km/h)').fill(speed);
      await frame.getByLabel('Weekly distance (km)').fill(distance);
      await frame.getByLabel('Climbing per ride (m)').fill(climb);
      await frame.getByRole('button', { name: 'Show my groups' }).click();
      await frame.waitForSelector('[data-chart-ready="true"] svg');
      await frame.waitForFunction(() => document.querySelector('[data-testid="answer"]') !== null);
    }
    await screenshot(visitor, 'insight-host-answered');
    await visitor.close();

    // Counters are flushed with the usage counters, every 250 ms.
    await expect.poll(async () => answersOn(await report(), today()) - answersOn(before, today()), { timeout: 10_000 }).toBe(rows.length);
    const after = await report();
    expect(binned(after, 'avg_speed_kmh') - speedBefore).toBe(rows.length);

    const page = await context.newPage();
    await page.goto(appUrl(`/studio/calculators/${demo.embedId}`));
    await page.getByRole('navigation', { name: 'Calculator pages' }).getByRole('link', { name: 'Insight' }).click();
    await page.waitForURL(/\/insight$/);
    await page.getByTestId('insight-demo-note').waitFor();
    for (const chart of ['insight-daily-chart', 'insight-groups-chart', 'insight-fields']) await page.getByTestId(chart).locator('svg').first().waitFor({ timeout: 30_000 });
    // The stacked chart draws one band per best group, in the groups' colours.
    const areaFills = await page.getByTestId('insight-groups-chart').locator('svg path[aria-roledescription="area mark"]').evaluateAll((els) => [...new Set(els.map((e) => e.getAttribute('fill')))]);
    const colours = after.versions.flatMap((v) => v.groups.map((g) => g.color.toLowerCase()));
    expect(areaFills.length).toBeGreaterThanOrEqual(2);
    for (const fill of areaFills) expect(colours).toContain(fill!.toLowerCase());
    await expect(page.getByTestId('insight-drift-explained').textContent()).resolves.toMatch(/Below 0\.1.*0\.1 to 0\.25.*Above 0\.25.*common practice/s);
    await expect(page.getByTestId('insight-drift-30').textContent()).resolves.toMatch(/Stable|Watch|Act/);
    await screenshot(page, 'insight-tab');

    // A shorter window refetches the figures.
    await page.getByLabel('Period').selectOption('7');
    await expect.poll(async () => (await page.getByTestId('insight-answers').textContent()) ?? '').toContain('of 7 days');
    await screenshot(page, 'insight-tab-7-days');
    await page.close();
  });

  it('opens the comparison of the demo’s two versions from the tabs', async () => {
    const page = await context.newPage();
    await page.goto(appUrl(`/studio/calculators/${demo.embedId}/insight`));
    await page.getByRole('navigation', { name: 'Calculator pages' }).getByRole('link', { name: 'Compare versions' }).click();
    await page.waitForURL(/\/compare/);
    await page.locator('svg').first().waitFor({ timeout: 30_000 });
    await screenshot(page, 'insight-compare-versions');
    await page.close();
  });
});
