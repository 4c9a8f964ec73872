import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';
import { compareCalculatorVersions } from '@/lib/embeds/version-compare-queries';
import { idParam, readParams, route, zodIssues } from '@/lib/http/handler';
import { decimalId } from '@/lib/http/ids';

type Ctx = { params: Promise<{ id: string }> };

const compareQuery = z.object({
  from: decimalId('must be a version id written in digits, like 12.'),
  to: decimalId('must be a version id written in digits, like 12.'),
});

/** Compare two versions of a calculator: matched groups, their shifts, and the dataset's rows under both. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const parsed = compareQuery.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) {
    const issues = zodIssues(parsed.error);
    throw new AppError('bad_request', `The query has ${issues.length} problem${issues.length === 1 ? '' : 's'}: ${issues.map((i) => `${i.field}: ${i.message}`).join('; ')}`, { issues });
  }
  const result = await compareCalculatorVersions(actor.workspace.id, id, parsed.data.from, parsed.data.to);
  return Response.json(result);
});
