// `fit` (issue 15, item 4): the L-section match against its closed form, the methods, starts,
// margins and snapping of src/design/fit.ts.
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DesignModel } from '../src/design/model.js';
import { fit, fromUnit, mulberry32, neighbours, parseMargins, penaltyOf, specScale, toUnit, HINGE } from '../src/design/fit.js';
import { seriesValuesIn } from '../src/design/series.js';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { evaluateQuantity } from '../src/load.js';
import { valueText } from '../src/design/write-back.js';
import type { Variable } from '../src/elaborate/circuit.js';
import type { SpecResult } from '../src/check/types.js';

const DEMO = 'circuits/match-50-75-915.sbx';
const demoText = readFileSync(DEMO, 'utf8');

// Common practice (L-section match of two resistances): Q = √(R_high/R_low − 1),
// X_series = Q·R_low on the low side, X_shunt = R_high/Q on the high side.
const F0 = 915e6;
const W0 = 2 * Math.PI * F0;
const Q = Math.sqrt(75 / 50 - 1);
const L_CLOSED = (Q * 50) / W0; // 6.150 nH
const C_CLOSED = 1 / (W0 * (75 / Q)); // 1.640 pF

/**
 * The demo without part losses (the closed form is for ideal parts) and with a tight mask at
 * 915 MHz: the input impedance 50 ± 1e-4 ohm resistive and 0 ± 1e-4 ohm reactive, as min/max
 * spec pairs. Zin = 50 ohm is two real equations in two unknowns with one solution of positive
 * values in this topology (the closed form), and windows of 2e-6 relative pin it far below 1e-4.
 */
const lossless = (start: [number, number]) =>
  demoText
    .replace(/ q=50 {2}at f0/, '')
    .replace(/ q=400 at f0/, '')
    .replace(/^spec .*$/gm, '')
    .replace('let lser   = xs/w0', `let lser   = ${start[0]} H`)
    .replace('let cshunt = 1/(w0*xp)', `let cshunt = ${start[1]} F`)
    .replace(/series E24/g, '') +
  ['spec re_lo measure=zin_re(1) min=49.9999 ohm over=f0, f0', 'spec re_hi measure=zin_re(1) max=50.0001 ohm over=f0, f0', 'spec im_lo measure=zin_im(1) min=-1e-4 ohm over=f0, f0', 'spec im_hi measure=zin_im(1) max=1e-4 ohm over=f0, f0'].join('\n') +
  '\n';

