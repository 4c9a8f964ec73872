/**
 * The optional fit queue: pg-boss on the app's own PostgreSQL. When it is configured
 * (PARTWISE_FIT_QUEUE=pg-boss with a postgres:// DATABASE_URL), each turn of a fit is a
 * pg-boss job carrying the fit's id, sent in the same transaction that inserts the fit
 * row (or re-queues a paused one), and `npm run worker` (lib/fitting/queue-worker.ts)
 * runs them; app instances then never compute fits themselves. Unset, fits stay with the
 * in-process runner of lib/fitting/jobs.ts, on SQLite and PostgreSQL alike.
 *
 * The fit row stays the truth (status, progress, cancel flag, checkpoint); the job only
 * delivers a turn to a worker and brings it back when that worker dies: a job that stays
 * active past its expiry is retried once (the next worker takes the fit over from its
 * last checkpoint), and a job that fails again goes to the dead-letter queue, whose
 * handler fails the fit with WORKER_LOST_REASON. So no fit stays 'running' for ever.
 */
import PgBoss from 'pg-boss';
import type { Transaction } from 'sequelize';
import { databasePath } from '@/models/db';
import { fitQueueMode, type FitQueueMode } from './queue-config';

export const FIT_QUEUE = 'partwise-fit';
/** Where pg-boss puts a fit job whose retry failed too. */
export const FIT_DEAD_QUEUE = 'partwise-fit-dead';
export const FIT_QUEUE_SCHEMA = 'pgboss';
export const WORKER_LOST_REASON = 'The worker running this fit stopped twice before it finished (once it was started again from its last checkpoint); start it again.';

export { FitQueueConfigError, fitQueueMode, type FitQueueMode } from './queue-config';

export const queueConfigured = () => fitQueueMode() === 'pg-boss';

function intEnv(name: string, fallback: number, min: number): number {
  const v = Number(process.env[name]);
  return Number.isInteger(v) && v >= min ? v : fallback;
}

/** How long a turn's job may stay active before pg-boss takes it for lost (default 15 minutes). */
export const fitJobExpireSeconds = () => intEnv('PARTWISE_FIT_JOB_EXPIRE_S', 900, 1);
/** How often pg-boss looks for expired jobs (default 60 s; every worker runs this upkeep). */
export const queueMaintenanceSeconds = () => intEnv('PARTWISE_QUEUE_MAINTENANCE_S', 60, 1);
/**
 * On a queue, a turn ends at the first candidate after this long even when nobody waits
 * (default 60 s), so a job's active time stays far below its expiry and a worker that
 * dies loses at most one turn of work.
 */
export const fitTurnMaxMs = () => intEnv('PARTWISE_FIT_TURN_MS', 60_000, 50);

interface BossState {
  boss: PgBoss | null;
  starting: Promise<PgBoss> | null;
  supervise: boolean;
}
const g = globalThis as unknown as { __partwiseFitBoss?: BossState };
const state = (): BossState => (g.__partwiseFitBoss ??= { boss: null, starting: null, supervise: false });

/**
 * This process's pg-boss, started once (it creates its schema in the same database on
 * first use). App instances send only; workers also run pg-boss's upkeep (expiry),
 * asked for with `supervise` by the first caller of the process.
 */
export function fitBoss(opts: { supervise?: boolean } = {}): Promise<PgBoss> {
  const s = state();
  if (s.starting) return s.starting;
  s.supervise = opts.supervise ?? false;
  s.starting = (async () => {
    const boss = new PgBoss({
      connectionString: databasePath(),
      schema: FIT_QUEUE_SCHEMA,
      application_name: 'partwise-queue',
      max: intEnv('PARTWISE_QUEUE_POOL_MAX', 4, 1),
      supervise: s.supervise,
      schedule: false,
      maintenanceIntervalSeconds: queueMaintenanceSeconds(),
    });
    boss.on('error', (e) => console.error('[partwise] fit queue:', e.message));
    await boss.start();
    await ensureQueues(boss);
    s.boss = boss;
    return boss;
  })();
  s.starting.catch(() => {
    s.starting = null;
  });
  return s.starting;
}

async function ensureQueues(boss: PgBoss): Promise<void> {
  const settings = { retryLimit: 1, retryDelay: 0, retryBackoff: false, expireInSeconds: fitJobExpireSeconds(), deadLetter: FIT_DEAD_QUEUE };
  for (const [name, options] of [
    [FIT_DEAD_QUEUE, { retryLimit: 0 }],
    [FIT_QUEUE, settings],
  ] as const) {
    if (!(await boss.getQueue(name))) {
      try {
        await boss.createQueue(name, { name, ...options });
      } catch (e) {
        // Another process created it a moment ago.
        if (!(await boss.getQueue(name))) throw e;
      }
    }
    await boss.updateQueue(name, { name, ...options });
  }
}

export async function stopFitBoss(): Promise<void> {
  const s = state();
  const boss = s.starting ? await s.starting.catch(() => null) : null;
  s.starting = null;
  s.boss = null;
  if (boss) await boss.stop({ graceful: false, wait: true, close: true });
}

export interface FitJobData {
  fitId: number;
}

/**
 * Queue a turn of this fit. Given the transaction that wrote the fit row, the job is
 * inserted on that transaction's own connection, so both commit or neither does.
 */
export async function publishFitTurn(fitId: number, transaction?: Transaction): Promise<void> {
  const boss = await fitBoss();
  const client = transaction ? (transaction as unknown as { connection?: { query(text: string, values?: unknown[]): Promise<{ rows: unknown[] }> } }).connection : undefined;
  const db = client ? { executeSql: (text: string, values?: unknown[]) => client.query(text, values) } : undefined;
  const data: FitJobData = { fitId };
  await boss.send(FIT_QUEUE, data as unknown as object, db ? ({ db } as PgBoss.SendOptions) : {});
}

const HEALTH_TIMEOUT_MS = 3000;

/**
 * For /api/health: null when no queue is configured; otherwise whether pg-boss answers
 * and how many fit turns wait or run.
 */
export async function queueHealth(): Promise<{ ok: boolean; detail: string } | null> {
  let mode: FitQueueMode;
  try {
    mode = fitQueueMode();
  } catch (e) {
    return { ok: false, detail: (e as Error).message };
  }
  if (mode !== 'pg-boss') return null;
  let timer: NodeJS.Timeout | undefined;
  try {
    const sizes = (async () => {
      const boss = await fitBoss();
      return [await boss.getQueueSize(FIT_QUEUE), await boss.getQueueSize(FIT_DEAD_QUEUE)] as const;
    })();
    // A server that does not answer at all must not hold the health check up.
    const late = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`no answer within ${HEALTH_TIMEOUT_MS} ms`)), HEALTH_TIMEOUT_MS);
    });
    const [waiting, dead] = await Promise.race([sizes, late]);
    return { ok: true, detail: `pg-boss: ${waiting} fit turn${waiting === 1 ? '' : 's'} waiting${dead ? `, ${dead} lost job${dead === 1 ? '' : 's'} not yet handled` : ''}` };
  } catch (e) {
    return { ok: false, detail: `pg-boss does not answer: ${(e as Error).message}` };
  } finally {
    clearTimeout(timer);
  }
}
