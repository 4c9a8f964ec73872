import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';
import { findDataset } from '@/lib/datasets';
import { findFit } from '@/lib/fitting/jobs';
import { reviewModel } from '@/lib/fitting/review';
import { fitResult } from '@/lib/fitting/views';
import { idParam, parseWith, readParams, route } from '@/lib/http/handler';
import { decimalIndex } from '@/lib/http/ids';

const query = z.object({
  candidate: decimalIndex().default(0),
  x: decimalIndex().optional(),
  y: decimalIndex().optional(),
});

/** Sizes, certainty, scatter sample and ellipses for one candidate of a finished fit. */
export const GET = route<{ params: Promise<{ id: string }> }>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const q = parseWith(query, Object.fromEntries(new URL(request.url).searchParams), 'query');
  const fit = await findFit(actor.workspace.id, id);
  const result = fitResult(fit);
  if (fit.status !== 'succeeded' || !result) throw new AppError('conflict', 'This fit has no results yet.');
  const candidate = result.candidates[q.candidate];
  if (!candidate?.model) throw new AppError('not_found', 'That candidate has no fitted model.');
  const dataset = await findDataset(actor.workspace.id, fit.datasetId);
  return Response.json({ review: reviewModel(candidate.model, dataset, { x: q.x, y: q.y }), trace: candidate.trace });
});
