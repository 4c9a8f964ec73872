'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { DatasetColumn } from '@/lib/datasets';
import { api, ApiError } from './client-api';
import { STRUCTURE_HELP } from './structures';
import { fixFieldsNotice } from './form-issues';
import { ErrorNote } from './StudioPage';

const STRUCTURES = ['full', 'diagonal', 'spherical', 'tied'] as const;

export interface FitDefaults {
  minComponents: number;
  maxComponents: number;
  covariances: string[];
  restarts: number;
  seed: number;
  standardize: boolean;
  maxIter: number;
  tol: number;
}

const PLACED = ['features', 'minComponents', 'maxComponents', 'covariances', 'restarts', 'seed', 'maxIter', 'tol'];

/** Choose features, the component range, structures, restarts, seed and standardisation; start a job. */
export function FitForm({ datasetId, columns, defaults, maxComponentsAllowed }: { datasetId: number; columns: DatasetColumn[]; defaults: FitDefaults; maxComponentsAllowed: number }) {
  const router = useRouter();
  const numeric = columns.filter((c) => c.kind === 'numeric');
  const [features, setFeatures] = useState<string[]>(numeric.slice(0, 6).map((c) => c.name));
  const [minK, setMinK] = useState(defaults.minComponents);
  const [maxK, setMaxK] = useState(defaults.maxComponents);
  const [structures, setStructures] = useState<string[]>(defaults.covariances);
  const [restarts, setRestarts] = useState(defaults.restarts);
  const [seed, setSeed] = useState(defaults.seed);
  const [standardize, setStandardize] = useState(defaults.standardize);
  const [maxIter, setMaxIter] = useState(defaults.maxIter);
  const [tol, setTol] = useState(defaults.tol);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<ApiError | null>(null);
  // Server issues next to their fields; the notice says how many, or carries what no field shows.
  const issue = (field: string) => error?.issues.find((i) => i.field === field)?.message;
  const placed = error?.issues.filter((i) => PLACED.includes(i.field)).length ?? 0;
  const toggle = (list: string[], v: string) => (list.includes(v) ? list.filter((x) => x !== v) : [...list, v]);
  const candidates = Math.max(0, maxK - minK + 1) * structures.length;
  const dropped = Math.max(0, ...numeric.filter((c) => features.includes(c.name)).map((c) => c.missing));

  async function start(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    try {
      const { fit } = await api<{ fit: { id: number } }>('/api/fits', {
        method: 'POST',
        json: { datasetId, features: numeric.map((c) => c.name).filter((n) => features.includes(n)), minComponents: minK, maxComponents: maxK, covariances: STRUCTURES.filter((s) => structures.includes(s)), restarts, seed, standardize, maxIter, tol },
      });
      router.push(`/studio/fits/${fit.id}`);
    } catch (err) {
      setError(err instanceof ApiError ? err : new ApiError('Could not start the fit.', 0));
      setBusy(false);
    }
  }

  return (
    <form onSubmit={start} className="space-y-6" aria-label="Fit settings">
      <fieldset className="min-w-0">
        <legend className="pw-label">Features</legend>
        <div className="flex flex-wrap gap-2">
          {numeric.map((c) => (
            <label key={c.name} className={`cursor-pointer rounded-full px-3 py-1.5 text-sm ring-1 has-[:focus-visible]:outline has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-offset-2 has-[:focus-visible]:outline-saffron-700 ${features.includes(c.name) ? 'bg-moss-600 font-bold text-white ring-moss-600' : 'bg-white text-ink-soft ring-ink/15'}`}>
              <input type="checkbox" className="sr-only" checked={features.includes(c.name)} onChange={() => setFeatures((f) => toggle(f, c.name))} />
              {c.displayName || c.name}
              {c.unit ? <span className="font-normal"> ({c.unit})</span> : null}
            </label>
          ))}
        </div>
        {issue('features') && <p className="pw-field-error">{issue('features')}</p>}
        <p className="mt-2 text-xs text-ink-faint">
          {features.length} chosen. {dropped > 0 ? `At least ${dropped} row${dropped === 1 ? '' : 's'} with a gap in a chosen feature will be left out.` : 'No chosen feature has gaps.'}
        </p>
      </fieldset>
      <div className="grid gap-6 md:grid-cols-2">
        <fieldset className="min-w-0">
          <legend className="pw-label">Components to try</legend>
          <div className="flex items-center gap-2">
            <input aria-label="Fewest components" type="number" className="pw-input w-20" min={1} max={maxComponentsAllowed} value={minK} onChange={(e) => setMinK(Number(e.target.value))} />
            <span className="text-ink-soft">to</span>
            <input aria-label="Most components" type="number" className="pw-input w-20" min={1} max={maxComponentsAllowed} value={maxK} onChange={(e) => setMaxK(Number(e.target.value))} />
          </div>
          {(issue('minComponents') || issue('maxComponents')) && <p className="pw-field-error">{issue('minComponents') ?? issue('maxComponents')}</p>}
          <p className="mt-2 text-xs text-ink-faint">{candidates} candidate models; BIC picks among them, you may overrule it.</p>
        </fieldset>
        <fieldset className="min-w-0">
          <legend className="pw-label">Covariance structures</legend>
          <div className="grid grid-cols-2 gap-2">
            {STRUCTURES.map((s) => (
              <label key={s} className="flex cursor-pointer items-start gap-2 text-sm">
                <input type="checkbox" className="mt-1 accent-moss-600" checked={structures.includes(s)} onChange={() => setStructures((x) => toggle(x, s))} />
                <span>
                  <span className="font-bold">{s}</span>
                  <span className="block text-xs text-ink-faint">{STRUCTURE_HELP[s]}</span>
                </span>
              </label>
            ))}
          </div>
          {issue('covariances') && <p className="pw-field-error">{issue('covariances')}</p>}
        </fieldset>
      </div>
      <div className="grid gap-6 sm:grid-cols-2 md:grid-cols-4">
        <div>
          <label className="pw-label" htmlFor="restarts">
            Restarts
          </label>
          <input id="restarts" type="number" className="pw-input" min={1} max={20} value={restarts} onChange={(e) => setRestarts(Number(e.target.value))} />
          {issue('restarts') && <p className="pw-field-error">{issue('restarts')}</p>}
        </div>
        <div>
          <label className="pw-label" htmlFor="seed">
            Seed
          </label>
          <input id="seed" type="number" className="pw-input" min={0} value={seed} onChange={(e) => setSeed(Number(e.target.value))} />
          {issue('seed') && <p className="pw-field-error">{issue('seed')}</p>}
        </div>
        <div>
          <label className="pw-label" htmlFor="maxIter">
            Iteration cap
          </label>
          <input id="maxIter" type="number" className="pw-input" min={5} max={2000} value={maxIter} onChange={(e) => setMaxIter(Number(e.target.value))} />
          {issue('maxIter') && <p className="pw-field-error">{issue('maxIter')}</p>}
        </div>
        <div>
          <label className="pw-label" htmlFor="tol">
            Tolerance
          </label>
          <input id="tol" type="number" step="any" className="pw-input" min={0} value={tol} onChange={(e) => setTol(Number(e.target.value))} />
          {issue('tol') && <p className="pw-field-error">{issue('tol')}</p>}
        </div>
      </div>
      <label className="flex items-start gap-2 text-sm">
        <input type="checkbox" className="mt-1 accent-moss-600" checked={standardize} onChange={(e) => setStandardize(e.target.checked)} />
        <span>
          <span className="font-bold">Standardise features</span>
          <span className="block text-xs text-ink-faint">Fit on z-scores so a feature in metres does not outweigh one in km/h. Results are reported in the original units either way.</span>
        </span>
      </label>
      <div className="flex items-center gap-4">
        <button className="pw-button" type="submit" disabled={busy || features.length === 0 || structures.length === 0 || candidates === 0}>
          {busy ? 'Starting…' : `Fit ${candidates} candidate${candidates === 1 ? '' : 's'}`}
        </button>
        <span className="text-xs text-ink-faint">Runs in the background; you can leave the page and come back.</span>
      </div>
      {error && <ErrorNote message={placed > 0 && placed === error.issues.length ? fixFieldsNotice(placed) : error.message} />}
    </form>
  );
}
