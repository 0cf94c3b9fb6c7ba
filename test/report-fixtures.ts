// Network data built by hand for the report and plot tests.
import { mixedMode } from '../src/network/mixed-mode.js';
import type { NetworkData } from '../src/network/types.js';

/** A network of S data given per point as rows of [re, im] pairs (layout of src/network/types.ts). */
export function network(freqs: number[], s: (k: number) => [number, number][][], references?: number[]): NetworkData {
  const n = s(0).length;
  const values = new Float64Array(2 * n * n * freqs.length);
  freqs.forEach((_, k) => {
    const m = s(k);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        values[2 * ((k * n + i) * n + j)] = m[i]![j]![0];
        values[2 * ((k * n + i) * n + j) + 1] = m[i]![j]![1];
      }
    }
  });
  return { parameter: 'S', ports: n, frequencies: Float64Array.from(freqs), references: Float64Array.from(references ?? new Array(n).fill(50)), values };
}

/**
 * A 4-port of two uncoupled through lines, 1→2 and 3→4, with some reflection, at 1 and 2 GHz
 * (`se`), and its mixed-mode form for the pairs (1,3) and (2,4) (`mm`).
 */
export function twoThroughLines() {
  const se = network([1e9, 2e9], (k) => {
    const r: [number, number] = [0.1 + 0.05 * k, 0.02];
    const t: [number, number] = [0.9, -0.3 * k];
    const o: [number, number] = [0, 0];
    return [
      [r, t, o, o],
      [t, r, o, o],
      [o, o, r, t],
      [o, o, t, r],
    ];
  });
  const mm = mixedMode(se, [
    [1, 3],
    [2, 4],
  ]);
  return { se, mm };
}
