import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import Tinypool from 'tinypool';
import type { Circuit } from '../elaborate/circuit.js';
import type { NetworkData } from '../network/types.js';
import { solveSweep } from './sweep.js';
import { lowestOf } from '../plan/plan.js';

export interface ParallelOptions {
  /** Threads to use, this one included (default: the machine's available parallelism). 1 solves in this thread only. */
  jobs?: number;
  /** Frequencies in Hz (default: the circuit's sweep). */
  frequencies?: Float64Array;
  /** Called as shares complete, with the number of points done and the total. */
  onProgress?: (done: number, total: number) => void;
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
 * Solves the sweep on `jobs` threads: the frequencies are split into one contiguous share per
 * thread; this thread solves the first share itself while the pool's `jobs − 1` workers solve the
 * others. Every frequency point is solved by the same code on the same data as in
 * {@link solveSweep} (the same pivot frequency and lowest frequency for every share), so the
 * result is identical to the single-thread run bit for bit.
 */
export async function solveSweepParallel(circuit: Circuit, options: ParallelOptions = {}): Promise<NetworkData> {
  const freqs = options.frequencies ?? circuit.frequencies;
  const jobs = Math.max(1, Math.min(options.jobs ?? availableParallelism(), freqs.length));
  if (jobs === 1) return solveSweep(circuit, { frequencies: freqs, onProgress: options.onProgress });
  const pool = await poolFor(jobs - 1);
  const lowest = lowestOf(freqs);
  const common = { pivotFrequency: freqs[0]!, lowestFrequency: lowest };
  const shares: Float64Array[] = [];
  for (let w = 0; w < jobs; w++) {
    const lo = Math.floor((w * freqs.length) / jobs);
    const hi = Math.floor(((w + 1) * freqs.length) / jobs);
    shares.push(freqs.slice(lo, hi));
  }
  let done = 0;
  const report = (count: number) => {
    done += count;
    options.onProgress?.(done, freqs.length);
  };
  // A worker's failure comes back as a plain error; solving that share here rethrows it with its
  // own type and details (a singular system names its nodes and frequency).
  const remote = shares.slice(1).map((f) =>
    pool
      .run({ circuit, frequencies: f, ...common })
      .catch(() => solveSweep(circuit, { frequencies: f, ...common }).values)
      .then((v: Float64Array) => {
        report(f.length);
        return v;
      }),
  );
  let first: NetworkData;
  try {
    first = solveSweep(circuit, { frequencies: shares[0]!, ...common });
  } catch (e) {
    await Promise.allSettled(remote);
    throw e;
  }
  report(shares[0]!.length);
  const parts = [first.values, ...((await Promise.all(remote)) as Float64Array[])];
  const p = circuit.ports.length;
  const values = new Float64Array(2 * p * p * freqs.length);
  let offset = 0;
  for (const part of parts) {
    values.set(part, offset);
    offset += part.length;
  }
  return { ...first, frequencies: Float64Array.from(freqs), values };
}
