/**
 * Figures read off single S-parameter entries over the sweep: magnitude in dB, return and insertion loss,
 * VSWR, wrapped and unwrapped phase, group delay, input impedance and the reflection seen through a
 * loaded port.
 *
 * Conventions:
 * - Ports are numbered from 1, and an entry is named (to, from) as in S21 = (2, 1): the wave leaving
 *   port 2 when port 1 is driven and every other port is terminated in its reference impedance.
 * - Every function takes a {@link NetworkData}; Z or Y data is first converted to S for the same
 *   references (see {@link scattering}).
 * - Results are one number per frequency point in a `Float64Array` (complex results are interleaved
 *   re, im). Pass `out` to reuse an array; the loops over frequency allocate nothing.
 * - A magnitude of exactly 0 gives −Infinity dB (and +Infinity loss); the phase of an exact 0 is taken
 *   as 0 (that of `Math.atan2(0, 0)`).
 *
 * @module
 */

import type { NetworkData } from '../network/types.js';
import { checkPort, checkShape, outputArray, scattering } from './shared.js';

const TWO_PI = 2 * Math.PI;
const DEG = 180 / Math.PI;

// --- scalar definitions ---------------------------------------------------------------------------

/** 20·log10(m) for a voltage-wave magnitude m ≥ 0 (−Infinity at 0). Common practice. */
export function magnitudeToDb(m: number): number {
  return 20 * Math.log10(m);
}

/**
 * Return loss of a reflection coefficient of magnitude m: RL = −20·log10 m, in dB, positive for a
 * passive load (m < 1); +Infinity for a perfect match, 0 for total reflection. Common practice; the
 * sign convention (return loss is a positive number of dB) as argued by T. S. Bird, "Definition and
 * misuse of return loss", IEEE Antennas and Propagation Magazine 51(2), 2009 (from memory).
 */
export function returnLossFromMagnitude(m: number): number {
  return 0 - 20 * Math.log10(m); // 0 − …: total reflection gives +0, not −0
}

/**
 * Voltage standing wave ratio of a reflection coefficient of magnitude m: VSWR = (1 + m)/(1 − m),
 * ≥ 1, and +Infinity when m ≥ 1 (a standing wave with nulls; the ratio is not finite). Common practice.
 */
export function vswrFromMagnitude(m: number): number {
  return m >= 1 ? Infinity : (1 + m) / (1 - m);
}

/** An angle in degrees wrapped into (−180, 180]. */
export function wrapDegrees(deg: number): number {
  let w = deg - 360 * Math.ceil((deg - 180) / 360);
  if (w <= -180) w += 360; // rounding guard
  if (w > 180) w -= 360;
  return w;
}

/**
 * Reflection coefficient of a load impedance zl = re + j·im on a real reference zref:
 * Γ = (zl − zref)/(zl + zref). Common practice. Returns [Re Γ, Im Γ]; a short gives −1, an open
 * (re = Infinity) gives 1. Allocates the result pair: not for per-frequency loops.
 */
export function loadReflection(re: number, im: number, zref: number): [number, number] {
  if (re === Infinity) return [1, 0];
  const nr = re - zref;
  const dr = re + zref;
  const d = dr * dr + im * im;
  return [(nr * dr + im * im) / d, (im * dr - nr * im) / d];
}

// --- per-entry figures ----------------------------------------------------------------------------

/** |S_ij| in dB: 20·log10|S_ij| (common practice). `to`, `from` are 1-based port numbers. */
export function magnitudeDb(net: NetworkData, to: number, from: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, to, from);
  const res = outputArray(points, out);
  const v = s.values;
  const n = s.ports;
  for (let k = 0; k < points; k++) {
    const o = 2 * ((k * n + to - 1) * n + from - 1);
    res[k] = 20 * Math.log10(Math.hypot(v[o]!, v[o + 1]!));
  }
  return res;
}

