import 'server-only';
import { featureMatrix } from '@/lib/datasets';
import { AppError } from '@/lib/errors';
import { parseModelJson } from '@/lib/mixture';
import { Dataset, Embed, Fit, MixtureModel, ModelVersion } from '@/models';
import { storedPayloadProblem, type VersionPayload } from './payload';
import { compareVersions, type ComparedVersion, type VersionComparison } from './version-compare';

/**
 * Read side of "compare two versions" for the route and the studio page (the role check
 * happens there). Everything is loaded by id AND workspace: the calculator by its
 * workspace, the versions through that calculator, the dataset by the workspace too.
 */

export interface ComparisonDataset {
  id: number;
  name: string;
  /** Rows compared (rows with a blank in one of the fields are left out). */
  rows: number;
  /** Rows of the dataset left out for a blank or non-number in a compared field. */
  dropped: number;
}

export interface ComparisonResult {
  embed: { id: number; title: string; activeVersionId: number | null };
  comparison: VersionComparison;
  dataset: ComparisonDataset | null;
  /** Why there are no rows to compare on, in words; null when `dataset` is set. */
  datasetReason: string | null;
}

async function findEmbedIn(workspaceId: number, embedId: number): Promise<Embed> {
  const embed = await Embed.findOne({ where: { id: embedId, workspaceId } });
  if (!embed) throw new AppError('not_found', 'There is no such calculator in this workspace.');
  return embed;
}

async function readVersion(embed: Embed, versionId: number, field: 'from' | 'to'): Promise<ComparedVersion & { mixtureModelId: number | null }> {
  const version = await ModelVersion.findOne({ where: { id: versionId, embedId: embed.id } });
  if (!version) throw new AppError('not_found', `This calculator has no version with id ${versionId} (${field}).`, { issues: [{ field, message: 'no such version of this calculator' }] });
  const problem = storedPayloadProblem(version);
  if (problem) throw new AppError('conflict', `Version ${version.number} cannot be compared: ${problem}.`, { issues: [{ field, message: problem }] });
  const payload = version.payload as unknown as VersionPayload;
  return { id: version.id, number: version.number, payload, engine: parseModelJson(payload.model), mixtureModelId: version.mixtureModelId };
}

/**
 * The dataset a version's model was fitted to (MixtureModel → Fit → Dataset, else the
 * model's own dataset link), when it is still in the workspace; or why not.
 */
async function datasetOf(workspaceId: number, mixtureModelId: number | null): Promise<{ dataset: Dataset } | { reason: string }> {
  if (!mixtureModelId) return { reason: 'the version records no model it was published from' };
  const model = await MixtureModel.findOne({ where: { id: mixtureModelId, workspaceId }, attributes: ['id', 'fitId', 'datasetId'] });
  if (!model) return { reason: 'the model it was published from has been deleted' };
  const fit = model.fitId ? await Fit.findOne({ where: { id: model.fitId, workspaceId }, attributes: ['id', 'datasetId'] }) : null;
  const datasetId = fit?.datasetId ?? model.datasetId;
  // deleting a dataset clears its models' links to it and to its fits (lib/datasets deleteDataset)
  if (!datasetId) return { reason: 'the dataset it was fitted to is no longer in the workspace' };
  const dataset = await Dataset.findOne({ where: { id: datasetId, workspaceId } });
  if (!dataset) return { reason: 'the dataset it was fitted to is no longer in the workspace' };
  return { dataset };
}

/**
 * Compare version `fromId` with version `toId` of calculator `embedId`. The rows are those
 * of the dataset the newer version (`to`) was fitted to, else the one `from` was fitted to,
 * while it is still in the workspace.
 */
export async function compareCalculatorVersions(workspaceId: number, embedId: number, fromId: number, toId: number): Promise<ComparisonResult> {
  const embed = await findEmbedIn(workspaceId, embedId);
  if (fromId === toId) {
    throw new AppError('invalid_input', 'Choose two different versions to compare.', { issues: [{ field: 'to', message: 'must be a different version from "from"' }] });
  }
  const from = await readVersion(embed, fromId, 'from');
  const to = await readVersion(embed, toId, 'to');
  // Matching needs only the models; it also refuses versions with different fields before any rows are read.
  compareVersions(from, to);

  const reasons: string[] = [];
  let found: { dataset: Dataset; values: Float64Array; n: number; dropped: number } | null = null;
  const tried = new Set<number>();
  for (const side of [to, from]) {
    const source = await datasetOf(workspaceId, side.mixtureModelId);
    if ('reason' in source) {
      reasons.push(`version ${side.number}: ${source.reason}`);
      continue;
    }
    if (tried.has(source.dataset.id)) continue;
    tried.add(source.dataset.id);
    try {
      const m = featureMatrix(source.dataset, from.engine.features.map((f) => f.name));
      found = { dataset: source.dataset, values: m.rows, n: m.n, dropped: m.dropped };
      break;
    } catch (e) {
      if (!(e instanceof AppError)) throw e;
      reasons.push(`version ${side.number}: its dataset "${source.dataset.name}" does not hold every field (${e.message})`);
    }
  }
  const comparison = compareVersions(from, to, found ? { values: found.values, n: found.n } : null);
  return {
    embed: { id: embed.id, title: embed.title, activeVersionId: embed.activeVersionId },
    comparison,
    dataset: found ? { id: found.dataset.id, name: found.dataset.name, rows: found.n, dropped: found.dropped } : null,
    datasetReason: found ? null : `No rows to compare on: ${reasons.join('; ')}.`,
  };
}

/** The versions a picker offers, newest first, and the default pair: the served version against the newest other one. */
export async function comparableVersions(workspaceId: number, embedId: number) {
  const embed = await findEmbedIn(workspaceId, embedId);
  const versions = await ModelVersion.findAll({ where: { embedId: embed.id }, attributes: ['id', 'number', 'mixtureModelId', 'createdAt'], order: [['number', 'DESC']] });
  const served = versions.find((v) => v.id === embed.activeVersionId) ?? null;
  const defaultFrom = served ?? versions[1] ?? null;
  const defaultTo = versions.find((v) => v.id !== defaultFrom?.id) ?? null;
  return {
    embed: { id: embed.id, title: embed.title, status: embed.status, activeVersionId: embed.activeVersionId },
    versions: versions.map((v) => ({ id: v.id, number: v.number, createdAt: v.createdAt.toISOString() })),
    defaults: { from: defaultFrom?.id ?? null, to: defaultTo?.id ?? null },
  };
}
