import { AppError } from '@/lib/errors';
import { assertRowsAllowed, workspacePlan } from '@/lib/billing/limits';

/**
 * Upload limits. The limits live in lib/plans.ts and the billing module decides which
 * plan is in force; this only asks it, at the two moments an upload can be refused.
 */

/** Before reading the body: a declared length far over the plan's size is refused unread. */
export async function assertDeclaredSize(workspaceId: number, declaredBytes: number): Promise<void> {
  const plan = await workspacePlan(workspaceId);
  // Multipart framing adds a little; the file itself is checked exactly after reading.
  if (declaredBytes - 4096 > plan.limits.uploadBytes) {
    throw new AppError('payload_too_large', `The upload is larger than the ${plan.name} plan's limit of ${Math.round(plan.limits.uploadBytes / (1024 * 1024))} MB per file.`);
  }
}

/** The file as received, before parsing. */
export async function assertUploadBytes(workspaceId: number, bytes: number): Promise<void> {
  await assertRowsAllowed(workspaceId, 0, bytes);
}

/** After parsing: rows with a number in every numeric column. */
export async function assertUploadRows(workspaceId: number, rows: number, bytes: number): Promise<void> {
  await assertRowsAllowed(workspaceId, rows, bytes);
}
