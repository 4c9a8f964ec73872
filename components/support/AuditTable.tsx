import type { AuditRow } from '@/lib/support/detail';
import { formatDateTime as fmtDateTime } from '@/lib/format';
import { actionLabel, detailSummary } from './labels';

/** Who did what, when, from where; shared by a calculator's trail and the audit log. */
export function AuditTable({ events, showWorkspace = false, empty }: { events: (AuditRow & { workspaceName?: string | null })[]; showWorkspace?: boolean; empty: string }) {
  if (!events.length) return <p className="px-4 py-6 text-sm text-ink-soft">{empty}</p>;
  return (
    <table className="w-full text-left text-sm" data-testid="audit-table">
      <thead className="border-b border-ink/10 text-xs uppercase tracking-wide text-ink-soft">
        <tr>
          <th scope="col" className="px-4 py-2">When</th>
          <th scope="col" className="px-4 py-2">What</th>
          <th scope="col" className="px-4 py-2">Who</th>
          {showWorkspace ? <th scope="col" className="px-4 py-2">Workspace</th> : null}
          <th scope="col" className="px-4 py-2">Details</th>
          <th scope="col" className="px-4 py-2">From</th>
        </tr>
      </thead>
      <tbody>
        {events.map((e) => (
          <tr key={e.id} className="border-b border-ink/5 align-top last:border-0">
            <td className="whitespace-nowrap px-4 py-2 tabular-nums text-ink-soft">{fmtDateTime(e.createdAt)}</td>
            <td className="px-4 py-2">
              <span className="font-bold">{actionLabel(e.action)}</span>
              <div className="text-xs text-ink-faint">
                <code>{e.action}</code>
                {e.targetType ? ` · ${e.targetType} ${e.targetId ?? ''}` : ''}
              </div>
            </td>
            <td className="px-4 py-2">{e.actorEmail ?? <span className="text-ink-faint">Partwise (automatic)</span>}</td>
            {showWorkspace ? <td className="px-4 py-2">{e.workspaceName ?? (e.workspaceId ? `#${e.workspaceId}` : '—')}</td> : null}
            <td className="max-w-md px-4 py-2 text-ink-soft">{detailSummary(e.detail) || '—'}</td>
            <td className="whitespace-nowrap px-4 py-2 text-xs text-ink-faint">{e.address ?? '—'}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
