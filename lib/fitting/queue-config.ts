/**
 * Which runner takes fits, read from the environment (no queue library loaded here, so the
 * start-up settings check can use it): see lib/fitting/fit-queue.ts.
 */
import { databaseDialect, databasePath } from '@/models/db';

export type FitQueueMode = 'in-process' | 'pg-boss';

export class FitQueueConfigError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'FitQueueConfigError';
  }
}

/**
 * Which runner takes fits. PARTWISE_FIT_QUEUE: unset, empty or `in-process` (the
 * default, also on PostgreSQL: one instance needs no worker process), or `pg-boss`
 * (needs a postgres:// DATABASE_URL). Anything else is refused with one clear line.
 */
export function fitQueueMode(env: Record<string, string | undefined> = process.env): FitQueueMode {
  const raw = (env.PARTWISE_FIT_QUEUE ?? '').trim().toLowerCase();
  if (raw === '' || raw === 'in-process') return 'in-process';
  if (raw !== 'pg-boss') throw new FitQueueConfigError(`PARTWISE_FIT_QUEUE is "${env.PARTWISE_FIT_QUEUE}", which Partwise does not know: leave it unset for the in-process runner, or set it to pg-boss (with a postgres:// DATABASE_URL).`);
  let dialect: string;
  try {
    dialect = databaseDialect(databasePath(env.DATABASE_URL));
  } catch {
    dialect = 'unsupported'; // the database check names the address's own problem
  }
  if (dialect !== 'postgres') {
    throw new FitQueueConfigError('PARTWISE_FIT_QUEUE=pg-boss needs DATABASE_URL to be a postgres:// address (the queue lives in the same PostgreSQL); on SQLite leave PARTWISE_FIT_QUEUE unset.');
  }
  return 'pg-boss';
}

