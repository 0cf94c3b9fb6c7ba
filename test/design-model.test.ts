// Fast re-evaluation and sensitivities (issue 15, items 2 and 5): the compiled parameter graph and
// the re-stamped plan must give what elaborating the netlist again gives, and the derivatives must
// equal differences of whole solves and the derivative of a closed form.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DesignModel, VariableError } from '../src/design/model.js';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';
import { evaluateSpecs } from '../src/check/evaluate.js';
import { rankSensitivities } from '../src/design/rank.js';
import { readFileSync } from 'node:fs';

/** S of the netlist elaborated afresh with the model's current values as `--set` options. */
function reference(text: string, model: DesignModel, values: ArrayLike<number> = model.values) {
  return solveSweep(loadNetlist(text, 'm.sbx', { set: model.setOptions(values) }).circuit);
}

function maxDiff(a: Float64Array, b: Float64Array): number {
  let m = 0;
  for (let k = 0; k < a.length; k++) m = Math.max(m, Math.abs(a[k]! - b[k]!));
  return m;
}

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (let k = 0; k < a.length; k++) m = Math.max(m, Math.abs(a[k]!));
  return m;
}

/**
 * A random two-port of R, L, C, a line, a transconductance and a shunt resistor, every value a
 * design variable (or a parameter computed from one), between ports on `in` and `out`.
 */
const circuitArb = fc.record({
  r: fc.double({ min: 5, max: 500, noNaN: true }),
  l: fc.double({ min: 1, max: 50, noNaN: true }),
  c: fc.double({ min: 0.5, max: 20, noNaN: true }),
  z: fc.double({ min: 20, max: 120, noNaN: true }),
  gm: fc.double({ min: 1, max: 40, noNaN: true }),
  rs: fc.double({ min: 50, max: 1000, noNaN: true }),
  active: fc.boolean(),
});

function randomNetlist(p: { r: number; l: number; c: number; z: number; gm: number; rs: number; active: boolean }): string {
  return [
    `let r = ${p.r} ohm vary 1 ohm to 1 kohm`,
    `let l = ${p.l} nH vary 0.5 nH to 100 nH`,
    `let c = ${p.c} pF vary 0.1 pF to 50 pF`,
    `let z = ${p.z} ohm vary 10 ohm to 200 ohm`,
    `let gm = ${p.gm} mS vary 0.5 mS to 50 mS`,
    `let rs = ${p.rs} ohm vary 10 ohm to 2 kohm`,
    'let half = c/2',
    'resistor r1 a=in b=a value=r',
    'inductor l1 a=a b=b value=l q=40 at 1 GHz',
    'capacitor c1 a=b b=ground value=half',
    'capacitor c2 a=b b=ground value=half esr=0.2 ohm',
    'line t1 a=b b=d z0=z theta=60 deg at 1 GHz',
    p.active ? 'transconductance g1 p=out n=ground cp=d cn=ground gm=gm' : 'resistor r2 a=d b=out value=2*r',
    'resistor r3 a=out b=ground value=rs',
    'resistor r4 a=d b=ground value=1 kohm',
    'port 1 plus=in',
    'port 2 plus=out',
    'sweep linear start=200 MHz stop=2 GHz points=7',
    'spec pass_loss measure=il(2,1) max=40 dB over=500 MHz, 1 GHz',
    'spec in_match measure=rl(1) min=1 dB over=800 MHz, 1.2 GHz',
  ].join('\n') + '\n';
}

/** Random values inside each variable's range (a fraction per variable, 0…1). */
const fractionsArb = fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 6, maxLength: 6 });

