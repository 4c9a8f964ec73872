import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext } from 'playwright-core';
import { Membership, User, Workspace } from '@/models';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';

/**
 * "Sign out everywhere" from the studio's user menu: a person signed in on two
 * browsers ends both sessions from one of them; the other is sent to sign-in on its
 * next page. Opening a studio page renews the session (the shell asks next-auth's
 * session endpoint, which re-signs the cookie).
 */
let browser: Browser;
let laptop: BrowserContext;
let phone: BrowserContext;
let user: User;
let workspace: Workspace;

beforeAll(async () => {
  browser = await launchBrowser();
  const stamp = Date.now();
  user = await User.create({ email: `two-browsers-${stamp}@club.example`, name: 'Ines Marlow', passwordHash: 'x', emailVerifiedAt: new Date() });
  workspace = await Workspace.create({ name: 'Ridgeway Wheelers', slug: `ridgeway-${stamp}` });
  await Membership.create({ userId: user.id, workspaceId: workspace.id, role: 'owner' });
  laptop = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  phone = await browser.newContext({ viewport: { width: 390, height: 800 } });
  await signInContext(laptop, user.id, workspace.id);
  await signInContext(phone, user.id, workspace.id);
});

afterAll(async () => {
  await browser?.close();
});

describe('sign out everywhere', () => {
  it('ends the sessions on every browser from the user menu', async () => {
    const phonePage = await phone.newPage();
    const renewal = phonePage.waitForResponse((r) => r.url().endsWith('/api/auth/session'));
    await phonePage.goto(appUrl('/studio'));
    const renewed = await renewal;
    expect(renewed.status()).toBe(200);
    expect((await renewed.headerValue('set-cookie')) ?? '', 'the session endpoint re-signs the cookie').toMatch(/next-auth\.session-token=[^;]+/);

    const page = await laptop.newPage();
    await page.goto(appUrl('/studio'));
    await page.locator('summary', { hasText: 'Ines Marlow' }).click();
    const button = page.getByRole('button', { name: 'Sign out everywhere' });
    await button.waitFor();
    await screenshot(page, 'user-menu-sign-out-everywhere');
    page.once('dialog', (d) => void d.accept());
    await button.click();
    await page.waitForURL((u) => u.pathname === '/signin');
    expect((await User.findByPk(user.id))!.sessionGeneration).toBe(1);

    await phonePage.goto(appUrl('/studio/team'));
    await phonePage.waitForURL((u) => u.pathname === '/signin');
    expect(new URL(phonePage.url()).searchParams.get('callbackUrl')).toMatch(/^\/studio/);
    await screenshot(phonePage, 'signed-out-everywhere-other-browser');
  });
});
