import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';
import { findFit } from '@/lib/fitting/jobs';
import { findModel } from '@/lib/fitting/models';
import { reviewModel } from '@/lib/fitting/review';
import { datasetOfModel } from '@/lib/fitting/studio-queries';
import { fitResult } from '@/lib/fitting/views';
import { idParam, parseWith, readParams, route } from '@/lib/http/handler';
import { decimalIndex } from '@/lib/http/ids';

const query = z.object({ x: decimalIndex().optional(), y: decimalIndex().optional() });

/** The review of a named model on the dataset it was fitted to (while that dataset exists). */
export const GET = route<{ params: Promise<{ id: string }> }>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const q = parseWith(query, Object.fromEntries(new URL(request.url).searchParams), 'query');
  const model = await findModel(actor.workspace.id, id);
  const dataset = await datasetOfModel(actor.workspace.id, model);
  if (!dataset) throw new AppError('gone', 'The dataset this model was fitted to has been deleted, so its rows cannot be shown.');
  let trace: number[] = [];
  if (model.fitId) {
    const fit = await findFit(actor.workspace.id, model.fitId).catch(() => null);
    const structure = (model.model as { structure?: string; weights?: number[] });
    trace = (fit && fitResult(fit)?.candidates.find((c) => c.covariance === structure.structure && c.components === structure.weights?.length)?.trace) || [];
  }
  return Response.json({ review: reviewModel(model.model, dataset, { x: q.x, y: q.y }), trace });
});
