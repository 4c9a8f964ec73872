'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { DatasetColumn } from '@/models/Dataset';
import { api, ApiError } from './client-api';
import { formatNumber } from '@/lib/format';
import { ErrorNote } from './StudioPage';

interface Row {
  name: string;
  displayName: string;
  unit: string;
  inputMin: string;
  inputMax: string;
  min: number | null;
  max: number | null;
}

/** Display name, unit and the input range a calculator accepts, per numeric column. */
export function FeatureSettingsForm({ datasetId, columns }: { datasetId: number; columns: DatasetColumn[] }) {
  const router = useRouter();
  const [rows, setRows] = useState<Row[]>(
    columns
      .filter((c) => c.kind === 'numeric')
      .map((c) => ({ name: c.name, displayName: c.displayName ?? c.name, unit: c.unit ?? '', inputMin: String(c.inputMin ?? c.min ?? ''), inputMax: String(c.inputMax ?? c.max ?? ''), min: c.min, max: c.max })),
  );
  const [error, setError] = useState<ApiError | null>(null);
  const [saved, setSaved] = useState(false);
  const [busy, setBusy] = useState(false);
  const set = (i: number, patch: Partial<Row>) => {
    setSaved(false);
    setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...patch } : r)));
  };
  const issueFor = (i: number, field: string) => error?.issues.find((x) => x.field === `features.${i}.${field}`)?.message;

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    try {
      await api(`/api/datasets/${datasetId}`, {
        method: 'PATCH',
        json: { features: rows.map((r) => ({ name: r.name, displayName: r.displayName, unit: r.unit, inputMin: Number(r.inputMin), inputMax: Number(r.inputMax) })) },
      });
      setSaved(true);
      router.refresh();
    } catch (err) {
      setError(err instanceof ApiError ? err : new ApiError('Could not save.', 0));
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={save} className="space-y-4">
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm">
          <thead className="text-ink-soft">
            <tr>
              <th className="py-2 pr-3 font-bold">Column</th>
              <th className="py-2 pr-3 font-bold">Display name</th>
              <th className="py-2 pr-3 font-bold">Unit</th>
              <th className="py-2 pr-3 font-bold">Accept from</th>
              <th className="py-2 pr-3 font-bold">to</th>
              <th className="py-2 font-bold text-ink-faint">Observed</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r, i) => (
              <tr key={r.name} className="align-top">
                <td className="py-1.5 pr-3 pt-3.5 font-mono text-xs">{r.name}</td>
                <td className="py-1.5 pr-3">
                  <input aria-label={`Display name of ${r.name}`} className="pw-input py-1.5 text-sm" value={r.displayName} onChange={(e) => set(i, { displayName: e.target.value })} maxLength={80} />
                  {issueFor(i, 'displayName') && <p className="pw-field-error">{issueFor(i, 'displayName')}</p>}
                </td>
                <td className="w-24 py-1.5 pr-3">
                  <input aria-label={`Unit of ${r.name}`} className="pw-input py-1.5 text-sm" value={r.unit} onChange={(e) => set(i, { unit: e.target.value })} maxLength={24} />
                </td>
                <td className="w-28 py-1.5 pr-3">
                  <input aria-label={`Lowest accepted ${r.name}`} className="pw-input py-1.5 text-sm tabular-nums" inputMode="decimal" value={r.inputMin} onChange={(e) => set(i, { inputMin: e.target.value })} />
                  {issueFor(i, 'inputMin') && <p className="pw-field-error">{issueFor(i, 'inputMin')}</p>}
                </td>
                <td className="w-28 py-1.5 pr-3">
                  <input aria-label={`Highest accepted ${r.name}`} className="pw-input py-1.5 text-sm tabular-nums" inputMode="decimal" value={r.inputMax} onChange={(e) => set(i, { inputMax: e.target.value })} />
                  {issueFor(i, 'inputMax') && <p className="pw-field-error">{issueFor(i, 'inputMax')}</p>}
                </td>
                <td className="py-1.5 pt-3.5 text-xs text-ink-faint tabular-nums">
                  {formatNumber(r.min)} – {formatNumber(r.max)}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="flex items-center gap-4">
        <button className="pw-button" disabled={busy} type="submit">
          {busy ? 'Saving…' : 'Save feature settings'}
        </button>
        {saved && <span className="text-sm font-bold text-moss-700" role="status">Saved.</span>}
      </div>
      {error && <ErrorNote message={error.message} issues={error.issues} />}
    </form>
  );
}
