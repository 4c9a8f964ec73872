'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { CalculatorDetail } from '@/lib/support/detail';
import { postJson } from './api';
import { formatDateTime as fmtDateTime } from '@/lib/format';

/** Abuse reports with the reporter's own words; staff close each once dealt with. */
export function ReportList({ reports, reasonLabels }: { reports: CalculatorDetail['reports']; reasonLabels: Record<string, string> }) {
  const router = useRouter();
  const [busy, setBusy] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);

  async function setStatus(id: number, status: 'open' | 'closed') {
    setBusy(id);
    setError(null);
    try {
      await postJson(`/api/support/reports/${id}`, { status }, 'PATCH');
      router.refresh();
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(null);
    }
  }

  if (!reports.length) return <p className="text-sm text-ink-soft">No one has reported this calculator.</p>;
  return (
    <div>
      {error ? <p className="mb-3 rounded-lg bg-clay-100 px-3 py-2 text-sm text-clay-700">{error}</p> : null}
      <ul className="space-y-3" data-testid="report-list">
        {reports.map((r) => (
          <li key={r.id} className={`rounded-lg p-4 ring-1 ${r.status === 'open' ? 'bg-white ring-clay-500/30' : 'bg-paper ring-ink/5'}`}>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <p className="font-bold">
                {reasonLabels[r.reason] ?? r.reason}
                <span className={`ml-2 rounded-full px-2 py-0.5 text-xs ${r.status === 'open' ? 'bg-clay-100 text-clay-700' : 'bg-paper-deep text-ink-soft'}`}>{r.status === 'open' ? 'Open' : 'Closed'}</span>
              </p>
              <span className="text-xs text-ink-faint">{fmtDateTime(r.createdAt)}</span>
            </div>
            <blockquote className="mt-2 whitespace-pre-wrap border-l-2 border-ink/15 pl-3 text-sm text-ink">{r.message}</blockquote>
            <div className="mt-2 flex flex-wrap items-center justify-between gap-2 text-xs text-ink-soft">
              <span>
                {r.hostOrigin ? <>Seen on <code>{r.hostOrigin}</code></> : 'Host site not given'} · {r.reporterEmail ? <>reply to <a className="underline" href={`mailto:${r.reporterEmail}`}>{r.reporterEmail}</a></> : 'anonymous'}
              </span>
              <button type="button" className="pw-button-quiet px-3 py-1 text-xs" disabled={busy === r.id} onClick={() => setStatus(r.id, r.status === 'open' ? 'closed' : 'open')}>
                {r.status === 'open' ? 'Close report' : 'Reopen'}
              </button>
            </div>
          </li>
        ))}
      </ul>
    </div>
  );
}
