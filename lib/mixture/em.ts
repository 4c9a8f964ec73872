/**
 * The EM fit loop. Iteration t:
 *   1. E-step with the current parameters → mean log-likelihood ℓ_t (pushed to `trace`)
 *      and the sufficient statistics (one fused pass, estep.ts);
 *   2. M-step (mstep.ts) → new parameters;
 *   3. stop when |ℓ_t − ℓ_{t−1}| < tol (converged) or t = maxIter.
 * After the loop one more pass gives the log-likelihood of the final parameters,
 * which is what `logLikelihood`, BIC and AIC report. (This is the same schedule
 * scikit-learn's GaussianMixture uses, so fixed-start runs can be compared.)
 */
import { MixtureError } from './errors';
import { passBlocks, runKernelBlocks, scratchLength, statsLength, sumBlocks } from './estep';
import { type InitMethod, initialGaussians } from './init';
import { blockToMatrix } from './linalg';
import { allocFactors, allocGaussians, cloneGaussians, type Factors, finishMStep, kernelArrays, prepareFactors } from './mstep';
import { SeededRandom } from './prng';
import { applyScaler, covToOriginal, fitScaler, logJacobian, meanToOriginal, meanToScaled, type ScalerParams } from './scaler';
import { COVARIANCES, type Covariance, type Gaussians, isDiagonalStructure } from './types';

export interface FitProgress {
  restart: number; // 0-based
  iteration: number; // 1-based
  /** total log-likelihood of the rows before this iteration's M-step, original units */
  logLikelihood: number;
  meanLogLikelihood: number;
}

export interface FitOptions {
  components: number;
  covariance: Covariance;
  /** default 'kmeans++'; given means are in original units */
  init?: InitMethod;
  /** number of initialisations, best final log-likelihood wins (default 1) */
  restarts?: number;
  seed?: number; // default 0
  tol?: number; // on mean log-likelihood per row, default 1e-3
  maxIter?: number; // default 100
  regCovar?: number; // added to covariance diagonals, in the fitted (standardised) space; default 1e-6
  /** z-score features before fitting (default true); results are still in original units */
  standardize?: boolean;
  /** feature names, used only in error messages */
  columnNames?: string[];
  /**
   * responsibilities below this add nothing to the M-step statistics (default 1e-15;
   * below the rounding error of the sums, see estep.ts); 0 disables pruning
   */
  prune?: number;
  /** soft count below which a component counts as empty (default 1e-8) */
  minComponentCount?: number;
  onProgress?: (p: FitProgress) => void;
  /** polled once per iteration; true aborts with MixtureError('CANCELLED') */
  shouldStop?: () => boolean;
}

export interface RestartSummary {
  restart: number;
  logLikelihood: number | null;
  iterations: number;
  converged: boolean;
  error: string | null;
}

export interface MixtureParams {
  weights: number[];
  means: number[][];
  covariances: number[][][];
}

export interface FitResult extends MixtureParams {
  covariance: Covariance;
  components: number;
  dimensions: number;
  rows: number;
  /** total log-likelihood of the final parameters, original units */
  logLikelihood: number;
  meanLogLikelihood: number;
  bic: number;
  aic: number;
  parameters: number;
  iterations: number;
  converged: boolean;
  /** mean log-likelihood per row at each iteration's E-step, original units */
  trace: number[];
  /** index of the restart that won */
  restart: number;
  restartSummaries: RestartSummary[];
  standardized: boolean;
  scaler: ScalerParams | null;
  /** the parameters in the space EM ran in (z-scores when standardized) */
  fitted: MixtureParams;
  settings: { tol: number; maxIter: number; regCovar: number; seed: number; restarts: number; init: string };
}

/**
 * Runs one fused E+M-statistics pass over all rows. The default runs on this thread;
 * lib/mixture-parallel provides one that splits the rows across worker threads.
 */
export interface PassEngine {
  /** storage for the (standardised) rows the passes will read */
  allocRows?(length: number): Float64Array;
  /** zero `stats`, then fill it with the sums over all n rows (layout: estep.ts) */
  run(x: Float64Array, n: number, d: number, g: Gaussians, f: Factors, stats: Float64Array): void;
}

export const DEFAULT_PRUNE = 1e-15;

// Reused across passes: one block of sums per PASS_BLOCK_ROWS rows.
let localBlockStats = new Float64Array(0);

export const localEngine: PassEngine = {
  run(x, n, d, g, f, stats) {
    const scratch = new Float64Array(scratchLength(g.k, d));
    const a = kernelArrays(f);
    const sl = statsLength(g.k, d, f.diagonal);
    const blocks = passBlocks(n);
    if (localBlockStats.length < blocks * sl) localBlockStats = new Float64Array(blocks * sl);
    runKernelBlocks(f.kernel, x, 0, blocks, n, d, g.k, g.means, a.factors, a.consts, f.centre, f.prune, scratch, localBlockStats, sl);
    sumBlocks(localBlockStats, blocks, sl, stats);
  },
};

