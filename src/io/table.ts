import type { NetworkData } from '../network/types.js';
import { csvRow } from './csv.js';

/** Picks the frequency unit that keeps the sweep's largest frequency readable. */
export function pickFrequencyUnit(maxHz: number): { unit: string; scale: number } {
  if (maxHz >= 1e9) return { unit: 'GHz', scale: 1e9 };
  if (maxHz >= 1e6) return { unit: 'MHz', scale: 1e6 };
  if (maxHz >= 1e3) return { unit: 'kHz', scale: 1e3 };
  return { unit: 'Hz', scale: 1 };
}

function pad(s: string, w: number): string {
  return s.length >= w ? s : ' '.repeat(w - s.length) + s;
}

/**
 * A compact text table for the terminal: the frequency, then |Sij| in dB and ∠Sij in degrees for
 * every entry (row-major). Magnitudes below −999.99 dB are shown as `-inf`.
 */
export function formatTable(net: NetworkData): string {
  const n = net.ports;
  const { unit, scale } = pickFrequencyUnit(net.frequencies.length ? net.frequencies[net.frequencies.length - 1]! : 0);
  const sep = n >= 10 ? ',' : '';
  const heads = [`f/${unit}`];
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= n; j++) heads.push(`|${net.parameter}${i}${sep}${j}|/dB`, `∠${net.parameter}${i}${sep}${j}/°`);
  }
  const rows: string[][] = [];
  for (let k = 0; k < net.frequencies.length; k++) {
    const row = [formatFixed(net.frequencies[k]! / scale, 6)];
    for (let t = 0; t < n * n; t++) {
      const re = net.values[2 * (k * n * n + t)]!;
      const im = net.values[2 * (k * n * n + t) + 1]!;
      const mag = Math.hypot(re, im);
      const db = 20 * Math.log10(mag);
      row.push(db < -999.99 ? '-inf' : db.toFixed(2), mag === 0 ? '0.0' : ((Math.atan2(im, re) * 180) / Math.PI).toFixed(1));
    }
    rows.push(row);
  }
  const widths = heads.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c]!.length)));
  const lines = [heads.map((h, c) => pad(h, widths[c]!)).join('  ')];
  for (const r of rows) lines.push(r.map((x, c) => pad(x, widths[c]!)).join('  '));
  return lines.join('\n') + '\n';
}

function formatFixed(x: number, digits: number): string {
  return String(Number(x.toPrecision(digits + 3)));
}

/** A column of derived figures: its heading, unit and values over frequency. */
export interface FigureColumn {
  name: string;
  unit: string;
  values: Float64Array;
}

function figureCell(v: number, unit: string): string {
  if (Number.isNaN(v)) return 'n/a';
  if (!Number.isFinite(v)) return v > 0 ? 'inf' : '-inf';
  if (unit === 's') return (v * 1e9).toFixed(4);
  if (unit === 'dB' || unit === 'deg') return v.toFixed(2);
  return Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-3 && v !== 0) ? v.toExponential(3) : v.toFixed(4);
}

/**
 * A table of derived figures per frequency (for `solve --figures`): aligned text for the
 * terminal, or CSV (`freq_hz` then one column per figure, full precision, SI units except
 * dB and degrees). CSV fields are quoted as RFC 4180 §2 says (a heading such as `il(2,1)_dB`
 * holds a comma, so it is written `"il(2,1)_dB"`), and a figure that has no finite value at a
 * point (e.g. the maximum available gain of a potentially unstable device, shown `n/a` in the
 * terminal) is an empty field, never NaN or Infinity.
 */
export function formatFigureTable(frequencies: Float64Array, columns: FigureColumn[], csv = false): string {
  if (csv) {
    const head = ['freq_hz', ...columns.map((c) => (c.unit ? `${c.name}_${c.unit}` : c.name))];
    const lines = [csvRow(head)];
    const cell = (v: number): string => (Number.isFinite(v) ? String(v) : '');
    for (let k = 0; k < frequencies.length; k++) lines.push([cell(frequencies[k]!), ...columns.map((c) => cell(c.values[k]!))].join(','));
    return lines.join('\n') + '\n';
  }
  const { unit, scale } = pickFrequencyUnit(frequencies.length ? frequencies[frequencies.length - 1]! : 0);
  const heads = [`f/${unit}`, ...columns.map((c) => (c.unit === 's' ? `${c.name}/ns` : c.unit ? `${c.name}/${c.unit}` : c.name))];
  const rows: string[][] = [];
  for (let k = 0; k < frequencies.length; k++) {
    rows.push([formatFixed(frequencies[k]! / scale, 6), ...columns.map((c) => figureCell(c.values[k]!, c.unit))]);
  }
  const widths = heads.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c]!.length)));
  const lines = [heads.map((h, c) => pad(h, widths[c]!)).join('  ')];
  for (const r of rows) lines.push(r.map((x, c) => pad(x, widths[c]!)).join('  '));
  return lines.join('\n') + '\n';
}
