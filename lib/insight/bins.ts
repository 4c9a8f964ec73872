import { UniqueConstraintError } from 'sequelize';
import { featureMatrix } from '@/lib/datasets/matrix';
import { readStoredVersion } from '@/lib/embeds/payload';
import { typicalitySample } from '@/lib/mixture';
import { Dataset, Embed, Fit, InsightBins, MixtureModel, ModelVersion, type FieldSetting, type StoredFieldBins } from '@/models';

/**
 * Answer insight's bins, fixed when a version is published: per field INNER_BINS equal
 * bins over the field's input range [min, max], plus one bin below the minimum and one
 * above the maximum (open-ended; the stored outer edges are nominal, one bin width out,
 * so a chart can draw them). Visitors' values are checked against the input range before
 * scoring, so only the training data can fall in the outer bins.
 *
 * Beside the bins, the training distribution on the same bins: counts of the model's
 * dataset rows (the rows the fit read: complete in the model's features) when that
 * dataset is still in the workspace, otherwise of the version's typicality sample (draws
 * from the fitted mixture itself); `source` records which. Both are deterministic, so a
 * version published before insight existed gets the same bins whenever it is first
 * reported on (ensureInsightBins); until then its answers are counted on the same edges,
 * worked out from its payload (lib/insight/counters.ts, insightLookupFor).
 */
export const INNER_BINS = 12;

export type TrainingSource = 'dataset' | 'model-sample';

export interface VersionBins {
  versionId: number;
  fields: StoredFieldBins[];
  /** per field, counts per bin (INNER_BINS + 2 of them) */
  training: number[][];
  source: TrainingSource;
}

/** One field's edges: [min − w, min, min + w, …, max, max + w], w = (max − min) / inner. */
export function fieldEdges(min: number, max: number, inner = INNER_BINS): number[] {
  const w = (max - min) / inner;
  const edges = [min - w];
  for (let i = 0; i < inner; i++) edges.push(min + i * w);
  edges.push(max, max + w);
  return edges;
}

/**
 * The bin of a value: 0 below min, 1…inner inside (max itself in the last inner bin),
 * inner + 1 above max. The one formula for training rows and visitors' answers.
 */
export function binOf(v: number, min: number, max: number, width: number, inner: number): number {
  if (v < min) return 0;
  if (v > max) return inner + 1;
  const i = Math.floor((v - min) / width);
  return 1 + (i >= inner ? inner - 1 : i < 0 ? 0 : i);
}

/** Read a stored field's bin geometry back from its edges. */
export function geometryOf(edges: number[]): { min: number; max: number; width: number; inner: number } {
  const inner = edges.length - 3;
  const min = edges[1];
  const max = edges[edges.length - 2];
  return { min, max, width: (max - min) / inner, inner };
}

export function binsForFields(fields: FieldSetting[], inner = INNER_BINS): StoredFieldBins[] {
  return fields.map((f) => ({ feature: f.feature, label: f.label, unit: f.unit, edges: fieldEdges(f.min, f.max, inner) }));
}

/** Counts per field per bin of an n·d row-major matrix (original units). */
export function countRows(bins: StoredFieldBins[], rows: ArrayLike<number>, n: number, d: number): number[][] {
  return bins.map((b, j) => {
    const g = geometryOf(b.edges);
    const counts = new Array<number>(g.inner + 2).fill(0);
    for (let r = 0; r < n; r++) {
      const v = rows[r * d + j];
      if (Number.isFinite(v)) counts[binOf(v, g.min, g.max, g.width, g.inner)]++;
    }
    return counts;
  });
}

/** The rows of the version's dataset in the model's features, or null when it is gone or no longer fits. */
async function datasetRows(version: ModelVersion, features: string[]): Promise<{ rows: Float64Array; n: number; d: number } | null> {
  if (!version.mixtureModelId) return null;
  const embed = await Embed.findByPk(version.embedId, { attributes: ['id', 'workspaceId'] });
  if (!embed) return null;
  const model = await MixtureModel.findOne({ where: { id: version.mixtureModelId, workspaceId: embed.workspaceId }, attributes: ['id', 'fitId', 'datasetId'] });
  if (!model) return null;
  let datasetId = model.datasetId;
  if (!datasetId && model.fitId) datasetId = (await Fit.findOne({ where: { id: model.fitId, workspaceId: embed.workspaceId }, attributes: ['id', 'datasetId'] }))?.datasetId ?? null;
  if (!datasetId) return null;
  const dataset = await Dataset.findOne({ where: { id: datasetId, workspaceId: embed.workspaceId }, attributes: ['id', 'columns', 'cells'] });
  if (!dataset) return null;
  try {
    const m = featureMatrix(dataset, features);
    return m.n > 0 ? { rows: m.rows, n: m.n, d: m.d } : null;
  } catch {
    // A column renamed or retyped since the fit: the dataset no longer describes this model.
    return null;
  }
}

/** Work out a version's bins and training counts (no write). */
export async function computeVersionBins(version: ModelVersion): Promise<VersionBins> {
  const { payload, engine, sample } = readStoredVersion(version);
  const bins = binsForFields(payload.fields);
  const features = payload.fields.map((f) => f.feature);
  const data = await datasetRows(version, features);
  if (data) return { versionId: version.id, fields: bins, training: countRows(bins, data.rows, data.n, data.d), source: 'dataset' };
  const draws = sample ?? typicalitySample(engine);
  return { versionId: version.id, fields: bins, training: countRows(bins, draws.rows, draws.size, draws.dimensions), source: 'model-sample' };
}

function fromRow(row: InsightBins): VersionBins {
  return { versionId: row.versionId, fields: row.bins, training: row.training, source: row.source };
}

/**
 * A version's stored bins; computed and stored on first use by the report, export or
 * weekly sweep for versions published before answer insight (or whose publish-time write
 * failed). Safe to race: the first insert wins and everyone reads that row.
 */
export async function ensureInsightBins(versionOrId: ModelVersion | number): Promise<VersionBins> {
  const id = typeof versionOrId === 'number' ? versionOrId : versionOrId.id;
  const stored = await InsightBins.findByPk(id);
  if (stored) return fromRow(stored);
  const version = typeof versionOrId === 'number' ? await ModelVersion.findByPk(id) : versionOrId;
  if (!version) throw new Error(`model version ${id} does not exist`);
  const computed = await computeVersionBins(version);
  try {
    await InsightBins.create({ versionId: id, bins: computed.fields, training: computed.training, source: computed.source });
  } catch (e) {
    if (!(e instanceof UniqueConstraintError)) throw e;
    return fromRow((await InsightBins.findByPk(id))!);
  }
  return computed;
}

/**
 * Publishing's one call: fix the new version's bins now. Never fails the publish (the
 * version is already committed); a failure is logged and the bins are made on first use.
 */
export async function fixInsightBins(version: ModelVersion): Promise<void> {
  try {
    await ensureInsightBins(version);
  } catch (e) {
    console.error(`[partwise] insight bins of version ${version.id} not stored now (made on first report):`, (e as Error).message);
  }
}
