/**
 * Tests for src/network/algebra.ts (ABCD, T, H, cascade) and src/network/mixed-mode.ts.
 *
 * Sources (named again beside each check):
 * - [ABCD-TABLE] chain matrices of a series impedance Z, [1 Z; 0 1]; a shunt admittance Y, [1 0; Y 1];
 *   a lossless line of electrical length θ and characteristic impedance Zc,
 *   [cos θ, jZc sin θ; j sin θ/Zc, cos θ]; and of a cascade, the product. Common practice; e.g. Pozar,
 *   Microwave Engineering, table 4.1 (table number (from memory)).
 * - [LINE-Z] open-circuit impedance matrix of a lossless line, Z11 = Z22 = −jZc cot θ,
 *   Z12 = Z21 = −jZc csc θ. Common practice (same book, (from memory)).
 * - [WAVES] S from Z or Y with real references z_i (power waves, Kurokawa 1965 (from memory)):
 *   with G = diag(1/√z_i), Z̄ = G·Z·G, S = (Z̄ − U)(Z̄ + U)⁻¹; Ȳ = G⁻¹·Y·G⁻¹, S = (U + Ȳ)⁻¹(U − Ȳ);
 *   written out naively with mathjs (general-purpose library) as an independent implementation.
 * - [DEF] the defining relations of each representation, as stated in algebra.ts:
 *   [V1; I1] = ABCD·[V2; −I2], [b1; a1] = T·[a2; b2], [V1; I2] = H·[I1; V2] (common practice).
 * - [BE95] Bockelman & Eisenstadt, "Combined differential and common-mode scattering parameters: theory
 *   and simulation", IEEE Trans. MTT 43(7), 1995 (from memory): v_d = v_p − v_n, i_d = (i_p − i_n)/2,
 *   v_c = (v_p + v_n)/2, i_c = i_p + i_n, z_d = 2Z0, z_c = Z0/2; S_mm = M·S·M⁻¹ with, for pairs
 *   (1, 2) and (3, 4), M = (1/√2)[1 −1 0 0; 0 0 1 −1; 1 1 0 0; 0 0 1 1]; mode order [d1, d2, c1, c2].
 *
 * Tolerances: "relative" means max-entry error ≤ tol · max(1, max-entry modulus of the reference).
 * For ABCD and H, whose entries have different units, entries are first normalised by the references
 * (A√(z2/z1), B/√(z1z2), C√(z1z2), D√(z1/z2); H11/z1, H12√(z2/z1), H21√(z2/z1), H22·z2).
 * Random draws use fast-check with fixed seeds.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as math from 'mathjs';
import type { Complex, Matrix } from 'mathjs';

import {
  FrequencyGridError,
  TwoPortConversionError,
  cascade,
  chainFromScattering,
  createTwoPortWorkspace,
  fromChain,
  fromHybrid,
  fromTransfer,
  fromTwoPort,
  hybridFromScattering,
  scatteringFromChain,
  scatteringFromHybrid,
  scatteringFromTransfer,
  toChain,
  toHybrid,
  toTransfer,
  transferFromScattering,
  type ChainData,
  type TransferData,
} from '../src/network/algebra.js';
import {
  createModeTransform,
  mixedMode,
  mixedModeMatrix,
  singleEnded,
  singleEndedMatrix,
  type MixedModeData,
  type PortPair,
} from '../src/network/mixed-mode.js';
import { renormalizeNetwork } from '../src/network/convert.js';
import type { NetworkData } from '../src/network/types.js';

// ------------------------------------------------------------------------------------------------
// helpers

const TOL = 1e-12;
const work = createTwoPortWorkspace();

function cx(v: unknown): { re: number; im: number } {
  if (typeof v === 'number') return { re: v, im: 0 };
  const c = v as Complex;
  return { re: c.re, im: c.im };
}

function toMath(a: Float64Array, n: number): Matrix {
  const rows: Complex[][] = [];
  for (let i = 0; i < n; i++) {
    const row: Complex[] = [];
    for (let j = 0; j < n; j++) row.push(math.complex(a[2 * (i * n + j)]!, a[2 * (i * n + j) + 1]!));
    rows.push(row);
  }
  return math.matrix(rows);
}

function fromMath(m: unknown, n: number): Float64Array {
  const arr = (m as Matrix).toArray() as unknown[][];
  const out = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const c = cx(arr[i]![j]);
      out[2 * (i * n + j)] = c.re;
      out[2 * (i * n + j) + 1] = c.im;
    }
  }
  return out;
}

/** Builds an n×n interleaved matrix from mathjs complex values (row-major). */
function matrixOf(n: number, entries: unknown[]): Float64Array {
  const out = new Float64Array(2 * n * n);
  entries.forEach((e, k) => {
    const c = cx(e);
    out[2 * k] = c.re;
    out[2 * k + 1] = c.im;
  });
  return out;
}

function entry(a: Float64Array, n: number, i: number, j: number): { re: number; im: number } {
  return { re: a[2 * (i * n + j)]!, im: a[2 * (i * n + j) + 1]! };
}

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (let k = 0; k < a.length; k += 2) m = Math.max(m, Math.hypot(a[k]!, a[k + 1]!));
  return m;
}

function maxAbsDiff(a: Float64Array, b: Float64Array): number {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let k = 0; k < a.length; k += 2) m = Math.max(m, Math.hypot(a[k]! - b[k]!, a[k + 1]! - b[k + 1]!));
  return m;
}

/** max |a − ref| ≤ tol · max(1, max |ref|). */
function expectClose(a: Float64Array, ref: Float64Array, tol = TOL): void {
  expect(maxAbsDiff(a, ref)).toBeLessThanOrEqual(tol * Math.max(1, maxAbs(ref)));
}

/** Normalises a chain matrix by the references (see the header). */
function normChain(abcd: Float64Array, z1: number, z2: number): Float64Array {
  const f = [Math.sqrt(z2 / z1), 1 / Math.sqrt(z1 * z2), Math.sqrt(z1 * z2), Math.sqrt(z1 / z2)];
  return abcd.map((x, k) => x * f[k >> 1]!);
}
function expectChainClose(abcd: Float64Array, ref: Float64Array, z1: number, z2: number, tol = TOL): void {
  expectClose(normChain(abcd, z1, z2), normChain(ref, z1, z2), tol);
}

