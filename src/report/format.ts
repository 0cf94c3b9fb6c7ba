/**
 * Text helpers for the report and the static plots: HTML/XML escaping, engineering units for
 * frequency and delay axes, tick placement, and fixed-precision numbers for deterministic output.
 *
 * @module
 */

import type { NetworkData } from '../network/types.js';

/** Escapes text for HTML or XML element content and attribute values. */
export function escapeXml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => (c === '&' ? '&amp;' : c === '<' ? '&lt;' : c === '>' ? '&gt;' : c === '"' ? '&quot;' : '&#39;'));
}

/** A display unit: values are divided by `scale` and shown with `unit`. */
export interface DisplayUnit {
  scale: number;
  unit: string;
}

/** The frequency unit for an axis reaching up to `maxHz`: GHz, MHz, kHz or Hz. */
export function frequencyUnit(maxHz: number): DisplayUnit {
  const a = Math.abs(maxHz);
  if (a >= 1e9) return { scale: 1e9, unit: 'GHz' };
  if (a >= 1e6) return { scale: 1e6, unit: 'MHz' };
  if (a >= 1e3) return { scale: 1e3, unit: 'kHz' };
  return { scale: 1, unit: 'Hz' };
}

/** The time unit for delays up to `maxSeconds` in magnitude: ps, ns, µs, ms or s. */
export function delayUnit(maxSeconds: number): DisplayUnit {
  const a = Math.abs(maxSeconds);
  if (!Number.isFinite(a) || a === 0) return { scale: 1e-9, unit: 'ns' };
  if (a < 1e-9) return { scale: 1e-12, unit: 'ps' };
  if (a < 1e-6) return { scale: 1e-9, unit: 'ns' };
  if (a < 1e-3) return { scale: 1e-6, unit: 'µs' };
  if (a < 1) return { scale: 1e-3, unit: 'ms' };
  return { scale: 1, unit: 's' };
}

/** Evenly spaced ticks over an axis: the values, the step and the decimals their labels need. */
export interface Ticks {
  min: number;
  max: number;
  step: number;
  values: number[];
  decimals: number;
}

/**
 * A "nice" step of 1, 2 or 5 times a power of ten near `span / target` (the usual 1-2-5 rule, as in
 * P. S. Heckbert, "Nice numbers for graph labels", Graphics Gems, 1990; from memory).
 */
export function niceStep(span: number, target: number): number {
  if (!(span > 0) || !Number.isFinite(span)) return 1;
  const raw = span / Math.max(1, target);
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const m = raw / p;
  const nice = m < 1.5 ? 1 : m < 3.5 ? 2 : m < 7.5 ? 5 : 10;
  return nice * p;
}

/** Decimals needed to print multiples of `step` exactly (0 for steps ≥ 1). */
export function stepDecimals(step: number): number {
  if (!(step > 0)) return 0;
  return Math.max(0, Math.min(12, -Math.floor(Math.log10(step) + 1e-9)));
}

/**
 * Ticks covering [lo, hi]: the axis is widened outward to whole steps when `expand` is set
 * (value axes), and kept at [lo, hi] with the ticks inside otherwise (frequency axes).
 */
export function ticks(lo: number, hi: number, target: number, expand: boolean): Ticks {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) {
    lo = 0;
    hi = 1;
  }
  if (hi < lo) [lo, hi] = [hi, lo];
  if (hi === lo) {
    const d = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    lo -= d;
    hi += d;
  }
  const step = niceStep(hi - lo, target);
  const eps = step * 1e-9;
  const min = expand ? Math.floor((lo + eps) / step) * step : lo;
  const max = expand ? Math.ceil((hi - eps) / step) * step : hi;
  const values: number[] = [];
  const first = Math.ceil((min - eps) / step);
  const last = Math.floor((max + eps) / step);
  for (let t = first; t <= last; t++) values.push(clean(t * step));
  return { min: clean(min), max: clean(max), step, values, decimals: stepDecimals(step) };
}

/** Removes binary noise such as 0.30000000000000004 (12 significant digits). */
function clean(x: number): number {
  return x === 0 ? 0 : Number(x.toPrecision(12));
}