/**
 * Return loss at `port` (1-based), other ports terminated in their references:
 * RL = −20·log10|S_ii| dB, see {@link returnLossFromMagnitude}.
 */
export function returnLoss(net: NetworkData, port: number, out?: Float64Array): Float64Array {
  const res = magnitudeDb(net, port, port, out);
  for (let k = 0; k < res.length; k++) res[k] = 0 - res[k]!;
  return res;
}

/**
 * Insertion loss from port `from` to port `to` (1-based), every port terminated in its reference:
 * IL = −20·log10|S_to,from| dB (positive for a lossy path; for a pad it equals the pad's loss).
 * Common practice. Meant for to ≠ from; with to = from it is the return loss.
 */
export function insertionLoss(net: NetworkData, to: number, from: number, out?: Float64Array): Float64Array {
  const res = magnitudeDb(net, to, from, out);
  for (let k = 0; k < res.length; k++) res[k] = 0 - res[k]!;
  return res;
}

/** VSWR at `port` (1-based): (1 + |S_ii|)/(1 − |S_ii|), Infinity for |S_ii| ≥ 1 ({@link vswrFromMagnitude}). */
export function vswr(net: NetworkData, port: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, port, port);
  const res = outputArray(points, out);
  const v = s.values;
  const n = s.ports;
  for (let k = 0; k < points; k++) {
    const o = 2 * ((k * n + port - 1) * n + port - 1);
    const m = Math.hypot(v[o]!, v[o + 1]!);
    res[k] = m >= 1 ? Infinity : (1 + m) / (1 - m);
  }
  return res;
}

/** Phase of S_ij in degrees, wrapped into (−180, 180]: atan2(Im, Re)·180/π with −180 mapped to 180. */
export function phaseDeg(net: NetworkData, to: number, from: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, to, from);
  const res = outputArray(points, out);
  const v = s.values;
  const n = s.ports;
  for (let k = 0; k < points; k++) {
    const o = 2 * ((k * n + to - 1) * n + from - 1);
    const a = Math.atan2(v[o + 1]!, v[o]!) * DEG;
    res[k] = a <= -180 ? a + 360 : a;
  }
  return res;
}

/**
 * Unwrapped phase of S_ij in radians (internal; {@link unwrappedPhaseDeg} is the public form).
 * φ_0 is the wrapped phase of the first point, in (−π, π]; then each point takes the wrapped phase
 * θ_k plus the multiple of 2π that puts the step φ_k − φ_{k−1} into (−π, π]:
 *   φ_k = θ_k − 2π·⌈(θ_k − φ_{k−1} − π)/(2π)⌉.
 * This is the one-dimensional unwrapping of K. Itoh, "Analysis of the phase unwrapping algorithm",
 * Applied Optics 21(14), 1982 (from memory). It recovers the true phase only if the phase changes by
 * less than π between neighbouring points, so the sweep must be fine enough (for a delay τ:
 * Δf < 1/(2τ)). The step is taken to the previous unwrapped value, so no 2π error accumulates.
 */
function unwrapInto(s: NetworkData, to: number, from: number, points: number, res: Float64Array): void {
  const v = s.values;
  const n = s.ports;
  let prev = 0;
  for (let k = 0; k < points; k++) {
    const o = 2 * ((k * n + to - 1) * n + from - 1);
    let theta = Math.atan2(v[o + 1]!, v[o]!);
    if (theta <= -Math.PI) theta += TWO_PI;
    const phi = k === 0 ? theta : theta - TWO_PI * Math.ceil((theta - prev - Math.PI) / TWO_PI);
    res[k] = phi;
    prev = phi;
  }
}

/**
 * Phase of S_ij in degrees, unwrapped so that it is continuous across the sweep (method and the
 * sampling condition at {@link unwrapInto}): starts at the wrapped phase of the first point, and every
 * step between neighbouring points lies in (−180, 180].
 */