/**
 * Free parameters (used in BIC/AIC), K components in d dimensions:
 *   weights K−1, means K·d, plus covariance:
 *   full K·d(d+1)/2, tied d(d+1)/2, diagonal K·d, spherical K.
 */
export function freeParameters(k: number, d: number, covariance: Covariance): number {
  const cov =
    covariance === 'full'
      ? (k * d * (d + 1)) / 2
      : covariance === 'tied'
        ? (d * (d + 1)) / 2
        : covariance === 'diagonal'
          ? k * d
          : k;
  return k - 1 + k * d + cov;
}

export function validateRows(rows: Float64Array, n: number, d: number): void {
  if (!(rows instanceof Float64Array)) throw new MixtureError('BAD_INPUT', 'Rows must be a Float64Array (n·d, row-major).');
  if (!Number.isInteger(n) || !Number.isInteger(d) || n < 1 || d < 1) {
    throw new MixtureError('BAD_INPUT', `Row count and dimension must be positive integers (got n=${n}, d=${d}).`);
  }
  if (rows.length < n * d) throw new MixtureError('BAD_INPUT', `Expected ${n * d} values (n·d), got ${rows.length}.`);
  for (let i = 0; i < n * d; i++) {
    if (!Number.isFinite(rows[i])) {
      throw new MixtureError('BAD_INPUT', `Row ${Math.floor(i / d) + 1}, column ${(i % d) + 1} is not a finite number.`);
    }
  }
}

function checkOptions(n: number, opts: FitOptions): void {
  const k = opts.components;
  if (!Number.isInteger(k) || k < 1) throw new MixtureError('BAD_INPUT', `components must be a positive integer (got ${k}).`);
  if (!COVARIANCES.includes(opts.covariance)) {
    throw new MixtureError('BAD_INPUT', `covariance must be one of ${COVARIANCES.join(', ')} (got ${String(opts.covariance)}).`);
  }
  if (n < k) throw new MixtureError('TOO_FEW_ROWS', `Need at least ${k} rows to fit ${k} components, got ${n}.`);
  const nonNeg = (name: string, v: number | undefined, positive: boolean) => {
    if (v === undefined) return;
    if (!Number.isFinite(v) || v < 0 || (positive && v === 0)) {
      throw new MixtureError('BAD_INPUT', `${name} must be a ${positive ? 'positive' : 'non-negative'} number (got ${v}).`);
    }
  };
  nonNeg('tol', opts.tol, false);
  nonNeg('regCovar', opts.regCovar, false);
  nonNeg('prune', opts.prune, false);
  if (opts.maxIter !== undefined && (!Number.isInteger(opts.maxIter) || opts.maxIter < 1)) {
    throw new MixtureError('BAD_INPUT', `maxIter must be a positive integer (got ${opts.maxIter}).`);
  }
  if (opts.restarts !== undefined && (!Number.isInteger(opts.restarts) || opts.restarts < 1)) {
    throw new MixtureError('BAD_INPUT', `restarts must be a positive integer (got ${opts.restarts}).`);
  }
}

function toParams(g: Gaussians): MixtureParams {
  const { k, d } = g;
  const means: number[][] = [];
  const covariances: number[][][] = [];
  for (let c = 0; c < k; c++) {
    means.push(Array.from(g.means.subarray(c * d, (c + 1) * d)));
    covariances.push(blockToMatrix(g.covs, c * d * d, d));
  }
  return { weights: Array.from(g.weights), means, covariances };
}

/** Fit a Gaussian mixture by EM on this thread. See FitOptions for defaults. */
export function fitMixture(rows: Float64Array, n: number, d: number, opts: FitOptions): FitResult {
  return fitMixtureWith(rows, n, d, opts, localEngine);
}

