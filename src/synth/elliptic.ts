/**
 * Elliptic (Cauer) low-pass prototypes of odd order between equal terminations.
 *
 * The response |S21|² = 1/(1 + ε²·R_N(Ω)²), R_N the elliptic rational function, pass-band edge
 * 1 rad/s (the edge of the ripple band), stop-band edge 1/k. Zeros, poles and the degree equation
 * follow Orfanidis, "Lecture notes on elliptic filter design" (2006): with Landen's descending
 * moduli, cd and sn of complex argument and their inverses; transmission zeros at ±j/(k·ζi),
 * ζi = cd(ui·K, k), ui = (2i − 1)/N; poles at j·cd((ui − j·v0)·K, k) and j·sn(j·v0·K, k),
 * v0 = −j·asn(j/ε, k1)/N; the stop-band attenuation from k1 = k^N·Π sn⁴(ui·K, k).
 *
 * The ladder (shunt capacitors; series arms of a parallel L-C resonating at each transmission
 * zero) comes from the input admittance (E − F)/(E + F) by zero shifting: a partial removal of a
 * shunt capacitor makes the admittance vanish at the next transmission zero, whose pole of
 * impedance is then removed whole as the series resonator (common practice; the method of
 * Darlington's synthesis with finite zeros).
 *
 * @module
 */
import { add, divide, evalC, fromRoots, mirror, mul, type Cx } from './poly.js';

// --- complex helpers ---
const C = (re: number, im = 0): Cx => [re, im];
const cadd = (a: Cx, b: Cx): Cx => [a[0] + b[0], a[1] + b[1]];
const csub = (a: Cx, b: Cx): Cx => [a[0] - b[0], a[1] - b[1]];
const cmul = (a: Cx, b: Cx): Cx => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const cdiv = (a: Cx, b: Cx): Cx => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const csqrt = (a: Cx): Cx => {
  const m = Math.hypot(a[0], a[1]);
  const re = Math.sqrt((m + a[0]) / 2);
  const im = Math.sqrt(Math.max(0, (m - a[0]) / 2));
  return [re, a[1] < 0 ? -im : im];
};
const ccos = (a: Cx): Cx => [Math.cos(a[0]) * Math.cosh(a[1]), -Math.sin(a[0]) * Math.sinh(a[1])];
const csin = (a: Cx): Cx => [Math.sin(a[0]) * Math.cosh(a[1]), Math.cos(a[0]) * Math.sinh(a[1])];
/** acos(z) = −j·ln(z + j·√(1 − z²)). */
const cacos = (z: Cx): Cx => {
  const w = cadd(z, cmul(C(0, 1), csqrt(csub(C(1), cmul(z, z)))));
  const ln: Cx = [Math.log(Math.hypot(w[0], w[1])), Math.atan2(w[1], w[0])];
  return [ln[1], -ln[0]];
};

/** Landen's descending moduli of k, until they vanish (Orfanidis). */
export function landen(k: number): number[] {
  const v: number[] = [];
  let kk = k;
  for (let i = 0; i < 20 && kk > 1e-300; i++) {
    const kp = Math.sqrt(1 - kk * kk);
    kk = (kk / (1 + kp)) ** 2;
    v.push(kk);
    if (kk < 1e-16) break;
  }
  return v;
}

/** The complete elliptic integral K(k) (by Landen: K = π/2·Π(1 + v_n)). */
export function ellipK(k: number): number {
  if (k === 0) return Math.PI / 2;
  return (Math.PI / 2) * landen(k).reduce((p, v) => p * (1 + v), 1);
}

/** cd(u·K, k) for complex u (Orfanidis' cde). */
export function cde(u: Cx, k: number): Cx {
  const v = landen(k);
  let w = ccos(cmul(u, C(Math.PI / 2)));
  for (let i = v.length - 1; i >= 0; i--) {
    const vi = v[i]!;
    w = cdiv(cmul(C(1 + vi), w), cadd(C(1), cmul(C(vi), cmul(w, w))));
  }
  return w;
}

/** sn(u·K, k) for complex u (Orfanidis' sne). */
export function sne(u: Cx, k: number): Cx {
  const v = landen(k);
  let w = csin(cmul(u, C(Math.PI / 2)));
  for (let i = v.length - 1; i >= 0; i--) {
    const vi = v[i]!;
    w = cdiv(cmul(C(1 + vi), w), cadd(C(1), cmul(C(vi), cmul(w, w))));
  }
  return w;
}

