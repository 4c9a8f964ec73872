'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { ClusterLabel, FieldSetting } from '@/lib/fitting/models';
import { CLUSTER_PALETTE } from '@/lib/fitting/palette';
import { formatNumber, formatPercent } from '@/lib/format';
import { api, ApiError } from './client-api';
import { fixFieldsNotice, parseTypedNumber, placeServerIssues } from './form-issues';
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

/** "optional": visitors may leave the field blank (answered from the other fields); the select's values. */
type Answering = 'required' | 'optional';
type FieldDraft = Omit<FieldSetting, 'min' | 'max' | 'optional'> & { min: string; max: string; optional: Answering };
interface Values {
  name: string;
  clusters: ClusterLabel[];
  fields: FieldDraft[];
  caution: string;
}

const enterNumber = 'Enter a number, like 12 or 12.5.';

/** Name the clusters, set up the calculator's fields, and write the caution visitors will see. */
export function ModelEditor(props: Props) {
  const router = useRouter();
  const [saved, setSaved] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const { register, handleSubmit, setError, setValue, watch, getValues, formState } = useForm<Values>({
    defaultValues: { name: props.name, clusters: props.clusters, fields: props.fields.map((f) => ({ ...f, min: String(f.min), max: String(f.max), optional: f.optional ? 'optional' : 'required' })), caution: props.caution },
  });
  const errors = formState.errors;
  const clusters = watch('clusters');
  const fields = watch('fields');
  const busy = formState.isSubmitting;
  const touch = { onChange: () => setSaved(false) };

  const save = handleSubmit(async (values) => {
    setNotice(null);
    try {
      await api(`/api/models/${props.modelId}`, {
        method: 'PATCH',
        json: { name: values.name, clusters: values.clusters, fields: values.fields.map((f) => ({ ...f, min: parseTypedNumber(f.min), max: parseTypedNumber(f.max), optional: f.optional === 'optional' })), caution: values.caution },
      });
      setSaved(true);
      router.refresh();
    } catch (err) {
      const failure = err instanceof ApiError ? err : new ApiError('Could not save. Check the connection and try again.', 0);
      const rest = placeServerIssues(setError, failure.issues, (field, message) => {
        const m = /^(clusters|fields)\.(\d+)\.(\w+)$/.exec(field);
        if (m && m[1] === 'clusters' && ['label', 'description', 'color'].includes(m[3])) {
          return { name: `clusters.${Number(m[2])}.${m[3] as 'label'}`, message: message };
        }
        if (m && m[1] === 'fields' && ['label', 'unit', 'min', 'max', 'help', 'optional'].includes(m[3])) return { name: `fields.${Number(m[2])}.${m[3] as 'label'}` };
        if (field === 'name' || field === 'caution') return { name: field };
        return null;
      });
      setNotice(rest.length ? failure.message : failure.issues.length ? fixFieldsNotice(failure.issues.length) : failure.message);
    }
  });

  return (
    <form onSubmit={save} onChange={() => notice && setNotice(null)} noValidate className="space-y-8" aria-label="Name the model">
      <div>
        <label className="pw-label" htmlFor="model-name">
          Model name
        </label>
        <input id="model-name" className="pw-input max-w-xl" maxLength={200} aria-invalid={errors.name ? true : undefined} {...register('name', { ...touch, validate: (v) => v.trim().length > 0 || 'Give the model a name.' })} />
        {errors.name && <p className="pw-field-error">{errors.name.message}</p>}
      </div>
      <fieldset className="min-w-0 space-y-4">
        <legend className="font-display text-lg font-semibold">Clusters</legend>
        {clusters.map((c, k) => (
          <div key={k} className="grid gap-4 rounded-lg bg-paper p-4 md:grid-cols-[1fr_1.6fr_auto]" data-testid={`cluster-${k}`}>
            <div>
              <label className="pw-label" htmlFor={`label-${k}`}>
                Label of cluster {k + 1}
              </label>
              <input
                id={`label-${k}`}
                className="pw-input"
                maxLength={60}
                aria-invalid={errors.clusters?.[k]?.label ? true : undefined}
                {...register(`clusters.${k}.label`, {
                  ...touch,
                  validate: (v) => {
                    if (!v.trim()) return `Give cluster ${k + 1} a label.`;
                    const same = getValues('clusters').findIndex((x, j) => j !== k && x.label.trim().toLowerCase() === v.trim().toLowerCase());
                    return same < 0 || `Cluster ${same + 1} has this label too; visitors could not tell them apart.`;
                  },
                })}
              />
              {errors.clusters?.[k]?.label && <p className="pw-field-error">{errors.clusters[k]!.label!.message}</p>}
              <p className="mt-2 text-xs text-ink-faint">
                {formatPercent(props.weights[k])} of rows ·{' '}
                {fields.map((f, j) => `${f.label} ${formatNumber(props.means[k][j])}${f.unit ? ` ${f.unit}` : ''}`).join(' · ')}
              </p>
            </div>
            <div>
              <label className="pw-label" htmlFor={`description-${k}`}>
                One-line description
              </label>
              <input id={`description-${k}`} className="pw-input" maxLength={160} aria-invalid={errors.clusters?.[k]?.description ? true : undefined} {...register(`clusters.${k}.description`, touch)} />
              {errors.clusters?.[k]?.description && <p className="pw-field-error">{errors.clusters[k]!.description!.message}</p>}
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
                    onClick={() => (setSaved(false), setValue(`clusters.${k}.color`, p.color, { shouldDirty: true }))}
                    className={`h-7 w-7 rounded-full ring-offset-2 ${c.color.toLowerCase() === p.color ? 'ring-2 ring-ink' : ''}`}
                    style={{ background: p.color }}
                  />
                ))}
              </div>
            </div>
          </div>
        ))}
      </fieldset>
      <fieldset className="min-w-0">
        <legend className="font-display text-lg font-semibold">Calculator fields</legend>
        <p className="mb-3 text-sm text-ink-soft">
          What visitors see for each input, the range it accepts, and whether they may leave it blank. A blank field is not guessed: the answer is worked out from the other
          fields alone, and says which fields it did not use.
        </p>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="text-ink-soft">
              <tr>
                <th className="py-2 pr-3 font-bold">Feature</th>
                <th className="py-2 pr-3 font-bold">Label</th>
                <th className="py-2 pr-3 font-bold">Unit</th>
                <th className="py-2 pr-3 font-bold">From</th>
                <th className="py-2 pr-3 font-bold">To</th>
                <th className="py-2 pr-3 font-bold">Help text</th>
                <th className="py-2 font-bold">Visitors</th>
              </tr>
            </thead>
            <tbody>
              {fields.map((f, j) => {
                const fe = errors.fields?.[j];
                return (
                  <tr key={f.feature} className="align-top">
                    <td className="py-1.5 pr-3 pt-3.5 font-mono text-xs">{f.feature}</td>
                    <td className="py-1.5 pr-3">
                      <input aria-label={`Label of ${f.feature}`} className="pw-input py-1.5 text-sm" maxLength={80} aria-invalid={fe?.label ? true : undefined} {...register(`fields.${j}.label`, { ...touch, validate: (v) => v.trim().length > 0 || 'Give the field a label visitors will read.' })} />
                      {fe?.label && <p className="pw-field-error">{fe.label.message}</p>}
                    </td>
                    <td className="w-20 py-1.5 pr-3">
                      <input aria-label={`Unit of ${f.feature}`} className="pw-input py-1.5 text-sm" maxLength={24} {...register(`fields.${j}.unit`, touch)} />
                      {fe?.unit && <p className="pw-field-error">{fe.unit.message}</p>}
                    </td>
                    <td className="w-24 py-1.5 pr-3">
                      <input aria-label={`Lowest ${f.feature}`} className="pw-input py-1.5 text-sm" inputMode="decimal" aria-invalid={fe?.min ? true : undefined} {...register(`fields.${j}.min`, { ...touch, validate: (v) => parseTypedNumber(v) !== null || enterNumber })} />
                      {fe?.min && <p className="pw-field-error">{fe.min.message}</p>}
                    </td>
                    <td className="w-24 py-1.5 pr-3">
                      <input
                        aria-label={`Highest ${f.feature}`}
                        className="pw-input py-1.5 text-sm"
                        inputMode="decimal"
                        aria-invalid={fe?.max ? true : undefined}
                        {...register(`fields.${j}.max`, {
                          ...touch,
                          validate: (v) => {
                            const hi = parseTypedNumber(v);
                            if (hi === null) return enterNumber;
                            const lo = parseTypedNumber(getValues(`fields.${j}.min`));
                            return lo === null || lo < hi || 'Make this higher than the lowest value.';
                          },
                        })}
                      />
                      {fe?.max && <p className="pw-field-error">{fe.max.message}</p>}
                    </td>
                    <td className="py-1.5 pr-3">
                      <input aria-label={`Help text of ${f.feature}`} className="pw-input py-1.5 text-sm" maxLength={300} placeholder="e.g. your average over the last month" {...register(`fields.${j}.help`, touch)} />
                      {fe?.help && <p className="pw-field-error">{fe.help.message}</p>}
                    </td>
                    <td className="w-44 py-1.5">
                      <select aria-label={`Must visitors fill in ${f.feature}?`} className="pw-input py-1.5 text-sm" data-testid={`answering-${f.feature}`} {...register(`fields.${j}.optional`, touch)}>
                        <option value="required">Required</option>
                        <option value="optional">May be left blank</option>
                      </select>
                      {fe?.optional && <p className="pw-field-error">{fe.optional.message}</p>}
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
        <textarea id="caution" className="pw-input h-20 max-w-3xl" maxLength={600} aria-invalid={errors.caution ? true : undefined} {...register('caution', touch)} />
        {errors.caution && <p className="pw-field-error">{errors.caution.message}</p>}
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
      {notice && <ErrorNote message={notice} />}
      {!notice && Object.keys(errors).length > 0 && <p className="text-sm font-bold text-clay-700" role="alert">Some values need a change; see the marked fields.</p>}
    </form>
  );
}
