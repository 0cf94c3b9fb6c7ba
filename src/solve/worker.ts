/**
 * A sweep worker: solves chunks of a sweep, claimed one at a time from a counter shared with the
 * other workers, straight into the shared output. Run by the pool of `parallel.ts` from the
 * compiled `dist/` tree.
 */
import { SweepRunner, type SweepWorst } from './sweep.js';
import { unpackCircuit, type PackedCircuit } from './transfer.js';

export interface SweepTask {
  circuit: PackedCircuit;
  /** The whole sweep (over a SharedArrayBuffer, so that it is not copied to every worker). */
  frequencies: Float64Array;
  /** The whole sweep's first frequency: fixes the sparse pivot order the same in every thread. */
  pivotFrequency: number;
  /** The whole sweep's lowest frequency: fixes the elements' formulation the same in every thread. */
  lowestFrequency: number;
  /** S values of the whole sweep (Float64Array over it), written by every thread. */
  out: SharedArrayBuffer;
  /** Int32Array over it: [next point to claim, points done]. */
  counter: SharedArrayBuffer;
  /** Uint8Array over it, per chunk: 1 once solved. */
  chunksDone: SharedArrayBuffer;
  chunk: number;
}

export interface ShareResult extends SweepWorst {
  /** The smallest condition estimate below the warning level and its frequency (NaN: none); see SweepRunner.worst. */
  rcond: number;
  frequency: number;
  /** A chunk this thread could not solve (its first point), or −1; the caller re-solves it to report why. */
  failedAt: number;
}

/**
 * Claims and solves chunks until none are left (in a worker, or on the calling thread, which
 * passes `onChunk` to hear of each chunk it finished). Returns −1, or the first point of a chunk
 * that failed (then the other threads are stopped too; the caller re-solves what is left to report
 * why).
 */
export function solveChunks(runner: SweepRunner, task: Pick<SweepTask, 'counter' | 'chunksDone' | 'chunk'>, onChunk?: () => void): number {
  const counter = new Int32Array(task.counter);
  const done = new Uint8Array(task.chunksDone);
  const total = runner.frequencies.length;
  for (;;) {
    const k0 = Atomics.add(counter, 0, task.chunk);
    if (k0 >= total) return -1;
    const k1 = Math.min(total, k0 + task.chunk);
    try {
      runner.run(k0, k1);
    } catch {
      // stop the others; the caller finds out why
      Atomics.store(counter, 0, total);
      return k0;
    }
    Atomics.store(done, Math.floor(k0 / task.chunk), 1);
    Atomics.add(counter, 1, k1 - k0);
    onChunk?.();
  }
}

export default function solveShare(task: SweepTask): ShareResult {
  const runner = new SweepRunner(unpackCircuit(task.circuit), { frequencies: task.frequencies, pivotFrequency: task.pivotFrequency, lowestFrequency: task.lowestFrequency }, new Float64Array(task.out));
  const failedAt = solveChunks(runner, task);
  return { ...runner.worst, failedAt };
}
