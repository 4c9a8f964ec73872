import { buildModel, parseNumericTable, selectMixture, toModelJson } from '@/lib/mixture';
import { demoRidesCsv } from '@/lib/demo/cycling';
import { parseCsvText } from '@/lib/datasets/parse';
import { payloadChecksum, type VersionPayload } from '@/lib/embeds/payload';
import { Dataset, Embed, Fit, Membership, MixtureModel, ModelVersion, Subscription, User, Workspace } from '@/models';
import type { World } from './types';

/** Two workspaces with one of everything in A, so every route has something to act on. */
export async function buildWorld(): Promise<World> {
  const mk = (email: string, isStaff = false) => User.create({ email, name: email.split('@')[0], passwordHash: 'unused', isStaff, emailVerifiedAt: new Date() });
  const [owner, member, staff, outsider] = await Promise.all([mk('owner@matrix.test'), mk('member@matrix.test'), mk('staff@matrix.test', true), mk('outsider@matrix.test')]);
  const a = await Workspace.create({ name: 'Matrix A', slug: 'matrix-a' });
  const b = await Workspace.create({ name: 'Matrix B', slug: 'matrix-b' });
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: a.id, role: 'owner' },
    { userId: member.id, workspaceId: a.id, role: 'member' },
    { userId: outsider.id, workspaceId: b.id, role: 'owner' },
  ]);
  await Subscription.bulkCreate([
    { workspaceId: a.id, plan: 'lab' },
    { workspaceId: b.id, plan: 'lab' },
  ]);

  const csv = demoRidesCsv(7);
  const table = parseCsvText(csv);
  const dataset = await Dataset.create({ workspaceId: a.id, createdById: owner.id, name: 'Rides', originalFilename: 'rides.csv', originalCsv: Buffer.from(csv), columns: table.columns, cells: table.cells, rowCount: table.cells.length });
  const features = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
  const numeric = parseNumericTable(csv, features);
  const selection = selectMixture(numeric.rows, numeric.n, numeric.d, { components: [3], covariances: ['full'], seed: 1 });
  const engineModel = buildModel(numeric.rows, numeric.n, numeric.d, selection.best, { features: features.map((name) => ({ name })) });
  const modelJson = JSON.parse(toModelJson(engineModel));
  const fit = await Fit.create({ workspaceId: a.id, datasetId: dataset.id, createdById: owner.id, status: 'succeeded', params: { features, components: [3], covariances: ['full'] }, finishedAt: new Date() });
  const clusters = [0, 1, 2].map((k) => ({ label: `Group ${k + 1}`, description: '', color: ['#3a8a74', '#e0a526', '#b8432f'][k] }));
  const fields = features.map((f, j) => ({ feature: f, label: f, unit: '', min: engineModel.features[j].min, max: engineModel.features[j].max, help: '' }));
  const model = await MixtureModel.create({ workspaceId: a.id, fitId: fit.id, datasetId: dataset.id, createdById: owner.id, name: 'Ride groups', model: modelJson, clusters, fields });
  const embed = await Embed.create({ workspaceId: a.id, mixtureModelId: model.id, token: 'MatrixToken_abcdefghijklmn', title: 'Ride groups', allowedOrigins: ['http://host.test'] });
  const payload = { model: modelJson, clusters, fields, caution: '' };
  const version = await ModelVersion.create({ embedId: embed.id, mixtureModelId: model.id, createdById: owner.id, number: 1, payload, checksum: payloadChecksum(payload as VersionPayload) });
  await embed.update({ activeVersionId: version.id });
  // A second, not served version, so routes that take two versions (compare) have a pair.
  const otherVersion = await ModelVersion.create({ embedId: embed.id, mixtureModelId: model.id, createdById: owner.id, number: 2, payload, checksum: payloadChecksum(payload as VersionPayload) });

  const u = (x: User) => ({ id: x.id, email: x.email });
  return {
    users: { owner: u(owner), member: u(member), staff: u(staff), outsider: u(outsider) },
    workspaceId: a.id,
    otherWorkspaceId: b.id,
    datasetId: dataset.id,
    fitId: fit.id,
    modelId: model.id,
    embedId: embed.id,
    embedToken: embed.token,
    versionId: version.id,
    otherVersionId: otherVersion.id,
  };
}