describe('fast re-evaluation', () => {
  it('gives what elaborating the netlist again gives, on random circuits (fast-check)', () => {
    fc.assert(
      fc.property(circuitArb, fractionsArb, fractionsArb, (p, f1, f2) => {
        const text = randomNetlist(p);
        const model = DesignModel.fromText(text, 'm.sbx');
        expect(model.followsVariables).toBe(true);
        for (const f of [f1, f2]) {
          // geometric inside each range: the ranges span decades
          model.setValues(model.variables.map((v, i) => v.lower * (v.upper / v.lower) ** f[i]!));
          const fast = model.solve();
          const ref = reference(text, model);
          // same pattern and ordering as a fresh plan; only the pivot reference may differ:
          // agreement to rounding (1e-12 of the largest |S|, common practice for double precision)
          expect(maxDiff(fast.values, ref.values)).toBeLessThanOrEqual(1e-12 * Math.max(1, maxAbs(ref.values)));
          const specs = model.checkSpecs();
          const refSpecs = evaluateSpecs(loadNetlist(text, 'm.sbx', { set: model.setOptions() }).circuit.specs, ref);
          specs.forEach((r, s) => expect(Math.abs(r.worstMargin - refSpecs[s]!.worstMargin)).toBeLessThanOrEqual(1e-9));
        }
      }),
      { numRuns: 25, seed: 15 },
    );
  });

  it('solves only the points the specs look at, with the same spec results as the whole sweep (group delay included)', () => {
    const text = readFileSync('circuits/bandpass-2g4.sbx', 'utf8');
    const model = DesignModel.fromText(text, 'circuits/bandpass-2g4.sbx');
    expect(model.variables.map((v) => v.name)).toContain('lres');
    model.setValues({ lres: 1.45e-9 });
    const whole = evaluateSpecs(model.circuit.specs, model.solve());
    const fast = model.checkSpecs();
    expect(fast.map((r) => r.spec.figure)).toContain('gd(S21)');
    // the points inside the bands and their neighbours give the same worst margins: the same S to
    // the bit; a group delay to rounding (its unwrapped phase starts from another point, so the
    // multiples of 2π it carries differ and round differently: 1e-12 relative)
    fast.forEach((r, s) => {
      expect(Math.abs(r.worstMargin - whole[s]!.worstMargin)).toBeLessThanOrEqual(1e-12 * Math.abs(whole[s]!.worstValue));
      expect(r.worstFrequency).toBe(whole[s]!.worstFrequency);
      if (!r.spec.figure.startsWith('gd')) expect(r.worstMargin).toBe(whole[s]!.worstMargin);
    });
  });

  it('near a match (a reflection refined in extended precision) a new value is not answered from the old values', () => {
    // An ideal L-section from 50 to 75 ohm at 915 MHz (common practice: Q = √(75/50 − 1),
    // L = Q·50/ω, C = Q/(75·ω)): around the closed form S11 is tiny, which the solver refines in
    // double-double; the refinement must use the matrix of the new values.
    const w = 2 * Math.PI * 915e6;
    const q = Math.sqrt(75 / 50 - 1);
    const [l0, c0] = [(q * 50) / w, q / (75 * w)];
    const text = [
      `let l = ${l0} H vary ${l0 / 2} H to ${2 * l0} H`,
      `let c = ${c0} F vary ${c0 / 2} F to ${2 * c0} F`,
      'inductor l1 a=in b=out value=l',
      'capacitor c1 a=out b=ground value=c',
      'port 1 plus=in ref=50 ohm',
      'port 2 plus=out ref=75 ohm',
      'sweep linear start=905 MHz stop=925 MHz points=5',
      'spec zin measure=zin_re(1) min=49.9999 ohm over=915 MHz, 915 MHz',
    ].join('\n');
    const model = DesignModel.fromText(text, 'm.sbx');
    for (const [fl, fc] of [[1, 1], [1 + 3e-6, 1 - 2e-6], [1 - 1e-5, 1], [1, 1 + 1e-7], [1, 1]]) {
      model.setValues([l0 * fl!, c0 * fc!]);
      const zin = model.checkSpecs()[0]!.worstValue;
      const ref = evaluateSpecs(loadNetlist(text, 'm.sbx', { set: model.setOptions() }).circuit.specs, reference(text, model))[0]!.worstValue;
      expect(Math.abs(zin - ref)).toBeLessThanOrEqual(1e-12 * 50);
      expect(maxDiff(model.solve().values, reference(text, model).values)).toBeLessThanOrEqual(1e-15);
    }
  });

  it('builds the plan afresh where new values change its pattern (an inductor that needs a branch current)', () => {
    // at 1 MHz an ideal inductor below 1e-3 ohm / (2π·1 MHz) ≈ 0.16 nH is stamped through a branch current
    const text = ['let l = 10 nH vary 0.01 nH to 20 nH', 'inductor l1 a=in b=out value=l', 'resistor r1 a=out b=ground value=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep linear start=1 MHz stop=1 GHz points=5'].join('\n');
    const model = DesignModel.fromText(text, 'm.sbx');
    for (const l of [0.02e-9, 15e-9, 0.05e-9]) {
      model.setValues({ l });
      expect(maxDiff(model.solve().values, reference(text, model).values)).toBeLessThanOrEqual(1e-13);
    }
  });

  it('refuses a value outside its range, and a derived value an element cannot take, naming them', () => {
    const text = ['let c = 2 pF vary 1 pF to 5 pF', 'let cpad = 3 pF - c', 'capacitor c1 a=in b=ground value=cpad', 'resistor r1 a=in b=out value=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'].join('\n');
    const model = DesignModel.fromText(text, 'm.sbx');
    expect(() => model.setValues({ c: 6e-12 })).toThrow(VariableError);
    expect(() => model.setValues({ nope: 1 })).toThrow(/not a design variable/);
    model.setValues({ c: 4e-12 });
    // elaboration's message, located at the expression the value comes from (`cpad` on line 3)
    let err: unknown;
    try {
      model.solve();
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    const d = (err as InputError).diagnostics[0]!;
    expect(d.message).toBe('`value` must be above zero');
    expect(d.span).toMatchObject({ line: 3, column: 34, length: 4 });
    expect(d.help).toContain('c = 4e-12 F');
    // after the refusal, values that work solve as a fresh elaboration does
    model.setValues({ c: 2.5e-12 });
    expect(maxDiff(model.solve().values, reference(text, model).values)).toBeLessThanOrEqual(1e-15);
  });

  it('elaborates again where a variable reaches a port reference (a number outside the elements)', () => {
    const text = ['let zl = 75 ohm vary 50 ohm to 100 ohm', 'resistor r1 a=in b=out value=10 ohm', 'port 1 plus=in', 'port 2 plus=out ref=zl', 'sweep list freqs=1 GHz'].join('\n');
    const model = DesignModel.fromText(text, 'm.sbx');
    expect(model.followsVariables).toBe(false);
    model.setValues({ zl: 60 });
    expect(maxDiff(model.solve().values, reference(text, model).values)).toBe(0);
  });
});

describe('sensitivities', () => {
  it('dS/dx equals fourth-order central differences of whole solves to 1e-6 relative (random RLC, line and transconductance circuits)', () => {
    fc.assert(
      fc.property(circuitArb, (p) => {
        const text = randomNetlist(p);
        const model = DesignModel.fromText(text, 'm.sbx');
        const { network, derivatives } = model.derivatives();
        const x0 = model.values;
        model.variables.forEach((v, i) => {
          // difference of re-elaborated solves (independent of the graph, the plan re-stamping and the direct method)
          const h = 1e-4 * x0[i]!;
          const at = (d: number) => {
            const x = Float64Array.from(x0);
            x[i] = x0[i]! + d;
            return reference(text, model, x).values;
          };
          const [a1, b1, a2, b2] = [at(h), at(-h), at(2 * h), at(-2 * h)];
          const fd = a1.map((_, k) => (8 * (a1[k]! - b1[k]!) - (a2[k]! - b2[k]!)) / (12 * h));
          const scale = Math.max(maxAbs(fd), 1e-300);
          expect(maxDiff(derivatives[i]!, fd) / scale, `d/d${v.name}`).toBeLessThanOrEqual(1e-6);
        });
        expect(network.values.length).toBe(derivatives[0]!.length);
      }),
      { numRuns: 10, seed: 5 },
    );
  });

  it('on a Π pad, the margin derivatives equal the derivative of the closed-form attenuation', () => {
    // Symmetric Π of shunt R1, series R2, shunt R1 between Z0 terminations. ABCD (Pozar, Microwave
    // Engineering, table 4.1: series impedance and shunt admittance): A = D = 1 + R2/R1, B = R2,
    // C = (2 + R2/R1)/R1; S21 = 2/(A + B/Z0 + C·Z0 + D) (Pozar, table 4.2), all real here, so
    // IL = 20·log10(N/2) with N = 2 + 2R2/R1 + R2/Z0 + Z0(2 + R2/R1)/R1 and
    // dIL/dR = (20/ln 10)·(dN/dR)/N.
    const z0 = 50;
    const text = [
      'let rsh = 96.2 ohm vary 50 ohm to 200 ohm',
      'let rse = 71.2 ohm vary 20 ohm to 150 ohm',
      'resistor ra a=in b=ground value=rsh',
      'resistor rb a=in b=out value=rse',
      'resistor rc a=out b=ground value=rsh',
      'port 1 plus=in',
      'port 2 plus=out',
      'sweep list freqs=100 MHz, 200 MHz',
      'spec atten measure=il(2,1) max=12 dB over=100 MHz, 200 MHz',
      'spec floor measure=il(2,1) min=8 dB over=100 MHz, 200 MHz',
    ].join('\n');
    const model = DesignModel.fromText(text, 'pad.sbx');
    const g = model.marginGradient();
    const [r1, r2] = [96.2, 71.2];
    const n = 2 + (2 * r2) / r1 + r2 / z0 + (z0 * (2 + r2 / r1)) / r1;
    const il = 20 * Math.log10(n / 2);
    const dNdR1 = (-2 * r2) / r1 ** 2 - (2 * z0) / r1 ** 2 - (2 * z0 * r2) / r1 ** 3;
    const dNdR2 = 2 / r1 + 1 / z0 + z0 / r1 ** 2;
    const k0 = 20 / Math.LN10;
    const k = k0;
    expect(g.results[0]!.worstValue).toBeCloseTo(il, 10);
    // max spec: margin = 12 − IL; min spec: margin = IL − 8
    const want = [-k * dNdR1 / n, -k * dNdR2 / n, k * dNdR1 / n, k * dNdR2 / n];
    want.forEach((w, q) => expect(Math.abs(g.gradient[q]! - w)).toBeLessThanOrEqual(1e-8 * Math.abs(w)));
    // the figure itself over the sweep: d(il)/d(rse) at every point
    const fd = model.figureDerivatives('il(2,1)');
    for (let k = 0; k < fd.frequencies.length; k++) {
      expect(Math.abs(fd.values[k]! - il)).toBeLessThanOrEqual(1e-10);
      expect(Math.abs(fd.derivatives[1]![k]! - (k0 * dNdR2) / n)).toBeLessThanOrEqual(1e-8 * Math.abs((k0 * dNdR2) / n));
    }
    // ranked per 1 % change: the series resistor moves the attenuation more than the shunt ones
    const ranked = rankSensitivities(g, model.variables, model.values);
    expect(ranked[0]!.effects.map((e) => e.variable)).toEqual([Math.abs(dNdR2 * r2) > Math.abs(dNdR1 * r1) ? 'rse' : 'rsh', Math.abs(dNdR2 * r2) > Math.abs(dNdR1 * r1) ? 'rsh' : 'rse']);
    expect(ranked[0]!.effects[0]!.perPercent).toBeCloseTo(0.01 * (ranked[0]!.effects[0]!.variable === 'rse' ? -k * dNdR2 * r2 : -k * dNdR1 * r1) / n, 10);
  });
});
