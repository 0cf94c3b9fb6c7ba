/**
 * Small dense complex linear algebra on interleaved `Float64Array` storage.
 *
 * Layout: an n×n complex matrix `a` is row-major and interleaved, entry (i, j) has its real part at
 * `a[2 * (i * n + j)]` and its imaginary part at `a[2 * (i * n + j) + 1]` (0-based). An n×m block of
 * right-hand sides uses the same layout with m columns. This matches one frequency slice of
 * {@link NetworkData} values.
 *
 * Every routine writes into caller-given output and workspace arrays and allocates nothing, so it may be
 * called once per frequency point. The `create*` helpers allocate the buffers once, up front.
 * Unless a function says otherwise, outputs must not share memory with inputs.
 *
 * @module
 */

import { estimateInverseNorm1 } from './norm-estimate.js';

const EPS = Number.EPSILON;

/** Copies the first `len` numbers (a plain loop: `subarray` would allocate a view). */
function copyInto(from: Float64Array, to: Float64Array, len: number): void {
  for (let k = 0; k < len; k++) to[k] = from[k]!;
}

/** Allocates a zero n×n complex matrix (length 2n²). */
export function createMatrix(n: number): Float64Array {
  return new Float64Array(2 * n * n);
}

/** Allocates a zero complex vector of length n (2n numbers). */
export function createVector(n: number): Float64Array {
  return new Float64Array(2 * n);
}

/** Writes the n×n identity matrix U into `out`. */
export function identity(n: number, out: Float64Array): Float64Array {
  out.fill(0, 0, 2 * n * n);
  for (let i = 0; i < n; i++) out[2 * (i * n + i)] = 1;
  return out;
}

/** Copies the n×n matrix `a` into `out` (`out` may equal `a`). */
export function copyMatrix(n: number, a: Float64Array, out: Float64Array): Float64Array {
  if (out !== a) copyInto(a, out, 2 * n * n);
  return out;
}

/** out = a + b, entrywise (`out` may equal `a` or `b`). */
export function addMatrix(n: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  const len = 2 * n * n;
  for (let k = 0; k < len; k++) out[k] = a[k]! + b[k]!;
  return out;
}

/** out = a − b, entrywise (`out` may equal `a` or `b`). */
export function subMatrix(n: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  const len = 2 * n * n;
  for (let k = 0; k < len; k++) out[k] = a[k]! - b[k]!;
  return out;
}

/** out = (re + j·im)·a, entrywise (`out` may equal `a`). */
export function scaleMatrix(n: number, a: Float64Array, re: number, im: number, out: Float64Array): Float64Array {
  const len = 2 * n * n;
  for (let k = 0; k < len; k += 2) {
    const x = a[k]!;
    const y = a[k + 1]!;
    out[k] = re * x - im * y;
    out[k + 1] = re * y + im * x;
  }
  return out;
}

/**
 * out = a·b for n×n matrices, (a·b)_ij = Σ_k a_ik b_kj.
 * `out` must not share memory with `a` or `b` (throws RangeError if it is the same array).
 */
export function multiply(n: number, a: Float64Array, b: Float64Array, out: Float64Array): Float64Array {
  if (out === a || out === b) throw new RangeError('the product matrix must not be one of its factors');
  for (let i = 0; i < n; i++) {
    const rowOut = 2 * i * n;
    for (let j = 0; j < 2 * n; j++) out[rowOut + j] = 0;
    for (let k = 0; k < n; k++) {
      const ar = a[2 * (i * n + k)]!;
      const ai = a[2 * (i * n + k) + 1]!;
      if (ar === 0 && ai === 0) continue;
      const rowB = 2 * k * n;
      for (let j = 0; j < n; j++) {
        const br = b[rowB + 2 * j]!;
        const bi = b[rowB + 2 * j + 1]!;
        out[rowOut + 2 * j] += ar * br - ai * bi;
        out[rowOut + 2 * j + 1] += ar * bi + ai * br;
      }
    }
  }
  return out;
}

