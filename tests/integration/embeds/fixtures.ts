import { buildModel, parseNumericTable, selectMixture, toModelJson } from '@/lib/mixture';
import { demoRidesCsv } from '@/lib/demo/cycling';
import { Membership, MixtureModel, Subscription, User, Workspace } from '@/models';

export const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'] as const;

let counter = 0;
// Browser test files share one stack database and each starts its counter at 0.
const run = Math.random().toString(36).slice(2, 8);

/** A workspace with an owner, a member and a named 3-cluster model fitted by the engine. */
export async function modelWorkspace(opts: { plan?: string } = {}) {
  const n = ++counter;
  const owner = await User.create({ email: `owner${n}-${run}@embeds.test`, name: 'Owner', passwordHash: 'x', emailVerifiedAt: new Date() });
  const member = await User.create({ email: `member${n}-${run}@embeds.test`, name: 'Member', passwordHash: 'x', emailVerifiedAt: new Date() });
  const workspace = await Workspace.create({ name: `Embeds ${n}`, slug: `embeds-${n}-${run}` });
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: workspace.id, role: 'owner' },
    { userId: member.id, workspaceId: workspace.id, role: 'member' },
  ]);
  await Subscription.create({ workspaceId: workspace.id, plan: opts.plan ?? 'lab', status: 'active' });
  const model = await createModel(workspace.id, owner.id, 3, 'Ride groups');
  return { owner, member, workspace, model };
}

export async function createModel(workspaceId: number, userId: number, k: number, name: string) {
  const csv = demoRidesCsv(11);
  const numeric = parseNumericTable(csv, [...FEATURES]);
  const selection = selectMixture(numeric.rows, numeric.n, numeric.d, { components: [k], covariances: ['full'], seed: 3 });
  const engine = buildModel(numeric.rows, numeric.n, numeric.d, selection.best, { features: FEATURES.map((f) => ({ name: f })) });
  const labels = ['Easy social', 'Steady club', 'Hill lovers', 'Fast group'];
  const colors = ['#3a8a74', '#e0a526', '#b8432f', '#4a5366'];
  return MixtureModel.create({
    workspaceId,
    createdById: userId,
    name,
    model: JSON.parse(toModelJson(engine)),
    clusters: Array.from({ length: k }, (_, i) => ({ label: labels[i], description: `Riders like group ${i + 1}.`, color: colors[i] })),
    fields: [
      { feature: 'avg_speed_kmh', label: 'Average speed', unit: 'km/h', min: 10, max: 45, help: 'Over a normal ride.' },
      { feature: 'weekly_distance_km', label: 'Weekly distance', unit: 'km', min: 0, max: 500, help: '' },
      { feature: 'climb_per_ride_m', label: 'Climbing per ride', unit: 'm', min: 0, max: 3000, help: '' },
    ],
    caution: 'Try a group ride before you decide.',
  });
}