describe('fit of an L-section match converges to the closed-form values', () => {
  for (const method of ['gradient', 'simplex', 'auto'] as const) {
    it(`${method}: series L and shunt C to 1e-4 relative from a 25 % detuned start`, () => {
      const model = DesignModel.fromText(lossless([L_CLOSED * 1.25, C_CLOSED * 0.75]), 'lsection.sbx');
      const r = fit(model, { method, maxEvals: 3000 });
      expect(r.before.every((s) => s.pass)).toBe(false);
      expect(r.pass).toBe(true);
      expect(Math.abs(r.snapped[0]! / L_CLOSED - 1)).toBeLessThan(1e-4);
      expect(Math.abs(r.snapped[1]! / C_CLOSED - 1)).toBeLessThan(1e-4);
      if (method !== 'auto') expect(r.method).toBe(method);
    });
  }

  it('for random resistances and frequencies (fast-check, seed 4242): to 1e-4 relative', () => {
    fc.assert(
      fc.property(fc.double({ min: 5, max: 100, noNaN: true }), fc.double({ min: 1.2, max: 10, noNaN: true }), fc.double({ min: 1e6, max: 1e10, noNaN: true }), (rlo, ratio, f0) => {
        const rhi = rlo * ratio;
        const w0 = 2 * Math.PI * f0;
        // common practice: Q = √(R_high/R_low − 1), X_series = Q·R_low, X_shunt = R_high/Q
        const q = Math.sqrt(rhi / rlo - 1);
        const l = (q * rlo) / w0;
        const c = q / (rhi * w0);
        const text = [
          `let lser = ${l * 1.25} H vary ${l / 2} H to ${2 * l} H`,
          `let cshunt = ${c * 0.75} F vary ${c / 2} F to ${2 * c} F`,
          'inductor lser a=lo b=hi value=lser',
          'capacitor cshunt a=hi b=ground value=cshunt',
          `port 1 plus=lo ref=${rlo} ohm`,
          `port 2 plus=hi ref=${rhi} ohm`,
          `sweep list freqs=${f0} Hz`,
          // the input impedance R_low ± 2e-6·R_low, reactance 0 ± 2e-6·R_low
          `spec re_lo measure=zin_re(1) min=${rlo * (1 - 2e-6)} ohm over=${f0} Hz, ${f0} Hz`,
          `spec re_hi measure=zin_re(1) max=${rlo * (1 + 2e-6)} ohm over=${f0} Hz, ${f0} Hz`,
          `spec im_lo measure=zin_im(1) min=${-rlo * 2e-6} ohm over=${f0} Hz, ${f0} Hz`,
          `spec im_hi measure=zin_im(1) max=${rlo * 2e-6} ohm over=${f0} Hz, ${f0} Hz`,
        ].join('\n');
        const r = fit(DesignModel.fromText(text + '\n', 'l.sbx'), { maxEvals: 2000 });
        expect(r.pass).toBe(true);
        expect(Math.abs(r.snapped[0]! / l - 1)).toBeLessThan(1e-4);
        expect(Math.abs(r.snapped[1]! / c - 1)).toBeLessThan(1e-4);
      }),
      { seed: 4242, numRuns: 8 },
    );
  });

  it('on the demo itself (lossy parts, E24 series): the snapped values are the E24 neighbours of the fitted ones', () => {
    const model = DesignModel.load(DEMO);
    model.setValues(Array.from(model.values, (x) => x * 1.25));
    const r = fit(model);
    expect(r.atFitted.every((s) => s.pass)).toBe(true);
    r.variables.forEach((v, i) => {
      // IEC 60063 E24, through seriesValuesIn: the value just below and just above the fitted one
      const table = seriesValuesIn(v.lower, v.upper, 'E24');
      const below = Math.max(...table.filter((x) => x <= r.fitted[i]!));
      const above = Math.min(...table.filter((x) => x >= r.fitted[i]!));
      const snapped = r.snapped[i]!;
      expect([below, above].some((x) => Math.abs(snapped / x - 1) < 1e-15)).toBe(true);
    });
    // the snapped results are the specs at the snapped values
    const again = DesignModel.load(DEMO, { set: model.setOptions(r.snapped) }).checkSpecs();
    expect(again.map((s) => s.worstMargin)).toEqual(r.after.map((s) => s.worstMargin));
  });
});

describe('snapping many variables (greedy, more than EXHAUSTIVE_SNAP)', () => {
  it('each snapped value is an E24 neighbour of its fitted value, and the specs are re-checked there', () => {
    // seven resistors in series to ground: Zin = their sum (Ohm's law), asked to be 100 ± 2 ohm
    const n = 7;
    const lines = [
      ...Array.from({ length: n }, (_, k) => `let r${k + 1} = ${20 + 3 * k} ohm vary 1 ohm to 100 ohm series E24`),
      ...Array.from({ length: n }, (_, k) => `resistor x${k + 1} a=n${k} b=${k === n - 1 ? 'ground' : `n${k + 1}`} value=r${k + 1}`),
      'port 1 plus=n0 ref=100 ohm',
      'sweep list freqs=1 MHz',
      'spec lo measure=zin_re(1) min=98 ohm over=1 MHz, 1 MHz',
      'spec hi measure=zin_re(1) max=102 ohm over=1 MHz, 1 MHz',
    ];
    const model = DesignModel.fromText(lines.join('\n') + '\n', 'chain.sbx');
    const r = fit(model);
    expect(r.atFitted.every((s) => s.pass)).toBe(true);
    const sum = (xs: ArrayLike<number>) => Array.from(xs).reduce((a, b) => a + b, 0);
    expect(Math.abs(sum(r.fitted) - 100)).toBeLessThanOrEqual(2 + 1e-9);
    r.variables.forEach((v, i) => {
      // IEC 60063 E24 values around the fitted one
      const table = seriesValuesIn(v.lower, v.upper, 'E24');
      const below = Math.max(...table.filter((x) => x <= r.fitted[i]! * (1 + 1e-12)));
      const above = Math.min(...table.filter((x) => x >= r.fitted[i]! * (1 - 1e-12)));
      expect([below, above].some((x) => Math.abs(r.snapped[i]! / x - 1) < 1e-15)).toBe(true);
    });
    // the spec results after snapping are those of the sum of the snapped values (to 1e-9 ohm)
    const zin = sum(r.snapped);
    expect(r.after[0]!.worstMargin).toBeCloseTo(zin - 98, 9);
    expect(r.after[1]!.worstMargin).toBeCloseTo(102 - zin, 9);
  });
});

