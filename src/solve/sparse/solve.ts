/**
 * Triangular solves with a sparse factorisation P·A·Q = L·U (see factor.ts).
 *
 * A·X = B: X = Q·U⁻¹·L⁻¹·P·B. Forward by rows of L, y_i = b_{P_i} − Σ_{k<i} l_ik·y_k (the row
 * permutation is applied as the rows are read, the sum kept in registers); backward by columns of
 * U, z_j = y_j/u_jj is written straight to x_{Q_j} and then y_i −= u_ij·z_j for the rows i < j of
 * column j. Up to two right-hand sides are carried in registers at a time (blocks of `rhsBlock`
 * beyond that).
 * Aᴴ·x = b: Aᴴ = Q·Uᴴ·Lᴴ·P, so Uᴴ·z = Qᵀ·b (forward), Lᴴ·w = z (backward), x = Pᵀ·w; both sweeps
 * are dot products with the stored columns.
 *
 * No allocation.
 *
 * @module
 */

import type { SparseFactor } from './factor.js';

/**
 * Solves A·X = B for `nrhs` right-hand sides. `rhs` is n×nrhs, row-major, complex interleaved
 * (entry (i, c) at 2·(i·nrhs + c)), the layout of luSolve in network/complex.ts; X is written to `x`
 * in the same layout. `x` may be `rhs` (in-place solve). With a `range` (see {@link solveRange}) only
 * part of the sweeps runs, and only part of x is written.
 * Throws Error if `f` holds no successful factorisation (a programming error, not a numeric one).
 */
export function solve(f: SparseFactor, rhs: Float64Array, x: Float64Array, nrhs: number, range?: SolveRange): void {
  if (!f.valid) throw new Error('sparse solve: no successful factorisation to solve with');
  const n = f.n;
  if (rhs.length < 2 * n * nrhs || x.length < 2 * n * nrhs) throw new RangeError('sparse solve: arrays too short for n×nrhs');
  const first = range ? Math.max(0, Math.min(n, range.firstStep | 0)) : 0;
  const last = range ? Math.max(0, Math.min(n, range.lastStep | 0)) : 0;
  let c0 = 0;
  while (c0 < nrhs) {
    const left = nrhs - c0;
    if (left === 1) {
      solveOne(f, rhs, x, nrhs, c0, first, last);
      c0 += 1;
    } else if (left === 2) {
      solveTwo(f, rhs, x, nrhs, c0, first, last);
      c0 += 2;
    } else {
      const nb = Math.min(f.rhsBlock, left);
      if (nb < 3) {
        solveTwo(f, rhs, x, nrhs, c0, first, last);
        c0 += 2;
      } else {
        solveBlock(f, rhs, x, nrhs, c0, nb, first, last);
        c0 += nb;
      }
    }
  }
}

/**
 * A partial solve (see {@link solveRange}): the right-hand sides are zero in every row pivoted
 * before `firstStep`, and only the unknowns eliminated at `lastStep` or later are wanted.
 */
export interface SolveRange {
  firstStep: number;
  lastStep: number;
}

/**
 * The partial solve that serves right-hand sides nonzero only in the rows `rows` and wants only the
 * unknowns `cols` (both 0-based unknowns; GROUND = −1 entries are skipped): the forward sweep starts
 * at the first step whose pivot row is one of `rows`, the backward sweep stops at the first step
 * that eliminates one of `cols`. With those unknowns ordered last (see `last` in analyse), both
 * sweeps shrink to a few steps. Depends on the pivot sequence: compute it after each factor.
 * Entries of x outside `cols` are then left as they were.
 */
export function solveRange(f: SparseFactor, rows: ArrayLike<number>, cols: ArrayLike<number>): SolveRange {
  let firstStep = f.n;
  let lastStep = f.n;
  for (let k = 0; k < rows.length; k++) if (rows[k]! >= 0) firstStep = Math.min(firstStep, f.rowStep[rows[k]!]!);
  for (let k = 0; k < cols.length; k++) if (cols[k]! >= 0) lastStep = Math.min(lastStep, f.pattern.stepOf[cols[k]!]!);
  return { firstStep, lastStep };
}

// Index arithmetic below uses `<<` and `| 0` so that it stays in 32-bit integers without overflow
// checks (all indices are far below 2^30). The forward and backward sweeps are separate functions:
// one function holding both optimises worse (measured: about 20 % slower).

/** One right-hand side: column c0 of the n×nrhs block. */
function solveOne(f: SparseFactor, rhs: Float64Array, x: Float64Array, nrhs: number, c0: number, first: number, last: number): void {
  forwardOne(f, rhs, (2 * nrhs) | 0, (2 * c0) | 0, first | 0);
  backwardOne(f, x, (2 * nrhs) | 0, (2 * c0) | 0, last | 0);
}

