'use client';

import Link from 'next/link';
import { useEffect, useMemo, useState } from 'react';
import useSWR from 'swr';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import type { CalculatorPage, CalculatorRow } from '@/lib/support/search';
import { PAGE_SIZES, STATUS_FILTERS, type SearchQuery, type SortKey, type StatusFilter } from '@/lib/support/schemas';
import { formatCount as fmtCount } from '@/lib/format';
import { shortToken } from './labels';
import { STATUS_WORDS } from '@/lib/embeds/status-words';
import { SupportStatus } from './SupportStatus';
import { getJson, postJson } from './api';

const STATUS_LABELS: Record<StatusFilter, string> = {
  any: 'Every calculator',
  active: STATUS_WORDS.active,
  disabled: STATUS_WORDS.disabled,
  retired: STATUS_WORDS.retired,
  flagged: 'Flagged for review',
  reported: 'With open reports',
  suspended: 'Workspace suspended',
};

function queryString(q: SearchQuery): string {
  const p = new URLSearchParams();
  if (q.q) p.set('q', q.q);
  if (q.sort !== 'attention') p.set('sort', q.sort);
  if (q.dir !== 'desc') p.set('dir', q.dir);
  if (q.status !== 'any') p.set('status', q.status);
  if (q.page !== 1) p.set('page', String(q.page));
  if (q.pageSize !== 25) p.set('pageSize', String(q.pageSize));
  return p.toString();
}

const column = createColumnHelper<CalculatorRow>();

/**
 * The staff console: search every workspace's calculators. Filtering, sorting and
 * paging happen on the server (the route handler); the first page comes with the HTML.
 */
