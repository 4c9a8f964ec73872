import Link from 'next/link';

/** Heading block shared by studio pages: a trail back, a title and a one-line lead. */
export function StudioPage({ trail, title, lead, actions, children }: { trail?: { href: string; label: string }[]; title: string; lead?: React.ReactNode; actions?: React.ReactNode; children: React.ReactNode }) {
  return (
    <div className="w-full">
      {trail && trail.length > 0 && (
        <nav aria-label="Breadcrumb" className="mb-3 text-sm text-ink-soft">
          {trail.map((t, i) => (
            <span key={t.href}>
              {i > 0 && <span className="mx-2 text-ink-faint">/</span>}
              <Link href={t.href} className="font-bold text-moss-700 hover:underline">
                {t.label}
              </Link>
            </span>
          ))}
        </nav>
      )}
      <div className="mb-8 flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1 className="text-3xl font-semibold text-ink">{title}</h1>
          {lead && <p className="mt-2 max-w-2xl text-ink-soft">{lead}</p>}
        </div>
        {actions}
      </div>
      <div className="space-y-8">{children}</div>
    </div>
  );
}

export function Section({ title, lead, children, id, aside }: { title: string; lead?: React.ReactNode; children: React.ReactNode; id?: string; aside?: React.ReactNode }) {
  return (
    <section className="pw-card p-6" id={id} aria-labelledby={id ? `${id}-title` : undefined}>
      <div className="mb-4 flex flex-wrap items-baseline justify-between gap-3">
        <div>
          <h2 id={id ? `${id}-title` : undefined} className="text-xl font-semibold">
            {title}
          </h2>
          {lead && <p className="mt-1 text-sm text-ink-soft">{lead}</p>}
        </div>
        {aside}
      </div>
      {children}
    </section>
  );
}

export function ErrorNote({ message, issues }: { message: string; issues?: { field: string; message: string }[] }) {
  return (
    <div role="alert" className="rounded-lg border border-clay-500/30 bg-clay-100 px-4 py-3 text-sm text-clay-700">
      <p className="font-bold">{message}</p>
      {issues && issues.length > 1 && (
        <ul className="mt-2 list-disc space-y-0.5 pl-5">
          {issues.slice(0, 8).map((i, n) => (
            <li key={n}>
              {/* Only a field described in words ("row 12, column speed") is worth naming; a dotted path is for programs. */}
              {/\s/.test(i.field) && <span className="font-bold">{i.field}: </span>}
              {i.message}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