/** w ← L⁻¹·P·b, by rows of L, reading b from column `off/2` of `rhs` (row stride `stride`). */
function forwardOne(f: SparseFactor, rhs: Float64Array, stride: number, off: number, first: number): void {
  const n = f.n | 0;
  const w = f.work;
  const lu = f.lu;
  const pivotRow = f.pivotRow;
  const lRowPtr = f.lRowPtr;
  const lRowIdx = f.lRowIdx;
  if (first > 0) w.fill(0, 0, first << 1);
  let t0 = lRowPtr[first]! << 1;
  for (let i = first; i < n; i = (i + 1) | 0) {
    const s = (Math.imul(pivotRow[i]!, stride) + off) | 0;
    let sr = rhs[s]!;
    let si = rhs[(s + 1) | 0]!;
    const t1 = lRowPtr[(i + 1) | 0]! << 1;
    for (let t = t0; t < t1; t = (t + 2) | 0) {
      const k2 = lRowIdx[t]! << 1;
      const e2 = lRowIdx[t | 1]! | 0;
      const lr = lu[e2]!;
      const li = lu[e2 | 1]!;
      const yr = w[k2]!;
      const yi = w[k2 | 1]!;
      sr -= lr * yr - li * yi;
      si -= lr * yi + li * yr;
    }
    const i2 = i << 1;
    w[i2] = sr;
    w[i2 | 1] = si;
    t0 = t1;
  }
}

/** x ← Q·U⁻¹·w, by columns of U, writing column `off/2` of `x`. */
function backwardOne(f: SparseFactor, x: Float64Array, stride: number, off: number, last: number): void {
  const n = f.n | 0;
  const w = f.work;
  const lu = f.lu;
  const order = f.pattern.order;
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const inv = f.pivotInv;
  for (let j = (n - 1) | 0; j >= last; j = (j - 1) | 0) {
    const j2 = j << 1;
    const ar = w[j2]!;
    const ai = w[j2 | 1]!;
    const qr = inv[j2]!;
    const qi = inv[j2 | 1]!;
    const zr = ar * qr - ai * qi;
    const zi = ar * qi + ai * qr;
    const d = (Math.imul(order[j]!, stride) + off) | 0;
    x[d] = zr;
    x[(d + 1) | 0] = zi;
    const q1 = diagPos[j]! | 0;
    for (let q = colPtr[j]! | 0; q < q1; q = (q + 1) | 0) {
      const i2 = rowIdx[q]! << 1;
      const q2 = q << 1;
      const ur = lu[q2]!;
      const ui = lu[q2 | 1]!;
      w[i2] -= ur * zr - ui * zi;
      w[i2 | 1] -= ur * zi + ui * zr;
    }
  }
}

/** Two right-hand sides: columns c0 and c0+1. */
function solveTwo(f: SparseFactor, rhs: Float64Array, x: Float64Array, nrhs: number, c0: number, first: number, last: number): void {
  forwardTwo(f, rhs, (2 * nrhs) | 0, (2 * c0) | 0, first | 0);
  backwardTwo(f, x, (2 * nrhs) | 0, (2 * c0) | 0, last | 0);
}

