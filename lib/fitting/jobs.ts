/**
 * Fit jobs. A job is a Fit row; the runner claims queued rows in the fair order of
 * lib/fitting/schedule.ts, computes each in a worker thread (lib/fitting/worker.ts) so
 * no request waits on EM, writes progress to the row (throttled), passes cancellation
 * from the row's flag to the worker, and stores the ranked candidates. A fit that has
 * had its time slice while another workspace waits pauses between two candidates:
 * the candidates so far go to the row (checkpoint), the row is queued again, and a
 * later turn (in this or any process, after a restart too) carries on from there.
 * All coordination goes through the database, so a separate queue worker could run
 * the same loop on another machine; the in-process state below is only which jobs
 * this process is running (safe to lose).
 */
import { formatCount } from '@/lib/format';
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { nanoid } from 'nanoid';
import { Op } from 'sequelize';
import { upgradeFor, workspacePlan } from '@/lib/billing/limits';
import { AppError } from '@/lib/errors';
import { parseWith } from '@/lib/http/handler';
import { featureMatrix, findDataset } from '@/lib/datasets';
import { isMixtureError } from '@/lib/mixture';
import { fitQueueLimit, type Plan } from '@/lib/plans';
import { Dataset, Fit, sequelize } from '@/models';
import { lockWorkspace } from '@/models/db';
import { componentRange, fitParamsSchema, type FitParams } from './params';
import { rankOutcome, type ComputeInput, type StoredCandidate } from './compute';
import { CONTROL_WORDS, PAUSE, STOP, type WorkerMessage, type WorkerProgress, type WorkerStart } from './protocol';
import { loadQueueSnapshot } from './queue';
import { pickNextFit, shouldYield } from './schedule';
import { fitBoss, fitTurnMaxMs, publishFitTurn, queueConfigured } from './fit-queue';

/** How often a running job's progress is written and its cancel flag read. */
export function progressWriteMs(): number {
  const v = Number(process.env.PARTWISE_FIT_PROGRESS_MS ?? 400);
  return Number.isFinite(v) && v >= 10 ? v : 400;
}
export const RESTART_REASON = 'The server restarted while this fit was running; start it again.';

interface RunnerState {
  id: string;
  active: Map<number, Worker | null>;
  pumping: boolean;
  /** A pump was asked for while one was under way: look at the queue once more before stopping. */
  again: boolean;
  /** Set by a queue worker on SIGTERM: running fits pause at their next candidate and go back to the queue. */
  draining?: boolean;
}
const g = globalThis as unknown as { __partwiseFitRunner?: RunnerState };
function runner(): RunnerState {
  g.__partwiseFitRunner ??= { id: `${os.hostname()}:${process.pid}:${nanoid(6)}`, active: new Map(), pumping: false, again: false };
  return g.__partwiseFitRunner;
}
export const runnerId = () => runner().id;

/**
 * Fitting slots of this process: fits it computes at once, each on a thread of its
 * own. Default 2 (1 on a single core): one workspace's fit starts at once while
 * another's runs, and no more fitting threads than that compete with the request
 * thread for a small server's cores. 0 makes a web-only process that leaves jobs to
 * other runners. PARTWISE_FIT_CONCURRENCY is the older name of the same setting.
 */
export function fitSlots(): number {
  const raw = process.env.PARTWISE_FIT_SLOTS ?? process.env.PARTWISE_FIT_CONCURRENCY;
  if (raw !== undefined && raw.trim() !== '') {
    const v = Number(raw);
    if (Number.isInteger(v) && v >= 0) return v;
  }
  return Math.max(1, Math.min(2, os.availableParallelism()));
}

/** The turn a fit may hold a slot while another workspace waits, before it pauses at its next candidate. */
export function fitSliceMs(): number {
  const v = Number(process.env.PARTWISE_FIT_SLICE_MS ?? 5000);
  return Number.isFinite(v) && v >= 50 ? v : 5000;
}

export interface FitProgressView {
  phase: 'queued' | 'fitting' | 'storing';
  /** Set while queued again after a turn in a slot; `fitted` candidates are done and kept. */
  paused?: boolean;
  fitted?: number;
  candidate?: number; // 1-based
  candidates: number;
  components?: number;
  covariance?: string;
  restart?: number; // 1-based
  restarts: number;
  iteration?: number;
  maxIter: number;
  logLikelihood?: number;
  meanLogLikelihood?: number;
  /** 0..1, by candidates and restarts done. */
  fraction: number;
  rows: number;
  updatedAt: string;
}