/** Normalises a hybrid matrix by the references (see the header). */
function normHybrid(h: Float64Array, z1: number, z2: number): Float64Array {
  const f = [1 / z1, Math.sqrt(z2 / z1), Math.sqrt(z2 / z1), z2];
  return h.map((x, k) => x * f[k >> 1]!);
}

function diagMath(values: number[]): Matrix {
  return math.diag(values) as Matrix;
}

/** [WAVES] S from an impedance matrix with real references, written out with mathjs. */
function sFromZ(z: Matrix, z0: number[]): Float64Array {
  const n = z0.length;
  const g = diagMath(z0.map((x) => 1 / Math.sqrt(x)));
  const u = math.identity(n) as Matrix;
  const zb = math.multiply(math.multiply(g, z), g) as Matrix;
  return fromMath(math.multiply(math.subtract(zb, u), math.inv(math.add(zb, u) as Matrix)), n);
}

/** [WAVES] S from an admittance matrix with real references, written out with mathjs. */
function sFromY(y: Matrix, z0: number[]): Float64Array {
  const n = z0.length;
  const gi = diagMath(z0.map((x) => Math.sqrt(x)));
  const u = math.identity(n) as Matrix;
  const yb = math.multiply(math.multiply(gi, y), gi) as Matrix;
  return fromMath(math.multiply(math.inv(math.add(u, yb) as Matrix), math.subtract(u, yb)), n);
}

const C = (re: number, im = 0): Complex => math.complex(re, im);
const mul = (a: unknown, b: unknown): Complex => math.multiply(a as Complex, b as Complex) as Complex;
const div = (a: unknown, b: unknown): Complex => math.divide(a as Complex, b as Complex) as Complex;
const add = (a: unknown, b: unknown): Complex => math.add(a as Complex, b as Complex) as Complex;
const neg = (a: unknown): Complex => math.unaryMinus(a as Complex) as Complex;

/** S of a series impedance between references z1, z2, from its admittance matrix ([WAVES]). */
function seriesS(z: Complex, z1: number, z2: number): Float64Array {
  const y = div(1, z);
  return sFromY(math.matrix([[y, neg(y)], [neg(y), y]]), [z1, z2]);
}

/** S of a shunt admittance between references z1, z2, from its impedance matrix ([WAVES]). */
function shuntS(y: Complex, z1: number, z2: number): Float64Array {
  const z = div(1, y);
  return sFromZ(math.matrix([[z, z], [z, z]]), [z1, z2]);
}

/** S of a lossless line (θ, Zc) between references z1, z2, from [LINE-Z] and [WAVES]. */
function lineS(theta: number, zc: number, z1: number, z2: number): Float64Array {
  const zs = C(0, -zc / Math.tan(theta));
  const zm = C(0, -zc / Math.sin(theta));
  return sFromZ(math.matrix([[zs, zm], [zm, zs]]), [z1, z2]);
}

function net2(frequencies: number[], matrices: Float64Array[], refs: [number, number]): NetworkData {
  const values = new Float64Array(8 * matrices.length);
  matrices.forEach((m, k) => values.set(m, 8 * k));
  return {
    parameter: 'S',
    ports: 2,
    frequencies: Float64Array.from(frequencies),
    references: Float64Array.from(refs),
    values,
  };
}

function slice(values: Float64Array, n: number, k: number): Float64Array {
  return values.slice(2 * n * n * k, 2 * n * n * (k + 1));
}

// ------------------------------------------------------------------------------------------------
// arbitraries

/** Grid values k·bound/2²⁰ in [lo, hi] (keeps subnormals out). */
function real(lo: number, hi: number): fc.Arbitrary<number> {
  const q = 2 ** 20;
  return fc.integer({ min: 0, max: q }).map((k) => lo + ((hi - lo) * k) / q);
}
const reference = real(0, 2).map((x) => 5 * 10 ** x); // 5 .. 500 ohm, log-uniform
const impedance = fc.record({ re: real(0, 300), im: real(-300, 300) }).map(({ re, im }) => C(re + 0.5, im));

/** Random 2×2 S with max-entry modulus ≤ 0.9·√2 and |S21| ≥ 0.1; ‖S‖∞ ≤ 0.9 so U − E·S is invertible. */
const twoPortS = fc.array(real(-1, 1), { minLength: 8, maxLength: 8 }).map((xs) => {
  const s = Float64Array.from(xs);
  let norm = 0;
  for (let i = 0; i < 2; i++) norm = Math.max(norm, Math.hypot(s[4 * i]!, s[4 * i + 1]!) + Math.hypot(s[4 * i + 2]!, s[4 * i + 3]!));
  if (norm > 0.9) for (let k = 0; k < 8; k++) s[k] = (s[k]! * 0.9) / norm;
  if (Math.hypot(s[4]!, s[5]!) < 0.1) s[4] = s[4]! >= 0 ? 0.1 : -0.1;
  return s;
});

const SEED = { seed: 19950701, numRuns: 200 };

// ------------------------------------------------------------------------------------------------

