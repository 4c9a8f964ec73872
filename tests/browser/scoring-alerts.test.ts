import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { CALCULATOR_BURST_LIMITS } from '@/lib/plans';
import { MailMessage } from '@/models';
import { modelWorkspace } from '../integration/embeds/fixtures';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';

/**
 * Fair use of scoring as the owner sees it: a burst of requests to a free calculator on
 * the running app is turned away past the plan's minute limit (times the test stack's scale), the owner is e-mailed
 * once, and the studio's billing page lists the burst under "Scoring alerts".
 */
let browser: Browser;
let ws: Awaited<ReturnType<typeof modelWorkspace>>;
let token = '';
const TITLE = 'Which club ride suits your legs?';
const good = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };

beforeAll(async () => {
  browser = await launchBrowser();
  const { publishNew } = await import('@/lib/embeds/service');
  ws = await modelWorkspace({ plan: 'sketch' });
  token = (await publishNew({ user: ws.owner, workspace: ws.workspace }, { mixtureModelId: ws.model.id, title: TITLE })).embed.token;
});

afterAll(async () => {
  await browser?.close();
});

describe('scoring alerts in the studio', () => {
  it('a burst past the minute limit is refused, mailed once, and listed on the billing page', async () => {
    // The test stack runs the server with a factor on the burst windows (scripts/test.ts), applied as lib/scoring does.
    const scale = Number(process.env.PARTWISE_TEST_SERVER_BURST_SCALE) > 0 ? Number(process.env.PARTWISE_TEST_SERVER_BURST_SCALE) : 1;
    const perMinute = Math.max(1, Math.floor(CALCULATOR_BURST_LIMITS.sketch[0].answers * scale));
    const answers = await Promise.all(
      Array.from({ length: perMinute + 5 }, () => fetch(appUrl(`/api/score/${token}`), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: good }) })),
    );
    const statuses = answers.map((r) => r.status);
    expect(statuses.filter((s) => s === 200).length).toBe(perMinute);
    const refused = answers.find((r) => r.status === 429)!;
    expect(Number(refused.headers.get('retry-after'))).toBeGreaterThanOrEqual(1);
    expect((await refused.json()).error.message).toMatch(/^Many people are using this calculator right now/);

    await expect.poll(() => MailMessage.count({ where: { to: ws.owner.email, kind: 'calculator-burst' } }), { timeout: 10_000 }).toBe(1);

    const context = await browser.newContext({ viewport: { width: 1280, height: 1000 } });
    await signInContext(context, ws.owner.id, ws.workspace.id);
    const page = await context.newPage();
    await page.goto(appUrl('/studio/billing#alerts'));
    const alert = page.locator('[data-alert="burst"]').first();
    await alert.waitFor();
    expect(await alert.textContent()).toContain(TITLE);
    expect(await alert.textContent()).toContain(`More than ${perMinute} answers asked in a minute`);
    await page.getByRole('heading', { name: 'Scoring alerts' }).scrollIntoViewIfNeeded();
    await screenshot(page, 'billing-scoring-alerts');
    await context.close();
  });
});
