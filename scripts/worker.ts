/**
 * `npm run worker`: a fit worker for a deployment on PostgreSQL with PARTWISE_FIT_QUEUE=pg-boss.
 * It needs only DATABASE_URL (the same PostgreSQL as the app instances, migrated by them)
 * and runs on any machine that reaches it; see lib/fitting/queue-worker.ts and the
 * README's "Running on more than one machine". SIGTERM or SIGINT: it takes no new fit,
 * hands its running fits back at their next candidate (or fails their jobs, so pg-boss
 * retries them, after PARTWISE_WORKER_GRACE_MS), and exits.
 */
import { FitQueueConfigError, fitQueueMode, stopFitBoss } from '@/lib/fitting/fit-queue';
import { startFitWorker } from '@/lib/fitting/queue-worker';
import { describeDatabase } from '@/models/db';
import { sequelize } from '@/models';

async function main() {
  let mode;
  try {
    mode = fitQueueMode();
  } catch (e) {
    if (e instanceof FitQueueConfigError) {
      console.error(`[partwise worker] ${e.message}`);
      process.exit(1);
    }
    throw e;
  }
  if (mode !== 'pg-boss') {
    console.error('[partwise worker] no fit queue is configured: set DATABASE_URL=postgres://… and PARTWISE_FIT_QUEUE=pg-boss (without a queue, each app server runs its own fits).');
    process.exit(1);
  }
  const worker = await startFitWorker();
  console.log(`[partwise worker] taking fits from pg-boss on ${describeDatabase()} (pid ${process.pid})`);
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[partwise worker] ${signal}: handing back ${worker.active().length} running fit(s), taking no new ones`);
    try {
      await worker.stop();
      await stopFitBoss();
      await sequelize.close();
    } finally {
      process.exit(0);
    }
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
}

main().catch((e) => {
  console.error(`[partwise worker] could not start: ${e instanceof Error ? e.message : String(e)}`);
  process.exit(1);
});