/** u with cd(u·K, k) = w (Orfanidis' acde). */
export function acde(wIn: Cx, k: number): Cx {
  const v = landen(k);
  let w = wIn;
  let prev = k;
  for (const vi of v) {
    const root = csqrt(csub(C(1), cmul(C(prev * prev), cmul(w, w))));
    w = cdiv(cmul(C(2), w), cmul(C(1 + vi), cadd(C(1), root)));
    prev = vi;
  }
  const u = cacos(w);
  return [(2 / Math.PI) * u[0], (2 / Math.PI) * u[1]];
}

/** u with sn(u·K, k) = w. */
export function asne(w: Cx, k: number): Cx {
  const u = acde(w, k);
  return [1 - u[0], -u[1]];
}

export interface EllipticResponse {
  order: number;
  rippleDb: number;
  /** Stop-band edge (rad/s, pass-band edge 1). */
  stopEdge: number;
  /** The least attenuation in the stop band, dB. */
  stopAttenDb: number;
  /** Transmission zeros (rad/s), ascending. */
  zeros: number[];
  /** Reflection zeros in the pass band (rad/s), 0 first. */
  reflectionZeros: number[];
  /** E(s) (ascending coefficients), P(s) = Π(s² + ωz²), F(s), with S21 = k0·P/E, S11 = F/E. */
  e: number[];
  p: number[];
  f: number[];
  k0: number;
}

/** The elliptic response of odd order N with ripple (dB) and stop-band edge Ωs (> 1). */
export function ellipticResponse(order: number, rippleDb: number, stopEdge: number): EllipticResponse {
  const n = order;
  if (!(n % 2 === 1 && n >= 3)) throw new RangeError('an elliptic response is made here in odd orders from 3 on');
  if (!(stopEdge > 1)) throw new RangeError('the stop-band edge must lie above the pass-band edge');
  const k = 1 / stopEdge;
  const eps = Math.sqrt(Math.expm1((rippleDb * Math.LN10) / 10));
  const L = (n - 1) / 2;
  const u = Array.from({ length: L }, (_, i) => (2 * (i + 1) - 1) / n);
  // degree equation: k1 = k^N·Π sn⁴(ui·K, k)
  let k1 = k ** n;
  for (const ui of u) k1 *= sne(C(ui), k)[0] ** 4;
  const stopAttenDb = 10 * Math.log10(1 + (eps * eps) / (k1 * k1));
  const zeta = u.map((ui) => cde(C(ui), k)[0]);
  const zeros = zeta.map((z) => 1 / (k * z)).sort((a, b) => a - b);
  // v0 = −j·asn(j/ε, k1)/N
  const a = asne(C(0, 1 / eps), k1);
  const v0: Cx = [a[1] / n, -a[0] / n]; // −j·a/N
  const poles: Cx[] = [];
  for (const ui of u) {
    const pc = cde(csub(C(ui), cmul(C(0, 1), v0)), k);
    const p = cmul(C(0, 1), pc);
    poles.push(p, [p[0], -p[1]]);
  }
  const p0 = cmul(C(0, 1), sne(cmul(C(0, 1), v0), k));
  poles.push([p0[0], 0]);
  // left half plane
  const lhp = poles.map((p): Cx => (p[0] > 0 ? [-p[0], p[1]] : p));
  const pPoly = zeros.reduce<number[]>((acc, z) => mul(acc, [z * z, 0, 1]), [1]);
  // reflection zeros: 0 and ±j·ζi (R_N vanishes there)
  const fRaw = zeta.reduce<number[]>((acc, z) => mul(acc, [z * z, 0, 1]), [0, 1]);
  // |E|² = |P|²·k0² + |F|²: scale E and F so that E's leading coefficient matches F's with R_N's normalisation
  // E(s) monic from the poles, then S21 = k0·P/E with k0 from |S21(0)| = 1 (R_N(0) = 0 for odd N)
  const eMonic = fromRoots(lhp);
  const k0 = eMonic[0]! / pPoly[0]!;
  // F from E·E(−s) − k0²·P·P(−s) = F·F(−s): F = c·fRaw with c² from the leading coefficients
  const lhs = add(mul(eMonic, mirror(eMonic)), mul(pPoly, mirror(pPoly)).map((x) => k0 * k0 * x), -1);
  const ff = mul(fRaw, mirror(fRaw));
  const c = Math.sqrt(Math.abs(lhs[lhs.length - 1]! / ff[ff.length - 1]!));
  const f = fRaw.map((x) => c * x);
  return { order: n, rippleDb, stopEdge, stopAttenDb, zeros, reflectionZeros: [0, ...zeta.slice().sort((x, y) => x - y)], e: eMonic, p: pPoly, f, k0 };
}