describe('chain (ABCD) matrix of closed-form two-ports', () => {
  it('the mathjs S of a series impedance matches the closed form S11 = Z/(Z + 2Z0), S21 = 2Z0/(Z + 2Z0) (common practice; checks the reference helper), 1e-12', () => {
    const z = C(37, -12);
    const z0 = 50;
    const s = seriesS(z, z0, z0);
    const den = add(z, 2 * z0);
    expectClose(s, matrixOf(2, [div(z, den), div(2 * z0, den), div(2 * z0, den), div(z, den)]));
  });

  it('series impedance: ABCD = [1 Z; 0 1] [ABCD-TABLE], with S from its admittance matrix [WAVES], unequal references, both directions, 1e-12', () => {
    fc.assert(
      fc.property(impedance, reference, reference, (z, z1, z2) => {
        const s = seriesS(z, z1, z2);
        const expected = matrixOf(2, [1, z, 0, 1]);
        const abcd = chainFromScattering(s, Float64Array.of(z1, z2), new Float64Array(8), work);
        expectChainClose(abcd, expected, z1, z2);
        expectClose(scatteringFromChain(expected, Float64Array.of(z1, z2), new Float64Array(8), work), s);
      }),
      SEED,
    );
  });

  it('shunt admittance: ABCD = [1 0; Y 1] [ABCD-TABLE], with S from its impedance matrix [WAVES], both directions, 1e-12', () => {
    fc.assert(
      fc.property(impedance, reference, reference, (zy, z1, z2) => {
        const y = div(1, zy); // admittance of a random impedance with positive real part
        const s = shuntS(y, z1, z2);
        const expected = matrixOf(2, [1, 0, y, 1]);
        const abcd = chainFromScattering(s, Float64Array.of(z1, z2), new Float64Array(8), work);
        expectChainClose(abcd, expected, z1, z2);
        expectClose(scatteringFromChain(expected, Float64Array.of(z1, z2), new Float64Array(8), work), s);
      }),
      SEED,
    );
  });

  it('lossless line: ABCD = [cos θ, jZc sin θ; j sin θ/Zc, cos θ] [ABCD-TABLE], S from [LINE-Z] + [WAVES], both directions, 1e-11', () => {
    // 1e-11: the Z-matrix route of the reference has cot θ and csc θ, which lose a few digits near θ = kπ
    fc.assert(
      fc.property(real(0.2, 2.9), reference, reference, reference, (theta, zc, z1, z2) => {
        const s = lineS(theta, zc, z1, z2);
        const expected = matrixOf(2, [
          Math.cos(theta),
          C(0, zc * Math.sin(theta)),
          C(0, Math.sin(theta) / zc),
          Math.cos(theta),
        ]);
        const abcd = chainFromScattering(s, Float64Array.of(z1, z2), new Float64Array(8), work);
        expectChainClose(abcd, expected, z1, z2, 1e-11);
        expectClose(scatteringFromChain(expected, Float64Array.of(z1, z2), new Float64Array(8), work), s, 1e-11);
      }),
      SEED,
    );
  });

  it('a line matched to its references has S = [0 e^{−jθ}; e^{−jθ} 0] (common practice), from the ABCD of [ABCD-TABLE], 1e-14 absolute', () => {
    const theta = 1.234;
    const zc = 75;
    const abcd = matrixOf(2, [Math.cos(theta), C(0, zc * Math.sin(theta)), C(0, Math.sin(theta) / zc), Math.cos(theta)]);
    const s = scatteringFromChain(abcd, Float64Array.of(zc, zc), new Float64Array(8), work);
    const t = C(Math.cos(theta), -Math.sin(theta));
    expect(maxAbsDiff(s, matrixOf(2, [0, t, t, 0]))).toBeLessThanOrEqual(1e-14);
  });

  it('[DEF] [V1; I1] = ABCD·[V2; −I2] for random impedance matrices Z and port currents (V = Z·I), S from [WAVES], 1e-11 relative on normalised V, I', () => {
    fc.assert(
      fc.property(
        fc.array(real(-40, 40), { minLength: 8, maxLength: 8 }),
        real(50, 200),
        real(50, 200),
        fc.array(real(-1, 1), { minLength: 4, maxLength: 4 }),
        reference,
        reference,
        (zs, d1, d2, cur, z1, z2) => {
          const z = matrixOf(2, [C(zs[0]! + d1, zs[1]!), C(zs[2]!, zs[3]!), C(zs[4]!, zs[5]!), C(zs[6]! + d2, zs[7]!)]);
          const s = sFromZ(toMath(z, 2), [z1, z2]);
          const abcd = chainFromScattering(s, Float64Array.of(z1, z2), new Float64Array(8), work);
          const A = toMath(abcd, 2);
          const I = math.matrix([C(cur[0]!, cur[1]!), C(cur[2]!, cur[3]!)]);
          const V = math.multiply(toMath(z, 2), I) as Matrix;
          const v = V.toArray() as Complex[];
          const i = I.toArray() as Complex[];
          const rhs = math.matrix([v[1]!, neg(i[1]!)]);
          const lhs = (math.multiply(A, rhs) as Matrix).toArray() as Complex[];
          // normalised: v/√z1, i·√z1 at port 1
          const got = Float64Array.of(cx(lhs[0]).re / Math.sqrt(z1), cx(lhs[0]).im / Math.sqrt(z1), cx(lhs[1]).re * Math.sqrt(z1), cx(lhs[1]).im * Math.sqrt(z1));
          const want = Float64Array.of(cx(v[0]).re / Math.sqrt(z1), cx(v[0]).im / Math.sqrt(z1), cx(i[0]).re * Math.sqrt(z1), cx(i[0]).im * Math.sqrt(z1));
          expect(maxAbsDiff(got, want)).toBeLessThanOrEqual(1e-11 * maxAbs(want));
        },
      ),
      SEED,
    );
  });
});

describe('transfer (T) matrix', () => {
  it('[DEF] [b1; a1] = T·[a2; b2] for random S and incident waves a (b = S·a), 1e-11 relative', () => {
    fc.assert(
      fc.property(twoPortS, fc.array(real(-1, 1), { minLength: 4, maxLength: 4 }), (s, w) => {
        const t = transferFromScattering(s, new Float64Array(8), work);
        const a = math.matrix([C(w[0]!, w[1]!), C(w[2]!, w[3]!)]);
        const b = (math.multiply(toMath(s, 2), a) as Matrix).toArray() as Complex[];
        const av = a.toArray() as Complex[];
        const lhs = (math.multiply(toMath(t, 2), math.matrix([av[1]!, b[1]!])) as Matrix).toArray() as Complex[];
        const got = Float64Array.of(cx(lhs[0]).re, cx(lhs[0]).im, cx(lhs[1]).re, cx(lhs[1]).im);
        const want = Float64Array.of(cx(b[0]).re, cx(b[0]).im, cx(av[0]).re, cx(av[0]).im);
        // 1e-11: |T| grows like 1/|S21|, and the draws have |S21| ≥ 0.1
        expect(maxAbsDiff(got, want)).toBeLessThanOrEqual(1e-11 * Math.max(1, maxAbs(want)));
      }),
      SEED,
    );
  });

  it('matched line: T = diag(e^{−jθ}, e^{jθ}) (from [DEF] with S = [0 e^{−jθ}; e^{−jθ} 0], common practice), 1e-15 absolute', () => {
    const theta = 0.7;
    const e = C(Math.cos(theta), -Math.sin(theta));
    const t = transferFromScattering(matrixOf(2, [0, e, e, 0]), new Float64Array(8), work);
    expect(maxAbsDiff(t, matrixOf(2, [e, 0, 0, C(Math.cos(theta), Math.sin(theta))]))).toBeLessThanOrEqual(1e-15);
  });

  it('T of a cascade with equal references at the junction is the product T1·T2 (common practice; cascade result from the chain route), 1e-11 relative', () => {
    fc.assert(
      fc.property(twoPortS, twoPortS, reference, reference, reference, (s1, s2, z1, zm, z2) => {
        const a = net2([1e9], [s1], [z1, zm]);
        const b = net2([1e9], [s2], [zm, z2]);
        const t = toTransfer(cascade(a, b)).values;
        const t1 = transferFromScattering(s1, new Float64Array(8), work);
        const t2 = transferFromScattering(s2, new Float64Array(8), work);
        // conditioning: |T| ≤ 10/|S21| ≈ 100 per section
        expectClose(t, fromMath(math.multiply(toMath(t1, 2), toMath(t2, 2)), 2), 1e-11);
      }),
      SEED,
    );
  });
});

