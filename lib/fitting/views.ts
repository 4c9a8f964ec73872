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

/** JSON for the poll route and pages: status, progress, and (once done) the ranked candidates. */
export function fitView(fit: Fit) {
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
    startedAt: fit.startedAt,
    finishedAt: fit.finishedAt,
    createdAt: fit.createdAt,
    result: result
      ? { criterion: result.criterion, rows: result.rows, dropped: result.dropped, durationMs: result.durationMs, features: result.features, candidates: candidateSummaries(result) }
      : null,
  };
}
export type FitView = ReturnType<typeof fitView>;
