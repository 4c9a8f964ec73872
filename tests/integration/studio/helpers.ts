import { Membership, Subscription, User, Workspace } from '@/models';

/** A workspace with an owner and a member (and a staff user outside it) for studio tests. */
export async function studioWorld(plan = 'lab') {
  const mk = (email: string, isStaff = false) => User.create({ email, name: email.split('@')[0], passwordHash: 'unused', isStaff, emailVerifiedAt: new Date() });
  const [owner, member, staff, outsider] = await Promise.all([mk('owner@studio.test'), mk('member@studio.test'), mk('staff@studio.test', true), mk('outsider@studio.test')]);
  const workspace = await Workspace.create({ name: 'Studio', slug: 'studio' });
  const other = await Workspace.create({ name: 'Elsewhere', slug: 'elsewhere' });
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: workspace.id, role: 'owner' },
    { userId: member.id, workspaceId: workspace.id, role: 'member' },
    { userId: outsider.id, workspaceId: other.id, role: 'owner' },
  ]);
  await Subscription.create({ workspaceId: workspace.id, plan });
  return { owner, member, staff, outsider, workspace, other };
}

/** A multipart upload body with one file. */
export function csvForm(content: string | Uint8Array, filename = 'table.csv', name?: string): FormData {
  const form = new FormData();
  form.set('file', new Blob([content as BlobPart], { type: 'text/csv' }), filename);
  if (name) form.set('name', name);
  return form;
}

export const RIDE_FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];

/** Invented weekly ride logs of a cycling club, in four loose groups of riders (deterministic). */
export function ridesCsv(rows: number): string {
  const lines = [RIDE_FEATURES.join(',')];
  for (let i = 0; i < rows; i++) {
    const g = i % 4;
    lines.push([18 + g * 3 + Math.sin(i) * 2, 40 + g * 35 + Math.cos(i * 1.7) * 15, 150 + g * 120 + Math.sin(i * 0.37) * 80].map((v) => v.toFixed(2)).join(','));
  }
  return lines.join('\n') + '\n';
}
