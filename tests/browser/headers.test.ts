/**
 * Security headers on real pages of the built app: the app's own CSP on every page but
 * the calculator (which keeps its per-embed frame-ancestors), no-sniff and referrer
 * policy, and pages that render without a single CSP violation in the console.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { appUrl, launchBrowser, screenshot, signInContext } from '../helpers/browser';
import { DEMO_USERS } from '@/lib/demo/accounts';

let browser: Browser;
let context: BrowserContext;
let token = '';
let modelId = 0;

beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const { User, Embed, MixtureModel } = await import('@/models');
  const analyst = (await User.findOne({ where: { email: DEMO_USERS.member.email } }))!;
  await signInContext(context, analyst.id);
  token = (await Embed.findOne({ where: { status: 'active' }, order: [['id', 'ASC']] }))!.token;
  modelId = (await MixtureModel.findOne({ order: [['id', 'ASC']] }))!.id;
});
afterAll(async () => {
  await browser?.close();
});

/** Open a page, collecting CSP refusals from the console and the page's own report events. */
async function visit(path: string, ctx: BrowserContext = context): Promise<{ page: Page; headers: Record<string, string>; violations: string[] }> {
  const page = await ctx.newPage();
  const violations: string[] = [];
  page.on('console', (m) => {
    if (/Refused to|Content Security Policy/i.test(m.text())) violations.push(m.text());
  });
  await page.exposeFunction('__cspViolation', (v: string) => violations.push(v));
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => (window as unknown as { __cspViolation: (s: string) => void }).__cspViolation(`${e.violatedDirective} ${e.blockedURI}`));
  });
  const response = await page.goto(appUrl(path), { waitUntil: 'networkidle' });
  expect(response, path).not.toBeNull();
  expect(response!.status(), path).toBeLessThan(400);
  return { page, headers: response!.headers(), violations };
}

function directives(csp: string): Map<string, string> {
  return new Map(csp.split(';').map((d) => d.trim()).filter(Boolean).map((d) => [d.split(/\s+/)[0], d.slice(d.split(/\s+/)[0].length).trim()]));
}

function expectAppPolicy(headers: Record<string, string>, opts: { eval: boolean }) {
  const csp = headers['content-security-policy'] ?? '';
  expect(csp.split(',').length, 'one policy, not two merged ones').toBe(1);
  const d = directives(csp);
  expect(d.get('default-src')).toBe("'self'");
  expect(d.get('script-src')).toBe(`'self' 'unsafe-inline'${opts.eval ? " 'unsafe-eval'" : ''}`);
  expect(d.get('connect-src')).toBe("'self'");
  expect(d.get('frame-ancestors')).toBe("'none'");
  expect(d.get('object-src')).toBe("'none'");
  expect(d.get('base-uri')).toBe("'self'");
  expect(d.get('form-action')).toBe("'self'");
  expect(headers['x-content-type-options']).toBe('nosniff');
  expect(headers['referrer-policy']).toBe('strict-origin-when-cross-origin');
  expect(headers['x-frame-options']).toBe('DENY');
}

describe('security headers and a clean console under the CSP', () => {
  it('landing page: strict policy without eval', async () => {
    const { page, headers, violations } = await visit('/');
    expectAppPolicy(headers, { eval: false });
    expect(violations).toEqual([]);
    await page.close();
  });

  it('sign-in page: strict policy, the form works under it', async () => {
    // signed out: a signed-in visitor is sent on to the studio
    const anonymous = await browser.newContext();
    const { page, headers, violations } = await visit('/signin', anonymous);
    expectAppPolicy(headers, { eval: false });
    await page.getByLabel(/e-mail/i).first().waitFor();
    expect(violations).toEqual([]);
    await screenshot(page, 'headers-signin');
    await anonymous.close();
  });

  it('a studio model page draws its vega charts under the same policy, without eval', async () => {
    const { page, headers, violations } = await visit(`/studio/models/${modelId}`);
    expectAppPolicy(headers, { eval: false });
    await page.locator('svg.marks, figure svg').first().waitFor({ timeout: 20_000 });
    expect(violations).toEqual([]);
    await screenshot(page, 'headers-studio-model');
    await page.close();
  });

  it('the calculator keeps its own per-embed policy and scores without violations', async () => {
    const { page, headers, violations } = await visit(`/embed/${token}`);
    const d = directives(headers['content-security-policy'] ?? '');
    expect(d.get('frame-ancestors')).toContain("'self'");
    expect(d.get('frame-ancestors')).not.toBe("'none'");
    expect(headers['x-frame-options']).toBeUndefined();
    expect(headers['x-content-type-options']).toBe('nosniff');
    // The rest is the app's own policy: no eval, scripts and connections from our origin only.
    expect(d.get('script-src')).toBe("'self' 'unsafe-inline'");
    expect(d.get('connect-src')).toBe("'self'");
    expect(d.get('object-src')).toBe("'none'");
    const inputs = page.locator('input[type="number"], input[inputmode="decimal"]');
    const count = await inputs.count();
    for (let i = 0; i < count; i++) await inputs.nth(i).fill(String([24, 120, 400][i] ?? 1));
    const button = page.getByRole('button', { name: /show|see|check|calculate|match/i }).first();
    if (await button.count()) await button.click();
    await page.waitForTimeout(1500);
    expect(violations).toEqual([]);
    await screenshot(page, 'headers-calculator');
    await page.close();
  });

  it('API answers carry no-sniff as well', async () => {
    const res = await context.request.get(appUrl('/api/health'));
    expect(res.headers()['x-content-type-options']).toBe('nosniff');
  });
});
