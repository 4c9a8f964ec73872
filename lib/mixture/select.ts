/**
 * Model choice: fit every (components × structure) pair and rank by BIC or AIC.
 *   BIC = −2·logL + p·ln N,   AIC = −2·logL + 2p   (p from freeParameters, em.ts).
 * logL is in original units, so candidates fitted with and without standardisation
 * stay comparable. Lower is better.
 */
import { MixtureError } from './errors';
import { type FitOptions, type FitProgress, type FitResult, fitMixtureWith, localEngine, type PassEngine } from './em';
import type { Covariance } from './types';

export interface CandidateProgress extends FitProgress {
  candidate: number; // 0-based position in the grid
  candidates: number;
  components: number;
  covariance: Covariance;
}

export interface SelectOptions extends Omit<FitOptions, 'components' | 'covariance' | 'onProgress' | 'init'> {
  components: number[];
  covariances: Covariance[];
  /** given means only make sense for one K, so init here is 'kmeans++' (default) or 'points' */
  init?: 'kmeans++' | 'points';
  criterion?: 'bic' | 'aic'; // default 'bic'
  onProgress?: (p: CandidateProgress) => void;
}

export interface Candidate {
  /** 1 = best; candidates that failed have rank null and come last */
  rank: number | null;
  components: number;
  covariance: Covariance;
  bic: number | null;
  aic: number | null;
  logLikelihood: number | null;
  parameters: number | null;
  iterations: number | null;
  converged: boolean | null;
  error: string | null;
  result: FitResult | null;
}

export interface Selection {
  criterion: 'bic' | 'aic';
  candidates: Candidate[]; // ranked
  best: FitResult;
}

export function selectMixture(rows: Float64Array, n: number, d: number, opts: SelectOptions): Selection {
  return selectMixtureWith(rows, n, d, opts, localEngine);
}

export function selectMixtureWith(rows: Float64Array, n: number, d: number, opts: SelectOptions, engine: PassEngine): Selection {
  const grid = candidateGrid(opts);
  const criterion = opts.criterion ?? 'bic';
  const candidates = rankCandidates(
    grid.map((_, idx) => fitCandidate(rows, n, d, opts, idx, engine)),
    criterion,
  );
  return { criterion, candidates, best: candidates[0].result as FitResult };
}

export interface GridEntry {
  components: number;
  covariance: Covariance;
}

/** The (components × structure) pairs in the order they are fitted: each structure, then each component count. */
export function candidateGrid(opts: Pick<SelectOptions, 'components' | 'covariances'>): GridEntry[] {
  if (!Array.isArray(opts.components) || opts.components.length === 0) {
    throw new MixtureError('BAD_INPUT', 'components must list at least one component count.');
  }
  if (!Array.isArray(opts.covariances) || opts.covariances.length === 0) {
    throw new MixtureError('BAD_INPUT', 'covariances must list at least one structure.');
  }
  const grid: GridEntry[] = [];
  for (const covariance of opts.covariances) for (const components of opts.components) grid.push({ components, covariance });
  return grid;
}

/**
 * Fit one entry of the grid. Entries are independent (each starts from opts.seed), so
 * a model search can be split between calls and still give the same candidates.
 * A candidate that fails for a reason of its own is returned with its error; errors
 * that concern the whole search (cancelled, bad input) are thrown.
 */
export function fitCandidate(rows: Float64Array, n: number, d: number, opts: SelectOptions, idx: number, engine: PassEngine = localEngine): Candidate {
  const grid = candidateGrid(opts);
  const g = grid[idx];
  if (!g) throw new MixtureError('BAD_INPUT', `There is no candidate ${idx} in a grid of ${grid.length}.`);
  const { onProgress, components: _c, covariances: _v, criterion: _k, ...rest } = opts;
  try {
    const result = fitMixtureWith(
      rows,
      n,
      d,
      {
        ...rest,
        components: g.components,
        covariance: g.covariance,
        onProgress: onProgress
          ? (p) => onProgress({ ...p, candidate: idx, candidates: grid.length, components: g.components, covariance: g.covariance })
          : undefined,
      },
      engine,
    );
    return {
      rank: null,
      components: g.components,
      covariance: g.covariance,
      bic: result.bic,
      aic: result.aic,
      logLikelihood: result.logLikelihood,
      parameters: result.parameters,
      iterations: result.iterations,
      converged: result.converged,
      error: null,
      result,
    };
  } catch (e) {
    if (!(e instanceof MixtureError) || e.code === 'CANCELLED' || e.code === 'BAD_INPUT' || e.code === 'CONSTANT_COLUMN') throw e;
    return {
      rank: null,
      components: g.components,
      covariance: g.covariance,
      bic: null,
      aic: null,
      logLikelihood: null,
      parameters: null,
      iterations: null,
      converged: null,
      error: e.message,
      result: null,
    };
  }
}

/**
 * Rank candidates given in grid order: fitted ones by the criterion (ties keep grid
 * order), then the failed ones (error set) in grid order. Sets `rank` in place.
 */
export function rankCandidates<C extends Pick<Candidate, 'rank' | 'bic' | 'aic' | 'error'>>(out: C[], criterion: 'bic' | 'aic'): C[] {
  const ok = out.filter((c) => c.error === null);
  if (ok.length === 0) {
    throw new MixtureError(out.length ? 'EMPTY_COMPONENT' : 'BAD_INPUT', `No candidate could be fitted: ${out[0]?.error ?? 'empty grid'}`);
  }
  ok.sort((a, b) => (a[criterion] as number) - (b[criterion] as number));
  ok.forEach((c, i) => {
    c.rank = i + 1;
  });
  return [...ok, ...out.filter((c) => c.error !== null)];
}
