/**
 * The error pages, on a server of the test's own whose database has lost a table (a
 * real fault, not a test hook): a studio page shows the app's own error page, and a
 * calculator page shows a neutral notice without the app's chrome. Neither shows the
 * framework's stock page or any detail of the fault.
 */
import sqlite3 from 'sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { prepareDatabase, startApp, SYSTEM_SECRET, type AppProcess } from '../helpers/app-process';
import { launchBrowser, screenshot } from '../helpers/browser';

let app: AppProcess | undefined;
let browser: Browser;
let owner = { userId: 0, workspaceId: 0 };

function sql<T>(file: string, query: string, params: unknown[] = []): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file);
    db.all(query, params, (error, rows) => {
      db.close();
      if (error) reject(error);
      else resolve(rows as T[]);
    });
  });
}

beforeAll(async () => {
  const prepared = await prepareDatabase('error-pages');
  const file = String(prepared.env.DATABASE_URL);
  const [row] = await sql<{ userId: number; workspaceId: number }>(
    file,
    'SELECT m.user_id AS userId, m.workspace_id AS workspaceId FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = ?',
    [DEMO_USERS.owner.email],
  );
  owner = row;
  // The fault: the calculators' table is gone from under the running app.
  await sql(file, 'ALTER TABLE embeds RENAME TO embeds_lost');
  app = await startApp(prepared.dir, prepared.env);
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.stop('SIGTERM');
});

describe('error pages', () => {
  it("a studio page that fails shows the app's own error page, with a way to try again and no detail of the fault", async () => {
    process.env.NEXTAUTH_SECRET = SYSTEM_SECRET;
    const { sessionCookie } = await import('../helpers/auth');
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const pairs = (await sessionCookie(owner.userId, owner.workspaceId)).split('; ');
    await context.addCookies(pairs.map((p) => ({ name: p.slice(0, p.indexOf('=')), value: p.slice(p.indexOf('=') + 1), url: app!.url })));
    const page = await context.newPage();
    const res = await page.goto(`${app!.url}/studio/calculators`);
    expect(res?.status()).toBe(500);
    await page.getByRole('heading', { name: 'This page could not be shown' }).waitFor();
    await expect(page.getByRole('button', { name: 'Try again' }).count()).resolves.toBe(1);
    await expect(page.getByRole('link', { name: 'Partwise home' }).count()).resolves.toBe(1);
    const text = (await page.locator('body').textContent()) ?? '';
    expect(text).not.toMatch(/embeds|SQLITE|no such table|Application error/i);
    await screenshot(page, 'app-error');
    await context.close();
  });

  it('a calculator page that fails shows a neutral notice without the app chrome', async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 700 } });
    const res = await page.goto(`${app!.url}/embed/AnyCalculatorToken_00001`);
    expect(res?.status()).toBe(500);
    await page.getByRole('heading', { name: 'This calculator could not be shown just now' }).waitFor();
    await expect(page.getByRole('link', { name: 'Partwise home' }).count()).resolves.toBe(0);
    const text = (await page.locator('body').textContent()) ?? '';
    expect(text).not.toMatch(/embeds|SQLITE|no such table|Application error/i);
    await screenshot(page, 'calculator-error');
    await page.close();
  });
});
