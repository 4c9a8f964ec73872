/**
 * Fit jobs. A job is a Fit row; the runner claims queued rows, computes each in a
 * worker thread (lib/fitting/worker.ts) so no request waits on EM, writes progress to
 * the row (throttled), passes cancellation from the row's flag to the worker, and
 * stores the ranked candidates. All coordination goes through the database, so a
 * separate queue worker could run the same loop on another machine; the in-process
 * state below is only which jobs this process is running (safe to lose).
 */
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { nanoid } from 'nanoid';
import { Op } from 'sequelize';
import { AppError } from '@/lib/errors';
import { parseWith } from '@/lib/http/handler';
import { featureMatrix, findDataset } from '@/lib/datasets';
import { Dataset, Fit } from '@/models';
import { componentRange, fitParamsSchema, type FitParams } from './params';
import type { ComputeInput, FitOutcome } from './compute';
import type { WorkerMessage, WorkerProgress } from './protocol';

/** How often a running job's progress is written and its cancel flag read. */
export function progressWriteMs(): number {
  const v = Number(process.env.PARTWISE_FIT_PROGRESS_MS ?? 400);
  return Number.isFinite(v) && v >= 10 ? v : 400;
}
export const RESTART_REASON = 'The server restarted while this fit was running; start it again.';

interface RunnerState {
  id: string;
  active: Map<number, Worker>;
  pumping: boolean;
}
const g = globalThis as unknown as { __partwiseFitRunner?: RunnerState };
function runner(): RunnerState {
  g.__partwiseFitRunner ??= { id: `${os.hostname()}:${process.pid}:${nanoid(6)}`, active: new Map(), pumping: false };
  return g.__partwiseFitRunner;
}
export const runnerId = () => runner().id;

/** Jobs one process runs at once; 0 makes a web-only process that leaves jobs to other runners. */
function concurrency(): number {
  const v = Number(process.env.PARTWISE_FIT_CONCURRENCY ?? 1);
  return Number.isInteger(v) && v >= 0 ? v : 1;
}

