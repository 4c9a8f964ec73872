import { z } from 'zod';
import { decimalIndex } from '@/lib/http/ids';
import { storedText } from '@/lib/http/text';

/** Inputs of the support console, shared by route handlers, pages and forms. */

export const REASON_MAX = 1000;

/** Why staff changed something: written into the audit trail and the owner's e-mail. */
export const reasonSchema = storedText('The reason', { error: 'Give a reason.' })
  .trim()
  .min(5, 'Give a reason of at least 5 characters; the owner reads it.')
  .max(REASON_MAX, `Keep the reason under ${REASON_MAX} characters.`);

export const reasonBody = z.object({ reason: reasonSchema }).strict();

export const disableBody = z
  .object({
    reason: reasonSchema,
    /** Also close the calculator's open abuse reports (they have been dealt with). */
    closeReports: z.boolean().optional(),
  })
  .strict();

export const clearFlagBody = z
  .object({ note: storedText('The note').trim().max(REASON_MAX, `Keep the note under ${REASON_MAX} characters.`).optional() })
  .strict();

export const SORT_KEYS = ['attention', 'title', 'status', 'workspace', 'plan', 'monthAnswers', 'hourAnswers', 'openReports', 'createdAt'] as const;
export type SortKey = (typeof SORT_KEYS)[number];

export const STATUS_FILTERS = ['any', 'active', 'disabled', 'retired', 'flagged', 'reported', 'suspended'] as const;
export type StatusFilter = (typeof STATUS_FILTERS)[number];

export const PAGE_SIZES = [10, 25, 50, 100] as const;

// Query strings: decimal digits only ("0x2" or "1e1" are not page numbers).
const pageNumber = decimalIndex('page must be a whole number.').pipe(z.number().min(1, 'page starts at 1.').max(100_000, 'page is too large.'));

/** Query of GET /api/support/calculators (strings from the URL, coerced). */
export const searchQuerySchema = z.object({
  q: storedText('The search').trim().max(200, 'Keep the search under 200 characters.').default(''),
  sort: z.enum(SORT_KEYS, { error: `sort must be one of ${SORT_KEYS.join(', ')}.` }).default('attention'),
  dir: z.enum(['asc', 'desc'], { error: 'dir must be asc or desc.' }).default('desc'),
  status: z.enum(STATUS_FILTERS, { error: `status must be one of ${STATUS_FILTERS.join(', ')}.` }).default('any'),
  page: pageNumber.default(1),
  pageSize: decimalIndex('pageSize must be a number.')
    .refine((n) => (PAGE_SIZES as readonly number[]).includes(n), { message: `pageSize must be one of ${PAGE_SIZES.join(', ')}.` })
    .default(25),
});
export type SearchQuery = z.infer<typeof searchQuerySchema>;

const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-12-01.')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), { message: 'That is not a calendar date.' });

/** Query of GET /api/support/audit. */
export const auditQuerySchema = z
  .object({
    action: storedText('The action').trim().max(64, 'Keep the action under 64 characters.').default(''),
    actor: storedText('The e-mail').trim().max(320, 'Keep the e-mail under 320 characters.').default(''),
    workspace: storedText('The workspace').trim().max(120, 'Keep the workspace under 120 characters.').default(''),
    from: z.union([z.literal(''), day]).default(''),
    to: z.union([z.literal(''), day]).default(''),
    page: pageNumber.default(1),
    pageSize: decimalIndex('pageSize must be a whole number.').pipe(z.number().min(10, 'pageSize is at least 10.').max(200, 'pageSize is at most 200.')).default(50),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { message: 'The start date is after the end date.', path: ['from'] });
export type AuditQuery = z.infer<typeof auditQuerySchema>;

/** URLSearchParams → plain object, dropping empty values so defaults apply. */
export function queryObject(params: URLSearchParams | Record<string, string | string[] | undefined>): Record<string, string> {
  const out: Record<string, string> = {};
  const entries = params instanceof URLSearchParams ? [...params.entries()] : Object.entries(params);
  for (const [k, v] of entries) {
    const value = Array.isArray(v) ? v[0] : v;
    if (value !== undefined && value !== '') out[k] = value;
  }
  return out;
}
