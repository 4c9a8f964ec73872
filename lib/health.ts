import type { Sequelize } from 'sequelize';
import { migrationState } from '@/lib/db/migrator';
import { getSequelize } from '@/models/db';
import { redisHealth } from '@/lib/shared/redis';
import { broadcastState } from '@/lib/shared/broadcast';

/**
 * /api/health: the database, Redis and the fit queue reported separately, so a load
 * balancer's readiness check and a person reading it see which part is down.
 *
 *   { ok, status: 'ok' | 'failing', database: { ok, reachable, … }, migrations,
 *     redis: { ok, … } | null (no REDIS_URL), queue: { ok, … } | null (no queue configured) }
 *
 * The queue's check lives with the queue (lib/fitting), which hands it in with
 * `registerHealthCheck('queue', queueHealth)`; nothing here imports it.
 */
export interface PartHealth {
  ok: boolean;
  error?: string;
  [detail: string]: unknown;
}

export interface HealthReport {
  ok: boolean;
  status: 'ok' | 'failing';
  database: { ok: boolean; reachable: boolean; dialect: string; error?: string };
  migrations: { upToDate: boolean; applied: number; pending: string[] } | null;
  redis: (PartHealth & { invalidations: string | null }) | null;
  queue: PartHealth | null;
}

export type HealthCheck = () => Promise<PartHealth | null>;
export type HealthPart = 'queue';

const checks = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.healthChecks')] ??= new Map<HealthPart, HealthCheck>()) as Map<HealthPart, HealthCheck>;

/** Add (or replace) the check of an optional part; the fit queue calls this with its queueHealth(). */
export function registerHealthCheck(part: HealthPart, check: HealthCheck | null): void {
  if (check) checks.set(part, check);
  else checks.delete(part);
}

/** Reachable database and no pending migration (what start-up also insists on), plus Redis and the queue when configured. */
export async function checkHealth(sequelize: Sequelize = getSequelize()): Promise<HealthReport> {
  const [db, redis, queue] = await Promise.all([checkDatabase(sequelize), checkRedis(), checkPart('queue')]);
  const ok = db.database.ok && (db.migrations?.upToDate ?? false) && (redis?.ok ?? true) && (queue?.ok ?? true);
  return { ok, status: ok ? 'ok' : 'failing', ...db, redis, queue };
}

async function checkDatabase(sequelize: Sequelize): Promise<Pick<HealthReport, 'database' | 'migrations'>> {
  const dialect = sequelize.getDialect();
  try {
    await sequelize.query('SELECT 1');
  } catch (e) {
    return { database: { ok: false, reachable: false, dialect, error: describe(e) }, migrations: null };
  }
  try {
    const state = await migrationState(sequelize);
    return {
      database: { ok: state.upToDate, reachable: true, dialect },
      migrations: { upToDate: state.upToDate, applied: state.applied.length, pending: state.pending },
    };
  } catch (e) {
    return { database: { ok: false, reachable: true, dialect, error: describe(e) }, migrations: null };
  }
}

async function checkRedis(): Promise<HealthReport['redis']> {
  const r = await redisHealth();
  if (!r) return null;
  const b = broadcastState();
  return { ...r, invalidations: b.transport === 'redis' ? (b.listening ? 'listening' : 'not listening') : null };
}

async function checkPart(part: HealthPart): Promise<PartHealth | null> {
  const check = checks.get(part);
  if (!check) return null;
  try {
    return await check();
  } catch (e) {
    return { ok: false, error: `${part} check failed: ${String((e as Error)?.message ?? e).slice(0, 200)}` };
  }
}

// Only the class of failure leaves the server; paths and SQL stay in the log.
function describe(e: unknown): string {
  const message = String((e as Error)?.message ?? e);
  if (/SQLITE_CANTOPEN|unable to open/i.test(message)) return 'database file cannot be opened';
  if (/SQLITE_BUSY|locked/i.test(message)) return 'database is busy';
  if (/ECONNREFUSED|ENOTFOUND|ETIMEDOUT|EHOSTUNREACH|ConnectionRefused|HostNotFound|timed out|does not exist|authentication failed/i.test(message)) return 'database server cannot be reached';
  return 'database query failed';
}
