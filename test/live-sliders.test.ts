// How the live page's sliders move through a variable's range (src/live/sliders.ts): through the
// preferred series where the variable has one (IEC 60063 E24, the table as the standard prints
// it), through its steps where it has them, logarithmically where the range spans a decade or
// more, else evenly; and the unit of the number field. The page's mapping from slider position
// to value (src/report/live.ts, in the browser) is checked in test/live-browser.test.ts.
import { describe, expect, it } from 'vitest';
import type { Variable } from '../src/elaborate/circuit.js';
import { sliderOf } from '../src/live/sliders.js';

const span = { file: 'x.sbx', line: 1, column: 5, length: 1 };
const v = (o: Partial<Variable>): Variable => ({ name: 'x', value: 1, lower: 1, upper: 2, unit: null, span, ...o }) as Variable;

describe('live sliders', () => {
  it('steps through E24 between the bounds (IEC 60063: 3.0 3.3 3.6 3.9 4.3 4.7 5.1 5.6 6.2 6.8 7.5 8.2 9.1 10 11 12 nH)', () => {
    const s = sliderOf(v({ name: 'lser', value: 6.15e-9, lower: 3e-9, upper: 12e-9, unit: 'H', series: 'E24' }), 6.15e-9);
    expect(s.scale).toBe('series');
    expect(s.note).toBe('E24');
    const nH = s.values!.map((x) => Number((x / 1e-9).toPrecision(6)));
    expect(nH).toEqual([3, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1, 10, 11, 12]);
    // each within 4 units in the last place of the decimal value (the netlist's own reading of `6.8 nH`)
    s.values!.forEach((x, i) => expect(Math.abs(x - nH[i]! * 1e-9)).toBeLessThanOrEqual(4 * Number.EPSILON * x));
    expect(s.display).toEqual({ factor: 1e-9, unit: 'nH' });
    expect(s.value).toBe(6.15e-9);
  });

  it('steps through the steps of a `step` variable, counted from the lower bound', () => {
    const s = sliderOf(v({ lower: 1e-12, upper: 2e-12, unit: 'F', step: 0.25e-12 }), 1.5e-12);
    expect(s.scale).toBe('step');
    expect(s.values!.map((x) => Number((x / 1e-12).toPrecision(6)))).toEqual([1, 1.25, 1.5, 1.75, 2]);
    expect(s.note).toBe('step 0.25 pF');
  });

  it('is logarithmic where the range spans a decade or more, even otherwise', () => {
    expect(sliderOf(v({ lower: 1, upper: 10, unit: 'ohm' }), 2).scale).toBe('log');
    expect(sliderOf(v({ lower: 1e-12, upper: 1e-9, unit: 'F' }), 2e-12).scale).toBe('log');
    expect(sliderOf(v({ lower: 1, upper: 9.99, unit: 'ohm' }), 2).scale).toBe('linear');
    // a range through zero cannot be logarithmic
    expect(sliderOf(v({ lower: -5, upper: 50 }), 0).scale).toBe('linear');
    // a series on a range that holds one value only: an even slider instead
    expect(sliderOf(v({ lower: 4.7e-12, upper: 4.8e-12, unit: 'F', series: 'E12' }), 4.7e-12).scale).toBe('linear');
  });

  it('shows values in the unit with the prefix of the larger bound', () => {
    expect(sliderOf(v({ lower: 0.5e-12, upper: 4.7e-12, unit: 'F' }), 1e-12).display).toEqual({ factor: 1e-12, unit: 'pF' });
    expect(sliderOf(v({ lower: 10, upper: 2000, unit: 'ohm' }), 50).display).toEqual({ factor: 1e3, unit: 'kohm' });
    expect(sliderOf(v({ lower: 0.1, upper: 0.9 }), 0.5).display).toEqual({ factor: 1, unit: '' });
  });
});
