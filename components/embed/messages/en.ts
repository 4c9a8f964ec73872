/**
 * The calculator's fixed texts in English: the source of the catalogue. Every other
 * language is typed `Messages`, so a missing or extra key is a type error. Functions take
 * the publisher's words (labels, units) and numbers already formatted for the language,
 * and never change the publisher's words.
 */
import type { DistanceBand } from '@/lib/mixture/breakdown';

/** Joins names as a reader would: "a", "a and b", "a, b and c". */
export function joinNames(names: string[], and: string): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} ${and} ${names[names.length - 1]}`;
}

const unitAfter = (unit: string) => (unit ? ` ${unit}` : '');

export const en = {
  intro: 'Enter your values to see how closely they resemble each group.',
  /** Beside the label of a field the visitor may leave blank. */
  optionalMark: 'optional',
  /** Under a field the visitor may leave blank. */
  optionalHint: 'You may leave this blank.',
  /** min and max come formatted for the language. */
  accepted: (min: string, max: string, unit: string) => `Accepted: ${min} to ${max}${unitAfter(unit)}.`,
  fieldRequired: (label: string) => `Enter ${label}.`,
  /** `example` is 1234.5 written the language's way (English readers need no example of a dot). */
  notNumber: (label: string, _example: string) => `${label} must be a number.`,
  ambiguous: (label: string, example: string) => `${label} could be read in more than one way. Write the number like ${example}.`,
  outOfRange: (label: string, min: string, max: string, unit: string) => `${label} must be between ${min} and ${max}${unitAfter(unit)}.`,
  /** A value the server refused, when it gives no reason the calculator can word. */
  fieldRefused: (label: string) => `${label} could not be used. Please check the value.`,
  submit: 'Show my groups',
  busy: 'Working it out…',
  resultLabel: 'Result',
  alreadyShown: 'The answer below is already for these values. Change a value to see a new one.',
  someValuesUnusable: 'Some values could not be used.',
  tooMany: (seconds: string | null) => `That was a lot of tries in a short time. Please wait ${seconds ? `${seconds} seconds` : 'a moment'} and try again.`,
  paused: 'This calculator is taking a short break and will answer again soon. Nothing is wrong with your values.',
  gone: 'This calculator is not available any more.',
  serverProblem: 'Something went wrong on our side. Please try again.',
  offline: 'The answer could not be fetched. Check the connection and try again.',
  stale: (button: string) => `You changed your values. The answer below is for the earlier ones; press “${button}” to update it.`,
  unusualHeading: 'These values are unusual for this calculator',
  unusualBody: (nearest: string) =>
    `They are unlike the data it was built from, so none of the groups describes them well. The nearest is ${nearest}; read the percentages below with that in mind.`,
  mostLike: 'Most like:',
  /** In the answer, when fields were left blank. */
  notUsed: (labels: string[]) =>
    `Worked out without ${joinNames(labels, 'and')}, left blank: the answer uses only the other values, nothing is guessed for ${labels.length === 1 ? 'it' : 'them'}.`,
  generalCaution: 'The probabilities describe how similar your values are to groups found in the publisher’s data. They are not a diagnosis, a rating or a decision about you.',
  /** The two ends of a probability, so a rounded "100 %" never claims certainty. */
  over: (percent: string) => `over ${percent}`,
  under: (percent: string) => `under ${percent}`,
  chartFailed: 'The chart could not be drawn; the numbers are below.',
  chartList: 'Membership probability per group',

  report: {
    open: 'Report this calculator',
    intro: 'Reports go to Partwise support, who can take a calculator down.',
    reasonLabel: 'Reason',
    choose: 'Choose…',
    reasons: {
      misleading: 'It gives misleading or harmful advice',
      impersonation: 'It pretends to be someone it is not',
      offensive: 'Its words or labels are offensive',
      privacy: 'It asks for values it should not',
      other: 'Something else',
    },
    chooseReason: 'Choose a reason.',
    messageLabel: 'What is wrong?',
    messageTooShort: 'Tell us in a sentence or two what is wrong (at least 10 characters).',
    emailLabel: 'Your e-mail (optional, if we may ask you more)',
    emailInvalid: 'Enter an e-mail address like name@example.org, or leave it empty.',
    sendFailed: 'The report could not be sent. Please try again later.',
    sending: 'Sending…',
    send: 'Send report',
    thanks: 'Thank you. Partwise support will look at this calculator.',
  },

  reason: {
    heading: 'Why this group',
    /** Names the two groups the breakdown compares. */
    intro: (best: string, runnerUp: string) => `How each value weighs between ${best} and the next closest group, ${runnerUp}:`,
    bands: {
      well_below: 'well below the usual range',
      below: 'below the usual range',
      typical: 'within the usual range',
      above: 'above the usual range',
      well_above: 'well above the usual range',
    } satisfies Record<DistanceBand, string> as Record<DistanceBand, string>,
    /** "Climbing per ride: well above the usual range for this group." */
    position: (field: string, band: string) => `${field}: ${band} for this group.`,
    /** Which way the value pushed; strong = at least 2 nats (odds of about 7 to 1). */
    towards: (group: string, strong: boolean) => `${strong ? 'Points strongly' : 'Points'} towards ${group}.`,
    neither: 'Points to neither group.',
    /** The weight term: how common each group is in the data. */
    groupSize: 'How common each group is:',
    equallyCommon: 'The two groups are about equally common in the data.',
    groupSizeTowards: (larger: string) => `${larger} is the more common group in the data, which counts in its favour.`,
    /** For full and tied covariances the breakdown follows the chain rule, in field order. */
    inOrder: 'Each value is weighed after the ones above it, so a value that repeats what an earlier one already said counts for little.',
    chartLabel: (best: string, runnerUp: string) => `How strongly each value points towards ${best} (right) or ${runnerUp} (left)`,
  },

  page: {
    unavailableHeading: 'This calculator is not available',
    unavailableBody: 'It may have been taken offline by its publisher. Please try again later.',
    missingHeading: 'There is no calculator at this address',
    missingBody: 'The address may be mistyped, or the publisher may have replaced it with a new one. The site that linked here can give you the current address.',
    errorHeading: 'This calculator could not be shown just now',
    errorBody: 'Something went wrong on our side. Please try again in a moment.',
    tryAgain: 'Try again',
  },
};

export type Messages = typeof en;
