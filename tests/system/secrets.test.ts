/**
 * Secrets on real server processes. A deployment (no PARTWISE_LOCAL) refuses to start
 * with a session secret or payment keys published in the source. A local run (what
 * `npm start` does without NEXTAUTH_SECRET) makes a random owner-only secret file in
 * its data directory and signs with it: a cookie signed with the old secret derived
 * from the database path is refused, even for the staff account. A real sign-in gives
 * a 12-hour cookie carrying the session generation, the session endpoint renews it,
 * and after "sign out everywhere" the old cookie gets 401 from the API and the sign-in
 * page from the studio. A secret file others could read is replaced at the next start.
 */
import fs from 'node:fs';
import path from 'node:path';
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { decode, encode } from 'next-auth/jwt';
import { openSequelize } from '@/models/db';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { prepareDatabase, startApp, type AppProcess } from '../helpers/app-process';

const COOKIE = 'next-auth.session-token'; // plain http: no __Secure- prefix
let prepared: { dir: string; env: NodeJS.ProcessEnv };
let app: AppProcess | undefined;
let secretFile = '';

function localEnv(): NodeJS.ProcessEnv {
  const env = { ...prepared.env, PARTWISE_LOCAL: '1' };
  delete env.NEXTAUTH_SECRET;
  delete env.AUTH_SECRET;
  return env;
}

async function userId(email: string): Promise<{ id: number; session_generation: number }> {
  const db = openSequelize(String(prepared.env.DATABASE_URL));
  try {
    const [row] = await db.query<{ id: number; session_generation: number }>('SELECT id, session_generation FROM users WHERE email = ?', { replacements: [email], type: QueryTypes.SELECT });
    return row;
  } finally {
    await db.close();
  }
}

async function cookieSignedWith(secret: string, email: string): Promise<string> {
  const user = await userId(email);
  const token = await encode({ token: { uid: user.id, sub: String(user.id), gen: user.session_generation, authTime: Math.floor(Date.now() / 1000) }, secret });
  return `${COOKIE}=${token}`;
}

const get = (p: string, cookie: string) => fetch(`${app!.url}${p}`, { headers: { cookie }, redirect: 'manual' });

function sessionSetCookie(res: Response): string | undefined {
  return res.headers.getSetCookie().find((c) => c.startsWith(`${COOKIE}=`));
}

async function signIn(email: string, password: string): Promise<{ cookie: string; line: string }> {
  const csrf = await fetch(`${app!.url}/api/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const csrfCookie = csrf.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const res = await fetch(`${app!.url}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: csrfCookie },
    body: new URLSearchParams({ csrfToken, email, password, json: 'true' }),
  });
  const line = sessionSetCookie(res);
  if (!line) throw new Error(`no session cookie after sign-in (${res.status})`);
  return { cookie: line.split(';')[0], line };
}

beforeAll(async () => {
  prepared = await prepareDatabase('secrets');
  secretFile = path.join(prepared.dir, 'session-secret');
});

afterAll(async () => {
  await app?.stop('SIGTERM');
});

describe('a deployment (no local flag)', () => {
  it('refuses to start with a session secret published in the source', async () => {
    const env: NodeJS.ProcessEnv = { ...prepared.env, NEXTAUTH_SECRET: 'test-stack-secret-not-for-production' };
    delete env.PARTWISE_LOCAL;
    await expect(startApp(prepared.dir, env)).rejects.toThrow(/exited \(1\)[\s\S]*NEXTAUTH_SECRET is a value published in the Partwise source/);
  });

  it("refuses to start with the payment fake's old fixed keys", async () => {
    const env: NodeJS.ProcessEnv = { ...prepared.env, STRIPE_SECRET_KEY: 'sk_test_partwise_local_fake', STRIPE_WEBHOOK_SECRET: 'whsec_partwise_local_fake_signing_secret' };
    delete env.PARTWISE_LOCAL;
    await expect(startApp(prepared.dir, env)).rejects.toThrow(/exited \(1\)[\s\S]*STRIPE_SECRET_KEY is a key published[\s\S]*STRIPE_WEBHOOK_SECRET is a signing secret published/);
  });
});

