/**
 * The fit worker of `npm run worker` (scripts/worker.ts): takes fit turns from the
 * pg-boss queue (lib/fitting/fit-queue.ts) and runs each with the same code as the
 * in-process runner (runTurn in lib/fitting/jobs.ts: a worker thread, progress written
 * to the fit row, the row's cancel flag polled, a paused fit re-queued with a new job).
 * It needs only DATABASE_URL (and PARTWISE_FIT_QUEUE=pg-boss), so it can run anywhere.
 *
 * Order and fairness: a job fetched from pg-boss is a free slot; which fit gets it is
 * decided by the fair rule of schedule.ts over the queue snapshot of every runner
 * (pickNextFit), as in the in-process runner. When the rule names another waiting fit,
 * the fetched job and that fit's waiting job swap the fit they carry (one transaction,
 * the waiting one locked), so each job still names the fit it runs and a retry takes
 * over the right one. A running fit gives its slot back (pauses, queued again with a
 * new job) once it has had its slice while another workspace's fit waits (shouldYield),
 * and in any case after PARTWISE_FIT_TURN_MS. The plan's waiting limits are checked
 * when the fit is created (startFit), as without a queue.
 *
 * Restart safety: a job still active after its expiry (its worker was killed) is
 * retried once by pg-boss; the worker that fetches the retry takes the fit over from
 * its last checkpoint. A retry that is lost too lands in the dead-letter queue, and the
 * fit fails with WORKER_LOST_REASON. On SIGTERM (stop()) the worker takes no new job;
 * its running fits pause at their next candidate and go back to the queue, and a fit
 * still running after the grace period fails its job, so pg-boss retries it at once.
 */
import type PgBoss from 'pg-boss';
import { QueryTypes } from 'sequelize';
import { Fit, sequelize } from '@/models';
import { loadQueueSnapshot } from './queue';
import { pickNextFit } from './schedule';
import { drainRunner, finishFit, fitSlots, releaseSlot, runTurn, runnerId } from './jobs';
import { FIT_DEAD_QUEUE, FIT_QUEUE, FIT_QUEUE_SCHEMA, WORKER_LOST_REASON, fitBoss, type FitJobData } from './fit-queue';

type FitJob = PgBoss.JobWithMetadata<FitJobData>;

export interface FitWorkerOptions {
  /** How long to wait between looks at an empty queue (default 500 ms, PARTWISE_WORKER_POLL_MS). */
  pollMs?: number;
  log?: (line: string) => void;
}

