/**
 * Port solves for a symmetric matrix (A = Aᵀ, as for every reciprocal network in nodal form)
 * factored with the pivots on the diagonal, i.e. rows and columns in one order: P·A·Pᵀ = L·U.
 * Then U = D·Lᵀ with D the pivots (the LU factors of a symmetric matrix are unique), and
 *
 *     A⁻¹ = Pᵀ·L⁻ᵀ·D⁻¹·L⁻¹·P,   so   c_aᵀ·A⁻¹·c_b = w_aᵀ·D⁻¹·w_b   with   w_a = L⁻¹·P·c_a
 *
 * for the port vectors c_a = e_plus − e_minus. Each port needs one forward sweep (from the first
 * step where its vector is nonzero: w_a is zero before it) and each pair a short sum — no
 * backward sweep (common practice for reciprocal networks: the identity is that of the LDLᵀ form).
 *
 * No allocation per solve.
 *
 * @module
 */

import type { SparseFactor } from './factor.js';

/** The port vectors of a symmetric solve and its storage, made once by {@link symmetricPorts}. */
export interface SymmetricPorts {
  /** Number of ports. */
  readonly m: number;
  /** Per port: the step of its plus and of its minus unknown (−1: ground). */
  readonly plusStep: Int32Array;
  readonly minusStep: Int32Array;
  /** Per port: the first step where its sweep is nonzero (n for a port with both ends on ground). */
  readonly firstStep: Int32Array;
  /** The first of them: rows of the sweeps before it stay zero. */
  readonly first: number;
  /** The forward sweeps, n × m complex, row k = step k: w[2·(k·m + a)]. */
  readonly w: Float64Array;
  /** Out: g[2·(a·m + b)] = c_aᵀ·A⁻¹·c_b with c = e_plus − e_minus (symmetric, both halves filled). */
  readonly g: Float64Array;
}

/**
 * Prepares the port solve with the factor `f` for ports between the unknowns `plus` and `minus`
 * (GROUND = −1 for none), or returns undefined where `f`'s pivot rows are not its column order
 * (a pivoting factorisation swapped rows: then U ≠ D·Lᵀ). Whether A itself is symmetric is the
 * caller's to know (see `StampPlan.symmetric`).
 *
 * The sweeps run with the port vectors c = e_plus − e_minus themselves (not with unit vectors
 * combined afterwards), so the difference of two large node voltages is never formed: with a node
 * held to ground only weakly the voltages grow large while their differences stay small.
 */
export function symmetricPorts(f: SparseFactor, plus: ArrayLike<number>, minus: ArrayLike<number>): SymmetricPorts | undefined {
  const order = f.pattern.order;
  const n = f.n;
  for (let j = 0; j < n; j++) if (f.pivotRow[j] !== order[j]) return undefined;
  const m = plus.length;
  const stepOf = (u: number) => (u >= 0 ? f.pattern.stepOf[u]! : -1);
  const plusStep = Int32Array.from(plus, stepOf);
  const minusStep = Int32Array.from(minus, stepOf);
  const firstStep = new Int32Array(m);
  let first = n;
  for (let a = 0; a < m; a++) {
    const p = plusStep[a]!;
    const q = minusStep[a]!;
    firstStep[a] = p < 0 ? (q < 0 ? n : q) : q < 0 ? p : Math.min(p, q);
    first = Math.min(first, firstStep[a]!);
  }
  return { m, plusStep, minusStep, firstStep, first, w: new Float64Array(2 * n * m), g: new Float64Array(2 * m * m) };
}

/**
 * Estimated work of the symmetric port solve, in the units of a solve step per right-hand side:
 * the forward sweeps from the first step, and the sum of each pair from the later of its two
 * first steps.
 */
export function symmetricPortsCost(f: SparseFactor, sp: SymmetricPorts): number {
  const n = f.n;
  const m = sp.m;
  let sums = 0;
  for (let a = 0; a < m; a++) for (let b = a; b < m; b++) sums += n - Math.max(sp.firstStep[a]!, sp.firstStep[b]!);
  return m * (f.lRowPtr[n]! - f.lRowPtr[sp.first]! + (n - sp.first)) + sums;
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

/**
 * Two ports: both sweeps carried in registers, row by row. (The shape of `forwardTwo` in
 * solve.ts, but with the port vectors' ±1 as constants instead of reading a right-hand side by
 * pivot row: measured, interleaved in one process, the shared sweep made the 1,000-section
 * ladder about 7 % slower a point.)
 */
function forwardPair(f: SparseFactor, sp: SymmetricPorts): void {
  const n = f.n | 0;
  const w = sp.w;
  const lu = f.lu;
  const lRowPtr = f.lRowPtr;
  const lRowIdx = f.lRowIdx;
  const pa = sp.plusStep[0]! | 0;
  const ma = sp.minusStep[0]! | 0;
  const pb = sp.plusStep[1]! | 0;
  const mb = sp.minusStep[1]! | 0;
  const first = sp.first | 0;
  let t0 = lRowPtr[first]! << 1;
  for (let i = first; i < n; i = (i + 1) | 0) {
    let ar = i === pa ? 1 : i === ma ? -1 : 0;
    let ai = 0;
    let br = i === pb ? 1 : i === mb ? -1 : 0;
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

/** g = Wᵀ·D⁻¹·W for two ports: three sums in registers. */
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

/** Any number of ports, one row of all sweeps at a time. */
function forwardAny(f: SparseFactor, sp: SymmetricPorts): void {
  const n = f.n | 0;
  const m = sp.m | 0;
  const w = sp.w;
  const lu = f.lu;
  const lRowPtr = f.lRowPtr;
  const lRowIdx = f.lRowIdx;
  const plusStep = sp.plusStep;
  const minusStep = sp.minusStep;
  const wb = (2 * m) | 0;
  for (let i = sp.first | 0; i < n; i = (i + 1) | 0) {
    const is = Math.imul(i, wb);
    for (let a = 0; a < m; a = (a + 1) | 0) {
      w[(is + 2 * a) | 0] = plusStep[a] === i ? 1 : minusStep[a] === i ? -1 : 0;
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

/** g = Wᵀ·D⁻¹·W, any number of ports; each pair summed from the later of its two first steps. */
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
      for (let k = Math.max(sp.firstStep[a]!, sp.firstStep[b]!) | 0; k < n; k = (k + 1) | 0) {
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