describe('a local run (npm start without NEXTAUTH_SECRET)', () => {
  it('writes a random 0600 secret file, signs with it, and refuses cookies signed with the old derived secret', async () => {
    expect(fs.existsSync(secretFile)).toBe(false);
    app = await startApp(prepared.dir, localEnv());
    const stat = fs.statSync(secretFile);
    expect(stat.mode & 0o777).toBe(0o600);
    const secret = fs.readFileSync(secretFile, 'utf8').trim();
    expect(secret.length).toBeGreaterThanOrEqual(32);

    const database = String(prepared.env.DATABASE_URL);
    for (const db of [database, 'data/partwise.sqlite']) {
      const derived = createHash('sha256').update(`partwise-local:${db}`).digest('hex');
      expect(secret).not.toBe(derived);
      const forged = await cookieSignedWith(derived, DEMO_USERS.staff.email);
      expect((await get('/api/account', forged)).status, `forged with sha256(partwise-local:${db})`).toBe(401);
      const page = await get('/support', forged);
      expect(page.status).toBe(307);
      expect(page.headers.get('location')).toMatch(/\/signin\?callbackUrl=/);
    }
    // The server reads the file: a cookie signed with its contents is a real session.
    const real = await get('/api/account', await cookieSignedWith(secret, DEMO_USERS.staff.email));
    expect(real.status).toBe(200);
    expect(((await real.json()) as { user: { isStaff: boolean } }).user.isStaff).toBe(true);
  });

  it('gives a 12-hour cookie with the session generation, renewed by the session endpoint; sign out everywhere ends it', async () => {
    const secret = fs.readFileSync(secretFile, 'utf8').trim();
    const { cookie, line } = await signIn(DEMO_USERS.member.email, DEMO_USERS.member.password);
    const claims = (await decode({ token: cookie.slice(COOKIE.length + 1), secret }))!;
    expect(claims).toMatchObject({ uid: (await userId(DEMO_USERS.member.email)).id, gen: 0 });
    expect(Number(claims.exp) - Number(claims.iat)).toBe(12 * 3600);
    const expires = Date.parse(/Expires=([^;]+)/i.exec(line)![1]);
    expect(Math.abs(expires - (Date.now() + 12 * 3600_000))).toBeLessThan(60_000);
    expect((await get('/studio', cookie)).status).toBe(200);

    await new Promise((r) => setTimeout(r, 1100));
    const renewed = await get('/api/auth/session', cookie);
    expect(((await renewed.json()) as { user?: unknown }).user).toBeDefined();
    const next = sessionSetCookie(renewed)!;
    expect(next, 'the session endpoint re-signs the cookie').toBeDefined();
    const renewedClaims = (await decode({ token: next.split(';')[0].slice(COOKIE.length + 1), secret }))!;
    expect(Number(renewedClaims.exp)).toBeGreaterThan(Number(claims.exp));
    expect(renewedClaims.authTime, 'renewal keeps the time of the sign-in').toBe(claims.authTime);

    const out = await fetch(`${app!.url}/api/account/sessions`, { method: 'DELETE', headers: { cookie, origin: app!.url } });
    expect(out.status).toBe(200);
    for (const old of [cookie, next.split(';')[0]]) {
      expect((await get('/api/account', old)).status).toBe(401);
      const page = await get('/studio', old);
      expect(page.status).toBe(307);
      expect(page.headers.get('location')).toMatch(/\/signin\?callbackUrl=%2Fstudio/);
      const session = await get('/api/auth/session', old);
      expect(await session.json()).toEqual({});
      expect(sessionSetCookie(session), 'an ended session is cleared, not renewed').toMatch(/^next-auth\.session-token=;/);
    }
    // Signing in again works.
    const again = await signIn(DEMO_USERS.member.email, DEMO_USERS.member.password);
    expect((await get('/api/account', again.cookie)).status).toBe(200);
  });

  it('replaces a secret file that others could read at the next start (everyone signs in again)', async () => {
    const before = fs.readFileSync(secretFile, 'utf8').trim();
    const cookie = await cookieSignedWith(before, DEMO_USERS.owner.email);
    expect((await get('/api/account', cookie)).status).toBe(200);
    await app!.stop('SIGTERM');
    fs.chmodSync(secretFile, 0o644);
    app = await app!.restart();
    expect(fs.statSync(secretFile).mode & 0o777).toBe(0o600);
    expect(fs.readFileSync(secretFile, 'utf8').trim()).not.toBe(before);
    expect(app.log()).toMatch(/readable by others \(mode 644\)[\s\S]*A new secret replaced it/);
    expect((await get('/api/account', cookie)).status).toBe(401);
  });
});
