import { Op, type Transaction } from 'sequelize';
import { AppError } from '@/lib/errors';
import type { Plan } from '@/lib/plans';
import { upgradeFor, upgradeHint } from '@/lib/billing/limits';
import { Invitation, Membership } from '@/models';

/** People in the workspace plus invitations still open (they hold a seat until used or expired). */
export async function seatsTaken(workspaceId: number, opts: { exceptInvitationId?: number; includeInvitations?: boolean; transaction?: Transaction } = {}): Promise<number> {
  const members = await Membership.count({ where: { workspaceId }, transaction: opts.transaction });
  if (opts.includeInvitations === false) return members;
  const open = await Invitation.count({
    where: { workspaceId, acceptedAt: null, expiresAt: { [Op.gt]: new Date() }, ...(opts.exceptInvitationId ? { id: { [Op.ne]: opts.exceptInvitationId } } : {}) },
    transaction: opts.transaction,
  });
  return members + open;
}

export function seatLimitError(plan: Plan): AppError {
  const n = plan.limits.seats;
  const state = n === 1 ? 'it is taken' : 'all are taken or held by open invitations';
  const next = upgradeFor(plan, (p) => p.limits.seats > n);
  const more = upgradeHint(plan, next, (p) => `includes ${p.limits.seats} seats`);
  return new AppError('plan_limit', `The ${plan.name} plan includes ${n} seat${n === 1 ? '' : 's'} (owners included), and ${state}. Remove a member or an open invitation first. ${more}`);
}
