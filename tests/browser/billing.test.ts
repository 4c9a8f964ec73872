import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { sessionCookieName } from '@/lib/auth/cookies';
import { controlHeaders } from '@/lib/fakes/payments';
import { User } from '@/models';
import { appUrl, launchBrowser, screenshot } from '../helpers/browser';
import { sessionCookie } from '../helpers/auth';

/**
 * The seeded owner upgrades from Sketch to Bench through the fake payment service's
 * checkout page: a declined card first, then the good one; the return page waits for
 * the webhook, and billing then shows the new plan and the paid invoice.
 */
let browser: Browser;
let context: BrowserContext;
let page: Page;
const fakeUrl = process.env.PAYMENTS_FAKE_URL;
// The fake's test controls need the per-run key the test stack hands over.
const controlKey = controlHeaders(process.env.PAYMENTS_FAKE_CONTROL_KEY);

async function control(path: string) {
  const res = await fetch(`${fakeUrl}${path}`, { method: 'POST', headers: controlKey });
  expect(res.ok).toBe(true);
}

beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const owner = await User.findOne({ where: { email: DEMO_USERS.owner.email } });
  expect(owner, 'the demo owner is seeded').not.toBeNull();
  // Signed in the way next-auth would leave it: a real signed session cookie.
  const value = (await sessionCookie(owner!.id)).split('=').slice(1).join('=');
  await context.addCookies([{ name: sessionCookieName(), value, url: appUrl('/') }]);
  page = await context.newPage();
});

afterAll(async () => {
  if (fakeUrl) await fetch(`${fakeUrl}/_test/webhooks/resume`, { method: 'POST', headers: controlKey }).catch(() => undefined);
  await browser?.close();
});

