import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { compareCalculatorVersions } from '@/lib/embeds/version-compare-queries';
import { idParam, parseWith, readParams, route } from '@/lib/http/handler';
import { decimalId } from '@/lib/http/ids';

type Ctx = { params: Promise<{ id: string }> };

const compareQuery = z.strictObject({
  from: decimalId('must be a version id written in digits, like 12.'),
  to: decimalId('must be a version id written in digits, like 12.'),
});

/** Compare two versions of a calculator: matched groups, their shifts, and the dataset's rows under both. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const query = parseWith(compareQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  const result = await compareCalculatorVersions(actor.workspace.id, id, query.from, query.to);
  return Response.json(result);
});
