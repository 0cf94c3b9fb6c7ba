/**
 * Statistics for yield runs: the standard normal distribution (quantile and distribution
 * function), the Wilson score interval of a binomial proportion, percentiles of a sample,
 * histograms and the Pearson correlation coefficient.
 *
 * Methods (each function names its own):
 * - normalQuantile: Wichura, "Algorithm AS 241: The percentage points of the normal
 *   distribution", Applied Statistics 37 (1988) 477–484 (PPND16, the 16-digit version).
 *   Wichura states a relative accuracy of about 1e-16; in double arithmetic the result is
 *   within a few units in the last place (tested to 1e-14 relative).
 * - normalCdf: the Maclaurin series Φ(x) = 1/2 + φ(x)·Σ x^(2n+1)/(1·3·…·(2n+1)) for |x| < 2 (all
 *   terms have the sign of x, so nothing cancels) and Laplace's continued fraction of the Mills
 *   ratio, Q(x) = φ(x)/(x + 1/(x + 2/(x + 3/(x + …)))), for |x| ≥ 2 (Abramowitz & Stegun 26.2.14
 *   and 26.2.10 — equation numbers (from memory)); relative accuracy better than 1e-14 wherever
 *   Φ(x) is a normal (not subnormal) double, i.e. x > −37.5.
 * - wilsonInterval: Wilson, "Probable inference, the law of succession, and statistical
 *   inference", JASA 22 (1927) 209–212.
 * - percentileOfSorted: linear interpolation between order statistics, h = (n − 1)·p
 *   (Hyndman & Fan, "Sample quantiles in statistical packages", Am. Stat. 50 (1996), type 7).
 * - histogram: equal-width bins; the default count is Sturges' rule ⌈log2 n⌉ + 1 (Sturges 1926).
 * - pearson: the sample correlation coefficient by two passes (means first, then the centred
 *   sums), which avoids the cancellation of the one-pass textbook form.
 *
 * The per-sample functions take typed arrays and allocate nothing.
 */

// ---------------------------------------------------------------------------------------------
// Standard normal distribution

// AS 241 (PPND16) coefficients, Wichura 1988.
const A0 = 3.387132872796366608, A1 = 133.14166789178437745, A2 = 1971.5909503065514427;
const A3 = 13731.693765509461125, A4 = 45921.953931549871457, A5 = 67265.770927008700853;
const A6 = 33430.575583588128105, A7 = 2509.0809287301226727;
const B1 = 42.313330701600911252, B2 = 687.1870074920579083, B3 = 5394.1960214247511077;
const B4 = 21213.794301586595867, B5 = 39307.89580009271061, B6 = 28729.085735721942674;
const B7 = 5226.495278852854561;
const C0 = 1.42343711074968357734, C1 = 4.6303378461565452959, C2 = 5.7694972214606914055;
const C3 = 3.64784832476320460504, C4 = 1.27045825245236838258, C5 = 0.24178072517745061177;
const C6 = 0.0227238449892691845833, C7 = 7.7454501427834140764e-4;
const D1 = 2.05319162663775882187, D2 = 1.6763848301838038494, D3 = 0.68976733498510000455;
const D4 = 0.14810397642748007459, D5 = 0.0151986665636164571966, D6 = 5.475938084995344946e-4;
const D7 = 1.05075007164441684324e-9;
const E0 = 6.6579046435011037772, E1 = 5.4637849111641143699, E2 = 1.7848265399172913358;
const E3 = 0.29656057182850489123, E4 = 0.026532189526576123093, E5 = 0.0012426609473880784386;
const E6 = 2.71155556874348757815e-5, E7 = 2.01033439929228813265e-7;
const F1 = 0.59983220655588793769, F2 = 0.13692988092273580531, F3 = 0.0148753612908506148525;
const F4 = 7.868691311456132591e-4, F5 = 1.8463183175100546818e-5, F6 = 1.4215117583164458887e-7;
const F7 = 2.04426310338993978564e-15;

