import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import Tinypool from 'tinypool';
import type { Circuit } from '../elaborate/circuit.js';
import type { NetworkData } from '../network/types.js';
import { solveSweep, SweepRunner, sweepWarnings, worseOf, type SweepOptions, type SweepWorst } from './sweep.js';
import { solveChunks, type ShareResult, type SweepTask } from './worker.js';
import { lowestOf } from '../plan/plan.js';
import { packCircuit } from './transfer.js';

export interface ParallelOptions {
  /**
   * Threads to solve on, this one included (default: the machine's available parallelism): this
   * thread and jobs − 1 workers share the points. 1 solves in this thread alone.
   */
  jobs?: number;
  /**
   * Leave this thread free while the workers solve (jobs workers, this thread waiting on them), so
   * that its event loop keeps running; by default this thread takes its share of the points and
   * is busy until the sweep is done, as with solveSweep.
   */
  keepCallerFree?: boolean;
  /** Frequencies in Hz (default: the circuit's sweep). */
  frequencies?: Float64Array;
  /** Called as chunks complete, with the number of points done and the total. */
  onProgress?: (done: number, total: number) => void;
  /** Called once at the end of a sweep whose system came close to singular (as in solveSweep). */
  onWarning?: SweepOptions['onWarning'];
}

/** The compiled worker; the pool runs compiled JavaScript even when this module runs from source. */
function workerFile(): string {
  const here = fileURLToPath(import.meta.url);
  const compiled = here.endsWith('.ts') ? here.replace(/[\\/]src[\\/]solve[\\/]parallel\.ts$/, '/dist/src/solve/worker.js') : here.replace(/parallel\.js$/, 'worker.js');
  if (!existsSync(compiled)) throw new Error(`the sweep worker ${compiled} is missing; build with \`npm run build\``);
  return compiled;
}

let shared: { pool: Tinypool; jobs: number } | undefined;

/**
 * The worker pool, kept between sweeps so that its threads start (and warm up) once; a different
 * thread count replaces it. {@link closeSweepPool} ends it (the process does not exit while it runs).
 */
async function poolFor(jobs: number): Promise<Tinypool> {
  if (shared && shared.jobs === jobs) return shared.pool;
  await closeSweepPool();
  shared = { pool: new Tinypool({ filename: workerFile(), minThreads: jobs, maxThreads: jobs, isolateWorkers: false }), jobs };
  return shared.pool;
}

/** Ends the worker threads of parallel sweeps (call it when done, so that the process can exit). */
export async function closeSweepPool(): Promise<void> {
  const s = shared;
  shared = undefined;
  if (s) await s.pool.destroy();
}

/**
 * Solves the sweep on `jobs` threads: this one and jobs − 1 workers (or jobs workers while this
 * thread waits, with `keepCallerFree`). The points are cut into chunks that the threads claim one
 * at a time from a shared counter (so a thread that starts late or runs on a busier core simply
 * takes fewer), and every thread writes its points straight into one shared output. Every point
 * is solved by the same code on the same data as in {@link solveSweep} (the whole sweep's pivot
 * frequency and lowest frequency in every thread), so the result is identical to the
 * single-thread run bit for bit, however the chunks fall. Its `values` are a Float64Array over a
 * SharedArrayBuffer (the one the threads wrote).
 *
 * (Measured on the reference machine, interleaved in one process: this thread and one worker
 * gain 1.55–1.8× on long ladder sweeps, two workers with this thread waiting 1.4–1.6×; only one
 * thread has to be woken, and this one is already running.)
 */
