import { computeFit } from '@/lib/fitting/compute';
import { clusterColor } from '@/lib/fitting/palette';
import { featureMatrix } from '@/lib/datasets';
import { parseModelJson, toModelJson } from '@/lib/mixture';
import { Dataset, Fit, MixtureModel, type User, type Workspace } from '@/models';

export const DEMO_FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
export const DEMO_MODEL_NAME = 'Riverside ride groups';
const DEMO_SEED = 20261201;

/**
 * The club's own caution, beside the calculator's general one (which already says the
 * percentages are similarity, not a verdict): what the groups are based on, and what to do.
 */
export const DEMO_CAUTION = 'The groups come from one autumn season of Riverside club ride logs, so they describe our club, not cyclists in general. Not sure which group to join? Come on any Saturday ride first; the ride leaders will help you find your pace.';

/** Invented ride-group names, matched to fitted clusters by their means (see nameClusters). */
const GROUP_NAMES = {
  easy: { label: 'Easy social', description: 'Relaxed pace, short weekly distance, little climbing.' },
  steady: { label: 'Steady tourers', description: 'Moderate pace over longer weekly distances.' },
  hills: { label: 'Hill chasers', description: 'Rides built around climbing, at a moderate pace.' },
  fast: { label: 'Fast pack', description: 'High speed and the longest weekly distances.' },
};

/**
 * Demo step 2: fit the ride logs in the seed itself (synchronously, fixed seed; 1–6
 * components, full and diagonal), store the job as a succeeded Fit and keep the BIC
 * winner as a named model. Idempotent: a demo model already present means done.
 */
export async function seedDemoModel({ workspace, owner, dataset }: { workspace: Workspace; owner: User; dataset: Dataset }): Promise<void> {
  if (await MixtureModel.findOne({ where: { workspaceId: workspace.id, name: DEMO_MODEL_NAME } })) return;
  const full = (await Dataset.findByPk(dataset.id))!;
  // Tidy display settings the analyst would have entered.
  const settings: Record<string, { displayName: string; unit: string; inputMin: number; inputMax: number }> = {
    avg_speed_kmh: { displayName: 'Average speed', unit: 'km/h', inputMin: 10, inputMax: 45 },
    weekly_distance_km: { displayName: 'Weekly distance', unit: 'km', inputMin: 0, inputMax: 450 },
    climb_per_ride_m: { displayName: 'Climbing per ride', unit: 'm', inputMin: 0, inputMax: 2000 },
  };
  full.columns = full.columns.map((c) => (settings[c.name] ? { ...c, ...settings[c.name] } : c));
  full.changed('columns', true);
  await full.save();

  const matrix = featureMatrix(full, DEMO_FEATURES);
  const params = { datasetId: full.id, features: DEMO_FEATURES, minComponents: 1, maxComponents: 6, covariances: ['full', 'diagonal'] as ('full' | 'diagonal')[], restarts: 5, seed: DEMO_SEED, standardize: true, maxIter: 300, tol: 1e-4, regCovar: 1e-6 };
  const started = Date.now();
  const outcome = computeFit({
    rows: matrix.rows,
    n: matrix.n,
    d: matrix.d,
    features: matrix.features.map((c) => ({ name: c.name, unit: settings[c.name]?.unit ?? null })),
    components: [1, 2, 3, 4, 5, 6],
    covariances: params.covariances,
    restarts: params.restarts,
    seed: params.seed,
    standardize: true,
    maxIter: params.maxIter,
    tol: params.tol,
    regCovar: params.regCovar,
  });
  const durationMs = Date.now() - started;
  const bestIndex = outcome.candidates.findIndex((c) => c.rank === 1);
  const best = outcome.candidates[bestIndex];
  const now = new Date();
  const fit = await Fit.create({
    workspaceId: workspace.id,
    datasetId: full.id,
    createdById: owner.id,
    status: 'succeeded',
    params: { ...params, rows: matrix.n, dropped: matrix.dropped },
    progress: { phase: 'storing', candidates: outcome.candidates.length, restarts: params.restarts, maxIter: params.maxIter, fraction: 1, rows: matrix.n, durationMs, updatedAt: now.toISOString() },
    result: { ...outcome, durationMs, dropped: matrix.dropped, features: DEMO_FEATURES.map((name) => ({ name, displayName: settings[name].displayName, unit: settings[name].unit })) } as unknown as Record<string, unknown>,
    startedAt: new Date(started),
    finishedAt: now,
  });

  const engine = parseModelJson(best.model);
  engine.ranking = outcome.candidates.map(({ model: _m, trace: _t, ...c }) => c);
  const clusters = nameClusters(engine.means).map((g, k) => ({ ...g, color: clusterColor(k) }));
  // Not every rider knows their climbing: the club lets visitors leave it blank (answered from speed and distance alone).
  const optional = new Set(['climb_per_ride_m']);
  const fields = DEMO_FEATURES.map((name) => ({ feature: name, label: settings[name].displayName, unit: settings[name].unit, min: settings[name].inputMin, max: settings[name].inputMax, help: helpFor(name), optional: optional.has(name) }));
  await MixtureModel.create({
    workspaceId: workspace.id,
    fitId: fit.id,
    datasetId: full.id,
    createdById: owner.id,
    name: DEMO_MODEL_NAME,
    model: JSON.parse(toModelJson(engine)),
    clusters,
    fields,
    caution: DEMO_CAUTION,
    selectionNote: '',
  });
  console.log(`[partwise] demo model fitted (${best.components} components, ${best.covariance}; ${outcome.candidates.length} candidates in ${durationMs} ms).`);
}

function helpFor(feature: string): string {
  if (feature === 'avg_speed_kmh') return 'Your usual average speed on a club ride.';
  if (feature === 'weekly_distance_km') return 'Roughly how far you ride in a normal week.';
  return 'Typical height gained on one ride; leave it blank if you have never measured it.';
}

/**
 * Give each fitted cluster a ride-group name by its means (speed, distance, climbing):
 * most climbing → hill chasers, fastest of the rest → fast pack, slowest → easy social,
 * the rest → steady tourers. Extra clusters (if BIC picks more than four) get numbered names.
 */
export function nameClusters(means: number[][]): { label: string; description: string }[] {
  const k = means.length;
  const order = [...means.keys()];
  const out: ({ label: string; description: string } | null)[] = Array(k).fill(null);
  const take = (pick: number | undefined, group: { label: string; description: string }) => {
    if (pick === undefined) return;
    out[pick] = group;
    order.splice(order.indexOf(pick), 1);
  };
  const by = (j: number, dir: 1 | -1) => [...order].sort((a, b) => dir * (means[b][j] - means[a][j]))[0];
  if (k >= 4) take(by(2, 1), GROUP_NAMES.hills);
  if (k >= 2) take(by(0, 1), GROUP_NAMES.fast);
  if (order.length) take(by(0, -1), GROUP_NAMES.easy);
  if (order.length) take(by(1, 1), GROUP_NAMES.steady);
  return out.map((g, i) => g ?? { label: `Mixed riders ${i + 1}`, description: 'A smaller group between the main ones.' });
}