export interface FitWorkerHandle {
  /** Ids of the jobs this worker holds now. */
  active(): string[];
  /** Stop taking jobs, let running fits pause and hand back (or fail their job after graceMs), then resolve. */
  stop(graceMs?: number): Promise<void>;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * The fit a fresh job for `fitId` should run by the fair rule: that fit, or the one the rule
 * picks, whose waiting job then carries `fitId` instead (so every fit keeps exactly one job).
 */
export async function fairFitFor(jobId: string, fitId: number): Promise<number> {
  const pick = pickNextFit(await loadQueueSnapshot());
  if (!pick || pick.id === fitId) return fitId;
  return sequelize.transaction(async (transaction) => {
    const [other] = await sequelize.query<{ id: string }>(
      `SELECT id FROM ${FIT_QUEUE_SCHEMA}.job WHERE name = $1 AND state < 'active' AND (data->>'fitId')::int = $2 LIMIT 1 FOR UPDATE SKIP LOCKED`,
      { bind: [FIT_QUEUE, pick.id], type: QueryTypes.SELECT, transaction },
    );
    // Its job is being taken by another worker right now: run our own fit.
    if (!other) return fitId;
    const carry = (job: string, fit: number) =>
      sequelize.query(`UPDATE ${FIT_QUEUE_SCHEMA}.job SET data = jsonb_build_object('fitId', $1::int) WHERE name = $2 AND id = $3::uuid`, { bind: [fit, FIT_QUEUE, job], transaction });
    await carry(other.id, fitId);
    await carry(jobId, pick.id);
    return pick.id;
  });
}

/** What one fetched job does to its fit; returns how the turn was started and which fit (for logs and tests). */
export async function runFitJob(job: Pick<FitJob, 'id' | 'data' | 'retryCount'>): Promise<{ how: 'ran' | 'took-over' | 'skipped'; fitId: number }> {
  let id = Number(job.data?.fitId);
  if (!Number.isInteger(id)) return { how: 'skipped', fitId: id };
  // A first delivery goes to the fit the fair rule picks; a retry stays with the fit its lost worker had.
  if (job.retryCount === 0) id = await fairFitFor(job.id, id);
  const how = await runFit(id, job.retryCount);
  return { how, fitId: id };
}

async function runFit(id: number, retryCount: number): Promise<'ran' | 'took-over' | 'skipped'> {
  const row = await Fit.findByPk(id);
  if (!row) return 'skipped';
  const now = new Date();
  let how: 'ran' | 'took-over';
  if (row.status === 'queued') {
    if (row.cancelRequested) {
      await Fit.update({ status: 'cancelled', error: 'Cancelled before it started.', checkpoint: null, finishedAt: now }, { where: { id, status: 'queued' } });
      return 'skipped';
    }
    const [claimed] = await Fit.update({ status: 'running', runnerId: runnerId(), lastTurnAt: now, startedAt: row.startedAt ?? now }, { where: { id, status: 'queued', cancelRequested: false } });
    if (claimed !== 1) return 'skipped';
    how = 'ran';
  } else if (row.status === 'running' && retryCount > 0 && row.runnerId !== runnerId()) {
    // A retried job: the worker that had it is gone (or so slow that its job expired). Take the fit over,
    // so that worker's late writes (guarded by its runner id) can no longer land.
    const [taken] = await Fit.update({ runnerId: runnerId(), lastTurnAt: now }, { where: { id, status: 'running', runnerId: row.runnerId } });
    if (taken !== 1) return 'skipped';
    how = 'took-over';
  } else {
    return 'skipped';
  }
  try {
    await runTurn(id, now.getTime());
  } catch (e) {
    console.error('[partwise] fit job', id, 'failed unexpectedly:', e);
    await finishFit(id, { status: 'failed', error: 'The fit stopped because of an error on our side; start it again.' }).catch(() => {});
  }
  return how;
}

/** A job whose retry was lost too: its fit, if still running, fails with a reason instead of staying 'running'. */
export async function failLostFit(data: FitJobData): Promise<boolean> {
  const id = Number(data?.fitId);
  if (!Number.isInteger(id)) return false;
  const [failed] = await Fit.update({ status: 'failed', error: WORKER_LOST_REASON, runnerId: null, checkpoint: null, finishedAt: new Date() }, { where: { id, status: 'running' } });
  return failed === 1;
}

/** Start the worker loop in this process. */
export async function startFitWorker(opts: FitWorkerOptions = {}): Promise<FitWorkerHandle> {
  const boss = await fitBoss({ supervise: true });
  const slots = Math.max(1, fitSlots()); // PARTWISE_FIT_SLOTS, as for the in-process runner
  const pollMs = opts.pollMs ?? (Number(process.env.PARTWISE_WORKER_POLL_MS) > 0 ? Number(process.env.PARTWISE_WORKER_POLL_MS) : 500);
  const log = opts.log ?? ((line: string) => console.log(`[partwise worker] ${line}`));
  const running = new Map<string, { job: FitJob; done: Promise<void>; handedBack: boolean }>();
  let stopping = false;
  // The loop's wait between looks at the queue; stop() ends it at once instead of a poll later.
  let wake = () => {};
  const idle = (ms: number) => new Promise<void>((resolve) => {
    const timer = setTimeout(resolve, ms);
    wake = () => {
      clearTimeout(timer);
      resolve();
    };
  });
  drainRunner(false);

  const loop = (async () => {
    while (!stopping) {
      let busy = false;
      try {
        const lost = await boss.fetch<FitJobData>(FIT_DEAD_QUEUE, { batchSize: 10 });
        for (const job of lost) {
          if (await failLostFit(job.data)) log(`fit ${job.data.fitId} failed: its worker was lost twice`);
          await boss.complete(FIT_DEAD_QUEUE, job.id);
        }
        if (running.size < slots) {
          const [job] = await boss.fetch<FitJobData>(FIT_QUEUE, { batchSize: 1, includeMetadata: true });
          if (job) {
            busy = true;
            // Keyed by job: the fit it runs is known once the fair rule has chosen.
            const key = job.id;
            const entry = { job, done: Promise.resolve(), handedBack: false };
            running.set(key, entry);
            entry.done = (async () => {
              let fitId = Number(job.data?.fitId);
              try {
                const turn = await runFitJob(job);
                fitId = turn.fitId;
                if (turn.how !== 'skipped') log(`fit ${fitId}: turn ${turn.how === 'took-over' ? 'taken over after a lost worker' : 'run'}`);
                if (!entry.handedBack) await boss.complete(FIT_QUEUE, job.id);
              } catch (e) {
                console.error('[partwise worker] fit', fitId, 'job error:', (e as Error).message);
              } finally {
                releaseSlot(fitId);
                running.delete(key);
              }
            })();
          }
        }
      } catch (e) {
        console.error('[partwise worker] queue error:', (e as Error).message);
      }
      // Every slot taken: look again as soon as one frees (not a whole poll later); queue empty: poll.
      if (!busy) await (running.size >= slots ? Promise.race([idle(pollMs), ...[...running.values()].map((r) => r.done)]) : idle(pollMs));
    }
  })();

  return {
    active: () => [...running.keys()],
    async stop(graceMs = Number(process.env.PARTWISE_WORKER_GRACE_MS ?? 30_000)) {
      stopping = true;
      wake();
      drainRunner();
      await loop;
      const all = Promise.all([...running.values()].map((r) => r.done));
      const timedOut = await Promise.race([all.then(() => false), sleep(graceMs).then(() => true)]);
      if (timedOut) {
        // Still in the middle of a candidate: hand the jobs back; pg-boss retries them and another worker takes the fits over.
        for (const entry of running.values()) {
          entry.handedBack = true;
          await boss.fail(FIT_QUEUE, entry.job.id, { message: 'worker stopped' }).catch(() => {});
        }
        log(`handed back ${running.size} fit(s) still running after ${graceMs} ms`);
      }
    },
  };
}
