/**
 * Low-pass ladder prototypes (source 1 ohm, cutoff 1 rad/s): element values g1…gn of the
 * all-pole responses, and their response functions.
 *
 * - Butterworth: g_k = 2·sin((2k−1)π/(2n)), cutoff at the 3 dB point (closed form; Matthaei,
 *   Young & Jones 1964, eq. 4.05-1).
 * - Chebyshev, any ripple: the closed forms of Matthaei, Young & Jones (1964, eq. 4.05-2, after
 *   Weinberg), cutoff at the edge of the ripple band.
 * - Bessel (maximally flat delay): Darlington's insertion-loss synthesis (1939) of the reverse
 *   Bessel polynomial — S21 = B(0)/B(s), S11 = F/B with F(s)F(−s) = B(s)B(−s) − B(0)², the input
 *   impedance (B + F)/(B − F) expanded as a continued fraction about infinity (Cauer's ladder
 *   expansion) — scaled so that the cutoff is the 3 dB point.
 * - Unequal terminations: the same synthesis with |S21(0)|² below one (the mismatch loss of the
 *   two terminations), for every response whose peak gain then stays at or below one.
 *
 * @module
 */
import { add, cabs, evalC, fromRoots, mirror, mul, roots, divide, type Cx } from './poly.js';

export type AllPoleResponse = 'butterworth' | 'chebyshev' | 'bessel';
export type FirstElement = 'shunt' | 'series';

/** A ladder prototype: source 1 ohm, cutoff 1 rad/s. */
export interface Prototype {
  response: AllPoleResponse;
  order: number;
  /** Pass-band ripple in dB (Chebyshev), else 0. */
  rippleDb: number;
  /** Element values: inductances (H) of series arms, capacitances (F) of shunt arms. */
  g: number[];
  /** Which arm comes first: a shunt capacitor or a series inductor (the rest alternate). */
  first: FirstElement;
  /** The load resistance (ohm, source 1 ohm). */
  load: number;
  /** The table's g(n+1): the load resistance after a shunt capacitor, its conductance after a series inductor. */
  gNext: number;
  /** How the values were found (for the comments of a written netlist). */
  method: string;
}

/** The largest order the synthesis takes (the published tables go to 10; so does this). */
export const MAX_ORDER = 10;

/** Butterworth g values (closed form). */
export function butterworthG(n: number): number[] {
  return Array.from({ length: n }, (_, i) => 2 * Math.sin(((2 * (i + 1) - 1) * Math.PI) / (2 * n)));
}

/** ε² of a ripple in dB: 10^(ripple/10) − 1. */
export function epsilonSquared(rippleDb: number): number {
  return Math.expm1((rippleDb * Math.LN10) / 10);
}

/** Chebyshev g values and g(n+1) (closed forms, Matthaei, Young & Jones 1964, eq. 4.05-2). */
export function chebyshevG(n: number, rippleDb: number): { g: number[]; gNext: number } {
  // β = ln(coth(Lar/17.37)), 17.37 = 40/ln 10
  const x = (rippleDb * Math.LN10) / 40;
  const beta = Math.log(1 / Math.tanh(x));
  const gam = Math.sinh(beta / (2 * n));
  const a = (k: number) => Math.sin(((2 * k - 1) * Math.PI) / (2 * n));
  const b = (k: number) => gam * gam + Math.sin((k * Math.PI) / n) ** 2;
  const g = [(2 * a(1)) / gam];
  for (let k = 2; k <= n; k++) g.push((4 * a(k - 1) * a(k)) / (b(k - 1) * g[k - 2]!));
  const gNext = n % 2 === 1 ? 1 : 1 / Math.tanh(beta / 4) ** 2;
  return { g, gNext };
}

/** Chebyshev polynomial T_n(x) for any real x. */
export function chebyshevT(n: number, x: number): number {
  if (Math.abs(x) <= 1) return Math.cos(n * Math.acos(x));
  const v = Math.cosh(n * Math.acosh(Math.abs(x)));
  return x < 0 && n % 2 === 1 ? -v : v;
}

