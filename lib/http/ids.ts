import { z } from 'zod';

/**
 * Ids and counts in addresses are plain decimal: "12", never "0x0c", "1e1", "12.0",
 * " 12", "012", "Infinity". Number() and z.coerce.number() accept all of those, which
 * made /api/embeds/0x6 act on embed 6. One spelling per resource, safe integers only.
 */
const POSITIVE = /^[1-9][0-9]{0,15}$/;
const NON_NEGATIVE = /^(?:0|[1-9][0-9]{0,15})$/;

function strict(pattern: RegExp, raw: unknown): number | null {
  if (typeof raw !== 'string' || !pattern.test(raw)) return null;
  const n = Number(raw);
  return Number.isSafeInteger(n) ? n : null;
}

/** A positive id written in decimal digits, or null. For pages: `parseDecimalId(id) ?? notFound()`. */
export function parseDecimalId(raw: unknown): number | null {
  return strict(POSITIVE, raw);
}

/** zod: an address or query id (a string of decimal digits) → a safe positive integer. */
export function decimalId(message = 'must be a positive whole number written in digits, like 12.') {
  return z.string({ error: message }).transform((raw, ctx) => {
    const n = strict(POSITIVE, raw);
    if (n === null) {
      ctx.addIssue({ code: 'custom', message });
      return z.NEVER;
    }
    return n;
  });
}

/** zod: a count or index from a query string (0, 1, 2, …) in decimal digits. */
export function decimalIndex(message = 'must be a whole number written in digits (0, 1, 2, …).') {
  return z.string({ error: message }).transform((raw, ctx) => {
    const n = strict(NON_NEGATIVE, raw);
    if (n === null) {
      ctx.addIssue({ code: 'custom', message });
      return z.NEVER;
    }
    return n;
  });
}