export function unwrappedPhaseDeg(net: NetworkData, to: number, from: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, to, from);
  const res = outputArray(points, out);
  unwrapInto(s, to, from, points, res);
  for (let k = 0; k < points; k++) res[k] = res[k]! * DEG;
  return res;
}

/**
 * Group delay of S_ij in seconds, τ = −dφ/dω with φ the unwrapped phase in radians ({@link unwrapInto})
 * and ω = 2πf (common practice). The derivative is taken numerically on the sweep's own points:
 * - interior points, central differences over the two neighbours:
 *   τ_k = −(φ_{k+1} − φ_{k−1})/(ω_{k+1} − ω_{k−1});
 * - the first and last point, one-sided differences: τ_0 = −(φ_1 − φ_0)/(ω_1 − ω_0) and
 *   τ_{m−1} = −(φ_{m−1} − φ_{m−2})/(ω_{m−1} − ω_{m−2});
 * - a single-point sweep gives NaN (no derivative from one point).
 * The result is exact for a phase linear in ω on any grid; for a curved phase the error of the central
 * difference is O(Δω²) on an even grid (O(Δω) on an uneven one and at the ends). Frequencies must be
 * strictly ascending. Phase steps ≥ π between neighbours (too coarse a sweep) or points where S_ij = 0
 * make the result meaningless.
 */
export function groupDelay(net: NetworkData, to: number, from: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, to, from);
  const res = outputArray(points, out);
  if (points === 0) return res;
  if (points === 1) {
    res[0] = Number.NaN;
    return res;
  }
  unwrapInto(s, to, from, points, res);
  const f = s.frequencies;
  // res holds φ; overwrite in place, keeping the φ value of the previous point in `before`
  let before = res[0]!;
  res[0] = -(res[1]! - res[0]!) / (TWO_PI * (f[1]! - f[0]!));
  for (let k = 1; k < points - 1; k++) {
    const here = res[k]!;
    res[k] = -(res[k + 1]! - before) / (TWO_PI * (f[k + 1]! - f[k - 1]!));
    before = here;
  }
  const last = points - 1;
  res[last] = -(res[last]! - before) / (TWO_PI * (f[last]! - f[last - 1]!));
  return res;
}

/**
 * Input impedance at `port` (1-based) with every other port terminated in its reference impedance,
 * in ohms, as interleaved [Re, Im] per frequency point (length 2·points).
 *
 * The waves are power waves (Kurokawa 1965; README "Method" §6): with the port's reference
 * Zr = R + jX, a = (V + Zr·I)/(2√R) and b = (V − Zr*·I)/(2√R). A load Z (V = Z·I) reflects
 * Γ = b/a = (Z − Zr*)/(Z + Zr), so Z·(1 − Γ) = Zr* + Γ·Zr and
 *   Zin = (Zr* + S_ii·Zr)/(1 − S_ii) = R·(1 + S_ii)/(1 − S_ii) − jX,
 * which for X = 0 is the familiar R·(1 + S)/(1 − S) (common practice). Where S_ii = 1 exactly (an
 * open circuit) the result is Re = +Infinity, Im = NaN.
 */
export function inputImpedance(net: NetworkData, port: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, port, port);
  const res = outputArray(2 * points, out);
  impedanceInto(s, port, res, 2, 0, 1);
  return res;
}

/** Re Zin at `port` in ohms, one number per point ({@link inputImpedance}). */
export function inputResistance(net: NetworkData, port: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, port, port);
  const res = outputArray(points, out);
  impedanceInto(s, port, res, 1, 0, -1);
  return res;
}

/**
 * Im Zin at `port` in ohms, one number per point ({@link inputImpedance}): with a complex reference
 * R + jX it includes the −jX of Zr* (Zin = R·(1 + S)/(1 − S) − jX).
 */
export function inputReactance(net: NetworkData, port: number, out?: Float64Array): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, port, port);
  const res = outputArray(points, out);
  impedanceInto(s, port, res, 1, -1, 0);
  return res;
}

