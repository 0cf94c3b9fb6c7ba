/**
 * Small helpers of the elaboration passes for values with units: finiteness, dimensions, signs,
 * the SI form of a value and how messages show values and units.
 *
 * @module
 */
import type { DiagnosticBag, SourceSpan } from '../diagnostics/diagnostic.js';
import type { PropertySpec } from '../elements/types.js';
import { describeUnit, math, type Quantity } from './evaluate.js';

/** 1e-6, 1e9: a limit as written in the documentation. */
export function sci(x: number): string {
  return x.toExponential().replace('e+', 'e');
}

/**
 * The value itself when it is finite; otherwise undefined, reported at `span` (`1e308 * 10`,
 * `1e300 ohm * 1e300`: arithmetic that overflows into Infinity).
 */
export function finiteOrReport(q: Quantity | undefined, span: SourceSpan, bag: DiagnosticBag, name: string): Quantity | undefined {
  if (q === undefined) return undefined;
  const v = typeof q === 'number' ? q : (q as unknown as { value: number | null }).value;
  if (typeof v === 'number' && !Number.isFinite(v)) {
    bag.error('bad-number', `\`${name}\` is not a finite number`, span, 'the arithmetic overflows the range of numbers (about ±1.8e308)');
    return undefined;
  }
  return q;
}

/** Whether two values are the same kind of quantity (a plain number and a dimensionless unit are). */
export function sameDimension(a: Quantity, b: Quantity): boolean {
  const plain = (q: Quantity) => typeof q === 'number' || q.dimensions.every((d) => d === 0);
  if (plain(a) || plain(b)) return plain(a) && plain(b);
  return (a as Exclude<Quantity, number>).equalBase(b as Exclude<Quantity, number>);
}

export function signOk(p: PropertySpec, v: number): boolean {
  switch (p.sign) {
    case 'positive':
      return v > 0;
    case 'nonnegative':
      return v >= 0;
    case 'nonzero':
      return v !== 0;
    default:
      return true;
  }
}

export function article(quantity: string): string {
  return /^[aeiou]/.test(quantity) ? `an ${quantity}` : `a ${quantity}`;
}

const UNIT_EXAMPLES: Record<string, string> = {
  F: 'e.g. `4.7 pF`',
  H: 'e.g. `22 nH`',
  ohm: 'e.g. `50 ohm` or `4.7 kohm`',
  S: 'e.g. `20 mS`',
  Hz: 'e.g. `433 MHz`',
};

export function unitHelp(unit: string | null): string | undefined {
  if (unit === null) return 'give a plain number';
  const ex = UNIT_EXAMPLES[unit];
  return `give ${describeUnit(unit)}${ex ? `, ${ex}` : ''}; a bare number is read in ${unit}`;
}

const SI_UNITS = ['ohm', 'S', 'F', 'H', 'Hz', 's', 'm', 'rad', 'dB', 'dB/m'];

/** A value as a message shows it: `10 pF`, `6`. */
export function showQuantity(q: Quantity): string {
  return typeof q === 'number' ? String(q) : q.format({ precision: 6 });
}

export function siOf(q: Quantity): { value: number; unit: string } {
  if (typeof q === 'number') return { value: q, unit: '' };
  for (const u of SI_UNITS) if (q.equalBase(math.unit(1, u))) return { value: q.toNumber(u), unit: u };
  try {
    const si = q.toSI();
    return { value: (si as unknown as { value: number }).value, unit: si.formatUnits() };
  } catch {
    // units of our own (dB) have no SI form
    return { value: (q as unknown as { value: number }).value, unit: q.formatUnits() };
  }
}
