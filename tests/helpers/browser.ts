import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { sessionCookie } from './auth';

/** Debian's Chromium, driven by playwright-core; flags keep it off the closed network. */
export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
export const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-quic', '--no-first-run'];

export function appUrl(pathname = '/'): string {
  const base = process.env.PARTWISE_BASE_URL;
  if (!base) throw new Error('PARTWISE_BASE_URL is not set: run browser tests through `npm test`, which starts the app.');
  return new URL(pathname, base).toString();
}

/** Sign a browser context in as a user (a real signed session cookie), optionally in a workspace. */
export async function signInContext(context: BrowserContext, userId: number, workspaceId?: number): Promise<void> {
  const pairs = (await sessionCookie(userId, workspaceId)).split('; ');
  await context.addCookies(
    pairs.map((pair) => {
      const i = pair.indexOf('=');
      return { name: pair.slice(0, i), value: pair.slice(i + 1), url: appUrl('/') };
    }),
  );
}

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS, headless: true });
}

/** Save a screenshot under test-results/screenshots for a person to look at. */
export async function screenshot(page: Page, name: string): Promise<string> {
  const dir = path.resolve('test-results/screenshots');
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
