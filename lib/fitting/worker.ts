/**
 * Worker-thread entry of a fit job (loaded through tsx by lib/fitting/jobs.ts). It does
 * the numbers only: progress goes back as messages (at most every 100 ms per candidate,
 * plus each candidate's first and last iteration); cancellation arrives through a
 * shared flag that the engine polls once per iteration, and a request to give the slot
 * to another workspace through a second flag read between candidates.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { isMixtureError } from '../mixture/errors';
import { computeCandidates } from './compute';
import { PAUSE, STOP, type WorkerMessage, type WorkerStart } from './protocol';

const { input, control, from } = workerData as WorkerStart;
const flags = new Int32Array(control);
const post = (m: WorkerMessage) => parentPort!.postMessage(m);

let lastPost = 0;
let lastCandidate = -1;
try {
  const batch = computeCandidates(input, from, {
    shouldStop: () => Atomics.load(flags, STOP) === 1,
    shouldPause: () => Atomics.load(flags, PAUSE) === 1,
    onProgress: (p) => {
      const now = Date.now();
      if (p.candidate === lastCandidate && now - lastPost < 100) return;
      lastCandidate = p.candidate;
      lastPost = now;
      post({ type: 'progress', candidate: p.candidate, candidates: p.candidates, components: p.components, covariance: p.covariance, restart: p.restart, iteration: p.iteration, logLikelihood: p.logLikelihood, meanLogLikelihood: p.meanLogLikelihood });
    },
  });
  post(batch.next === null ? { type: 'done', candidates: batch.candidates } : { type: 'paused', candidates: batch.candidates, next: batch.next });
} catch (e) {
  post({ type: 'failed', code: isMixtureError(e) ? e.code : null, message: isMixtureError(e) ? e.message : String((e as Error)?.message ?? e) });
}
