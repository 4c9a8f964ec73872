/**
 * The key-authenticated REST API (/api/v1): what its thin handlers share beyond the lib
 * functions the studio's session routes call. Query and body schemas live here or in
 * the lib modules they belong to, so the routes and the OpenAPI document
 * (lib/api/openapi/registry.ts) read the same ones.
 */
import { z } from 'zod';
import { apiKeyActorLabel } from '@/lib/audit';
import type { KeyActor } from '@/lib/auth/api-keys';
import { billingSummary } from '@/lib/billing/summary';
import type { Acting } from '@/lib/embeds/service';
import { AppError } from '@/lib/errors';
import { findFit } from '@/lib/fitting/jobs';
import { fitResult } from '@/lib/fitting/views';
import { decimalIndex } from '@/lib/http/ids';
import { storedText } from '@/lib/http/text';
import { embedMonthlyAnswers, monthPeriod } from '@/lib/usage';
import { Embed, Fit } from '@/models';

/** A key acts for its workspace; the person who made it is not the actor. */
export function keyActing(actor: KeyActor, request?: Request): Acting {
  return { user: null, apiKey: { id: actor.key.id, name: actor.key.name, prefix: actor.key.prefix }, workspace: actor.workspace, request };
}

/** The audit fields for a key that acts (lib/audit.ts recordAudit). */
export function keyAuditWho(actor: KeyActor) {
  return { actor: null, actorLabel: apiKeyActorLabel(actor.key) };
}

export const MAX_WAIT_SECONDS = 60;

export const datasetUploadQuery = z
  .object({
    name: storedText('The dataset name').trim().min(1, 'Give the dataset a name, or leave ?name= out.').max(200, 'Keep the name under 200 characters.').optional(),
    filename: storedText('The file name').trim().min(1).max(255, 'Keep the file name under 255 characters.').optional(),
  })
  .strict();

export const datasetPreviewQuery = z.object({ preview: decimalIndex().pipe(z.number().max(200, 'Ask for at most 200 preview rows.')).default(20) }).strict();

export const fitWaitQuery = z
  .object({
    wait: decimalIndex('must be a whole number of seconds written in digits, like 30.').pipe(z.number().max(MAX_WAIT_SECONDS, `Wait at most ${MAX_WAIT_SECONDS} seconds; ask again if the fit is still running.`)).optional(),
  })
  .strict();

const DONE = new Set(['succeeded', 'failed', 'cancelled']);
const POLL_MS = 250;

/**
 * The fit as it is now, or once it has finished, whichever comes first within `seconds`.
 * Polls the database (the fit may run in another process), and stops early when the
 * caller hangs up.
 */
export async function waitForFit(workspaceId: number, id: number, seconds: number, signal?: AbortSignal): Promise<Fit> {
  let fit = await findFit(workspaceId, id);
  const until = Date.now() + seconds * 1000;
  while (!DONE.has(fit.status) && Date.now() < until && !signal?.aborted) {
    await new Promise((resolve) => setTimeout(resolve, Math.min(POLL_MS, Math.max(1, until - Date.now()))));
    fit = await findFit(workspaceId, id);
  }
  return fit;
}

/** The ranked candidates of a finished fit (BIC first, AIC beside it), without model internals or traces. */
export function rankingView(fit: Fit) {
  const result = fitResult(fit);
  if (fit.status !== 'succeeded' || !result) {
    throw new AppError('conflict', `This fit has ${fit.status === 'failed' ? 'failed' : fit.status === 'cancelled' ? 'been cancelled' : 'not finished yet'}, so it has no ranking${DONE.has(fit.status) ? '' : `; wait with GET /api/v1/fits/${fit.id}?wait=30`}.`);
  }
  return {
    fitId: fit.id,
    criterion: result.criterion,
    rows: result.rows,
    features: result.features.map((f) => f.name),
    candidates: result.candidates.map((c, index) => ({
      index,
      rank: c.rank,
      components: c.components,
      covariance: c.covariance,
      bic: c.bic,
      aic: c.aic,
      logLikelihood: c.logLikelihood,
      parameters: c.parameters,
      iterations: c.iterations,
      converged: c.converged,
      error: c.error,
    })),
  };
}

/** This month's answers per calculator and the plan's allowance (lib/billing summary). */
export async function usageReport(workspaceId: number) {
  const period = monthPeriod();
  const [summary, embeds] = await Promise.all([billingSummary(workspaceId, period), Embed.findAll({ where: { workspaceId }, attributes: ['id', 'title', 'status'], order: [['id', 'ASC']] })]);
  const perCalculator = await Promise.all(embeds.map(async (e) => ({ calculatorId: e.id, title: e.title, status: e.status, answers: await embedMonthlyAnswers(e.id, period) })));
  const answers = summary.usage.find((u) => u.key === 'answers');
  return {
    period,
    plan: { id: summary.plan.id, name: summary.plan.name },
    answers: { used: answers?.used ?? 0, allowance: summary.plan.limits.answersPerMonth, state: summary.answers.state, pauseAt: summary.answers.pauseAt },
    calculators: perCalculator,
    meters: summary.usage,
  };
}
