/**
 * Port solves for a symmetric matrix (A = Aᵀ, as for every reciprocal network in nodal form)
 * factored with the pivots on the diagonal, i.e. rows and columns in one order: P·A·Pᵀ = L·U.
 * Then U = D·Lᵀ with D the pivots (the LU factors of a symmetric matrix are unique), and
 *
 *     A⁻¹ = Pᵀ·L⁻ᵀ·D⁻¹·L⁻¹·P,   so   e_uᵀ·A⁻¹·e_v = w_uᵀ·D⁻¹·w_v   with   w_u = L⁻¹·P·e_u.
 *
 * For the few unknowns u at the ports this needs one forward sweep per unknown (starting at the
 * step where u is eliminated: w_u is zero before it) and a short sum per pair — no backward sweep.
 * This is the "solve with the transposed factors" of the port-to-port block of A⁻¹ specialised to
 * symmetry (common practice for reciprocal networks; the identity is that of the LDLᵀ form).
 *
 * No allocation per solve.
 *
 * @module
 */

import type { SparseFactor } from './factor.js';

/** The port unknowns of a symmetric solve and its storage, made once by {@link symmetricPorts}. */
export interface SymmetricPorts {
  /** Number of port unknowns. */
  readonly m: number;
  /** The unknowns (0-based, distinct), in the order of `g`. */
  readonly unknowns: Int32Array;
  /** Step at which each is eliminated. */
  readonly steps: Int32Array;
  /** The first of the steps: rows of the sweeps before it stay zero. */
  readonly first: number;
  /** The forward sweeps, n × m complex, row k = step k: w[2·(k·m + a)]. */
  readonly w: Float64Array;
  /** Out: g[2·(a·m + b)] = e_aᵀ·A⁻¹·e_b for the unknowns a, b (symmetric, both halves filled). */
  readonly g: Float64Array;
}

/**
 * Prepares the port solve of `unknowns` with the factor `f`, or returns undefined where `f`'s
 * pivot rows are not its column order (a pivoting factorisation swapped rows: then U ≠ D·Lᵀ).
 * Whether A itself is symmetric is the caller's to know (see `StampPlan.symmetric`).
 */
export function symmetricPorts(f: SparseFactor, unknowns: ArrayLike<number>): SymmetricPorts | undefined {
  const order = f.pattern.order;
  for (let j = 0; j < f.n; j++) if (f.pivotRow[j] !== order[j]) return undefined;
  const list = [...new Set(Array.from(unknowns).filter((u) => u >= 0))].sort((a, b) => f.pattern.stepOf[a]! - f.pattern.stepOf[b]!);
  const m = list.length;
  const steps = Int32Array.from(list, (u) => f.pattern.stepOf[u]!);
  return {
    m,
    unknowns: Int32Array.from(list),
    steps,
    first: m > 0 ? steps[0]! : f.n,
    w: new Float64Array(2 * f.n * m),
    g: new Float64Array(2 * m * m),
  };
}

/**
 * Estimated work of the symmetric port solve of unknowns at these steps (sorted, as in
 * {@link SymmetricPorts}), in the units of a solve step per right-hand side: the forward sweeps
 * from the first step, and the sum of each pair from the later of its two steps.
 */
export function symmetricPortsCost(lRowPtr: ArrayLike<number>, n: number, steps: ArrayLike<number>): number {
  const m = steps.length;
  if (m === 0) return 0;
  const first = steps[0]!;
  let sums = 0;
  for (let b = 0; b < m; b++) sums += (b + 1) * (n - steps[b]!);
  return m * (lRowPtr[n]! - lRowPtr[first]! + (n - first)) + sums;
}

/** Fills `sp.g` from the factor `f` (which must hold a successful factorisation of a symmetric A). */
export function solveSymmetricPorts(f: SparseFactor, sp: SymmetricPorts): void {
  if (!f.valid) throw new Error('sparse solve: no successful factorisation to solve with');
  if (sp.m === 2) {
    forwardPair(f, sp);
    sumsPair(f, sp);
    return;
  }
  forwardAny(f, sp);
  sumsAny(f, sp);
}

// Index arithmetic in `<<` and `| 0`, as in solve.ts, keeps it in 32-bit integers.

/** Two port unknowns: both sweeps carried in registers, row by row. */
function forwardPair(f: SparseFactor, sp: SymmetricPorts): void {
  const n = f.n | 0;
  const w = sp.w;
  const lu = f.lu;
  const lRowPtr = f.lRowPtr;
  const lRowIdx = f.lRowIdx;
  const sa = sp.steps[0]! | 0;
  const sb = sp.steps[1]! | 0;
  const first = sp.first | 0;
  let t0 = lRowPtr[first]! << 1;
  for (let i = first; i < n; i = (i + 1) | 0) {
    let ar = i === sa ? 1 : 0;
    let ai = 0;
    let br = i === sb ? 1 : 0;
    let bi = 0;
    const t1 = lRowPtr[(i + 1) | 0]! << 1;
    for (let t = t0; t < t1; t = (t + 2) | 0) {
      const k4 = lRowIdx[t]! << 2;
      const e2 = lRowIdx[t | 1]! | 0;
      const lr = lu[e2]!;
      const li = lu[e2 | 1]!;
      const yr = w[k4]!;
      const yi = w[k4 | 1]!;
      const vr = w[k4 | 2]!;
      const vi = w[k4 | 3]!;
      ar -= lr * yr - li * yi;
      ai -= lr * yi + li * yr;
      br -= lr * vr - li * vi;
      bi -= lr * vi + li * vr;
    }
    const i4 = i << 2;
    w[i4] = ar;
    w[i4 | 1] = ai;
    w[i4 | 2] = br;
    w[i4 | 3] = bi;
    t0 = t1;
  }
}

