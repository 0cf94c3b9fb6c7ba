/**
 * Statistics of yield runs (src/yield/stats.ts).
 *
 * Sources:
 * - [Q] Standard normal quantiles: Φ⁻¹(0.975) = 1.959963984540054 (common practice); the others
 *   are 20-digit values from mpmath (√2·erfinv(2p − 1) at 30 digits, a general-purpose library),
 *   computed while writing this test. Wichura's AS 241 promises about 16 digits; tolerance here
 *   1e-14 relative (a few units in the last place of a double).
 * - [P] Φ at chosen points: mpmath ncdf at 30 digits (as above); tolerance 1e-14 relative, the
 *   accuracy stated in stats.ts.
 * - [SIMP] An independent tail reference written in this file: Q(x) = ∫_x^∞ φ = φ(x)·∫_0^L
 *   exp(−xs − s²/2) ds by Simpson's rule (common practice), L = min(12, 40/x), 20 000 intervals;
 *   its error is below 1e-12 relative for x ≥ 2 (the step times x is at most 0.002).
 * - [ERF] mathjs erf (general-purpose library) for Φ(x) = (1 + erf(x/√2))/2 on |x| ≤ 3, where the
 *   subtraction loses at most ~1e-16 absolute.
 * - [W] Wilson, "Probable inference, the law of succession, and statistical inference", JASA 22
 *   (1927) 209–212: the score interval (p̂ + z²/(2n) ± z·√(p̂(1 − p̂)/n + z²/(4n²)))/(1 + z²/n),
 *   written out by hand below. Newcombe, "Two-sided confidence intervals for the single
 *   proportion: comparison of seven methods", Statistics in Medicine 17 (1998) 857–872, table of
 *   examples — the Wilson column (from memory), to the 4 decimals printed there.
 * - [HF] Hyndman & Fan, "Sample quantiles in statistical packages", American Statistician 50
 *   (1996) 361–365, definition 7: h = (n − 1)p, Q = x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]).
 *   Known values (from memory): the 10 % point of 1..10 is 1.9; the 25 % point of 1, 2, 3, 4 is 1.75.
 * - [STUR] Sturges, "The choice of a class interval", JASA 21 (1926): ⌈log2 n⌉ + 1 classes.
 * - [CORR] mathjs corr (general-purpose library) for Pearson's r; Anscombe, "Graphs in statistical
 *   analysis", Am. Stat. 27 (1973): data set I has r ≈ 0.816 (from memory); the 14-digit value
 *   0.81642051634484 is numpy.corrcoef's, computed while writing this test.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { corr, erf } from 'mathjs';
import {
  histogram, normalCdf, normalQuantile, pearson, percentile, percentileOfSorted,
  percentilesInPlace, wilsonInterval,
} from '../src/yield/stats.js';

const relErr = (got: number, want: number): number => Math.abs(got - want) / Math.abs(want);

/** [SIMP] upper tail Q(x) for x ≥ 2. */
function tailSimpson(x: number): number {
  const L = Math.min(12, 40 / x);
  const N = 20000;
  const h = L / N;
  const f = (s: number): number => Math.exp(-x * s - (s * s) / 2);
  let sum = f(0) + f(L);
  for (let i = 1; i < N; i++) sum += (i % 2 === 1 ? 4 : 2) * f(i * h);
  return (Math.exp((-x * x) / 2) / Math.sqrt(2 * Math.PI)) * (sum * h) / 3;
}

const PhiErf = (x: number): number => 0.5 * (1 + (erf(x / Math.SQRT2) as number)); // [ERF]

