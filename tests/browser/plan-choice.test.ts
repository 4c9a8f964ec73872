import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { Membership, Subscription, User, Workspace } from '@/models';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';

/**
 * "Choose Bench" on the landing page is not lost: the sign-up page says what was chosen,
 * and the billing page a new owner lands on after sign-in opens Bench's confirm step
 * with its price (the verification link carries the plan: accounts/plan-choice.test.ts).
 */
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe('a plan chosen on the landing page', () => {
  it('is named on the sign-up page and waits on the billing page', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    await page.goto(appUrl('/'));
    await page.getByRole('link', { name: 'Choose Bench' }).click();
    await page.waitForURL((u) => u.pathname === '/signup' && u.searchParams.get('plan') === 'bench');
    await page.getByText(/You chose Bench \(€19.*a month\)/).waitFor();
    await screenshot(page, 'plan-choice-1-signup');

    const stamp = Date.now();
    const user = await User.create({ email: `chooser.${stamp}@plans.test`, name: 'Ada Chooser', passwordHash: 'x', emailVerifiedAt: new Date() });
    const ws = await Workspace.create({ name: 'Valley Spinners', slug: `valley-${stamp}` });
    await Membership.create({ userId: user.id, workspaceId: ws.id, role: 'owner' });
    await Subscription.create({ workspaceId: ws.id, plan: 'sketch', status: 'active' });
    await signInContext(context, user.id, ws.id);
    await page.goto(appUrl('/studio/billing?plan=bench#plans'));
    const bench = page.locator('[data-plan="bench"]');
    await bench.getByText('You picked Bench when you signed up.').waitFor();
    await bench.getByTestId('change-amount').waitFor();
    expect(await bench.getByTestId('change-amount').textContent()).toMatch(/To pay on the payment page\s*€19\.00/);
    expect(await bench.getByRole('button', { name: 'Go to payment' }).isEnabled()).toBe(true);
    await screenshot(page, 'plan-choice-2-billing');
    await context.close();
  });
});
