import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Frame, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot } from '../helpers/browser';
import { modelWorkspace } from '../integration/embeds/fixtures';
import { formatProbability as formatPercent } from '@/lib/format';
import { READY_TIMEOUT_MS } from '@/embed/protocol';

/**
 * What a first-time visitor meets: answers that go stale the moment a value changes,
 * no second request for the same values, the unusual-values message first, one percent
 * style, the calculator's own notices (unknown address, a site that is not allowed),
 * the favicon and the app's own not-found page, and a landing example that is the demo
 * calculator's real answer.
 */
let browser: Browser;
let token = '';
let retiredToken = '';
let replacedToken = '';
let defaultCautionToken = '';
let demoToken = '';
let allowedOrigin = '';
let strangerOrigin = '';
const servers: http.Server[] = [];

const PERCENT = /^(over 99%|under 1%|\d{1,2}%)$/;

function serve(html: (origin: string) => string): Promise<string> {
  return new Promise((resolve) => {
    const server = http.createServer((req, res) => {
      if (req.url !== '/') return void res.writeHead(404).end();
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' }).end(html(`http://localhost:${(server.address() as AddressInfo).port}`));
    });
    servers.push(server);
    // Another port on "localhost": another origin than the app's.
    server.listen(0, '127.0.0.1', () => resolve(`http://localhost:${(server.address() as AddressInfo).port}`));
  });
}

/** A host page with one loader placeholder per token. */
const hostPage = (tokens: () => string[]) => () =>
  `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Club site</title></head>
<body style="margin:0;padding:12px;font-family:Georgia,serif;background:#f4f1ea;color:#222"><h1>Riverside club</h1>
${tokens().map((t, i) => `<section id="slot${i}" data-partwise-calculator="${t}" data-partwise-title="Calculator ${i}"></section>`).join('\n<hr>\n')}
<p id="after">After the calculators.</p>
<script src="${appUrl('/embed.js')}" async></script></body></html>`;

beforeAll(async () => {
  browser = await launchBrowser();
  allowedOrigin = await serve(hostPage(() => [token, retiredToken, replacedToken]));
  strangerOrigin = await serve(hostPage(() => [token]));

  const { publishNew, retireEmbed, rotateToken } = await import('@/lib/embeds/service');
  const { DEFAULT_CAUTION } = await import('@/lib/fitting/models');
  const { Embed, MixtureModel, Workspace } = await import('@/models');
  const { createModel } = await import('../integration/embeds/fixtures');
  const ws = await modelWorkspace();
  const acting = { user: ws.owner, workspace: ws.workspace };
  const publish = async (mixtureModelId = ws.model.id) => (await publishNew(acting, { mixtureModelId, title: 'Which ride group suits you?', allowedOrigins: [allowedOrigin] })).embed;
  token = (await publish()).token;
  // Changed before the app has read them, so its caches hold nothing stale.
  const retired = await publish();
  await retireEmbed(acting, retired.id);
  retiredToken = retired.token;
  const replaced = await publish();
  replacedToken = replaced.token;
  await rotateToken(acting, replaced.id);

  const untouched = await createModel(ws.workspace.id, ws.owner.id, 3, 'Untouched caution');
  await MixtureModel.update({ caution: DEFAULT_CAUTION }, { where: { id: untouched.id } });
  defaultCautionToken = (await publish(untouched.id)).token;

  const demo = await Workspace.findOne({ where: { slug: 'riverside-cycling' } });
  const demoEmbed = demo ? await Embed.findOne({ where: { workspaceId: demo.id }, order: [['id', 'ASC']] }) : null;
  if (!demoEmbed) throw new Error('the test stack has no seeded demo calculator');
  demoToken = demoEmbed.token;
});

afterAll(async () => {
  await browser?.close();
  for (const s of servers) s.close();
});

async function openCalculator(page: Page, t = token): Promise<Frame> {
  const res = await page.goto(appUrl(`/embed/${t}`));
  expect(res?.status()).toBe(200);
  await page.waitForSelector('[data-interactive="true"]');
  return page.mainFrame();
}

async function fill(frame: Frame, speed: string, distance: string, climb: string) {
  await frame.getByLabel('Average speed (km/h)').fill(speed);
  await frame.getByLabel('Weekly distance (km)').fill(distance);
  await frame.getByLabel('Climbing per ride (m)').fill(climb);
}

