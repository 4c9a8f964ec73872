import { publishVersion } from '@/lib/embeds/service';
import { featureMatrix } from '@/lib/datasets';
import { computeFit } from '@/lib/fitting/compute';
import { CLUSTER_PALETTE } from '@/lib/fitting/palette';
import { parseModelJson, solveAssignment, toModelJson, type Covariance, type MixtureModel as EngineModel } from '@/lib/mixture';
import { Dataset, Embed, Fit, MixtureModel, ModelVersion, type User, type Workspace } from '@/models';
import type { ClusterLabel } from '@/models/MixtureModel';
import { DEMO_FEATURES, DEMO_MODEL_NAME } from './model';

export const DEMO_SECOND_MODEL_NAME = 'Riverside ride groups, five (diagonal)';
const SECOND_SEED = 20261202;

/**
 * Demo step 4: a second version of the demo calculator, published but NOT served, so the
 * studio's "compare versions" has something to show. A second fit of the same ride logs
 * with another shape (five groups with diagonal covariances, unless the first model is
 * already that, then three full ones): one fixed seed, one candidate, three restarts,
 * so it adds well under a second to the seed. Idempotent: a calculator that already has
 * a second version is left alone.
 */
export async function seedDemoSecondVersion(ctx: { workspace: Workspace; owner: User }): Promise<void> {
  const embed = await Embed.findOne({ where: { workspaceId: ctx.workspace.id }, order: [['id', 'ASC']] });
  if (!embed || embed.status === 'retired') return;
  if ((await ModelVersion.count({ where: { embedId: embed.id } })) >= 2) return;
  const first = await MixtureModel.findOne({ where: { workspaceId: ctx.workspace.id, name: DEMO_MODEL_NAME } });
  if (!first?.datasetId) return;
  const dataset = await Dataset.findOne({ where: { id: first.datasetId, workspaceId: ctx.workspace.id } });
  if (!dataset) return;
  const firstEngine = parseModelJson(first.model);

  const shape: { components: number; covariance: Covariance } =
    firstEngine.weights.length === 5 && firstEngine.structure === 'diagonal' ? { components: 3, covariance: 'full' } : { components: 5, covariance: 'diagonal' };
  const matrix = featureMatrix(dataset, DEMO_FEATURES);
  const units = Object.fromEntries(dataset.columns.map((c) => [c.name, c.unit ?? null]));
  const params = { datasetId: dataset.id, features: DEMO_FEATURES, minComponents: shape.components, maxComponents: shape.components, covariances: [shape.covariance], restarts: 3, seed: SECOND_SEED, standardize: true, maxIter: 300, tol: 1e-4, regCovar: 1e-6 };
  const started = Date.now();
  const outcome = computeFit({
    rows: matrix.rows,
    n: matrix.n,
    d: matrix.d,
    features: matrix.features.map((c) => ({ name: c.name, unit: units[c.name] ?? null })),
    components: [shape.components],
    covariances: [shape.covariance],
    restarts: params.restarts,
    seed: params.seed,
    standardize: true,
    maxIter: params.maxIter,
    tol: params.tol,
    regCovar: params.regCovar,
  });
  const durationMs = Date.now() - started;
  const best = outcome.candidates.find((c) => c.model);
  if (!best?.model) return;
  const now = new Date();
  const fit = await Fit.create({
    workspaceId: ctx.workspace.id,
    datasetId: dataset.id,
    createdById: ctx.owner.id,
    status: 'succeeded',
    params: { ...params, rows: matrix.n, dropped: matrix.dropped },
    progress: { phase: 'storing', candidates: outcome.candidates.length, restarts: params.restarts, maxIter: params.maxIter, fraction: 1, rows: matrix.n, durationMs, updatedAt: now.toISOString() },
    result: { ...outcome, durationMs, dropped: matrix.dropped, features: DEMO_FEATURES.map((name) => ({ name, displayName: dataset.columns.find((c) => c.name === name)?.displayName ?? name, unit: units[name] ?? '' })) } as unknown as Record<string, unknown>,
    startedAt: new Date(started),
    finishedAt: now,
  });
  const engine = parseModelJson(best.model);
  const model = await MixtureModel.create({
    workspaceId: ctx.workspace.id,
    fitId: fit.id,
    datasetId: dataset.id,
    createdById: ctx.owner.id,
    name: DEMO_SECOND_MODEL_NAME,
    model: JSON.parse(toModelJson(engine)),
    clusters: carryLabels(firstEngine, first.clusters, engine),
    fields: first.fields,
    caution: first.caution,
    selectionNote: `A second look at the same ride logs: ${shape.components} groups with ${shape.covariance} covariances, to compare with the served version before choosing.`,
  });
  const { version } = await publishVersion({ user: ctx.owner, workspace: ctx.workspace }, embed.id, { mixtureModelId: model.id, activate: false });
  console.log(`[partwise] demo calculator version ${version.number} published, not served (${shape.components} components, ${shape.covariance}; ${durationMs} ms).`);
}

