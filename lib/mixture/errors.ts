/**
 * The one error class the mixture engine throws. `code` is stable and meant for
 * programs; `message` is one sentence meant for people and says what to try.
 */
export type MixtureErrorCode =
  | 'BAD_INPUT' // shapes, NaN/Infinity, unknown option values
  | 'TOO_FEW_ROWS' // fewer rows than components
  | 'CONSTANT_COLUMN' // a feature with zero spread (standardisation impossible)
  | 'EMPTY_COMPONENT' // a component's soft count fell to ~0 during EM
  | 'NOT_POSITIVE_DEFINITE' // a covariance could not be factorised
  | 'CANCELLED' // shouldStop() returned true
  | 'BAD_MODEL' // model JSON failed validation
  | 'NO_FIELDS'; // a partial row with no observed field

export class MixtureError extends Error {
  readonly code: MixtureErrorCode;
  constructor(code: MixtureErrorCode, message: string) {
    super(message);
    this.name = 'MixtureError';
    this.code = code;
  }
}

export function isMixtureError(e: unknown): e is MixtureError {
  return e instanceof MixtureError;
}
