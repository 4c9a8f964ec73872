import type { DatasetColumn } from '@/lib/datasets';
import { formatCount as count, formatNumber as num } from '@/lib/format';

/** Per-column facts found at upload. */
export function ColumnTable({ columns, rows }: { columns: DatasetColumn[]; rows: number }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm" aria-label="Column summary">
        <thead className="border-b border-ink/10 text-ink-soft">
          <tr>
            {['Column', 'Type', 'Values', 'Missing', 'Min', 'Max', 'Mean', 'Std dev'].map((h, i) => (
              <th key={h} className={`py-2 pr-4 font-bold ${i >= 2 ? 'text-right' : ''}`}>
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {columns.map((c) => (
            <tr key={c.name} className="border-b border-ink/5 align-top">
              <td className="py-2 pr-4 font-mono text-xs text-ink">{c.name}</td>
              <td className="py-2 pr-4">
                <span className={`rounded-full px-2 py-0.5 text-xs font-bold ${c.kind === 'numeric' ? 'bg-moss-100 text-moss-700' : 'bg-paper-deep text-ink-soft'}`}>{c.kind === 'numeric' ? 'number' : 'text'}</span>
              </td>
              <td className="py-2 pr-4 text-right tabular-nums">{count(c.count)}</td>
              <td className="py-2 pr-4 text-right tabular-nums">
                {c.missing ? (
                  <span className={c.missing / rows > 0.1 ? 'font-bold text-clay-700' : ''} title={c.invalidExamples?.join('; ')}>
                    {count(c.missing)}
                    {c.invalid ? <span className="block text-xs font-normal text-clay-700">{c.invalid} not a number</span> : null}
                  </span>
                ) : (
                  <span className="text-ink-faint">0</span>
                )}
              </td>
              <td className="py-2 pr-4 text-right tabular-nums">{num(c.min)}</td>
              <td className="py-2 pr-4 text-right tabular-nums">{num(c.max)}</td>
              <td className="py-2 pr-4 text-right tabular-nums">{num(c.mean)}</td>
              <td className="py-2 pr-4 text-right tabular-nums">{num(c.std)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function PreviewTable({ columns, rows }: { columns: DatasetColumn[]; rows: (number | string | null)[][] }) {
  return (
    <div className="max-h-96 overflow-auto rounded-lg ring-1 ring-ink/5" tabIndex={0} role="region" aria-label="First rows, scrollable">
      <table className="w-full text-left text-xs" aria-label="First rows">
        <thead className="sticky top-0 bg-paper-deep text-ink-soft">
          <tr>
            <th className="px-3 py-2 text-right font-bold">Row</th>
            {columns.map((c) => (
              <th key={c.name} className={`px-3 py-2 font-mono font-bold ${c.kind === 'numeric' ? 'text-right' : ''}`}>
                {c.name}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((r, i) => (
            <tr key={i} className="odd:bg-white even:bg-paper/60">
              <td className="px-3 py-1.5 text-right text-ink-faint tabular-nums">{i + 2}</td>
              {r.map((v, j) => (
                <td key={j} className={`px-3 py-1.5 tabular-nums ${columns[j].kind === 'numeric' ? 'text-right' : ''}`}>
                  {v === null ? <span className="text-clay-700">missing</span> : String(v)}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
