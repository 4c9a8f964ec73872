/** Messages between the fit job runner and its worker thread. */
import type { ComputeInput, FitOutcome } from './compute';

export interface WorkerStart {
  input: ComputeInput;
  /** Int32Array[1] on a SharedArrayBuffer: the runner stores 1 to ask the fit to stop. */
  stop: SharedArrayBuffer;
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
  | { type: 'done'; outcome: FitOutcome }
  | { type: 'failed'; code: string | null; message: string };
