import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot } from '../helpers/browser';
import { modelWorkspace } from '../integration/embeds/fixtures';

/**
 * The calculator in the visitor's language: a German visitor typing "31,5" gets exactly the
 * answer an English visitor gets for "31.5"; French "1 050" and Spanish "1.050" are one
 * thousand and fifty; each language shows its own fixed texts and number formats; 'auto' follows
 * the browser. A calculator of our own on a paid plan, so the five answers here stay far
 * below any burst limit.
 */
let browser: Browser;
const tokens: Record<string, string> = {};

beforeAll(async () => {
  browser = await launchBrowser();
  const { publishNew, updateSettings } = await import('@/lib/embeds/service');
  const ws = await modelWorkspace();
  const acting = { user: ws.owner, workspace: ws.workspace };
  for (const language of ['en', 'de', 'fr', 'es', 'auto'] as const) {
    const { embed } = await publishNew(acting, { mixtureModelId: ws.model.id, title: 'Which ride group suits you?' });
    // Set before the app server first reads the calculator, so no cached copy is older.
    await updateSettings(acting, embed.id, { language });
    tokens[language] = embed.token;
  }
});

afterAll(async () => {
  await browser?.close();
});

interface Scored {
  sent: unknown;
  answer: { probabilities: { label: string; probability: number }[]; best: { label: string; probability: number }; typicality: number };
}

async function openCalculator(language: string, locale = 'en-GB'): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 720, height: 1500 }, locale });
  const page = await context.newPage();
  const res = await page.goto(appUrl(`/embed/${tokens[language]}`));
  expect(res?.status()).toBe(200);
  await page.waitForSelector('[data-interactive="true"]');
  return page;
}

/** Types the values as a visitor would, presses the button, and returns what was sent and answered. */
async function answerFor(page: Page, button: string, speed: string, distance: string, climb: string): Promise<Scored> {
  await page.getByLabel('Average speed (km/h)').fill(speed);
  await page.getByLabel('Weekly distance (km)').fill(distance);
  await page.getByLabel('Climbing per ride (m)').fill(climb);
  const response = page.waitForResponse((r) => r.url().includes('/api/score/') && r.request().method() === 'POST');
  await page.getByRole('button', { name: button }).click();
  const res = await response;
  expect(res.status()).toBe(200);
  await page.waitForSelector('[data-chart-ready="true"] svg');
  return { sent: JSON.parse(res.request().postData() ?? 'null'), answer: await res.json() };
}

