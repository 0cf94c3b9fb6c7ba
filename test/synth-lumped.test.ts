/**
 * Lumped filters of `scatterbox design` (src/synth/lumped.ts): every written netlist loads, passes
 * its own specs, and its solved |S21| follows the closed-form response at the mapped frequency.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { evaluateQuantity, loadNetlist } from '../src/load.js';
import { quantity } from '../src/synth/netlist.js';
import { solveSweep } from '../src/solve/sweep.js';
import { checkDesignText } from '../src/synth/index.js';
import { designFilter, mappedFrequency, minimumOrder, passbandDelay, type FilterRequest } from '../src/synth/lumped.js';
import { readFilterRequest } from '../src/synth/options.js';
import { chebyshevT, epsilonSquared } from '../src/synth/prototype.js';
import { nearestInSeries } from '../src/design/series.js';

/** |S21|² over the written netlist's sweep, solved by the library. */
function solvedGain(text: string): { f: Float64Array; g: number[] } {
  const { circuit } = loadNetlist(text, 'design.sbx');
  const net = solveSweep(circuit);
  const n = net.frequencies.length;
  const g: number[] = [];
  for (let k = 0; k < n; k++) {
    const base = k * 8; // 2 ports: entries 11, 12, 21, 22, interleaved re/im
    const re = net.values[base + 4]!;
    const im = net.values[base + 5]!;
    g.push(re * re + im * im);
  }
  return { f: net.frequencies, g };
}

const base = { rippleDb: 0.1, stopEdges: [], z0: 50, first: 'shunt' as const };
const cases: FilterRequest[] = [];
for (const response of ['butterworth', 'chebyshev', 'bessel'] as const) {
  for (const [order, first] of [[3, 'shunt'], [4, 'series'], [7, 'shunt']] as const) {
    cases.push({ ...base, kind: 'lowpass', response, order, cutoff: 600e6, first, rippleDb: 0.5 });
    cases.push({ ...base, kind: 'highpass', response, order, cutoff: 80e6, first });
    cases.push({ ...base, kind: 'bandpass', response, order, center: 2.44e9, bandwidth: 200e6, first });
    cases.push({ ...base, kind: 'bandstop', response, order, center: 915e6, bandwidth: 150e6, first, z0: 75, rippleDb: 0.01 });
  }
}
// unequal terminations: an even Chebyshev into its own load, Butterworth and Bessel into 100 ohm
cases.push({ ...base, kind: 'lowpass', response: 'chebyshev', order: 4, cutoff: 1e9, rippleDb: 1 });
cases.push({ ...base, kind: 'bandpass', response: 'butterworth', order: 3, center: 100e6, bandwidth: 10e6, load: 100 });
cases.push({ ...base, kind: 'highpass', response: 'bessel', order: 5, cutoff: 1e6, load: 30, first: 'series' });

describe('lumped filters follow their response functions', () => {
  for (const c of cases) {
    const label = `${c.response} ${c.kind} order ${c.order}, ${c.first} first${c.load ? `, load ${c.load} ohm` : ''}`;
    it(`${label}: |S21| within 1e-9 of the closed form, specs pass`, () => {
      const d = designFilter(c);
      const { f, g } = solvedGain(d.text);
      let worst = 0;
      for (let k = 0; k < f.length; k++) {
        // Butterworth peak/(1+Ω^2n), Chebyshev peak/(1+ε²·T_n(Ω)²), Bessel |B(0)/B(jΩ)|² (closed forms),
        // Ω the mapped frequency; checked on |S21| itself
        const want = Math.sqrt(d.gain(f[k]!));
        worst = Math.max(worst, Math.abs(Math.sqrt(g[k]!) - want));
      }
      expect(worst).toBeLessThan(1e-9);
      expect(checkDesignText(d.text, 'design.sbx').pass).toBe(true);
    });
  }
  it('the Chebyshev response is written out independently here for one case: 1/(1+ε²·T5²) at 1.3·fc', () => {
    const d = designFilter({ ...base, kind: 'lowpass', response: 'chebyshev', order: 5, cutoff: 600e6 });
    const eps2 = 10 ** (0.1 / 10) - 1;
    const t5 = (x: number) => 16 * x ** 5 - 20 * x ** 3 + 5 * x; // T5 (closed form)
    expect(Math.abs(d.gain(780e6) - 1 / (1 + eps2 * t5(1.3) ** 2))).toBeLessThan(1e-14);
    expect(epsilonSquared(0.1)).toBeCloseTo(eps2, 15);
    expect(chebyshevT(5, 1.3)).toBeCloseTo(t5(1.3), 10);
  });
  it('the band-pass mapping is (f/f0 − f0/f)/FBW, 1 at both edges (closed form)', () => {
    const d = designFilter({ ...base, kind: 'bandpass', response: 'butterworth', order: 3, center: 1e9, bandwidth: 100e6 });
    const [f1, f2] = d.edges;
    expect(f2! - f1!).toBeCloseTo(100e6, 3);
    expect(f1! * f2!).toBeCloseTo(1e18, -6);
    expect(mappedFrequency('bandpass', f1!, 1e9, 0.1)).toBeCloseTo(1, 12);
    // 3 dB at the edges for Butterworth (the cutoff convention), to 1e-12
    expect(Math.abs(d.gain(f2!) - 0.5)).toBeLessThan(1e-12);
  });
  it('says which cutoff it means in the written netlist', () => {
    expect(designFilter({ ...base, kind: 'lowpass', response: 'chebyshev', order: 3, cutoff: 1e9 }).text).toMatch(/cutoff: the edge of the 0\.1 dB ripple band/);
    expect(designFilter({ ...base, kind: 'lowpass', response: 'butterworth', order: 3, cutoff: 1e9 }).text).toMatch(/cutoff: the 3 dB point/);
  });
});