/** out = aᴴ (transpose-conjugate), (aᴴ)_ij = conj(a_ji). Works in place (`out` may equal `a`). */
export function conjTranspose(n: number, a: Float64Array, out: Float64Array): Float64Array {
  for (let i = 0; i < n; i++) {
    const d = 2 * (i * n + i);
    out[d] = a[d]!;
    out[d + 1] = -a[d + 1]!;
    for (let j = i + 1; j < n; j++) {
      const u = 2 * (i * n + j);
      const l = 2 * (j * n + i);
      const ur = a[u]!;
      const ui = a[u + 1]!;
      out[u] = a[l]!;
      out[u + 1] = -a[l + 1]!;
      out[l] = ur;
      out[l + 1] = -ui;
    }
  }
  return out;
}

/**
 * Matrix 1-norm ‖a‖₁ = max_j Σ_i |a_ij| (largest column sum of moduli).
 */
export function norm1(n: number, a: Float64Array): number {
  let best = 0;
  for (let j = 0; j < n; j++) {
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const k = 2 * (i * n + j);
      sum += Math.hypot(a[k]!, a[k + 1]!);
    }
    if (sum > best || Number.isNaN(sum)) best = sum;
  }
  return best;
}

// ---------------------------------------------------------------------------------------------
// LU factorisation with partial pivoting
// ---------------------------------------------------------------------------------------------

/**
 * Buffers for an LU factorisation P·A = L·U of an n×n complex matrix, allocated by {@link createLu}.
 * `lu` holds the unit lower factor L (below the diagonal) and U (on and above it); `pivots[k]` is the
 * row swapped with row k at elimination step k (applied in order k = 0, 1, …); `invDiag` holds 1/u_kk.
 * `norm` is ‖A‖₁ of the matrix last factored. `v1`, `v2` are scratch vectors for the condition estimate.
 */
export interface LuFactors {
  readonly n: number;
  readonly lu: Float64Array;
  readonly pivots: Int32Array;
  readonly invDiag: Float64Array;
  readonly v1: Float64Array;
  readonly v2: Float64Array;
  norm: number;
  /** -1 after a successful factorisation, otherwise the 0-based step with a zero pivot. */
  status: number;
}

/** Allocates the buffers for factorising n×n matrices. */
export function createLu(n: number): LuFactors {
  return {
    n,
    lu: createMatrix(n),
    pivots: new Int32Array(n),
    invDiag: createVector(n),
    v1: createVector(n),
    v2: createVector(n),
    norm: 0,
    status: -1,
  };
}

/** Value returned by {@link luFactor} when every pivot is usable. */
export const LU_OK = -1;

/**
 * Thrown when a matrix is singular to working precision. `pivot` is the 0-based elimination step whose
 * pivot was zero (or non-finite), or -1 when the matrix was rejected by its reciprocal condition number.
 */
export class SingularMatrixError extends Error {
  readonly pivot: number;
  readonly rcond: number;
  constructor(pivot: number, rcond: number, what = 'matrix') {
    super(
      pivot >= 0
        ? `${what} is singular: zero or non-finite pivot at elimination step ${pivot} (0-based)`
        : `${what} is singular to working precision: reciprocal condition number ${rcond.toExponential(2)}`,
    );
    this.name = 'SingularMatrixError';
    this.pivot = pivot;
    this.rcond = rcond;
  }
}

/**
 * Factorises P·A = L·U with partial pivoting (rows chosen by the largest |Re|+|Im| in the pivot column),
 * writing into `f` (A itself is not modified; A may be `f.lu`).
 *
 * Returns {@link LU_OK} (-1) on success, or the 0-based step k at which the best available pivot has
 * |Re|+|Im| ≤ `pivotTolerance`·‖A‖₁ (with the default 0 this means an exact zero), or is not finite.
 * The factorisation stops at that step, so `f` is then unusable for solving. The result is also stored
 * in `f.status`.
 */