describe('after snapping', () => {
  it('the variables without a series are fitted again with the snapped ones held', () => {
    // six E24 resistors and one free one in series to ground: Zin = their sum (Ohm's law), asked
    // to be 100 ± 0.01 ohm, which E24 values alone rarely meet; the free one makes up the rest
    const n = 7;
    const lines = [
      ...Array.from({ length: n }, (_, k) => `let r${k + 1} = ${20 + 3 * k} ohm vary 1 ohm to 100 ohm${k < n - 1 ? ' series E24' : ''}`),
      ...Array.from({ length: n }, (_, k) => `resistor x${k + 1} a=n${k} b=${k === n - 1 ? 'ground' : `n${k + 1}`} value=r${k + 1}`),
      'port 1 plus=n0 ref=100 ohm',
      'sweep list freqs=1 MHz',
      'spec lo measure=zin_re(1) min=99.99 ohm over=1 MHz, 1 MHz',
      'spec hi measure=zin_re(1) max=100.01 ohm over=1 MHz, 1 MHz',
    ];
    const r = fit(DesignModel.fromText(lines.join('\n') + '\n', 'chain.sbx'));
    expect(r.pass).toBe(true);
    const six = Array.from(r.snapped.subarray(0, n - 1));
    six.forEach((x, i) => expect(seriesValuesIn(1, 100, 'E24').some((e) => Math.abs(x / e - 1) < 1e-15), `r${i + 1} = ${x}`).toBe(true));
    expect(Math.abs(r.snapped[n - 1]! - (100 - six.reduce((a, b) => a + b, 0)))).toBeLessThanOrEqual(0.01 + 1e-9);
  });
});

describe('values the netlist does not allow', () => {
  it('a trial at a part value of 0 (a range reaching 0) counts as failing every spec, and the fit goes on', () => {
    // a 50 ohm load with a shunt capacitance at 100 MHz: |Γ| ≈ ωCZ0/2 (common practice, small ωCZ0),
    // so a return loss of 40 dB asks for C ≤ 0.02/(ω·50 ohm) = 0.64 pF
    const text = ['let c = 50 pF vary 0 pF to 100 pF', 'capacitor x a=in b=ground value=c', 'resistor r a=in b=ground value=50 ohm', 'port 1 plus=in', 'sweep list freqs=100 MHz', 'spec m measure=rl(1) min=40 dB over=100 MHz, 100 MHz', ''].join('\n');
    const r = fit(DesignModel.fromText(text, 'zero.sbx'));
    expect(r.pass).toBe(true);
    expect(r.snapped[0]).toBeGreaterThan(0);
    expect(r.snapped[0]).toBeLessThanOrEqual(0.02 / (2 * Math.PI * 100e6 * 50));
  });
});