export interface StoredFitParams extends FitParams {
  rows: number;
  dropped: number;
}

/** What a paused fit keeps in its row to resume: candidates fitted so far (grid order) and compute time spent. */
export interface FitCheckpoint {
  next: number;
  candidates: StoredCandidate[];
  elapsedMs: number;
}

const fmt = formatCount;

function queueCapError(plan: Plan, open: number, limit: number): AppError {
  const next = upgradeFor(plan, (p) => fitQueueLimit(p.id) > limit);
  return new AppError(
    'rate_limited',
    `This workspace already has ${fmt(open)} fit${open === 1 ? '' : 's'} waiting or running, the most the ${plan.name} plan allows at once (${fmt(limit)}). ` +
      `Wait for one to finish, or cancel one that is still waiting, then start this fit again.` +
      (next ? ` The ${next.name} plan allows ${fmt(fitQueueLimit(next.id))} at once.` : ''),
  );
}

/**
 * Validate, check the dataset can support the request, queue the job and start it if
 * a slot is free. The plan's cap on waiting and running fits is counted and the row
 * inserted in one IMMEDIATE transaction, so simultaneous requests cannot overshoot it.
 */
export async function startFit(workspaceId: number, userId: number | null, input: unknown): Promise<Fit> {
  const params = parseWith(fitParamsSchema, input, 'fit settings');
  const dataset = await findDataset(workspaceId, params.datasetId);
  const matrix = featureMatrix(dataset, params.features);
  const needed = Math.max(10, params.maxComponents * 2);
  if (matrix.n < needed) {
    throw new AppError('invalid_input', `Only ${matrix.n} rows have a number in every chosen feature (${matrix.dropped} dropped); fitting up to ${params.maxComponents} components needs at least ${needed}. Choose fewer components or features with fewer gaps.`, {
      issues: [{ field: 'maxComponents', message: `needs at least ${needed} complete rows` }],
    });
  }
  for (let k = 0; k < matrix.d; k++) {
    let lo = Infinity;
    let hi = -Infinity;
    for (let r = 0; r < matrix.n; r++) {
      const v = matrix.rows[r * matrix.d + k];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    if (lo === hi) {
      throw new AppError('invalid_input', `Feature "${params.features[k]}" has the same value (${lo}) in every row, so it cannot separate clusters; leave it out.`, { issues: [{ field: `features.${k}`, message: 'constant' }] });
    }
  }
  const candidates = componentRange(params).length * params.covariances.length;
  const stored: StoredFitParams = { ...params, rows: matrix.n, dropped: matrix.dropped };
  const progress: FitProgressView = { phase: 'queued', candidates, restarts: params.restarts, maxIter: params.maxIter, fraction: 0, rows: matrix.n, updatedAt: new Date().toISOString() };
  const plan = await workspacePlan(workspaceId);
  const limit = fitQueueLimit(plan.id);
  // On a queue, pg-boss is started before the transaction (its first start creates its schema), so the lock is held only for the inserts.
  const onQueue = queueConfigured();
  if (onQueue) await fitBoss();
  // Write transactions of one process already take turns (models/db.ts), so a burst of creations cannot starve the one holding the lock.
  const fit = await sequelize.transaction(async (transaction) => {
    await lockWorkspace(workspaceId, transaction);
    const open = await Fit.count({ where: { workspaceId, status: ['queued', 'running'] }, transaction });
    if (open >= limit) throw queueCapError(plan, open, limit);
    const row = await Fit.create({ workspaceId, datasetId: dataset.id, createdById: userId, status: 'queued', params: stored as unknown as Record<string, unknown>, progress: progress as unknown as Record<string, unknown> }, { transaction });
    // The job goes in with the row: both commit or neither does.
    if (onQueue) await publishFitTurn(row.id, transaction);
    return row;
  });
  pumpFits();
  return fit;
}

/** Start queued jobs, in the fair order, while this process has free slots. */
export function pumpFits(): void {
  // On a queue, workers (npm run worker) take fits; app instances only publish them.
  if (queueConfigured()) return;
  const state = runner();
  if (state.pumping) {
    state.again = true;
    return;
  }
  state.pumping = true;
  void (async () => {
    try {
      do {
        state.again = false;
        while (state.active.size < fitSlots()) {
          const next = pickNextFit(await loadQueueSnapshot());
          // A job of ours that just paused is queued a moment before its turn ends here; its end pumps again.
          if (!next || state.active.has(next.id)) break;
          const now = new Date();
          // Claim by compare-and-set so two processes never run the same job; a resumed job keeps its first start.
          const [claimed] = await Fit.update(
            { status: 'running', runnerId: state.id, lastTurnAt: now, startedAt: sequelize.fn('COALESCE', sequelize.col('started_at'), now) as unknown as Date },
            { where: { id: next.id, status: 'queued', cancelRequested: false } },
          );
          if (claimed !== 1) continue;
          state.active.set(next.id, null);
          void runTurn(next.id, now.getTime())
            .catch(async (e) => {
              // Never leave a claimed job running: an unexpected error fails it with a reason.
              console.error('[partwise] fit job', next.id, 'failed unexpectedly:', e);
              await finish(next.id, { status: 'failed', error: 'The fit stopped because of an error on our side; start it again.' }).catch(() => {});
            })
            .finally(() => {
              state.active.delete(next.id);
              pumpFits();
            });
        }
      } while (state.again);
    } catch (e) {
      console.error('[partwise] fit runner could not claim a job:', e);
    } finally {
      state.pumping = false;
    }
  })();
}

function workerFile(): string {
  return path.join(/*turbopackIgnore: true*/ process.cwd(), 'lib', 'fitting', 'worker.ts');
}

/** Mark this runner as stopping: its running fits pause at their next candidate (queue workers on SIGTERM). */
export function drainRunner(on = true): void {
  runner().draining = on;
}

/** A queue worker's turn is over: the slot is free for the yield rule's count. */
export function releaseSlot(id: number): void {
  runner().active.delete(id);
}

/** A running fit of this runner ends with this status (also used by the queue worker for its failures). */
export async function finishFit(id: number, values: Partial<Pick<Fit, 'status' | 'error' | 'result' | 'progress'>>): Promise<void> {
  return finish(id, values);
}

async function finish(id: number, values: Partial<Pick<Fit, 'status' | 'error' | 'result' | 'progress'>>) {
  const now = new Date();
  await Fit.update({ ...values, checkpoint: null, finishedAt: now, lastTurnAt: now }, { where: { id, runnerId: runner().id } });
}

/** Whether this running job should give its slot to another workspace's fit now (checked between progress writes). */
async function yieldWanted(fit: Fit, turnStartedAt: number): Promise<boolean> {
  const state = runner();
  const now = Date.now();
  if (state.draining) return true;
  // On a queue a turn is bounded, so its job stays well inside pg-boss's expiry.
  if (queueConfigured() && now - turnStartedAt >= fitTurnMaxMs()) return true;
  const sliceMs = fitSliceMs();
  if (now - turnStartedAt < sliceMs) return false;
  const job = { id: fit.id, workspaceId: fit.workspaceId, createdAt: fit.createdAt.getTime(), turnStartedAt };
  return shouldYield(job, await loadQueueSnapshot(), { now, sliceMs, freeSlot: state.active.size < fitSlots() });
}

/** One turn of a job in a slot: from its checkpoint (or the start) until it finishes, fails, is cancelled or pauses. */
export async function runTurn(id: number, turnStartedAt: number): Promise<void> {
  const fit = await Fit.findByPk(id);
  if (!fit) return;
  const params = fit.params as unknown as StoredFitParams;
  const dataset = await Dataset.findOne({ where: { id: fit.datasetId, workspaceId: fit.workspaceId } });
  if (!dataset) return finish(id, { status: 'failed', error: 'The dataset was deleted before the fit could start.' });
  let matrix;
  try {
    matrix = featureMatrix(dataset, params.features);
  } catch (e) {
    return finish(id, { status: 'failed', error: (e as Error).message });
  }
  const features = matrix.features.map((c) => ({ name: c.name, unit: c.unit || null }));
  const input: ComputeInput = {
    rows: matrix.rows,
    n: matrix.n,
    d: matrix.d,
    features,
    components: componentRange(params),
    covariances: params.covariances,
    restarts: params.restarts,
    seed: params.seed,
    standardize: params.standardize,
    maxIter: params.maxIter,
    tol: params.tol,
    regCovar: params.regCovar,
  };
  const candidates = input.components.length * input.covariances.length;
  const checkpoint: FitCheckpoint = (fit.checkpoint as unknown as FitCheckpoint | null) ?? { next: 0, candidates: [], elapsedMs: 0 };
  const control = new SharedArrayBuffer(CONTROL_WORDS * 4);
  const flags = new Int32Array(control);
  const started = Date.now();

  // Held in an object: the worker's callbacks update it, and TS would narrow a plain let to null.
  const track: { latest: WorkerProgress | null; written: WorkerProgress | null } = { latest: null, written: null };
  const view = (p: WorkerProgress): FitProgressView => ({
    phase: 'fitting',
    candidate: p.candidate + 1,
    candidates: p.candidates,
    components: p.components,
    covariance: p.covariance,
    restart: p.restart + 1,
    restarts: params.restarts,
    iteration: p.iteration,
    maxIter: params.maxIter,
    logLikelihood: p.logLikelihood,
    meanLogLikelihood: p.meanLogLikelihood,
    fraction: Math.min(0.999, (p.candidate + p.restart / params.restarts) / p.candidates),
    rows: matrix.n,
    updatedAt: new Date().toISOString(),
  });

  const file = workerFile();
  const boot = `require('tsx/cjs/api').register(); require(${JSON.stringify(file)});`;
  const worker = new Worker(boot, { eval: true, workerData: { input, control, from: checkpoint.next } satisfies WorkerStart });
  runner().active.set(id, worker);

  type Outcome =
    | { kind: 'done'; candidates: StoredCandidate[] }
    | { kind: 'paused'; candidates: StoredCandidate[]; next: number }
    | { kind: 'failed'; code: string | null; message: string };
  const outcome = await new Promise<Outcome>((resolve) => {
    let settled = false;
    const settle = (v: Outcome) => {
      if (settled) return;
      settled = true;
      clearInterval(timer);
      resolve(v);
    };
    let ticking = false;
    let lastYieldCheck = 0;
    const timer = setInterval(async () => {
      if (ticking) return;
      ticking = true;
      try {
        const row = await Fit.findByPk(id, { attributes: ['cancelRequested'] });
        if (!row || row.cancelRequested) Atomics.store(flags, STOP, 1);
        const latest = track.latest;
        if (latest && latest !== track.written) {
          track.written = latest;
          await Fit.update({ progress: view(latest) as unknown as Record<string, unknown> }, { where: { id, status: 'running' } });
        }
        // Re-decided each time, so a waiting fit that is cancelled or started elsewhere lets this one carry on.
        if (Date.now() - lastYieldCheck >= Math.max(250, progressWriteMs())) {
          lastYieldCheck = Date.now();
          Atomics.store(flags, PAUSE, (await yieldWanted(fit, turnStartedAt)) ? 1 : 0);
        }
      } catch (e) {
        console.error('[partwise] fit progress write failed:', e);
      } finally {
        ticking = false;
      }
    }, progressWriteMs());
    worker.on('message', (m: WorkerMessage) => {
      if (m.type === 'progress') track.latest = m;
      else if (m.type === 'done') settle({ kind: 'done', candidates: m.candidates });
      else if (m.type === 'paused') settle({ kind: 'paused', candidates: m.candidates, next: m.next });
      else settle({ kind: 'failed', code: m.code, message: m.message });
    });
    worker.on('error', (e) => settle({ kind: 'failed', code: null, message: `The fitting thread failed: ${e.message}` }));
    worker.on('exit', (code) => settle({ kind: 'failed', code: null, message: `The fitting thread stopped unexpectedly (exit code ${code}).` }));
  });
  void worker.terminate();

  const durationMs = checkpoint.elapsedMs + (Date.now() - started);
  const latest = track.latest;
  const lastProgress = latest ? (view(latest) as unknown as Record<string, unknown>) : fit.progress;
  const cancelled = () => `Cancelled after ${(durationMs / 1000).toFixed(1)} s${latest ? `, during candidate ${latest.candidate + 1} of ${latest.candidates}` : ''}.`;
  if (outcome.kind === 'paused') {
    const kept: FitCheckpoint = { next: outcome.next, candidates: [...checkpoint.candidates, ...outcome.candidates], elapsedMs: durationMs };
    const progress: FitProgressView = { ...(latest ? view(latest) : { candidates, restarts: params.restarts, maxIter: params.maxIter, rows: matrix.n, updatedAt: '' }), phase: 'queued', paused: true, fitted: outcome.next, fraction: outcome.next / candidates, updatedAt: new Date().toISOString() };
    // Back in the queue under its old createdAt, so it stays first in line within its workspace.
    const requeue = (transaction?: import('sequelize').Transaction) =>
      Fit.update(
        { status: 'queued', runnerId: null, lastTurnAt: new Date(), checkpoint: kept as unknown as Record<string, unknown>, progress: progress as unknown as Record<string, unknown> },
        { where: { id, runnerId: runner().id, status: 'running', cancelRequested: false }, transaction },
      );
    // On a queue, the next turn's job is sent with the row's return to 'queued'.
    const [queued] = queueConfigured()
      ? await sequelize.transaction(async (transaction) => {
          const r = await requeue(transaction);
          if (r[0] === 1) await publishFitTurn(id, transaction);
          return r;
        })
      : await requeue();
    // Not queued: cancelled in the meantime (or taken from this runner), so it ends as cancelled if still ours.
    if (queued !== 1) return finish(id, { status: 'cancelled', error: cancelled(), progress: lastProgress });
    return;
  }
  if (outcome.kind === 'done') {
    let ranked;
    try {
      ranked = rankOutcome(matrix.n, [...checkpoint.candidates, ...outcome.candidates]);
    } catch (e) {
      if (!isMixtureError(e)) throw e;
      return finish(id, { status: 'failed', error: e.message, progress: lastProgress });
    }
    const best = ranked.candidates.find((c) => c.rank === 1);
    await finish(id, {
      status: 'succeeded',
      error: null,
      result: { ...ranked, durationMs, features: matrix.features.map((c) => ({ name: c.name, displayName: c.displayName ?? c.name, unit: c.unit ?? '' })), dropped: matrix.dropped } as unknown as Record<string, unknown>,
      progress: { ...(latest ? view(latest) : {}), phase: 'storing', candidates, fraction: 1, rows: matrix.n, restarts: params.restarts, maxIter: params.maxIter, best: best ? { components: best.components, covariance: best.covariance } : null, durationMs, updatedAt: new Date().toISOString() },
    });
  } else if (outcome.code === 'CANCELLED') {
    await finish(id, { status: 'cancelled', error: cancelled(), progress: lastProgress });
  } else {
    await finish(id, { status: 'failed', error: outcome.message, progress: lastProgress });
  }
}

export async function findFit(workspaceId: number, id: number): Promise<Fit> {
  const fit = await Fit.findOne({ where: { id, workspaceId } });
  if (!fit) throw new AppError('not_found', 'No such fit in this workspace.');
  return fit;
}

/** Ask a job to stop: a queued (or paused) job is cancelled at once, a running one at its next iteration. */
export async function cancelFit(workspaceId: number, id: number): Promise<Fit> {
  const fit = await findFit(workspaceId, id);
  if (fit.status !== 'queued' && fit.status !== 'running') {
    throw new AppError('conflict', `This fit has already ${fit.status === 'succeeded' ? 'finished' : fit.status === 'cancelled' ? 'been cancelled' : 'failed'}; there is nothing to cancel.`);
  }
  // The flag first: from here no runner claims it, and a running one stops at its next iteration.
  await Fit.update({ cancelRequested: true }, { where: { id, status: ['queued', 'running'] } });
  // Queued now (also a running fit that paused meanwhile): no runner will take it, so it ends here.
  const row = (await Fit.findByPk(id))!;
  if (row.status === 'queued') {
    const kept = row.checkpoint as unknown as FitCheckpoint | null;
    const candidates = (row.progress as { candidates?: number } | null)?.candidates;
    const error = kept ? `Cancelled while paused, after ${kept.next} of ${candidates ?? 'its'} candidates.` : 'Cancelled before it started.';
    await Fit.update({ status: 'cancelled', error, checkpoint: null, finishedAt: new Date() }, { where: { id, status: 'queued' } });
  }
  return (await Fit.findByPk(id))!;
}

/**
 * On server start: a job marked running by another (dead) process can never finish,
 * so it fails with a reason the analyst can act on. Queued jobs are still good and
 * are picked up, paused ones from their checkpoint. Returns how many jobs were failed.
 */
export async function recoverInterruptedFits(): Promise<number> {
  // On a queue, running fits belong to workers, possibly alive on other machines: a dead worker's fit comes back through pg-boss's expiry (fit-queue.ts).
  const [failed] = queueConfigured() ? [0] : await Fit.update(
    { status: 'failed', error: RESTART_REASON, checkpoint: null, finishedAt: new Date() },
    { where: { status: 'running', [Op.or]: [{ runnerId: { [Op.ne]: runner().id } }, { runnerId: null }] } },
  );
  if (failed) console.warn(`[partwise] ${failed} fit job(s) were interrupted by a restart and marked failed.`);
  // A cancel that set its flag but not yet the status when the process stopped: no runner takes such a job.
  await Fit.update({ status: 'cancelled', error: 'Cancelled before it started.', checkpoint: null, finishedAt: new Date() }, { where: { status: 'queued', cancelRequested: true } });
  pumpFits();
  return failed;
}

/** Jobs this process is running right now (for tests and the health of the runner). */
export function activeFitIds(): number[] {
  return [...runner().active.keys()];
}
