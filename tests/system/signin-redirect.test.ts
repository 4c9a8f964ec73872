/**
 * Sign-in with a hostile return address, over real HTTP against a real server: the
 * callbackUrl in the sign-in POST body, in the query, or in next-auth's callback-url
 * cookie. Before the fix a tab sent the browser off-site, and a newline, carriage
 * return or a relative value without a leading slash made every auth request answer
 * 500, so even good credentials could not sign in. Now every one lands in the app.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { prepareDatabase, startApp, type AppProcess } from '../helpers/app-process';

let app: AppProcess | undefined;

beforeAll(async () => {
  const prepared = await prepareDatabase('signin-redirect');
  app = await startApp(prepared.dir, prepared.env);
});

afterAll(async () => {
  await app?.stop('SIGTERM');
});

const HOSTILE = [
  '/\t/evil.example',
  '/\n/evil.example',
  '/\r/evil.example',
  '/studio\r\nSet-Cookie: injected=1',
  '//evil.example',
  '/\\evil.example',
  '/%09/evil.example',
  '/%2F/evil.example',
  'https://evil.example/studio',
  'javascript:alert(1)',
  'studio',
  'evil.example',
];

/** A cookie value the way a browser would send it back (next-auth reads it percent-decoded). */
const cookieValue = (v: string) => encodeURIComponent(v);

async function csrf(base: string, cookie = '') {
  const res = await fetch(`${base}/api/auth/csrf`, { headers: cookie ? { cookie } : {} });
  expect(res.status, `csrf with cookie ${cookie}`).toBe(200);
  const { csrfToken } = (await res.json()) as { csrfToken: string };
  const csrfCookie = res.headers.getSetCookie().map((l) => l.split(';')[0]).find((c) => c.includes('csrf-token'))!;
  return { csrfToken, csrfCookie };
}

/** The sign-in POST the browser's form makes; `json` false follows next-auth's plain redirect answer. */
async function signIn(opts: { callbackUrl?: string; cookie?: string; json?: boolean }) {
  const base = app!.url;
  const { csrfToken, csrfCookie } = await csrf(base, opts.cookie);
  const body = new URLSearchParams({ csrfToken, email: DEMO_USERS.member.email, password: DEMO_USERS.member.password });
  if (opts.callbackUrl !== undefined) body.set('callbackUrl', opts.callbackUrl);
  if (opts.json !== false) body.set('json', 'true');
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: [csrfCookie, opts.cookie].filter(Boolean).join('; ') },
    body,
  });
  const target = opts.json === false ? res.headers.get('location') : ((await res.json()) as { url?: string }).url;
  return { status: res.status, target, setCookies: res.headers.getSetCookie() };
}

function expectInApp(target: string | null | undefined, label: string) {
  expect(target, label).toBeTruthy();
  const url = new URL(target!, app!.url);
  expect(url.origin, label).toBe(new URL(app!.url).origin);
  expect(url.pathname, label).toBe('/studio');
  expect(target, label).not.toMatch(/[\u0000-\u001f\\]/);
}

describe('sign-in with a hostile callbackUrl', () => {
  it('a good sign-in still lands on the asked-for path of this app', async () => {
    const ok = await signIn({ callbackUrl: '/studio/team' });
    expect(ok.status).toBe(200);
    expect(new URL(ok.target!).pathname).toBe('/studio/team');
    expect(ok.setCookies.some((c) => c.includes('session-token'))).toBe(true);
  });

  it.each(HOSTILE.map((v) => [JSON.stringify(v), v]))('in the body %s: signs in and redirects to the studio', async (label, value) => {
    for (const json of [true, false]) {
      const res = await signIn({ callbackUrl: value, json });
      expect(res.status, `${label} json=${json}`).not.toBe(500);
      expect(res.status, `${label} json=${json}`).toBeLessThan(400);
      expect(res.setCookies.some((c) => c.includes('session-token')), `${label}: signed in`).toBe(true);
      expectInApp(res.target, `${label} json=${json}`);
    }
  });

  it.each(HOSTILE.map((v) => [JSON.stringify(v), v]))('in the next-auth.callback-url cookie %s: auth routes keep working and sign-in redirects in-app', async (label, value) => {
    const cookie = `next-auth.callback-url=${cookieValue(value)}`;
    const session = await fetch(`${app!.url}/api/auth/session`, { headers: { cookie } });
    expect(session.status, label).toBe(200);
    const res = await signIn({ cookie });
    expect(res.status, label).toBe(200);
    expectInApp(res.target, label);
    // The cookie next-auth writes back holds the safe value, not the hostile one.
    const written = res.setCookies.find((c) => c.startsWith('next-auth.callback-url='));
    if (written) expectInApp(decodeURIComponent(written.split(';')[0].split('=').slice(1).join('=')), `${label} (cookie written back)`);
  });

  it('the sign-in page answers for hostile values, and sends a signed-in visitor into the app', async () => {
    const signedIn = await signIn({ callbackUrl: '/studio' });
    const session = signedIn.setCookies.map((c) => c.split(';')[0]).find((c) => c.includes('session-token'))!;
    for (const value of HOSTILE) {
      const label = JSON.stringify(value);
      const anonymous = await fetch(`${app!.url}/signin?callbackUrl=${encodeURIComponent(value)}`, { redirect: 'manual' });
      expect(anonymous.status, label).toBe(200);
      const res = await fetch(`${app!.url}/signin?callbackUrl=${encodeURIComponent(value)}`, { redirect: 'manual', headers: { cookie: session } });
      expect([303, 307, 308], label).toContain(res.status);
      expectInApp(res.headers.get('location'), label);
    }
  });
});
