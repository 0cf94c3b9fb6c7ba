/**
 * Iterative refinement of one port's solution in double-double, for reflections smaller than the
 * rounding of the ordinary solve.
 *
 * Why: S_ii = v_i/√Z_i − 1 subtracts two nearly equal numbers when the port is nearly matched, and
 * the nodal matrix itself loses digits when a large admittance sits beside small ones in one entry:
 * a 1e-6 Ω series resistor between two 50 Ω ports stamps 1e6 + 0.02 into each diagonal entry, and
 * the rounding of that sum (about 1e-10) is then what the elimination's Schur complement
 * (G + g) − g²/(G + g) ≈ 2G = 0.04 is left with — a relative error of about 2.5e-9 in the port
 * voltage, 25 % of S11 = 1e-8. No scaling of rows and columns restores digits the assembled matrix
 * no longer holds.
 *
 * How: the matrix is assembled a second time without rounding the sums of its entries, as
 * double-double numbers (hi + lo, Dekker's TwoSum and TwoProduct: T. J. Dekker, "A floating-point
 * technique for extending the available precision", Numer. Math. 18, 1971; the same error-free
 * transformations as T. Ogita, S. M. Rump, S. Oishi, "Accurate sum and dot product", SIAM J. Sci.
 * Comput. 26(6), 2005) from the elements' own values (the constant parts, each batched admittance,
 * and the per-element stampers). The solution x for a unit current into port j is kept as a
 * double-double too; each step computes the residual r = e_j − A·x in double-double, solves
 * A·d = r with the factors already at hand, and adds d to x (classic iterative refinement with an
 * extended-precision residual, e.g. Higham, Accuracy and Stability of Numerical Algorithms, ch. 12
 * (from memory)). Each step gains about −log10(ε·κ) digits. Finally
 *   S_jj = (2R·x_j − |Zref|²)/Zref²      (power waves, Zref = R + jX; 2x_j/R − 1 for a real Zref)
 * is formed from the double-double x_j, so the subtraction costs no digits either.
 *
 * Taken only where the ordinary result is at risk (see `solve/sweep.ts`): the sweep's other points
 * never come here. Allocates nothing after construction.
 *
 * @module
 */
import type { StampPlan } from '../plan/plan.js';
import { GROUND } from '../elements/types.js';

/** Veltkamp's splitter for doubles, 2^27 + 1. */
const SPLIT = 134217729;

/** Most refinement steps taken for one port (it stops earlier once a step no longer halves the correction). */
export const MAX_REFINE_STEPS = 40;

/**
 * Adds the double y into the double-double (hi[k], lo[k]) (TwoSum, Knuth/Dekker; error-free).
 */
export function addInto(hi: Float64Array, lo: Float64Array, k: number, y: number): void {
  const a = hi[k]!;
  const s = a + y;
  const bb = s - a;
  const e = a - (s - bb) + (y - bb);
  // renormalise: keep |lo| below half an ulp of hi
  const t = lo[k]! + e;
  const h = s + t;
  hi[k] = h;
  lo[k] = t - (h - s);
}

/**
 * Adds sign·(ah + al)·(xh + xl) into (hi[k], lo[k]): the product's leading part exactly
 * (TwoProduct by Dekker's splitting), the cross terms in double (their own error is of order ε²).
 */
function mulAddInto(hi: Float64Array, lo: Float64Array, k: number, ah: number, al: number, xh: number, xl: number): void {
  const p = ah * xh;
  let c = SPLIT * ah;
  const a1 = c - (c - ah);
  const a2 = ah - a1;
  c = SPLIT * xh;
  const x1 = c - (c - xh);
  const x2 = xh - x1;
  const e = a1 * x1 - p + a1 * x2 + a2 * x1 + a2 * x2;
  addInto(hi, lo, k, p);
  addInto(hi, lo, k, e + ah * xl + al * xh);
}

/** The refinement of one point's port solutions (see the module comment); one per sweep and thread. */
export class Refiner {
  private readonly n: number;
  /** The matrix as double-doubles, per slot complex interleaved. */
  private readonly ah: Float64Array;
  private readonly al: Float64Array;
  /** The per-element stampers' values, summed in double (they seldom share an entry). */
  private readonly st: Float64Array;
  /** The solution, residual and correction, complex interleaved over the unknowns. */
  readonly xh: Float64Array;
  readonly xl: Float64Array;
  private readonly rh: Float64Array;
  private readonly rl: Float64Array;
  private readonly b: Float64Array;
  private readonly d: Float64Array;
  private readonly omega = new Float64Array(1);
  private readonly ph = new Float64Array(2);
  private readonly pl = new Float64Array(2);
  /** After {@link refine}: the size of the last correction at the port, relative to the port voltage. */
  lastStep = 0;
  constructor(private readonly plan: StampPlan) {
    const n = plan.size;
    const ns = plan.slotRow.length;
    this.n = n;
    this.ah = new Float64Array(2 * ns);
    this.al = new Float64Array(2 * ns);
    this.st = new Float64Array(2 * ns);
    this.xh = new Float64Array(2 * n);
    this.xl = new Float64Array(2 * n);
    this.rh = new Float64Array(2 * n);
    this.rl = new Float64Array(2 * n);
    this.b = new Float64Array(2 * n);
    this.d = new Float64Array(2 * n);
  }

