/**
 * The local mail sink (/dev/mail) on real server processes. It lists every mail the
 * SMTP fake received — reset links included — so a server others can reach must never
 * serve it: bound to 0.0.0.0 as a deployment would be, it answers 404 even with
 * PARTWISE_DEV_MAIL=1, to visitors and staff alike, and no page links to it. On a
 * loopback-only run without the flag (a plain local `npm start`) only staff see it.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { startSmtpFake, waitForMail, type SmtpFake } from '@/lib/fakes/smtp';
import { prepareDatabase, startApp, type AppProcess } from '../helpers/app-process';

const RESET_LINK = 'http://127.0.0.1/reset-password?token=secret-reset-token-for-the-owner-0123456789';
let smtp: SmtpFake;
let deployment: AppProcess | undefined;
let local: AppProcess | undefined;
const sinkDir = fs.mkdtempSync(path.join(os.tmpdir(), 'pw-system-sink-'));

beforeAll(async () => {
  // A real mail in the sink, as the SMTP fake stores it: what an attacker would be after.
  smtp = await startSmtpFake({ dir: sinkDir });
  await nodemailer.createTransport({ host: smtp.host, port: smtp.port, secure: false, ignoreTLS: true }).sendMail({
    from: 'Partwise <no-reply@partwise.local>',
    to: DEMO_USERS.owner.email,
    subject: 'Choose a new Partwise password',
    text: `Reset here:\n\n${RESET_LINK}\n`,
    headers: { 'X-Partwise-Kind': 'reset-password' },
  });
  await waitForMail(sinkDir, (m) => m.to.includes(DEMO_USERS.owner.email));

  const prepared = await prepareDatabase('mail-sink');
  const env = { ...prepared.env, MAIL_SINK_DIR: sinkDir, SMTP_HOST: smtp.host, SMTP_PORT: String(smtp.port) };
  [deployment, local] = await Promise.all([
    // As deployed: all interfaces, and even the opt-in flag set by mistake.
    startApp(prepared.dir, { ...env, PARTWISE_DEV_MAIL: '1', HOST: '0.0.0.0' }, undefined, '0.0.0.0'),
    // A plain local run: loopback only, no flag.
    startApp(prepared.dir, { ...env, PARTWISE_DEV_MAIL: '' }),
  ]);
});

afterAll(async () => {
  await Promise.all([deployment?.stop('SIGTERM'), local?.stop('SIGTERM')]);
  await smtp?.stop();
});

/** Cookie header of a credentials sign-in over HTTP, as the browser's sign-in form does it. */
async function signInCookie(base: string, email: string, password: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const i = pair.indexOf('=');
      jar.set(pair.slice(0, i), pair.slice(i + 1));
    }
  };
  const header = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  const csrf = await fetch(`${base}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: header() },
    body: new URLSearchParams({ csrfToken, email, password, json: 'true' }),
  });
  keep(res);
  expect([...jar.keys()].some((k) => k.endsWith('session-token')), `signed in as ${email}`).toBe(true);
  return header();
}

async function get(base: string, pathname: string, cookie?: string, redirect: RequestRedirect = 'manual') {
  const res = await fetch(`${base}${pathname}`, { redirect, headers: cookie ? { cookie } : {} });
  return { status: res.status, text: await res.text() };
}

describe('a server bound to all interfaces (a deployment)', () => {
  it('answers 404 on /dev/mail to visitors, even with PARTWISE_DEV_MAIL=1, and shows no mail', async () => {
    for (const pathname of ['/dev/mail', `/dev/mail?to=${encodeURIComponent(DEMO_USERS.owner.email)}`, '/dev/mail/']) {
      // (Next answers the trailing-slash form with a redirect to the plain one; follow it.)
      const res = await get(deployment!.url, pathname, undefined, 'follow');
      expect(res.status, pathname).toBe(404);
      expect(res.text).not.toContain('secret-reset-token');
      expect(res.text).not.toContain('Mail sink');
    }
  });

  it('answers 404 to staff too', async () => {
    const cookie = await signInCookie(deployment!.url, DEMO_USERS.staff.email, DEMO_USERS.staff.password);
    const res = await get(deployment!.url, '/dev/mail', cookie);
    expect(res.status).toBe(404);
    expect(res.text).not.toContain('secret-reset-token');
  });

  it('links to the sink from no page', async () => {
    for (const pathname of ['/verify?sent=1&email=a%40example.test', '/verify', '/signup']) {
      const res = await get(deployment!.url, pathname);
      expect(res.status, pathname).toBe(200);
      expect(res.text, pathname).not.toContain('/dev/mail');
    }
  });
});

describe('a loopback-only local run without the flag', () => {
  it('hides the sink from visitors and signed-in customers', async () => {
    expect((await get(local!.url, '/dev/mail')).status).toBe(404);
    expect((await get(local!.url, '/verify?sent=1')).text).not.toContain('/dev/mail');
    const owner = await signInCookie(local!.url, DEMO_USERS.owner.email, DEMO_USERS.owner.password);
    const res = await get(local!.url, '/dev/mail', owner);
    expect(res.status).toBe(404);
    expect(res.text).not.toContain('secret-reset-token');
  });

  it('shows it to staff, mail and links included (so the rule above is what hides it)', async () => {
    const staff = await signInCookie(local!.url, DEMO_USERS.staff.email, DEMO_USERS.staff.password);
    const res = await get(local!.url, '/dev/mail', staff);
    expect(res.status).toBe(200);
    expect(res.text).toContain('secret-reset-token');
    expect((await get(local!.url, '/verify?sent=1', staff)).text).toContain('href="/dev/mail"');
  });
});
