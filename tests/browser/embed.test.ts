import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Frame, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { modelWorkspace } from '../integration/embeds/fixtures';

/**
 * The calculator as other websites see it: a host page on a second local origin
 * includes /embed.js; a page on an origin that is not allowed tries to frame it.
 */
let browser: Browser;
let host: http.Server;
let stranger: http.Server;
let hostOrigin = '';
let strangerOrigin = '';
let token = '';
let darkToken = '';
let studio: { userId: number; workspaceId: number; embedId: number };

function serve(html: () => string): Promise<http.Server> {
  return new Promise((resolve) => {
    const server = http.createServer((req, res) => {
      if (req.url !== '/') return void res.writeHead(404).end();
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' }).end(html());
    });
    server.listen(0, '127.0.0.1', () => resolve(server));
  });
}

const hostPage = () => `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>Club site</title></head>
<body style="margin:0;font-family:serif;background:#eee"><h1 style="margin:8px">Riverside club</h1>
<div id="slot" data-partwise-calculator="${token}" data-partwise-title="Which ride group suits you?"></div>
<p id="after">After the calculator.</p>
<script src="${appUrl('/embed.js')}" async></script></body></html>`;

const strangerPage = () => `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Copycat</title></head>
<body><h1>Copycat</h1><iframe id="direct" title="copied" src="${appUrl(`/embed/${token}`)}" style="width:400px;height:600px"></iframe>
<div data-partwise-calculator="${token}"></div><script src="${appUrl('/embed.js')}" async></script></body></html>`;

