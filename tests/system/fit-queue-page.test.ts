/**
 * The fit page while a fit waits for a slot, on a server of its own with one fitting
 * slot: it says how many fits start before this one and follows the queue as it moves;
 * the fit form shows the plan's cap when the workspace has as many fits as it allows.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { launchBrowser, screenshot } from '../helpers/browser';
import { prepareDatabase, queryApp, startApp, SYSTEM_SECRET, type AppProcess } from '../helpers/app-process';

let app: AppProcess | undefined;
let browser: Browser | undefined;
let page: Page;
let cookie = '';
let datasetId = 0;
let features: string[] = [];

const sql = <T extends object>(sql: string) => queryApp<T>(app!, sql);

type FitJson = { id: number; status: string; queuePosition: number | null; progress: { phase?: string } | null };
async function api(path: string, init: RequestInit = {}) {
  const res = await fetch(`${app!.url}${path}`, { ...init, headers: { cookie, 'content-type': 'application/json', origin: app!.url, ...(init.headers ?? {}) } });
  return { status: res.status, body: (await res.json()) as { fit?: FitJson } };
}
async function waitForFit(id: number, done: (fit: FitJson) => boolean, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const { body } = await api(`/api/fits/${id}`);
    if (body.fit && done(body.fit)) return body.fit;
    if (Date.now() > deadline) throw new Error(`fit ${id} did not get there in time: ${JSON.stringify(body.fit)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

beforeAll(async () => {
  const { dir, env } = await prepareDatabase('fit-queue', { PARTWISE_FIT_SLOTS: '1' });
  app = await startApp(dir, env);
  process.env.NEXTAUTH_SECRET = SYSTEM_SECRET;
  const [analyst] = await sql<{ id: number }>(`SELECT id FROM users WHERE email = '${DEMO_USERS.member.email}'`);
  const [dataset] = await sql<{ id: number; workspace_id: number; columns: string }>('SELECT id, workspace_id, columns FROM datasets ORDER BY id LIMIT 1');
  datasetId = dataset.id;
  features = (JSON.parse(dataset.columns) as { name: string; kind: string }[]).filter((c) => c.kind === 'numeric').map((c) => c.name).slice(0, 3);
  // The demo club moves up to Bench: four fits at once.
  await sql(`UPDATE subscriptions SET plan = 'bench', status = 'active' WHERE workspace_id = ${dataset.workspace_id}`);
  const { sessionCookie } = await import('../helpers/auth');
  cookie = await sessionCookie(analyst.id, dataset.workspace_id);

  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  await context.addCookies(cookie.split('; ').map((pair) => ({ name: pair.slice(0, pair.indexOf('=')), value: pair.slice(pair.indexOf('=') + 1), url: app!.url })));
  page = await context.newPage();
});

afterAll(async () => {
  await browser?.close();
  await app?.stop('SIGTERM');
});

describe('a fit waiting for a slot', () => {
  it('shows how many fits are ahead, follows the queue, and the form names the cap when it is reached', async () => {
    const heavy = await api('/api/fits', { method: 'POST', body: JSON.stringify({ datasetId, features, minComponents: 1, maxComponents: 10, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 10, seed: 3, maxIter: 1000, tol: 1e-7 }) });
    expect(heavy.status).toBe(202);
    await waitForFit(heavy.body.fit!.id, (f) => f.status === 'running');
    const small = { datasetId, features, minComponents: 2, maxComponents: 3, covariances: ['full'], restarts: 2, seed: 4 };
    const second = await api('/api/fits', { method: 'POST', body: JSON.stringify(small) });
    const third = await api('/api/fits', { method: 'POST', body: JSON.stringify({ ...small, seed: 5 }) });
    expect([second.body.fit!.queuePosition, third.body.fit!.queuePosition]).toEqual([0, 1]);

    await page.goto(`${app!.url}/studio/fits/${third.body.fit!.id}`);
    await page.getByTestId('fit-progress-text').filter({ hasText: 'Waiting: 1 fit ahead of yours' }).waitFor();
    await screenshot(page, 'fit-queued');

    // A fourth from the form fills the Bench plan's four; the fifth is refused on the form.
    await page.goto(`${app!.url}/studio/datasets/${datasetId}`);
    await page.getByRole('button', { name: /^Fit \d+ candidates$/ }).click();
    await page.waitForURL(/\/studio\/fits\/\d+$/);
    const fourth = Number(new URL(page.url()).pathname.split('/').pop());
    await page.getByTestId('fit-progress-text').filter({ hasText: 'Waiting: 2 fits ahead of yours' }).waitFor();
    await page.goto(`${app!.url}/studio/datasets/${datasetId}`);
    await page.getByRole('button', { name: /^Fit \d+ candidates$/ }).click();
    const refusal = page.getByRole('alert').filter({ hasText: 'the most the Bench plan allows at once (4)' });
    await refusal.waitFor();
    await expect(refusal.textContent()).resolves.toMatch(/cancel one that is still waiting/);
    await refusal.scrollIntoViewIfNeeded();
    await screenshot(page, 'fit-cap-refused');

    // The heavy fit is cancelled: the queue moves up and the waiting page follows without a reload.
    await page.goto(`${app!.url}/studio/fits/${fourth}`);
    await page.getByTestId('fit-progress-text').filter({ hasText: 'Waiting: 2 fits ahead of yours' }).waitFor();
    expect((await api(`/api/fits/${heavy.body.fit!.id}/cancel`, { method: 'POST' })).status).toBe(202);
    // The small fits ahead may start and even finish between two polls, so the page is checked for
    // having moved on (fewer ahead, next, running or done), not for one exact intermediate text.
    await expect.poll(() => page.getByTestId('fit-progress-text').textContent(), { timeout: 30_000 }).not.toContain('2 fits ahead');
    await screenshot(page, 'fit-queue-moved');
    for (const id of [second.body.fit!.id, third.body.fit!.id, fourth]) await api(`/api/fits/${id}/cancel`, { method: 'POST' });
  });
});
