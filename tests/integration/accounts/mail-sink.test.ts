import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readMailbox, startSmtpFake, waitForMail, type SmtpFake } from '@/lib/fakes/smtp';
import { deliverPendingMail, enqueueMail } from '@/lib/mail';
import { MailMessage } from '@/models';

let fake: SmtpFake;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'pw-mail-'));
beforeAll(async () => {
  fake = await startSmtpFake({ dir });
  process.env.SMTP_HOST = fake.host;
  process.env.SMTP_PORT = String(fake.port);
});
afterAll(async () => {
  await fake?.stop();
});

describe('SMTP fake + outbox', () => {
  it('receives a queued mail over SMTP and stores it parsed, links included', async () => {
    const row = await enqueueMail({ to: 'rider@example.test', subject: 'Check this', text: 'Open http://localhost:3000/verify?token=abc123 to continue.', kind: 'verify-email' });
    const mail = await waitForMail(dir, (m) => m.to.includes('rider@example.test'));
    expect(mail.subject).toBe('Check this');
    expect(mail.kind).toBe('verify-email');
    expect(mail.links).toEqual(['http://localhost:3000/verify?token=abc123']);
    expect(fs.readdirSync(dir).filter((n) => n.endsWith('.tmp'))).toEqual([]);
    await expect.poll(async () => (await MailMessage.findByPk(row.id))?.status).toBe('sent');
  });

  it('keeps mail pending while the server is down and delivers it on retry, once', async () => {
    process.env.SMTP_PORT = '1'; // nothing listens there
    const row = await enqueueMail({ to: 'later@example.test', subject: 'Later', text: 'hello', kind: 'test' });
    await expect.poll(async () => (await MailMessage.findByPk(row.id))?.attempts).toBe(1);
    expect((await MailMessage.findByPk(row.id))?.status).toBe('pending');
    process.env.SMTP_PORT = String(fake.port);
    const result = await deliverPendingMail();
    expect(result.sent).toBe(1);
    await waitForMail(dir, (m) => m.to.includes('later@example.test'));
    expect(await deliverPendingMail()).toMatchObject({ sent: 0, pending: 0 });
    expect(readMailbox(dir).filter((m) => m.to.includes('later@example.test'))).toHaveLength(1);
  });
});