describe('normal quantile (AS 241) and distribution function', () => {
  it.each([
    [0.975, 1.959963984540054], // common practice
    [0.995, 2.575829303548900761], // [Q]
    [0.95, 1.6448536269514727149], // [Q]
    [0.999, 3.0902323061678135415], // [Q]
    [0.9, 1.281551565544600467], // [Q]
    [0.001, -3.0902323061678135415], // [Q]
    [1e-10, -6.3613409024040562047], // [Q]
  ])('Φ⁻¹(%s) = %s to 1e-14 relative [Q]', (p, want) => {
    expect(relErr(normalQuantile(p), want)).toBeLessThan(1e-14);
  });

  it('is exactly 0 at 1/2, ±∞ at 0 and 1, NaN outside [0, 1]', () => {
    expect(normalQuantile(0.5)).toBe(0);
    expect(normalQuantile(0)).toBe(-Infinity);
    expect(normalQuantile(1)).toBe(Infinity);
    expect(normalQuantile(-0.1)).toBeNaN();
    expect(normalQuantile(1.1)).toBeNaN();
    expect(normalQuantile(NaN)).toBeNaN();
  });

  it('inverts an independent Φ: mathjs erf in the centre [ERF], Simpson in the tails [SIMP]', () => {
    for (let x = -3; x <= 3; x += 0.125) {
      // |dx| ≈ |dp|/φ(x) ≤ 2e-16/0.0044: absolute tolerance 1e-13.
      expect(Math.abs(normalQuantile(PhiErf(x)) - x)).toBeLessThan(1e-13);
    }
    for (const x of [2, 2.5, 3.3, 4, 5.5, 7, 9, 12, 20, 30, 37]) {
      // p = Q(x) carries ≤ 1e-12 relative error; dx = dp/φ ≈ p·1e-12/(x·p): 1e-12 relative is ample.
      const q = tailSimpson(x);
      expect(relErr(normalQuantile(q), -x)).toBeLessThan(1e-12);
      expect(relErr(normalCdf(-x), q)).toBeLessThan(1e-12);
    }
  });

  it.each([
    [-5, 2.86651571879193911673752332875e-7],
    [-10, 7.6198530241605260659733432516e-24],
    [-20, 2.75362411860623369507562278086e-89],
    [-1.5, 0.0668072012688580660044940409799],
    [2.5, 0.993790334674223864833021895426],
  ])('Φ(%s) = %s to 1e-14 relative [P]', (x, want) => {
    expect(relErr(normalCdf(x), want)).toBeLessThan(1e-14);
  });

  it('Φ agrees with mathjs erf on |x| ≤ 3 to 1e-15 absolute [ERF]', () => {
    for (let x = -3; x <= 3; x += 0.0625) expect(Math.abs(normalCdf(x) - PhiErf(x))).toBeLessThan(1e-15);
  });
});

describe('Wilson score interval', () => {
  const Z95 = 1.959963984540054; // [Q]
  /** [W] written out by hand from the published formula. */
  function byHand(s: number, n: number, z: number): [number, number] {
    const p = s / n;
    const centre = (p + (z * z) / (2 * n)) / (1 + (z * z) / n);
    const half = (z / (1 + (z * z) / n)) * Math.sqrt((p * (1 - p)) / n + (z * z) / (4 * n * n));
    return [centre - half, centre + half];
  }

  it('matches the published formula on a grid of counts (95 % and 99 %) [W]', () => {
    for (const n of [1, 2, 5, 10, 37, 100, 1000, 100_000]) {
      for (const s of new Set([1, 2, Math.floor(n / 3), Math.floor(n / 2), n - 1].filter((v) => v > 0 && v < n))) {
        const w = wilsonInterval(s, n);
        const [lo, hi] = byHand(s, n, Z95);
        expect(Math.abs(w.lower - lo)).toBeLessThan(1e-14);
        expect(Math.abs(w.upper - hi)).toBeLessThan(1e-14);
        expect(w.estimate).toBe(s / n);
        const w99 = wilsonInterval(s, n, 0.99);
        const [lo99, hi99] = byHand(s, n, 2.575829303548900761);
        expect(Math.abs(w99.lower - lo99)).toBeLessThan(1e-14);
        expect(Math.abs(w99.upper - hi99)).toBeLessThan(1e-14);
      }
    }
  });

  it.each([
    [81, 263, 0.2553, 0.3662],
    [15, 148, 0.0624, 0.1605],
    [0, 20, 0, 0.1611],
    [1, 29, 0.0061, 0.1718],
  ])('%i of %i: Newcombe 1998 gives %s to %s (from memory) [W]', (s, n, lo, hi) => {
    const w = wilsonInterval(s, n);
    expect(Math.abs(w.lower - lo)).toBeLessThanOrEqual(5e-5);
    expect(Math.abs(w.upper - hi)).toBeLessThanOrEqual(5e-5);
  });

  it('0 of n starts at exactly 0 and n of n ends at exactly 1; the other ends have closed forms [W]', () => {
    for (const n of [1, 3, 50, 10_000]) {
      const none = wilsonInterval(0, n);
      expect(none.lower).toBe(0);
      // With p̂ = 0 the formula's upper end is z²/(n + z²).
      expect(relErr(none.upper, (Z95 * Z95) / (n + Z95 * Z95))).toBeLessThan(1e-14);
      const all = wilsonInterval(n, n);
      expect(all.upper).toBe(1);
      // With p̂ = 1 the lower end is n/(n + z²).
      expect(relErr(all.lower, n / (n + Z95 * Z95))).toBeLessThan(1e-14);
    }
  });

  it('contains the estimate, stays in [0, 1] and is symmetric under s → n − s (fast-check)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.double({ min: 0, max: 1, noNaN: true }), (n, f) => {
      const s = Math.round(f * n);
      const w = wilsonInterval(s, n);
      const m = wilsonInterval(n - s, n);
      return 0 <= w.lower && w.lower <= w.estimate && w.estimate <= w.upper && w.upper <= 1 &&
        Math.abs(w.lower - (1 - m.upper)) < 1e-14 && Math.abs(w.upper - (1 - m.lower)) < 1e-14;
    }), { numRuns: 2000, seed: 27 });
  });

  it('rejects impossible counts and levels with plain messages', () => {
    expect(() => wilsonInterval(0, 0)).toThrow(/^the number of trials must be a whole number of at least 1, not 0$/);
    expect(() => wilsonInterval(5, 4)).toThrow(/^the number of successes must be a whole number from 0 to 4, not 5$/);
    expect(() => wilsonInterval(1.5, 4)).toThrow(RangeError);
    expect(() => wilsonInterval(1, 4, 1)).toThrow(/confidence level must lie strictly between 0 and 1, not 1/);
  });
});

