/**
 * A sweep worker: solves a share of the frequencies of a circuit. Run by the pool of
 * `parallel.ts` from the compiled `dist/` tree.
 */
import type { Circuit } from '../elaborate/circuit.js';
import { solveSweep } from './sweep.js';

export interface SweepTask {
  circuit: Circuit;
  frequencies: Float64Array;
  /** The whole sweep's first frequency: fixes the sparse pivot order the same in every share. */
  pivotFrequency: number;
  /** The whole sweep's lowest frequency: fixes the elements' formulation the same in every share. */
  lowestFrequency: number;
}

export default function solveShare(task: SweepTask): Float64Array {
  return solveSweep(task.circuit, { frequencies: task.frequencies, pivotFrequency: task.pivotFrequency, lowestFrequency: task.lowestFrequency }).values;
}