/**
 * The standard normal quantile Φ⁻¹(p) (Wichura's AS 241, PPND16). p = 0 gives −∞, p = 1 gives
 * +∞; p outside [0, 1] or NaN gives NaN. Allocation-free.
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return NaN;
  const q = p - 0.5;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return (q * (((((((A7 * r + A6) * r + A5) * r + A4) * r + A3) * r + A2) * r + A1) * r + A0)) /
      (((((((B7 * r + B6) * r + B5) * r + B4) * r + B3) * r + B2) * r + B1) * r + 1);
  }
  let r = q < 0 ? p : 1 - p;
  if (r === 0) return q < 0 ? -Infinity : Infinity;
  r = Math.sqrt(-Math.log(r));
  let x: number;
  if (r <= 5) {
    r -= 1.6;
    x = (((((((C7 * r + C6) * r + C5) * r + C4) * r + C3) * r + C2) * r + C1) * r + C0) /
      (((((((D7 * r + D6) * r + D5) * r + D4) * r + D3) * r + D2) * r + D1) * r + 1);
  } else {
    r -= 5;
    x = (((((((E7 * r + E6) * r + E5) * r + E4) * r + E3) * r + E2) * r + E1) * r + E0) /
      (((((((F7 * r + F6) * r + F5) * r + F4) * r + F3) * r + F2) * r + F1) * r + 1);
  }
  return q < 0 ? -x : x;
}

const INV_SQRT_2PI = 0.3989422804014327; // 1/√(2π)

/**
 * The standard normal density φ(x). x² is split as xs² + (x − xs)(x + xs) with xs = x rounded
 * towards zero to a multiple of 1/16, so xs² is exact and the rounding of x² is not magnified by
 * the exponential in the tails (the device of Cody's normal-integral routines — common practice).
 */
export function normalDensity(x: number): number {
  const xs = Math.trunc(x * 16) / 16;
  const del = (x - xs) * (x + xs);
  return INV_SQRT_2PI * Math.exp(-0.5 * xs * xs) * Math.exp(-0.5 * del);
}

/** Upper tail Q(x) = 1 − Φ(x) for x ≥ 2 by Laplace's continued fraction, evaluated backwards. */
function upperTailContinuedFraction(x: number): number {
  // Backward evaluation of x + 1/(x + 2/(x + 3/(x + …))) with 200 terms; from x = 1.5 on the
  // truncation error is below 1e-16 relative (checked against 40-digit values while writing this,
  // and in test/yield-stats.test.ts against an independent series).
  let t = x;
  for (let n = 200; n >= 1; n--) t = x + n / t;
  return normalDensity(x) / t;
}

/**
 * The standard normal distribution function Φ(x). Relative accuracy better than 1e-14 for
 * x > −37.5 (below that Φ(x) is subnormal and has fewer significant bits); for x > 0 the upper
 * tail 1 − Φ(x) is as accurate as the subtraction from 1 allows. Allocation-free.
 */
export function normalCdf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x >= 2) return x > 40 ? 1 : 1 - upperTailContinuedFraction(x);
  if (x <= -2) return x < -40 ? 0 : upperTailContinuedFraction(-x);
  // Series Φ(x) − 1/2 = φ(x)·Σ x^(2n+1)/(2n+1)!!; the terms shrink once 2n + 3 > x².
  const x2 = x * x;
  let term = x;
  let sum = x;
  for (let n = 1; n < 200; n++) {
    term *= x2 / (2 * n + 1);
    const next = sum + term;
    if (next === sum) break;
    sum = next;
  }
  return 0.5 + normalDensity(x) * sum;
}

// ---------------------------------------------------------------------------------------------
// Wilson score interval

/** A confidence interval of a proportion. */
export interface ProportionInterval {
  /** The observed proportion successes/trials. */
  readonly estimate: number;
  readonly lower: number;
  readonly upper: number;
  /** The confidence level the interval was computed for (e.g. 0.95). */
  readonly confidence: number;
  /** The two-sided normal quantile used, z = Φ⁻¹(1 − (1 − confidence)/2). */
  readonly z: number;
}

