import type { Fit } from '@/models';
import type { FitOutcome, StoredCandidate } from './compute';

export interface StoredFitResult extends FitOutcome {
  durationMs: number;
  dropped: number;
  features: { name: string; displayName: string; unit: string }[];
}

export function fitResult(fit: Pick<Fit, 'result'>): StoredFitResult | null {
  return (fit.result as unknown as StoredFitResult | null) ?? null;
}

/** A candidate without its model JSON: what tables and charts need. */
export type CandidateSummary = Omit<StoredCandidate, 'model'> & { index: number };

export function candidateSummaries(result: StoredFitResult): CandidateSummary[] {
  return result.candidates.map(({ model: _m, ...c }, index) => ({ ...c, index }));
}

/**
 * JSON for the poll route and pages: status, progress, and (once done) the ranked
 * candidates. `queuePosition` (lib/fitting/queue.ts) is how many fits are expected to
 * start before a waiting one: 0 means it is next; null when it is not waiting.
 */
export function fitView(fit: Fit, queuePosition: number | null = null) {
  const result = fitResult(fit);
  return {
    id: fit.id,
    number: fit.number,
    datasetId: fit.datasetId,
    status: fit.status,
    params: fit.params,
    progress: fit.progress,
    error: fit.error,
    cancelRequested: fit.cancelRequested,
    queuePosition: fit.status === 'queued' ? queuePosition : null,
    startedAt: fit.startedAt,
    finishedAt: fit.finishedAt,
    createdAt: fit.createdAt,
    result: result
      ? { criterion: result.criterion, rows: result.rows, dropped: result.dropped, durationMs: result.durationMs, features: result.features, candidates: candidateSummaries(result) }
      : null,
  };
}
export type FitView = ReturnType<typeof fitView>;
