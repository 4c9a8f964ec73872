import { AppError } from '@/lib/errors';
import { getPlan, type Plan } from '@/lib/plans';
import { Subscription } from '@/models';

/**
 * Upload limits of a workspace's plan. Limits themselves live in lib/plans.ts only;
 * this reads the workspace's plan from its subscription (no subscription = the free plan).
 */
export async function workspacePlan(workspaceId: number): Promise<Plan> {
  const subscription = await Subscription.findOne({ where: { workspaceId } });
  return getPlan(subscription?.plan);
}

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(bytes % (1024 * 1024) === 0 ? 0 : 1)} MB`;
  if (bytes >= 1024) return `${Math.round(bytes / 1024)} KB`;
  return `${bytes} bytes`;
}

/** Refuse a file over the plan's upload size, before it is parsed. */
export async function assertUploadSize(workspaceId: number, bytes: number): Promise<void> {
  const plan = await workspacePlan(workspaceId);
  if (bytes > plan.limits.uploadBytes) {
    throw new AppError('payload_too_large', `The file is ${formatBytes(bytes)}; the ${plan.name} plan accepts uploads up to ${formatBytes(plan.limits.uploadBytes)}.`);
  }
}

/** Refuse a table with more usable rows than the plan allows. */
export async function assertRowCount(workspaceId: number, rows: number): Promise<void> {
  const plan = await workspacePlan(workspaceId);
  if (rows > plan.limits.datasetRows) {
    throw new AppError('plan_limit', `The table has ${rows.toLocaleString('en')} complete rows; the ${plan.name} plan allows ${plan.limits.datasetRows.toLocaleString('en')} per dataset. Upload a sample of the rows or move to a larger plan.`);
  }
}
