/**
 * Writing the netlists of `scatterbox design`: values with units and SI prefixes, design-variable
 * ranges, E-series snapping, comment blocks.
 *
 * @module
 */
import { nearestInSeries, type SeriesName } from '../design/series.js';

/** Prefixes for written values (ASCII `u`, so the netlist stays plain ASCII). */
const PREFIX: readonly (readonly [number, string])[] = [
  [1e12, 'T'],
  [1e9, 'G'],
  [1e6, 'M'],
  [1e3, 'k'],
  [1, ''],
  [1e-3, 'm'],
  [1e-6, 'u'],
  [1e-9, 'n'],
  [1e-12, 'p'],
  [1e-15, 'f'],
];

/** Significant digits of written design values: the rounding is below 1e-11 relative. */
export const VALUE_DIGITS = 12;

/**
 * A value with its unit and an SI prefix: `6.08446033861 pF`, `50 ohm`, `2.45 GHz`. Resistances
 * take `ohm`, `kohm`, `Mohm`; a unit of '' writes a plain number.
 */
export function quantity(x: number, unit: string, digits = VALUE_DIGITS): string {
  if (!Number.isFinite(x)) throw new RangeError(`cannot write the value ${x}`);
  const trimmed = (v: number) => {
    const t = v.toPrecision(digits);
    return t.includes('e') ? t : t.includes('.') ? t.replace(/0+$/, '').replace(/\.$/, '') : t;
  };
  // angles take no prefix (`0.75 deg`, never `750 mdeg`)
  if (unit === '' || unit === 'deg' || x === 0) return unit ? `${trimmed(x)} ${unit}` : trimmed(x);
  const a = Math.abs(x);
  let [f, p] = PREFIX[PREFIX.length - 1]!;
  for (const [fac, pre] of PREFIX) {
    if (a >= fac * (1 - 1e-12)) {
      [f, p] = [fac, pre];
      break;
    }
  }
  if (unit === 'ohm' && !['', 'k', 'M', 'm'].includes(p)) [f, p] = a >= 1 ? [1e6, 'M'] : [1e-3, 'm'];
  return `${trimmed(x / f)} ${p}${unit}`;
}

/** A design variable's value and range: `6.08 pF vary 3.04 pF to 12.2 pF [series E24]`. */
export function variableText(value: number, unit: string, series?: SeriesName): string {
  const lo = value / 2;
  const hi = value * 2;
  return `${quantity(value, unit)} vary ${quantity(lo, unit, 6)} to ${quantity(hi, unit, 6)}${series ? ` series ${series}` : ''}`;
}

/** A value snapped to a series (when one is given). */
export function snap(value: number, series: SeriesName | undefined): number {
  return series ? nearestInSeries(value, series) : value;
}

/** Comment lines (`# …`) from text, wrapped at about 98 columns. */
export function comment(text: string): string[] {
  const out: string[] = [];
  for (const para of text.split('\n')) {
    if (para.trim() === '') {
      out.push('#');
      continue;
    }
    const indent = /^\s*/.exec(para)![0];
    let line = '';
    for (const word of para.trim().split(/\s+/)) {
      if (line && (indent.length + line.length + word.length + 3) > 98) {
        out.push(`# ${indent}${line}`);
        line = word;
      } else line = line ? `${line} ${word}` : word;
    }
    out.push(`# ${indent}${line}`);
  }
  return out;
}

/** A short number for comments and the summary: 4 significant digits. */
export function short(x: number, digits = 5): string {
  return String(Number(x.toPrecision(digits)));
}

/** Pads rows of cells into aligned columns. */
export function columns(rows: string[][]): string {
  const widths = rows[0]!.map((_, c) => Math.max(...rows.map((r) => (r[c] ?? '').length)));
  return rows.map((r) => r.map((x, c) => x.padEnd(widths[c]!)).join('  ').trimEnd()).join('\n') + '\n';
}
