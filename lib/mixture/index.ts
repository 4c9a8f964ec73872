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
export { PASS_BLOCK_ROWS } from './estep';
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
export {
  scoreRowPartial,
  scoreRowsMasked,
  maskOfValues,
  usedFields,
  typicalityQuantiles,
  type FieldValue,
  type PartialRowScore,
  type PartialScoreOptions,
  type MaskedBatchScores,
  type TypicalityReference,
} from './partial';
export { fullMaskOf, maskSize, MAX_MASK_FIELDS, SUBSET_CACHE_SIZE } from './subsets';
export {
  typicalitySample,
  defaultTypicalitySample,
  subsetQuantiles,
  sampleLogDensities,
  encodeTypicalitySample,
  decodeTypicalitySample,
  DEFAULT_SAMPLE_SIZE,
  DEFAULT_SAMPLE_SEED,
  SAMPLE_FORMAT,
  SAMPLE_VERSION,
  type TypicalitySample,
  type TypicalitySampleJson,
} from './sample';
export {
  explainRow,
  distanceBand,
  DISTANCE_BANDS,
  type DistanceBand,
  type FieldReason,
  type RowReason,
  type ReasonOptions,
  type Decomposition,
} from './breakdown';
export { solveAssignment, assignmentCost, type Assignment } from './assignment';
