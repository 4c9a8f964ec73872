import 'server-only';
import { Dataset, Embed, Fit, MixtureModel } from '@/models';

/**
 * The fitting side's reads for studio pages and route handlers, always by workspace, so
 * pages and handlers never query models themselves (the data layer and its dialect can
 * change here alone).
 */

/** A fit as it is now (the runner may have claimed it since it was created). */
export async function currentFit(created: Fit): Promise<Fit> {
  return (await Fit.findByPk(created.id)) ?? created;
}

/** The workspace's fits, newest first, without their large result and checkpoint columns. */
export function listFits(workspaceId: number, opts: { datasetId?: number; limit?: number } = {}): Promise<Fit[]> {
  return Fit.findAll({
    where: { workspaceId, ...(opts.datasetId ? { datasetId: opts.datasetId } : {}) },
    order: [['id', 'DESC']],
    limit: opts.limit ?? 100,
    attributes: { exclude: ['result', 'checkpoint'] },
  });
}

/** The fits list page: its rows and the names of their datasets. */
export async function fitsPage(workspaceId: number): Promise<{ fits: Fit[]; datasetNames: Map<number, string> }> {
  const fits = await Fit.findAll({ where: { workspaceId }, order: [['id', 'DESC']], limit: 200, attributes: ['id', 'number', 'datasetId', 'status', 'params', 'progress', 'error', 'createdAt'] });
  const datasets = await Dataset.findAll({ where: { workspaceId }, attributes: ['id', 'name'] });
  return { fits, datasetNames: new Map(datasets.map((d) => [d.id, d.name])) };
}

/** A dataset page's fits, newest first. */
export function fitsOfDataset(workspaceId: number, datasetId: number): Promise<Fit[]> {
  return Fit.findAll({ where: { workspaceId, datasetId }, order: [['id', 'DESC']], attributes: ['id', 'number', 'status', 'params', 'createdAt', 'error'] });
}

/** A fit's number for its tab title, or null when the workspace has no such fit. */
export async function fitNumber(workspaceId: number, fitId: number): Promise<number | null> {
  return (await Fit.findOne({ where: { id: fitId, workspaceId }, attributes: ['number'] }))?.number ?? null;
}

export interface KeptModel {
  id: number;
  name: string;
  components: number;
  covariance: string;
}

/** What a fit's page shows beside the fit: its dataset and the models already kept from it. */
export async function fitPageContext(workspaceId: number, fit: Pick<Fit, 'id' | 'datasetId'>): Promise<{ dataset: { id: number; name: string } | null; kept: KeptModel[] }> {
  const dataset = await Dataset.findOne({ where: { id: fit.datasetId, workspaceId }, attributes: ['id', 'name'] });
  const models = await MixtureModel.findAll({ where: { workspaceId, fitId: fit.id }, attributes: ['id', 'name', 'model'], order: [['id', 'ASC']] });
  const kept = models.map((m) => {
    const engine = m.model as { weights?: number[]; structure?: string };
    return { id: m.id, name: m.name, components: engine.weights?.length ?? 0, covariance: engine.structure ?? '' };
  });
  return { dataset: dataset ? { id: dataset.id, name: dataset.name } : null, kept };
}

/** What a model's page shows beside the model: its dataset, its fit and the calculators published from it. */
export async function modelPageContext(
  workspaceId: number,
  model: Pick<MixtureModel, 'id' | 'datasetId' | 'fitId'>,
): Promise<{ dataset: { id: number; name: string } | null; fit: { id: number; number: number } | null; calculators: { id: number; title: string; status: string }[] }> {
  const dataset = model.datasetId ? await Dataset.findOne({ where: { id: model.datasetId, workspaceId }, attributes: ['id', 'name'] }) : null;
  const calculators = await Embed.findAll({ where: { workspaceId, mixtureModelId: model.id }, attributes: ['id', 'title', 'status'], order: [['id', 'ASC']] });
  const fit = model.fitId ? await Fit.findOne({ where: { id: model.fitId, workspaceId }, attributes: ['id', 'number'] }) : null;
  return {
    dataset: dataset ? { id: dataset.id, name: dataset.name } : null,
    fit: fit ? { id: fit.id, number: fit.number } : null,
    calculators: calculators.map((c) => ({ id: c.id, title: c.title, status: c.status })),
  };
}

/** The dataset a model was fitted on, while it is still in the workspace. */
export async function datasetOfModel(workspaceId: number, model: Pick<MixtureModel, 'datasetId'>): Promise<Dataset | null> {
  return model.datasetId ? Dataset.findOne({ where: { id: model.datasetId, workspaceId } }) : null;
}