describe('fit options', () => {
  it('--margin pushes every margin beyond the target', () => {
    const model = DesignModel.load(DEMO, { set: ['lser=8 nH', 'cshunt=2 pF'] });
    // the loss through the section cannot drop below that of its parts (about 0.07 dB): 0.05 dB more there
    const r = fit(model, { margin: 1, specMargins: new Map([['channel_loss', 0.05]]), snap: false });
    expect(r.targetMet).toBe(true);
    r.after.forEach((s, k) => expect(s.worstMargin).toBeGreaterThanOrEqual(r.targets[k]!));
    // 1 dB on the dB specs; on the VSWR spec its scale (2 % of the limit 1.1)
    expect(Array.from(r.targets)).toEqual([1, 0.022000000000000002, 0.05, 1]);
  });

  it('several starts are deterministic for a seed, and the first start is the netlist', () => {
    const run = (seed: number) => {
      const model = DesignModel.fromText(lossless([L_CLOSED * 1.9, C_CLOSED * 0.4]), 'lsection.sbx');
      return fit(model, { starts: 3, seed, method: 'simplex', maxEvals: 60 });
    };
    const a = run(7);
    const b = run(7);
    expect(Array.from(a.fitted)).toEqual(Array.from(b.fitted));
    expect(a.evaluations).toBe(b.evaluations);
    expect(a.evaluations).toBeLessThanOrEqual(60);
  });

  it('stops at the largest number of evaluations', () => {
    const model = DesignModel.fromText(lossless([L_CLOSED * 1.25, C_CLOSED * 0.75]), 'lsection.sbx');
    const r = fit(model, { method: 'simplex', maxEvals: 10 });
    expect(r.evaluations).toBeLessThanOrEqual(10);
    expect(r.stop).toBe('max-evals');
    expect(r.pass).toBe(false);
  });

  it('rounds the values it moved to a few significant digits where the specs still pass', () => {
    const model = DesignModel.load('circuits/bandpass-2g4.sbx', { set: ['lres=1.8 nH', 'c1=2.4 pF', 'c2=2.8 pF', 'c3=2.4 pF'] });
    const r = fit(model);
    expect(r.pass).toBe(true);
    r.variables.forEach((v, i) => {
      const text = valueText(r.snapped[i]!, v.unit);
      expect(text.replace(/ .*$/, '').replace('.', '').replace(/^0+/, '').length, text).toBeLessThanOrEqual(6);
      expect(Math.abs(r.snapped[i]! / r.fitted[i]! - 1)).toBeLessThan(5e-4); // 4 digits: half a unit in the 4th digit at most
    });
    // the snapped results are the specs at the snapped values
    expect(DesignModel.load('circuits/bandpass-2g4.sbx', { set: model.setOptions(r.snapped) }).checkSpecs().every((s) => s.pass)).toBe(true);
  });

  it('a netlist whose specs pass at the start is left as it is', () => {
    const model = DesignModel.load('circuits/bandpass-2g4.sbx');
    const start = model.values;
    const r = fit(model);
    expect(r.stop).toBe('target');
    expect(r.evaluations).toBe(1);
    expect(Array.from(r.snapped)).toEqual(Array.from(start));
  });
});

describe('mulberry32 (Tommy Ettinger, public domain)', () => {
  it('is deterministic, in [0, 1), and uniform to within sampling error', () => {
    const a = mulberry32(42);
    const b = mulberry32(42);
    const xs = Array.from({ length: 20000 }, () => a());
    expect(xs.slice(0, 5)).toEqual(Array.from({ length: 5 }, () => b()));
    expect(xs.every((x) => x >= 0 && x < 1)).toBe(true);
    // mean of 20,000 uniform draws: 0.5 ± 3·√(1/12/20000) ≈ ±0.0061 (common practice: three standard errors)
    expect(Math.abs(xs.reduce((s, x) => s + x, 0) / xs.length - 0.5)).toBeLessThan(0.0062);
    expect(mulberry32(1)()).not.toBe(mulberry32(2)());
  });
});

const variable = (v: Partial<Variable>): Variable => ({ name: 'x', value: 1, lower: 1, upper: 10, unit: null, span: { file: 'f', line: 1, column: 1, length: 1 }, ...v });

describe('normalised coordinates and snapping', () => {
  it('a range of a decade or more is a log scale, a narrower one linear', () => {
    const log = variable({ lower: 1e-12, upper: 1e-11, unit: 'F' });
    expect(toUnit(log, Math.sqrt(1e-12 * 1e-11))).toBeCloseTo(0.5, 12); // geometric middle
    expect(fromUnit(log, 0.5)).toBeCloseTo(Math.sqrt(1e-23), 20);
    const lin = variable({ lower: 2, upper: 4 });
    expect(toUnit(lin, 3)).toBe(0.5);
    expect(fromUnit(lin, 1)).toBe(4);
    expect(fromUnit(lin, 0)).toBe(2);
  });

  it('series neighbours are the E12 values around the value, as the netlist reads them', () => {
    // IEC 60063 E12: … 4.7, 5.6 …
    const v = variable({ lower: 1e-12, upper: 1e-11, unit: 'F', series: 'E12' });
    const n = neighbours(v, 5e-12)!;
    expect(n).toEqual([evaluateQuantity('4.7 pF', 'F', 'x'), evaluateQuantity('5.6 pF', 'F', 'x')]);
    expect(neighbours(v, evaluateQuantity('4.7 pF', 'F', 'x'))).toEqual([evaluateQuantity('4.7 pF', 'F', 'x')]);
  });

  it('a bound that is a series value counts as one, though the netlist reads it a bit off the literal', () => {
    const lower = evaluateQuantity('3 nH', 'H', 'x'); // 3.0000000000000004e-9, while the E24 table gives 3e-9
    const v = variable({ lower, upper: evaluateQuantity('12 nH', 'H', 'x'), unit: 'H', series: 'E24' });
    expect(neighbours(v, lower)).toEqual([lower]);
    // IEC 60063 E24: 3.0, 3.3
    expect(neighbours(v, 3.1e-9)).toEqual([lower, evaluateQuantity('3.3 nH', 'H', 'x')]);
  });

  it('step neighbours are counted from the lower bound', () => {
    const v = variable({ lower: 1, upper: 3, step: 0.5 });
    expect(neighbours(v, 1.6)).toEqual([1.5, 2]);
    expect(neighbours(v, 2.9)).toEqual([3, 2.5]);
    expect(neighbours(variable({}), 3)).toBeNull();
  });
});

