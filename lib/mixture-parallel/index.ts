/**
 * A PassEngine that splits each EM pass across worker threads over SharedArrayBuffer
 * (Node only). The main thread takes the first share itself, so `workers = 1` uses two
 * cores. Work is shared out in the blocks of PASS_BLOCK_ROWS rows that the single-thread
 * engine sums too: each block's statistics land in the block's own slot and are added in
 * row order, so a fit is the same to the last bit whatever the thread count.
 *
 *   const engine = await createWorkerEngine(1);
 *   try { fitMixtureWith(rows, n, d, opts, engine) } finally { await engine.close() }
 *
 * The worker file is TypeScript (worker.ts); the thread registers tsx's CommonJS hook
 * before loading it (tsx is a dependency). A bundled build would need a compiled worker.
 */
import path from 'node:path';
import { MessageChannel, type MessagePort, Worker } from 'node:worker_threads';
import { passBlocks, runKernelBlocks, scratchLength, statsLength, sumBlocks } from '../mixture/estep';
import type { PassEngine } from '../mixture/em';
import { packedSize } from '../mixture/linalg';
import { type Factors, kernelArrays } from '../mixture/mstep';
import type { Gaussians } from '../mixture/types';
import { CMD_CONFIG, CMD_EXIT, CMD_PASS, COMMAND, CONTROL_WORDS, DONE, FAILED, SEQ, type WorkerConfig } from './protocol';

export interface WorkerEngine extends PassEngine {
  readonly threads: number;
  close(): Promise<void>;
}

interface Layout {
  x: Float64Array;
  n: number;
  d: number;
  k: number;
  diagonal: boolean;
  params: Float64Array;
  means: Float64Array;
  factors: Float64Array;
  logConst: Float64Array;
  centre: Float64Array;
  prune: Float64Array; // one value
  kernel: Float64Array; // one value
  stats: Float64Array; // one slot per block of rows
  statsLength: number;
  scratch: Float64Array;
  blocks: number;
  mainEndBlock: number;
}

export async function createWorkerEngine(workers = 1): Promise<WorkerEngine> {
  if (!Number.isInteger(workers) || workers < 1) throw new Error('workers must be a positive integer');
  const control = new SharedArrayBuffer(CONTROL_WORDS * 4);
  const ctrl = new Int32Array(control);
  const ports: MessagePort[] = [];
  const threads: Worker[] = [];
  const ready: Promise<void>[] = [];
  const file = path.join(__dirname, 'worker.ts');
  for (let w = 0; w < workers; w++) {
    const { port1, port2 } = new MessageChannel();
    // TypeScript worker: register tsx's CommonJS hook inside the thread, then load it
    const boot = file.endsWith('.ts')
      ? `require('tsx/cjs/api').register(); require(${JSON.stringify(file)});`
      : `require(${JSON.stringify(file)});`;
    const worker = new Worker(boot, { eval: true, workerData: { control, port: port2 }, transferList: [port2] });
    ready.push(
      new Promise((resolve, reject) => {
        worker.once('message', () => resolve());
        worker.once('error', reject);
      }),
    );
    threads.push(worker);
    ports.push(port1);
  }
  await Promise.all(ready);
  let layout: Layout | null = null;

  function dispatch(cmd: number): void {
    Atomics.store(ctrl, DONE, 0);
    Atomics.store(ctrl, FAILED, 0);
    Atomics.store(ctrl, COMMAND, cmd);
    Atomics.add(ctrl, SEQ, 1);
    Atomics.notify(ctrl, SEQ);
  }
  function join(): void {
    for (;;) {
      const done = Atomics.load(ctrl, DONE);
      if (done >= workers) break;
      Atomics.wait(ctrl, DONE, done, 10000);
    }
    if (Atomics.load(ctrl, FAILED) !== 0) throw new Error('a mixture worker thread failed');
  }

  function configure(x: Float64Array, n: number, d: number, k: number, diagonal: boolean): Layout {
    let rows = x;
    if (!(x.buffer instanceof SharedArrayBuffer)) {
      rows = new Float64Array(new SharedArrayBuffer(n * d * 8));
      rows.set(x.subarray(0, n * d));
    }
    const factorLength = k * (diagonal ? 2 * d : d + packedSize(d)); // room for the quadratic form
    const kd = k * d;
    const paramsBuf = new SharedArrayBuffer((kd + factorLength + k + d + 2) * 8);
    const sl = statsLength(k, d, diagonal);
    const blocks = passBlocks(n);
    const statsBuf = new SharedArrayBuffer(blocks * sl * 8);
    const bounds = Array.from({ length: workers + 2 }, (_, i) => Math.round((i * blocks) / (workers + 1)));
    ports.forEach((p, w) => {
      const msg: WorkerConfig = {
        rows: rows.buffer as SharedArrayBuffer,
        params: paramsBuf,
        stats: statsBuf,
        n,
        d,
        k,
        diagonal,
        factorLength,
        statsLength: sl,
        firstBlock: bounds[w + 1],
        endBlock: bounds[w + 2],
      };
      p.postMessage(msg);
    });
    dispatch(CMD_CONFIG);
    join();
    return {
      x,
      n,
      d,
      k,
      diagonal,
      params: new Float64Array(paramsBuf),
      means: new Float64Array(paramsBuf, 0, kd),
      factors: new Float64Array(paramsBuf, kd * 8, factorLength),
      logConst: new Float64Array(paramsBuf, (kd + factorLength) * 8, k),
      centre: new Float64Array(paramsBuf, (kd + factorLength + k) * 8, d),
      prune: new Float64Array(paramsBuf, (kd + factorLength + k + d) * 8, 1),
      kernel: new Float64Array(paramsBuf, (kd + factorLength + k + d + 1) * 8, 1),
      stats: new Float64Array(statsBuf),
      statsLength: sl,
      scratch: new Float64Array(scratchLength(k, d)),
      blocks,
      mainEndBlock: bounds[1],
    };
  }

  return {
    threads: workers + 1,
    allocRows(length: number) {
      return new Float64Array(new SharedArrayBuffer(length * 8));
    },
    run(x: Float64Array, n: number, d: number, g: Gaussians, f: Factors, out: Float64Array) {
      const k = g.k;
      if (layout === null || layout.x !== x || layout.n !== n || layout.d !== d || layout.k !== k || layout.diagonal !== f.diagonal) {
        layout = configure(x, n, d, k, f.diagonal);
      }
      const L = layout;
      const rows = x.buffer instanceof SharedArrayBuffer ? x : L.x;
      L.means.set(g.means);
      const a = kernelArrays(f);
      L.factors.set(a.factors);
      L.logConst.set(a.consts);
      L.centre.set(f.centre);
      L.prune[0] = f.prune;
      L.kernel[0] = f.kernel;
      dispatch(CMD_PASS);
      runKernelBlocks(f.kernel, rows, 0, L.mainEndBlock, n, d, k, L.means, L.factors, L.logConst, L.centre, f.prune, L.scratch, L.stats, L.statsLength);
      join();
      sumBlocks(L.stats, L.blocks, L.statsLength, out);
    },
    async close() {
      dispatch(CMD_EXIT);
      await Promise.all(threads.map((t) => new Promise<void>((resolve) => (t.threadId < 0 ? resolve() : t.once('exit', () => resolve())))));
      ports.forEach((p) => p.close());
    },
  };
}
