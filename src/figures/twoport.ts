/**
 * Stability and gain figures of a two-port, from its S-parameters at each frequency point.
 *
 * Notation: S11, S12, S21, S22 are the entries of the 2×2 S matrix (port 1 = input, port 2 = output),
 *   Δ = S11·S22 − S12·S21,
 *   N = 1 − |S11|² − |S22|² + |Δ|²   (the numerator of K).
 *
 * Sources (bibliographic details from memory):
 * - J. M. Rollett, "Stability and power-gain invariants of linear twoports", IRE Transactions on
 *   Circuit Theory CT-9(1), 1962: the stability factor K and the maximum available gain
 *   |S21/S12|·(K − √(K² − 1)) of an unconditionally stable two-port.
 * - M. L. Edwards and J. H. Sinsky, "A new criterion for linear 2-port stability using a single
 *   geometrically derived parameter", IEEE Transactions on Microwave Theory and Techniques 40(12), 1992:
 *   μ and μ'; either one > 1 is necessary and sufficient for unconditional stability.
 * - Unconditional stability as K > 1 together with |Δ| < 1, the maximum stable gain |S21/S12| and the
 *   maximum unilateral transducer gain |S21|²/((1 − |S11|²)(1 − |S22|²)): common practice (e.g.
 *   G. Gonzalez, Microwave Transistor Amplifiers, ch. 3 (from memory)).
 *
 * All functions take a two-port {@link NetworkData} (Z or Y data is converted to S first), return one
 * number per frequency point, accept an optional `out` array, and allocate nothing per point.
 *
 * @module
 */

import type { NetworkData } from '../network/types.js';
import { checkShape, checkTwoPort, outputArray, scattering } from './shared.js';

/** Loads the two-port and the output array; returns the S data and the point count. */
function prepare(net: NetworkData, out: Float64Array | undefined): [NetworkData, Float64Array] {
  const s = scattering(net);
  checkTwoPort(s);
  const points = checkShape(s);
  return [s, outputArray(points, out)];
}

/** |Δ| = |S11·S22 − S12·S21| per point. */
export function deltaMagnitude(net: NetworkData, out?: Float64Array): Float64Array {
  const [s, res] = prepare(net, out);
  const v = s.values;
  for (let k = 0; k < res.length; k++) {
    const o = 8 * k;
    const dr = v[o]! * v[o + 6]! - v[o + 1]! * v[o + 7]! - (v[o + 2]! * v[o + 4]! - v[o + 3]! * v[o + 5]!);
    const di = v[o]! * v[o + 7]! + v[o + 1]! * v[o + 6]! - (v[o + 2]! * v[o + 5]! + v[o + 3]! * v[o + 4]!);
    res[k] = Math.hypot(dr, di);
  }
  return res;
}

/**
 * Rollett stability factor K = (1 − |S11|² − |S22|² + |Δ|²)/(2·|S12·S21|) per point (Rollett, 1962).
 * With S12·S21 = 0 (a unilateral two-port, or no transmission) the quotient is its limit, the IEEE
 * division by +0: +Infinity when the numerator, then (1 − |S11|²)(1 − |S22|²), is positive (the usual
 * unilateral case), −Infinity when it is negative, NaN when it is 0.
 */
export function rollettK(net: NetworkData, out?: Float64Array): Float64Array {
  const [s, res] = prepare(net, out);
  const v = s.values;
  for (let k = 0; k < res.length; k++) {
    const o = 8 * k;
    const dr = v[o]! * v[o + 6]! - v[o + 1]! * v[o + 7]! - (v[o + 2]! * v[o + 4]! - v[o + 3]! * v[o + 5]!);
    const di = v[o]! * v[o + 7]! + v[o + 1]! * v[o + 6]! - (v[o + 2]! * v[o + 5]! + v[o + 3]! * v[o + 4]!);
    const m11 = v[o]! * v[o]! + v[o + 1]! * v[o + 1]!;
    const m22 = v[o + 6]! * v[o + 6]! + v[o + 7]! * v[o + 7]!;
    const num = 1 - m11 - m22 + (dr * dr + di * di);
    const den = 2 * Math.hypot(v[o + 2]!, v[o + 3]!) * Math.hypot(v[o + 4]!, v[o + 5]!);
    res[k] = num / den;
  }
  return res;
}

/**
 * Edwards–Sinsky stability parameter seen from the load side,
 *   μ = (1 − |S11|²)/(|S22 − Δ·conj(S11)| + |S12·S21|)   (Edwards & Sinsky, 1992),
 * the distance from the centre of the load-reflection plane (ΓL = 0) to the nearest load that makes
 * |Γin| = 1 (from memory; the tests check it). μ > 1 ⇔ unconditionally stable. Named figure `mu_load`. For a unilateral
 * two-port (S12 = 0, |S11| < 1) it reduces to 1/|S22|; a denominator of 0 gives +Infinity.
 */
export function muFactor(net: NetworkData, out?: Float64Array): Float64Array {
  return mu(net, out, 0);
}

/**
 * Edwards–Sinsky stability parameter seen from the source side (port 1 exchanged with port 2),
 *   μ' = (1 − |S22|²)/(|S11 − Δ·conj(S22)| + |S12·S21|)   (Edwards & Sinsky, 1992),
 * the distance from ΓS = 0 to the nearest source that makes |Γout| = 1. μ' > 1 ⇔ μ > 1. Named figure
 * `mu_source`.
 */
export function muPrimeFactor(net: NetworkData, out?: Float64Array): Float64Array {
  return mu(net, out, 6);
}

