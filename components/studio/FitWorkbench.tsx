'use client';

import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useCallback, useEffect, useState } from 'react';
import { CriterionChart } from '@/components/charts/CriterionChart';
import type { FitView } from '@/lib/fitting/views';
import { clusterColor } from '@/lib/fitting/palette';
import { api, ApiError } from './client-api';
import { FitProgressPanel, type ProgressFit } from './FitProgressPanel';
import { formatCount, formatFixed } from '@/lib/format';
import { ReviewPanel } from './ReviewPanel';
import { ErrorNote, Section } from './StudioPage';

/** A model already kept from this fit, and the candidate it came from. */
export interface KeptModel {
  id: number;
  name: string;
  components: number;
  covariance: string;
}

type FitJson = Omit<FitView, 'startedAt' | 'finishedAt' | 'createdAt'> & { startedAt: string | null; finishedAt: string | null; createdAt: string };

/** A fit from start to choice: live progress, then the ranked candidates, their review, and keeping one as a model. */
export function FitWorkbench({ initial, datasetName, kept = [] }: { initial: FitJson; datasetName: string; kept?: KeptModel[] }) {
  const [fit, setFit] = useState<FitJson>(initial);
  const live = fit.status === 'queued' || fit.status === 'running';
  const refresh = useCallback(async () => {
    try {
      const body = await api<{ fit: FitJson }>(`/api/fits/${initial.id}`, { cache: 'no-store' });
      setFit(body.fit);
    } catch {
      // A missed poll is retried on the next tick.
    }
  }, [initial.id]);
  // Poll while the job is queued or running; stop once it has an outcome.
  useEffect(() => {
    if (!live) return;
    let stopped = false;
    let timer: ReturnType<typeof setTimeout>;
    const tick = async () => {
      await refresh();
      if (!stopped) timer = setTimeout(tick, 700);
    };
    timer = setTimeout(tick, 400);
    return () => {
      stopped = true;
      clearTimeout(timer);
    };
  }, [live, refresh]);
  const result = fit.result;
  // Open on the candidate that was kept, if one was; else BIC's pick.
  const keptIndex = result?.candidates.find((c) => kept.some((k) => k.components === c.components && k.covariance === c.covariance))?.index;
  const [chosen, setChosen] = useState(keptIndex ?? 0);

  return (
    <>
      <Section title="Progress" id="progress">
        <FitProgressPanel fit={fit as unknown as ProgressFit} onChange={() => void refresh()} />
      </Section>
      {fit.status === 'succeeded' && result && kept.length > 0 && (
        <div role="status" className="rounded-lg border border-moss-300 bg-moss-50 px-5 py-4 text-moss-900" data-testid="kept-models">
          <p className="font-bold">Already kept from this fit</p>
          <ul className="mt-1 space-y-0.5 text-sm">
            {kept.map((k) => (
              <li key={k.id}>
                <Link href={`/studio/models/${k.id}`} className="font-bold underline">
                  {k.name}
                </Link>{' '}
                <span className="text-moss-700">
                  ({k.components} component{k.components === 1 ? '' : 's'}, {k.covariance}): name its clusters or publish it from its page.
                </span>
              </li>
            ))}
          </ul>
        </div>
      )}
      {fit.status === 'succeeded' && result && (
        <>
          <Section title="Model choice" id="choice" lead="BIC and AIC for every candidate (lower is better). The ring marks the candidate you are looking at; BIC's pick is ranked first.">
            <div data-testid="criterion-chart" className="min-h-[260px] overflow-x-auto">
              <CriterionChart candidates={result.candidates.map((c) => ({ components: c.components, covariance: c.covariance, bic: c.bic, aic: c.aic, index: c.index }))} chosen={chosen} />
            </div>
            <CandidateTable candidates={result.candidates} chosen={chosen} onChoose={setChosen} />
          </Section>
          <ChosenCandidate key={chosen} fit={fit} index={chosen} datasetName={datasetName} kept={kept.filter((k) => k.components === result.candidates[chosen]?.components && k.covariance === result.candidates[chosen]?.covariance)} />
        </>
      )}
    </>
  );
}

type Candidate = NonNullable<FitJson['result']>['candidates'][number];

