/** A frequency for people: `2.45 GHz`, `433 MHz`, `0 Hz` (six significant digits by default). */
export function formatFrequency(f: number, digits = 6): string {
  if (!Number.isFinite(f)) return f > 0 ? '∞' : String(f);
  if (f === 0) return '0 Hz';
  const units: [number, string][] = [
    [1e9, 'GHz'],
    [1e6, 'MHz'],
    [1e3, 'kHz'],
  ];
  for (const [s, u] of units) if (Math.abs(f) >= s) return `${Number((f / s).toPrecision(digits))} ${u}`;
  return `${Number(f.toPrecision(digits))} Hz`;
}