/**
 * The Wilson score interval (Wilson 1927) of a binomial proportion: with p̂ = s/n and
 * z = Φ⁻¹(1 − α/2),
 *   centre = (p̂ + z²/(2n)) / (1 + z²/n),
 *   half   = z/(1 + z²/n) · √(p̂(1 − p̂)/n + z²/(4n²)),
 * and the interval is [centre − half, centre + half]. At s = 0 the lower end is exactly 0 and at
 * s = n the upper end exactly 1 (the formula gives those values up to rounding).
 *
 * Throws a RangeError for n < 1, s outside 0..n, non-integer counts or a confidence outside (0, 1).
 */
export function wilsonInterval(successes: number, trials: number, confidence = 0.95): ProportionInterval {
  if (!Number.isSafeInteger(trials) || trials < 1) {
    throw new RangeError(`the number of trials must be a whole number of at least 1, not ${trials}`);
  }
  if (!Number.isSafeInteger(successes) || successes < 0 || successes > trials) {
    throw new RangeError(`the number of successes must be a whole number from 0 to ${trials}, not ${successes}`);
  }
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`the confidence level must lie strictly between 0 and 1, not ${confidence}`);
  }
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const n = trials;
  const p = successes / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  const lower = successes === 0 ? 0 : Math.max(0, centre - half);
  const upper = successes === trials ? 1 : Math.min(1, centre + half);
  return { estimate: p, lower, upper, confidence, z };
}

// ---------------------------------------------------------------------------------------------
// Percentiles

/**
 * The p-quantile (0 ≤ p ≤ 1) of an ascending sorted sample by linear interpolation between order
 * statistics (Hyndman & Fan 1996, type 7): h = (n − 1)·p, j = ⌊h⌋,
 * Q(p) = x[j] + (h − j)·(x[j+1] − x[j]). Q(0) is the minimum and Q(1) the maximum.
 * `count` (default: the whole array) lets a caller use the front of a larger scratch array.
 * Allocation-free. Throws a RangeError on an empty sample or p outside [0, 1].
 */
export function percentileOfSorted(sorted: ArrayLike<number>, p: number, count = sorted.length): number {
  if (count < 1) throw new RangeError('a percentile needs at least one value');
  if (!(p >= 0 && p <= 1)) throw new RangeError(`a percentile level must lie from 0 to 1, not ${p}`);
  const h = (count - 1) * p;
  const j = Math.floor(h);
  if (j >= count - 1) return sorted[count - 1]!;
  const lo = sorted[j]!;
  const hi = sorted[j + 1]!;
  const g = h - j;
  return g === 0 ? lo : lo + g * (hi - lo);
}

/**
 * Sorts `scratch[0..count)` ascending in place (numeric order; NaN rejected) and writes the
 * percentiles at `levels` into `out`. The sort works in place on the typed array; the only
 * allocation is a subarray view when `count` is less than the array's length.
 */
export function percentilesInPlace(
  scratch: Float64Array,
  levels: ArrayLike<number>,
  out: Float64Array,
  count = scratch.length,
): void {
  const view = count === scratch.length ? scratch : scratch.subarray(0, count);
  for (let i = 0; i < count; i++) {
    if (Number.isNaN(view[i]!)) throw new RangeError('a percentile cannot be taken of a sample containing NaN');
  }
  view.sort();
  for (let i = 0; i < levels.length; i++) out[i] = percentileOfSorted(view, levels[i]!, count);
}

/** Convenience: the p-quantile (type 7) of an unsorted sample (copied, not changed). */
export function percentile(values: ArrayLike<number>, p: number): number {
  const copy = Float64Array.from(values);
  const out = new Float64Array(1);
  percentilesInPlace(copy, [p], out);
  return out[0]!;
}

// ---------------------------------------------------------------------------------------------
// Histograms

/** A histogram with equal-width bins. */
export interface Histogram {
  /** bins + 1 ascending edges; edges[0] = lo and edges[bins] = hi exactly. */
  readonly edges: Float64Array;
  /** counts[i] counts values in [edges[i], edges[i+1]); the last bin also takes x = hi. */
  readonly counts: Float64Array;
  /** Values below lo and above hi (only when the range is given). */
  readonly below: number;
  readonly above: number;
}

export interface HistogramOptions {
  /** Number of bins; default Sturges' rule ⌈log2 n⌉ + 1 (at least 1). */
  readonly bins?: number;
  /** Range; default the sample's minimum and maximum. */
  readonly lo?: number;
  readonly hi?: number;
}