function forwardTwo(f: SparseFactor, rhs: Float64Array, stride: number, off: number, first: number): void {
  const n = f.n | 0;
  const w = f.work;
  const lu = f.lu;
  const pivotRow = f.pivotRow;
  const lRowPtr = f.lRowPtr;
  const lRowIdx = f.lRowIdx;
  if (first > 0) w.fill(0, 0, first << 2);
  let t0 = lRowPtr[first]! << 1;
  for (let i = first; i < n; i = (i + 1) | 0) {
    const s = (Math.imul(pivotRow[i]!, stride) + off) | 0;
    let ar = rhs[s]!;
    let ai = rhs[(s + 1) | 0]!;
    let br = rhs[(s + 2) | 0]!;
    let bi = rhs[(s + 3) | 0]!;
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

function backwardTwo(f: SparseFactor, x: Float64Array, stride: number, off: number, last: number): void {
  const n = f.n | 0;
  const w = f.work;
  const lu = f.lu;
  const order = f.pattern.order;
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const inv = f.pivotInv;
  for (let j = (n - 1) | 0; j >= last; j = (j - 1) | 0) {
    const j4 = j << 2;
    const j2 = j << 1;
    const ar = w[j4]!;
    const ai = w[j4 | 1]!;
    const br = w[j4 | 2]!;
    const bi = w[j4 | 3]!;
    const qr = inv[j2]!;
    const qi = inv[j2 | 1]!;
    const zr = ar * qr - ai * qi;
    const zi = ar * qi + ai * qr;
    const vr = br * qr - bi * qi;
    const vi = br * qi + bi * qr;
    const d = (Math.imul(order[j]!, stride) + off) | 0;
    x[d] = zr;
    x[(d + 1) | 0] = zi;
    x[(d + 2) | 0] = vr;
    x[(d + 3) | 0] = vi;
    const q1 = diagPos[j]! | 0;
    for (let q = colPtr[j]! | 0; q < q1; q = (q + 1) | 0) {
      const i4 = rowIdx[q]! << 2;
      const q2 = q << 1;
      const ur = lu[q2]!;
      const ui = lu[q2 | 1]!;
      w[i4] -= ur * zr - ui * zi;
      w[i4 | 1] -= ur * zi + ui * zr;
      w[i4 | 2] -= ur * vr - ui * vi;
      w[i4 | 3] -= ur * vi + ui * vr;
    }
  }
}

/** nb ≥ 3 right-hand sides, columns c0 .. c0+nb−1, through the work block. */
function solveBlock(f: SparseFactor, rhs: Float64Array, x: Float64Array, nrhs: number, c0: number, nb: number, first: number, last: number): void {
  const n = f.n | 0;
  const w = f.work;
  const lu = f.lu;
  const pivotRow = f.pivotRow;
  const order = f.pattern.order;
  const lRowPtr = f.lRowPtr;
  const lRowIdx = f.lRowIdx;
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const inv = f.pivotInv;
  const stride = (2 * nrhs) | 0;
  const off = (2 * c0) | 0;
  const wb = (2 * nb) | 0;
  if (first > 0) w.fill(0, 0, Math.imul(first, wb));
  for (let i = first | 0; i < n; i = (i + 1) | 0) {
    const s = (Math.imul(pivotRow[i]!, stride) + off) | 0;
    const is = Math.imul(i, wb);
    for (let c = 0; c < wb; c = (c + 1) | 0) w[(is + c) | 0] = rhs[(s + c) | 0]!;
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
  for (let j = (n - 1) | 0; j >= last; j = (j - 1) | 0) {
    const js = Math.imul(j, wb);
    const qr = inv[j << 1]!;
    const qi = inv[(j << 1) | 1]!;
    const d = (Math.imul(order[j]!, stride) + off) | 0;
    for (let c = 0; c < wb; c = (c + 2) | 0) {
      const ar = w[(js + c) | 0]!;
      const ai = w[(js + c + 1) | 0]!;
      const zr = ar * qr - ai * qi;
      const zi = ar * qi + ai * qr;
      w[(js + c) | 0] = zr;
      w[(js + c + 1) | 0] = zi;
      x[(d + c) | 0] = zr;
      x[(d + c + 1) | 0] = zi;
    }
    const q1 = diagPos[j]! | 0;
    for (let q = colPtr[j]! | 0; q < q1; q = (q + 1) | 0) {
      const is = Math.imul(rowIdx[q]!, wb);
      const q2 = q << 1;
      const ur = lu[q2]!;
      const ui = lu[q2 | 1]!;
      for (let c = 0; c < wb; c = (c + 2) | 0) {
        const zr = w[(js + c) | 0]!;
        const zi = w[(js + c + 1) | 0]!;
        w[(is + c) | 0] -= ur * zr - ui * zi;
        w[(is + c + 1) | 0] -= ur * zi + ui * zr;
      }
    }
  }
}

/**
 * Solves Aᴴ·x = b for one vector (length n, complex interleaved). `x` may be `b`.
 * Throws Error if `f` holds no successful factorisation.
 */
export function solveConjTransposed(f: SparseFactor, b: Float64Array, x: Float64Array): void {
  if (!f.valid) throw new Error('sparse solve: no successful factorisation to solve with');
  const n = f.n;
  const w = f.work;
  const lu = f.lu;
  const pivotRow = f.pivotRow;
  const order = f.pattern.order;
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const inv = f.pivotInv;
  // Uᴴ·z = Qᵀ·b: z_j = (b_{Q_j} − Σ_{i<j} conj(u_ij)·z_i) / conj(u_jj)
  for (let j = 0; j < n; j++) {
    const s = 2 * order[j]!;
    let sr = b[s]!;
    let si = b[s + 1]!;
    const dp = diagPos[j]!;
    for (let q = colPtr[j]!; q < dp; q++) {
      const i2 = 2 * rowIdx[q]!;
      const ur = lu[2 * q]!;
      const ui = -lu[2 * q + 1]!;
      const zr = w[i2]!;
      const zi = w[i2 + 1]!;
      sr -= ur * zr - ui * zi;
      si -= ur * zi + ui * zr;
    }
    const qr = inv[2 * j]!;
    const qi = -inv[2 * j + 1]!;
    w[2 * j] = sr * qr - si * qi;
    w[2 * j + 1] = sr * qi + si * qr;
  }
  // Lᴴ·v = z: v_k = z_k − Σ_{i>k} conj(l_ik)·v_i; then x_{P_k} = v_k
  for (let k = n - 1; k >= 0; k--) {
    let sr = w[2 * k]!;
    let si = w[2 * k + 1]!;
    const q1 = colPtr[k + 1]!;
    for (let q = diagPos[k]! + 1; q < q1; q++) {
      const i2 = 2 * rowIdx[q]!;
      const lr = lu[2 * q]!;
      const li = -lu[2 * q + 1]!;
      const vr = w[i2]!;
      const vi = w[i2 + 1]!;
      sr -= lr * vr - li * vi;
      si -= lr * vi + li * vr;
    }
    w[2 * k] = sr;
    w[2 * k + 1] = si;
  }
  for (let k = 0; k < n; k++) {
    const d = 2 * pivotRow[k]!;
    x[d] = w[2 * k]!;
    x[d + 1] = w[2 * k + 1]!;
  }
}