/** |S21|² of the response at Ω (rad/s). */
export function ellipticGain(r: EllipticResponse, omega: number): number {
  const s: Cx = [0, omega];
  const num = evalC(r.p, s);
  const den = evalC(r.e, s);
  return (r.k0 * r.k0 * (num[0] ** 2 + num[1] ** 2)) / (den[0] ** 2 + den[1] ** 2);
}

/** One arm of an elliptic ladder: a shunt capacitor, or a series parallel L-C resonating at a transmission zero. */
export type EllipticArm = { kind: 'shunt'; c: number } | { kind: 'series'; l: number; c: number; zero: number };

/**
 * The ladder of an odd-order elliptic response between 1-ohm terminations: shunt capacitor, series
 * resonator, shunt capacitor, …, shunt capacitor. Zeros are taken from the highest down (the
 * common order that keeps every element positive for the usual responses).
 */
export function ellipticLadder(r: EllipticResponse): { arms: EllipticArm[]; load: number } {
  // Y = (E − F)/(E + F): a shunt capacitor first (Y → ∞ at s → ∞, since F and E share their degree and leading sign)
  let num = add(r.e, r.f, -1);
  let den = add(r.e, r.f);
  const trimTop = (p: number[]) => {
    const big = Math.max(...p.map(Math.abs));
    let m = p.length;
    while (m > 1 && Math.abs(p[m - 1]!) < 1e-10 * big) m--;
    return p.slice(0, m);
  };
  num = trimTop(num);
  den = trimTop(den);
  if (num.length - 1 < den.length - 1) [num, den] = [den, num]; // the side with the pole at infinity
  const arms: EllipticArm[] = [];
  const zeros = r.zeros.slice().sort((a, b) => b - a);
  for (const wz of zeros) {
    // partial removal of a shunt C so that Y(jωz) − jωz·C = 0
    const y = cdiv(evalC(num, [0, wz]), evalC(den, [0, wz]));
    const cap = y[1] / wz;
    arms.push({ kind: 'shunt', c: cap });
    // N' = N − s·C·D, which has the factor s² + ωz²: divide it out
    const rest = add(num, mul([0, cap], den), -1);
    const { q } = divide(trimTop(rest), [wz * wz, 0, 1]);
    // Z' = D/((s² + ωz²)·Q): residue 2k at the pole: 2k = D(jωz)/(jωz·Q(jωz))
    const dq = cdiv(evalC(den, [0, wz]), cmul([0, wz], evalC(q, [0, wz])));
    const twoK = dq[0];
    // series parallel resonator: Z = 2k·s/(s² + ωz²) → C = 1/(2k), L = 2k/ωz²
    arms.push({ kind: 'series', c: 1 / twoK, l: twoK / (wz * wz), zero: wz });
    // Z'' = (D − 2k·s·Q)/(s² + ωz²)/Q
    const top = add(den, mul([0, twoK], q), -1);
    const { q: rr } = divide(trimTop(top), [wz * wz, 0, 1]);
    // next: Y = Q/R (a pole at infinity again)
    num = trimTop(q);
    den = trimTop(rr);
  }
  // the last shunt capacitor and the load conductance: Y = C·s + G
  if (num.length !== 2 || den.length !== 1) throw new RangeError('the elliptic ladder could not be completed');
  arms.push({ kind: 'shunt', c: num[1]! / den[0]! });
  const g = num[0]! / den[0]!;
  if (arms.some((a) => (a.kind === 'shunt' ? !(a.c > 0) : !(a.l > 0 && a.c > 0)))) throw new RangeError('the elliptic ladder has a negative element for this response');
  return { arms, load: 1 / g };
}
