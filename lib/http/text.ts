import { z } from 'zod';

/**
 * Text that reaches the database. Two things a JSON string or URL can carry that no
 * person types: NUL characters (SQLite and C string handling cut or choke on them) and
 * lone UTF-16 surrogates (not encodable as UTF-8, so storing one silently turns it into
 * U+FFFD and the saved text is not what was sent). Both are refused, not cleaned, so the
 * caller learns which field is wrong.
 */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export const NUL_MESSAGE = 'contains a NUL character (\\u0000), which text cannot hold.';
export const SURROGATE_MESSAGE = 'contains a broken character (an unpaired UTF-16 surrogate); retype it.';

/** Why `value` cannot be stored as text, or null when it can. */
export function textProblem(value: string): string | null {
  if (value.includes('\u0000')) return NUL_MESSAGE;
  if (LONE_SURROGATE.test(value)) return SURROGATE_MESSAGE;
  return null;
}

/** At most `max` UTF-16 units, never cutting a surrogate pair in half (which would leave a lone one). */
export function clipText(value: string, max: number): string {
  if (value.length <= max) return value;
  const code = value.charCodeAt(max - 1);
  return value.slice(0, code >= 0xd800 && code <= 0xdbff ? max - 1 : max);
}

/**
 * z.string() for every text field that is stored or searched: chain .trim(), .min(),
 * .max() and friends on it as usual. `what` names the field in the message
 * ("The title contains a NUL character…"); the issue's path names it for forms.
 */
export function storedText(what = 'The text', params?: Parameters<typeof z.string>[0]) {
  return z.string(params).superRefine((value, ctx) => {
    const problem = textProblem(value);
    if (problem) ctx.addIssue({ code: 'custom', message: `${what} ${problem}` });
  });
}
