/**
 * Mixed-mode (differential and common-mode) S-parameters of networks whose single-ended ports come in
 * pairs, after Bockelman & Eisenstadt, "Combined differential and common-mode scattering parameters:
 * theory and simulation", IEEE Trans. Microwave Theory Tech. 43(7), 1995.
 *
 * The user names, for each pair k = 1..N, its positive port p_k and negative port n_k (1-based port
 * numbers of the single-ended network, as in Touchstone files); every port belongs to exactly one pair,
 * so the network has 2N ports (N = 2 for the usual four-port with two differential pairs). Per pair:
 *
 *   differential mode: v_d = v_p − v_n,       i_d = (i_p − i_n)/2,   reference z_d = 2·Z0
 *   common mode:       v_c = (v_p + v_n)/2,   i_c = i_p + i_n,       reference z_c = Z0/2
 *
 * where Z0 is the (real) reference of both single-ended ports of the pair. The two references of a pair
 * must be equal (to 1e-12 relative; otherwise renormalise first, e.g. with renormalizeNetwork): only
 * then are the mode waves the plain sums and differences
 *   a_d = (a_p − a_n)/√2,   a_c = (a_p + a_n)/√2   (and the same for b),
 * which follows from a = (v + z·i)/(2√z) with the mode quantities above. Different pairs may have
 * different Z0.
 *
 * Rows and columns of the mixed-mode matrix are ordered [D1, …, DN, C1, …, CN] (for two pairs:
 * [d1, d2, c1, c2]), so it has the block form
 *
 *   [ Sdd  Sdc ]      Sdd: differential response to differential drive, Sdc: differential response
 *   [ Scd  Scc ]      to common-mode drive, Scd: common-mode response to differential drive,
 *                     Scc: common-mode response to common-mode drive,
 *
 * e.g. entry (D2, C1) is Sdc21. With the real orthogonal matrix W (rows = modes, columns = single-ended
 * ports; row Dk has +1/√2 at p_k and −1/√2 at n_k, row Ck has +1/√2 at both), a_mm = W·a, hence
 *   S_mm = W·S·Wᵀ   and   S = Wᵀ·S_mm·W   (W⁻¹ = Wᵀ).
 * For pairs (1, 2) and (3, 4) W is the matrix M of Bockelman & Eisenstadt.
 *
 * @module
 */

import { formatFrequency } from '../format/frequency.js';
import { createMatrix, multiply } from './complex.js';
import { convertNetwork } from './convert.js';
import type { NetworkData } from './types.js';

/** A differential pair: [positive port, negative port], 1-based single-ended port numbers. */
export type PortPair = readonly [positive: number, negative: number];

/** Mixed-mode S-parameters, with the pairs they come from. */
export interface MixedModeData extends NetworkData {
  parameter: 'S';
  /** The single-ended pairs: pair k (1-based) gives the modes Dk and Ck. */
  pairs: readonly PortPair[];
  /**
   * Label of each row/column: ['D1', …, 'DN', 'C1', …, 'CN']. `references` follows the same order:
   * 2·Z0 for each differential mode, Z0/2 for each common mode.
   */
  modes: readonly string[];
}

/** Relative tolerance for the two references of a pair to count as equal. */
export const PAIR_REFERENCE_TOLERANCE = 1e-12;

/** The mode transform of a pairing, allocated once by {@link createModeTransform}. */
export interface ModeTransform {
  readonly ports: number;
  readonly pairs: readonly PortPair[];
  /** W (rows = modes, columns = single-ended ports), complex-interleaved with zero imaginary parts. */
  readonly w: Float64Array;
  /** Wᵀ. */
  readonly wt: Float64Array;
  /** Scratch matrix. */
  readonly tmp: Float64Array;
}

/** Checks that `pairs` uses every one of the ports 1..ports exactly once; returns N. */
function checkPairs(ports: number, pairs: readonly PortPair[], name: string): number {
  if (!Array.isArray(pairs) || pairs.length === 0) throw new RangeError(`mixed-mode data need at least one pair of ports`);
  if (ports !== 2 * pairs.length) {
    throw new RangeError(
      `${pairs.length} pair(s) need a ${2 * pairs.length}-port, the network has ${ports} ports ` +
        '(every single-ended port must belong to exactly one pair)',
    );
  }
  const seen = new Array<number>(ports + 1).fill(0);
  pairs.forEach((pair, k) => {
    if (!Array.isArray(pair) || pair.length !== 2) throw new RangeError(`pair ${k + 1} must be [positive, negative]`);
    for (const port of pair) {
      if (!Number.isInteger(port) || port < 1 || port > ports) {
        throw new RangeError(`pair ${k + 1} names port ${port}; ports are numbered 1..${ports}`);
      }
      if (seen[port]) throw new RangeError(`port ${port} appears in more than one place in the pairs`);
      seen[port] = k + 1;
    }
  });
  return pairs.length;
}

