/**
 * The 1-norm estimator of W. W. Hager ("Condition estimates", SIAM J. Sci. Stat. Comput. 5(2),
 * 1984) in the form N. J. Higham gives for complex matrices (ACM TOMS 14(4), 1988), for any
 * factorisation that can solve with A and with Aᴴ — the dense LU of complex.ts and the sparse LU of
 * solve/sparse share it. Steps as recalled (from memory):
 *   v = A⁻¹(e/n), γ = ‖v‖₁; ξ = sign(v) (ξ_i = v_i/|v_i|, 1 where v_i = 0); z = A⁻ᴴξ;
 *   repeat (at most 4 more times): j = argmax_i |z_i|; v = A⁻¹e_j; stop if ‖v‖₁ ≤ γ; γ = ‖v‖₁;
 *   ξ = sign(v); z = A⁻ᴴξ; stop if |z_j| = max_i |z_i|;
 *   finally γ = max(γ, 2‖A⁻¹t‖₁/(3n)) with t_i = (−1)^i (1 + i/(n−1)).
 * Each value taken is ‖A⁻¹y‖₁/‖y‖₁ for some y, so the estimate never exceeds ‖A⁻¹‖₁.
 *
 * Vectors are complex interleaved; `v` and `z` are caller-given work vectors of 2n numbers. The
 * solves are passed as plain functions of (factors, vector) so that no closure is made per call.
 * No allocation.
 *
 * @module
 */

/** Solves in place with the factorisation `f`: `x ← A⁻¹x` (or `A⁻ᴴx`). */
export type InPlaceSolve<F> = (f: F, x: Float64Array) => void;

/** Lower estimate of ‖A⁻¹‖₁ (see the module comment); Infinity when the solves overflow. */
export function estimateInverseNorm1<F>(n: number, f: F, solveA: InPlaceSolve<F>, solveAH: InPlaceSolve<F>, v: Float64Array, z: Float64Array): number {
  if (n === 0) return 0;
  for (let i = 0; i < n; i++) {
    v[2 * i] = 1 / n;
    v[2 * i + 1] = 0;
  }
  solveA(f, v);
  let gamma = norm1(n, v);
  if (n === 1) return Number.isFinite(gamma) ? gamma : Infinity;
  signOf(n, v, z);
  solveAH(f, z);
  for (let iter = 2; iter <= 5; iter++) {
    const j = argMaxAbs(n, z);
    v.fill(0, 0, 2 * n);
    v[2 * j] = 1;
    solveA(f, v);
    const g = norm1(n, v);
    if (!(g > gamma)) break;
    gamma = g;
    signOf(n, v, z);
    solveAH(f, z);
    const jNew = argMaxAbs(n, z);
    const zj = z[2 * j]! * z[2 * j]! + z[2 * j + 1]! * z[2 * j + 1]!;
    const zn = z[2 * jNew]! * z[2 * jNew]! + z[2 * jNew + 1]! * z[2 * jNew + 1]!;
    if (zj >= zn) break;
  }
  for (let i = 0; i < n; i++) {
    v[2 * i] = (i % 2 === 0 ? 1 : -1) * (1 + i / (n - 1));
    v[2 * i + 1] = 0;
  }
  solveA(f, v);
  const alt = (2 * norm1(n, v)) / (3 * n);
  if (alt > gamma) gamma = alt;
  return Number.isFinite(gamma) ? gamma : Infinity;
}

function norm1(n: number, v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < n; i++) {
    const re = v[2 * i]!;
    const im = v[2 * i + 1]!;
    s += Math.sqrt(re * re + im * im);
  }
  return s;
}

/** out_i = v_i/|v_i| (1 where v_i = 0). `out` may be `v`. */
function signOf(n: number, v: Float64Array, out: Float64Array): void {
  for (let i = 0; i < n; i++) {
    const re = v[2 * i]!;
    const im = v[2 * i + 1]!;
    const r = Math.sqrt(re * re + im * im);
    if (r > 0) {
      out[2 * i] = re / r;
      out[2 * i + 1] = im / r;
    } else {
      out[2 * i] = 1;
      out[2 * i + 1] = 0;
    }
  }
}

function argMaxAbs(n: number, v: Float64Array): number {
  let j = 0;
  let best = -1;
  for (let i = 0; i < n; i++) {
    const re = v[2 * i]!;
    const im = v[2 * i + 1]!;
    const m = re * re + im * im;
    if (m > best) {
      best = m;
      j = i;
    }
  }
  return j;
}