export function luFactor(n: number, a: Float64Array, f: LuFactors, pivotTolerance = 0): number {
  if (f.n !== n) throw new RangeError(`workspace is for n=${f.n}, not ${n}`);
  const lu = f.lu;
  if (lu !== a) copyInto(a, lu, 2 * n * n);
  const norm = norm1(n, lu);
  f.norm = norm;
  const threshold = pivotTolerance * norm;
  const piv = f.pivots;
  const inv = f.invDiag;
  for (let k = 0; k < n; k++) {
    // choose the pivot row
    let p = k;
    let best = Math.abs(lu[2 * (k * n + k)]!) + Math.abs(lu[2 * (k * n + k) + 1]!);
    for (let i = k + 1; i < n; i++) {
      const m = Math.abs(lu[2 * (i * n + k)]!) + Math.abs(lu[2 * (i * n + k) + 1]!);
      if (m > best) {
        best = m;
        p = i;
      }
    }
    piv[k] = p;
    if (!(best > threshold) || !Number.isFinite(best)) {
      f.status = k;
      return k;
    }
    if (p !== k) {
      const rk = 2 * k * n;
      const rp = 2 * p * n;
      for (let j = 0; j < 2 * n; j++) {
        const t = lu[rk + j]!;
        lu[rk + j] = lu[rp + j]!;
        lu[rp + j] = t;
      }
    }
    // reciprocal of the pivot, Smith's scaling
    const pr = lu[2 * (k * n + k)]!;
    const pi = lu[2 * (k * n + k) + 1]!;
    let qr: number;
    let qi: number;
    if (Math.abs(pr) >= Math.abs(pi)) {
      const r = pi / pr;
      const d = pr + pi * r;
      qr = 1 / d;
      qi = -r / d;
    } else {
      const r = pr / pi;
      const d = pi + pr * r;
      qr = r / d;
      qi = -1 / d;
    }
    inv[2 * k] = qr;
    inv[2 * k + 1] = qi;
    // eliminate below the pivot
    for (let i = k + 1; i < n; i++) {
      const ik = 2 * (i * n + k);
      const xr = lu[ik]!;
      const xi = lu[ik + 1]!;
      if (xr === 0 && xi === 0) continue;
      const lr = xr * qr - xi * qi;
      const li = xr * qi + xi * qr;
      lu[ik] = lr;
      lu[ik + 1] = li;
      for (let j = k + 1; j < n; j++) {
        const kj = 2 * (k * n + j);
        const ij = 2 * (i * n + j);
        const ur = lu[kj]!;
        const ui = lu[kj + 1]!;
        lu[ij] -= lr * ur - li * ui;
        lu[ij + 1] -= lr * ui + li * ur;
      }
    }
  }
  f.status = LU_OK;
  return LU_OK;
}

/**
 * Solves A·X = B for the n×m block B (row-major, interleaved, m columns) using a successful
 * factorisation `f` from {@link luFactor}. Writes X into `x`; `x` may equal `b` (in-place solve).
 * Throws {@link SingularMatrixError} if `f` holds a failed factorisation.
 */
