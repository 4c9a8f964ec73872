/**
 * Public API of the Partwise mixture engine (pure, no I/O). See README.md.
 */
export { MixtureError, isMixtureError, type MixtureErrorCode } from './errors';
export { type Covariance, COVARIANCES, type Gaussians } from './types';
export {
  fitMixture,
  fitMixtureWith,
  freeParameters,
  localEngine,
  type FitOptions,
  type FitProgress,
  type FitResult,
  type MixtureParams,
  type PassEngine,
  type RestartSummary,
} from './em';
export type { InitMethod } from './init';
export { selectMixture, selectMixtureWith, candidateGrid, fitCandidate, rankCandidates, type GridEntry, type Candidate, type CandidateProgress, type Selection, type SelectOptions } from './select';
export { fitScaler, type ScalerParams } from './scaler';
export {
  scoreRow,
  scoreRows,
  logDensities,
  typicalityOf,
  quantileSummary,
  prepareScorer,
  QUANTILE_LEVELS,
  DEFAULT_UNUSUAL_BELOW,
  type RowScore,
  type BatchScores,
  type QuantileSummary,
  type ScorableModel,
} from './score';
export {
  buildModel,
  toModelJson,
  parseModelJson,
  MODEL_FORMAT,
  MODEL_VERSION,
  type MixtureModel,
  type FeatureInfo,
  type SelectionEntry,
} from './model-json';
export { SeededRandom } from './prng';
export { parseNumericTable, parseNumber, type NumericTable } from './table';