/**
 * A histogram of equal-width bins between lo and hi (default min and max of the sample):
 * edges[i] = lo + i·(hi − lo)/bins, with edges[bins] = hi exactly; bins are half-open
 * [edges[i], edges[i+1]) except the last, which is closed — common practice. When lo = hi (all
 * values equal and no range given) the single bin is [lo − 0.5, lo + 0.5] (common practice).
 * Each value's bin is found by division and then corrected against the stated edges, so a value
 * sits in the bin its edges say even where the division rounds the other way.
 * Throws a RangeError on NaN values, an empty sample without a range, a bad bin count or range.
 */
export function histogram(values: ArrayLike<number>, options: HistogramOptions = {}): Histogram {
  const n = values.length;
  for (let i = 0; i < n; i++) {
    if (Number.isNaN(values[i]!)) throw new RangeError('a histogram cannot be made of a sample containing NaN');
  }
  let lo = options.lo;
  let hi = options.hi;
  if (lo === undefined || hi === undefined) {
    if (n === 0) throw new RangeError('a histogram of an empty sample needs its range');
    let min = Infinity;
    let max = -Infinity;
    for (let i = 0; i < n; i++) {
      const v = values[i]!;
      if (v < min) min = v;
      if (v > max) max = v;
    }
    lo ??= min;
    hi ??= max;
  }
  if (!Number.isFinite(lo) || !Number.isFinite(hi) || hi < lo) {
    throw new RangeError(`a histogram range must be finite and ascending, not ${lo} to ${hi}`);
  }
  const bins = options.bins ?? Math.max(1, Math.ceil(Math.log2(Math.max(n, 1))) + 1);
  if (!Number.isSafeInteger(bins) || bins < 1) {
    throw new RangeError(`the number of histogram bins must be a whole number of at least 1, not ${bins}`);
  }
  if (lo === hi) {
    lo -= 0.5;
    hi += 0.5;
  }
  const edges = new Float64Array(bins + 1);
  const width = (hi - lo) / bins;
  for (let i = 0; i < bins; i++) edges[i] = lo + i * width;
  edges[bins] = hi;
  const counts = new Float64Array(bins);
  let below = 0;
  let above = 0;
  for (let k = 0; k < n; k++) {
    const v = values[k]!;
    if (v < lo) { below++; continue; }
    if (v > hi) { above++; continue; }
    let i = Math.floor((v - lo) / width);
    if (i > bins - 1) i = bins - 1;
    if (i < 0) i = 0;
    while (i > 0 && v < edges[i]!) i--;
    while (i < bins - 1 && v >= edges[i + 1]!) i++;
    counts[i]!++;
  }
  return { edges, counts, below, above };
}

// ---------------------------------------------------------------------------------------------
// Correlation

/**
 * The Pearson correlation coefficient r of x[0..count) and y[0..count), by two passes: the means,
 * then r = Σ(x − x̄)(y − ȳ) / √(Σ(x − x̄)² · Σ(y − ȳ)²). Returns NaN when either sample is constant
 * or count < 2 (r is undefined there). The result is clamped to [−1, 1] against rounding.
 * Allocation-free.
 */
export function pearson(x: ArrayLike<number>, y: ArrayLike<number>, count = Math.min(x.length, y.length)): number {
  if (count > x.length || count > y.length) {
    throw new RangeError(`both samples need ${count} values; they have ${x.length} and ${y.length}`);
  }
  if (count < 2) return NaN;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < count; i++) {
    sx += x[i]!;
    sy += y[i]!;
  }
  const mx = sx / count;
  const my = sy / count;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  for (let i = 0; i < count; i++) {
    const dx = x[i]! - mx;
    const dy = y[i]! - my;
    sxx += dx * dx;
    syy += dy * dy;
    sxy += dx * dy;
  }
  if (sxx === 0 || syy === 0) return NaN;
  const r = sxy / (Math.sqrt(sxx) * Math.sqrt(syy)); // separate roots: no underflow of sxx·syy
  return r > 1 ? 1 : r < -1 ? -1 : r;
}
