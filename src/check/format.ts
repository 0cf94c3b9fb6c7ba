import type { SpecDefinition } from './types.js';

export { formatFrequency } from '../format/frequency.js';
import { formatFrequency } from '../format/frequency.js';

/** A figure value or margin with its unit: `0.42 dB`, `1.3 ns`, `1.05`. */
export function formatMargin(v: number, unit: string): string {
  if (Number.isNaN(v)) return 'n/a';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '−∞';
  if (unit === 's') {
    const a = Math.abs(v);
    if (a !== 0 && a < 1e-6) return `${Number((v * 1e9).toPrecision(4))} ns`;
    if (a !== 0 && a < 1e-3) return `${Number((v * 1e6).toPrecision(4))} µs`;
  }
  const text = Math.abs(v) >= 1000 || (Math.abs(v) < 0.01 && v !== 0) ? v.toPrecision(3) : v.toFixed(2);
  return unit ? `${text} ${unit}` : text;
}

/** `il(2,1) ≤ 1.00 dB over 2.4–2.48 GHz` (a sloped limit shows both ends). */
export function describeSpec(s: SpecDefinition): string {
  const rel = s.bound === 'max' ? '≤' : '≥';
  const lim = s.limit[0] === s.limit[1] ? formatMargin(s.limit[0], s.unit) : `${formatMargin(s.limit[0], s.unit)} → ${formatMargin(s.limit[1], s.unit)}`;
  let band: string;
  if (s.band[1] === Infinity) band = `above ${formatFrequency(s.band[0])}`;
  else if (s.band[0] === 0 && s.band[1] !== 0) band = `below ${formatFrequency(s.band[1])}`;
  else if (s.band[0] === s.band[1]) band = `at ${formatFrequency(s.band[0])}`;
  else band = `over ${formatFrequency(s.band[0])} – ${formatFrequency(s.band[1])}`;
  return `${s.figure} ${rel} ${lim} ${band}`;
}
