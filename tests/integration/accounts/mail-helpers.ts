import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll } from 'vitest';
import { startSmtpFake, waitForMail, type SmtpFake, type StoredMail } from '@/lib/fakes/smtp';

/** Start the real SMTP fake on a random port for one test file and point the mailer at it. */
export function useMailSink() {
  const state: { fake?: SmtpFake; dir: string } = { dir: fs.mkdtempSync(path.join(os.tmpdir(), 'pw-mail-')) };
  beforeAll(async () => {
    state.fake = await startSmtpFake({ dir: state.dir });
    process.env.SMTP_HOST = state.fake.host;
    process.env.SMTP_PORT = String(state.fake.port);
  });
  afterAll(async () => {
    await state.fake?.stop();
  });
  return {
    dir: () => state.dir,
    /** The newest mail of `kind` to `to`, waiting for it to arrive. */
    mailTo: (to: string, kind: string) => waitForMail(state.dir, (m) => m.to.includes(to) && m.kind === kind),
  };
}

/** The token from the first link in a mail that points at `pathname`. */
export function linkToken(mail: StoredMail, pathname: string): string {
  const link = mail.links.map((l) => new URL(l)).find((u) => u.pathname === pathname);
  if (!link) throw new Error(`no ${pathname} link in mail "${mail.subject}": ${mail.links.join(', ')}`);
  return link.searchParams.get('token') ?? '';
}
