'use client';

import Link from 'next/link';
import { useState } from 'react';
import { api } from './client-api';
import { formatCount, formatFixed as num } from '@/lib/format';
import { FitStatusPill } from './FitStatusPill';

export interface ProgressFit {
  id: number;
  datasetId: number;
  status: string;
  error: string | null;
  cancelRequested: boolean;
  /** Fits expected to start before this waiting one (0: next); null when not waiting. */
  queuePosition?: number | null;
  startedAt: string | null;
  progress: {
    phase?: string;
    paused?: boolean;
    fitted?: number;
    candidate?: number;
    candidates?: number;
    components?: number;
    covariance?: string;
    restart?: number;
    restarts?: number;
    iteration?: number;
    maxIter?: number;
    logLikelihood?: number;
    fraction?: number;
    rows?: number;
  } | null;
}

/** Where a waiting fit stands in the fitting queue. */
function queueText(position: number | null | undefined): string {
  if (position === null || position === undefined) return 'Waiting for a free fitting slot…';
  if (position === 0) return 'Waiting: yours is next in line for a fitting slot.';
  return `Waiting: ${position} fit${position === 1 ? '' : 's'} ahead of yours in line for a fitting slot.`;
}

/** Live state of a job: which candidate, restart and iteration, the log-likelihood, and a way to stop it. */
export function FitProgressPanel({ fit, onChange }: { fit: ProgressFit; onChange: () => void }) {
  const [cancelling, setCancelling] = useState(false);
  const p = fit.progress ?? {};
  const live = fit.status === 'queued' || fit.status === 'running';
  const fraction = fit.status === 'succeeded' ? 1 : (p.fraction ?? 0);
  return (
    <div className="space-y-4" aria-live="polite">
      <div className="flex flex-wrap items-center gap-3">
        <FitStatusPill status={fit.status} />
        <p className="text-sm text-ink-soft" data-testid="fit-progress-text">
          {fit.status === 'queued' && p.paused && `Paused after ${p.fitted} of ${p.candidates} candidates so a fit from another workspace could start; it carries on from there. `}
          {fit.status === 'queued' && queueText(fit.queuePosition)}
          {fit.status === 'running' && p.phase !== 'fitting' && 'Starting…'}
          {fit.status === 'running' && p.phase === 'fitting' && (
            <>
              Candidate <b>{p.candidate}</b> of {p.candidates}: {p.components} component{p.components === 1 ? '' : 's'}, {p.covariance} covariance · restart {p.restart} of {p.restarts} · iteration {p.iteration} · log-likelihood <span className="tabular-nums">{num(p.logLikelihood, 2)}</span>
            </>
          )}
          {fit.status === 'succeeded' && `All ${p.candidates ?? ''} candidates fitted on ${formatCount(p.rows)} rows.`}
          {fit.status === 'cancelled' && (fit.error ?? 'Cancelled.')}
        </p>
        {live && (
          <button
            type="button"
            className="pw-button-quiet ml-auto"
            disabled={cancelling || fit.cancelRequested}
            onClick={async () => {
              setCancelling(true);
              try {
                await api(`/api/fits/${fit.id}/cancel`, { method: 'POST' });
              } finally {
                onChange();
              }
            }}
          >
            {cancelling || fit.cancelRequested ? 'Stopping…' : 'Cancel fit'}
          </button>
        )}
      </div>
      <div className="h-2.5 overflow-hidden rounded-full bg-paper-deep" role="progressbar" aria-label="Fit progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(fraction * 100)}>
        <div className={`h-full rounded-full transition-all duration-500 ${fit.status === 'failed' ? 'bg-clay-500' : fit.status === 'cancelled' ? 'bg-ink-faint' : 'bg-moss-500'}`} style={{ width: `${Math.max(2, fraction * 100)}%` }} />
      </div>
      {fit.status === 'failed' && (
        <div role="alert" className="rounded-lg bg-clay-100 px-4 py-3 text-sm text-clay-700">
          <p className="font-bold">The fit failed: {fit.error}</p>
          <Link className="mt-1 inline-block font-bold underline" href={`/studio/datasets/${fit.datasetId}#fit`}>
            Change the settings and start again
          </Link>
        </div>
      )}
      {fit.status === 'cancelled' && (
        <Link className="text-sm font-bold text-moss-700 underline" href={`/studio/datasets/${fit.datasetId}#fit`}>
          Start a new fit
        </Link>
      )}
    </div>
  );
}
