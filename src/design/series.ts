/**
 * Preferred-number series of IEC 60063 (E6, E12, E24, E48, E96, E192): the values a part comes in,
 * per decade. E6, E12 and E24 have two significant digits and keep the historical values the
 * standard publishes (3.3, 4.7, 8.2… where the geometric formula would give 3.2, 4.6, 8.3). E48, E96
 * and E192 have three: the geometric mean 10^(i/n) rounded to three digits, except E192's 9.20
 * (the formula gives 9.19), the one irregular value the standard prints in those series.
 *
 * @module
 */

/** The series names, coarsest first. */
export const SERIES_NAMES = ['E6', 'E12', 'E24', 'E48', 'E96', 'E192'] as const;
export type SeriesName = (typeof SERIES_NAMES)[number];

/** E24 in hundredths (IEC 60063): E12 is every second value, E6 every fourth. */
const E24 = [100, 110, 120, 130, 150, 160, 180, 200, 220, 240, 270, 300, 330, 360, 390, 430, 470, 510, 560, 620, 680, 750, 820, 910];

/** E192 in hundredths: round(100·10^(i/192)), with 920 for the formula's 919 (IEC 60063). */
const E192 = Array.from({ length: 192 }, (_, i) => {
  const m = Math.round(100 * 10 ** (i / 192));
  return m === 919 ? 920 : m;
});

const TABLES: Record<SeriesName, readonly number[]> = {
  E6: E24.filter((_, i) => i % 4 === 0),
  E12: E24.filter((_, i) => i % 2 === 0),
  E24,
  E48: E192.filter((_, i) => i % 4 === 0),
  E96: E192.filter((_, i) => i % 2 === 0),
  E192,
};

/** Whether a name is one of the series. */
export function isSeriesName(name: string): name is SeriesName {
  return (SERIES_NAMES as readonly string[]).includes(name);
}

/** The values of one decade of a series, from 1 up to (not including) 10: E12 → 1, 1.2, 1.5 … 8.2. */
export function seriesTable(series: SeriesName): number[] {
  return table(series).map((m) => m / 100);
}

function table(series: SeriesName): readonly number[] {
  const t = TABLES[series];
  if (!t) throw new RangeError(`unknown series "${String(series)}"; the series are ${SERIES_NAMES.join(', ')}`);
  return t;
}

/** m hundredths times 10^decade, as the double nearest to the decimal value (4.7e-12, not 4.7000000000000006e-12). */
function scaled(m: number, decade: number): number {
  const e = decade - 2;
  return e >= 0 ? m * 10 ** e : m / 10 ** -e;
}

/**
 * The series value nearest to x by ratio (the one with the smallest |log(v/x)|), over every
 * decade: nearestInSeries(5e-12, 'E12') = 4.7e-12. x must be positive and finite.
 */
export function nearestInSeries(x: number, series: SeriesName): number {
  const t = table(series);
  if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`a preferred-number series holds positive finite values only, not ${x}`);
  const decade = Math.floor(Math.log10(x));
  let best = NaN;
  let bestDist = Infinity;
  // the decade below and above too: log10 may land one off near a power of ten
  for (let d = decade - 1; d <= decade + 1; d++) {
    for (const m of t) {
      const v = scaled(m, d);
      const dist = Math.abs(Math.log(v / x));
      if (dist < bestDist) {
        bestDist = dist;
        best = v;
      }
    }
    const top = scaled(1000, d); // 10 of this decade = 1 of the next
    const dist = Math.abs(Math.log(top / x));
    if (dist < bestDist) {
      bestDist = dist;
      best = top;
    }
  }
  return best;
}

/** Relative slack for a bound that is itself a series value written in other units. */
const BOUND_SLACK = 1e-9;

/**
 * The series values from lower to upper (both included, ascending): seriesValuesIn(1e-12, 1e-11,
 * 'E6') = 1, 1.5, 2.2, 3.3, 4.7, 6.8, 10 pF. Both bounds must be positive, lower ≤ upper.
 */
export function seriesValuesIn(lower: number, upper: number, series: SeriesName): number[] {
  const t = table(series);
  if (!(lower > 0) || !(upper >= lower) || !Number.isFinite(upper)) throw new RangeError(`a preferred-number series needs 0 < lower ≤ upper, not ${lower} to ${upper}`);
  const lo = lower * (1 - BOUND_SLACK);
  const hi = upper * (1 + BOUND_SLACK);
  const out: number[] = [];
  for (let d = Math.floor(Math.log10(lo)) - 1; d <= Math.floor(Math.log10(hi)) + 1; d++) {
    for (const m of t) {
      const v = scaled(m, d);
      if (v >= lo && v <= hi && (out.length === 0 || v > out[out.length - 1]!)) out.push(v);
    }
  }
  return out;
}
