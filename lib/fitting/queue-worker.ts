/**
 * The fit worker of `npm run worker` (scripts/worker.ts): takes fit turns from the
 * pg-boss queue (lib/fitting/fit-queue.ts) and runs each with the same code as the
 * in-process runner (runTurn in lib/fitting/jobs.ts: a worker thread, progress written
 * to the fit row, the row's cancel flag polled, a paused fit re-queued with a new job).
 * It needs only DATABASE_URL (and PARTWISE_FIT_QUEUE=pg-boss), so it can run anywhere.
 *
 * Order and fairness: pg-boss hands out jobs oldest first, and the fair rule of
 * schedule.ts is kept by the turns: a running fit gives its slot back (pauses and goes
 * to the back of the queue with a new job) once it has had its slice while another
 * workspace's fit waits (shouldYield over the queue snapshot of every runner), and in
 * any case after PARTWISE_FIT_TURN_MS. The plan's waiting limits are checked when the
 * fit is created (startFit), as without a queue.
 *
 * Restart safety: a job still active after its expiry (its worker was killed) is
 * retried once by pg-boss; the worker that fetches the retry takes the fit over from
 * its last checkpoint. A retry that is lost too lands in the dead-letter queue, and the
 * fit fails with WORKER_LOST_REASON. On SIGTERM (stop()) the worker takes no new job;
 * its running fits pause at their next candidate and go back to the queue, and a fit
 * still running after the grace period fails its job, so pg-boss retries it at once.
 */
import type PgBoss from 'pg-boss';
import { Fit } from '@/models';
import { drainRunner, finishFit, fitSlots, releaseSlot, runTurn, runnerId } from './jobs';
import { FIT_DEAD_QUEUE, FIT_QUEUE, WORKER_LOST_REASON, fitBoss, type FitJobData } from './fit-queue';

type FitJob = PgBoss.JobWithMetadata<FitJobData>;

export interface FitWorkerOptions {
  /** How long to wait between looks at an empty queue (default 500 ms, PARTWISE_WORKER_POLL_MS). */
  pollMs?: number;
  log?: (line: string) => void;
}

export interface FitWorkerHandle {
  /** Fit ids running now. */
  active(): number[];
  /** Stop taking jobs, let running fits pause and hand back (or fail their job after graceMs), then resolve. */
  stop(graceMs?: number): Promise<void>;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** What one fetched job does to its fit; returns how the turn was started (for logs and tests). */
export async function runFitJob(job: Pick<FitJob, 'id' | 'data' | 'retryCount'>): Promise<'ran' | 'took-over' | 'skipped'> {
  const id = Number(job.data?.fitId);
  const row = Number.isInteger(id) ? await Fit.findByPk(id) : null;
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
  } else if (row.status === 'running' && job.retryCount > 0 && row.runnerId !== runnerId()) {
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
  const running = new Map<number, { job: FitJob; done: Promise<void>; handedBack: boolean }>();
  let stopping = false;
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
            const fitId = Number(job.data?.fitId);
            const entry = { job, done: Promise.resolve(), handedBack: false };
            running.set(fitId, entry);
            entry.done = (async () => {
              try {
                const how = await runFitJob(job);
                if (how !== 'skipped') log(`fit ${fitId}: turn ${how === 'took-over' ? 'taken over after a lost worker' : 'run'}`);
                if (!entry.handedBack) await boss.complete(FIT_QUEUE, job.id);
              } catch (e) {
                console.error('[partwise worker] fit', fitId, 'job error:', (e as Error).message);
              } finally {
                releaseSlot(fitId);
                running.delete(fitId);
              }
            })();
          }
        }
      } catch (e) {
        console.error('[partwise worker] queue error:', (e as Error).message);
      }
      if (!busy) await sleep(pollMs);
    }
  })();

  return {
    active: () => [...running.keys()],
    async stop(graceMs = Number(process.env.PARTWISE_WORKER_GRACE_MS ?? 30_000)) {
      stopping = true;
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
