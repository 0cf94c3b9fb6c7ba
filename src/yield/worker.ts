/**
 * A yield worker: makes the design model again from its recipe and evaluates samples, claimed in
 * chunks from a counter shared with the other threads, straight into the shared per-sample
 * arrays. Run by the pool of `parallel.ts` from the compiled `dist/` tree.
 *
 * @module
 */
import { DesignModel, type ModelRecipe } from '../design/model.js';
import { SampleEvaluator, type SampleRows } from './run.js';

export interface YieldTask {
  recipe: ModelRecipe;
  seed: number;
  /** The run's first sample number (row 0 of the arrays). */
  first: number;
  /** Samples of the run (rows of the arrays). */
  count: number;
  /** The run's envelope samples (see SampleEvaluator). */
  envelopeSamples: number;
  /** Rows claimed at a time. */
  chunk: number;
  /** The per-sample arrays, over SharedArrayBuffers that every thread writes. */
  rows: SampleRows;
  /** Int32Array over it: [next row to claim, rows done]. */
  counter: SharedArrayBuffer;
  /** Uint8Array over it, per chunk: 1 once evaluated. */
  chunksDone: SharedArrayBuffer;
}

export interface YieldShareResult {
  /** Rows that could not be evaluated, with why. */
  errors: [number, string][];
}

/**
 * Claims and evaluates chunks of rows until none are left (in a worker, or on the calling thread,
 * which passes `onChunk` to hear of each chunk it finished). A chunk that throws is left undone
 * for the caller, and the other threads are not stopped: the caller evaluates what is left and
 * reports why.
 */
export function evaluateChunks(ev: SampleEvaluator, task: Omit<YieldTask, 'recipe' | 'seed' | 'envelopeSamples'>, errors: [number, string][], onChunk?: () => void): void {
  const counter = new Int32Array(task.counter);
  const done = new Uint8Array(task.chunksDone);
  for (;;) {
    const r0 = Atomics.add(counter, 0, task.chunk);
    if (r0 >= task.count) return;
    const r1 = Math.min(task.count, r0 + task.chunk);
    const found: [number, string][] = [];
    try {
      for (let i = r0; i < r1; i++) {
        const e = ev.evaluate(task.first + i, i, task.rows);
        if (e !== null) found.push([i, e]);
      }
    } catch {
      continue;
    }
    errors.push(...found);
    Atomics.store(done, Math.floor(r0 / task.chunk), 1);
    Atomics.add(counter, 1, r1 - r0);
    onChunk?.();
  }
}

export default function evaluateShare(task: YieldTask): YieldShareResult {
  const errors: [number, string][] = [];
  let ev: SampleEvaluator;
  try {
    ev = new SampleEvaluator(DesignModel.fromRecipe(task.recipe), task.seed, task.envelopeSamples);
  } catch {
    // the netlist could not be made again here (changed on disk?): the other threads do the work
    return { errors };
  }
  evaluateChunks(ev, task, errors);
  return { errors };
}