/** μ with "own" entry at offset `own` (0: S11, 6: S22) and "other" diagonal entry at 6 − own. */
function mu(net: NetworkData, out: Float64Array | undefined, own: 0 | 6): Float64Array {
  const [s, res] = prepare(net, out);
  const v = s.values;
  const other = 6 - own;
  for (let k = 0; k < res.length; k++) {
    const o = 8 * k;
    const dr = v[o]! * v[o + 6]! - v[o + 1]! * v[o + 7]! - (v[o + 2]! * v[o + 4]! - v[o + 3]! * v[o + 5]!);
    const di = v[o]! * v[o + 7]! + v[o + 1]! * v[o + 6]! - (v[o + 2]! * v[o + 5]! + v[o + 3]! * v[o + 4]!);
    const ar = v[o + own]!;
    const ai = v[o + own + 1]!;
    // other − Δ·conj(own)
    const cr = v[o + other]! - (dr * ar + di * ai);
    const ci = v[o + other + 1]! - (di * ar - dr * ai);
    const num = 1 - (ar * ar + ai * ai);
    const den = Math.hypot(cr, ci) + Math.hypot(v[o + 2]!, v[o + 3]!) * Math.hypot(v[o + 4]!, v[o + 5]!);
    res[k] = num / den;
  }
  return res;
}

/** Which gain {@link maxGain} reported at a point. */
export const GAIN_AVAILABLE = 1;
/** See {@link GAIN_AVAILABLE}. */
export const GAIN_STABLE = 2;

/**
 * Maximum gain per point as a linear power ratio, following this convention:
 * - where the two-port is unconditionally stable, K > 1 and |Δ| < 1, the maximum available gain
 *   MAG = |S21/S12|·(K − √(K² − 1)) (Rollett, 1962), the transducer gain with both ports conjugately
 *   matched at once; marked {@link GAIN_AVAILABLE};
 * - everywhere else the maximum stable gain MSG = |S21/S12| (common practice: the value MAG tends to
 *   as K → 1, the gain reachable after resistive loading to K = 1); marked {@link GAIN_STABLE}. It is
 *   +Infinity if S12 = 0 ≠ S21, and 0 if S21 = 0.
 * MAG is evaluated in the equivalent form 2|S21|²/(N + √(N² − 4|S12·S21|²)) (multiply K − √(K² − 1) by
 * (K + √(K² − 1))/(K + √(K² − 1)) and use K = N/(2|S12 S21|)), which does not cancel for large K and
 * stays finite as S12 → 0: for S12 = 0 it is the maximum unilateral transducer gain
 * |S21|²/((1 − |S11|²)(1 − |S22|²)), and K > 1 becomes N > 0.
 * If `kind` is given, kind[k] receives GAIN_AVAILABLE or GAIN_STABLE (0 for NaN data).
 */
export function maxGain(net: NetworkData, out?: Float64Array, kind?: Uint8Array): Float64Array {
  const [s, res] = prepare(net, out);
  if (kind !== undefined && kind.length !== res.length) {
    throw new RangeError(`the gain-kind array has length ${kind.length}, expected ${res.length}`);
  }
  const v = s.values;
  for (let k = 0; k < res.length; k++) {
    const o = 8 * k;
    const dr = v[o]! * v[o + 6]! - v[o + 1]! * v[o + 7]! - (v[o + 2]! * v[o + 4]! - v[o + 3]! * v[o + 5]!);
    const di = v[o]! * v[o + 7]! + v[o + 1]! * v[o + 6]! - (v[o + 2]! * v[o + 5]! + v[o + 3]! * v[o + 4]!);
    const m11 = v[o]! * v[o]! + v[o + 1]! * v[o + 1]!;
    const m22 = v[o + 6]! * v[o + 6]! + v[o + 7]! * v[o + 7]!;
    const md = dr * dr + di * di;
    const a12 = Math.hypot(v[o + 2]!, v[o + 3]!);
    const a21 = Math.hypot(v[o + 4]!, v[o + 5]!);
    const num = 1 - m11 - m22 + md;
    const twoT = 2 * a12 * a21; // 2|S12 S21|; K = num / twoT
    let g: number;
    let which: number;
    if (num > twoT && md < 1) {
      g = (2 * a21 * a21) / (num + Math.sqrt((num - twoT) * (num + twoT)));
      which = GAIN_AVAILABLE;
    } else if (num <= twoT || md >= 1) {
      g = a21 === 0 ? 0 : a21 / a12;
      which = GAIN_STABLE;
    } else {
      g = Number.NaN;
      which = 0;
    }
    res[k] = g;
    if (kind !== undefined) kind[k] = which;
  }
  return res;
}

/** {@link maxGain} in dB, 10·log10 of the power ratio. */
export function maxGainDb(net: NetworkData, out?: Float64Array, kind?: Uint8Array): Float64Array {
  const res = maxGain(net, out, kind);
  for (let k = 0; k < res.length; k++) res[k] = 10 * Math.log10(res[k]!);
  return res;
}

/**
 * Maximum unilateral transducer gain G_TU,max = |S21|²/((1 − |S11|²)(1 − |S22|²)) per point, as a linear
 * power ratio (common practice): the gain with both ports conjugately matched when S12 is neglected.
 * Meaningful for |S11| < 1 and |S22| < 1.
 */
export function maxUnilateralGain(net: NetworkData, out?: Float64Array): Float64Array {
  const [s, res] = prepare(net, out);
  const v = s.values;
  for (let k = 0; k < res.length; k++) {
    const o = 8 * k;
    const m11 = v[o]! * v[o]! + v[o + 1]! * v[o + 1]!;
    const m21 = v[o + 4]! * v[o + 4]! + v[o + 5]! * v[o + 5]!;
    const m22 = v[o + 6]! * v[o + 6]! + v[o + 7]! * v[o + 7]!;
    res[k] = m21 / ((1 - m11) * (1 - m22));
  }
  return res;
}