/** fitMixture with a chosen PassEngine (e.g. the worker-thread one). */
export function fitMixtureWith(rows: Float64Array, n: number, d: number, opts: FitOptions, engine: PassEngine): FitResult {
  validateRows(rows, n, d);
  checkOptions(n, opts);
  const k = opts.components;
  const covariance = opts.covariance;
  const tol = opts.tol ?? 1e-3;
  const maxIter = opts.maxIter ?? 100;
  const reg = opts.regCovar ?? 1e-6;
  const seed = opts.seed ?? 0;
  const restarts = opts.restarts ?? 1;
  const standardize = opts.standardize ?? true;
  const minCount = opts.minComponentCount ?? 1e-8;
  const prune = opts.prune ?? DEFAULT_PRUNE;
  const init: FitOptions['init'] = opts.init ?? 'kmeans++';

  // a constant column is rejected either way (it would make every covariance singular)
  const fittedScaler = fitScaler(rows, n, d, opts.columnNames);
  const scaler = standardize ? fittedScaler : null;
  let x: Float64Array;
  if (engine.allocRows) {
    x = engine.allocRows(n * d);
    if (scaler) applyScaler(rows, n, d, scaler, x);
    else x.set(rows.subarray(0, n * d));
  } else {
    x = scaler ? applyScaler(rows, n, d, scaler, new Float64Array(n * d)) : rows;
  }
  const jac = logJacobian(scaler);
  const fitInit: FitOptions['init'] =
    typeof init === 'object' ? { means: init.means.map((m) => meanToScaled(m, scaler)) } : init;

  const rng = new SeededRandom(seed);
  const diag = isDiagonalStructure(covariance);
  const stats = new Float64Array(statsLength(k, d, diag));
  const factors = allocFactors(k, d, diag, prune);

  let best: { g: Gaussians; ll: number; trace: number[]; iterations: number; converged: boolean; restart: number } | null = null;
  const summaries: RestartSummary[] = [];
  let lastError: MixtureError | null = null;

  for (let restart = 0; restart < restarts; restart++) {
    try {
      let g = initialGaussians(x, n, d, k, covariance, fitInit, reg, rng);
      let spare = allocGaussians(k, d, covariance);
      const trace: number[] = [];
      let prev = -Infinity;
      let converged = false;
      let iterations = 0;
      for (let it = 1; it <= maxIter; it++) {
        if (opts.shouldStop?.()) throw new MixtureError('CANCELLED', 'The fit was cancelled.');
        prepareFactors(g, factors);
        engine.run(x, n, d, g, factors, stats);
        const mean = stats[0] / n;
        if (!Number.isFinite(mean)) {
          throw new MixtureError('NOT_POSITIVE_DEFINITE', `The log-likelihood became non-finite at iteration ${it}; try a larger regularisation or standardised features.`);
        }
        trace.push(mean - jac);
        finishMStep(stats, factors.centre, g, spare, n, reg, minCount, it);
        const t = g;
        g = spare;
        spare = t;
        iterations = it;
        opts.onProgress?.({ restart, iteration: it, logLikelihood: (mean - jac) * n, meanLogLikelihood: mean - jac });
        if (Math.abs(mean - prev) < tol) {
          converged = true;
          break;
        }
        prev = mean;
      }
      prepareFactors(g, factors);
      engine.run(x, n, d, g, factors, stats);
      const ll = stats[0];
      if (!Number.isFinite(ll)) throw new MixtureError('NOT_POSITIVE_DEFINITE', 'The final log-likelihood is not finite; try a larger regularisation.');
      summaries.push({ restart, logLikelihood: ll - n * jac, iterations, converged, error: null });
      if (best === null || ll > best.ll) best = { g: cloneGaussians(g), ll, trace, iterations, converged, restart };
    } catch (e) {
      if (e instanceof MixtureError && (e.code === 'EMPTY_COMPONENT' || e.code === 'NOT_POSITIVE_DEFINITE')) {
        // documented recovery: this restart is dropped; the others may still succeed
        summaries.push({ restart, logLikelihood: null, iterations: 0, converged: false, error: e.message });
        lastError = e;
        continue;
      }
      throw e;
    }
  }
  if (best === null) {
    const err = lastError ?? new MixtureError('EMPTY_COMPONENT', 'No restart produced a fit.');
    throw new MixtureError(err.code, restarts > 1 ? `All ${restarts} restarts failed. ${err.message}` : err.message);
  }

  const fitted = toParams(best.g);
  const logLikelihood = best.ll - n * jac;
  const p = freeParameters(k, d, covariance);
  return {
    covariance,
    components: k,
    dimensions: d,
    rows: n,
    weights: fitted.weights.slice(),
    means: fitted.means.map((m) => meanToOriginal(m, scaler)),
    covariances: fitted.covariances.map((c) => covToOriginal(c, scaler)),
    logLikelihood,
    meanLogLikelihood: logLikelihood / n,
    bic: -2 * logLikelihood + p * Math.log(n),
    aic: -2 * logLikelihood + 2 * p,
    parameters: p,
    iterations: best.iterations,
    converged: best.converged,
    trace: best.trace,
    restart: best.restart,
    restartSummaries: summaries,
    standardized: standardize,
    scaler,
    fitted,
    settings: { tol, maxIter, regCovar: reg, seed, restarts, init: typeof init === 'object' ? 'means' : init },
  };
}