function countScoring(page: Page): { count: number } {
  const seen = { count: 0 };
  page.on('request', (r) => {
    if (r.url().includes('/api/score/')) seen.count++;
  });
  return seen;
}

describe('calculator answers', () => {
  it('marks the answer stale the moment a value changes, and fresh again when the answered values are back', async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 1000 } });
    const frame = await openCalculator(page);
    const scoring = countScoring(page);
    await fill(frame, '31', '250', '640');
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await frame.waitForSelector('[data-chart-ready="true"] svg');
    const answer = frame.locator('[data-testid="answer"]');
    await expect(answer.getAttribute('data-stale')).resolves.toBeNull();
    await expect(frame.locator('[data-testid="stale-notice"]').count()).resolves.toBe(0);

    // Emptied: stale at once, before any blur or submit.
    await frame.getByLabel('Average speed (km/h)').fill('');
    await expect(answer.getAttribute('data-stale')).resolves.toBe('true');
    await expect(frame.locator('[data-testid="stale-notice"]').textContent()).resolves.toMatch(/You changed your values\. The answer below is for the earlier ones/);

    // Not a number, then out of range: still stale, with the field's own error.
    await frame.getByLabel('Average speed (km/h)').fill('fast');
    await frame.getByLabel('Weekly distance (km)').focus();
    await frame.getByText('Average speed must be a number.').waitFor();
    await expect(answer.getAttribute('data-stale')).resolves.toBe('true');
    await frame.getByLabel('Average speed (km/h)').fill('80');
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await frame.getByText('Average speed must be between 10 and 45 km/h.').waitFor();
    await expect(answer.getAttribute('data-stale')).resolves.toBe('true');
    await screenshot(page, 'visitor-stale-answer');

    // A valid but different value is stale too; the answered value (written with a comma) is not.
    await frame.getByLabel('Average speed (km/h)').fill('32');
    await expect(answer.getAttribute('data-stale')).resolves.toBe('true');
    await frame.getByLabel('Average speed (km/h)').fill('31,0');
    await expect(answer.getAttribute('data-stale')).resolves.toBeNull();
    await expect(frame.locator('[data-testid="stale-notice"]').count()).resolves.toBe(0);
    expect(scoring.count).toBe(1);
    await page.close();
  });

  it('sends one request per new set of values: none for the values already answered, one however often the form is submitted meanwhile', async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 1000 } });
    const frame = await openCalculator(page);
    const scoring = countScoring(page);
    // A slow network, so there is time to try submitting again while the answer is on its way.
    let release: () => void = () => {};
    const held = new Promise<void>((r) => (release = r));
    await page.route('**/api/score/**', async (route) => {
      await held;
      await route.continue();
    });
    await fill(frame, '24', '120', '400');
    const button = frame.getByRole('button', { name: /Show my groups|Working it out/ });
    await button.click();
    await frame.getByRole('button', { name: 'Working it out…' }).waitFor();
    await expect(button.isDisabled()).resolves.toBe(true);
    // Enter in a field, and three submits in one go (before React could re-render).
    await frame.getByLabel('Climbing per ride (m)').press('Enter');
    await frame.evaluate(() => {
      const form = document.querySelector('form')!;
      form.requestSubmit();
      form.requestSubmit();
      form.requestSubmit();
    });
    release();
    await frame.waitForSelector('[data-chart-ready="true"] svg');
    expect(scoring.count).toBe(1);
    await page.unroute('**/api/score/**');

    // The same values again: nothing is sent, and the visitor is told why.
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await frame.getByText('The answer below is already for these values. Change a value to see a new one.').waitFor();
    await frame.getByLabel('Weekly distance (km)').fill('120.0');
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await page.waitForTimeout(300);
    expect(scoring.count).toBe(1);

    // A changed value is a new question: one more request.
    await frame.getByLabel('Weekly distance (km)').fill('140');
    await expect(frame.getByText('The answer below is already for these values.', { exact: false }).count()).resolves.toBe(0);
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await page.waitForFunction(() => !document.querySelector('[data-testid="answer"][data-stale]') && !!document.querySelector('[data-chart-ready="true"]'));
    await page.waitForTimeout(200);
    expect(scoring.count).toBe(2);
    await page.close();
  });

  it('leads with the unusual-values message when the values resemble no group', async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 1000 } });
    const frame = await openCalculator(page);
    await fill(frame, '44', '5', '2900');
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await frame.waitForSelector('[data-chart-ready="true"] svg');
    const answer = frame.locator('[data-testid="answer"]');
    const firstHeading = answer.locator('h2').first();
    await expect(firstHeading.textContent()).resolves.toBe('These values are unusual for this calculator');
    await expect(answer.getByText(/^Most like:/).count()).resolves.toBe(0);
    await expect(answer.locator('[data-testid="unusual-notice"]').textContent()).resolves.toMatch(/unlike the data it was built from, so none of the groups describes them well\. The nearest is /);
    await screenshot(page, 'visitor-unusual-answer');
    await page.close();
  });

  it('writes every percentage in one style: headline, bar labels and the list', async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 1000 } });
    const frame = await openCalculator(page);
    await fill(frame, '24', '120', '400');
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await frame.waitForSelector('[data-chart-ready="true"] svg');
    const headline = (await frame.locator('[data-testid="answer"] h2').textContent()) ?? '';
    expect(headline).toMatch(/^Most like: .+ \((over 99%|under 1%|\d{1,2}%)\)$/);
    const list = (await frame.locator('ul[aria-label="Membership probability per group"] li span.font-bold').allTextContents()).map((t) => t.trim());
    expect(list.length).toBe(3);
    for (const t of list) expect(t).toMatch(PERCENT);
    // The chart's value labels are the same strings as the list (its axis ticks are plain 0%, 50%…).
    const chartTexts = await frame.locator('[data-testid="membership-chart"] svg text').allTextContents();
    for (const t of list) expect(chartTexts).toContain(t);
    expect(chartTexts.join(' ')).not.toMatch(/\d %/);
    await page.close();
  });
});

