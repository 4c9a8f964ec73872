import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { Logo } from '@/components/brand/Logo';
import { readMailbox } from '@/lib/fakes/smtp';
import { pageActor } from '@/lib/auth/page';
import { devMailAllowed, mailSinkDir } from '@/lib/mail/dev';

export const metadata: Metadata = { title: 'Local mail sink', robots: { index: false } };
export const dynamic = 'force-dynamic';

/**
 * Loopback-only local runs, for staff or with PARTWISE_DEV_MAIL=1 (see lib/mail/dev.ts):
 * every message the SMTP fake received, newest first, links clickable. Anywhere else a 404.
 */
export default async function DevMailPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  if (!(await devMailAllowed({ viewerIsStaff: async () => (await pageActor())?.isStaff === true }))) notFound();
  const { to } = await searchParams;
  const dir = mailSinkDir();
  const all = dir ? readMailbox(dir) : [];
  const mails = to ? all.filter((m) => m.to.some((t) => t.toLowerCase() === to.toLowerCase())) : all;
  return (
    <div className="mx-auto max-w-4xl px-6 py-6">
      <header className="flex items-center justify-between">
        <Link href="/" aria-label="Partwise home">
          <Logo />
        </Link>
        <span className="rounded-full bg-saffron-100 px-3 py-1 text-xs font-bold text-saffron-700">local only</span>
      </header>
      <h1 className="mt-8 text-3xl font-bold">Mail sink</h1>
      <p className="mt-2 text-ink-soft">
        Messages Partwise sent through the local SMTP fake{dir ? <> (stored in <code className="text-sm">{dir}</code>)</> : null}. Nothing here left this machine.
        {to ? (
          <>
            {' '}Showing mail to <strong>{to}</strong> · <Link className="font-bold text-moss-700 underline" href="/dev/mail">show all</Link>
          </>
        ) : null}
      </p>
      {!dir ? <p className="mt-6 rounded-lg bg-clay-100 px-4 py-3 text-clay-700">MAIL_SINK_DIR is not set: start Partwise with `npm start`, which runs the mail fake.</p> : null}
      {dir && mails.length === 0 ? <p className="mt-6 text-ink-soft">No mail yet. Sign up or invite someone, then reload.</p> : null}
      <ol className="mt-6 space-y-4" aria-label="Received mail">
        {mails.map((m) => (
          <li key={m.id} className="pw-card p-5" data-mail-kind={m.kind ?? ''}>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h2 className="font-sans text-lg font-bold">{m.subject || '(no subject)'}</h2>
              <time className="text-sm text-ink-faint" dateTime={m.receivedAt}>
                {m.receivedAt.replace('T', ' ').slice(0, 19)} UTC
              </time>
            </div>
            <p className="mt-1 text-sm text-ink-soft">
              to <strong>{m.to.join(', ')}</strong> · from {m.from}
              {m.kind ? <> · <span className="rounded bg-paper-deep px-1.5 py-0.5 text-xs">{m.kind}</span></> : null}
            </p>
            {m.links.length ? (
              <ul className="mt-3 space-y-1">
                {m.links.map((href) => (
                  <li key={href}>
                    <a href={href} className="break-all text-sm font-bold text-moss-700 underline">
                      {href}
                    </a>
                  </li>
                ))}
              </ul>
            ) : null}
            <details className="mt-3">
              <summary className="cursor-pointer text-sm text-ink-soft">Plain text</summary>
              <pre className="mt-2 whitespace-pre-wrap rounded-lg bg-paper p-3 text-sm">{m.text}</pre>
            </details>
          </li>
        ))}
      </ol>
    </div>
  );
}
