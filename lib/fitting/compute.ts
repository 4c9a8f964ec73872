/**
 * The computation of one fit job, shared by the worker thread, the demo seed and the
 * tests: run the engine's model search and turn it into the stored result (ranked
 * candidates, each with its trace and full model JSON). No I/O and no database, so a
 * worker thread (or, later, a queue worker) can import it as it is.
 */
import { buildModel, candidateGrid, fitCandidate, rankCandidates, toModelJson, type Candidate, type CandidateProgress, type Covariance } from '../mixture';

export interface ComputeInput {
  rows: Float64Array;
  n: number;
  d: number;
  features: { name: string; unit: string | null }[];
  components: number[];
  covariances: Covariance[];
  restarts: number;
  seed: number;
  standardize: boolean;
  maxIter: number;
  tol: number;
  regCovar: number;
}

/** The engine's candidate, with its in-memory fit replaced by what is stored. */
export interface StoredCandidate extends Omit<Candidate, 'result'> {
  /** Mean log-likelihood per row at each iteration of the winning restart. */
  trace: number[];
  /** The engine's model JSON v1 (lib/mixture/README.md); null when the candidate failed. */
  model: Record<string, unknown> | null;
}

export interface FitOutcome {
  criterion: 'bic';
  rows: number;
  candidates: StoredCandidate[];
}

export interface ComputeHooks {
  onProgress?: (p: CandidateProgress) => void;
  shouldStop?: () => boolean;
  /** Asked before each candidate after the first of a call: true ends the call there, to be resumed later. */
  shouldPause?: () => boolean;
}

/** Candidates fitted by one call, in grid order, and where the next call resumes (null: all done). */
export interface CandidateBatch {
  candidates: StoredCandidate[];
  next: number | null;
}

/** The candidates this input asks for, in the order they are fitted and stored. */
export function candidateCount(input: Pick<ComputeInput, 'components' | 'covariances'>): number {
  return candidateGrid(input).length;
}

/**
 * Fit candidates from grid position `from` on, until all are done or `shouldPause`
 * says to yield the thread. Each candidate depends only on the input and the seed, so
 * a search split over several calls (even across processes) equals one in a single call.
 */
export function computeCandidates(input: ComputeInput, from: number, hooks: ComputeHooks = {}): CandidateBatch {
  const total = candidateCount(input);
  const opts = {
    components: input.components,
    covariances: input.covariances,
    restarts: input.restarts,
    seed: input.seed,
    standardize: input.standardize,
    maxIter: input.maxIter,
    tol: input.tol,
    regCovar: input.regCovar,
    criterion: 'bic' as const,
    columnNames: input.features.map((f) => f.name),
    onProgress: hooks.onProgress,
    shouldStop: hooks.shouldStop,
  };
  const candidates: StoredCandidate[] = [];
  for (let idx = from; idx < total; idx++) {
    if (idx > from && hooks.shouldPause?.()) return { candidates, next: idx };
    const c = fitCandidate(input.rows, input.n, input.d, opts, idx);
    candidates.push({
      rank: null,
      components: c.components,
      covariance: c.covariance,
      bic: c.bic,
      aic: c.aic,
      logLikelihood: c.logLikelihood,
      parameters: c.parameters,
      iterations: c.iterations,
      converged: c.converged,
      error: c.error,
      trace: c.result?.trace.slice() ?? [],
      model: c.result ? (JSON.parse(toModelJson(buildModel(input.rows, input.n, input.d, c.result, { features: input.features }))) as Record<string, unknown>) : null,
    });
  }
  return { candidates, next: null };
}

/** The stored outcome from every candidate in grid order: ranked by BIC, failed ones last. */
export function rankOutcome(rows: number, inGridOrder: StoredCandidate[]): FitOutcome {
  return { criterion: 'bic', rows, candidates: rankCandidates(inGridOrder.map((c) => ({ ...c, rank: null })), 'bic') };
}

export function computeFit(input: ComputeInput, hooks: ComputeHooks = {}): FitOutcome {
  return rankOutcome(input.n, computeCandidates(input, 0, hooks).candidates);
}