describe('minimum order from a mask', () => {
  it('Butterworth: n ≥ log10(10^(As/10) − 1)/(2·log10 Ωs) (common practice)', () => {
    // 40 dB at twice the cutoff: log10(9999)/(2·log10 2) = 6.64 → 7
    expect(minimumOrder('butterworth', 0, 40, 2)).toBe(7);
    // 20 dB at 10×: 0.998 → 1
    expect(minimumOrder('butterworth', 0, 20, 10)).toBe(1);
  });
  it('Chebyshev: n ≥ acosh(√((10^(As/10) − 1)/(10^(Ap/10) − 1)))/acosh Ωs (common practice)', () => {
    // 0.1 dB ripple, 40 dB at 2×: acosh(√(9999/0.023293))/acosh(2) = 7.178/1.317 = 5.45 → 6
    expect(minimumOrder('chebyshev', 0.1, 40, 2)).toBe(6);
    // 0.5 dB, 50 dB at 1.5×: acosh(√(99999/0.12202))/acosh(1.5) = 7.41/0.962 = 7.70 → 8
    expect(minimumOrder('chebyshev', 0.5, 50, 1.5)).toBe(8);
  });
  it('a designed mask meets its stop-band spec at the least order, and one order less would not', () => {
    const r = readFilterRequest('bandpass', { response: 'chebyshev', ripple: '0.5', center: '2.44 GHz', bandwidth: '100 MHz', stopAtten: '40 dB', stopEdge: '2.2 GHz, 2.7 GHz' });
    const d = designFilter(r);
    expect(checkDesignText(d.text, 'bp.sbx').pass).toBe(true);
    const n = d.proto.order;
    const less = designFilter({ ...r, stopAttenDb: undefined, stopEdges: [], order: n - 1 });
    // the response one order lower, at the nearer stop edge, falls short of 40 dB (closed form)
    const atEdge = Math.min(...[2.2e9, 2.7e9].map((f) => -10 * Math.log10(less.gain(f))));
    expect(atEdge).toBeLessThan(40);
    expect(Math.min(...[2.2e9, 2.7e9].map((f) => -10 * Math.log10(d.gain(f))))).toBeGreaterThanOrEqual(40);
  });
});