export function luSolve(f: LuFactors, b: Float64Array, x: Float64Array, m = f.n): Float64Array {
  const n = f.n;
  if (f.status !== LU_OK) throw new SingularMatrixError(f.status, 0);
  const lu = f.lu;
  const inv = f.invDiag;
  const w = 2 * m;
  if (x !== b) copyInto(b, x, n * w);
  // apply the row swaps in order: x ← P·b
  for (let k = 0; k < n; k++) {
    const p = f.pivots[k]!;
    if (p !== k) {
      const rk = k * w;
      const rp = p * w;
      for (let j = 0; j < w; j++) {
        const t = x[rk + j]!;
        x[rk + j] = x[rp + j]!;
        x[rp + j] = t;
      }
    }
  }
  // forward substitution with unit L
  for (let i = 1; i < n; i++) {
    const ri = i * w;
    for (let k = 0; k < i; k++) {
      const lr = lu[2 * (i * n + k)]!;
      const li = lu[2 * (i * n + k) + 1]!;
      if (lr === 0 && li === 0) continue;
      const rk = k * w;
      for (let j = 0; j < w; j += 2) {
        const yr = x[rk + j]!;
        const yi = x[rk + j + 1]!;
        x[ri + j] -= lr * yr - li * yi;
        x[ri + j + 1] -= lr * yi + li * yr;
      }
    }
  }
  // back substitution with U
  for (let i = n - 1; i >= 0; i--) {
    const ri = i * w;
    for (let k = i + 1; k < n; k++) {
      const ur = lu[2 * (i * n + k)]!;
      const ui = lu[2 * (i * n + k) + 1]!;
      if (ur === 0 && ui === 0) continue;
      const rk = k * w;
      for (let j = 0; j < w; j += 2) {
        const yr = x[rk + j]!;
        const yi = x[rk + j + 1]!;
        x[ri + j] -= ur * yr - ui * yi;
        x[ri + j + 1] -= ur * yi + ui * yr;
      }
    }
    const qr = inv[2 * i]!;
    const qi = inv[2 * i + 1]!;
    for (let j = 0; j < w; j += 2) {
      const yr = x[ri + j]!;
      const yi = x[ri + j + 1]!;
      x[ri + j] = yr * qr - yi * qi;
      x[ri + j + 1] = yr * qi + yi * qr;
    }
  }
  return x;
}

/**
 * Solves Aᴴ·x = b for one vector (length n, interleaved) with the factorisation P·A = L·U of A:
 * Aᴴ = Uᴴ·Lᴴ·P, so Uᴴ·w = b (forward), Lᴴ·y = w (backward), x = Pᵀ·y. `x` may equal `b`.
 */
export function luSolveConjTransposed(f: LuFactors, b: Float64Array, x: Float64Array): Float64Array {
  const n = f.n;
  if (f.status !== LU_OK) throw new SingularMatrixError(f.status, 0);
  const lu = f.lu;
  const inv = f.invDiag;
  if (x !== b) copyInto(b, x, 2 * n);
  // Uᴴ w = b: w_i = (b_i − Σ_{k<i} conj(u_ki) w_k) / conj(u_ii)
  for (let i = 0; i < n; i++) {
    let sr = x[2 * i]!;
    let si = x[2 * i + 1]!;
    for (let k = 0; k < i; k++) {
      const ur = lu[2 * (k * n + i)]!;
      const ui = -lu[2 * (k * n + i) + 1]!;
      const wr = x[2 * k]!;
      const wi = x[2 * k + 1]!;
      sr -= ur * wr - ui * wi;
      si -= ur * wi + ui * wr;
    }
    const qr = inv[2 * i]!;
    const qi = -inv[2 * i + 1]!;
    x[2 * i] = sr * qr - si * qi;
    x[2 * i + 1] = sr * qi + si * qr;
  }
  // Lᴴ y = w: y_i = w_i − Σ_{k>i} conj(l_ki) y_k
  for (let i = n - 1; i >= 0; i--) {
    let sr = x[2 * i]!;
    let si = x[2 * i + 1]!;
    for (let k = i + 1; k < n; k++) {
      const lr = lu[2 * (k * n + i)]!;
      const li = -lu[2 * (k * n + i) + 1]!;
      const yr = x[2 * k]!;
      const yi = x[2 * k + 1]!;
      sr -= lr * yr - li * yi;
      si -= lr * yi + li * yr;
    }
    x[2 * i] = sr;
    x[2 * i + 1] = si;
  }
  // x = Pᵀ y: undo the swaps in reverse order
  for (let k = n - 1; k >= 0; k--) {
    const p = f.pivots[k]!;
    if (p !== k) {
      const tr = x[2 * k]!;
      const ti = x[2 * k + 1]!;
      x[2 * k] = x[2 * p]!;
      x[2 * k + 1] = x[2 * p + 1]!;
      x[2 * p] = tr;
      x[2 * p + 1] = ti;
    }
  }
  return x;
}

