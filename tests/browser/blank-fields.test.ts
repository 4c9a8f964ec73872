import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { modelWorkspace } from '../integration/embeds/fixtures';

/**
 * The seeded demo calculator lets visitors leave "Climbing per ride" blank: the field is
 * marked optional, a blank is answered from speed and distance alone, the answer says
 * which field it did not use, and "Why this group" gives a reason per value used, the
 * same reason the scoring API returns.
 */
let browser: Browser;
let demoToken = '';

beforeAll(async () => {
  browser = await launchBrowser();
  const { Embed, Workspace } = await import('@/models');
  const demo = await Workspace.findOne({ where: { slug: 'riverside-cycling' } });
  const embed = demo ? await Embed.findOne({ where: { workspaceId: demo.id }, order: [['id', 'ASC']] }) : null;
  if (!embed) throw new Error('the test stack has no seeded demo calculator');
  demoToken = embed.token;
});

afterAll(async () => {
  await browser?.close();
});

async function open(page: Page) {
  const res = await page.goto(appUrl(`/embed/${demoToken}`));
  expect(res?.status()).toBe(200);
  await page.waitForSelector('[data-interactive="true"]');
}

interface ApiAnswer {
  best: { label: string };
  used: string[];
  unused: string[];
  reason: { runnerUp: number; logOdds: number; weightTerm: number; fields: { feature: string; contribution: number; position: string }[] } | null;
  probabilities: { label: string }[];
}

async function apiAnswer(values: Record<string, number | null>): Promise<ApiAnswer> {
  const res = await fetch(appUrl(`/api/score/${demoToken}`), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values }) });
  expect(res.status).toBe(200);
  return res.json();
}