describe('billing in the browser', () => {
  it('the owner upgrades through the fake checkout and sees the new plan and invoice', async () => {
    expect(fakeUrl, 'the payment fake runs beside the app').toBeTruthy();
    await page.goto(appUrl('/studio/billing'));
    await expect.poll(() => page.getByTestId('current-plan').textContent()).toBe('Sketch');
    expect(await page.locator('[role="progressbar"]').count()).toBe(5);
    expect(await page.getByText('No invoices yet').count()).toBe(1);
    await screenshot(page, 'billing-1-sketch');

    await page.locator('[data-plan="bench"] button', { hasText: 'Upgrade to Bench' }).click();
    await page.getByRole('button', { name: 'Go to payment' }).click();
    await page.waitForURL((u) => u.toString().startsWith(`${fakeUrl}/pay/`));
    expect(await page.getByRole('heading', { name: 'Subscribe to Partwise Bench' }).count()).toBe(1);
    await screenshot(page, 'billing-2-checkout');

    // Declined first: the page says so and nothing moves.
    await page.getByLabel('Card number').fill('4000 0000 0000 0002');
    await page.getByLabel('Expiry (MM / YY)').fill('12 / 34');
    await page.getByLabel('Security code').fill('123');
    await page.getByLabel('Name on card').fill(DEMO_USERS.owner.name);
    await page.getByRole('button', { name: /Pay €19.00/ }).click();
    await page.getByRole('alert').waitFor();
    expect(await page.getByRole('alert').textContent()).toContain('Your card was declined.');
    await screenshot(page, 'billing-3-declined');

    // Hold the webhooks so the return page shows that it waits for them, not for the redirect.
    await control('/_test/webhooks/pause');
    await page.getByLabel('Card number').fill('4242 4242 4242 4242');
    await page.getByLabel('Security code').fill('123');
    await page.getByRole('button', { name: /Pay €19.00/ }).click();
    await page.waitForURL((u) => u.pathname === '/studio/billing/return');
    await page.getByText('Confirming your payment…').waitFor();
    await page.waitForTimeout(1500);
    expect(await page.getByText('Confirming your payment…').count()).toBe(1);
    await screenshot(page, 'billing-4-confirming');

    await control('/_test/webhooks/resume');
    await page.getByRole('heading', { name: 'You are on Bench' }).waitFor({ timeout: 30_000 });
    await screenshot(page, 'billing-5-confirmed');

    await page.getByRole('link', { name: 'Back to billing' }).click();
    await page.waitForURL((u) => u.pathname === '/studio/billing');
    expect(await page.getByTestId('current-plan').textContent()).toBe('Bench');
    const invoice = page.locator('[data-invoice]');
    expect(await invoice.count()).toBe(1);
    expect(await invoice.first().textContent()).toContain('€19.00');
    expect(await invoice.first().textContent()).toContain('Settled');
    expect(await page.locator('[data-plan="lab"] button', { hasText: 'Switch to Lab' }).count()).toBe(1);
    await screenshot(page, 'billing-6-bench');
  });

  it('the owner switches to Lab (prorated invoice at once), then cancels and can take it back', async () => {
    await page.goto(appUrl('/studio/billing'));
    await page.locator('[data-plan="lab"] button', { hasText: 'Switch to Lab' }).click();
    await page.getByText('The switch is immediate').waitFor();
    // The amount comes from the payment service's preview, before anything is charged.
    await page.getByTestId('change-amount').waitFor();
    expect(await page.getByTestId('change-amount').textContent()).toMatch(/Charged to your card now\s*€\d+\.\d\d/);
    expect(await page.getByTestId('change-preview').textContent()).toContain('Unused time on Partwise Bench');
    await screenshot(page, 'billing-7-confirm-switch');
    await page.locator('[data-plan="lab"]').getByRole('button', { name: 'Confirm' }).click();
    await expect.poll(() => page.getByTestId('current-plan').textContent(), { timeout: 15_000 }).toBe('Lab');
    await expect.poll(() => page.locator('[data-invoice]').count(), { timeout: 15_000 }).toBe(2);

    // Each invoice has a page with its lines, ready to print.
    await page.locator('[data-invoice]').first().getByRole('link').click();
    await page.waitForURL((u) => /^\/studio\/billing\/invoices\/\d+$/.test(u.pathname));
    await page.getByTestId('invoice').waitFor();
    expect(await page.getByTestId('invoice').textContent()).toContain('Remaining time on Partwise Lab');
    expect(await page.getByTestId('invoice').textContent()).not.toMatch(/\d{4}-\d{2}-\d{2}/);
    expect(await page.getByRole('button', { name: 'Print or save as PDF' }).count()).toBe(1);
    await screenshot(page, 'billing-7b-invoice');
    await page.emulateMedia({ media: 'print' });
    expect(await page.locator('header').first().isVisible()).toBe(false);
    await screenshot(page, 'billing-7c-invoice-print');
    await page.emulateMedia({ media: 'screen' });
    await page.getByRole('link', { name: 'Back to billing' }).click();
    await page.waitForURL((u) => u.pathname === '/studio/billing');

    await page.locator('[data-plan="sketch"] button', { hasText: 'Cancel — move to Sketch' }).click();
    await page.locator('[data-plan="sketch"]').getByRole('button', { name: 'Confirm' }).click();
    await page.getByText(/Ends on .*; the workspace then moves to Sketch/).waitFor({ timeout: 15_000 });
    expect(await page.getByTestId('current-plan').textContent()).toBe('Lab');
    expect(await page.locator('[data-plan="lab"] button', { hasText: 'Keep Lab' }).count()).toBe(1);
    await screenshot(page, 'billing-8-cancelled');

    await page.locator('[data-plan="lab"] button', { hasText: 'Keep Lab' }).click();
    await page.getByText(/Renews on/).waitFor({ timeout: 15_000 });

    // The payment service's own page for the card on file, and back.
    await page.getByRole('button', { name: 'Card and payment settings' }).click();
    await page.waitForURL((u) => u.toString().startsWith(`${fakeUrl}/portal/`));
    expect(await page.getByText('Visa ending in 4242').count()).toBe(1);
    await screenshot(page, 'billing-9-self-service');
    await page.getByRole('link', { name: /Return to Partwise/ }).click();
    await page.waitForURL((u) => u.pathname === '/studio/billing');
  });
});
