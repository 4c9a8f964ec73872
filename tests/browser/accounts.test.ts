import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot } from '../helpers/browser';
import { DEMO_USERS } from '@/lib/demo/accounts';

let browser: Browser;
let context: BrowserContext;
let page: Page;
const email = `rider-${Date.now()}@example.test`;
const password = 'climb-every-hill-7';

beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1200, height: 860 } });
  page = await context.newPage();
});
afterAll(async () => {
  await browser?.close();
});

describe('accounts in the browser', () => {
  it('sign-up shows field errors from the client and from the server', async () => {
    await page.goto(appUrl('/signup'));
    await page.getByRole('button', { name: 'Create account' }).click();
    await expect(page.locator('.pw-field-error').count()).resolves.toBe(4);
    await page.getByLabel('Your name').fill('Ada Rider');
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill('password1234');
    await page.getByLabel('Workspace name').fill('Morning Loop');
    await page.getByRole('button', { name: 'Create account' }).click();
    // Long enough for the form, but a common password: the server's 422 lands under the password field.
    await page.locator('#field-password-error').filter({ hasText: 'too easy to guess' }).waitFor();
    await screenshot(page, 'accounts-signup-errors');
  });

  it('a taken address gets the same "check your inbox" as a new one', async () => {
    await page.goto(appUrl('/signup'));
    await page.getByLabel('Your name').fill('Someone Else');
    await page.getByLabel('E-mail').fill(DEMO_USERS.owner.email);
    await page.getByLabel('Password').fill(password);
    await page.getByLabel('Workspace name').fill('Takeover');
    await page.getByRole('button', { name: 'Create account' }).click();
    const status = page.getByRole('status').filter({ hasText: 'Check your inbox' });
    await status.waitFor();
    expect(await status.textContent()).toContain(DEMO_USERS.owner.email);
    await screenshot(page, 'accounts-signup-sent');
  });

  it('signs up, is told to verify first, verifies via /dev/mail, then signs in', async () => {
    await page.goto(appUrl('/signup'));
    await page.getByLabel('Your name').fill('Ada Rider');
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill(password);
    await page.getByLabel('Workspace name').fill('Morning Loop');
    await page.getByRole('button', { name: 'Create account' }).click();
    await page.getByRole('status').filter({ hasText: 'Check your inbox' }).waitFor();
    await expect(page.getByRole('heading', { name: 'Check your inbox' }).count()).resolves.toBe(1);
    await screenshot(page, 'accounts-check-inbox');

    await page.goto(appUrl('/signin'));
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill(password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('alert').filter({ hasText: 'Verify your e-mail first' }).waitFor();
    await screenshot(page, 'accounts-signin-unverified');

    const mailPage = await page.goto(appUrl('/dev/mail'));
    expect(mailPage?.status()).toBe(200);
    // The holder of the taken address was told someone tried; the visitor never saw that.
    await page.locator('li[data-mail-kind="signup-existing"]').filter({ hasText: DEMO_USERS.owner.email }).waitFor();
    const card = page.locator('li[data-mail-kind="verify-email"]').filter({ hasText: email });
    await card.waitFor();
    await screenshot(page, 'accounts-dev-mail');
    await card.locator('a[href*="/verify?token="]').first().click();
    await page.getByText(`${email} is confirmed`).waitFor();
    await screenshot(page, 'accounts-verified');

    await page.getByRole('link', { name: 'Sign in' }).click();
    await page.waitForURL(/\/signin/);
    await expect.poll(() => page.getByLabel('E-mail').inputValue()).toBe(email);
    await page.getByLabel('Password').fill('not-my-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('alert').filter({ hasText: 'do not match' }).waitFor();
    await page.getByLabel('Password').fill(password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/studio$/);
    await expect(page.locator('h1').textContent()).resolves.toBe('Morning Loop');
    await screenshot(page, 'accounts-studio');

    const session = (await context.cookies()).find((c) => c.name.endsWith('next-auth.session-token'));
    expect(session?.httpOnly).toBe(true);
    expect(session?.sameSite).toBe('Lax');
    const nav = await page.getByRole('navigation', { name: 'Studio' }).textContent();
    expect(nav).toContain('Billing');
    expect(nav).not.toContain('Support');
  });

  it('the team page shows the owner and refuses a third seat on the free plan', async () => {
    await page.goto(appUrl('/studio/team'));
    await expect(page.locator('tbody tr').count()).resolves.toBe(1);
    // Sketch has two seats: the first invitation takes the second seat, the next is refused.
    await page.getByLabel('E-mail', { exact: true }).fill('friend@example.test');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText('Invitation sent to friend@example.test').waitFor();
    await page.getByLabel('E-mail', { exact: true }).fill('second-friend@example.test');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByRole('alert').filter({ hasText: 'Sketch plan includes 2 seats' }).waitFor();
    await screenshot(page, 'accounts-team');
  });

  it('a member sees the team without owner controls; owner pages send them back', async () => {
    await page.locator('summary').filter({ hasText: 'Ada Rider' }).click();
    await page.getByRole('button', { name: 'Sign out', exact: true }).click();
    await page.waitForURL(appUrl('/'));
    await page.goto(appUrl('/signin?callbackUrl=%2Fstudio%2Fteam'));
    await page.getByLabel('E-mail').fill(DEMO_USERS.member.email);
    await page.getByLabel('Password').fill(DEMO_USERS.member.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/studio\/team$/);
    await expect(page.getByRole('button', { name: 'Send invitation' }).count()).resolves.toBe(0);
    await expect(page.getByText('Only owners invite people').count()).resolves.toBe(1);
    const nav = await page.getByRole('navigation', { name: 'Studio' }).textContent();
    expect(nav).not.toContain('Billing');
    await screenshot(page, 'accounts-team-member');
  });

  it('the forgot-password page answers without revealing accounts', async () => {
    const fresh = await browser.newPage();
    await fresh.goto(appUrl('/forgot-password'));
    await fresh.getByLabel('E-mail').fill('nobody-here@example.test');
    await fresh.getByRole('button', { name: 'Mail me a link' }).click();
    await fresh.getByRole('status').filter({ hasText: 'If an account uses that address' }).waitFor();
    await screenshot(fresh, 'accounts-forgot');
    await fresh.close();
  });
});
