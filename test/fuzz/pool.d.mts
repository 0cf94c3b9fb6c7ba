// Types of pool.mjs.
import type { Corpus, FuzzCase, Outcome } from './engine.mjs';

export function loadCorpus(root: string): Corpus;

export interface PoolOutcome extends Omit<Outcome, 'status'> {
  status: Outcome['status'] | 'hang';
  /** Wall time of the case in the worker, for the report only. */
  ms: number;
}

export class FuzzPool {
  constructor(options: { libPath: string; workers?: number; timeoutMs?: number; memoryMb?: number });
  run(c: FuzzCase): Promise<PoolOutcome>;
  close(): Promise<void>;
}
