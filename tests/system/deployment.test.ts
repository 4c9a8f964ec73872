/**
 * Deployment settings on real server processes: behind https (NEXTAUTH_URL https://…)
 * every cookie the app sets is Secure, HttpOnly and SameSite=Lax, with the __Secure- /
 * __Host- prefixes; on plain local http the same cookies carry no Secure flag (or a
 * browser would drop them); and a production server without its signing secret refuses
 * to start, saying which setting is missing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { prepareDatabase, startApp, type AppProcess } from '../helpers/app-process';

const PUBLIC_URL = 'https://partwise.test';
let app: AppProcess | undefined;
let prepared: { dir: string; env: NodeJS.ProcessEnv };

beforeAll(async () => {
  prepared = await prepareDatabase('deployment');
  app = await startApp(prepared.dir, { ...prepared.env, NEXTAUTH_URL: PUBLIC_URL });
});

afterAll(async () => {
  await app?.stop('SIGTERM');
});

/** Set-Cookie lines of a response, split into name, value and lower-cased attributes. */
function cookiesOf(res: Response) {
  return res.headers.getSetCookie().map((line) => {
    const [pair, ...attrs] = line.split(';').map((s) => s.trim());
    const i = pair.indexOf('=');
    return { name: pair.slice(0, i), value: pair.slice(i + 1), attrs: attrs.map((a) => a.toLowerCase()), line };
  });
}

async function signIn(base: string) {
  const csrf = await fetch(`${base}/api/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const csrfCookies = cookiesOf(csrf);
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: csrfCookies.map((c) => `${c.name}=${c.value}`).join('; ') },
    body: new URLSearchParams({ csrfToken, email: DEMO_USERS.member.email, password: DEMO_USERS.member.password, json: 'true' }),
  });
  return { csrfCookies, sessionCookies: cookiesOf(res), status: res.status };
}

describe('cookies behind https', () => {
  it('are Secure, HttpOnly and SameSite=Lax with secure name prefixes, and the session works', async () => {
    const { csrfCookies, sessionCookies, status } = await signIn(app!.url);
    expect(status).toBeLessThan(400);
    const csrf = csrfCookies.find((c) => c.name.includes('csrf-token'));
    expect(csrf?.name).toBe('__Host-next-auth.csrf-token');
    const session = sessionCookies.find((c) => c.name.includes('session-token'));
    expect(session, sessionCookies.map((c) => c.line).join('\n')).toBeDefined();
    expect(session!.name).toBe('__Secure-next-auth.session-token');
    for (const c of [csrf!, session!]) {
      expect(c.attrs, c.name).toEqual(expect.arrayContaining(['secure', 'httponly', 'samesite=lax', 'path=/']));
    }

    const cookie = `${session!.name}=${session!.value}`;
    const account = await fetch(`${app!.url}/api/account`, { headers: { cookie } });
    expect(account.status).toBe(200);
    const body = (await account.json()) as { user: { email: string }; workspaces: { id: number }[] };
    expect(body.user.email).toBe(DEMO_USERS.member.email);

    const switched = await fetch(`${app!.url}/api/workspaces/current`, {
      method: 'POST',
      headers: { cookie, 'content-type': 'application/json', origin: PUBLIC_URL },
      body: JSON.stringify({ workspaceId: body.workspaces[0].id }),
    });
    expect(switched.status).toBe(200);
    const workspace = cookiesOf(switched).find((c) => c.name === 'partwise.workspace');
    expect(workspace?.attrs).toEqual(expect.arrayContaining(['secure', 'httponly', 'samesite=lax']));
  });

  it('are not Secure on plain local http, where a browser would drop Secure cookies', async () => {
    const local = process.env.PARTWISE_BASE_URL;
    expect(local, 'the shared test stack runs on http://').toMatch(/^http:\/\//);
    const { csrfCookies, sessionCookies } = await signIn(local!);
    const session = sessionCookies.find((c) => c.name.includes('session-token'));
    expect(session?.name).toBe('next-auth.session-token');
    for (const c of [...csrfCookies, session!]) {
      expect(c.attrs, c.name).not.toContain('secure');
      expect(c.attrs, c.name).toContain('httponly');
    }
  });
});

describe('a production server without its secret', () => {
  it('refuses to start and names the missing setting', async () => {
    const env = { ...prepared.env };
    delete env.NEXTAUTH_SECRET;
    delete env.AUTH_SECRET;
    delete env.PARTWISE_LOCAL;
    await expect(startApp(prepared.dir, env)).rejects.toThrow(/exited \(1\)[\s\S]*NEXTAUTH_SECRET is not set/);
  });
});