/** A number with fixed decimals and a true minus sign (−); −0 prints as 0. */
export function fixed(x: number, decimals: number): string {
  const s = x.toFixed(decimals);
  if (/^-0(\.0*)?$/.test(s)) return s.slice(1);
  return s.startsWith('-') ? `−${s.slice(1)}` : s;
}

/** A coordinate for SVG output: two decimals, ASCII minus, no −0 (deterministic). */
export function coord(x: number): string {
  const s = x.toFixed(2);
  return s === '-0.00' ? '0.00' : s;
}

/** A number rounded to `digits` significant digits for the embedded data (null when not finite). */
export function round(x: number, digits = 9): number | null {
  if (!Number.isFinite(x)) return null;
  return x === 0 ? 0 : Number(x.toPrecision(digits));
}

/**
 * The label of entry (i, j), 1-based: `S21` for ports up to 9, `S(12,3)` beyond. For mixed-mode data
 * (`modes`, one label per row/column such as `D1` or `C2`, see modeLabels in
 * src/network/mixed-mode.ts) the two mode letters come first, in lower case, then the pair numbers:
 * entry (D2, C1) is `Sdc21` (the naming of Bockelman & Eisenstadt, 1995; `Sdc(12,3)` beyond pair 9).
 */
export function entryLabel(i: number, j: number, ports: number, modes?: readonly string[]): string {
  if (modes) {
    const a = modes[i - 1]!;
    const b = modes[j - 1]!;
    const ri = a.slice(1);
    const rj = b.slice(1);
    const kinds = `${a[0]!.toLowerCase()}${b[0]!.toLowerCase()}`;
    return /^\d$/.test(ri) && /^\d$/.test(rj) ? `S${kinds}${ri}${rj}` : `S${kinds}(${ri},${rj})`;
  }
  return ports <= 9 ? `S${i}${j}` : `S(${i},${j})`;
}

/**
 * The mode labels of mixed-mode data (`modes` of MixedModeData, one per port: `D1` … `C1` …), or
 * undefined for single-ended data or labels of another form.
 */
export function modesOf(net: object & { ports: number }): readonly string[] | undefined {
  const modes = (net as { modes?: unknown }).modes;
  if (!Array.isArray(modes) || modes.length !== net.ports) return undefined;
  return modes.every((m) => typeof m === 'string' && /^[DCdc]\d+$/.test(m)) ? (modes as string[]) : undefined;
}

/** A reference impedance R + jX in words: `50 Ω`, `36 + j21 Ω`, `50 − j10 Ω` (six significant digits). */
export function referenceText(r: number, x: number): string {
  const rs = String(Number(r.toPrecision(6)));
  if (x === 0) return `${rs} Ω`;
  const xs = String(Number(Math.abs(x).toPrecision(6)));
  return `${rs} ${x < 0 ? '−' : '+'} j${xs} Ω`;
}

/**
 * How far below the largest value a dB axis reaches at most: 120 dB. Values below are numerical
 * zeros (an |S| of 1e-20 is −400 dB) or far beneath anything of interest; ranging the axis down to
 * them would squash the data that matters into a sliver. 120 dB covers the dynamic range of a good
 * vector network analyser with room (common practice).
 */
export const DB_AXIS_SPAN = 120;

/** The lowest value a dB axis shows, given the values on it: the largest finite one less {@link DB_AXIS_SPAN}. */
export function dbAxisFloor(largest: number): number {
  return largest - DB_AXIS_SPAN;
}

/** The reference of `port` (1-based) in words, R + jX when it is complex (see {@link referenceText}). */
export function portReference(s: NetworkData, port: number): string {
  return referenceText(s.references[port - 1]!, s.referenceReactances?.[port - 1] ?? 0);
}

/** The distinct port references of `s` in words, R + jX for complex ones: [`50 Ω`, `36 + j21 Ω`]. */
export function referenceList(s: NetworkData): string[] {
  const seen = new Set<string>();
  for (let p = 1; p <= s.ports; p++) seen.add(portReference(s, p));
  return [...seen];
}
