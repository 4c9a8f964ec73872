/**
 * Worker-thread entry of a fit job (loaded through tsx by lib/fitting/jobs.ts). It does
 * the numbers only: progress goes back as messages (at most every 100 ms per candidate,
 * plus each candidate's first and last iteration), cancellation arrives through a
 * shared flag that the engine polls once per iteration.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { isMixtureError } from '../mixture/errors';
import { computeFit } from './compute';
import type { WorkerMessage, WorkerStart } from './protocol';

const { input, stop } = workerData as WorkerStart;
const stopFlag = new Int32Array(stop);
const post = (m: WorkerMessage) => parentPort!.postMessage(m);

let lastPost = 0;
let lastCandidate = -1;
try {
  const outcome = computeFit(input, {
    shouldStop: () => Atomics.load(stopFlag, 0) === 1,
    onProgress: (p) => {
      const now = Date.now();
      if (p.candidate === lastCandidate && now - lastPost < 100) return;
      lastCandidate = p.candidate;
      lastPost = now;
      post({ type: 'progress', candidate: p.candidate, candidates: p.candidates, components: p.components, covariance: p.covariance, restart: p.restart, iteration: p.iteration, logLikelihood: p.logLikelihood, meanLogLikelihood: p.meanLogLikelihood });
    },
  });
  post({ type: 'done', outcome });
} catch (e) {
  post({ type: 'failed', code: isMixtureError(e) ? e.code : null, message: isMixtureError(e) ? e.message : String((e as Error)?.message ?? e) });
}
