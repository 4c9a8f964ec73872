import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SMTPServer } from 'smtp-server';
import { deliverPendingMail, enqueueMail, SUPPORT_ADDRESS } from '@/lib/mail';
import { MailMessage, sequelize } from '@/models';

/**
 * A slow SMTP server (every message takes 400 ms to accept): the retry timer running
 * while a first delivery still waits for the server must not send the message again.
 */
const received: { to: string; replyTo: string }[] = [];
let server: SMTPServer;
let port = 0;

beforeAll(async () => {
  server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, session, callback) {
      let raw = '';
      stream.on('data', (c: Buffer) => (raw += c.toString('utf8')));
      stream.on('end', () => {
        received.push({ to: session.envelope.rcptTo.map((r) => r.address).join(','), replyTo: /^Reply-To: (.*)$/im.exec(raw)?.[1]?.trim() ?? '' });
        setTimeout(() => callback(), 400);
      });
    },
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()));
  port = (server.server.address() as { port: number }).port;
  process.env.SMTP_HOST = '127.0.0.1';
  process.env.SMTP_PORT = String(port);
});
afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
});

describe('mail outbox', () => {
  it('sends a message once even when retries run while the first delivery is still talking to the server', async () => {
    const row = await enqueueMail({ to: 'owner@club.test', subject: 'Your calculator was switched off', text: 'Reason: …', kind: 'support-embed-disabled' });
    // The first delivery has claimed the row and is waiting for the slow server.
    await expect.poll(async () => (await MailMessage.findByPk(row.id))?.attempts).toBe(1);
    const retries = await Promise.all([deliverPendingMail(), deliverPendingMail()]);
    expect(retries.map((r) => r.sent)).toEqual([0, 0]);
    await expect.poll(async () => (await MailMessage.findByPk(row.id))?.status, { timeout: 5000 }).toBe('sent');
    expect(await deliverPendingMail()).toMatchObject({ sent: 0, pending: 0 });
    expect(received.filter((m) => m.to === 'owner@club.test')).toHaveLength(1);
  });

  it('answers to a person: replies go to the support address, not to the no-reply sender', async () => {
    await enqueueMail({ to: 'reply@club.test', subject: 'Hello', text: 'hello', kind: 'test' });
    await expect.poll(() => received.find((m) => m.to === 'reply@club.test'), { timeout: 5000 }).toBeTruthy();
    expect(received.find((m) => m.to === 'reply@club.test')!.replyTo).toContain(SUPPORT_ADDRESS);
  });

  it('a delivery that died mid-send is picked up again after its lease, not before', async () => {
    const row = await MailMessage.create({ to: 'stuck@club.test', subject: 'Stuck', text: 'x', kind: 'test', status: 'sending', attempts: 1 });
    expect((await deliverPendingMail()).sent).toBe(0);
    // Backdate the claim as a crashed deliverer would have left it (sequelize stamps updatedAt itself, so raw SQL).
    const column = MailMessage.getAttributes().updatedAt.field;
    await sequelize.query(`UPDATE mail_outbox SET "${column}" = ? WHERE id = ?`, { replacements: [new Date(Date.now() - 10 * 60_000), row.id] });
    expect((await MailMessage.findByPk(row.id))!.updatedAt.getTime()).toBeLessThan(Date.now() - 60_000);
    expect((await deliverPendingMail()).sent).toBe(1);
    expect(received.filter((m) => m.to === 'stuck@club.test')).toHaveLength(1);
  });
});
