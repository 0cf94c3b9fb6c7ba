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
 * Right-aligned columns of text, handed out in pieces of a few hundred lines. The column widths
 * come from a first pass that formats every cell and keeps only the widths, so a sweep of
 * millions of points is never held as rows of strings (nor spread into one call).
 */
function* alignedChunks(heads: readonly string[], rowCount: number, cells: (k: number, out: string[]) => void): Generator<string> {
  const widths = heads.map((h) => h.length);
  const row: string[] = [];
  for (let k = 0; k < rowCount; k++) {
    row.length = 0;
    cells(k, row);
    for (let c = 0; c < row.length; c++) if (row[c]!.length > widths[c]!) widths[c] = row[c]!.length;
  }
  let piece = heads.map((h, c) => pad(h, widths[c]!)).join('  ') + '\n';
  for (let k = 0; k < rowCount; k++) {
    row.length = 0;
    cells(k, row);
    piece += row.map((x, c) => pad(x, widths[c]!)).join('  ') + '\n';
    if (k % 256 === 255) {
      yield piece;
      piece = '';
    }
  }
  if (piece) yield piece;
}

/**
 * A compact text table for the terminal: the frequency, then |Sij| in dB and ∠Sij in degrees for
 * every entry (row-major). Magnitudes below −999.99 dB are shown as `-inf`. Handed out in pieces.
 */
export function tableChunks(net: NetworkData): Iterable<string> {
  const n = net.ports;
  const { unit, scale } = pickFrequencyUnit(net.frequencies.length ? net.frequencies[net.frequencies.length - 1]! : 0);
  const sep = n >= 10 ? ',' : '';
  const heads = [`f/${unit}`];
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= n; j++) heads.push(`|${net.parameter}${i}${sep}${j}|/dB`, `∠${net.parameter}${i}${sep}${j}/°`);
  }
  return alignedChunks(heads, net.frequencies.length, (k, row) => {
    row.push(formatFixed(net.frequencies[k]! / scale, 6));
    for (let t = 0; t < n * n; t++) {
      const re = net.values[2 * (k * n * n + t)]!;
      const im = net.values[2 * (k * n * n + t) + 1]!;
      const mag = Math.hypot(re, im);
      const db = 20 * Math.log10(mag);
      row.push(db < -999.99 ? '-inf' : db.toFixed(2), mag === 0 ? '0.0' : ((Math.atan2(im, re) * 180) / Math.PI).toFixed(1));
    }
  });
}

/** {@link tableChunks} as one string. */
export function formatTable(net: NetworkData): string {
  return [...tableChunks(net)].join('');
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
export function figureTableChunks(frequencies: Float64Array, columns: FigureColumn[], csv = false): Iterable<string> {
  if (csv) return figureCsvChunks(frequencies, columns);
  const { unit, scale } = pickFrequencyUnit(frequencies.length ? frequencies[frequencies.length - 1]! : 0);
  const heads = [`f/${unit}`, ...columns.map((c) => (c.unit === 's' ? `${c.name}/ns` : c.unit ? `${c.name}/${c.unit}` : c.name))];
  return alignedChunks(heads, frequencies.length, (k, row) => {
    row.push(formatFixed(frequencies[k]! / scale, 6));
    for (const c of columns) row.push(figureCell(c.values[k]!, c.unit));
  });
}

function* figureCsvChunks(frequencies: Float64Array, columns: FigureColumn[]): Generator<string> {
  const cell = (v: number): string => (Number.isFinite(v) ? String(v) : '');
  let piece = csvRow(['freq_hz', ...columns.map((c) => (c.unit ? `${c.name}_${c.unit}` : c.name))]) + '\n';
  for (let k = 0; k < frequencies.length; k++) {
    piece += [cell(frequencies[k]!), ...columns.map((c) => cell(c.values[k]!))].join(',') + '\n';
    if (k % 256 === 255) {
      yield piece;
      piece = '';
    }
  }
  if (piece) yield piece;
}

/** {@link figureTableChunks} as one string. */
export function formatFigureTable(frequencies: Float64Array, columns: FigureColumn[], csv = false): string {
  return [...figureTableChunks(frequencies, columns, csv)].join('');
}