describe('series snapping and losses', () => {
  it('the pass-band delay behind the loss allowance: Butterworth n=1 has τmax = 1, n=2 has 1 + 1/√2 at Ω² = √2 − 1 (closed forms of the all-pole delay)', () => {
    expect(passbandDelay('butterworth', 1, 0)).toBeCloseTo(1, 9);
    // τ(Ω) = √2·(1 + Ω²)/(1 + Ω⁴), largest at Ω² = √2 − 1; sampled every 1/400: within 1e-5
    expect(Math.abs(passbandDelay('butterworth', 2, 0) - (1 + Math.SQRT1_2))).toBeLessThan(1e-5);
  });
  it('lossy designs of every order pass their specs (high-order Chebyshev, Q = 30, 5 % wide band-pass)', () => {
    for (const order of [3, 6, 9]) {
      for (const kind of ['lowpass', 'bandpass'] as const) {
        const d = designFilter({ ...base, kind, response: 'chebyshev', rippleDb: 0.5, order, cutoff: 1e9, center: 1e9, bandwidth: 5e7, q: 30 });
        expect(checkDesignText(d.text, 'q.sbx').pass).toBe(true);
      }
    }
  });
  it('--series E12 writes E12 values, keeps the series on the variables, and the check says whether it passes', () => {
    const r = readFilterRequest('lowpass', { response: 'butterworth', order: '5', cutoff: '100 MHz', series: 'e12' });
    const d = designFilter(r);
    for (const p of d.parts) expect(p.value).toBe(nearestInSeries(p.exact, 'E12'));
    expect(d.text).toMatch(/vary [^#]* series E12/);
    const { circuit } = loadNetlist(d.text, 'lp.sbx');
    expect(circuit.variables.every((v) => v.series === 'E12')).toBe(true);
    // the snapped design is checked like any other: its result is the result of the specs
    const { pass, results } = checkDesignText(d.text, 'lp.sbx');
    expect(pass).toBe(results.every((x) => x.pass));
  });
  it('--q adds Q at the centre and widens the pass-band limit by the loss estimate; the lossy design passes', () => {
    const d = designFilter({ ...base, kind: 'bandpass', response: 'chebyshev', order: 3, center: 915e6, bandwidth: 50e6, q: 100 });
    expect(d.text).toMatch(/value=l1 q=100 at f0/);
    expect(checkDesignText(d.text, 'bp.sbx').pass).toBe(true);
    // loss at the centre: near Cohn's estimate 4.343·Σg/(Qu·FBW) (Cohn, 1959), within 30 %; a resonator
    // of an inductor and a capacitor of Q = 100 each has Qu = 50
    const { f, g } = solvedGain(d.text);
    const k = f.findIndex((x) => Math.abs(x - 915e6) < 1);
    const loss = -10 * Math.log10(g[k]!);
    const est = (4.343 * d.proto.g.reduce((a, b) => a + b, 0)) / (50 * (50 / 915));
    expect(loss).toBeGreaterThan(0.7 * est);
    expect(loss).toBeLessThan(1.3 * est);
  });
});

describe('bad requests get plain errors that name the option', () => {
  const bad: [string, Record<string, string>, RegExp][] = [
    ['lowpass', { order: '3' }, /needs --cutoff/],
    ['bandpass', { order: '3', center: '1 GHz' }, /needs --center and --bandwidth/],
    ['lowpass', { order: '11', cutoff: '1 GHz' }, /--order must be a whole number from 1 to 10/],
    ['lowpass', { order: '3', cutoff: '1 GHz', ripple: '0.1' }, /--ripple belongs to --response chebyshev/],
    ['lowpass', { cutoff: '1 GHz' }, /give --order, or a mask/],
    ['lowpass', { cutoff: '1 GHz', stopAtten: '40', stopEdge: '0.5 GHz' }, /--stop-edge 500 MHz lies inside the pass band/],
    ['lowpass', { cutoff: '1 GHz', stopAtten: '100', stopEdge: '1.05 GHz' }, /order above 10/],
    ['lowpass', { response: 'chebyshev', order: '4', cutoff: '1 GHz', load: '50 ohm' }, /even-order Chebyshev/],
    ['lowpass', { order: '3', cutoff: '1 GHz', series: 'E25' }, /--series is one of E6/],
    ['lowpass', { order: '3', cutoff: '1 GHz', response: 'elliptical' }, /--response is one of butterworth, chebyshev, bessel/],
    ['highpass', { order: '3', cutoff: '0 Hz' }, /--cutoff must be from 1 Hz/],
  ];
  for (const [kind, raw, re] of bad) {
    it(`${kind} ${JSON.stringify(raw)}`, () => {
      expect(() => designFilter(readFilterRequest(kind as FilterRequest['kind'], raw))).toThrow(re);
    });
  }
  it('a frequency in the wrong unit is located in the option text', () => {
    expect(() => readFilterRequest('lowpass', { order: '3', cutoff: '5 pF' })).toThrow(expect.objectContaining({ name: 'InputError' }));
  });
});

describe('written values', () => {
  it('every written quantity reads back through the netlist grammar within 1e-11 (fast-check, fixed seed); angles take no prefix', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-17, max: 1e13, noNaN: true }), fc.constantFrom(['F', 'F'], ['H', 'H'], ['Hz', 'Hz'], ['ohm', 'ohm'], ['deg', 'rad']), (x, [unit, si]) => {
        const text = quantity(x, unit);
        const back = evaluateQuantity(text, si, 'value');
        const want = unit === 'deg' ? (x * Math.PI) / 180 : x;
        expect(Math.abs(back / want - 1)).toBeLessThan(1e-11);
      }),
      { seed: 7, numRuns: 400 },
    );
    expect(quantity(0.75, 'deg')).toBe('0.75 deg');
  });
});