describe('percentiles (type 7)', () => {
  /** [HF] definition 7, straightforwardly. */
  function ref(values: number[], p: number): number {
    const x = [...values].sort((a, b) => a - b);
    const h = (x.length - 1) * p;
    const j = Math.floor(h);
    return j + 1 < x.length ? x[j]! + (h - j) * (x[j + 1]! - x[j]!) : x[j]!;
  }

  it('known values [HF]', () => {
    expect(percentile([10, 9, 8, 7, 6, 5, 4, 3, 2, 1], 0.1)).toBeCloseTo(1.9, 14);
    expect(percentile([4, 1, 3, 2], 0.25)).toBe(1.75);
    expect(percentile([3, 1, 2], 0)).toBe(1);
    expect(percentile([3, 1, 2], 1)).toBe(3);
    expect(percentile([3, 1, 2], 0.5)).toBe(2);
    expect(percentile([42], 0.37)).toBe(42);
  });

  it('agree with the reference on small random samples (fast-check) [HF]', () => {
    fc.assert(fc.property(
      fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 40 }),
      fc.double({ min: 0, max: 1, noNaN: true }),
      (xs, p) => {
        const got = percentile(xs, p);
        const want = ref(xs, p);
        return Math.abs(got - want) <= 1e-9 * Math.max(1, Math.abs(want));
      },
    ), { numRuns: 2000, seed: 3 });
  });

  it('several levels at once from the front of a scratch array, sorted in place', () => {
    const scratch = new Float64Array([5, 3, 9, 1, 7, -100, -100]);
    const out = new Float64Array(3);
    percentilesInPlace(scratch, [0.01, 0.5, 0.99], out, 5);
    expect(Array.from(scratch.subarray(0, 5))).toEqual([1, 3, 5, 7, 9]);
    expect(Array.from(scratch.subarray(5))).toEqual([-100, -100]); // untouched
    expect(out[0]).toBeCloseTo(ref([1, 3, 5, 7, 9], 0.01), 14);
    expect(out[1]).toBe(5);
    expect(out[2]).toBeCloseTo(ref([1, 3, 5, 7, 9], 0.99), 14);
    expect(percentileOfSorted(scratch, 0.25, 5)).toBe(3);
  });

  it('rejects empty samples, NaN and levels outside [0, 1]', () => {
    expect(() => percentile([], 0.5)).toThrow(/at least one value/);
    expect(() => percentile([1, NaN], 0.5)).toThrow(/NaN/);
    expect(() => percentile([1, 2], 1.5)).toThrow(/from 0 to 1, not 1.5/);
  });
});