/**
 * Whether `net` is mixed-mode data (made by {@link mixedMode} or read from a file that says so):
 * it carries its pairs and mode labels, [D1, …, DN, C1, …, CN].
 */
export function isMixedMode(net: NetworkData): net is MixedModeData {
  const m = net as Partial<MixedModeData>;
  return Array.isArray(m.pairs) && Array.isArray(m.modes) && m.modes.length === net.ports && 2 * m.pairs.length === net.ports;
}

/**
 * Name of entry (i, j) (0-based) of mixed-mode data of `pairs` pairs, without the parameter
 * letter: `dd11`, `dc21`, `cd12`, `cc22` (response mode and pair first, then the drive's), as in
 * Bockelman & Eisenstadt's Sdd21 etc. With 10 pairs or more the pair numbers are separated by an
 * underscore (`dd10_2`) so that names stay unambiguous.
 */
export function modeEntryName(pairCount: number, i: number, j: number): string {
  const mode = (r: number): [string, number] => (r < pairCount ? ['d', r + 1] : ['c', r - pairCount + 1]);
  const [mi, ki] = mode(i);
  const [mj, kj] = mode(j);
  return `${mi}${mj}${ki}${pairCount >= 10 ? '_' : ''}${kj}`;
}

/**
 * The mode list of the Touchstone 2.0 `[Mixed-Mode Order]` keyword for these pairs, in our row order
 * [D1, …, DN, C1, …, CN]: `D p1,n1 … D pN,nN C p1,n1 … C pN,nN` written without spaces inside an
 * entry (`D1,3 D2,4 C1,3 C2,4`). In the standard an entry `Dx,y` (or `Cx,y`) is the differential
 * (common) mode of single-ended ports x and y, x the positive one (Touchstone 2.0 specification,
 * [Mixed-Mode Order]; from memory).
 */
export function touchstoneModeOrder(pairs: readonly PortPair[]): string {
  const d = pairs.map(([p, n]) => `D${p},${n}`);
  const c = pairs.map(([p, n]) => `C${p},${n}`);
  return [...d, ...c].join(' ');
}

/** Mode labels for N pairs: ['D1', …, 'DN', 'C1', …, 'CN']. */
export function modeLabels(pairCount: number): string[] {
  const labels: string[] = [];
  for (let k = 1; k <= pairCount; k++) labels.push(`D${k}`);
  for (let k = 1; k <= pairCount; k++) labels.push(`C${k}`);
  return labels;
}

/** Builds W and Wᵀ for a pairing of the ports 1..ports (see the module comment). */
export function createModeTransform(ports: number, pairs: readonly PortPair[]): ModeTransform {
  const count = checkPairs(ports, pairs, 'createModeTransform');
  const n = ports;
  const w = createMatrix(n);
  const wt = createMatrix(n);
  const h = Math.SQRT1_2;
  for (let k = 0; k < count; k++) {
    const p = pairs[k]![0] - 1;
    const m = pairs[k]![1] - 1;
    const d = k; // row Dk
    const c = count + k; // row Ck
    w[2 * (d * n + p)] = h;
    w[2 * (d * n + m)] = -h;
    w[2 * (c * n + p)] = h;
    w[2 * (c * n + m)] = h;
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) wt[2 * (j * n + i)] = w[2 * (i * n + j)]!;
  return { ports, pairs: pairs.map((p) => [p[0], p[1]] as const), w, wt, tmp: createMatrix(n) };
}

/** S_mm = W·S·Wᵀ for one single-ended matrix. `out` may be `s`. Allocates nothing. */
export function mixedModeMatrix(transform: ModeTransform, s: Float64Array, out: Float64Array): Float64Array {
  const n = transform.ports;
  multiply(n, transform.w, s, transform.tmp);
  return multiply(n, transform.tmp, transform.wt, out);
}

/** S = Wᵀ·S_mm·W for one mixed-mode matrix. `out` may be `smm`. Allocates nothing. */
export function singleEndedMatrix(transform: ModeTransform, smm: Float64Array, out: Float64Array): Float64Array {
  const n = transform.ports;
  multiply(n, transform.wt, smm, transform.tmp);
  return multiply(n, transform.tmp, transform.w, out);
}

function sameReference(a: number, b: number): boolean {
  return a === b || Math.abs(a - b) <= PAIR_REFERENCE_TOLERANCE * Math.max(a, b);
}

