import { z } from 'zod';
import { storedText } from '@/lib/http/text';
import { API_KEY_SCOPES, type ApiKeyScope } from '@/models/api-key-scopes';

/** The API key form's schema and words, shared by the route and the studio form (no server imports). */
export { API_KEY_SCOPES, type ApiKeyScope };

export const SCOPE_WORDS: Record<ApiKeyScope, string> = {
  read: 'read datasets, fits, models, calculators and usage',
  fit: 'upload datasets, start fits, save and edit models',
  publish: 'publish calculators and versions, choose the served version',
  score: 'score rows in batches',
};

export const apiKeyCreateSchema = z
  .object({
    name: storedText('The key name').trim().min(1, 'Give the key a name, like "Nightly re-fit".').max(120, 'Keep the name under 120 characters.'),
    scopes: z
      .array(z.enum(API_KEY_SCOPES, { error: `Each scope is one of ${API_KEY_SCOPES.join(', ')}.` }))
      .min(1, 'Choose at least one scope.')
      .refine((s) => new Set(s).size === s.length, 'A scope is listed twice.'),
    expiresInDays: z.number({ error: 'Enter a whole number of days.' }).int('Enter a whole number of days.').min(1, 'A key lasts at least 1 day.').max(730, 'A key lasts at most 730 days (two years).').optional(),
  })
  .strict();
export type ApiKeyCreate = z.infer<typeof apiKeyCreateSchema>;

