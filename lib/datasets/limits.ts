import type { AppError } from '@/lib/errors';
import type { Plan } from '@/lib/plans';
import { assertRowsAllowed, uploadTooLarge, workspacePlan } from '@/lib/billing/limits';

/**
 * Upload limits. The limits live in lib/plans.ts and the billing module decides which
 * plan is in force; this only asks it, at the moments an upload can be refused: while
 * the body streams (its size), and after parsing (its rows).
 */

export interface UploadSizeLimit {
  plan: Plan;
  /** Bytes one uploaded file (or pasted table) may have on this plan. */
  fileBytes: number;
  /** The 413 for a body past the limit; `bytes` when its size is known (declared, or the file's). */
  tooLarge(bytes?: number): AppError;
}

/** Before reading the body: the size the plan in force allows. */
export async function uploadSizeLimit(workspaceId: number): Promise<UploadSizeLimit> {
  const plan = await workspacePlan(workspaceId);
  return { plan, fileBytes: plan.limits.uploadBytes, tooLarge: (bytes) => uploadTooLarge(plan, bytes) };
}

/** The file as received, before parsing. */
export async function assertUploadBytes(workspaceId: number, bytes: number): Promise<void> {
  await assertRowsAllowed(workspaceId, 0, bytes);
}

/** After parsing: rows with a number in every numeric column. */
export async function assertUploadRows(workspaceId: number, rows: number, bytes: number): Promise<void> {
  await assertRowsAllowed(workspaceId, rows, bytes);
}
