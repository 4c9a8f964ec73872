/**
 * The fit queue as the database holds it: a snapshot for the pure rule in
 * schedule.ts, read from fit rows only (status 'queued' or 'running', workspace,
 * createdAt, lastTurnAt), so it survives restarts and any process reads the same queue.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { Fit, sequelize } from '@/models';
import { queuePositions, type QueueSnapshot } from './schedule';

export async function loadQueueSnapshot(transaction?: Transaction): Promise<QueueSnapshot> {
  const queuedRows = await Fit.findAll({ where: { status: 'queued', cancelRequested: false }, attributes: ['id', 'workspaceId', 'createdAt'], transaction, raw: true });
  const running = await sequelize.query<{ workspace_id: number; n: number }>("SELECT workspace_id, COUNT(*) AS n FROM fits WHERE status = 'running' GROUP BY workspace_id", { type: QueryTypes.SELECT, transaction });
  const workspaces = [...new Set(queuedRows.map((r) => r.workspaceId))];
  const served = workspaces.length
    ? await sequelize.query<{ workspace_id: number; at: string | null }>(`SELECT workspace_id, MAX(last_turn_at) AS at FROM fits WHERE workspace_id IN (${workspaces.map(() => '?').join(',')}) GROUP BY workspace_id`, {
        replacements: workspaces,
        type: QueryTypes.SELECT,
        transaction,
      })
    : [];
  return {
    queued: queuedRows.map((r) => ({ id: r.id, workspaceId: r.workspaceId, createdAt: new Date(r.createdAt).getTime() })),
    running: new Map(running.map((r) => [Number(r.workspace_id), Number(r.n)])),
    lastServedAt: new Map(served.filter((r) => r.at !== null).map((r) => [Number(r.workspace_id), new Date(r.at as string).getTime()])),
  };
}

/** For each of these fits that is waiting: how many fits are expected to start before it. */
export async function queuePositionsOf(fits: Pick<Fit, 'id' | 'status'>[]): Promise<Map<number, number>> {
  if (!fits.some((f) => f.status === 'queued')) return new Map();
  return queuePositions(await loadQueueSnapshot());
}

/** A waiting fit's place in the queue (0: it starts next); null when it is not waiting. */
export async function queuePositionOf(fit: Pick<Fit, 'id' | 'status'>): Promise<number | null> {
  return (await queuePositionsOf([fit])).get(fit.id) ?? null;
}