function CandidateTable({ candidates, chosen, onChoose }: { candidates: Candidate[]; chosen: number; onChoose: (i: number) => void }) {
  const best = candidates.find((c) => c.rank === 1);
  return (
    <div className="mt-6 max-h-96 overflow-auto" tabIndex={0} role="region" aria-label="Candidates, scrollable">
      <table className="w-full text-left text-sm" aria-label="Candidates">
        <thead className="sticky top-0 border-b border-ink/10 bg-white text-ink-soft">
          <tr>
            <th className="py-2 pr-3 font-bold">Look at</th>
            <th className="py-2 pr-3 text-right font-bold">Rank</th>
            <th className="py-2 pr-3 text-right font-bold">Components</th>
            <th className="py-2 pr-3 font-bold">Covariance</th>
            <th className="py-2 pr-3 text-right font-bold">BIC</th>
            <th className="py-2 pr-3 text-right font-bold">ΔBIC</th>
            <th className="py-2 pr-3 text-right font-bold">AIC</th>
            <th className="py-2 pr-3 text-right font-bold">Log-likelihood</th>
            <th className="py-2 pr-3 text-right font-bold">Parameters</th>
            <th className="py-2 font-bold">Iterations</th>
          </tr>
        </thead>
        <tbody>
          {candidates.map((c) => (
            <tr key={c.index} className={`border-b border-ink/5 ${c.index === chosen ? 'bg-moss-50' : ''}`}>
              <td className="py-1.5 pr-3">
                <input type="radio" name="candidate" aria-label={`${c.components} components, ${c.covariance}`} className="accent-moss-600" disabled={!!c.error} checked={c.index === chosen} onChange={() => onChoose(c.index)} />
              </td>
              <td className="py-1.5 pr-3 text-right tabular-nums">{c.rank ?? '—'}</td>
              <td className="py-1.5 pr-3 text-right tabular-nums">{c.components}</td>
              <td className="py-1.5 pr-3">{c.covariance}</td>
              {c.error ? (
                <td colSpan={6} className="py-1.5 text-xs text-clay-700">
                  {c.error}
                </td>
              ) : (
                <>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{formatFixed(c.bic, 1)}</td>
                  <td className="py-1.5 pr-3 text-right tabular-nums text-ink-soft">{best && c.bic !== null && best.bic !== null ? (c.rank === 1 ? 'best' : `+${formatFixed(c.bic - best.bic, 1)}`) : '—'}</td>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{formatFixed(c.aic, 1)}</td>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{formatFixed(c.logLikelihood, 1)}</td>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{formatCount(c.parameters)}</td>
                  <td className="py-1.5 tabular-nums">
                    {c.iterations}
                    {c.converged ? '' : <span className="ml-1 text-xs font-bold text-saffron-700">not converged</span>}
                  </td>
                </>
              )}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function ChosenCandidate({ fit, index, datasetName, kept }: { fit: FitJson; index: number; datasetName: string; kept: KeptModel[] }) {
  const router = useRouter();
  const result = fit.result!;
  const c = result.candidates[index];
  const labels = Array.from({ length: c.components }, (_, k) => `Cluster ${k + 1}`);
  const colors = labels.map((_, k) => clusterColor(k));
  const [name, setName] = useState(`${datasetName}: ${c.components} ${c.covariance}`);
  const [note, setNote] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<ApiError | null>(null);
  const isBest = c.rank === 1;
  const nameIssue = error?.issues.find((i) => i.field === 'name')?.message;
  const noteIssue = error?.issues.some((i) => i.field === 'selectionNote');

  return (
    <>
      <Section title={`${c.components} component${c.components === 1 ? '' : 's'}, ${c.covariance} covariance`} id="review" lead={isBest ? 'The candidate with the lowest BIC.' : `Ranked ${c.rank} by BIC.`}>
        <ReviewPanel baseUrl={`/api/fits/${fit.id}/review?candidate=${index}`} labels={labels} colors={colors} features={result.features} />
      </Section>
      <Section
        title={kept.length ? 'Kept already' : 'Keep this model'}
        id="keep"
        lead={kept.length ? `You kept this candidate as “${kept.map((k) => k.name).join('”, “')}”. Keeping it again makes a separate copy with its own names.` : 'Keeping it lets you name the clusters and, later, publish it as a calculator.'}
      >
        <form
          className="space-y-4"
          onSubmit={async (e) => {
            e.preventDefault();
            setBusy(true);
            setError(null);
            try {
              const { model } = await api<{ model: { id: number } }>('/api/models', { method: 'POST', json: { fitId: fit.id, candidate: index, name, selectionNote: note } });
              router.push(`/studio/models/${model.id}`);
            } catch (err) {
              setError(err instanceof ApiError ? err : new ApiError('Could not keep the model.', 0));
              setBusy(false);
            }
          }}
        >
          <div>
            <label className="pw-label" htmlFor="model-name">
              Model name
            </label>
            <input id="model-name" className="pw-input" value={name} onChange={(e) => setName(e.target.value)} maxLength={200} aria-invalid={nameIssue ? true : undefined} />
            {nameIssue && <p className="pw-field-error">{nameIssue}</p>}
          </div>
          <div>
            <label className="pw-label" htmlFor="selection-note">
              Why this candidate? {isBest ? <span className="font-normal text-ink-faint">(optional)</span> : <span className="font-normal text-clay-700">(needed: BIC prefers another)</span>}
            </label>
            <textarea id="selection-note" className="pw-input h-20" value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} placeholder={isBest ? '' : 'e.g. four groups match the ride groups the club runs, and BIC differs by only a few points.'} />
            {noteIssue && <p className="pw-field-error">Say why you prefer it to BIC&apos;s choice.</p>}
          </div>
          <button type="submit" className="pw-button" disabled={busy}>
            {busy ? 'Saving…' : kept.length ? 'Keep another copy' : 'Keep and name clusters'}
          </button>
          {error && !nameIssue && <ErrorNote message={error.message} />}
        </form>
      </Section>
    </>
  );
}
