import type { NetworkData } from '../network/types.js';

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