export function SupportConsole({ initial, initialQuery }: { initial: CalculatorPage; initialQuery: SearchQuery }) {
  const [query, setQuery] = useState<SearchQuery>(initialQuery);
  const [typed, setTyped] = useState(initialQuery.q);
  const [sweepNote, setSweepNote] = useState<string | null>(null);

  // Search as you type, once typing pauses.
  useEffect(() => {
    const t = setTimeout(() => setQuery((q) => (q.q === typed.trim() ? q : { ...q, q: typed.trim(), page: 1 })), 300);
    return () => clearTimeout(t);
  }, [typed]);

  const qs = queryString(query);
  useEffect(() => {
    window.history.replaceState(null, '', qs ? `/support?${qs}` : '/support');
  }, [qs]);

  const initialKey = `/api/support/calculators?${queryString(initialQuery)}`;
  const key = `/api/support/calculators?${qs}`;
  const { data, error, isValidating, mutate } = useSWR<CalculatorPage>(key, getJson, {
    fallbackData: key === initialKey ? initial : undefined,
    keepPreviousData: true,
    revalidateOnFocus: true,
  });
  const page = data ?? initial;

  const columns = useMemo(
    () => [
      column.accessor('title', {
        id: 'title',
        header: 'Calculator',
        cell: ({ row }) => (
          <div className="min-w-[14rem]">
            <Link href={`/support/calculators/${row.original.id}`} className="font-bold text-ink hover:text-moss-700 hover:underline">
              {row.original.title}
            </Link>
            <div className="mt-0.5 flex flex-wrap items-center gap-1.5 text-xs text-ink-faint">
              <code title={row.original.token}>{shortToken(row.original.token)}</code>
              {row.original.allowedOrigins.length ? <span title={row.original.allowedOrigins.join('\n')}>· {row.original.allowedOrigins[0].replace(/^https?:\/\//, '')}{row.original.allowedOrigins.length > 1 ? ` +${row.original.allowedOrigins.length - 1}` : ''}</span> : <span>· no host sites</span>}
            </div>
          </div>
        ),
      }),
      column.accessor((r) => r.workspace.name, {
        id: 'workspace',
        header: 'Workspace',
        cell: ({ row }) => (
          <div>
            <div className="font-bold">{row.original.workspace.name}</div>
            <div className="text-xs text-ink-faint">{row.original.owners.join(', ') || 'no owner'}</div>
          </div>
        ),
      }),
      column.accessor((r) => r.plan.name, { id: 'plan', header: 'Plan', cell: (c) => c.getValue() }),
      column.accessor('status', {
        id: 'status',
        header: 'Status',
        cell: ({ row }) => <SupportStatus status={row.original.status} flagged={!!row.original.flaggedAt} suspended={!!row.original.workspace.suspendedAt} />,
      }),
      column.accessor('monthAnswers', { id: 'monthAnswers', header: 'This month', meta: { numeric: true }, cell: (c) => fmtCount(c.getValue()) }),
      column.accessor('lastHourAnswers', { id: 'hourAnswers', header: 'Last hour', meta: { numeric: true }, cell: (c) => fmtCount(c.getValue()) }),
      column.accessor('openReports', {
        id: 'openReports',
        header: 'Open reports',
        meta: { numeric: true },
        cell: (c) => (c.getValue() > 0 ? <span className="rounded-full bg-clay-100 px-2 py-0.5 font-bold text-clay-700">{c.getValue()}</span> : <span className="text-ink-faint">0</span>),
      }),
    ],
    [],
  );

  const sorting: SortingState = query.sort === 'attention' ? [] : [{ id: query.sort, desc: query.dir === 'desc' }];
  const table = useReactTable({
    data: page.rows,
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    pageCount: page.pageCount,
    state: { sorting },
    onSortingChange: (updater) => {
      const next = typeof updater === 'function' ? updater(sorting) : updater;
      const first = next[0];
      setQuery((q) => (first ? { ...q, sort: first.id as SortKey, dir: first.desc ? 'desc' : 'asc', page: 1 } : { ...q, sort: 'attention', dir: 'desc', page: 1 }));
    },
    enableSortingRemoval: true,
    sortDescFirst: true,
  });

  async function sweep() {
    setSweepNote('Checking answer rates…');
    try {
      const r = await postJson<{ flagged: number[]; checked: number }>('/api/support/sweep', undefined);
      setSweepNote(r.flagged.length ? `${r.flagged.length} calculator${r.flagged.length === 1 ? '' : 's'} newly flagged.` : `No new spikes (${r.checked} busy calculator${r.checked === 1 ? '' : 's'} checked).`);
      await mutate();
    } catch (e) {
      setSweepNote((e as Error).message);
    }
  }

  const from = page.total === 0 ? 0 : (page.page - 1) * page.pageSize + 1;
  const to = Math.min(page.total, page.page * page.pageSize);

  return (
    <section aria-labelledby="console-title">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1 id="console-title" className="text-3xl font-semibold">
            Calculators across Partwise
          </h1>
          <p className="mt-1 max-w-2xl text-ink-soft">Flagged spikes and reported calculators come first. Search by token, host site, workspace or an owner&rsquo;s e-mail.</p>
        </div>
        <div className="flex items-center gap-3">
          {sweepNote ? <span className="text-sm text-ink-soft" role="status">{sweepNote}</span> : null}
          <button type="button" className="pw-button-quiet" onClick={sweep}>
            Check for spikes now
          </button>
        </div>
      </div>

      <div className="mt-6 flex flex-wrap items-end gap-3">
        <label className="min-w-[18rem] flex-1">
          <span className="pw-label">Search</span>
          <input className="pw-input" type="search" value={typed} onChange={(e) => setTyped(e.target.value)} placeholder="Token, https://host.example, workspace or owner@…" aria-describedby="search-hint" />
        </label>
        <label>
          <span className="pw-label">Show</span>
          <select className="pw-input" value={query.status} onChange={(e) => setQuery((q) => ({ ...q, status: e.target.value as StatusFilter, page: 1 }))}>
            {STATUS_FILTERS.map((s) => (
              <option key={s} value={s}>
                {STATUS_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
        <label>
          <span className="pw-label">Per page</span>
          <select className="pw-input" value={query.pageSize} onChange={(e) => setQuery((q) => ({ ...q, pageSize: Number(e.target.value), page: 1 }))}>
            {PAGE_SIZES.map((n) => (
              <option key={n} value={n}>
                {n}
              </option>
            ))}
          </select>
        </label>
      </div>
      <p id="search-hint" className="mt-1 text-xs text-ink-faint">
        A pasted page address is searched by its site. Click a column heading to sort; click again to reverse; a third time returns to &ldquo;needs attention first&rdquo;.
      </p>

      {error ? <p className="mt-4 rounded-lg bg-clay-100 px-4 py-3 text-sm text-clay-700">{(error as Error).message}</p> : null}

      <div className="pw-card mt-4 overflow-x-auto" aria-busy={isValidating}>
        <table className="w-full text-left text-sm" data-testid="support-table">
          <thead className="border-b border-ink/10 text-xs uppercase tracking-wide text-ink-soft">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  const numeric = (h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                  return (
                    <th key={h.id} scope="col" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'} className={`px-4 py-3 ${numeric ? 'text-right' : ''}`}>
                      <button type="button" onClick={h.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 font-bold uppercase hover:text-ink">
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden="true" className="w-3 text-moss-700">
                          {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : ''}
                        </span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className={`border-b border-ink/5 last:border-0 ${row.original.flaggedAt ? 'bg-saffron-100/60' : row.original.openReports ? 'bg-clay-100/40' : ''}`}>
                {row.getVisibleCells().map((cell) => {
                  const numeric = (cell.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                  return (
                    <td key={cell.id} className={`px-4 py-3 align-top ${numeric ? 'text-right tabular-nums' : ''}`}>
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  );
                })}
              </tr>
            ))}
            {page.rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-4 py-10 text-center text-ink-soft">
                  No calculator matches{query.q ? ` “${query.q}”` : ''}. Try part of the token, the host site, or the workspace&rsquo;s name.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>

      <nav aria-label="Pages" className="mt-4 flex items-center justify-between text-sm text-ink-soft">
        <span>
          {page.total === 0 ? 'Nothing to show' : `${fmtCount(from)}–${fmtCount(to)} of ${fmtCount(page.total)}`}
          {query.sort === 'attention' ? ' · needs attention first' : ''}
        </span>
        <span className="flex items-center gap-2">
          <button type="button" className="pw-button-quiet disabled:cursor-not-allowed disabled:opacity-40" disabled={page.page <= 1} onClick={() => setQuery((q) => ({ ...q, page: Math.max(1, page.page - 1) }))}>
            Previous
          </button>
          <span>
            Page {page.page} of {page.pageCount}
          </span>
          <button type="button" className="pw-button-quiet disabled:cursor-not-allowed disabled:opacity-40" disabled={page.page >= page.pageCount} onClick={() => setQuery((q) => ({ ...q, page: page.page + 1 }))}>
            Next
          </button>
        </span>
      </nav>
    </section>
  );
}