describe('the calculator in four languages', () => {
  let english: Scored;

  it('English: 31.5 as the baseline answer', async () => {
    const page = await openCalculator('en');
    await expect(page.locator('#partwise-calculator-root').getAttribute('lang')).resolves.toBe('en');
    english = await answerFor(page, 'Show my groups', '31.5', '255', '640');
    expect(english.sent).toEqual({ values: { avg_speed_kmh: 31.5, weekly_distance_km: 255, climb_per_ride_m: 640 } });
    await page.getByText('Accepted: 0 to 3,000 m.').waitFor();
    await expect(page.locator('[data-testid="membership-chart"] svg').textContent()).resolves.toContain('20%');
    await screenshot(page, 'languages-en');
    await page.context().close();
  });

  it('German: "31,5" gives the same answer as 31.5, in German words and formats', async () => {
    const page = await openCalculator('de');
    await expect(page.locator('#partwise-calculator-root').getAttribute('lang')).resolves.toBe('de');
    await expect(page.evaluate(() => document.documentElement.lang)).resolves.toBe('de');

    // An ambiguous number is refused in German before anything is sent.
    let sentEarly = 0;
    page.on('request', (r) => void (r.url().includes('/api/score/') && sentEarly++));
    await page.getByLabel('Average speed (km/h)').fill('3,1.5');
    await page.getByLabel('Weekly distance (km)').fill('250');
    await page.getByLabel('Climbing per ride (m)').fill('1.05,0');
    await page.getByRole('button', { name: 'Meine Gruppen zeigen' }).click();
    await page.getByText('Climbing per ride lässt sich auf mehr als eine Weise lesen. Bitte schreiben Sie die Zahl wie 1.234,5.').waitFor();
    await page.getByText('Average speed lässt sich auf mehr als eine Weise lesen.', { exact: false }).waitFor();
    expect(sentEarly).toBe(0);

    const german = await answerFor(page, 'Meine Gruppen zeigen', '31,5', '255', '640');
    expect(german.sent).toEqual(english.sent);
    expect(german.answer.probabilities).toEqual(english.answer.probabilities);
    expect(german.answer.typicality).toBe(english.answer.typicality);

    const heading = await page.locator('[data-testid="answer"] h2').textContent();
    expect(heading).toContain('Am ähnlichsten:');
    expect(heading).toContain(german.answer.best.label);
    // Percentages the German way: "62 %" with a no-break space, or "über 99 %".
    expect(heading).toMatch(/\d[\u00a0\u202f]%\)$/);
    await page.getByText('Zulässig: 0 bis 3.000 m.').waitFor();
    // The chart's axis too: "20 %", not "20%".
    await expect(page.locator('[data-testid="membership-chart"] svg').textContent()).resolves.toMatch(/20[\u00a0\u202f]%/);
    await page.getByRole('heading', { name: 'Warum diese Gruppe' }).waitFor();
    await page.getByText('Die Wahrscheinlichkeiten beschreiben', { exact: false }).waitFor();
    const body = (await page.locator('body').textContent()) ?? '';
    for (const english of ['Show my groups', 'Accepted:', 'Why this group', 'Most like', 'Report this calculator']) expect(body).not.toContain(english);
    await screenshot(page, 'languages-de');
    await page.context().close();
  });

  it('French and Spanish: their own separators, the same answer as the API gives for the plain numbers', async () => {
    const res = await fetch(appUrl(`/api/score/${tokens.en}`), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: { avg_speed_kmh: 22.5, weekly_distance_km: 105, climb_per_ride_m: 1050 } }) });
    expect(res.status).toBe(200);
    const plain = (await res.json()) as Scored['answer'];
    for (const [language, button, climb, accepted, heading] of [
      ['fr', 'Voir mes groupes', '1\u202f050', /Valeurs acceptées\u00a0: de 0 à 3[\u202f\u00a0]000 m\./, 'Le plus proche\u00a0:'],
      ['es', 'Ver mis grupos', '1.050', /Se admite: de 0 a 3000 m\./, 'Más parecido a:'],
    ] as const) {
      const page = await openCalculator(language);
      await expect(page.locator('#partwise-calculator-root').getAttribute('lang')).resolves.toBe(language);
      const scored = await answerFor(page, button, '22,5', '105', climb);
      expect(scored.sent).toEqual({ values: { avg_speed_kmh: 22.5, weekly_distance_km: 105, climb_per_ride_m: 1050 } });
      expect(scored.answer.probabilities).toEqual(plain.probabilities);
      await expect(page.locator('[data-testid="answer"] h2').textContent()).resolves.toContain(heading);
      await expect(page.locator('body').textContent()).resolves.toMatch(accepted);
      await screenshot(page, `languages-${language}`);
      await page.context().close();
    }
  });

  it("'auto' follows the browser's language, and English when it asks for none of ours", async () => {
    const french = await openCalculator('auto', 'fr-FR');
    await expect(french.locator('#partwise-calculator-root').getAttribute('lang')).resolves.toBe('fr');
    await french.getByRole('button', { name: 'Voir mes groupes' }).waitFor();
    await french.context().close();
    const japanese = await openCalculator('auto', 'ja-JP');
    await expect(japanese.locator('#partwise-calculator-root').getAttribute('lang')).resolves.toBe('en');
    await japanese.getByRole('button', { name: 'Show my groups' }).waitFor();
    await japanese.context().close();
  });
});
