import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { User } from '@/models';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { describeViolations, isSerious, runAxe } from '../helpers/axe';

/**
 * The seeded owner makes a key in the studio, sees it once, uses it from outside the
 * browser, then revokes it; a member is sent back; the public reference page reads the
 * generated document.
 */
let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const owner = await User.findOne({ where: { email: DEMO_USERS.owner.email } });
  expect(owner, 'the demo owner is seeded').not.toBeNull();
  await signInContext(context, owner!.id);
  page = await context.newPage();
});

afterAll(async () => {
  await browser?.close();
});

const usage = (key: string) => fetch(appUrl('/api/v1/usage'), { headers: { authorization: `Bearer ${key}` } });

describe('API keys in the studio', () => {
  it('the owner makes a key, sees it once, uses it, and revokes it', async () => {
    await page.goto(appUrl('/studio/api-keys'));
    await page.getByRole('heading', { name: 'API keys', level: 1 }).waitFor();
    // react-hook-form fills the fields when the form hydrates; a click before that would submit natively.
    await expect.poll(() => page.getByLabel('Expires after (days)').inputValue(), { timeout: 30_000 }).toBe('365');

    // Bad input is refused on the field, nothing made.
    await page.getByLabel('Name', { exact: true }).fill('');
    await page.getByRole('button', { name: 'Make key' }).click();
    await page.getByText('Give the key a name').waitFor();

    await page.getByLabel('Name', { exact: true }).fill('Nightly re-fit (browser)');
    await page.getByRole('checkbox', { name: /^fit/ }).check();
    await page.getByLabel('Expires after (days)').fill('30');
    await page.getByRole('button', { name: 'Make key' }).click();
    const shown = page.getByTestId('new-api-key');
    await shown.waitFor();
    const key = (await shown.textContent())!.trim();
    expect(key).toMatch(/^pwk_[0-9A-Za-z]{10}_[0-9A-Za-z]{40}$/);
    expect(await page.getByText('shown once').count()).toBeGreaterThan(0);
    await page.getByRole('cell', { name: 'Nightly re-fit (browser)', exact: true }).waitFor();
    await screenshot(page, 'api-keys-1-new-key');

    expect((await usage(key)).status).toBe(200);
    await page.reload();
    await page.getByRole('cell', { name: 'Nightly re-fit (browser)', exact: true }).waitFor();
    expect(await page.getByTestId('new-api-key').count(), 'the key is not shown again').toBe(0);
    expect(await page.content()).not.toContain(key.slice(15));

    page.once('dialog', (d) => void d.accept());
    await page.getByRole('button', { name: 'Revoke Nightly re-fit (browser)' }).click();
    await page.getByText('was revoked').waitFor();
    await screenshot(page, 'api-keys-2-revoked');
    const axe = await runAxe(page, 'studio-api-keys');
    expect(axe.violations.filter(isSerious), describeViolations(axe, isSerious)).toEqual([]);
    expect((await usage(key)).status).toBe(401);
  });

  it("the owner's header still fits one row at 1024 px with the API keys link", async () => {
    const context = await browser.newContext({ viewport: { width: 1024, height: 800 } });
    const owner = await User.findOne({ where: { email: DEMO_USERS.owner.email } });
    await signInContext(context, owner!.id);
    const p = await context.newPage();
    await p.goto(appUrl('/studio/api-keys'));
    const nav = p.getByRole('navigation', { name: 'Studio' });
    await nav.getByRole('link', { name: 'API keys' }).waitFor();
    expect(await nav.getByRole('link', { name: 'API keys' }).getAttribute('aria-current')).toBe('page');
    const width = await p.evaluate(() => document.documentElement.scrollWidth);
    expect(width).toBeLessThanOrEqual(1024);
    // One row: the user menu sits level with the links (initials only at this width).
    const linkBox = (await nav.getByRole('link', { name: 'API keys' }).boundingBox())!;
    const menuBox = (await p.locator('header summary').first().boundingBox())!;
    expect(Math.abs(menuBox.y + menuBox.height / 2 - (linkBox.y + linkBox.height / 2))).toBeLessThan(12);
    await p.screenshot({ path: 'test-results/screenshots/api-keys-header-1024.png' });
    await context.close();
  });

  it('sends a member back to the studio with the owners-only notice', async () => {
    const member = await User.findOne({ where: { email: DEMO_USERS.member.email } });
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    await signInContext(context, member!.id);
    const p = await context.newPage();
    await p.goto(appUrl('/studio/api-keys'));
    await p.waitForURL(/\/studio\?notice=owners-only/);
    expect(await p.getByRole('link', { name: 'API keys' }).count()).toBe(0);
    await context.close();
  });

  it('the reference page lists every operation of the document with its scope', async () => {
    await page.goto(appUrl('/developers'));
    await page.getByRole('heading', { name: 'Authenticate' }).waitFor();
    const doc = await (await fetch(appUrl('/api/openapi.json'))).json();
    const summaries = Object.values(doc.paths as Record<string, Record<string, { summary: string }>>).flatMap((item) => Object.values(item).map((op) => op.summary));
    for (const summary of summaries) expect(await page.getByRole('heading', { name: summary, exact: true }).count(), summary).toBe(1);
    expect(await page.getByText('scope: publish').count()).toBe(3);
    await screenshot(page, 'developers');
    const axe = await runAxe(page, 'developers');
    expect(axe.violations.filter(isSerious), describeViolations(axe, isSerious)).toEqual([]);
    // The whole page is long; two views a person can read.
    await page.screenshot({ path: 'test-results/screenshots/developers-top.png' });
    await page.locator('#postApiV1Fits').scrollIntoViewIfNeeded();
    await page.screenshot({ path: 'test-results/screenshots/developers-fit.png' });
  });
});