describe('the penalty', () => {
  const spec = (unit: string, limit: number, figure = 'il(2,1)') => ({ name: 's', figure, bound: 'max' as const, limit: [limit, limit] as [number, number], band: [1, 2] as [number, number], unit, span: { file: 'f', line: 1, column: 1, length: 1 } });
  const result = (margin: number, unit = 'dB', limit = 1, figure = 'il(2,1)'): SpecResult => ({ spec: spec(unit, limit, figure), pass: margin >= 0, points: 3, worstMargin: margin, worstFrequency: 1, worstValue: limit - margin, worstLimit: limit });

  it('is zero with room to spare beyond the target and grows with the violation', () => {
    expect(penaltyOf([result(2 * HINGE + 1e-9)], [0], [1])).toBe(0);
    expect(penaltyOf([result(0)], [0], [1])).toBeGreaterThan(0);
    const p = [-3, -2, -1, 0].map((m) => penaltyOf([result(m)], [0], [1]));
    expect(p[0]).toBeGreaterThan(p[1]!);
    expect(p[1]).toBeGreaterThan(p[2]!);
    expect(p[2]).toBeGreaterThan(p[3]!);
    // in the linear part: (t − δ/2)² with t = −m + 2δ
    expect(p[2]).toBeCloseTo((1 + 2 * HINGE - HINGE / 2) ** 2, 12);
  });

  it('weighs a VSWR violation as the return loss it stands for', () => {
    // VSWR 1.2 against 1.1: return losses 20.83 and 26.44 dB (RL = −20·log10((V−1)/(V+1)), common practice)
    const vswr = result(-0.1, '', 1.1, 'vswr(1)');
    const rl = (v: number) => -20 * Math.log10((v - 1) / (v + 1));
    const t = rl(1.1) - rl(1.2) + 2 * HINGE;
    expect(penaltyOf([vswr], [0], [specScale(vswr.spec)])).toBeCloseTo((t - HINGE / 2) ** 2, 10);
  });

  it('scales: 1 dB, 1°, a tenth of a delay limit, 2 % of a plain limit', () => {
    expect(specScale(spec('dB', 3))).toBe(1);
    expect(specScale(spec('deg', 30))).toBe(1);
    expect(specScale(spec('s', 2e-9))).toBeCloseTo(2e-10, 25);
    expect(specScale(spec('', 1.5))).toBeCloseTo(0.03, 15);
  });
});

describe('--margin texts', () => {
  const model = DesignModel.load('circuits/bandpass-2g4.sbx');
  const specs = model.circuit.specs;

  it('reads a global margin and margins per spec in their units', () => {
    const m = parseMargins(['0.5', 'passband_delay=0.1 ns', 'amplifier_vswr=0.05', 'antenna_match=2 dB'], specs);
    expect(m.margin).toBe(0.5);
    expect(m.specMargins.get('passband_delay')).toBeCloseTo(1e-10, 22);
    expect(m.specMargins.get('amplifier_vswr')).toBe(0.05);
    expect(m.specMargins.get('antenna_match')).toBe(2);
  });

  it('reports every bad text, located, in one error', () => {
    try {
      parseMargins(['1 ns', 'nosuch=1', 'passband_delay=2 dB', '-1', 'antenna_match='], specs);
      throw new Error('expected an InputError');
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      const lines = e.diagnostics.map((d) => d.span!.line);
      expect(lines).toEqual([1, 2, 3, 4, 5]);
      expect(e.diagnostics[1]!.message).toContain('`nosuch` is not a spec');
      expect(e.diagnostics[1]!.help).toContain('passband_loss');
      expect(e.message).toContain('--margin:2:1');
    }
  });
});