function checkData(net: NetworkData, name: string): void {
  const n = net.ports;
  const points = net.frequencies.length;
  if (net.values.length !== 2 * n * n * points) {
    throw new RangeError(`the network data hold ${net.values.length} numbers, expected 2·${n}²·${points} = ${2 * n * n * points}`);
  }
  if (net.references.length !== n) {
    throw new RangeError(`the network data have ${net.references.length} reference impedances for ${n} ports`);
  }
  for (let i = 0; i < n; i++) {
    const z = net.references[i]!;
    if (!(z > 0) || !Number.isFinite(z)) {
      throw new RangeError(`reference impedance ${i + 1} must be finite and > 0, got ${z}`);
    }
  }
}

function mapMatrices(
  net: NetworkData,
  transform: ModeTransform,
  apply: (t: ModeTransform, x: Float64Array, out: Float64Array) => Float64Array,
): Float64Array {
  const n = net.ports;
  const size = 2 * n * n;
  const points = net.frequencies.length;
  const values = new Float64Array(size * points);
  const buffer = createMatrix(n);
  for (let k = 0; k < points; k++) {
    const offset = k * size;
    for (let t = 0; t < size; t++) buffer[t] = net.values[offset + t]!;
    apply(transform, buffer, buffer);
    for (let t = 0; t < size; t++) {
      if (!Number.isFinite(buffer[t]!)) {
        throw new RangeError(
          `the mode conversion overflows at ${formatFrequency(net.frequencies[k]!)} (frequency point ${k}): ` +
            'a sum of entries is beyond the range of double-precision numbers (about 1.8e308)',
        );
      }
      values[offset + t] = buffer[t]!;
    }
  }
  return values;
}

/**
 * Mixed-mode S-parameters of a network whose 2N single-ended ports form the N differential `pairs`
 * ([positive, negative], 1-based), ordered [D1, …, DN, C1, …, CN] (module comment). Z or Y data is first
 * converted to S. The two references of each pair must be equal (Z0_k); the result has references
 * 2·Z0_k for Dk and Z0_k/2 for Ck. Throws RangeError for a bad pairing or unequal references in a pair.
 */
export function mixedMode(net: NetworkData, pairs: readonly PortPair[]): MixedModeData {
  checkData(net, 'mixedMode');
  const transform = createModeTransform(net.ports, pairs);
  const count = pairs.length;
  const references = new Float64Array(net.ports);
  for (let k = 0; k < count; k++) {
    const [p, m] = pairs[k]!;
    const zp = net.references[p - 1]!;
    const zn = net.references[m - 1]!;
    if (!sameReference(zp, zn)) {
      throw new RangeError(
        `pair ${k + 1} has unequal references (port ${p}: ${zp} ohm, port ${m}: ${zn} ohm); ` +
          'mixed-mode waves need equal references within a pair, renormalise first',
      );
    }
    references[k] = 2 * zp;
    references[count + k] = zp / 2;
  }
  const s = net.parameter === 'S' ? net : convertNetwork(net, 'S');
  const result: MixedModeData = {
    parameter: 'S',
    ports: net.ports,
    frequencies: net.frequencies.slice(),
    references,
    values: mapMatrices(s, transform, mixedModeMatrix),
    pairs: transform.pairs,
    modes: modeLabels(count),
  };
  if (net.title !== undefined) result.title = net.title;
  if (net.comments !== undefined) result.comments = net.comments.slice();
  return result;
}

/**
 * Single-ended S-parameters back from mixed-mode data (the inverse of {@link mixedMode}), using
 * `mm.pairs` to place the ports. Each pair's mode references must be consistent, z_Dk = 4·z_Ck (to 1e-12
 * relative), and give the single-ended reference Z0_k = z_Dk/2 of both its ports. Throws RangeError
 * otherwise.
 */
export function singleEnded(mm: MixedModeData): NetworkData {
  checkData(mm, 'singleEnded');
  if (mm.parameter !== 'S') throw new RangeError(`mixed-mode data must be S, got ${mm.parameter}`);
  const transform = createModeTransform(mm.ports, mm.pairs);
  const count = mm.pairs.length;
  const references = new Float64Array(mm.ports);
  for (let k = 0; k < count; k++) {
    const zd = mm.references[k]!;
    const zc = mm.references[count + k]!;
    if (!sameReference(zd, 4 * zc)) {
      throw new RangeError(
        `pair ${k + 1} has differential reference ${zd} ohm and common-mode reference ${zc} ohm; ` +
          'they must be 2·Z0 and Z0/2 for one Z0',
      );
    }
    const [p, m] = mm.pairs[k]!;
    references[p - 1] = zd / 2;
    references[m - 1] = zd / 2;
  }
  const result: NetworkData = {
    parameter: 'S',
    ports: mm.ports,
    frequencies: mm.frequencies.slice(),
    references,
    values: mapMatrices(mm, transform, singleEndedMatrix),
  };
  if (mm.title !== undefined) result.title = mm.title;
  if (mm.comments !== undefined) result.comments = mm.comments.slice();
  return result;
}
