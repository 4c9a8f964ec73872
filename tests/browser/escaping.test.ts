/**
 * Hostile text is shown as text everywhere it is rendered: a subscriber's (or an
 * attacker's) cluster labels, descriptions, field labels, help, units, caution and title
 * made of HTML and script reach the calculator page, its vega chart and the studio
 * as literal characters — no element is created from them and no script runs.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { modelWorkspace } from '../integration/embeds/fixtures';

const IMG = '<img src=x onerror="window.__pwned=1">';
const SCRIPT = '</script><script>window.__pwned=2</script>';
const ATTR = '"><svg onload="window.__pwned=3">';
const TEXTS = { title: `Quiz ${IMG}`, label0: `A ${IMG}`, label1: `B ${ATTR}`, description: `Group ${SCRIPT}`, field: `Speed ${ATTR}`, help: `Help ${IMG}`, unit: '<b>km/h', caution: `Careful ${SCRIPT} ${IMG}` };

let browser: Browser;
let context: BrowserContext;
let token = '';
let embedId = 0;

beforeAll(async () => {
  browser = await launchBrowser();
  const ws = await modelWorkspace();
  const clusters = ws.model.clusters.map((c, i) => ({ ...c, label: i === 0 ? TEXTS.label0 : i === 1 ? TEXTS.label1 : c.label, description: i === 0 ? TEXTS.description : c.description }));
  const fields = ws.model.fields.map((f, i) => (i === 0 ? { ...f, label: TEXTS.field, help: TEXTS.help, unit: TEXTS.unit } : f));
  await ws.model.update({ clusters, fields, caution: TEXTS.caution });
  const { publishNew } = await import('@/lib/embeds/service');
  const { embed } = await publishNew({ user: ws.owner, workspace: ws.workspace }, { mixtureModelId: ws.model.id, title: TEXTS.title });
  token = embed.token;
  embedId = embed.id;
  context = await browser.newContext({ viewport: { width: 1100, height: 1000 } });
  await signInContext(context, ws.owner.id, ws.workspace.id);
});

afterAll(async () => {
  await browser?.close();
});

/** Nothing hostile became markup or ran. */
async function expectInert(page: Page, where: string) {
  expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned), `${where}: a script ran`).toBeUndefined();
  expect(await page.locator('img[src="x"], svg[onload], b:text("km/h")').count(), `${where}: markup was created from text`).toBe(0);
}

describe('hostile text', () => {
  it('is sent escaped in the calculator page\'s HTML', async () => {
    const html = await (await fetch(appUrl(`/embed/${token}`))).text();
    expect(html).not.toContain('<img src=x');
    expect(html).not.toContain('<script>window.__pwned');
    expect(html).not.toContain('<svg onload');
    // It is there, as text.
    expect(html).toContain('&lt;img src=x onerror=');
  });

  it('shows as literal text on the calculator and inside its chart', async () => {
    const page = await context.newPage();
    const dialogs: string[] = [];
    page.on('dialog', (d) => {
      dialogs.push(d.message());
      void d.dismiss();
    });
    await page.goto(appUrl(`/embed/${token}`));
    await page.waitForSelector('[data-interactive="true"]');
    await expectInert(page, 'calculator');
    await expect(page.getByText(TEXTS.caution, { exact: false }).count()).resolves.toBeGreaterThan(0);
    await page.getByLabel(`${TEXTS.field} (${TEXTS.unit})`).fill('24');
    await page.getByLabel('Weekly distance (km)').fill('120');
    await page.getByLabel('Climbing per ride (m)').fill('400');
    await page.getByRole('button', { name: 'Show my groups' }).click();
    await page.waitForSelector('[data-chart-ready="true"] svg');
    // The axis shortens long labels with an ellipsis; what it shows is the literal text.
    const chartText = await page.locator('[data-chart-ready="true"] svg').textContent();
    expect(chartText).toContain('A <img src=x');
    expect(chartText).toContain('B "><svg onload=');
    await expectInert(page, 'calculator with chart');
    expect(dialogs).toEqual([]);
    await screenshot(page, 'escaping-calculator');
    await page.close();
  });

  it('shows as literal text in the studio', async () => {
    const page = await context.newPage();
    await page.goto(appUrl(`/studio/calculators/${embedId}`));
    await page.waitForSelector('h1');
    expect(await page.locator('h1').textContent()).toContain(TEXTS.title);
    // The snippet boxes show the title attribute-escaped, as a person would paste it.
    expect(await page.locator('body').textContent()).toContain('data-partwise-title="Quiz &lt;img src=x onerror=&quot;window.__pwned=1&quot;>"');
    await expectInert(page, 'studio calculator page');
    await page.close();
  });
});
