import 'server-only';
import { Op } from 'sequelize';
import { Dataset, Embed, Fit, MixtureModel } from '@/models';

/** Counts for the studio overview of one workspace (calculators: not retired). */
export async function workspaceCounts(workspaceId: number) {
  const [datasets, fits, models, calculators] = await Promise.all([
    Dataset.count({ where: { workspaceId } }),
    Fit.count({ where: { workspaceId } }),
    MixtureModel.count({ where: { workspaceId } }),
    Embed.count({ where: { workspaceId, status: { [Op.ne]: 'retired' } } }),
  ]);
  return { datasets, fits, models, calculators };
}