describe('histograms', () => {
  /** Reference: the stated edge rule by a linear scan. */
  function refCounts(values: number[], edges: Float64Array): number[] {
    const bins = edges.length - 1;
    const counts = new Array<number>(bins).fill(0);
    for (const v of values) {
      for (let i = 0; i < bins; i++) {
        const inside = i === bins - 1 ? v >= edges[i]! && v <= edges[i + 1]! : v >= edges[i]! && v < edges[i + 1]!;
        if (inside) { counts[i]!++; break; }
      }
    }
    return counts;
  }

  it('equal-width edges from min to max; counts follow the stated half-open rule', () => {
    const h = histogram([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10], { bins: 5 });
    expect(Array.from(h.edges)).toEqual([0, 2, 4, 6, 8, 10]);
    expect(Array.from(h.counts)).toEqual([2, 2, 2, 2, 3]); // 10 = hi goes into the last bin
    expect(h.below + h.above).toBe(0);
  });

  it('default bin count is Sturges’ rule [STUR]', () => {
    const of = (n: number): number => histogram(Array.from({ length: n }, (_, i) => i)).counts.length;
    expect(of(1)).toBe(1);
    expect(of(100)).toBe(8); // ⌈log2 100⌉ + 1 = 7 + 1
    expect(of(1000)).toBe(11);
    expect(of(1024)).toBe(11); // log2 1024 = 10 exactly
  });

  it('agrees with the reference rule on random samples with awkward widths (fast-check)', () => {
    fc.assert(fc.property(
      fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 1, maxLength: 60 }),
      fc.integer({ min: 1, max: 17 }),
      (xs, bins) => {
        const h = histogram(xs, { bins });
        expect(Array.from(h.counts)).toEqual(refCounts(xs, h.edges));
        expect(h.counts.reduce((a, b) => a + b, 0)).toBe(xs.length);
      },
    ), { numRuns: 1000, seed: 5 });
  });

  it('a given range counts the values outside it; a constant sample gets one unit-wide bin', () => {
    const h = histogram([-1, 0, 0.1, 0.3, 0.3, 1, 2], { lo: 0, hi: 1, bins: 10 });
    expect(h.below).toBe(1);
    expect(h.above).toBe(1);
    expect(Array.from(h.counts)).toEqual(refCounts([0, 0.1, 0.3, 0.3, 1], h.edges));
    const c = histogram([4, 4, 4], { bins: 1 });
    expect(Array.from(c.edges)).toEqual([3.5, 4.5]);
    expect(Array.from(c.counts)).toEqual([3]);
    expect(() => histogram([1, NaN])).toThrow(/NaN/);
    expect(() => histogram([])).toThrow(/needs its range/);
    expect(() => histogram([1], { bins: 0 })).toThrow(/at least 1, not 0/);
    expect(() => histogram([1], { lo: 2, hi: 1 })).toThrow(/finite and ascending/);
  });
});

describe('Pearson correlation', () => {
  it('agrees with mathjs corr on random samples (fast-check) [CORR]', () => {
    fc.assert(fc.property(
      // Values on a 1e-3 grid: for values near 1e-100 mathjs's product of the sums of squares
      // underflows (the counterexample is checked separately below).
      fc.array(fc.tuple(fc.integer({ min: -100_000, max: 100_000 }).map((v) => v / 1000),
        fc.integer({ min: -100_000, max: 100_000 }).map((v) => v / 1000)), { minLength: 3, maxLength: 50 }),
      (pairs) => {
        const x = pairs.map((p) => p[0]);
        const y = pairs.map((p) => p[1]);
        const want = corr(x, y) as number;
        fc.pre(Number.isFinite(want));
        return Math.abs(pearson(x, y) - want) < 1e-10;
      },
    ), { numRuns: 1000, seed: 11 });
  });

  it('Anscombe’s data set I [CORR]; exact ±1 for lines; NaN for a constant sample', () => {
    const x = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
    const y = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];
    expect(Math.abs(pearson(x, y) - 0.81642051634484)).toBeLessThan(1e-12);
    expect(pearson(x, x.map((v) => 3 * v + 2))).toBeCloseTo(1, 15);
    expect(pearson(x, x.map((v) => -0.5 * v))).toBeCloseTo(-1, 15);
    expect(pearson(x, x.map(() => 7))).toBeNaN();
    expect(pearson([1], [2])).toBeNaN();
    // Tiny values: r = 0.5 exactly (mpmath at 50 digits, computed while writing this test); the
    // product of the two sums of squares would underflow, the separate roots do not.
    expect(pearson([0, 0, 2.3602247787523986e-107], [-3.3296146173277513e-56, 0, 0])).toBeCloseTo(0.5, 14);
  });

  it('is unchanged by a large common offset (two-pass sums), and reads the front of typed arrays', () => {
    const x = new Float64Array([1, 2, 3, 4, 5, 99]);
    const y = new Float64Array([2, 1, 4, 3, 6, -99]);
    const r = pearson(x, y, 5);
    expect(r).toBeCloseTo(corr([1, 2, 3, 4, 5], [2, 1, 4, 3, 6]) as number, 14);
    const shifted = pearson(x.map((v) => v + 1e9), y.map((v) => v + 1e9), 5);
    expect(Math.abs(shifted - r)).toBeLessThan(1e-9);
    expect(() => pearson(x, y, 7)).toThrow(/both samples need 7 values/);
  });
});
