/**
 * A yield run on several threads: this thread and jobs − 1 workers claim chunks of samples from a
 * shared counter and write each sample's margins and draws straight into shared arrays. Every
 * thread makes the same design model (from the model's recipe) and sample k depends only on the
 * design, the seed and k (src/yield/run.ts SampleEvaluator), so the result is the same bit for bit
 * whatever the thread count and however the chunks fall.
 *
 * @module
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import Tinypool from 'tinypool';
import type { DesignModel } from '../design/model.js';
import { checkEnvelopeSamples, checkSampleRange, evaluateSamples, SampleEvaluator, sampleRows, sampleSetOf, type SampleSet } from './run.js';
import { evaluateChunks, type YieldShareResult, type YieldTask } from './worker.js';

/** Fewer samples than this per thread are evaluated in this thread alone (a worker takes a few hundred ms to start). */
export const PARALLEL_MIN_SAMPLES_PER_JOB = 500;

/** The compiled worker; the pool runs compiled JavaScript even when this module runs from source. */
function workerFile(): string {
  const here = fileURLToPath(import.meta.url);
  const compiled = here.endsWith('.ts') ? here.replace(/[\\/]src[\\/]yield[\\/]parallel\.ts$/, '/dist/src/yield/worker.js') : here.replace(/parallel\.js$/, 'worker.js');
  if (!existsSync(compiled)) throw new Error(`the yield worker ${compiled} is missing; build with \`npm run build\``);
  return compiled;
}

export interface ParallelYieldOptions {
  seed: number;
  first?: number;
  count: number;
  /** The run's first `envelopeSamples` samples also have their whole sweep solved (default 0). */
  envelopeSamples?: number;
  /** Threads, this one included (1: this thread alone). */
  jobs: number;
  /** Called as samples complete, with the number done and the total. */
  onProgress?: (done: number, total: number) => void;
}

/**
 * Evaluates samples first … first + count − 1 on `jobs` threads (see the module comment); the
 * same {@link SampleSet} as evaluateSamples gives. A model that cannot be sent to another thread
 * (made with a custom file reader), or a run too short to pay for the workers' start, is
 * evaluated in this thread.
 */
export async function evaluateSamplesParallel(model: DesignModel, options: ParallelYieldOptions): Promise<SampleSet> {
  const first = options.first ?? 0;
  const count = options.count;
  const envelopeSamples = options.envelopeSamples ?? 0;
  checkSampleRange(first, count);
  checkEnvelopeSamples(envelopeSamples);
  const recipe = model.recipe;
  const jobs = Math.max(1, Math.min(Math.floor(options.jobs), Math.floor(count / PARALLEL_MIN_SAMPLES_PER_JOB)));
  if (jobs <= 1 || !recipe) return evaluateSamples(model, { seed: options.seed, first, count, envelopeSamples, onProgress: options.onProgress });
  // about 32 chunks a thread: a thread that starts late simply takes fewer
  const chunk = Math.max(16, Math.min(1024, Math.ceil(count / (32 * jobs))));
  const rows = sampleRows(model, first, count, envelopeSamples, true);
  const shared = {
    first,
    count,
    chunk,
    rows,
    counter: new SharedArrayBuffer(8),
    chunksDone: new SharedArrayBuffer(Math.ceil(count / chunk)),
  };
  const task: YieldTask = { recipe, seed: options.seed, envelopeSamples, ...shared };
  const pool = new Tinypool({ filename: workerFile(), minThreads: jobs - 1, maxThreads: jobs - 1, isolateWorkers: false });
  const errors: [number, string][] = [];
  const counter = new Int32Array(shared.counter);
  const progress = options.onProgress;
  const ev = new SampleEvaluator(model, options.seed, envelopeSamples);
  try {
    // a lost worker gives no result: its chunks are evaluated below
    const remote: Promise<YieldShareResult | undefined>[] = [];
    for (let w = 0; w < jobs - 1; w++) remote.push((pool.run(task) as Promise<YieldShareResult>).catch(() => undefined));
    let last = performance.now();
    evaluateChunks(ev, shared, errors, () => {
      const now = performance.now();
      if (!progress || now - last < 100) return;
      last = now;
      progress(Atomics.load(counter, 1), count);
    });
    const ticker = progress ? setInterval(() => progress(Atomics.load(counter, 1), count), 100) : undefined;
    try {
      for (const r of await Promise.all(remote)) if (r) errors.push(...r.errors);
    } finally {
      if (ticker) clearInterval(ticker);
    }
    // chunks no thread finished: evaluated here (a sample that throws reports why, from here)
    const done = new Uint8Array(shared.chunksDone);
    for (let c = 0; c < done.length; c++) {
      if (done[c]) continue;
      for (let i = c * chunk; i < Math.min(count, (c + 1) * chunk); i++) {
        const e = ev.evaluate(first + i, i, rows);
        if (e !== null) errors.push([i, e]);
      }
    }
  } finally {
    ev.finish();
    await pool.destroy();
  }
  progress?.(count, count);
  const byRow: (string | null)[] = new Array<string | null>(count).fill(null);
  for (const [i, e] of errors) byRow[i] = e;
  return sampleSetOf(model, { seed: options.seed, first, count, envelopeSamples }, rows, byRow);
}
