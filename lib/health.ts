import type { Sequelize } from 'sequelize';
import { migrationState } from '@/lib/db/migrator';
import { getSequelize } from '@/models/db';

export interface HealthReport {
  ok: boolean;
  database: { reachable: boolean; error?: string };
  migrations: { upToDate: boolean; applied: number; pending: string[] } | null;
}

/** Reachable database and no pending migration: the two things start-up also insists on. */
export async function checkHealth(sequelize: Sequelize = getSequelize()): Promise<HealthReport> {
  try {
    await sequelize.query('SELECT 1');
  } catch (e) {
    return { ok: false, database: { reachable: false, error: describe(e) }, migrations: null };
  }
  try {
    const state = await migrationState(sequelize);
    return {
      ok: state.upToDate,
      database: { reachable: true },
      migrations: { upToDate: state.upToDate, applied: state.applied.length, pending: state.pending },
    };
  } catch (e) {
    return { ok: false, database: { reachable: true, error: describe(e) }, migrations: null };
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