describe('cautions', () => {
  it("shows the demo club's own caution, which says something the general caution does not", async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 1000 } });
    await openCalculator(page, demoToken);
    const texts = (await page.locator('footer p').allTextContents()).map((t) => t.trim());
    const general = texts.find((t) => /not a diagnosis, a rating or a decision about you/.test(t));
    const publisher = texts[0];
    expect(general).toBeTruthy();
    expect(publisher).not.toBe(general);
    expect(publisher).toMatch(/Riverside club ride logs/);
    expect(publisher).not.toMatch(/diagnosis|how similar/i);
    await screenshot(page, 'visitor-demo-cautions');
    await page.close();
  });

  it("does not repeat the general caution as the publisher's when the model kept the default text", async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 1000 } });
    await openCalculator(page, defaultCautionToken);
    const footer = (await page.locator('footer').textContent()) ?? '';
    expect(footer).toMatch(/not a diagnosis, a rating or a decision about you/);
    expect(footer.match(/not a diagnosis/g)).toHaveLength(1);
    await page.close();
  });
});

describe('addresses that do not lead to a calculator', () => {
  it("shows the calculator's own neutral notice for an unknown or replaced address, without the app's chrome", async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 800 } });
    for (const t of ['NoSuchCalculatorToken_0000', replacedToken]) {
      const res = await page.goto(appUrl(`/embed/${t}`));
      expect(res?.status()).toBe(404);
      await expect(page.getByRole('heading', { name: 'There is no calculator at this address' }).count()).resolves.toBe(1);
      await expect(page.getByText('This page could not be found').count()).resolves.toBe(0);
      await expect(page.getByRole('link', { name: 'Partwise home' }).count()).resolves.toBe(0);
    }
    await screenshot(page, 'visitor-calculator-missing');
    await page.close();
  });

  it('has a favicon and a branded not-found page, and no page requests anything that is not there', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const missing: string[] = [];
    page.on('response', (r) => {
      if (r.status() === 404 && r.request().resourceType() !== 'document') missing.push(r.url());
    });
    for (const path of ['/', `/embed/${token}`, '/signin']) {
      await page.goto(appUrl(path), { waitUntil: 'networkidle' });
      const icon = await page.locator('link[rel="icon"]').getAttribute('href');
      expect(icon, path).toMatch(/^\/icon\.svg/);
    }
    const icon = await fetch(appUrl('/icon.svg'));
    expect(icon.status).toBe(200);
    expect(icon.headers.get('content-type')).toMatch(/image\/svg\+xml/);

    const res = await page.goto(appUrl('/no/such/page'), { waitUntil: 'networkidle' });
    expect(res?.status()).toBe(404);
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe('Nothing lives at this address');
    await expect(page.getByRole('link', { name: 'Partwise home' }).count()).resolves.toBe(1);
    await expect(page.getByRole('link', { name: 'Go to the home page' }).count()).resolves.toBe(1);
    await expect(page.getByText('This page could not be found').count()).resolves.toBe(0);
    await screenshot(page, 'app-not-found');
    expect(missing).toEqual([]);
    await page.close();
  });
});

