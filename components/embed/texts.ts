/**
 * The calculator's own sentences about blank fields and the reason for an answer, in one
 * place so that a message catalogue can take them over (English for now). Functions
 * take the publisher's words (labels) as arguments and never change them.
 */
import type { DistanceBand } from '@/lib/mixture/breakdown';

/** Joins names as a reader would: "a", "a and b", "a, b and c". */
function listOf(names: string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

export const blankTexts = {
  /** Beside the label of a field the visitor may leave blank. */
  optionalMark: 'optional',
  /** Under a field the visitor may leave blank. */
  optionalHint: 'You may leave this blank.',
  /** In the answer, when fields were left blank. */
  notUsed: (labels: string[]) =>
    `Worked out without ${listOf(labels)}, left blank: the answer uses only the other values, nothing is guessed for ${labels.length === 1 ? 'it' : 'them'}.`,
};

const bandWords: Record<DistanceBand, string> = {
  well_below: 'well below the usual range',
  below: 'below the usual range',
  typical: 'within the usual range',
  above: 'above the usual range',
  well_above: 'well above the usual range',
};

export const reasonTexts = {
  heading: 'Why this group',
  /** Names the two groups the breakdown compares. */
  intro: (best: string, runnerUp: string) => `How each value weighs between ${best} and the next closest group, ${runnerUp}:`,
  /** "Climbing per ride: well above the usual range for this group." */
  position: (field: string, band: DistanceBand) => `${field}: ${bandWords[band]} for this group.`,
  /** Which way the value pushed, from the sign of its contribution; strong = at least 2 (odds of about 7 to 1). */
  towards: (group: string, strong: boolean) => `${strong ? 'Points strongly' : 'Points'} towards ${group}.`,
  neither: 'Points to neither group.',
  /** The weight term: how common each group is in the data. */
  groupSize: 'How common each group is:',
  equallyCommon: 'The two groups are about equally common in the data.',
  groupSizeTowards: (larger: string) => `${larger} is the more common group in the data, which counts in its favour.`,
  /** For full and tied covariances the breakdown follows the chain rule, in field order. */
  inOrder: 'Each value is weighed after the ones above it, so a value that repeats what an earlier one already said counts for little.',
  chartLabel: (best: string, runnerUp: string) => `How strongly each value points towards ${best} (right) or ${runnerUp} (left)`,
};
