/**
 * How the page's slider moves through a design variable's range: through its preferred series
 * (IEC 60063) or its steps where it has them, logarithmically where the range spans a decade or
 * more, else evenly; and the unit the number field shows.
 *
 * @module
 */
import type { Variable } from '../elaborate/circuit.js';
import { PREFIXES } from '../design/family.js';
import { seriesValuesIn } from '../design/series.js';
import { netlistValue } from '../design/write-back.js';
import type { LiveSlider } from '../report/live.js';

/** Steps of a `step` variable up to which the slider steps through them (more: an even slider). */
const MAX_SLIDER_STEPS = 10_000;

/** The slider of a variable at value x. */
export function sliderOf(v: Variable, x: number): LiveSlider {
  const display = displayOf(v);
  const base = { name: v.name, unit: v.unit, lower: v.lower, upper: v.upper, value: x, display };
  if (v.series && v.lower > 0) {
    const values = seriesValuesIn(v.lower, v.upper, v.series).map((s) => clamp(netlistValue(s, v.unit), v));
    if (values.length > 1) return { ...base, scale: 'series', values, note: v.series };
  }
  if (v.step !== undefined && v.step > 0) {
    const n = Math.floor((v.upper - v.lower) / v.step + 1e-9);
    if (n >= 1 && n <= MAX_SLIDER_STEPS) {
      const values = Array.from({ length: n + 1 }, (_, k) => clamp(netlistValue(v.lower + k * v.step!, v.unit), v));
      return { ...base, scale: 'step', values, note: `step ${String(Number((v.step / display.factor).toPrecision(6)))} ${display.unit}`.trimEnd() };
    }
  }
  if (v.lower > 0 && v.upper / v.lower >= 10) return { ...base, scale: 'log' };
  return { ...base, scale: 'linear' };
}

function clamp(x: number, v: Variable): number {
  return Math.min(v.upper, Math.max(v.lower, x));
}

/** The number field's unit: the variable's unit with the engineering prefix of the larger bound. */
function displayOf(v: Variable): { factor: number; unit: string } {
  if (!v.unit) return { factor: 1, unit: '' };
  const a = Math.max(Math.abs(v.lower), Math.abs(v.upper)) || 1;
  for (const [f, p] of PREFIXES) if (a >= f * 0.9995) return { factor: f, unit: `${p}${v.unit}` };
  return { factor: 1e-15, unit: `f${v.unit}` };
}