describe('hybrid (H) matrix', () => {
  it('[DEF] [V1; I2] = H·[I1; V2] for random impedance matrices Z, S from [WAVES], 1e-11 relative on normalised quantities', () => {
    fc.assert(
      fc.property(
        fc.array(real(-40, 40), { minLength: 8, maxLength: 8 }),
        real(50, 200),
        real(50, 200),
        fc.array(real(-1, 1), { minLength: 4, maxLength: 4 }),
        reference,
        reference,
        (zs, d1, d2, cur, z1, z2) => {
          const z = matrixOf(2, [C(zs[0]! + d1, zs[1]!), C(zs[2]!, zs[3]!), C(zs[4]!, zs[5]!), C(zs[6]! + d2, zs[7]!)]);
          const s = sFromZ(toMath(z, 2), [z1, z2]);
          const h = hybridFromScattering(s, Float64Array.of(z1, z2), new Float64Array(8), work);
          const I = math.matrix([C(cur[0]!, cur[1]!), C(cur[2]!, cur[3]!)]);
          const v = (math.multiply(toMath(z, 2), I) as Matrix).toArray() as Complex[];
          const i = I.toArray() as Complex[];
          const lhs = (math.multiply(toMath(h, 2), math.matrix([i[0]!, v[1]!])) as Matrix).toArray() as Complex[];
          const r1 = Math.sqrt(z1);
          const r2 = Math.sqrt(z2);
          const got = Float64Array.of(cx(lhs[0]).re / r1, cx(lhs[0]).im / r1, cx(lhs[1]).re * r2, cx(lhs[1]).im * r2);
          const want = Float64Array.of(cx(v[0]).re / r1, cx(v[0]).im / r1, cx(i[1]).re * r2, cx(i[1]).im * r2);
          expect(maxAbsDiff(got, want)).toBeLessThanOrEqual(1e-11 * maxAbs(want));
        },
      ),
      SEED,
    );
  });

  it('series impedance: H = [Z 1; −1 0] (from [DEF]: V2 = 0 shorts port 2, so V1 = Z·I1 and I2 = −I1; I1 = 0 gives V1 = V2, I2 = 0; common practice), 1e-12', () => {
    const z = C(20, 35);
    const s = seriesS(z, 50, 75);
    const h = hybridFromScattering(s, Float64Array.of(50, 75), new Float64Array(8), work);
    expectClose(normHybrid(h, 50, 75), normHybrid(matrixOf(2, [z, 1, -1, 0]), 50, 75));
  });
});

describe('round trips on random two-ports (1e-12 relative)', () => {
  it('S → ABCD → S, S → T → S, S → H → S per matrix and for whole networks', () => {
    fc.assert(
      fc.property(twoPortS, twoPortS, reference, reference, (s, s2, z1, z2) => {
        const z0 = Float64Array.of(z1, z2);
        const out = new Float64Array(8);
        expectClose(scatteringFromChain(chainFromScattering(s, z0, out, work), z0, out, work), s);
        expectClose(scatteringFromTransfer(transferFromScattering(s, out, work), out, work), s);
        expectClose(scatteringFromHybrid(hybridFromScattering(s, z0, out, work), z0, out, work), s);
        const net = net2([1e8, 2e8], [s, s2], [z1, z2]);
        expectClose(fromChain(toChain(net)).values, net.values);
        expectClose(fromTransfer(toTransfer(net)).values, net.values);
        expectClose(fromHybrid(toHybrid(net)).values, net.values);
        // whole-network results equal the per-matrix ones (same formulas), exactly
        expect(toChain(net).values.slice(8, 16)).toEqual(chainFromScattering(s2, z0, new Float64Array(8), work));
      }),
      SEED,
    );
  });

  it('fromChain with other references gives the same network re-expressed: equals renormalizeNetwork (convert.ts, an independent route), 1e-11 (two conversions against one renormalisation)', () => {
    fc.assert(
      fc.property(twoPortS, reference, reference, reference, reference, (s, z1, z2, w1, w2) => {
        const net = net2([1e9], [s], [z1, z2]);
        const moved = fromChain(toChain(net), Float64Array.of(w1, w2));
        expectClose(moved.values, renormalizeNetwork(net, Float64Array.of(w1, w2)).values, 1e-11);
        expect(Array.from(moved.references)).toEqual([w1, w2]);
      }),
      SEED,
    );
  });
});