/**
 * Writes Zin = R·(1 + S)/(1 − S) − jX at each point (see {@link inputImpedance}): its real part at
 * res[stride·k + re] and its imaginary part at res[stride·k + im] (an offset of −1 skips that part).
 * Allocates nothing.
 */
function impedanceInto(s: NetworkData, port: number, res: Float64Array, stride: number, re: number, im: number): void {
  const v = s.values;
  const n = s.ports;
  const r0 = s.references[port - 1]!;
  const x0 = s.referenceReactances?.[port - 1] ?? 0;
  const points = s.frequencies.length;
  for (let k = 0; k < points; k++) {
    const o = 2 * ((k * n + port - 1) * n + port - 1);
    const sr = v[o]!;
    const si = v[o + 1]!;
    const dr = 1 - sr;
    const d = dr * dr + si * si;
    // R·(1 + S)/(1 − S) = R·(1 − |S|² + 2j·Im S)/|1 − S|²
    const zr = d === 0 ? Infinity : (r0 * (1 - sr * sr - si * si)) / d;
    const zi = d === 0 ? Number.NaN : (r0 * 2 * si) / d - x0;
    if (re >= 0) res[stride * k + re] = zr;
    if (im >= 0) res[stride * k + im] = zi;
  }
}

/**
 * Reflection coefficient at `port` when port `loaded` is terminated in a load of reflection coefficient
 * ΓL = gammaRe + j·gammaIm (relative to that port's reference; {@link loadReflection} gives it for an
 * impedance) and every other port in its reference:
 *   Γ = S_ii + S_ij·S_ji·ΓL/(1 − S_jj·ΓL),   i = port, j = loaded
 * (common practice; for a two-port this is the familiar Γin = S11 + S12 S21 ΓL/(1 − S22 ΓL)). With the
 * other ports matched their incident waves vanish, so the two-port formula holds for any N-port.
 * Returns interleaved [Re, Im] per point; where 1 − S_jj·ΓL = 0 the result is NaN.
 */
export function loadedReflection(
  net: NetworkData,
  port: number,
  loaded: number,
  gammaRe: number,
  gammaIm: number,
  out?: Float64Array,
): Float64Array {
  const s = scattering(net);
  const points = checkEntry(s, port, loaded);
  if (port === loaded) throw new RangeError(`the loaded port must differ from port ${port}`);
  const res = outputArray(2 * points, out);
  const v = s.values;
  const n = s.ports;
  const i = port - 1;
  const j = loaded - 1;
  for (let k = 0; k < points; k++) {
    const base = 2 * k * n * n;
    const ii = base + 2 * (i * n + i);
    const ij = base + 2 * (i * n + j);
    const ji = base + 2 * (j * n + i);
    const jj = base + 2 * (j * n + j);
    // p = S_ij·S_ji·ΓL
    const tr = v[ij]! * v[ji]! - v[ij + 1]! * v[ji + 1]!;
    const ti = v[ij]! * v[ji + 1]! + v[ij + 1]! * v[ji]!;
    const pr = tr * gammaRe - ti * gammaIm;
    const pi = tr * gammaIm + ti * gammaRe;
    // q = 1 − S_jj·ΓL
    const qr = 1 - (v[jj]! * gammaRe - v[jj + 1]! * gammaIm);
    const qi = -(v[jj]! * gammaIm + v[jj + 1]! * gammaRe);
    const d = qr * qr + qi * qi;
    if (d === 0) {
      res[2 * k] = Number.NaN;
      res[2 * k + 1] = Number.NaN;
      continue;
    }
    res[2 * k] = v[ii]! + (pr * qr + pi * qi) / d;
    res[2 * k + 1] = v[ii + 1]! + (pi * qr - pr * qi) / d;
  }
  return res;
}

function checkEntry(s: NetworkData, to: number, from: number): number {
  const points = checkShape(s);
  checkPort(s, to);
  checkPort(s, from);
  return points;
}
