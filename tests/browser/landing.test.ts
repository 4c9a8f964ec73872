import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { appUrl, launchBrowser, screenshot } from '../helpers/browser';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe('landing page', () => {
  it('says what Partwise does, shows the plans, and renders in the shipped fonts', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const failed: string[] = [];
    // Link prefetches that the browser abandons when the test moves on are not failures.
    page.on('requestfailed', (r) => {
      if (r.failure()?.errorText !== 'net::ERR_ABORTED') failed.push(`${r.url()} (${r.failure()?.errorText})`);
    });
    page.on('request', (r) => {
      if (!r.url().startsWith(appUrl('/'))) failed.push(`external: ${r.url()}`);
    });
    const response = await page.goto(appUrl('/'), { waitUntil: 'load' });
    expect(response?.status()).toBe(200);
    expect(response?.headers()['x-frame-options']).toBe('DENY');
    await expect(page.locator('h1').textContent()).resolves.toMatch(/groups in your measurements/);
    await expect(page.locator('#pricing article').count()).resolves.toBe(3);

    await page.evaluate(() => document.fonts.ready);
    const fonts = await page.evaluate(() => ({
      loaded: [...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family),
      h1: getComputedStyle(document.querySelector('h1')!).fontFamily,
    }));
    expect(fonts.loaded.length).toBeGreaterThanOrEqual(2);
    expect(fonts.h1).toMatch(/displayFont|Fraunces/i);
    expect(fonts.loaded.some((f) => /bodyFont|Atkinson/i.test(f))).toBe(true);
    expect(failed).toEqual([]);
    await screenshot(page, 'landing');
    await page.close();
  });
});