describe('blank fields on the demo calculator', () => {
  it('marks the optional field, answers without it, says so, and gives the reason per value', async () => {
    const page = await browser.newPage({ viewport: { width: 720, height: 1300 } });
    await open(page);
    const climb = page.getByLabel('Climbing per ride (m) (optional)');
    await expect(climb.count()).resolves.toBe(1);
    await expect(climb.evaluate((el) => (el as HTMLInputElement).required)).resolves.toBe(false);
    await expect(page.getByLabel('Average speed (km/h)').evaluate((el) => (el as HTMLInputElement).required)).resolves.toBe(true);
    await page.getByText('You may leave this blank.').waitFor();

    const sent: unknown[] = [];
    page.on('request', (r) => {
      if (r.url().includes('/api/score/')) sent.push(JSON.parse(r.postData() ?? 'null'));
    });
    await page.getByLabel('Average speed (km/h)').fill('22.5');
    await page.getByLabel('Weekly distance (km)').fill('105');
    await page.getByRole('button', { name: 'Show my groups' }).click();
    await page.waitForSelector('[data-chart-ready="true"] svg');
    expect(sent).toEqual([{ values: { avg_speed_kmh: 22.5, weekly_distance_km: 105, climb_per_ride_m: null } }]);

    const unused = page.locator('[data-testid="unused-fields"]');
    await expect(unused.textContent()).resolves.toMatch(/^Worked out without Climbing per ride, left blank/);

    const expected = await apiAnswer({ avg_speed_kmh: 22.5, weekly_distance_km: 105 });
    expect(expected.unused).toEqual(['climb_per_ride_m']);
    const reason = expected.reason!;
    await expect(page.locator('[data-testid="answer"] h2').textContent()).resolves.toContain(expected.best.label);

    const section = page.locator('[data-testid="answer-reason"]');
    await expect(section.getByRole('heading', { name: 'Why this group' }).count()).resolves.toBe(1);
    const runnerUp = expected.probabilities[reason.runnerUp].label;
    await expect(section.textContent()).resolves.toContain(`between ${expected.best.label} and the next closest group, ${runnerUp}`);
    const items = section.locator('[data-testid="reason-list"] li');
    await expect(items.count()).resolves.toBe(3);
    const shown = await items.evaluateAll((lis) => lis.map((li) => ({ feature: li.getAttribute('data-feature'), contribution: Number(li.getAttribute('data-contribution')), text: li.textContent ?? '' })));
    expect(shown.map((s) => s.feature)).toEqual(['avg_speed_kmh', 'weekly_distance_km', 'group-size']);
    const words = { well_below: 'well below', below: 'below', typical: 'within', above: 'above', well_above: 'well above' } as Record<string, string>;
    reason.fields.forEach((f, i) => {
      expect(shown[i].contribution).toBe(f.contribution);
      const label = f.feature === 'avg_speed_kmh' ? 'Average speed' : 'Weekly distance';
      expect(shown[i].text).toContain(`${label}: ${words[f.position]} the usual range for this group`);
      const towards = Math.abs(f.contribution) < 0.05 ? 'neither group' : f.contribution > 0 ? expected.best.label : runnerUp;
      expect(shown[i].text).toContain(towards);
    });
    expect(shown[2].contribution).toBe(reason.weightTerm);
    // The parts the page shows add up to the log-odds between the two groups.
    expect(Math.abs(shown.reduce((s, x) => s + x.contribution, 0) - reason.logOdds)).toBeLessThan(1e-9);
    await screenshot(page, 'blank-fields-answer');

    // Filled in, the next answer uses all three values.
    await climb.fill('1050');
    await page.getByRole('button', { name: 'Show my groups' }).click();
    await page.waitForFunction(() => document.querySelectorAll('[data-testid="reason-list"] li').length === 4);
    await expect(unused.count()).resolves.toBe(0);
    await expect(items.first().textContent()).resolves.toMatch(/^Average speed: /);
    await expect(items.nth(2).textContent()).resolves.toMatch(/^Climbing per ride: /);
    expect(sent).toHaveLength(2);
    await page.close();
  });

  it('still asks for a required field left blank, naming it, without sending anything', async () => {
    const page = await browser.newPage({ viewport: { width: 320, height: 1100 } });
    await open(page);
    let calls = 0;
    page.on('request', (r) => {
      if (r.url().includes('/api/score/')) calls++;
    });
    await page.getByLabel('Weekly distance (km)').fill('105');
    await page.getByRole('button', { name: 'Show my groups' }).click();
    await page.getByText('Enter Average speed.').waitFor();
    expect(calls).toBe(0);
    await page.getByLabel('Average speed (km/h)').fill('31');
    await page.getByLabel('Weekly distance (km)').fill('250');
    await page.getByRole('button', { name: 'Show my groups' }).click();
    await page.waitForSelector('[data-testid="answer-reason"]');
    await screenshot(page, 'blank-fields-phone');
    expect(calls).toBe(1);
    await page.close();
  });
});

describe("the publisher's choice in the studio", () => {
  it('sets a field to "May be left blank" on the model page and saves it with the fields', async () => {
    const { MixtureModel } = await import('@/models');
    const ws = await modelWorkspace();
    const context = await browser.newContext({ viewport: { width: 1280, height: 1000 } });
    await signInContext(context, ws.owner.id, ws.workspace.id);
    const page = await context.newPage();
    await page.goto(appUrl(`/studio/models/${ws.model.id}`));
    const speed = page.getByLabel('Must visitors fill in avg_speed_kmh?');
    await expect.poll(() => speed.inputValue()).toBe('required');
    await speed.selectOption({ label: 'May be left blank' });
    await page.getByRole('button', { name: 'Save names and fields' }).click();
    await page.getByRole('status').filter({ hasText: 'Saved.' }).waitFor();
    const saved = (await MixtureModel.findByPk(ws.model.id))!;
    expect(saved.fields.map((f) => f.optional)).toEqual([true, false, false]);
    await page.reload();
    await expect.poll(() => page.getByLabel('Must visitors fill in avg_speed_kmh?').inputValue()).toBe('optional');
    await page.getByLabel('Must visitors fill in climb_per_ride_m?').scrollIntoViewIfNeeded();
    await screenshot(page, 'blank-fields-studio');
    await context.close();
  });
});
