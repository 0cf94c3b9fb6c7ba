/**
 * Whole-matrix checks of an N-port's S-parameters per frequency point: passivity and reciprocity.
 *
 * Both assume power waves on real, positive references (as everywhere in scatterbox, see convert.ts).
 * Z or Y data is converted to S first. One number per point; an optional `out` array is reused; the
 * loop over frequency allocates nothing (the eigenvalue buffers are allocated once per call).
 *
 * @module
 */

import { createEigenWorkspace, createMatrix, gramEigenvalues } from '../network/complex.js';
import type { NetworkData } from '../network/types.js';
import { checkShape, outputArray, scattering } from './shared.js';

/**
 * Passivity margin 1 − λmax(SᴴS) per point. The power a network absorbs for incident waves a is
 * aᴴ(U − SᴴS)a, so it is passive at a frequency exactly when every eigenvalue of SᴴS is ≤ 1, i.e. the
 * margin is ≥ 0 (common practice). A lossless network (S unitary) has margin 0 up to rounding, a matched
 * pad of voltage ratio a has 1 − a², an amplifier with |S21| = g > 1 at most 1 − g².
 * λmax is the largest squared singular value of S, from {@link gramEigenvalues} (cyclic Jacobi).
 */
export function passivityMargin(net: NetworkData, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkShape(s);
  const res = outputArray(points, out);
  const n = s.ports;
  const size = 2 * n * n;
  const work = createEigenWorkspace(n);
  const slice = createMatrix(n);
  const eig = new Float64Array(n);
  const v = s.values;
  for (let k = 0; k < points; k++) {
    const offset = k * size;
    for (let t = 0; t < size; t++) slice[t] = v[offset + t]!;
    gramEigenvalues(n, slice, eig, work);
    res[k] = 1 - eig[n - 1]!;
  }
  return res;
}

/**
 * Reciprocity error max_{i≠j} |S_ij − S_ji| per point (0 for a one-port). A reciprocal network (no
 * ferrites, active devices or other non-reciprocal media) has S = Sᵀ for real references (common
 * practice), so the error is 0 up to rounding; an ideal circulator has error 1.
 */
export function reciprocityError(net: NetworkData, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkShape(s);
  const res = outputArray(points, out);
  const n = s.ports;
  const v = s.values;
  for (let k = 0; k < points; k++) {
    const base = 2 * k * n * n;
    let worst = 0;
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        const a = base + 2 * (i * n + j);
        const b = base + 2 * (j * n + i);
        const e = Math.hypot(v[a]! - v[b]!, v[a + 1]! - v[b + 1]!);
        if (e > worst || Number.isNaN(e)) worst = e;
      }
    }
    res[k] = worst;
  }
  return res;
}
