import { demoRidesCsv } from '@/lib/demo/cycling';
import { payloadChecksum, type VersionPayload } from '@/lib/embeds/payload';
import { buildModel, parseNumericTable, selectMixture, toModelJson } from '@/lib/mixture';
import { hourPeriod, monthPeriod } from '@/lib/usage';
import { AbuseReport, Embed, Membership, ModelVersion, Subscription, UsageCounter, User, Workspace } from '@/models';

/** Support tests: workspaces with owners, calculators with a real served version, usage and reports. */
const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
let payload: VersionPayload | undefined;

function versionPayload(): VersionPayload {
  if (payload) return payload;
  const csv = demoRidesCsv(5);
  const numeric = parseNumericTable(csv, FEATURES);
  const selection = selectMixture(numeric.rows, numeric.n, numeric.d, { components: [3], covariances: ['full'], seed: 2 });
  const engine = buildModel(numeric.rows, numeric.n, numeric.d, selection.best, { features: FEATURES.map((name) => ({ name })) });
  payload = {
    model: JSON.parse(toModelJson(engine)),
    clusters: ['Social', 'Steady', 'Climbers'].map((label, i) => ({ label, description: '', color: ['#3a8a74', '#e0a526', '#b8432f'][i] })),
    fields: [
      { feature: 'avg_speed_kmh', label: 'Average speed', unit: 'km/h', min: 5, max: 60, help: '' },
      { feature: 'weekly_distance_km', label: 'Weekly distance', unit: 'km', min: 0, max: 1000, help: '' },
      { feature: 'climb_per_ride_m', label: 'Climbing per ride', unit: 'm', min: 0, max: 5000, help: '' },
    ],
    caution: '',
  };
  return payload;
}

export const RIDE = { avg_speed_kmh: 27, weekly_distance_km: 120, climb_per_ride_m: 600 };

let n = 0;

export async function staffUser(email = 'support@support.test') {
  return User.create({ email, name: 'Support', passwordHash: 'x', isStaff: true, emailVerifiedAt: new Date() });
}

export async function workspaceWithOwner(opts: { name?: string; slug?: string; ownerEmail?: string; plan?: string; subscriptionStatus?: string } = {}) {
  const i = ++n;
  const owner = await User.create({ email: opts.ownerEmail ?? `owner${i}@support.test`, name: `Owner ${i}`, passwordHash: 'x', emailVerifiedAt: new Date() });
  const member = await User.create({ email: `member${i}@support.test`, name: `Member ${i}`, passwordHash: 'x', emailVerifiedAt: new Date() });
  const workspace = await Workspace.create({ name: opts.name ?? `Club ${i}`, slug: opts.slug ?? `club-${i}` });
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: workspace.id, role: 'owner' },
    { userId: member.id, workspaceId: workspace.id, role: 'member' },
  ]);
  if (opts.plan) await Subscription.create({ workspaceId: workspace.id, plan: opts.plan, status: opts.subscriptionStatus ?? 'active' });
  return { owner, member, workspace };
}

export async function calculator(workspace: Workspace, opts: { title?: string; token?: string; origins?: string[]; createdAt?: Date; status?: 'active' | 'disabled' | 'retired' } = {}) {
  const i = ++n;
  const embed = await Embed.create({
    workspaceId: workspace.id,
    token: opts.token ?? `SupportTok${String(i).padStart(4, '0')}_xxxxxxxxxx`,
    title: opts.title ?? `Calculator ${i}`,
    allowedOrigins: opts.origins ?? [],
    status: opts.status ?? 'active',
  });
  const p = versionPayload();
  const version = await ModelVersion.create({ embedId: embed.id, number: 1, payload: p, checksum: payloadChecksum(p) });
  await embed.update({ activeVersionId: version.id });
  if (opts.createdAt) {
    // createdAt is managed by Sequelize; backdate it for the spike baseline.
    await Embed.update({ createdAt: opts.createdAt }, { where: { id: embed.id }, silent: true });
    await embed.reload();
  }
  return embed;
}

export async function setUsage(embed: Embed, counts: { month?: number; hours?: Record<string, number> }, at = new Date()) {
  if (counts.month !== undefined) await UsageCounter.create({ embedId: embed.id, workspaceId: embed.workspaceId, granularity: 'month', period: monthPeriod(at), count: counts.month });
  const rows = Object.entries(counts.hours ?? {}).map(([period, count]) => ({ embedId: embed.id, workspaceId: embed.workspaceId, granularity: 'hour' as const, period, count }));
  if (rows.length) await UsageCounter.bulkCreate(rows);
}

/** Hour buckets at `hoursAgo` hours before `now`, as { period: count }. */
export function hoursBefore(now: Date, entries: [hoursAgo: number, count: number][]): Record<string, number> {
  return Object.fromEntries(entries.map(([h, c]) => [hourPeriod(new Date(now.getTime() - h * 3_600_000)), c]));
}

export async function report(embed: Embed, opts: { hostOrigin?: string; message?: string; status?: 'open' | 'closed' } = {}) {
  return AbuseReport.create({ embedId: embed.id, reason: 'misleading', message: opts.message ?? 'This calculator tells riders to skip rest days entirely.', hostOrigin: opts.hostOrigin ?? null, status: opts.status ?? 'open' });
}