/** Coefficients (ascending) of the reverse Bessel polynomial θ_n: a_k = (2n−k)!/(2^(n−k)·k!·(n−k)!). */
export function besselPolynomial(n: number): number[] {
  const fact = (m: number) => {
    let f = 1;
    for (let i = 2; i <= m; i++) f *= i;
    return f;
  };
  return Array.from({ length: n + 1 }, (_, k) => fact(2 * n - k) / (2 ** (n - k) * fact(k) * fact(n - k)));
}

/** |p(jω)|². */
function magSq(p: readonly number[], w: number): number {
  const v = evalC(p, [0, w]);
  return v[0] * v[0] + v[1] * v[1];
}

/** The 3 dB frequency (rad/s) of B(0)/B(s) for the delay-normalised Bessel polynomial (bisection). */
export function besselCutoff(n: number): number {
  const b = besselPolynomial(n);
  const target = 2 * b[0]! * b[0]!;
  let lo = 0;
  let hi = 1;
  while (magSq(b, hi) < target) hi *= 2;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (magSq(b, mid) < target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** The Bessel polynomial scaled so that its 3 dB point is at 1 rad/s, leading coefficient 1. */
function besselNormalised(n: number): number[] {
  const b = besselPolynomial(n);
  const w3 = besselCutoff(n);
  const scaled = b.map((c, k) => c * w3 ** k);
  return scaled.map((c) => c / scaled[n]!);
}

/** The denominator E(s) (ascending) of S21 = E(0)·√K/E(s) for a response, cutoff 1 rad/s. */
export function responsePolynomial(response: AllPoleResponse, n: number, rippleDb = 0): number[] {
  if (response === 'bessel') return besselNormalised(n);
  const poles: Cx[] = [];
  if (response === 'butterworth') {
    for (let k = 1; k <= n; k++) {
      const t = ((2 * k - 1) * Math.PI) / (2 * n);
      poles.push([-Math.sin(t), Math.cos(t)]);
    }
    return fromRoots(poles);
  }
  // Chebyshev poles: −sinh(a)·sin θk + j·cosh(a)·cos θk, a = asinh(1/ε)/n
  const eps = Math.sqrt(epsilonSquared(rippleDb));
  const a = Math.asinh(1 / eps) / n;
  for (let k = 1; k <= n; k++) {
    const t = ((2 * k - 1) * Math.PI) / (2 * n);
    poles.push([-Math.sinh(a) * Math.sin(t), Math.cosh(a) * Math.cos(t)]);
  }
  // leading coefficient ε·2^(n−1) makes |E(jω)|² = 1 + ε²·T_n(ω)²
  return fromRoots(poles, eps * 2 ** (n - 1));
}

/**
 * |S21|² of the prototype at normalised frequency Ω (rad/s), with the peak gain `peak` (1 for
 * equal terminations): Butterworth peak/(1 + Ω^2n), Chebyshev peak/(1 + ε²·T_n(Ω)²) (for an even
 * order, peak/(1+ε²) at 0), Bessel peak·|B(0)/B(jΩ)|².
 */
export function prototypeGain(response: AllPoleResponse, n: number, rippleDb: number, omega: number, peak = 1): number {
  if (response === 'butterworth') return peak / (1 + Math.abs(omega) ** (2 * n));
  if (response === 'chebyshev') {
    const t = chebyshevT(n, omega);
    return peak / (1 + epsilonSquared(rippleDb) * t * t);
  }
  if (!Number.isFinite(omega)) return 0;
  const e = besselNormalised(n);
  return (peak * e[0]! * e[0]!) / magSq(e, omega);
}

/** The peak gain 4r/(1+r)² — times 1 + ε² for an even-order Chebyshev, whose gain at 0 Hz is 1/(1+ε²) of its peak. */
export function peakGain(response: AllPoleResponse, n: number, rippleDb: number, r: number): number {
  const mismatch = (4 * r) / (1 + r) ** 2;
  return response === 'chebyshev' && n % 2 === 0 ? mismatch * (1 + epsilonSquared(rippleDb)) : mismatch;
}

/**
 * The prototype for a response, order and first element, with load resistance `load` (source
 * 1 ohm). Without `load`: equal terminations, or for an even-order Chebyshev its own load
 * (g(n+1), which cannot be 1). Throws RangeError with a plain message for what cannot be made.
 */
export function prototype(opts: { response: AllPoleResponse; order: number; rippleDb?: number; first?: FirstElement; load?: number }): Prototype {
  const { response, order: n } = opts;
  const rippleDb = response === 'chebyshev' ? (opts.rippleDb ?? 0.1) : 0;
  const first = opts.first ?? 'shunt';
  if (!Number.isInteger(n) || n < 1 || n > MAX_ORDER) throw new RangeError(`the order must be a whole number from 1 to ${MAX_ORDER}, not ${n}`);
  if (response === 'chebyshev' && !(rippleDb > 0 && rippleDb <= 3)) throw new RangeError(`the ripple must be above 0 dB and at most 3 dB, not ${rippleDb} dB`);
  const natural = (gNext: number) => (first === 'shunt' ? (n % 2 === 0 ? 1 / gNext : gNext) : n % 2 === 0 ? gNext : 1 / gNext);
  if (response !== 'bessel') {
    const { g, gNext } = response === 'butterworth' ? { g: butterworthG(n), gNext: 1 } : chebyshevG(n, rippleDb);
    const own = natural(gNext);
    if (opts.load === undefined || Math.abs(opts.load - own) <= 1e-9 * own) {
      const method =
        response === 'butterworth'
          ? 'closed form g_k = 2·sin((2k−1)π/(2n)) (Matthaei, Young & Jones, 1964)'
          : 'closed forms of Matthaei, Young & Jones (1964), eq. 4.05-2';
      return { response, order: n, rippleDb, g, first, load: own, gNext, method };
    }
  }
  const r = opts.load ?? 1;
  if (!(r > 0) || !Number.isFinite(r)) throw new RangeError(`the load must be a positive resistance, not ${r}`);
  const peak = peakGain(response, n, rippleDb, r);
  if (peak > 1 + 1e-12) {
    const { gNext } = chebyshevG(n, rippleDb);
    throw new RangeError(
      `an even-order Chebyshev response cannot have this load: its load must differ from the source by at least the ratio g(n+1) = ${gNext.toPrecision(6)} (at most ${(1 / gNext).toPrecision(6)} or at least ${gNext.toPrecision(6)} times the source), or the order must be odd`,
    );
  }
  const e = responsePolynomial(response, n, rippleDb);
  const k0sq = Math.min(1, peak) * (response === 'chebyshev' && n % 2 === 0 ? 1 / (1 + epsilonSquared(rippleDb)) : 1) * e[0]! * e[0]!;
  const lad = darlington(e, k0sq, first, r);
  return { response, order: n, rippleDb, g: lad.g, first, load: lad.load, gNext: lad.last === 'shunt' ? lad.load : 1 / lad.load, method: `Darlington's insertion-loss synthesis (1939) with a continued-fraction (Cauer) expansion${response === 'bessel' ? ' of the Bessel polynomial, 3 dB cutoff' : ''}` };
}

interface Ladder {
  g: number[];
  first: FirstElement;
  last: FirstElement;
  load: number;
}

/**
 * Darlington synthesis of S21 = k0/E(s), |k0|² = k0sq: the ladder with the wanted first element
 * whose load is closest to r (source 1 ohm). Exported for tests.
 */
export function darlington(e: readonly number[], k0sq: number, first: FirstElement, r: number): Ladder {
  const n = e.length - 1;
  // P(s) = E(s)E(−s) − k0², even in s: Q(x) = P(√x)
  const p = add(mul(e, mirror(e)), [k0sq], -1);
  const q = p.filter((_, k) => k % 2 === 0);
  // coefficients that are rounding noise of an exact zero (1/(1+ω^2n): F = s^n) are zero
  const big = Math.max(...q.map(Math.abs));
  let zeros = 0;
  while (zeros < q.length - 1 && Math.abs(q[zeros]!) <= 1e-11 * big) zeros++;
  const xs = roots(q.slice(zeros));
  const sRoots: Cx[] = [];
  for (let i = 0; i < zeros; i++) sRoots.push([0, 0]);
  // roots of Q on the negative real axis are double (zeros of reflection on
  // the jω axis, as in a Chebyshev response): found as near pairs, each pair gives ±j·√|x|
  const onAxis = xs.filter((x) => x[0] < 0 && Math.abs(x[1]) <= 1e-4 * cabs(x)).sort((a, b) => a[0] - b[0]);
  const rest = xs.filter((x) => !onAxis.includes(x));
  for (let i = 0; i + 1 < onAxis.length; i += 2) {
    const w = Math.sqrt(-(onAxis[i]![0] + onAxis[i + 1]![0]) / 2);
    sRoots.push([0, w], [0, -w]);
  }
  if (onAxis.length % 2 === 1) rest.push(onAxis[onAxis.length - 1]!);
  for (const x of rest) {
    // the square root with a real part ≤ 0 (left half plane: minimum phase)
    const m = Math.sqrt(cabs(x));
    const ang = Math.atan2(x[1], x[0]) / 2;
    let s: Cx = [m * Math.cos(ang), m * Math.sin(ang)];
    if (s[0] > 0) s = [-s[0], -s[1]];
    sRoots.push(s);
  }
  // conjugate pairs: make the polynomial real (fromRoots keeps the real parts)
  const lead = e[n]!;
  const f0 = fromRoots(sRoots, lead);
  const candidates = [f0, f0.map((c) => -c), mirror(f0), mirror(f0).map((c) => -c)];
  let best: Ladder | undefined;
  for (const f of candidates) {
    const lad = expand(e, f);
    if (!lad || lad.first !== first) continue;
    const d = Math.abs(Math.log(lad.load / r));
    const bd = best ? Math.abs(Math.log(best.load / r)) : Infinity;
    // of two equally good ladders (one the other reversed), the one with the larger g1, as the tables list them
    if (d < bd - 1e-9 || (Math.abs(d - bd) <= 1e-9 && lad.g[0]! > best!.g[0]!)) best = lad;
  }
  if (!best || Math.abs(Math.log(best.load / r)) > 1e-6) throw new RangeError('this response cannot be made as a ladder with that load and first element');
  // between equal terminations the reversed ladder (the same values in the other order, as its
  // dual when that changes the first arm) has the same response: list the larger end first, as the tables do
  if (Math.abs(best.load - 1) < 1e-9 && best.g[best.g.length - 1]! > best.g[0]!) best = { ...best, g: best.g.slice().reverse(), load: 1 };
  return best;
}

/** Cauer expansion of Z = (E+F)/(E−F) (or of Y = 1/Z) about infinity. */
function expand(e: readonly number[], f: readonly number[]): Ladder | undefined {
  const n = e.length - 1;
  const sum = add(e, f);
  const diff = add(e, f, -1);
  sum[n] = Math.abs(sum[n]!) < 1e-9 * Math.abs(e[n]!) ? 0 : sum[n]!;
  diff[n] = Math.abs(diff[n]!) < 1e-9 * Math.abs(e[n]!) ? 0 : diff[n]!;
  let num: number[];
  let den: number[];
  let kind: FirstElement;
  if (diff[n] === 0) {
    num = sum;
    den = diff.slice(0, n);
    kind = 'series'; // Z → ∞: a series inductor first
  } else if (sum[n] === 0) {
    num = diff;
    den = sum.slice(0, n);
    kind = 'shunt'; // Y → ∞: a shunt capacitor first
  } else return undefined;
  const first = kind;
  const g: number[] = [];
  for (let step = 0; step < n; step++) {
    if (den.length === 1) {
      if (num.length !== 2) return undefined;
      g.push(num[1]! / den[0]!);
      const term = num[0]! / den[0]!;
      // a series step ends in a series resistance, a shunt step in a conductance
      const load = kind === 'series' ? term : 1 / term;
      if (!(load > 0) || g.some((x) => !(x > 0))) return undefined;
      return g.length === n ? { g, first, last: kind, load } : undefined;
    }
    const { q, r } = divide(num, den);
    g.push(q[1] ?? 0);
    num = den;
    den = r.slice(0, num.length - 1);
    kind = kind === 'series' ? 'shunt' : 'series';
  }
  return undefined;
}
