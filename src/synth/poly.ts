/**
 * Small real and complex polynomial helpers for the synthesis (coefficients in ascending order:
 * p[k] is the coefficient of s^k). Only used while designing, never in a per-frequency loop.
 *
 * @module
 */

/** A complex number as a pair. */
export type Cx = readonly [number, number];

export const cmul = (a: Cx, b: Cx): Cx => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
export const cdiv = (a: Cx, b: Cx): Cx => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
export const cabs = (a: Cx): number => Math.hypot(a[0], a[1]);

/** p(x) at a complex x (Horner). */
export function evalC(p: readonly number[], x: Cx): Cx {
  let r: Cx = [0, 0];
  for (let k = p.length - 1; k >= 0; k--) r = [r[0] * x[0] - r[1] * x[1] + p[k]!, r[0] * x[1] + r[1] * x[0]];
  return r;
}

/** p(x) at a real x. */
export function evalR(p: readonly number[], x: number): number {
  let r = 0;
  for (let k = p.length - 1; k >= 0; k--) r = r * x + p[k]!;
  return r;
}

export function mul(a: readonly number[], b: readonly number[]): number[] {
  const out = new Array<number>(a.length + b.length - 1).fill(0);
  for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j]! += a[i]! * b[j]!;
  return out;
}

export function add(a: readonly number[], b: readonly number[], sb = 1): number[] {
  const n = Math.max(a.length, b.length);
  const out: number[] = [];
  for (let i = 0; i < n; i++) out.push((a[i] ?? 0) + sb * (b[i] ?? 0));
  return out;
}

/** p(−s). */
export function mirror(p: readonly number[]): number[] {
  return p.map((c, k) => (k % 2 === 1 ? -c : c));
}

/** The real polynomial with the given roots (complex ones in conjugate pairs), times `lead`. */
export function fromRoots(roots: readonly Cx[], lead = 1): number[] {
  let p: Cx[] = [[lead, 0]];
  for (const r of roots) {
    const next: Cx[] = new Array(p.length + 1).fill(null).map(() => [0, 0] as Cx);
    for (let k = 0; k < p.length; k++) {
      next[k + 1] = [next[k + 1]![0] + p[k]![0], next[k + 1]![1] + p[k]![1]];
      const m = cmul(p[k]!, r);
      next[k] = [next[k]![0] - m[0], next[k]![1] - m[1]];
    }
    p = next;
  }
  return p.map((c) => c[0]);
}

/** Drops leading coefficients that are zero (or below `tol` times the largest). */
export function trim(p: readonly number[], tol = 0): number[] {
  const big = Math.max(...p.map(Math.abs));
  let n = p.length;
  while (n > 1 && Math.abs(p[n - 1]!) <= tol * big) n--;
  return p.slice(0, n);
}

/**
 * All roots of a real polynomial (Aberth–Ehrlich iteration, then Newton polishing). Degree up to
 * a few tens; multiple roots come out to about the square root of the precision.
 */
export function roots(pIn: readonly number[]): Cx[] {
  const p = trim(pIn);
  const n = p.length - 1;
  if (n < 1) return [];
  const lead = p[n]!;
  const a = p.map((c) => c / lead);
  const dp = a.slice(1).map((c, k) => c * (k + 1));
  // starting points on a circle of the Cauchy bound's radius, turned off the axes
  const radius = 1 + Math.max(...a.slice(0, n).map(Math.abs));
  const r0 = Math.min(radius, Math.pow(Math.abs(a[0]!) || 1, 1 / n) * 1.5 + 0.1);
  const z: Cx[] = [];
  for (let k = 0; k < n; k++) {
    const t = (2 * Math.PI * k) / n + 0.4;
    z.push([r0 * Math.cos(t), r0 * Math.sin(t)]);
  }
  for (let iter = 0; iter < 500; iter++) {
    let moved = 0;
    for (let i = 0; i < n; i++) {
      const pv = evalC(a, z[i]!);
      const dv = evalC(dp, z[i]!);
      if (pv[0] === 0 && pv[1] === 0) continue;
      const ratio = cdiv(pv, dv);
      let sum: Cx = [0, 0];
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        const d: Cx = [z[i]![0] - z[j]![0], z[i]![1] - z[j]![1]];
        const inv = cdiv([1, 0], d);
        sum = [sum[0] + inv[0], sum[1] + inv[1]];
      }
      const denom: Cx = [1 - (ratio[0] * sum[0] - ratio[1] * sum[1]), -(ratio[0] * sum[1] + ratio[1] * sum[0])];
      const w = cdiv(ratio, denom);
      z[i] = [z[i]![0] - w[0], z[i]![1] - w[1]];
      moved = Math.max(moved, cabs(w) / Math.max(1, cabs(z[i]!)));
    }
    if (moved < 1e-15) break;
  }
  return z;
}

/**
 * Divides n by d: quotient and remainder (remainder degree below d's). d's leading coefficient
 * must not be zero.
 */
export function divide(n: readonly number[], d: readonly number[]): { q: number[]; r: number[] } {
  const r = n.slice();
  const dn = d.length - 1;
  if (r.length - 1 < dn) return { q: [0], r };
  const q = new Array<number>(r.length - dn).fill(0);
  for (let k = r.length - 1; k >= dn; k--) {
    const c = r[k]! / d[dn]!;
    q[k - dn] = c;
    for (let j = 0; j <= dn; j++) r[k - dn + j]! -= c * d[j]!;
    r[k] = 0;
  }
  return { q, r: r.slice(0, Math.max(1, dn)) };
}