/** g = Wᵀ·D⁻¹·W for two unknowns: three sums in registers. */
function sumsPair(f: SparseFactor, sp: SymmetricPorts): void {
  const n = f.n | 0;
  const w = sp.w;
  const inv = f.pivotInv;
  let aar = 0;
  let aai = 0;
  let abr = 0;
  let abi = 0;
  let bbr = 0;
  let bbi = 0;
  for (let k = sp.first | 0; k < n; k = (k + 1) | 0) {
    const k4 = k << 2;
    const k2 = k << 1;
    const qr = inv[k2]!;
    const qi = inv[k2 | 1]!;
    const yr = w[k4]!;
    const yi = w[k4 | 1]!;
    const vr = w[k4 | 2]!;
    const vi = w[k4 | 3]!;
    // t = y·d
    const tr = yr * qr - yi * qi;
    const ti = yr * qi + yi * qr;
    aar += tr * yr - ti * yi;
    aai += tr * yi + ti * yr;
    abr += tr * vr - ti * vi;
    abi += tr * vi + ti * vr;
    const sr = vr * qr - vi * qi;
    const si = vr * qi + vi * qr;
    bbr += sr * vr - si * vi;
    bbi += sr * vi + si * vr;
  }
  const g = sp.g;
  g[0] = aar;
  g[1] = aai;
  g[2] = abr;
  g[3] = abi;
  g[4] = abr;
  g[5] = abi;
  g[6] = bbr;
  g[7] = bbi;
}

/** Any number of unknowns, one row of all sweeps at a time. */
function forwardAny(f: SparseFactor, sp: SymmetricPorts): void {
  const n = f.n | 0;
  const m = sp.m | 0;
  const w = sp.w;
  const lu = f.lu;
  const lRowPtr = f.lRowPtr;
  const lRowIdx = f.lRowIdx;
  const steps = sp.steps;
  const wb = (2 * m) | 0;
  for (let i = sp.first | 0; i < n; i = (i + 1) | 0) {
    const is = Math.imul(i, wb);
    for (let a = 0; a < m; a = (a + 1) | 0) {
      w[(is + 2 * a) | 0] = steps[a] === i ? 1 : 0;
      w[(is + 2 * a + 1) | 0] = 0;
    }
    const t1 = lRowPtr[(i + 1) | 0]! << 1;
    for (let t = lRowPtr[i]! << 1; t < t1; t = (t + 2) | 0) {
      const ks = Math.imul(lRowIdx[t]!, wb);
      const e2 = lRowIdx[t | 1]! | 0;
      const lr = lu[e2]!;
      const li = lu[e2 | 1]!;
      for (let c = 0; c < wb; c = (c + 2) | 0) {
        const yr = w[(ks + c) | 0]!;
        const yi = w[(ks + c + 1) | 0]!;
        w[(is + c) | 0] -= lr * yr - li * yi;
        w[(is + c + 1) | 0] -= lr * yi + li * yr;
      }
    }
  }
}

/** g = Wᵀ·D⁻¹·W, any number of unknowns; each pair summed from the later of its two steps. */
function sumsAny(f: SparseFactor, sp: SymmetricPorts): void {
  const n = f.n | 0;
  const m = sp.m | 0;
  const w = sp.w;
  const inv = f.pivotInv;
  const g = sp.g;
  const wb = (2 * m) | 0;
  for (let a = 0; a < m; a++) {
    for (let b = a; b < m; b++) {
      let sr = 0;
      let si = 0;
      for (let k = sp.steps[b]! | 0; k < n; k = (k + 1) | 0) {
        const ks = Math.imul(k, wb);
        const qr = inv[k << 1]!;
        const qi = inv[(k << 1) | 1]!;
        const yr = w[(ks + 2 * a) | 0]!;
        const yi = w[(ks + 2 * a + 1) | 0]!;
        const vr = w[(ks + 2 * b) | 0]!;
        const vi = w[(ks + 2 * b + 1) | 0]!;
        const tr = yr * qr - yi * qi;
        const ti = yr * qi + yi * qr;
        sr += tr * vr - ti * vi;
        si += tr * vi + ti * vr;
      }
      g[2 * (a * m + b)] = sr;
      g[2 * (a * m + b) + 1] = si;
      g[2 * (b * m + a)] = sr;
      g[2 * (b * m + a) + 1] = si;
    }
  }
}