const MORE_LESS: Record<string, [string, string]> = {
  avg_speed_kmh: ['faster', 'slower'],
  weekly_distance_km: ['longer weeks', 'shorter weeks'],
  climb_per_ride_m: ['more climbing', 'less climbing'],
};

/**
 * The names an analyst would carry over: each new group matched to an old one (minimum
 * total distance of means standardised with the old model's scaler) keeps its name,
 * description and colour; a new group left over is named after its nearest old group and
 * the field it differs most in ("Easy social, longer weeks"), in a colour not yet used.
 */
export function carryLabels(old: EngineModel, oldLabels: ClusterLabel[], next: EngineModel): ClusterLabel[] {
  const d = old.features.length;
  const center = old.scaler?.center ?? new Array<number>(d).fill(0);
  const scale = old.scaler?.scale ?? new Array<number>(d).fill(1);
  const z = (m: number[]) => m.map((v, j) => (v - center[j]) / scale[j]);
  const zOld = old.means.map(z);
  const zNew = next.means.map(z);
  const dist = (a: number[], b: number[]) => Math.sqrt(a.reduce((s, v, j) => s + (v - b[j]) ** 2, 0));
  const kNew = zNew.length;
  const kOld = zOld.length;
  const cost = new Float64Array(kNew * kOld);
  for (let i = 0; i < kNew; i++) for (let j = 0; j < kOld; j++) cost[i * kOld + j] = dist(zNew[i], zOld[j]);
  const { rowToCol } = solveAssignment(cost, kNew, kOld);
  const used = new Set(oldLabels.map((l) => l.color.toLowerCase()));
  const spare = CLUSTER_PALETTE.map((p) => p.color).filter((c) => !used.has(c.toLowerCase()));
  return zNew.map((m, i) => {
    const j = rowToCol[i];
    if (j >= 0) return { ...oldLabels[j] };
    let nearest = 0;
    for (let c = 1; c < kOld; c++) if (cost[i * kOld + c] < cost[i * kOld + nearest]) nearest = c;
    let field = 0;
    for (let f = 1; f < d; f++) if (Math.abs(m[f] - zOld[nearest][f]) > Math.abs(m[field] - zOld[nearest][field])) field = f;
    const words = MORE_LESS[old.features[field].name] ?? [`more ${old.features[field].name}`, `less ${old.features[field].name}`];
    const word = m[field] > zOld[nearest][field] ? words[0] : words[1];
    return {
      label: `${oldLabels[nearest].label}, ${word}`,
      description: `Close to ${oldLabels[nearest].label.toLowerCase()}, with ${word}.`,
      color: spare.shift() ?? CLUSTER_PALETTE[i % CLUSTER_PALETTE.length].color,
    };
  });
}