describe('conversions that do not exist', () => {
  const shuntShort = matrixOf(2, [-1, 0, 0, -1]); // S of a shunt short circuit, any references (common practice)
  const isolated = matrixOf(2, [0, 0, 0, 0]); // two matched, unconnected ports

  it('a shunt short circuit has no ABCD and no T (S21 = 0), a TwoPortConversionError naming the target', () => {
    expect(() => chainFromScattering(shuntShort, Float64Array.of(50, 50), new Float64Array(8), work)).toThrow(
      TwoPortConversionError,
    );
    try {
      transferFromScattering(shuntShort, new Float64Array(8), work);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(TwoPortConversionError);
      expect((e as TwoPortConversionError).to).toBe('T');
      expect((e as TwoPortConversionError).from).toBe('S');
    }
  });

  it('a nearly short shunt admittance (Y = 1e6 S) still converts: C = Y to 1e-9 relative [ABCD-TABLE]', () => {
    const s = shuntS(C(1e6), 50, 50);
    const abcd = chainFromScattering(s, Float64Array.of(50, 50), new Float64Array(8), work);
    expect(Math.abs(abcd[4]! - 1e6)).toBeLessThanOrEqual(1e-9 * 1e6);
  });

  it('two isolated matched ports have H = diag(z1, 1/z2) (from [DEF]: V1 = z1·I1, I2 = V2/z2) but no ABCD or T', () => {
    const z0 = Float64Array.of(40, 60);
    const h = hybridFromScattering(isolated, z0, new Float64Array(8), work);
    expectClose(normHybrid(h, 40, 60), normHybrid(matrixOf(2, [40, 0, 0, 1 / 60]), 40, 60));
    expect(() => chainFromScattering(isolated, z0, new Float64Array(8), work)).toThrow(TwoPortConversionError);
    expect(() => transferFromScattering(isolated, new Float64Array(8), work)).toThrow(TwoPortConversionError);
  });

  it('an open port 1 isolated from a shorted port 2 (S = diag(1, −1)) has no H: H11 = V1/I1 with V2 = 0 is unbounded [DEF]', () => {
    try {
      hybridFromScattering(matrixOf(2, [1, 0, 0, -1]), Float64Array.of(50, 50), new Float64Array(8), work);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(TwoPortConversionError);
      expect((e as TwoPortConversionError).to).toBe('H');
    }
  });

  it('S from ABCD does not exist for a series resistance −(z1 + z2) (N = A·z2 + B + C·z1·z2 + D·z1 = 0), nor from T with T22 = 0', () => {
    expect(() => scatteringFromChain(matrixOf(2, [1, -125, 0, 1]), Float64Array.of(50, 75), new Float64Array(8), work)).toThrow(
      TwoPortConversionError,
    );
    expect(() => scatteringFromTransfer(matrixOf(2, [1, 0, 0, 0]), new Float64Array(8), work)).toThrow(TwoPortConversionError);
    expect(() => scatteringFromChain(matrixOf(2, [1, Number.NaN, 0, 1]), Float64Array.of(50, 75), new Float64Array(8), work)).toThrow(
      TwoPortConversionError,
    );
  });

  it('whole-network conversions name the frequency point; malformed data gives RangeError', () => {
    const good = seriesS(C(10), 50, 50);
    const net = net2([1e6, 2e6, 3e6], [good, shuntShort, good], [50, 50]);
    try {
      toChain(net);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(TwoPortConversionError);
      expect((e as TwoPortConversionError).frequencyIndex).toBe(1);
      expect((e as TwoPortConversionError).frequency).toBe(2e6);
      expect((e as Error).message).toContain('frequency point 1');
    }
    const three: NetworkData = { ...net, ports: 3, references: Float64Array.of(50, 50, 50), values: new Float64Array(18 * 3) };
    expect(() => toChain(three)).toThrow(RangeError);
    const bare: ChainData = { representation: 'ABCD', frequencies: Float64Array.of(1e6), values: matrixOf(2, [1, 0, 0, 1]) };
    expect(() => fromChain(bare)).toThrow(RangeError); // no references known
    expectClose(fromChain(bare, Float64Array.of(50, 50)).values, matrixOf(2, [0, 1, 1, 0])); // thru [ABCD-TABLE, θ = 0]
    const t: TransferData = { ...toTransfer(net2([1e6], [good], [50, 50])) };
    expect(() => fromTwoPort(t, Float64Array.of(50, 75))).toThrow(RangeError); // T only for its own references
  });
});