  /** Assembles the matrix at angular frequency `w` in double-double from the elements' own values. */
  assemble(w: number): void {
    const plan = this.plan;
    const ah = this.ah;
    const al = this.al;
    ah.fill(0);
    al.fill(0);
    const parts = plan.baseParts;
    const ps = parts.slots;
    const pv = parts.values;
    for (let t = 0; t < ps.length; t++) {
      const s2 = 2 * ps[t]!;
      addInto(ah, al, s2, pv[2 * t]!);
      addInto(ah, al, s2 + 1, pv[2 * t + 1]!);
    }
    this.omega[0] = w;
    plan.batch?.stampParts(this.omega, ah, al, addInto);
    const st = plan.stampers;
    if (st.length > 0) {
      const v = this.st;
      v.fill(0);
      for (let e = 0; e < st.length; e++) st[e]!(w, v);
      for (let k = 0; k < v.length; k++) if (v[k] !== 0) addInto(ah, al, k, v[k]!);
    }
  }

  /**
   * Refines the solution for a unit current into the port with terminals `plus`/`minus` (unknowns,
   * GROUND = −1), starting from a fresh solve; `solve(b, x)` solves A·x = b with the current
   * factors. Leaves the port voltage's double-double in `out[0..3]` (re hi, re lo, im hi, im lo).
   * False where a value left floating-point range (then nothing is to be used).
   */
  refine(plus: number, minus: number, solve: (b: Float64Array, x: Float64Array) => void, out: Float64Array): boolean {
    const n = this.n;
    const { xh, xl, rh, rl, b, d, ah, al } = this;
    const rows = this.plan.slotRow;
    const cols = this.plan.slotCol;
    b.fill(0);
    if (plus !== GROUND) b[2 * plus] = 1;
    if (minus !== GROUND) b[2 * minus] = -1;
    solve(b, xh);
    xl.fill(0);
    this.lastStep = Infinity;
    for (let step = 0; step < MAX_REFINE_STEPS; step++) {
      // r = b − A·x in double-double
      rh.set(b);
      rl.fill(0);
      for (let s = 0; s < rows.length; s++) {
        const r2 = 2 * rows[s]!;
        const c2 = 2 * cols[s]!;
        const arh = ah[2 * s]!;
        const arl = al[2 * s]!;
        const aih = ah[2 * s + 1]!;
        const ail = al[2 * s + 1]!;
        if (arh === 0 && aih === 0) continue;
        const xrh = xh[c2]!;
        const xrl = xl[c2]!;
        const xih = xh[c2 + 1]!;
        const xil = xl[c2 + 1]!;
        // re −= ar·xr − ai·xi; im −= ar·xi + ai·xr
        mulAddInto(rh, rl, r2, -arh, -arl, xrh, xrl);
        mulAddInto(rh, rl, r2, aih, ail, xih, xil);
        mulAddInto(rh, rl, r2 + 1, -arh, -arl, xih, xil);
        mulAddInto(rh, rl, r2 + 1, -aih, -ail, xrh, xrl);
      }
      for (let k = 0; k < 2 * n; k++) rh[k] = rh[k]! + rl[k]!;
      solve(rh, d);
      for (let k = 0; k < 2 * n; k++) addInto(xh, xl, k, d[k]!);
      // the step at the port, relative to the port voltage
      const vr = (plus !== GROUND ? xh[2 * plus]! : 0) - (minus !== GROUND ? xh[2 * minus]! : 0);
      const vi = (plus !== GROUND ? xh[2 * plus + 1]! : 0) - (minus !== GROUND ? xh[2 * minus + 1]! : 0);
      const dr = (plus !== GROUND ? d[2 * plus]! : 0) - (minus !== GROUND ? d[2 * minus]! : 0);
      const di = (plus !== GROUND ? d[2 * plus + 1]! : 0) - (minus !== GROUND ? d[2 * minus + 1]! : 0);
      const rel = Math.hypot(dr, di) / Math.hypot(vr, vi);
      if (!Number.isFinite(rel)) return false;
      const before = this.lastStep;
      this.lastStep = rel;
      if (rel < 1e-30 || rel > 0.5 * before) break;
    }
    // the port voltage as double-double: x(plus) − x(minus)
    const ph = this.ph;
    const pl = this.pl;
    ph.fill(0);
    pl.fill(0);
    if (plus !== GROUND) {
      addInto(ph, pl, 0, xh[2 * plus]!);
      addInto(ph, pl, 0, xl[2 * plus]!);
      addInto(ph, pl, 1, xh[2 * plus + 1]!);
      addInto(ph, pl, 1, xl[2 * plus + 1]!);
    }
    if (minus !== GROUND) {
      addInto(ph, pl, 0, -xh[2 * minus]!);
      addInto(ph, pl, 0, -xl[2 * minus]!);
      addInto(ph, pl, 1, -xh[2 * minus + 1]!);
      addInto(ph, pl, 1, -xl[2 * minus + 1]!);
    }
    out[0] = ph[0]!;
    out[1] = pl[0]!;
    out[2] = ph[1]!;
    out[3] = pl[1]!;
    return Number.isFinite(out[0]) && Number.isFinite(out[2]);
  }
}