export async function solveSweepParallel(circuit: Circuit, options: ParallelOptions = {}): Promise<NetworkData> {
  const freqs = options.frequencies ?? circuit.frequencies;
  const jobs = Math.max(1, Math.min(options.jobs ?? availableParallelism(), freqs.length));
  if (jobs === 1) return solveSweep(circuit, { frequencies: freqs, onProgress: options.onProgress, onWarning: options.onWarning });
  const callerWorks = !options.keepCallerFree;
  const workers = callerWorks ? jobs - 1 : jobs;
  const pool = await poolFor(workers);
  const total = freqs.length;
  const p = circuit.ports.length;
  // about 64 chunks a thread: fine enough to even out, coarse enough that claiming costs nothing
  // (an even count: a thread factors its points two at a time)
  const chunk = 2 * Math.max(4, Math.ceil(total / (128 * jobs)));
  const shared = {
    out: new SharedArrayBuffer(8 * 2 * p * p * total),
    counter: new SharedArrayBuffer(8),
    chunksDone: new SharedArrayBuffer(Math.ceil(total / chunk)),
    chunk,
  };
  const common = { frequencies: freqs, pivotFrequency: freqs[0]!, lowestFrequency: lowestOf(freqs) };
  // what every worker gets: the circuit packed once, the frequencies shared, not copied to each
  const sharedFreqs = new Float64Array(new SharedArrayBuffer(8 * total));
  sharedFreqs.set(freqs);
  const task: SweepTask = { circuit: packCircuit(circuit), ...common, frequencies: sharedFreqs, ...shared };
  const remote: Promise<ShareResult | undefined>[] = [];
  for (let w = 0; w < workers; w++) {
    // a lost worker gives undefined: its chunks are redone below
    remote.push((pool.run(task) as Promise<ShareResult>).catch(() => undefined));
  }
  const counter = new Int32Array(shared.counter);
  // the result stays in the shared buffer the threads wrote: a copy would touch as many fresh
  // pages again, and a first touch of a page costs a fault (about 16 µs a 4 KB page on the
  // reference machine, as much as the solving of a large output)
  const values = new Float64Array(shared.out);
  let local: SweepRunner | undefined;
  const progress = options.onProgress;
  if (callerWorks) {
    // this thread's share, reporting progress between its chunks (its event loop is busy)
    let last = performance.now();
    const onChunk = progress
      ? () => {
          const now = performance.now();
          if (now - last < 100) return;
          last = now;
          progress(Atomics.load(counter, 1), total);
        }
      : undefined;
    try {
      local = new SweepRunner(circuit, common, values);
    } catch (e) {
      // nothing to solve here: stop the workers before reporting why
      Atomics.store(counter, 0, total);
      await Promise.all(remote);
      throw e;
    }
    solveChunks(local, shared, onChunk);
  }
  const ticker = progress ? setInterval(() => progress(Atomics.load(counter, 1), total), 100) : undefined;
  let results: (ShareResult | undefined)[];
  try {
    results = await Promise.all(remote);
  } finally {
    if (ticker) clearInterval(ticker);
  }
  // chunks a thread failed on or never finished: solved here, which reports a singular system
  // (or a sweep outside a data block's range) with its own type and details
  const done = new Uint8Array(shared.chunksDone);
  let worst: SweepWorst = { rcond: Infinity, frequency: NaN, digits: Infinity, digitsAt: NaN, digitsPort: -1 };
  for (let c = 0; c < done.length; c++) {
    if (done[c]) continue;
    local ??= new SweepRunner(circuit, common, values);
    local.run(c * chunk, Math.min(total, (c + 1) * chunk));
  }
  for (const r of [...results, local?.worst]) if (r) worst = worseOf(worst, r);
  sweepWarnings(options.onWarning, worst);
  options.onProgress?.(total, total);
  const complexRefs = circuit.ports.some((q) => (q.reactance ?? 0) !== 0);
  return {
    parameter: 'S',
    ports: p,
    frequencies: Float64Array.from(freqs),
    references: Float64Array.from(circuit.ports, (q) => q.reference),
    ...(complexRefs ? { referenceReactances: Float64Array.from(circuit.ports, (q) => q.reactance ?? 0) } : {}),
    values,
    title: circuit.title,
  };
}
