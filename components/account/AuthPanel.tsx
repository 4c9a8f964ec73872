/** The card every account page sits in: heading, a line of context, the form, a footer link. */
export function AuthPanel({ title, lead, children, footer }: { title: string; lead?: React.ReactNode; children: React.ReactNode; footer?: React.ReactNode }) {
  return (
    <section className="pw-card p-7 sm:p-8">
      <h1 className="text-3xl font-bold text-ink">{title}</h1>
      {lead ? <p className="mt-2 text-ink-soft">{lead}</p> : null}
      <div className="mt-6">{children}</div>
      {footer ? <div className="mt-6 border-t border-ink/10 pt-4 text-sm text-ink-soft">{footer}</div> : null}
    </section>
  );
}
