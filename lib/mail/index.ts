import nodemailer, { type Transporter } from 'nodemailer';
import { Op } from 'sequelize';
import { MailMessage } from '@/models';

/**
 * The one mail module. Every message is first written to the outbox table, then
 * delivered over SMTP (a local fake in development and tests). A failed delivery
 * stays pending and is retried by the next `deliverPendingMail()` call, so a mail
 * server that is down loses nothing and sends nothing twice.
 */
export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** What the mail is for, e.g. "verify-email", "invitation", "receipt". */
  kind: string;
}

export const MAIL_FROM = process.env.MAIL_FROM ?? 'Partwise <no-reply@partwise.local>';
/** Where people reach a person: replies to any Partwise mail go to the support inbox. */
export const SUPPORT_ADDRESS = process.env.PARTWISE_SUPPORT_EMAIL ?? 'support@partwise.local';
const MAIL_REPLY_TO = SUPPORT_ADDRESS;
const MAX_ATTEMPTS = 20;

let transport: Transporter | undefined;
let transportKey = '';

function smtpTransport(): Transporter {
  const host = process.env.SMTP_HOST ?? '127.0.0.1';
  const port = Number(process.env.SMTP_PORT ?? 2525);
  const key = `${host}:${port}`;
  if (!transport || key !== transportKey) {
    transport = nodemailer.createTransport({
      host,
      port,
      secure: false,
      ignoreTLS: process.env.SMTP_TLS !== '1',
      auth: process.env.SMTP_USER ? { user: process.env.SMTP_USER, pass: process.env.SMTP_PASSWORD ?? '' } : undefined,
      connectionTimeout: 3000,
      greetingTimeout: 3000,
      socketTimeout: 5000,
    });
    transportKey = key;
  }
  return transport;
}

/** Queue a mail and try to deliver it now; resolves once it is safely in the outbox. */
export async function enqueueMail(mail: OutgoingMail): Promise<MailMessage> {
  ensureMailRetryTimer();
  const row = await MailMessage.create({ to: mail.to, subject: mail.subject, text: mail.text, html: mail.html ?? null, kind: mail.kind });
  // Delivery is best effort here; the outbox keeps it for the next attempt.
  void deliverOne(row).catch(() => undefined);
  return row;
}

/**
 * A claimed message is 'sending' until the SMTP answer; a deliverer that died
 * mid-send leaves it claimed, and after this lease (longer than the transport's
 * connection + greeting + socket timeouts) it counts as pending again.
 */
const SENDING_LEASE_MS = 60_000;

async function deliverOne(row: MailMessage): Promise<boolean> {
  // Claim the row first (pending → sending) so two deliverers never send the same message:
  // while one waits for the SMTP server, the retry timer must not pick the row up again.
  const [claimed] = await MailMessage.update(
    { attempts: row.attempts + 1, status: 'sending' },
    { where: { id: row.id, attempts: row.attempts, [Op.or]: [{ status: 'pending' }, { status: 'sending', updatedAt: { [Op.lt]: new Date(Date.now() - SENDING_LEASE_MS) } }] } },
  );
  if (claimed !== 1) return false;
  try {
    await smtpTransport().sendMail({ from: MAIL_FROM, replyTo: MAIL_REPLY_TO, to: row.to, subject: row.subject, text: row.text, html: row.html ?? undefined, headers: { 'X-Partwise-Kind': row.kind, 'X-Partwise-Mail-Id': String(row.id) } });
    await MailMessage.update({ status: 'sent', sentAt: new Date(), lastError: null }, { where: { id: row.id } });
    return true;
  } catch (e) {
    const attempts = row.attempts + 1;
    await MailMessage.update({ status: attempts >= MAX_ATTEMPTS ? 'failed' : 'pending', lastError: String((e as Error).message).slice(0, 500) }, { where: { id: row.id } });
    return false;
  }
}

/** Retry everything still pending (called on a timer by the server and by tests). */
export async function deliverPendingMail(limit = 50): Promise<{ sent: number; pending: number }> {
  const stale = new Date(Date.now() - SENDING_LEASE_MS);
  const rows = await MailMessage.findAll({
    where: { attempts: { [Op.lt]: MAX_ATTEMPTS }, [Op.or]: [{ status: 'pending' }, { status: 'sending', updatedAt: { [Op.lt]: stale } }] },
    order: [['id', 'ASC']],
    limit,
  });
  let sent = 0;
  for (const row of rows) if (await deliverOne(row)) sent++;
  const pending = await MailMessage.count({ where: { status: 'pending' } });
  return { sent, pending };
}

const RETRY_INTERVAL_MS = Number(process.env.MAIL_RETRY_INTERVAL_MS ?? 30_000);

/**
 * Inside the Next server, retry pending mail every RETRY_INTERVAL_MS. Started by the
 * first request that reads a session (lib/auth/guard.ts) or queues mail; one timer per
 * process. Several processes may each run one: the claim in deliverOne keeps every
 * message sent once.
 */
export function ensureMailRetryTimer(): void {
  if (process.env.NEXT_RUNTIME !== 'nodejs' || process.env.NEXT_PHASE === 'phase-production-build') return;
  const g = globalThis as { __partwiseMailRetry?: ReturnType<typeof setInterval> };
  if (g.__partwiseMailRetry) return;
  g.__partwiseMailRetry = setInterval(() => {
    deliverPendingMail().catch((e) => console.error('[partwise] mail retry failed:', (e as Error).message));
  }, RETRY_INTERVAL_MS);
  g.__partwiseMailRetry.unref?.();
}
