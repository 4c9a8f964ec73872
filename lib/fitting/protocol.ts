/** Messages between the fit job runner and its worker thread. */
import type { ComputeInput, StoredCandidate } from './compute';

/** Words of the worker's control flags (an Int32Array on a SharedArrayBuffer). */
export const STOP = 0; // the runner stores 1 to cancel: the engine stops at its next iteration
export const PAUSE = 1; // the runner stores 1 to yield the slot: the worker stops before its next candidate
export const CONTROL_WORDS = 2;

export interface WorkerStart {
  input: ComputeInput;
  /** CONTROL_WORDS Int32 words, see STOP and PAUSE. */
  control: SharedArrayBuffer;
  /** Grid position of the first candidate to fit (earlier ones were stored by an earlier turn). */
  from: number;
}

export interface WorkerProgress {
  type: 'progress';
  candidate: number; // 0-based
  candidates: number;
  components: number;
  covariance: string;
  restart: number;
  iteration: number;
  logLikelihood: number;
  meanLogLikelihood: number;
}

export type WorkerMessage =
  | WorkerProgress
  /** Every candidate from `from` on is fitted. */
  | { type: 'done'; candidates: StoredCandidate[] }
  /** Paused as asked: candidates from `from` up to `next` are fitted. */
  | { type: 'paused'; candidates: StoredCandidate[]; next: number }
  | { type: 'failed'; code: string | null; message: string };
