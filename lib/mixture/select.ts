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
  const criterion = opts.criterion ?? 'bic';
  if (!Array.isArray(opts.components) || opts.components.length === 0) {
    throw new MixtureError('BAD_INPUT', 'components must list at least one component count.');
  }
  if (!Array.isArray(opts.covariances) || opts.covariances.length === 0) {
    throw new MixtureError('BAD_INPUT', 'covariances must list at least one structure.');
  }
  const grid: { components: number; covariance: Covariance }[] = [];
  for (const covariance of opts.covariances) for (const components of opts.components) grid.push({ components, covariance });
  const out: Candidate[] = [];
  grid.forEach((g, idx) => {
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
      out.push({
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
      });
    } catch (e) {
      if (!(e instanceof MixtureError) || e.code === 'CANCELLED' || e.code === 'BAD_INPUT' || e.code === 'CONSTANT_COLUMN') throw e;
      out.push({
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
      });
    }
  });
  const ok = out.filter((c) => c.result !== null);
  if (ok.length === 0) {
    throw new MixtureError(out.length ? 'EMPTY_COMPONENT' : 'BAD_INPUT', `No candidate could be fitted: ${out[0]?.error ?? 'empty grid'}`);
  }
  ok.sort((a, b) => (a[criterion] as number) - (b[criterion] as number));
  ok.forEach((c, i) => {
    c.rank = i + 1;
  });
  const failed = out.filter((c) => c.result === null);
  return { criterion, candidates: [...ok, ...failed], best: ok[0].result as FitResult };
}
