'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { ClusterLabel, FieldSetting } from '@/models/MixtureModel';
import { CLUSTER_PALETTE } from '@/lib/fitting/palette';
import { api, ApiError } from './client-api';
import { formatNumber, formatPercent } from '@/lib/format';
import { ErrorNote } from './StudioPage';

interface Props {
  modelId: number;
  name: string;
  clusters: ClusterLabel[];
  fields: FieldSetting[];
  caution: string;
  /** Per cluster: mean of each feature, to name clusters by what they are. */
  means: number[][];
  weights: number[];
}

type FieldDraft = Omit<FieldSetting, 'min' | 'max'> & { min: string; max: string };

/** Name the clusters, set up the calculator's fields, and write the caution visitors will see. */
export function ModelEditor(props: Props) {
  const router = useRouter();
  const [name, setName] = useState(props.name);
  const [clusters, setClusters] = useState<ClusterLabel[]>(props.clusters);
  const [fields, setFields] = useState<FieldDraft[]>(props.fields.map((f) => ({ ...f, min: String(f.min), max: String(f.max) })));
  const [caution, setCaution] = useState(props.caution);
  const [busy, setBusy] = useState(false);
  const [saved, setSaved] = useState(false);
  const [error, setError] = useState<ApiError | null>(null);
  const touch = () => setSaved(false);
  const issue = (field: string) => error?.issues.find((i) => i.field === field)?.message;

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    try {
      await api(`/api/models/${props.modelId}`, { method: 'PATCH', json: { name, clusters, fields: fields.map((f) => ({ ...f, min: Number(f.min), max: Number(f.max) })), caution } });
      setSaved(true);
      router.refresh();
    } catch (err) {
      setError(err instanceof ApiError ? err : new ApiError('Could not save.', 0));
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={save} className="space-y-8" aria-label="Name the model">
      <div>
        <label className="pw-label" htmlFor="model-name">
          Model name
        </label>
        <input id="model-name" className="pw-input max-w-xl" value={name} onChange={(e) => (touch(), setName(e.target.value))} maxLength={200} />
      </div>
      <fieldset className="space-y-4">
        <legend className="font-display text-lg font-semibold">Clusters</legend>
        {clusters.map((c, k) => (
          <div key={k} className="grid gap-4 rounded-lg bg-paper p-4 md:grid-cols-[1fr_1.6fr_auto]" data-testid={`cluster-${k}`}>
            <div>
              <label className="pw-label" htmlFor={`label-${k}`}>
                Label of cluster {k + 1}
              </label>
              <input id={`label-${k}`} className="pw-input" value={c.label} maxLength={60} onChange={(e) => (touch(), setClusters((cs) => cs.map((x, j) => (j === k ? { ...x, label: e.target.value } : x))))} />
              {issue(`clusters.${k}.label`) && <p className="pw-field-error">{issue(`clusters.${k}.label`)}</p>}
              <p className="mt-2 text-xs text-ink-faint">
                {formatPercent(props.weights[k])} of rows ·{' '}
                {fields.map((f, j) => `${f.label} ${formatNumber(props.means[k][j])}${f.unit ? ` ${f.unit}` : ''}`).join(' · ')}
              </p>
            </div>
            <div>
              <label className="pw-label" htmlFor={`description-${k}`}>
                One-line description
              </label>
              <input id={`description-${k}`} className="pw-input" value={c.description} maxLength={160} onChange={(e) => (touch(), setClusters((cs) => cs.map((x, j) => (j === k ? { ...x, description: e.target.value } : x))))} />
              {issue(`clusters.${k}.description`) && <p className="pw-field-error">{issue(`clusters.${k}.description`)}</p>}
            </div>
            <div>
              <span className="pw-label">Colour</span>
              <div className="grid grid-cols-4 gap-1.5" role="radiogroup" aria-label={`Colour of cluster ${k + 1}`}>
                {CLUSTER_PALETTE.map((p) => (
                  <button
                    key={p.color}
                    type="button"
                    role="radio"
                    aria-checked={c.color.toLowerCase() === p.color}
                    aria-label={p.name}
                    title={p.name}
                    onClick={() => (touch(), setClusters((cs) => cs.map((x, j) => (j === k ? { ...x, color: p.color } : x))))}
                    className={`h-7 w-7 rounded-full ring-offset-2 ${c.color.toLowerCase() === p.color ? 'ring-2 ring-ink' : ''}`}
                    style={{ background: p.color }}
                  />
                ))}
              </div>
            </div>
          </div>
        ))}
      </fieldset>
      <fieldset>
        <legend className="font-display text-lg font-semibold">Calculator fields</legend>
        <p className="mb-3 text-sm text-ink-soft">What visitors see for each input and the range it accepts.</p>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="text-ink-soft">
              <tr>
                <th className="py-2 pr-3 font-bold">Feature</th>
                <th className="py-2 pr-3 font-bold">Label</th>
                <th className="py-2 pr-3 font-bold">Unit</th>
                <th className="py-2 pr-3 font-bold">From</th>
                <th className="py-2 pr-3 font-bold">To</th>
                <th className="py-2 font-bold">Help text</th>
              </tr>
            </thead>
            <tbody>
              {fields.map((f, j) => {
                const set = (patch: Partial<FieldDraft>) => (touch(), setFields((fs) => fs.map((x, i) => (i === j ? { ...x, ...patch } : x))));
                return (
                  <tr key={f.feature} className="align-top">
                    <td className="py-1.5 pr-3 pt-3.5 font-mono text-xs">{f.feature}</td>
                    <td className="py-1.5 pr-3">
                      <input aria-label={`Label of ${f.feature}`} className="pw-input py-1.5 text-sm" value={f.label} onChange={(e) => set({ label: e.target.value })} maxLength={80} />
                    </td>
                    <td className="w-20 py-1.5 pr-3">
                      <input aria-label={`Unit of ${f.feature}`} className="pw-input py-1.5 text-sm" value={f.unit} onChange={(e) => set({ unit: e.target.value })} maxLength={24} />
                    </td>
                    <td className="w-24 py-1.5 pr-3">
                      <input aria-label={`Lowest ${f.feature}`} className="pw-input py-1.5 text-sm" inputMode="decimal" value={f.min} onChange={(e) => set({ min: e.target.value })} />
                    </td>
                    <td className="w-24 py-1.5 pr-3">
                      <input aria-label={`Highest ${f.feature}`} className="pw-input py-1.5 text-sm" inputMode="decimal" value={f.max} onChange={(e) => set({ max: e.target.value })} />
                      {issue(`fields.${j}.max`) && <p className="pw-field-error">{issue(`fields.${j}.max`)}</p>}
                    </td>
                    <td className="py-1.5">
                      <input aria-label={`Help text of ${f.feature}`} className="pw-input py-1.5 text-sm" value={f.help} onChange={(e) => set({ help: e.target.value })} maxLength={300} placeholder="e.g. your average over the last month" />
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
      </fieldset>
      <div>
        <label className="pw-label" htmlFor="caution">
          Caution shown to visitors
        </label>
        <textarea id="caution" className="pw-input h-20 max-w-3xl" value={caution} onChange={(e) => (touch(), setCaution(e.target.value))} maxLength={600} />
        <p className="mt-1 text-xs text-ink-faint">Memberships describe similarity to groups in your data, not a verdict. Say so in your own words.</p>
      </div>
      <div className="flex items-center gap-4">
        <button type="submit" className="pw-button" disabled={busy}>
          {busy ? 'Saving…' : 'Save names and fields'}
        </button>
        {saved && (
          <span className="text-sm font-bold text-moss-700" role="status">
            Saved.
          </span>
        )}
      </div>
      {error && <ErrorNote message={error.message} issues={error.issues} />}
    </form>
  );
}
