import { servedVersionWords } from '@/lib/embeds/status-words';
import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { AuditTable } from '@/components/support/AuditTable';
import { ClearFlagButton } from '@/components/support/ClearFlagButton';
import { formatCount as fmtCount, formatDate as fmtDate, formatDateTime as fmtDateTime } from '@/lib/format';
import { ReasonForm } from '@/components/support/ReasonForm';
import { ReportList } from '@/components/support/ReportList';
import { StaffOnly } from '@/components/support/StaffOnly';
import { SupportStatus } from '@/components/support/SupportStatus';
import { UsageChart } from '@/components/support/UsageChart';
import { REPORT_REASONS } from '@/lib/embeds/reports';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { calculatorDetail, type CalculatorDetail } from '@/lib/support';
import { pageSupportActor } from '@/lib/support/page';

export const metadata: Metadata = { title: 'Calculator · Support' };
export const dynamic = 'force-dynamic';

type Props = { params: Promise<{ id: string }> };

async function load(id: string): Promise<CalculatorDetail> {
  const embedId = parseDecimalId(id) ?? notFound();
  try {
    return await calculatorDetail(embedId);
  } catch (e) {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  }
}

function Stat({ label, value, hint }: { label: string; value: string; hint?: string }) {
  return (
    <div className="pw-card p-4">
      <p className="text-xs font-bold uppercase tracking-wide text-ink-soft">{label}</p>
      <p className="mt-1 font-display text-2xl font-semibold tabular-nums">{value}</p>
      {hint ? <p className="text-xs text-ink-faint">{hint}</p> : null}
    </div>
  );
}

