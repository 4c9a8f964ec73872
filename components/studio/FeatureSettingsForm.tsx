'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { DatasetColumn } from '@/lib/datasets';
import { formatNumber } from '@/lib/format';
import { api, ApiError } from './client-api';
import { fixFieldsNotice, parseTypedNumber, placeServerIssues } from './form-issues';
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

const enterNumber = 'Enter a number, like 12 or 12.5.';

/** Display name, unit and the input range a calculator accepts, per numeric column. */
export function FeatureSettingsForm({ datasetId, columns }: { datasetId: number; columns: DatasetColumn[] }) {
  const router = useRouter();
  const initial: Row[] = columns
    .filter((c) => c.kind === 'numeric')
    .map((c) => ({ name: c.name, displayName: c.displayName ?? c.name, unit: c.unit ?? '', inputMin: String(c.inputMin ?? c.min ?? ''), inputMax: String(c.inputMax ?? c.max ?? ''), min: c.min, max: c.max }));
  const { register, handleSubmit, setError, getValues, formState } = useForm<{ rows: Row[] }>({ defaultValues: { rows: initial } });
  const [notice, setNotice] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const busy = formState.isSubmitting;
  const rows = initial;
  const rowErrors = formState.errors.rows;
  const touch = { onChange: () => setSaved(false) };

  const save = handleSubmit(async (values) => {
    setNotice(null);
    try {
      await api(`/api/datasets/${datasetId}`, {
        method: 'PATCH',
        json: { features: values.rows.map((r) => ({ name: r.name, displayName: r.displayName, unit: r.unit, inputMin: parseTypedNumber(r.inputMin), inputMax: parseTypedNumber(r.inputMax) })) },
      });
      setSaved(true);
      router.refresh();
    } catch (err) {
      const failure = err instanceof ApiError ? err : new ApiError('Could not save. Check the connection and try again.', 0);
      // The server names rows as features.N.field; the same N is the row on this screen.
      const rest = placeServerIssues(setError, failure.issues, (field) => {
        const m = /^features\.(\d+)\.(displayName|unit|inputMin|inputMax)$/.exec(field);
        return m ? { name: `rows.${Number(m[1])}.${m[2] as 'unit'}` } : null;
      });
      setNotice(rest.length ? failure.message : failure.issues.length ? fixFieldsNotice(failure.issues.length) : failure.message);
    }
  });

  return (
    <form onSubmit={save} onChange={() => notice && setNotice(null)} noValidate className="space-y-4" aria-label="Feature settings">
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
                  <input aria-label={`Display name of ${r.name}`} className="pw-input py-1.5 text-sm" maxLength={80} aria-invalid={rowErrors?.[i]?.displayName ? true : undefined} {...register(`rows.${i}.displayName`, { ...touch, validate: (v) => v.trim().length > 0 || 'Give the feature a name people will read.' })} />
                  {rowErrors?.[i]?.displayName && <p className="pw-field-error">{rowErrors[i]!.displayName!.message}</p>}
                </td>
                <td className="w-24 py-1.5 pr-3">
                  <input aria-label={`Unit of ${r.name}`} className="pw-input py-1.5 text-sm" maxLength={24} {...register(`rows.${i}.unit`, touch)} />
                  {rowErrors?.[i]?.unit && <p className="pw-field-error">{rowErrors[i]!.unit!.message}</p>}
                </td>
                <td className="w-28 py-1.5 pr-3">
                  <input aria-label={`Lowest accepted ${r.name}`} className="pw-input py-1.5 text-sm tabular-nums" inputMode="decimal" aria-invalid={rowErrors?.[i]?.inputMin ? true : undefined} {...register(`rows.${i}.inputMin`, { ...touch, validate: (v) => parseTypedNumber(v) !== null || enterNumber })} />
                  {rowErrors?.[i]?.inputMin && <p className="pw-field-error">{rowErrors[i]!.inputMin!.message}</p>}
                </td>
                <td className="w-28 py-1.5 pr-3">
                  <input
                    aria-label={`Highest accepted ${r.name}`}
                    className="pw-input py-1.5 text-sm tabular-nums"
                    inputMode="decimal"
                    aria-invalid={rowErrors?.[i]?.inputMax ? true : undefined}
                    {...register(`rows.${i}.inputMax`, {
                      ...touch,
                      validate: (v) => {
                        const hi = parseTypedNumber(v);
                        if (hi === null) return enterNumber;
                        const lo = parseTypedNumber(getValues(`rows.${i}.inputMin`));
                        return lo === null || lo < hi || 'Make this higher than the lowest accepted value.';
                      },
                    })}
                  />
                  {rowErrors?.[i]?.inputMax && <p className="pw-field-error">{rowErrors[i]!.inputMax!.message}</p>}
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
      {notice && <ErrorNote message={notice} />}
      {!notice && rowErrors && <p className="text-sm font-bold text-clay-700" role="alert">Some values need a change; see the marked fields.</p>}
    </form>
  );
}