describe('cascade', () => {
  it('equals the product of the sections\' ABCD matrices (common practice, [ABCD-TABLE]), interface references differing, 1e-11 relative', () => {
    fc.assert(
      fc.property(twoPortS, twoPortS, reference, reference, reference, reference, (s1, s2, z1, za, zb, z2) => {
        const a = net2([1e9], [s1], [z1, za]);
        const b = net2([1e9], [s2], [zb, z2]);
        const r = cascade(a, b);
        expect(Array.from(r.references)).toEqual([z1, z2]);
        const abcd = chainFromScattering(r.values, r.references, new Float64Array(8), work);
        const m1 = chainFromScattering(s1, Float64Array.of(z1, za), new Float64Array(8), work);
        const m2 = chainFromScattering(s2, Float64Array.of(zb, z2), new Float64Array(8), work);
        // mathjs (general-purpose library) multiplies the two chain matrices
        expectChainClose(abcd, fromMath(math.multiply(toMath(m1, 2), toMath(m2, 2)), 2), z1, z2, 1e-11);
      }),
      SEED,
    );
  });

  it('two series impedances equal one series impedance Z1 + Z2 (common practice), S from [WAVES], 1e-12', () => {
    fc.assert(
      fc.property(impedance, impedance, reference, reference, reference, reference, (za, zb, z1, m1, m2, z2) => {
        const r = cascade(net2([1e9], [seriesS(za, z1, m1)], [z1, m1]), net2([1e9], [seriesS(zb, m2, z2)], [m2, z2]));
        expectClose(r.values, seriesS(add(za, zb), z1, z2));
      }),
      SEED,
    );
  });

  it('series impedance then shunt admittance (L section): ABCD [1 + ZY, Z; Y, 1] [ABCD-TABLE] and S from its impedance matrix [[Z + 1/Y, 1/Y], [1/Y, 1/Y]] (common practice) [WAVES], 1e-12', () => {
    fc.assert(
      fc.property(impedance, impedance, reference, reference, reference, (z, zy, z1, zm, z2) => {
        const y = div(1, zy);
        const r = cascade(net2([1e9], [seriesS(z, z1, zm)], [z1, zm]), net2([1e9], [shuntS(y, zm, z2)], [zm, z2]));
        const zinv = div(1, y);
        expectClose(r.values, sFromZ(math.matrix([[add(z, zinv), zinv], [zinv, zinv]]), [z1, z2]));
        const abcd = chainFromScattering(r.values, r.references, new Float64Array(8), work);
        expectChainClose(abcd, matrixOf(2, [add(1, mul(z, y)), z, y, 1]), z1, z2);
      }),
      SEED,
    );
  });

  it('two lengths of the same lossless line add up: θ1 + θ2 (common practice), S from [LINE-Z] + [WAVES], 1e-11', () => {
    fc.assert(
      fc.property(real(0.1, 1.4), real(0.1, 1.4), reference, reference, reference, reference, (t1, t2, zc, z1, zm, z2) => {
        const r = cascade(net2([1e9], [lineS(t1, zc, z1, zm)], [z1, zm]), net2([1e9], [lineS(t2, zc, zm, z2)], [zm, z2]));
        expectClose(r.values, lineS(t1 + t2, zc, z1, z2), 1e-11);
      }),
      SEED,
    );
  });

  it('a zero-length matched line (S = [0 1; 1 0]) is the identity on either side; a zero-length junction to another reference renormalises (renormalizeNetwork, convert.ts), 1e-12 and 1e-11', () => {
    fc.assert(
      fc.property(twoPortS, twoPortS, reference, reference, reference, (s1, s2, z1, z2, z3) => {
        const net = net2([1e8, 2e8], [s1, s2], [z1, z2]);
        const thru1 = net2([1e8, 2e8], [matrixOf(2, [0, 1, 1, 0]), matrixOf(2, [0, 1, 1, 0])], [z1, z1]);
        const thru2 = net2([1e8, 2e8], [matrixOf(2, [0, 1, 1, 0]), matrixOf(2, [0, 1, 1, 0])], [z2, z2]);
        expectClose(cascade(thru1, net).values, net.values);
        expectClose(cascade(net, thru2).values, net.values);
        // S of a junction from reference z2 to z3 (common practice): S11 = (z3 − z2)/(z2 + z3), S21 = 2√(z2 z3)/(z2 + z3)
        const g = (z3 - z2) / (z2 + z3);
        const t = (2 * Math.sqrt(z2 * z3)) / (z2 + z3);
        const step = matrixOf(2, [g, t, t, -g]);
        const junction = net2([1e8, 2e8], [step, step], [z2, z3]);
        const r = cascade(net, junction);
        expectClose(r.values, renormalizeNetwork(net, Float64Array.of(z1, z3)).values, 1e-11);
      }),
      SEED,
    );
  });

  it('three sections: cascade(a, b, c) = cascade(cascade(a, b), c) = cascade(a, cascade(b, c)) (associativity of the matrix product), 1e-11', () => {
    fc.assert(
      fc.property(twoPortS, twoPortS, twoPortS, reference, reference, reference, reference, (s1, s2, s3, z1, z2, z3, z4) => {
        const a = net2([1e9], [s1], [z1, z2]);
        const b = net2([1e9], [s2], [z2, z3]);
        const c = net2([1e9], [s3], [z3, z4]);
        const all = cascade(a, b, c).values;
        expectClose(all, cascade(cascade(a, b), c).values, 1e-11);
        expectClose(all, cascade(a, cascade(b, c)).values, 1e-11);
        expectClose(cascade(a).values, a.values); // one section: itself
      }),
      SEED,
    );
  });

  it('rejects sections on different frequency grids, listing the differing points', () => {
    const s = seriesS(C(10), 50, 50);
    const a = net2([1e6, 2e6, 3e6], [s, s, s], [50, 50]);
    const b = net2([1e6, 2.5e6, 3.5e6], [s, s, s], [50, 50]);
    const c = net2([1e6, 2e6], [s, s], [50, 50]);
    try {
      cascade(a, a, b);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(FrequencyGridError);
      const g = e as FrequencyGridError;
      expect(g.section).toBe(2);
      expect(g.mismatchCount).toBe(2);
      expect(g.mismatches).toEqual([
        { index: 1, expected: 2e6, actual: 2.5e6 },
        { index: 2, expected: 3e6, actual: 3.5e6 },
      ]);
      expect(g.message).toContain('point 1 is 2500000 Hz');
    }
    expect(() => cascade(a, c)).toThrow(/has 2 frequency points, section 1 has 3/);
    // the same grid up to 1e-12 relative is accepted
    const a2 = net2([1e6 * (1 + 1e-15), 2e6, 3e6], [s, s, s], [50, 50]);
    expect(() => cascade(a, a2)).not.toThrow();
    expect(() => cascade()).toThrow(RangeError);
  });

  it('names the section and frequency point when a section has no chain matrix (a shunt short circuit)', () => {
    const s = seriesS(C(10), 50, 50);
    const short = matrixOf(2, [-1, 0, 0, -1]);
    try {
      cascade(net2([1e6, 2e6], [s, s], [50, 50]), net2([1e6, 2e6], [s, short], [50, 50]));
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(TwoPortConversionError);
      expect((e as TwoPortConversionError).section).toBe(1);
      expect((e as TwoPortConversionError).frequencyIndex).toBe(1);
      expect((e as Error).message).toContain('section 2');
    }
  });

  it('accepts Z data (converted to S first): a series impedance given as S, then a shunt admittance given as Z data; S of the L section from [WAVES], 1e-12', () => {
    const z = C(30, 10);
    const y = C(0.01, -0.02);
    const zinv = div(1, y);
    const shuntZ: NetworkData = {
      parameter: 'Z',
      ports: 2,
      frequencies: Float64Array.of(1e9),
      references: Float64Array.of(50, 50),
      values: matrixOf(2, [zinv, zinv, zinv, zinv]),
    };
    const r = cascade(net2([1e9], [seriesS(z, 50, 50)], [50, 50]), shuntZ);
    expectClose(r.values, sFromZ(math.matrix([[add(z, zinv), zinv], [zinv, zinv]]), [50, 50]));
  });
});

// ------------------------------------------------------------------------------------------------
// mixed mode

/** Single-ended 4-port of two uncoupled two-ports: A from port 1 to 2, B from port 3 to 4. */
function twoLines(sa: Float64Array, sb: Float64Array): Float64Array {
  const s = new Float64Array(32);
  const put = (i: number, j: number, src: Float64Array, a: number, b: number) => {
    s[2 * (i * 4 + j)] = src[2 * (a * 2 + b)]!;
    s[2 * (i * 4 + j) + 1] = src[2 * (a * 2 + b) + 1]!;
  };
  for (let a = 0; a < 2; a++) {
    for (let b = 0; b < 2; b++) {
      put(a, b, sa, a, b);
      put(a + 2, b + 2, sb, a, b);
    }
  }
  return s;
}