const T = new Float64Array(2);
const TL = new Float64Array(2);
const N = new Float64Array(2);
const NL = new Float64Array(2);

/**
 * S_jj from the double-double port voltage `x` (re hi, re lo, im hi, im lo) for a unit current
 * drive into the port terminated in the admittance g = (gr + grLo) + j·(gi + giLo) (1/Zref as a
 * double-double: the stamped value and its rounding error):
 * the network alone has Yin = 1/x − g, and with power waves (Kurokawa, 1965)
 *   S = (1 − conj(Zref)·Yin)/(1 + Zref·Yin) = (1 + conj(Zref)·g − conj(Zref)/x)/(1 + Zref/x − Zref·g),
 * whose numerator is formed in double-double (conj(Zref)/x with a double-double remainder), so that
 * neither the subtraction nor the rounding of g costs digits (for a real Zref and g = 1/R exactly
 * this is 2x/R − 1). Writes (re, im) to out[o..o+1].
 */
export function reflectionFromPortVoltage(
  x: Float64Array,
  zr: number,
  zi: number,
  gr: number,
  gi: number,
  grLo: number,
  giLo: number,
  out: Float64Array,
  o: number,
): void {
  const cr = zr;
  const ci = -zi; // conj(Zref)
  const xr = x[0]! + x[1]!;
  const xi = x[2]! + x[3]!;
  const den = xr * xr + xi * xi;
  // q = conj(Zref)/x in double, then the remainder conj(Zref) − q·x in double-double, q2 = remainder/x
  const qr = (cr * xr + ci * xi) / den;
  const qi = (ci * xr - cr * xi) / den;
  T[0] = cr;
  TL[0] = 0;
  T[1] = ci;
  TL[1] = 0;
  mulAddInto(T, TL, 0, -qr, 0, x[0]!, x[1]!);
  mulAddInto(T, TL, 0, qi, 0, x[2]!, x[3]!);
  mulAddInto(T, TL, 1, -qr, 0, x[2]!, x[3]!);
  mulAddInto(T, TL, 1, -qi, 0, x[0]!, x[1]!);
  const rr = T[0]! + TL[0]!;
  const ri = T[1]! + TL[1]!;
  const q2r = (rr * xr + ri * xi) / den;
  const q2i = (ri * xr - rr * xi) / den;
  // numerator 1 + conj(Zref)·g − q − q2
  N[0] = 1;
  NL[0] = 0;
  N[1] = 0;
  NL[1] = 0;
  mulAddInto(N, NL, 0, cr, 0, gr, grLo);
  mulAddInto(N, NL, 0, -ci, 0, gi, giLo);
  mulAddInto(N, NL, 1, cr, 0, gi, giLo);
  mulAddInto(N, NL, 1, ci, 0, gr, grLo);
  addInto(N, NL, 0, -qr);
  addInto(N, NL, 0, -q2r);
  addInto(N, NL, 1, -qi);
  addInto(N, NL, 1, -q2i);
  const nr = N[0]! + NL[0]!;
  const ni = N[1]! + NL[1]!;
  // denominator 1 + Zref/x − Zref·g (no cancellation near a match: about 2)
  const dr = 1 + (zr * xr + zi * xi) / den - (zr * gr - zi * gi);
  const di = (zi * xr - zr * xi) / den - (zr * gi + zi * gr);
  const m = dr * dr + di * di;
  out[o] = (nr * dr + ni * di) / m;
  out[o + 1] = (ni * dr - nr * di) / m;
}
