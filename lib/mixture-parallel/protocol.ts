/** Shared between the main-thread engine and its workers. */
export const CMD_CONFIG = 1;
export const CMD_PASS = 2;
export const CMD_EXIT = 3;

/** Int32 control words in the control SharedArrayBuffer. */
export const SEQ = 0; // bumped by the main thread for every job
export const DONE = 1; // workers add 1 when their part of the job is finished
export const COMMAND = 2;
export const FAILED = 3; // a worker sets 1 when its job threw
export const CONTROL_WORDS = 4;

export interface WorkerConfig {
  rows: SharedArrayBuffer;
  params: SharedArrayBuffer; // means (K·d) | kernel factors | kernel constants (K) | centre (d) | prune (1) | kernel id (1)
  stats: SharedArrayBuffer; // one stats slot per block of PASS_BLOCK_ROWS rows
  n: number;
  d: number;
  k: number;
  diagonal: boolean;
  factorLength: number;
  statsLength: number;
  /** This worker's blocks of rows: [firstBlock, endBlock). */
  firstBlock: number;
  endBlock: number;
}