/** One calculator as support sees it: usage, reports, history, and the switch. */
export default async function SupportCalculatorPage({ params }: Props) {
  const { id } = await params;
  const actor = await pageSupportActor(`/support/calculators/${encodeURIComponent(id)}`);
  if (!actor) return <StaffOnly />;
  const c = await load(id);
  const openReports = c.reports.filter((r) => r.status === 'open').length;
  const reasonLabels: Record<string, string> = { ...REPORT_REASONS };

  return (
    <div className="space-y-8">
      <div>
        <Link href="/support" className="text-sm font-bold text-moss-700 hover:underline">
          ← All calculators
        </Link>
        <div className="mt-2 flex flex-wrap items-center gap-3">
          <h1 className="text-3xl font-semibold">{c.title}</h1>
          <SupportStatus status={c.status} flagged={!!c.flaggedAt} suspended={!!c.workspace.suspendedAt} />
        </div>
        <p className="mt-1 text-ink-soft">
          In <strong className="text-ink">{c.workspace.name}</strong> ({c.workspace.slug}) on the {c.plan.name} plan · owner{c.workspace.owners.length === 1 ? '' : 's'}: {c.workspace.owners.join(', ') || 'none'} · published {fmtDate(c.createdAt)}
        </p>
      </div>

      {c.flaggedAt ? (
        <div className="rounded-card bg-saffron-100 p-5 ring-1 ring-saffron-500/40" data-testid="flag-banner">
          <p className="font-bold">Flagged for review at {fmtDateTime(c.flaggedAt)}</p>
          <p className="text-sm text-ink-soft">Answers in an hour jumped far above this calculator&rsquo;s usual rate. It keeps answering until someone decides. Look at the usage and reports below.</p>
          <ClearFlagButton embedId={c.id} />
        </div>
      ) : null}
      {c.status === 'disabled' ? (
        <div className="rounded-card bg-clay-100 p-5 text-clay-700 ring-1 ring-clay-500/30" data-testid="disabled-banner">
          <p className="font-bold">Switched off by support on {fmtDateTime(c.disabledAt)}</p>
          <p className="mt-1 whitespace-pre-wrap text-sm">{c.disabledReason}</p>
        </div>
      ) : null}
      {c.workspace.suspendedAt ? (
        <div className="rounded-card bg-dusk-800 p-5 text-white">
          <p className="font-bold">The whole workspace is suspended since {fmtDateTime(c.workspace.suspendedAt)}</p>
          <p className="mt-1 whitespace-pre-wrap text-sm text-white/80">{c.workspace.suspendedReason}</p>
        </div>
      ) : null}

      <div className="grid gap-4 sm:grid-cols-4">
        <Stat label="Answers this month" value={fmtCount(c.usage.monthAnswers)} hint={`plan allows ${fmtCount(c.plan.answersPerMonth)} for the workspace`} />
        <Stat label="Last hour" value={fmtCount(c.usage.lastHourAnswers)} hint="sliding 60 minutes" />
        <Stat label="Open reports" value={String(openReports)} hint={`${c.reports.length} in all`} />
        <Stat label="Versions" value={String(c.versions.length)} hint={c.versions.find((v) => v.active) ? `${c.status === 'active' ? 'serving' : 'selected:'} v${c.versions.find((v) => v.active)!.number}` : 'none served'} />
      </div>

      <section className="pw-card p-6" aria-labelledby="usage-title">
        <h2 id="usage-title" className="text-xl font-semibold">
          Answers per day, last 30 days
        </h2>
        <UsageChart daily={c.usage.daily} />
      </section>

      <div className="grid gap-6 lg:grid-cols-5">
        <section className="space-y-6 lg:col-span-3" aria-labelledby="reports-title">
          <div className="pw-card p-6">
            <h2 id="reports-title" className="mb-4 text-xl font-semibold">
              Abuse reports
            </h2>
            <ReportList reports={c.reports} reasonLabels={reasonLabels} />
          </div>
          <div className="pw-card p-6">
            <h2 className="text-xl font-semibold">Calculator</h2>
            <dl className="mt-3 grid grid-cols-[9rem_1fr] gap-y-2 text-sm">
              <dt className="text-ink-soft">Token</dt>
              <dd>
                <code className="break-all">{c.token}</code>
              </dd>
              <dt className="text-ink-soft">Visitor page</dt>
              <dd>
                <a className="font-bold text-moss-700 underline" href={`/embed/${c.token}`} target="_blank" rel="noreferrer">
                  /embed/{c.token.slice(0, 8)}…
                </a>
              </dd>
              <dt className="text-ink-soft">Allowed sites</dt>
              <dd>{c.allowedOrigins.length ? <ul>{c.allowedOrigins.map((o) => <li key={o}><code>{o}</code></li>)}</ul> : <span className="text-ink-faint">none (preview only)</span>}</dd>
            </dl>
            <h3 className="mt-5 text-sm font-bold uppercase tracking-wide text-ink-soft">Versions</h3>
            <ul className="mt-2 divide-y divide-ink/5 text-sm">
              {c.versions.map((v) => (
                <li key={v.id} className="flex flex-wrap justify-between gap-2 py-2">
                  <span>
                    <strong>v{v.number}</strong> {v.active ? <span className={`ml-1 rounded-full px-2 py-0.5 text-xs font-bold ${c.status === 'active' ? 'bg-moss-100 text-moss-700' : 'bg-paper-deep text-ink-soft'}`}>{servedVersionWords(c.status)}</span> : null}
                  </span>
                  <span className="text-ink-soft">
                    {fmtDateTime(v.createdAt)} · {v.createdBy ?? 'unknown'} · <code title="end of the checksum">…{v.checksumEnd}</code>
                  </span>
                </li>
              ))}
              {!c.versions.length ? <li className="py-2 text-ink-faint">No versions.</li> : null}
            </ul>
          </div>
        </section>

        <aside className="space-y-6 lg:col-span-2" aria-label="Support actions">
          <div className="pw-card p-6">
            {c.status === 'active' ? (
              <ReasonForm
                key="disable"
                url={`/api/support/calculators/${c.id}/disable`}
                title="Switch this calculator off"
                explain="Visitors then see a neutral “not available” notice and no new answers are scored. The owner is e-mailed your reason. Nothing is deleted."
                submitLabel="Switch off…"
                confirm={{ question: `Switch off “${c.title}” on every website now? Visitors see “not available” until support switches it back on, and the owner is e-mailed your reason.`, confirmLabel: 'Yes, switch it off' }}
                tone="danger"
                placeholder="What is wrong, in words the owner will understand"
                openReports={openReports}
                testId="disable-form"
              />
            ) : c.status === 'disabled' ? (
              <ReasonForm
                key="enable"
                url={`/api/support/calculators/${c.id}/enable`}
                title="Switch it back on"
                explain="Visitors can use it again at once. The owner is e-mailed your note."
                submitLabel="Switch on"
                tone="calm"
                placeholder="What changed, e.g. the owner fixed the labels"
                testId="enable-form"
              />
            ) : (
              <p className="text-sm text-ink-soft">The owner retired this calculator; it serves nothing and only they can publish it again.</p>
            )}
          </div>
          <div className="pw-card p-6">
            {c.workspace.suspendedAt ? (
              <ReasonForm
                key="restore"
                url={`/api/support/workspaces/${c.workspace.id}/restore`}
                title={`Lift the suspension of ${c.workspace.name}`}
                explain="Its calculators answer again, except those switched off one by one."
                submitLabel="Restore the workspace"
                tone="calm"
                placeholder="Why the suspension ends"
                testId="restore-form"
              />
            ) : (
              <ReasonForm
                key="suspend"
                url={`/api/support/workspaces/${c.workspace.id}/suspend`}
                title={`Suspend all of ${c.workspace.name}`}
                explain="Every calculator of this workspace stops answering at once. Use it for a workspace-wide problem; the owners are e-mailed."
                submitLabel="Suspend the workspace…"
                confirm={{ question: `Stop every calculator of ${c.workspace.name} now? Each one shows “not available” until the suspension is lifted, and the owners are e-mailed.`, confirmLabel: 'Yes, suspend the workspace' }}
                tone="danger"
                placeholder="Why every calculator of this workspace must stop"
                testId="suspend-form"
              />
            )}
          </div>
          <p className="text-xs text-ink-faint">Support can see calculators and usage, but not the datasets behind them, and cannot change a workspace&rsquo;s plan or billing.</p>
        </aside>
      </div>

      <section className="pw-card overflow-x-auto" aria-labelledby="trail-title">
        <h2 id="trail-title" className="px-6 pt-6 text-xl font-semibold">
          History of this calculator
        </h2>
        <div className="mt-3">
          <AuditTable events={c.audit} empty="Nothing recorded yet." />
        </div>
      </section>
    </div>
  );
}