export interface FitProgressView {
  phase: 'queued' | 'fitting' | 'storing';
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

/** Validate, check the dataset can support the request, queue the job and start it if a slot is free. */
export async function startFit(workspaceId: number, userId: number, input: unknown): Promise<Fit> {
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
  const fit = await Fit.create({ workspaceId, datasetId: dataset.id, createdById: userId, status: 'queued', params: stored as unknown as Record<string, unknown>, progress: progress as unknown as Record<string, unknown> });
  pumpFits();
  return fit;
}

/** Start queued jobs while this process has free slots. */
export function pumpFits(): void {
  const state = runner();
  if (state.pumping) return;
  state.pumping = true;
  void (async () => {
    try {
      while (state.active.size < concurrency()) {
        const next = await Fit.findOne({ where: { status: 'queued', cancelRequested: false }, order: [['id', 'ASC']], attributes: ['id'] });
        if (!next) break;
        // Claim by compare-and-set so two processes never run the same job.
        const [claimed] = await Fit.update({ status: 'running', runnerId: state.id, startedAt: new Date() }, { where: { id: next.id, status: 'queued' } });
        if (claimed !== 1) continue;
        state.active.set(next.id, null as unknown as Worker);
        void runJob(next.id)
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

async function finish(id: number, values: Partial<Pick<Fit, 'status' | 'error' | 'result' | 'progress'>>) {
  await Fit.update({ ...values, finishedAt: new Date() }, { where: { id, runnerId: runner().id } });
}

async function runJob(id: number): Promise<void> {
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
  const stop = new SharedArrayBuffer(4);
  const stopFlag = new Int32Array(stop);
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
  const worker = new Worker(boot, { eval: true, workerData: { input, stop } });
  runner().active.set(id, worker);

  const outcome = await new Promise<{ kind: 'done'; outcome: FitOutcome } | { kind: 'failed'; code: string | null; message: string }>((resolve) => {
    let settled = false;
    const settle = (v: Parameters<typeof resolve>[0]) => {
      if (settled) return;
      settled = true;
      clearInterval(timer);
      resolve(v);
    };
    let ticking = false;
    const timer = setInterval(async () => {
      if (ticking) return;
      ticking = true;
      try {
        const row = await Fit.findByPk(id, { attributes: ['cancelRequested'] });
        if (!row || row.cancelRequested) Atomics.store(stopFlag, 0, 1);
        const latest = track.latest;
        if (latest && latest !== track.written) {
          track.written = latest;
          await Fit.update({ progress: view(latest) as unknown as Record<string, unknown> }, { where: { id, status: 'running' } });
        }
      } catch (e) {
        console.error('[partwise] fit progress write failed:', e);
      } finally {
        ticking = false;
      }
    }, progressWriteMs());
    worker.on('message', (m: WorkerMessage) => {
      if (m.type === 'progress') track.latest = m;
      else if (m.type === 'done') settle({ kind: 'done', outcome: m.outcome });
      else settle({ kind: 'failed', code: m.code, message: m.message });
    });
    worker.on('error', (e) => settle({ kind: 'failed', code: null, message: `The fitting thread failed: ${e.message}` }));
    worker.on('exit', (code) => settle({ kind: 'failed', code: null, message: `The fitting thread stopped unexpectedly (exit code ${code}).` }));
  });
  void worker.terminate();

  const durationMs = Date.now() - started;
  const latest = track.latest;
  if (outcome.kind === 'done') {
    const best = outcome.outcome.candidates.find((c) => c.rank === 1);
    await finish(id, {
      status: 'succeeded',
      error: null,
      result: { ...outcome.outcome, durationMs, features: matrix.features.map((c) => ({ name: c.name, displayName: c.displayName ?? c.name, unit: c.unit ?? '' })), dropped: matrix.dropped } as unknown as Record<string, unknown>,
      progress: { ...(latest ? view(latest) : {}), phase: 'storing', candidates, fraction: 1, rows: matrix.n, restarts: params.restarts, maxIter: params.maxIter, best: best ? { components: best.components, covariance: best.covariance } : null, durationMs, updatedAt: new Date().toISOString() },
    });
  } else if (outcome.code === 'CANCELLED') {
    await finish(id, { status: 'cancelled', error: `Cancelled after ${(durationMs / 1000).toFixed(1)} s${latest ? `, during candidate ${latest.candidate + 1} of ${latest.candidates}` : ''}.`, progress: latest ? (view(latest) as unknown as Record<string, unknown>) : fit.progress });
  } else {
    await finish(id, { status: 'failed', error: outcome.message, progress: latest ? (view(latest) as unknown as Record<string, unknown>) : fit.progress });
  }
}

export async function findFit(workspaceId: number, id: number): Promise<Fit> {
  const fit = await Fit.findOne({ where: { id, workspaceId } });
  if (!fit) throw new AppError('not_found', 'No such fit in this workspace.');
  return fit;
}

/** Ask a job to stop: a queued job is cancelled at once, a running one at its next iteration. */
export async function cancelFit(workspaceId: number, id: number): Promise<Fit> {
  const fit = await findFit(workspaceId, id);
  if (fit.status === 'queued') {
    const [n] = await Fit.update({ status: 'cancelled', cancelRequested: true, error: 'Cancelled before it started.', finishedAt: new Date() }, { where: { id, status: 'queued' } });
    if (n === 1) return (await Fit.findByPk(id))!;
  }
  if (fit.status === 'running' || fit.status === 'queued') {
    await Fit.update({ cancelRequested: true }, { where: { id } });
    return (await Fit.findByPk(id))!;
  }
  throw new AppError('conflict', `This fit has already ${fit.status === 'succeeded' ? 'finished' : fit.status === 'cancelled' ? 'been cancelled' : 'failed'}; there is nothing to cancel.`);
}

/**
 * On server start: a job marked running by another (dead) process can never finish,
 * so it fails with a reason the analyst can act on. Queued jobs are still good and
 * are picked up. Returns how many jobs were failed.
 */
export async function recoverInterruptedFits(): Promise<number> {
  const [failed] = await Fit.update(
    { status: 'failed', error: RESTART_REASON, finishedAt: new Date() },
    { where: { status: 'running', [Op.or]: [{ runnerId: { [Op.ne]: runner().id } }, { runnerId: null }] } },
  );
  if (failed) console.warn(`[partwise] ${failed} fit job(s) were interrupted by a restart and marked failed.`);
  pumpFits();
  return failed;
}

/** Jobs this process is running right now (for tests and the health of the runner). */
export function activeFitIds(): number[] {
  return [...runner().active.keys()];
}