function net4(matrices: Float64Array[], refs: number[], parameter: 'S' | 'Y' = 'S'): NetworkData {
  const values = new Float64Array(32 * matrices.length);
  matrices.forEach((m, k) => values.set(m, 32 * k));
  return {
    parameter,
    ports: 4,
    frequencies: Float64Array.from(matrices.map((_, k) => 1e9 * (k + 1))),
    references: Float64Array.from(refs),
    values,
  };
}

/** 2×2 block (rows r0.., cols c0..) of a 4×4 matrix. */
function block(m: Float64Array, r0: number, c0: number): Float64Array {
  const out = new Float64Array(8);
  for (let i = 0; i < 2; i++) {
    for (let j = 0; j < 2; j++) {
      out[2 * (i * 2 + j)] = m[2 * ((r0 + i) * 4 + c0 + j)]!;
      out[2 * (i * 2 + j) + 1] = m[2 * ((r0 + i) * 4 + c0 + j) + 1]!;
    }
  }
  return out;
}

const halve = (a: Float64Array, b: Float64Array, sign: 1 | -1) => a.map((x, k) => (x + sign * b[k]!) / 2);

describe('mixed-mode S-parameters (Bockelman & Eisenstadt 1995)', () => {
  const pairs: PortPair[] = [
    [1, 3],
    [2, 4],
  ];

  it('balanced pair of uncoupled identical lines: Sdd = Scc = the line\'s S, Sdc = Scd = 0 [BE95]; references 2Z0, Z0/2; 1e-15 absolute', () => {
    for (const zc of [50, 65]) {
      // zc = 50: matched line, S21 = e^{−jθ} (common practice); zc = 65: also a reflection
      const line = lineS(0.9, zc, 50, 50);
      const mm = mixedMode(net4([twoLines(line, line)], [50, 50, 50, 50]), pairs);
      const v = mm.values;
      expect(maxAbsDiff(block(v, 0, 0), line)).toBeLessThanOrEqual(1e-15); // Sdd
      expect(maxAbsDiff(block(v, 2, 2), line)).toBeLessThanOrEqual(1e-15); // Scc
      expect(maxAbs(block(v, 0, 2))).toBeLessThanOrEqual(1e-15); // Sdc
      expect(maxAbs(block(v, 2, 0))).toBeLessThanOrEqual(1e-15); // Scd
      expect(Array.from(mm.references)).toEqual([100, 100, 25, 25]);
      expect(mm.modes).toEqual(['D1', 'D2', 'C1', 'C2']);
      if (zc === 50) {
        const sdd21 = entry(v, 4, 1, 0);
        expect(Math.hypot(sdd21.re - Math.cos(0.9), sdd21.im + Math.sin(0.9))).toBeLessThanOrEqual(1e-15);
      }
    }
  });

  it('unbalanced pair (lines of different length): Sdd = Scc = (Sᴬ + Sᴮ)/2, Sdc = Scd = (Sᴬ − Sᴮ)/2 from the [BE95] wave definitions, 1e-15 absolute', () => {
    // a_d = (a_p − a_n)/√2, a_c = (a_p + a_n)/√2 with line A on the p ports and line B on the n ports give
    // e.g. Sdc21 = (S_p2p1 + S_p2n1 − S_n2p1 − S_n2n1)/2 = (Sᴬ21 − Sᴮ21)/2
    const la = lineS(0.9, 60, 50, 50);
    const lb = lineS(1.3, 60, 50, 50);
    const v = mixedMode(net4([twoLines(la, lb)], [50, 50, 50, 50]), pairs).values;
    expect(maxAbsDiff(block(v, 0, 0), halve(la, lb, 1))).toBeLessThanOrEqual(1e-15);
    expect(maxAbsDiff(block(v, 2, 2), halve(la, lb, 1))).toBeLessThanOrEqual(1e-15);
    expect(maxAbsDiff(block(v, 0, 2), halve(la, lb, -1))).toBeLessThanOrEqual(1e-15);
    expect(maxAbsDiff(block(v, 2, 0), halve(la, lb, -1))).toBeLessThanOrEqual(1e-15);
    expect(maxAbs(block(v, 0, 2))).toBeGreaterThan(0.1); // there is mode conversion to find
  });

  it('random four-port, pairs (1, 2), (3, 4): explicit [BE95] expressions, e.g. Sdd11 = (S11 − S12 − S21 + S22)/2, Sdc11 = (S11 + S12 − S21 − S22)/2, Scd11 = (S11 − S12 + S21 − S22)/2, Scc11 = (S11 + S12 + S21 + S22)/2, 1e-15', () => {
    fc.assert(
      fc.property(fc.array(real(-1, 1), { minLength: 32, maxLength: 32 }), (xs) => {
        const s = Float64Array.from(xs);
        const v = mixedMode(net4([s], [50, 50, 50, 50]), [
          [1, 2],
          [3, 4],
        ]).values;
        const S = (i: number, j: number) => entry(s, 4, i - 1, j - 1);
        const comb = (terms: [number, number, number][]) => {
          let re = 0;
          let im = 0;
          for (const [sign, i, j] of terms) {
            re += (sign * S(i, j).re) / 2;
            im += (sign * S(i, j).im) / 2;
          }
          return { re, im };
        };
        const cases: [number, number, { re: number; im: number }][] = [
          [0, 0, comb([[1, 1, 1], [-1, 1, 2], [-1, 2, 1], [1, 2, 2]])], // Sdd11
          [0, 1, comb([[1, 1, 3], [-1, 1, 4], [-1, 2, 3], [1, 2, 4]])], // Sdd12
          [1, 0, comb([[1, 3, 1], [-1, 3, 2], [-1, 4, 1], [1, 4, 2]])], // Sdd21
          [0, 2, comb([[1, 1, 1], [1, 1, 2], [-1, 2, 1], [-1, 2, 2]])], // Sdc11
          [2, 0, comb([[1, 1, 1], [-1, 1, 2], [1, 2, 1], [-1, 2, 2]])], // Scd11
          [2, 2, comb([[1, 1, 1], [1, 1, 2], [1, 2, 1], [1, 2, 2]])], // Scc11
          [3, 2, comb([[1, 3, 1], [1, 3, 2], [1, 4, 1], [1, 4, 2]])], // Scc21
        ];
        for (const [r, c, want] of cases) {
          const got = entry(v, 4, r, c);
          expect(Math.hypot(got.re - want.re, got.im - want.im)).toBeLessThanOrEqual(1e-15);
        }
      }),
      SEED,
    );
  });

  it('random four-port, random pairing: S_mm = M·P·S·Pᵀ·M⁻¹ with M of [BE95] and P the port permutation, M⁻¹ by mathjs inv, 1e-14', () => {
    const pairings = fc.shuffledSubarray([1, 2, 3, 4], { minLength: 4, maxLength: 4 });
    fc.assert(
      fc.property(fc.array(real(-1, 1), { minLength: 32, maxLength: 32 }), pairings, (xs, order) => {
        const s = Float64Array.from(xs);
        const pr: PortPair[] = [
          [order[0]!, order[1]!],
          [order[2]!, order[3]!],
        ];
        const v = mixedMode(net4([s], [50, 50, 50, 50]), pr).values;
        const h = Math.SQRT1_2;
        const M = math.matrix([
          [h, -h, 0, 0],
          [0, 0, h, -h],
          [h, h, 0, 0],
          [0, 0, h, h],
        ]);
        // P maps single-ended port order[k] to position k
        const P = math.zeros(4, 4) as Matrix;
        order.forEach((port, k) => P.set([k, port - 1], 1));
        const Sp = math.multiply(math.multiply(P, toMath(s, 4)), math.transpose(P));
        const ref = fromMath(math.multiply(math.multiply(M, Sp), math.inv(M)), 4);
        expect(maxAbsDiff(v, ref)).toBeLessThanOrEqual(1e-14);
      }),
      SEED,
    );
  });

  it('pi pad of resistors per pair (R between p and n, Rg from each to ground), given as Y data: Sdd11 = (Zd − z_d)/(Zd + z_d) with Zd = 2·(Rg ∥ R/2), Scc11 = (Zc − z_c)/(Zc + z_c) with Zc = Rg/2 (circuit analysis with the [BE95] mode voltages and currents), z_d = 2Z0, z_c = Z0/2; 1e-12', () => {
    const z0a = 50;
    const z0b = 40;
    const [r1, g1, r2, g2] = [120, 300, 33, 1000];
    const y = new Float64Array(32);
    const setY = (i: number, j: number, x: number) => (y[2 * (i * 4 + j)] = x);
    for (const [p, n, r, g] of [[0, 1, r1, g1], [2, 3, r2, g2]] as const) {
      setY(p, p, 1 / g + 1 / r);
      setY(n, n, 1 / g + 1 / r);
      setY(p, n, -1 / r);
      setY(n, p, -1 / r);
    }
    const mm = mixedMode(net4([y], [z0a, z0a, z0b, z0b], 'Y'), [
      [1, 2],
      [3, 4],
    ]);
    expect(Array.from(mm.references)).toEqual([2 * z0a, 2 * z0b, z0a / 2, z0b / 2]);
    const par = (a: number, b: number) => (a * b) / (a + b);
    const gam = (z: number, ref: number) => (z - ref) / (z + ref);
    const want = new Float64Array(32);
    want[2 * (0 * 4 + 0)] = gam(2 * par(g1, r1 / 2), mm.references[0]!);
    want[2 * (1 * 4 + 1)] = gam(2 * par(g2, r2 / 2), mm.references[1]!);
    want[2 * (2 * 4 + 2)] = gam(g1 / 2, mm.references[2]!);
    want[2 * (3 * 4 + 3)] = gam(g2 / 2, mm.references[3]!);
    expectClose(mm.values, want);
  });

  it('round trips single-ended → mixed-mode → single-ended and back are the identity (random data, pairing and references), 1e-12', () => {
    const pairings = fc.shuffledSubarray([1, 2, 3, 4], { minLength: 4, maxLength: 4 });
    fc.assert(
      fc.property(
        fc.array(real(-1, 1), { minLength: 64, maxLength: 64 }),
        pairings,
        reference,
        reference,
        (xs, order, za, zb) => {
          const values = Float64Array.from(xs);
          const pr: PortPair[] = [
            [order[0]!, order[1]!],
            [order[2]!, order[3]!],
          ];
          const refs = [0, 0, 0, 0];
          refs[order[0]! - 1] = refs[order[1]! - 1] = za;
          refs[order[2]! - 1] = refs[order[3]! - 1] = zb;
          const net = net4([values.slice(0, 32), values.slice(32)], refs);
          const mm = mixedMode(net, pr);
          const back = singleEnded(mm);
          expectClose(back.values, net.values);
          expect(Array.from(back.references)).toEqual(refs);
          const again = mixedMode(back, pr);
          expectClose(again.values, mm.values);
          // per-matrix functions agree with the whole-network ones
          const t = createModeTransform(4, pr);
          const one = mixedModeMatrix(t, slice(net.values, 4, 1), new Float64Array(32));
          expect(one).toEqual(slice(mm.values, 4, 1));
          expectClose(singleEndedMatrix(t, one, one), slice(net.values, 4, 1));
        },
      ),
      SEED,
    );
  });

  it('rejects unequal references within a pair, bad pairings and inconsistent mode references (RangeError)', () => {
    const s = new Float64Array(32);
    expect(() => mixedMode(net4([s], [50, 75, 50, 50]), [[1, 2], [3, 4]])).toThrow(/unequal references/);
    expect(() => mixedMode(net4([s], [50, 50, 75, 75]), [[1, 2], [3, 4]])).not.toThrow(); // pairs may differ
    expect(() => mixedMode(net4([s], [50, 50, 50, 50]), [[1, 2], [2, 4]])).toThrow(RangeError);
    expect(() => mixedMode(net4([s], [50, 50, 50, 50]), [[1, 2], [3, 5]])).toThrow(RangeError);
    expect(() => mixedMode(net4([s], [50, 50, 50, 50]), [[1, 2]])).toThrow(RangeError);
    const mm: MixedModeData = { ...mixedMode(net4([s], [50, 50, 50, 50]), [[1, 2], [3, 4]]) };
    mm.references = Float64Array.of(100, 100, 50, 25);
    expect(() => singleEnded(mm)).toThrow(/must be 2·Z0 and Z0\/2/);
  });
});
