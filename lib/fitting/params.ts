/**
 * What an analyst chooses for a fit, with the defaults a careful analyst would pick:
 * 1–8 components, full and diagonal covariances, standardised features, five restarts
 * from k-means++ and a fixed seed so a fit can be repeated exactly.
 */
import { z } from 'zod';
import { storedText } from '@/lib/http/text';

export const STRUCTURES = ['full', 'diagonal', 'spherical', 'tied'] as const;
export const MAX_COMPONENTS = 12;
export const MAX_RESTARTS = 20;

export const FIT_DEFAULTS = {
  minComponents: 1,
  maxComponents: 8,
  covariances: ['full', 'diagonal'] as ('full' | 'diagonal' | 'spherical' | 'tied')[],
  restarts: 5,
  seed: 1,
  standardize: true,
  maxIter: 300,
  tol: 1e-4,
  regCovar: 1e-6,
};

export const fitParamsSchema = z
  .object({
    datasetId: z.number().int().positive(),
    features: z.array(storedText('A feature name').min(1)).min(1, 'Choose at least one feature.').max(30, 'Choose at most 30 features.'),
    minComponents: z.number({ error: 'Enter a whole number of components.' }).int('Enter a whole number of components.').min(1, 'Try at least 1 component.').max(MAX_COMPONENTS, `At most ${MAX_COMPONENTS} components.`).default(FIT_DEFAULTS.minComponents),
    maxComponents: z.number({ error: 'Enter a whole number of components.' }).int('Enter a whole number of components.').min(1, 'Try at least 1 component.').max(MAX_COMPONENTS, `At most ${MAX_COMPONENTS} components.`).default(FIT_DEFAULTS.maxComponents),
    covariances: z.array(z.enum(STRUCTURES)).min(1, 'Choose at least one covariance structure.').default(FIT_DEFAULTS.covariances),
    restarts: z.number({ error: 'Enter a whole number of restarts.' }).int('Enter a whole number of restarts.').min(1, 'Use at least 1 restart.').max(MAX_RESTARTS, `Use at most ${MAX_RESTARTS} restarts.`).default(FIT_DEFAULTS.restarts),
    seed: z.number({ error: 'Enter a whole number as the seed.' }).int('Enter a whole number as the seed.').min(0, 'The seed cannot be negative.').max(2 ** 31 - 1, 'Use a seed below 2,147,483,648.').default(FIT_DEFAULTS.seed),
    standardize: z.boolean().default(FIT_DEFAULTS.standardize),
    maxIter: z.number({ error: 'Enter a whole number of iterations.' }).int('Enter a whole number of iterations.').min(5, 'Allow at least 5 iterations.').max(2000, 'Allow at most 2,000 iterations.').default(FIT_DEFAULTS.maxIter),
    tol: z.number({ error: 'Enter the tolerance as a number, like 0.0001.' }).positive('The tolerance must be above 0.').max(0.1, 'Keep the tolerance at 0.1 or below.').default(FIT_DEFAULTS.tol),
    regCovar: z.number().min(0).max(1).default(FIT_DEFAULTS.regCovar),
  })
  .refine((p) => p.minComponents <= p.maxComponents, { message: 'The smallest component count must not exceed the largest.', path: ['maxComponents'] })
  .refine((p) => new Set(p.features).size === p.features.length, { message: 'A feature is listed twice.', path: ['features'] });

export type FitParams = z.infer<typeof fitParamsSchema>;

export function componentRange(p: Pick<FitParams, 'minComponents' | 'maxComponents'>): number[] {
  return Array.from({ length: p.maxComponents - p.minComponents + 1 }, (_, i) => p.minComponents + i);
}
