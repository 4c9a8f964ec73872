/**
 * Worker thread: waits on the control word, runs the same top-level pass functions as
 * the single-thread engine (lib/mixture/estep.ts) on its blocks of the shared rows.
 */
import { parentPort, receiveMessageOnPort, workerData, type MessagePort } from 'node:worker_threads';
import { runKernelBlocks, scratchLength } from '../mixture/estep';
import { CMD_CONFIG, CMD_EXIT, CMD_PASS, COMMAND, DONE, FAILED, SEQ, type WorkerConfig } from './protocol';

const { control, port } = workerData as { control: SharedArrayBuffer; port: MessagePort };
const ctrl = new Int32Array(control);

let cfg: WorkerConfig | null = null;
let x: Float64Array<ArrayBufferLike> = new Float64Array(0);
let means: Float64Array<ArrayBufferLike> = new Float64Array(0);
let factors: Float64Array<ArrayBufferLike> = new Float64Array(0);
let logConst: Float64Array<ArrayBufferLike> = new Float64Array(0);
let centre: Float64Array<ArrayBufferLike> = new Float64Array(0);
let prune: Float64Array<ArrayBufferLike> = new Float64Array(1);
let kernel: Float64Array<ArrayBufferLike> = new Float64Array(1);
let stats: Float64Array<ArrayBufferLike> = new Float64Array(0);
let scratch = new Float64Array(0);

function configure(): void {
  let msg = receiveMessageOnPort(port);
  for (let tries = 0; msg === undefined && tries < 1000; tries++) {
    Atomics.wait(ctrl, SEQ, -1, 1);
    msg = receiveMessageOnPort(port);
  }
  if (msg === undefined) throw new Error('configuration message did not arrive');
  const c = msg.message as WorkerConfig;
  cfg = c;
  x = new Float64Array(c.rows);
  const kd = c.k * c.d;
  means = new Float64Array(c.params, 0, kd);
  factors = new Float64Array(c.params, kd * 8, c.factorLength);
  logConst = new Float64Array(c.params, (kd + c.factorLength) * 8, c.k);
  centre = new Float64Array(c.params, (kd + c.factorLength + c.k) * 8, c.d);
  prune = new Float64Array(c.params, (kd + c.factorLength + c.k + c.d) * 8, 1);
  kernel = new Float64Array(c.params, (kd + c.factorLength + c.k + c.d + 1) * 8, 1);
  stats = new Float64Array(c.stats);
  scratch = new Float64Array(scratchLength(c.k, c.d));
}

function pass(): void {
  const c = cfg;
  if (c === null) throw new Error('pass before configuration');
  runKernelBlocks(kernel[0], x, c.firstBlock, c.endBlock, c.n, c.d, c.k, means, factors, logConst, centre, prune[0], scratch, stats, c.statsLength);
}

let seen = Atomics.load(ctrl, SEQ);
parentPort?.postMessage('ready');
for (;;) {
  Atomics.wait(ctrl, SEQ, seen);
  seen = Atomics.load(ctrl, SEQ);
  const cmd = Atomics.load(ctrl, COMMAND);
  if (cmd === CMD_EXIT) break;
  try {
    if (cmd === CMD_CONFIG) configure();
    else if (cmd === CMD_PASS) pass();
  } catch {
    Atomics.store(ctrl, FAILED, 1);
  }
  Atomics.add(ctrl, DONE, 1);
  Atomics.notify(ctrl, DONE);
}
port.close();
