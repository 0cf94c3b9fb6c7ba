import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import Tinypool from 'tinypool';
import type { Circuit } from '../elaborate/circuit.js';
import type { NetworkData } from '../network/types.js';
import { solveSweep, SweepRunner, type SweepOptions } from './sweep.js';
import { solveChunks, type ShareResult } from './worker.js';
import { lowestOf } from '../plan/plan.js';

export interface ParallelOptions {
  /** Threads to use, this one included (default: the machine's available parallelism). 1 solves in this thread only. */
  jobs?: number;
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
 * Solves the sweep on `jobs` threads: this one and the pool's `jobs − 1` workers. The points are
 * cut into chunks that the threads claim one at a time from a shared counter (so a thread that
 * starts late or runs slower simply takes fewer), and every thread writes its points straight into
 * one shared output. Every point is solved by the same code on the same data as in
 * {@link solveSweep} (the whole sweep's pivot frequency and lowest frequency in every thread), so
 * the result is identical to the single-thread run bit for bit, however the chunks fall.
 */
export async function solveSweepParallel(circuit: Circuit, options: ParallelOptions = {}): Promise<NetworkData> {
  const freqs = options.frequencies ?? circuit.frequencies;
  const jobs = Math.max(1, Math.min(options.jobs ?? availableParallelism(), freqs.length));
  if (jobs === 1) return solveSweep(circuit, { frequencies: freqs, onProgress: options.onProgress, onWarning: options.onWarning });
  const pool = await poolFor(jobs - 1);
  const total = freqs.length;
  const p = circuit.ports.length;
  // about 64 chunks a thread: fine enough to even out, coarse enough that claiming costs nothing
  const chunk = Math.max(8, Math.ceil(total / (64 * jobs)));
  const shared = {
    out: new SharedArrayBuffer(8 * 2 * p * p * total),
    counter: new SharedArrayBuffer(8),
    chunksDone: new SharedArrayBuffer(Math.ceil(total / chunk)),
    chunk,
  };
  const common = { frequencies: freqs, pivotFrequency: freqs[0]!, lowestFrequency: lowestOf(freqs) };
  const remote: Promise<ShareResult | undefined>[] = [];
  const lean = solvingPart(circuit);
  for (let w = 1; w < jobs; w++) {
    remote.push(
      (pool.run({ circuit: lean, ...common, ...shared }) as Promise<ShareResult>).catch(() => undefined), // a lost worker: its chunks are redone below
    );
  }
  // This thread writes into an ordinary array of its own (the per-point code then sees the same
  // kind of array as in a single-thread sweep, and stays optimised for it); the workers' chunks
  // are copied over from the shared output at the end.
  const runner = new SweepRunner(circuit, common);
  const counter = new Int32Array(shared.counter);
  try {
    solveChunks(runner, shared, 1, options.onProgress ? () => options.onProgress!(Atomics.load(counter, 1), total) : undefined, true);
  } catch (e) {
    await Promise.allSettled(remote);
    throw e;
  }
  const results = await Promise.all(remote);
  // chunks a worker failed on or never finished: solved here, which reports a singular system
  // with its own type and details
  const done = new Uint8Array(shared.chunksDone);
  const fromWorkers = new Float64Array(shared.out);
  const width = 2 * p * p;
  for (let c = 0; c < done.length; c++) {
    const k0 = c * chunk;
    const k1 = Math.min(total, (c + 1) * chunk);
    if (done[c] === 2) runner.values.set(fromWorkers.subarray(k0 * width, k1 * width), k0 * width);
    else if (done[c] !== 1) runner.run(k0, k1);
  }
  let worst = runner.worst;
  for (const r of results) if (r && !Number.isNaN(r.frequency) && (Number.isNaN(worst.frequency) || r.rcond < worst.rcond)) worst = { rcond: r.rcond, frequency: r.frequency };
  options.onProgress?.(total, total);
  return runner.finish(worst);
}

const NO_SPAN = { file: '', line: 1, column: 1, length: 1 };

/**
 * What a worker needs of a circuit to solve it (and to name the nodes of a singular system): the
 * elements without their source positions, no specs, parameters or warnings. Copying a circuit
 * to a thread costs in proportion to its objects; this is about a third of them.
 */
function solvingPart(circuit: Circuit): Circuit {
  return {
    file: circuit.file,
    title: circuit.title,
    nodeNames: circuit.nodeNames,
    elements: circuit.elements.map((el) => ({ type: el.type, name: el.name, nodes: el.nodes, nodeNames: [], props: el.props, at: el.at, span: NO_SPAN, propSpans: {}, text: el.text, data: el.data })),
    ports: circuit.ports.map((p) => ({ ...p, span: NO_SPAN })),
    specs: [],
    localReferences: circuit.localReferences,
    frequencies: new Float64Array(0),
    parameters: [],
    warnings: [],
  };
}
