import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';

/**
 * A real SMTP server on loopback that accepts every message and stores it, parsed,
 * as one JSON file per message in a directory (the "mail sink"). `npm start` and
 * `npm test` run it (see scripts/services.ts); `/dev/mail` and the tests read the
 * directory. It never relays anything anywhere.
 */
export interface StoredMail {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  /** X-Partwise-Kind header of the outbox, e.g. "verify-email". */
  kind: string | null;
  /** Every http(s) link found in the text and HTML parts, in order, without repeats. */
  links: string[];
}

export interface SmtpFake {
  host: string;
  port: number;
  dir: string;
  stop(): Promise<void>;
}

function addresses(value: AddressObject | AddressObject[] | undefined): string[] {
  if (!value) return [];
  const list = Array.isArray(value) ? value : [value];
  return list.flatMap((a) => a.value.map((v) => v.address ?? '').filter(Boolean));
}

export function extractLinks(...parts: (string | null | undefined)[]): string[] {
  const seen = new Set<string>();
  for (const part of parts) {
    for (const match of (part ?? '').matchAll(/https?:\/\/[^\s<>"')\]]+/g)) seen.add(match[0].replace(/[.,;:]+$/, '').replace(/&amp;/g, '&'));
  }
  return [...seen];
}

/** Start the fake on `port` (0 = any free port) and store mail in `dir`. */
export async function startSmtpFake(opts: { dir: string; port?: number; host?: string }): Promise<SmtpFake> {
  const dir = path.resolve(opts.dir);
  fs.mkdirSync(dir, { recursive: true });
  const host = opts.host ?? '127.0.0.1';
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    banner: 'Partwise local mail sink',
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const receivedAt = new Date();
          const id = `${receivedAt.getTime()}-${randomUUID().slice(0, 8)}`;
          const html = typeof parsed.html === 'string' ? parsed.html : null;
          const kind = parsed.headers.get('x-partwise-kind');
          const mail: StoredMail = {
            id,
            receivedAt: receivedAt.toISOString(),
            from: addresses(parsed.from)[0] ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
            to: session.envelope.rcptTo.length ? session.envelope.rcptTo.map((r) => r.address) : addresses(parsed.to),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html,
            kind: typeof kind === 'string' ? kind : null,
            links: extractLinks(parsed.text, html),
          };
          // Write then rename, so a reader never sees half a file.
          const file = path.join(dir, `${id}.json`);
          fs.writeFileSync(`${file}.tmp`, JSON.stringify(mail, null, 2));
          fs.renameSync(`${file}.tmp`, file);
          callback();
        })
        .catch((e: Error) => callback(e));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, host, () => resolve());
  });
  server.on('error', (e) => console.error('[smtp-fake]', e.message));
  const port = ((server as unknown as { server: { address(): AddressInfo } }).server.address()).port;
  return {
    host,
    port,
    dir,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/** Every stored message, newest first. Missing directory → none. */
export function readMailbox(dir: string): StoredMail[] {
  let names: string[];
  try {
    names = fs.readdirSync(dir).filter((n) => n.endsWith('.json'));
  } catch {
    return [];
  }
  const mails: StoredMail[] = [];
  for (const name of names) {
    try {
      mails.push(JSON.parse(fs.readFileSync(path.join(dir, name), 'utf8')) as StoredMail);
    } catch {
      // A file being replaced right now; the next read sees it.
    }
  }
  return mails.sort((a, b) => (a.receivedAt < b.receivedAt ? 1 : a.receivedAt > b.receivedAt ? -1 : b.id.localeCompare(a.id)));
}

/** Wait until a stored message matches, or fail after `timeoutMs`. */
export async function waitForMail(dir: string, match: (m: StoredMail) => boolean, timeoutMs = 10_000): Promise<StoredMail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = readMailbox(dir).find(match);
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no matching mail arrived in ${dir} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** The entry scripts/services.ts runs for `npm start` and `npm test`. */
export const smtpFakeService = {
  name: 'smtp-fake',
  async start({ dataDir }: { dataDir: string; appUrl: string }) {
    // A configured SMTP_HOST is a real mail server: the sink must not swallow its mail.
    if (process.env.SMTP_HOST && process.env.SMTP_FAKE !== '1') return { name: 'smtp-fake', env: {} as Record<string, string>, stop: async () => undefined };
    const fake = await startSmtpFake({ dir: path.join(dataDir, 'mail'), port: Number(process.env.SMTP_FAKE_PORT ?? 0) });
    console.log(`[partwise] mail sink: SMTP on ${fake.host}:${fake.port}, messages in ${fake.dir}`);
    return {
      name: 'smtp-fake',
      env: { SMTP_HOST: fake.host, SMTP_PORT: String(fake.port), MAIL_SINK_DIR: fake.dir },
      stop: fake.stop,
    };
  },
};