/**
 * Factorises `a` and solves A·X = B (n×m block). Throws {@link SingularMatrixError} carrying the pivot
 * step when a pivot is zero. `x` may equal `b`, and may equal `a` only if `a` is not needed afterwards
 * and `f.lu` is a different array (it always is for {@link createLu} buffers).
 */
export function solve(
  n: number,
  a: Float64Array,
  b: Float64Array,
  x: Float64Array,
  f: LuFactors,
  m = n,
): Float64Array {
  const status = luFactor(n, a, f);
  if (status !== LU_OK) throw new SingularMatrixError(status, 0);
  return luSolve(f, b, x, m);
}

/**
 * out = a⁻¹, by factorising and solving A·X = U. `out` may equal `a`.
 * Throws {@link SingularMatrixError} with the pivot step when a pivot is zero.
 */
export function inverse(n: number, a: Float64Array, out: Float64Array, f: LuFactors): Float64Array {
  const status = luFactor(n, a, f);
  if (status !== LU_OK) throw new SingularMatrixError(status, 0);
  identity(n, out);
  return luSolve(f, out, out, n);
}

/**
 * Lower estimate of ‖A⁻¹‖₁ from the factorisation in `f`, by the Hager/Higham 1-norm estimator for
 * complex matrices (norm-estimate.ts; W. W. Hager 1984; N. J. Higham, ACM TOMS 14(4), 1988):
 *   v = A⁻¹(e/n), γ = ‖v‖₁, ξ = sign(v), x = A⁻ᴴξ; then repeatedly take j = argmax|x_j|, v = A⁻¹e_j,
 *   stop when ‖v‖₁ no longer grows, or |x_j| is still the largest entry, or after 5 steps; finally compare
 *   with 2‖A⁻¹t‖₁/(3n) for t_i = (−1)^i (1 + i/(n−1)) (steps as recalled from the paper, from memory).
 *   The value is ‖A⁻¹y‖₁/‖y‖₁ for some y, hence never above ‖A⁻¹‖₁ (checked in the tests against the
 *   exact value). Returns Infinity when the factorisation failed or the solves overflow.
 */
export function invNorm1Estimate(f: LuFactors): number {
  if (f.status !== LU_OK) return Infinity;
  return estimateInverseNorm1(f.n, f, denseSolve, denseSolveH, f.v1, f.v2);
}

const denseSolve = (f: LuFactors, x: Float64Array): void => void luSolve(f, x, x, 1);
const denseSolveH = (f: LuFactors, x: Float64Array): void => void luSolveConjTransposed(f, x, x);

/**
 * Reciprocal condition number estimate in the 1-norm, 1 / (‖A‖₁ · est‖A⁻¹‖₁), from a factorisation
 * made by {@link luFactor}. Because the inverse norm is estimated from below, this is an upper estimate
 * of the true 1/κ₁(A). Returns 0 for a failed factorisation, a zero matrix, or overflow.
 */
export function rcondEstimate(f: LuFactors): number {
  if (f.status !== LU_OK || !(f.norm > 0)) return 0;
  if (f.n === 0) return 1;
  const est = invNorm1Estimate(f);
  if (!(est > 0) || !Number.isFinite(est)) return 0;
  const r = 1 / (f.norm * est);
  return Number.isFinite(r) ? r : 0;
}

// ---------------------------------------------------------------------------------------------
// Hermitian eigenvalues (cyclic complex Jacobi)
// ---------------------------------------------------------------------------------------------

/** Buffers for {@link hermitianEigen} and {@link gramEigenvalues}, allocated by {@link createEigenWorkspace}. */
export interface EigenWorkspace {
  readonly n: number;
  /** Working copy that the rotations diagonalise. */
  readonly a: Float64Array;
  /** Holds AᴴA for {@link gramEigenvalues}. */
  readonly g: Float64Array;
}

/** Allocates the buffers for eigenvalues of n×n Hermitian matrices. */
export function createEigenWorkspace(n: number): EigenWorkspace {
  return { n, a: createMatrix(n), g: createMatrix(n) };
}

