import type { Metadata } from 'next';
import Link from 'next/link';
import { AuditTable } from '@/components/support/AuditTable';
import { formatCount as fmtCount } from '@/lib/format';
import { actionLabel } from '@/components/support/labels';
import { StaffOnly } from '@/components/support/StaffOnly';
import { auditQuerySchema, queryObject, searchAudit, type AuditQuery } from '@/lib/support';
import { zodIssues } from '@/lib/http/handler';
import { pageSupportActor } from '@/lib/support/page';

export const metadata: Metadata = { title: 'Audit log · Support' };
export const dynamic = 'force-dynamic';

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

function pageHref(q: AuditQuery, page: number): string {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries({ ...q, page })) if (v !== '' && !(k === 'page' && v === 1) && !(k === 'pageSize' && v === 50)) p.set(k, String(v));
  const s = p.toString();
  return s ? `/support/audit?${s}` : '/support/audit';
}

/** Every sensitive action across Partwise, filtered on the server; a plain GET form, no script needed. */
export default async function AuditLogPage({ searchParams }: Props) {
  const actor = await pageSupportActor('/support/audit');
  if (!actor) return <StaffOnly />;
  const raw = queryObject(await searchParams);
  const parsed = auditQuerySchema.safeParse(raw);
  const issues = parsed.success ? [] : zodIssues(parsed.error);
  const query = parsed.success ? parsed.data : auditQuerySchema.parse({});
  const result = await searchAudit(query);
  const value = (k: keyof AuditQuery) => (parsed.success ? String(query[k] ?? '') : (raw[k] ?? ''));
  const from = result.total ? (result.page - 1) * result.pageSize + 1 : 0;

  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-3xl font-semibold">Audit log</h1>
        <p className="mt-1 max-w-2xl text-ink-soft">Sign-in failures, role changes, publishing, token rotation, support actions, plan changes and payment webhooks: who, when, what and from which address. Times are UTC.</p>
      </div>

      <form method="get" action="/support/audit" className="pw-card grid gap-4 p-5 sm:grid-cols-6" aria-label="Filter the audit log">
        <label className="sm:col-span-2">
          <span className="pw-label">Action</span>
          <input className="pw-input" name="action" list="audit-actions" defaultValue={value('action')} placeholder="e.g. support. or embed.publish" />
          <datalist id="audit-actions">
            {result.actions.map((a) => (
              <option key={a} value={a}>
                {actionLabel(a)}
              </option>
            ))}
          </datalist>
        </label>
        <label className="sm:col-span-2">
          <span className="pw-label">Actor e-mail</span>
          <input className="pw-input" name="actor" defaultValue={value('actor')} placeholder="part of an address" />
        </label>
        <label className="sm:col-span-2">
          <span className="pw-label">Workspace</span>
          <input className="pw-input" name="workspace" defaultValue={value('workspace')} placeholder="name, slug or id" />
        </label>
        <label className="sm:col-span-2">
          <span className="pw-label">From (UTC day)</span>
          <input className="pw-input" type="date" name="from" defaultValue={value('from')} aria-invalid={issues.some((i) => i.field === 'from')} />
        </label>
        <label className="sm:col-span-2">
          <span className="pw-label">To (UTC day, inclusive)</span>
          <input className="pw-input" type="date" name="to" defaultValue={value('to')} aria-invalid={issues.some((i) => i.field === 'to')} />
        </label>
        <div className="flex items-end gap-3 sm:col-span-2">
          <button type="submit" className="pw-button">
            Filter
          </button>
          <Link href="/support/audit" className="pw-button-quiet">
            Clear
          </Link>
        </div>
        {issues.length ? (
          <ul className="rounded-lg bg-clay-100 px-4 py-3 text-sm text-clay-700 sm:col-span-6" role="alert">
            {issues.map((i) => (
              <li key={i.field + i.message}>
                {i.field}: {i.message} The log below is unfiltered.
              </li>
            ))}
          </ul>
        ) : null}
      </form>

      <section className="pw-card overflow-x-auto">
        <AuditTable events={result.events} showWorkspace empty="No entries match these filters." />
      </section>

      <nav aria-label="Pages" className="flex items-center justify-between text-sm text-ink-soft">
        <span>{result.total ? `${fmtCount(from)}–${fmtCount(from + result.events.length - 1)} of ${fmtCount(result.total)}` : 'Nothing to show'}</span>
        <span className="flex items-center gap-2">
          {result.page > 1 ? (
            <Link className="pw-button-quiet" href={pageHref(query, result.page - 1)}>
              Newer
            </Link>
          ) : null}
          <span>
            Page {result.page} of {result.pageCount}
          </span>
          {result.page < result.pageCount ? (
            <Link className="pw-button-quiet" href={pageHref(query, result.page + 1)}>
              Older
            </Link>
          ) : null}
        </span>
      </nav>
    </div>
  );
}