describe('the loader on host pages', () => {
  it('replaces a frame the browser refused (a site not on the list) with a short neutral notice that names no allowed site', async () => {
    const page = await browser.newPage({ viewport: { width: 900, height: 700 } });
    await page.goto(`${strangerOrigin}/`);
    const notice = page.locator('#slot0 [data-partwise-notice]');
    await notice.waitFor({ timeout: READY_TIMEOUT_MS + 10_000 });
    const text = (await notice.textContent()) ?? '';
    expect(text).toMatch(/^This calculator cannot be shown on this page\./);
    expect(text).not.toContain(allowedOrigin);
    expect(text).not.toMatch(/localhost|https?:/);
    await expect(page.locator('#slot0 iframe').isVisible()).resolves.toBe(false);
    await expect(page.locator('#after').isVisible()).resolves.toBe(true);
    await screenshot(page, 'visitor-host-not-allowed');
    await page.close();
  });

  it('keeps the calculator (and a switched-off one saying so) on an allowed site; an address that was replaced gets the notice', async () => {
    const page = await browser.newPage({ viewport: { width: 900, height: 2400 } });
    await page.goto(`${allowedOrigin}/`);
    const live = await (await page.waitForSelector('#slot0 iframe')).contentFrame();
    await live!.waitForSelector('[data-interactive="true"]');
    await page.locator('#slot2 [data-partwise-notice]').waitFor({ timeout: READY_TIMEOUT_MS + 10_000 });
    await page.waitForTimeout(1000);
    await expect(page.locator('#slot0 [data-partwise-notice]').count()).resolves.toBe(0);
    await expect(page.locator('#slot0 iframe').isVisible()).resolves.toBe(true);
    await expect(page.locator('#slot1 [data-partwise-notice]').count()).resolves.toBe(0);
    const retired = await page.locator('#slot1 iframe').contentFrame();
    await retired.getByRole('heading', { name: 'This calculator is not available' }).waitFor();
    // Sized to the notice, not left at the 560 px placeholder height.
    await page.waitForFunction(() => document.querySelector<HTMLIFrameElement>('#slot1 iframe')!.style.height !== '560px');
    await screenshot(page, 'visitor-host-allowed');
    await page.close();
  });
});

describe('landing page example', () => {
  it("shows the demo calculator's real answer for the values it shows, and a mixed one", async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await page.goto(appUrl('/'));
    const example = page.locator('[data-testid="landing-example"]');
    const values: Record<string, number> = {};
    for (const chip of await example.locator('[data-feature]').all()) {
      values[(await chip.getAttribute('data-feature'))!] = Number(await chip.getAttribute('data-value'));
    }
    expect(Object.keys(values).sort()).toEqual(['avg_speed_kmh', 'climb_per_ride_m', 'weekly_distance_km']);
    const shown = await example.locator('li[data-label]').evaluateAll((items) =>
      items.map((li) => ({ label: li.getAttribute('data-label')!, percent: li.querySelector('[data-testid="landing-percent"]')!.textContent!.trim() })),
    );

    const res = await fetch(appUrl(`/api/score/${demoToken}`), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values }) });
    expect(res.status).toBe(200);
    const answer = (await res.json()) as { probabilities: { label: string; probability: number }[]; best: { label: string; probability: number }; unusual: boolean };
    expect(shown).toEqual(answer.probabilities.map((p) => ({ label: p.label, percent: formatPercent(p.probability) })));
    await expect(example.locator('[data-testid="landing-best"]').textContent()).resolves.toBe(`Most like: ${answer.best.label} (${formatPercent(answer.best.probability)})`);
    // Instructive: ordinary values, the top group well short of certain, a second group clearly there.
    const sorted = answer.probabilities.map((p) => p.probability).sort((a, b) => b - a);
    expect(answer.unusual).toBe(false);
    expect(sorted[0]).toBeLessThan(0.9);
    expect(sorted[1]).toBeGreaterThan(0.1);
    await screenshot(page, 'landing-example');
    await page.close();
  });
});