/** Largest number of cyclic sweeps before {@link hermitianEigen} gives up. */
export const MAX_JACOBI_SWEEPS = 60;

/**
 * Eigenvalues (ascending, real, into `values[0..n)`) and optionally eigenvectors of a Hermitian n×n
 * matrix h, by the cyclic Jacobi method with complex rotations.
 *
 * For a pivot pair (p, q) with h_pq = r·e^{jφ}, r > 0, the unitary rotation V that is the identity
 * except V_pp = c, V_pq = s·e^{jφ}, V_qp = −s·e^{−jφ}, V_qq = c, with
 *   τ = (h_qq − h_pp)/(2r), t = sign(τ)/(|τ| + √(1+τ²)), c = 1/√(1+t²), s = t·c,
 * makes (VᴴhV)_pq = 0 and moves the diagonal to h_pp − t·r and h_qq + t·r (the real symmetric Jacobi
 * rotation of Golub & Van Loan, conjugated by diag(1, e^{−jφ})). Sweeps repeat until every off-diagonal
 * modulus is at most ε·max_ij |h_ij|.
 *
 * Only the upper triangle and the real parts of the diagonal of h are read (h is taken as Hermitian).
 * If `vectors` is given, its column k receives a unit eigenvector for `values[k]`.
 * Returns the number of sweeps used; throws Error if {@link MAX_JACOBI_SWEEPS} is not enough.
 */
