/**
 * Fault seen from the studio: the version a calculator serves was damaged after
 * publishing. The calculator page says it is unavailable; the studio names the damage
 * on the calculator's page, marks the version, and offers no way to serve it again.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext } from 'playwright-core';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { modelWorkspace } from '../integration/embeds/fixtures';

let browser: Browser;
let context: BrowserContext;
let token = '';
let embedId = 0;

beforeAll(async () => {
  browser = await launchBrowser();
  const ws = await modelWorkspace();
  const { publishNew, publishVersion } = await import('@/lib/embeds/service');
  const acting = { user: ws.owner, workspace: ws.workspace };
  const { embed } = await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Damaged ride groups' });
  const { version } = await publishVersion(acting, embed.id);
  const { ModelVersion } = await import('@/models');
  await ModelVersion.update({ checksum: 'e'.repeat(64) }, { where: { id: version.id } });
  token = embed.token;
  embedId = embed.id;
  context = await browser.newContext({ viewport: { width: 1280, height: 1000 } });
  await signInContext(context, ws.owner.id, ws.workspace.id);
});

afterAll(async () => {
  await browser?.close();
});

describe('a damaged served version', () => {
  it('makes the calculator unavailable and is named in the studio', async () => {
    const page = await context.newPage();
    await page.goto(appUrl(`/embed/${token}`));
    await expect(page.getByText(/not available/i).count()).resolves.toBeGreaterThan(0);

    await page.goto(appUrl(`/studio/calculators/${embedId}`));
    const alert = page.getByRole('alert').filter({ hasText: 'is damaged' });
    await alert.waitFor();
    await expect(page.getByText('Not answering', { exact: true }).count()).resolves.toBe(1);
    expect(await alert.textContent()).toMatch(/Version 2, which this calculator serves, is damaged: its stored content no longer matches the checksum/);
    const rows = page.locator('table tbody tr');
    await expect(rows.filter({ hasText: 'v2' }).getByText('Damaged').count()).resolves.toBe(1);
    // v1 is sound and can be served; v2 offers no button.
    await expect(page.getByRole('button', { name: 'Serve v1' }).count()).resolves.toBe(1);
    await expect(page.getByRole('button', { name: 'Serve v2' }).count()).resolves.toBe(0);
    await screenshot(page, 'studio-damaged-version');

    await page.getByRole('button', { name: 'Serve v1' }).click();
    await page.getByRole('alert').filter({ hasText: 'is damaged' }).waitFor({ state: 'detached' });
    await page.getByText('Live', { exact: true }).waitFor();
    const answer = await fetch(appUrl(`/api/score/${token}`), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: { avg_speed_kmh: 24, weekly_distance_km: 120, climb_per_ride_m: 400 } }) });
    expect(answer.status).toBe(200);
    expect((await answer.json()).version).toBe(1);
    await page.close();
  });
});
