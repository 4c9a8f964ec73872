/**
 * The computation of one fit job, shared by the worker thread, the demo seed and the
 * tests: run the engine's model search and turn it into the stored result (ranked
 * candidates, each with its trace and full model JSON). No I/O and no database, so a
 * worker thread (or, later, a queue worker) can import it as it is.
 */
import { buildModel, selectMixture, toModelJson, type Candidate, type CandidateProgress, type Covariance } from '../mixture';

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

export function computeFit(input: ComputeInput, hooks: { onProgress?: (p: CandidateProgress) => void; shouldStop?: () => boolean } = {}): FitOutcome {
  const selection = selectMixture(input.rows, input.n, input.d, {
    components: input.components,
    covariances: input.covariances,
    restarts: input.restarts,
    seed: input.seed,
    standardize: input.standardize,
    maxIter: input.maxIter,
    tol: input.tol,
    regCovar: input.regCovar,
    criterion: 'bic',
    columnNames: input.features.map((f) => f.name),
    onProgress: hooks.onProgress,
    shouldStop: hooks.shouldStop,
  });
  const candidates: StoredCandidate[] = selection.candidates.map((c) => ({
    rank: c.rank,
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
  }));
  return { criterion: 'bic', rows: input.n, candidates };
}
