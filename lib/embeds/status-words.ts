/**
 * One vocabulary for a calculator's state, used by the studio, the support console and
 * the version list alike, so an owner and staff read the same words for the same thing.
 */
export type CalculatorState = 'active' | 'disabled' | 'retired' | 'damaged';

export const STATUS_WORDS: Record<CalculatorState, string> = {
  active: 'Live',
  disabled: 'Switched off by support',
  retired: 'Retired',
  // Live, but the version it serves is damaged: visitors see "not available".
  damaged: 'Not answering',
};

export function statusWords(state: string): string {
  return STATUS_WORDS[state as CalculatorState] ?? state;
}

/** What the version a calculator points at is doing, given the calculator's state. */
export function servedVersionWords(state: string): string {
  if (state === 'active') return 'Served';
  if (state === 'retired') return 'Last served (retired)';
  return `Selected, not answering: ${statusWords(state).toLowerCase()}`;
}