export function hermitianEigen(
  n: number,
  h: Float64Array,
  values: Float64Array,
  vectors: Float64Array | null,
  work: EigenWorkspace,
): number {
  if (work.n !== n) throw new RangeError(`workspace is for n=${work.n}, not ${n}`);
  const a = work.a;
  // symmetric fill from the upper triangle
  let big = 0;
  for (let i = 0; i < n; i++) {
    const d = 2 * (i * n + i);
    a[d] = h[d]!;
    a[d + 1] = 0;
    big = Math.max(big, Math.abs(a[d]!));
    for (let j = i + 1; j < n; j++) {
      const u = 2 * (i * n + j);
      const l = 2 * (j * n + i);
      const re = h[u]!;
      const im = h[u + 1]!;
      a[u] = re;
      a[u + 1] = im;
      a[l] = re;
      a[l + 1] = -im;
      big = Math.max(big, Math.hypot(re, im));
    }
  }
  if (vectors) identity(n, vectors);
  const tol = Math.max(EPS * big, Number.MIN_VALUE);
  let sweeps = 0;
  for (;;) {
    let rotations = 0;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const pq = 2 * (p * n + q);
        const xr = a[pq]!;
        const xi = a[pq + 1]!;
        const r = Math.hypot(xr, xi);
        if (!(r > tol)) continue;
        rotations++;
        const er = xr / r; // e^{jφ}
        const ei = xi / r;
        const app = a[2 * (p * n + p)]!;
        const aqq = a[2 * (q * n + q)]!;
        const tau = (aqq - app) / (2 * r);
        const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = t * c;
        // columns: a ← a·V
        //   a_kp' = c·a_kp − s·e^{−jφ}·a_kq,  a_kq' = s·e^{jφ}·a_kp + c·a_kq
        for (let k = 0; k < n; k++) {
          const kp = 2 * (k * n + p);
          const kq = 2 * (k * n + q);
          const pr = a[kp]!;
          const pi = a[kp + 1]!;
          const qr = a[kq]!;
          const qi = a[kq + 1]!;
          a[kp] = c * pr - s * (er * qr + ei * qi);
          a[kp + 1] = c * pi - s * (er * qi - ei * qr);
          a[kq] = s * (er * pr - ei * pi) + c * qr;
          a[kq + 1] = s * (er * pi + ei * pr) + c * qi;
        }
        // rows: a ← Vᴴ·a
        //   a_pk' = c·a_pk − s·e^{jφ}·a_qk,  a_qk' = s·e^{−jφ}·a_pk + c·a_qk
        for (let k = 0; k < n; k++) {
          const pk = 2 * (p * n + k);
          const qk = 2 * (q * n + k);
          const pr = a[pk]!;
          const pi = a[pk + 1]!;
          const qr = a[qk]!;
          const qi = a[qk + 1]!;
          a[pk] = c * pr - s * (er * qr - ei * qi);
          a[pk + 1] = c * pi - s * (er * qi + ei * qr);
          a[qk] = s * (er * pr + ei * pi) + c * qr;
          a[qk + 1] = s * (er * pi - ei * pr) + c * qi;
        }
        a[2 * (p * n + p)] = app - t * r;
        a[2 * (p * n + p) + 1] = 0;
        a[2 * (q * n + q)] = aqq + t * r;
        a[2 * (q * n + q) + 1] = 0;
        a[pq] = 0;
        a[pq + 1] = 0;
        a[2 * (q * n + p)] = 0;
        a[2 * (q * n + p) + 1] = 0;
        if (vectors) {
          for (let k = 0; k < n; k++) {
            const kp = 2 * (k * n + p);
            const kq = 2 * (k * n + q);
            const pr = vectors[kp]!;
            const pi = vectors[kp + 1]!;
            const qr = vectors[kq]!;
            const qi = vectors[kq + 1]!;
            vectors[kp] = c * pr - s * (er * qr + ei * qi);
            vectors[kp + 1] = c * pi - s * (er * qi - ei * qr);
            vectors[kq] = s * (er * pr - ei * pi) + c * qr;
            vectors[kq + 1] = s * (er * pi + ei * pr) + c * qi;
          }
        }
      }
    }
    if (rotations === 0) break;
    sweeps++;
    if (sweeps >= MAX_JACOBI_SWEEPS) {
      throw new Error(`the eigenvalue iteration did not converge after ${MAX_JACOBI_SWEEPS} sweeps (non-finite input?)`);
    }
  }
  for (let i = 0; i < n; i++) values[i] = a[2 * (i * n + i)]!;
  // selection sort, ascending, carrying the eigenvector columns along
  for (let i = 0; i < n - 1; i++) {
    let m = i;
    for (let k = i + 1; k < n; k++) if (values[k]! < values[m]!) m = k;
    if (m === i) continue;
    const t = values[i]!;
    values[i] = values[m]!;
    values[m] = t;
    if (vectors) {
      for (let k = 0; k < n; k++) {
        const ki = 2 * (k * n + i);
        const km = 2 * (k * n + m);
        const tr = vectors[ki]!;
        const ti = vectors[ki + 1]!;
        vectors[ki] = vectors[km]!;
        vectors[ki + 1] = vectors[km + 1]!;
        vectors[km] = tr;
        vectors[km + 1] = ti;
      }
    }
  }
  return sweeps;
}

/**
 * Eigenvalues of the Gram matrix aᴴ·a (ascending, all ≥ 0 up to rounding) into `values[0..n)`; these are
 * the squared singular values of a. For an S-matrix, a largest value above 1 means the network delivers
 * power at that frequency (not passive); all values equal to 1 means lossless. Returns the sweeps used.
 */
export function gramEigenvalues(n: number, a: Float64Array, values: Float64Array, work: EigenWorkspace): number {
  if (work.n !== n) throw new RangeError(`workspace is for n=${work.n}, not ${n}`);
  const g = work.g;
  // g_ij = Σ_k conj(a_ki)·a_kj, upper triangle is enough
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      let sr = 0;
      let si = 0;
      for (let k = 0; k < n; k++) {
        const xr = a[2 * (k * n + i)]!;
        const xi = -a[2 * (k * n + i) + 1]!;
        const yr = a[2 * (k * n + j)]!;
        const yi = a[2 * (k * n + j) + 1]!;
        sr += xr * yr - xi * yi;
        si += xr * yi + xi * yr;
      }
      g[2 * (i * n + j)] = sr;
      g[2 * (i * n + j) + 1] = si;
    }
  }
  return hermitianEigen(n, g, values, null, work);
}