beforeAll(async () => {
  browser = await launchBrowser();
  host = await serve(hostPage);
  stranger = await serve(strangerPage);
  // Another origin = another port; "localhost" keeps it a different origin from the app's.
  hostOrigin = `http://localhost:${(host.address() as AddressInfo).port}`;
  strangerOrigin = `http://localhost:${(stranger.address() as AddressInfo).port}`;
  const { publishNew, updateSettings } = await import('@/lib/embeds/service');
  const ws = await modelWorkspace();
  const acting = { user: ws.owner, workspace: ws.workspace };
  token = (await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Which ride group suits you?', allowedOrigins: [hostOrigin] })).embed.token;
  const dark = (await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Which ride group suits you?', allowedOrigins: [hostOrigin] })).embed;
  await updateSettings(acting, dark.id, { theme: 'dark', accentColor: '#e0a526' });
  darkToken = dark.token;
  studio = { userId: ws.owner.id, workspaceId: ws.workspace.id, embedId: dark.id };
});

afterAll(async () => {
  await browser?.close();
  host?.close();
  stranger?.close();
});

async function calculatorFrame(page: Page): Promise<Frame> {
  const handle = await page.waitForSelector('iframe[title="Which ride group suits you?"]');
  const frame = await handle.contentFrame();
  if (!frame) throw new Error('no frame');
  await frame.waitForSelector('[data-interactive="true"]');
  return frame;
}

async function fill(frame: Frame, speed: string, distance: string, climb: string) {
  await frame.getByLabel('Average speed (km/h)').fill(speed);
  await frame.getByLabel('Weekly distance (km)').fill(distance);
  await frame.getByLabel('Climbing per ride (m)').fill(climb);
}

describe('embedded calculator', () => {
  it('appears on an allowed host through the loader, sizes itself, takes values and shows the chart', async () => {
    const page = await browser.newPage({ viewport: { width: 1024, height: 900 } });
    const external: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(appUrl('/')) && !r.url().startsWith(hostOrigin)) external.push(r.url());
    });
    await page.goto(`${hostOrigin}/`);
    const frame = await calculatorFrame(page);
    const iframe = page.locator('#slot iframe');
    await expect(iframe.getAttribute('src')).resolves.toBe(appUrl(`/embed/${token}?host=${encodeURIComponent(hostOrigin)}`));

    // Resized from the 560 px placeholder height to the form's own height.
    await page.waitForFunction(() => document.querySelector<HTMLIFrameElement>('#slot iframe')!.style.height !== '560px');
    const formHeight = await iframe.evaluate((el) => el.getBoundingClientRect().height);
    const inner = await frame.evaluate(() => Math.ceil(document.getElementById('partwise-calculator-root')!.getBoundingClientRect().height));
    expect(Math.abs(formHeight - inner)).toBeLessThanOrEqual(1);

    // Caution texts are visible before any answer.
    await frame.getByText('Try a group ride before you decide.').waitFor();
    await expect(frame.getByText(/not a diagnosis, a rating or a decision/).isVisible()).resolves.toBe(true);

    // Checked in the browser first: an out-of-range value is explained and nothing is sent.
    let scored = 0;
    page.on('request', (r) => {
      if (r.url().includes('/api/score/')) scored++;
    });
    await fill(frame, '80', '130', '420');
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await frame.getByText('Average speed must be between 10 and 45 km/h.').waitFor();
    await expect(frame.getByLabel('Average speed (km/h)').getAttribute('aria-invalid')).resolves.toBe('true');
    expect(scored).toBe(0);

    // Keyboard only: fix the value, press Enter.
    await frame.getByLabel('Average speed (km/h)').fill('24,5');
    await frame.getByLabel('Average speed (km/h)').press('Enter');
    await frame.waitForSelector('[data-chart-ready="true"] svg');
    expect(scored).toBe(1);
    await expect(frame.locator('[data-testid="answer"] h2').textContent()).resolves.toMatch(/^Most like: /);
    const bars = await frame.locator('[data-testid="membership-chart"] svg path[aria-roledescription="bar"], [data-testid="membership-chart"] svg .mark-rect path').count();
    expect(bars).toBeGreaterThanOrEqual(3);
    const items = await frame.locator('ul[aria-label="Membership probability per group"] li').allTextContents();
    expect(items).toHaveLength(3);

    // The iframe grew with the answer.
    await page.waitForFunction((h) => document.querySelector<HTMLIFrameElement>('#slot iframe')!.getBoundingClientRect().height > h + 50, formHeight);
    await expect(page.locator('#after').isVisible()).resolves.toBe(true);
    await screenshot(page, 'embed-host-desktop');

    // Unusual values get the plain notice.
    await fill(frame, '44', '5', '2900');
    await frame.getByRole('button', { name: 'Show my groups' }).click();
    await frame.waitForSelector('[data-testid="unusual-notice"]');

    // The report link opens a small form; a complete report is thanked for.
    await frame.getByRole('button', { name: 'Report this calculator' }).click();
    await frame.getByRole('button', { name: 'Send report' }).click();
    await frame.getByText('Choose a reason.').waitFor();
    await frame.getByLabel('Reason').selectOption('misleading');
    await frame.getByLabel('What is wrong?').fill('The groups are described in a misleading way.');
    await frame.getByRole('button', { name: 'Send report' }).click();
    await frame.getByText('Thank you. Partwise support will look at this calculator.').waitFor();
    expect(external).toEqual([]);
    await page.close();
  });

  it('cannot be framed by a site that is not on the allowed list', async () => {
    const page = await browser.newPage({ viewport: { width: 1024, height: 900 } });
    const refused: string[] = [];
    page.on('console', (m) => {
      if (/frame-ancestors|Refused to frame/i.test(m.text())) refused.push(m.text());
    });
    const cspSeen: string[] = [];
    page.on('response', (r) => {
      if (r.url().startsWith(appUrl(`/embed/${token}`))) cspSeen.push(r.headers()['content-security-policy'] ?? '');
    });
    await page.goto(`${strangerOrigin}/`, { waitUntil: 'load' });
    await page.waitForTimeout(1500);
    for (const frame of page.frames()) {
      if (frame === page.mainFrame()) continue;
      const forms = await frame.locator('form').count().catch(() => 0);
      expect(forms, `frame ${frame.url()} must not show the calculator`).toBe(0);
    }
    expect(cspSeen.length).toBeGreaterThan(0);
    for (const csp of cspSeen) {
      expect(csp).toContain(`frame-ancestors 'self' ${hostOrigin}`);
      expect(csp).not.toContain(strangerOrigin);
    }
    expect(refused.length).toBeGreaterThan(0);
    await page.close();
  });

  it('looks right at 320 px and on the desktop, in light and dark', async () => {
    for (const [name, t] of [['light', token], ['dark', darkToken]] as const) {
      for (const width of [320, 1280]) {
        const page = await browser.newPage({ viewport: { width, height: 800 } });
        const res = await page.goto(appUrl(`/embed/${t}`));
        expect(res?.status()).toBe(200);
        expect(res?.headers()['x-frame-options']).toBeUndefined();
        await page.waitForSelector('[data-interactive="true"]');
        await page.getByLabel('Average speed (km/h)').fill('31');
        await page.getByLabel('Weekly distance (km)').fill('250');
        await page.getByLabel('Climbing per ride (m)').fill('640');
        await page.getByRole('button', { name: 'Show my groups' }).click();
        await page.waitForSelector('[data-chart-ready="true"] svg');
        const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
        expect(overflow).toBeLessThanOrEqual(0);
        await screenshot(page, `embed-${name}-${width}`);
        await page.close();
      }
    }
  });

  it('shows the studio page with a live preview (framed by our own origin) and the snippets', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 1000 } });
    await signInContext(context, studio.userId, studio.workspaceId);
    const page = await context.newPage();
    const res = await page.goto(appUrl(`/studio/calculators/${studio.embedId}`));
    expect(res?.status()).toBe(200);
    const preview = await (await page.waitForSelector('iframe[title^="Preview of"]')).contentFrame();
    await preview!.waitForSelector('[data-interactive="true"]');
    const snippet = await page.getByLabel('With the loader (sizes itself)').inputValue();
    expect(snippet).toContain(`data-partwise-calculator="${darkToken}"`);
    expect(snippet).toContain(appUrl('/embed.js'));
    expect(await page.getByLabel('Plain iframe').inputValue()).toContain('title="Which ride group suits you?"');
    await screenshot(page, 'studio-calculator');
    await page.goto(appUrl('/studio/calculators'));
    await page.waitForSelector('text=Published');
    await screenshot(page, 'studio-calculators');
    await context.close();
  });

  it('shows a neutral page for an unknown token (404)', async () => {
    const page = await browser.newPage();
    const res = await page.goto(appUrl('/embed/NoSuchCalculatorToken_0000'));
    expect(res?.status()).toBe(404);
    await page.close();
  });
});
