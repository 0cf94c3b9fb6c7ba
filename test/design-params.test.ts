// The compiled parameter graph (issue 15, item 2): parameters that depend on a design variable
// follow it. The check is elaboration itself — mathjs evaluating the same expressions with units
// (a general-purpose library) at the same values through `--set` — against the plain-number
// closures the model evaluates.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DesignModel } from '../src/design/model.js';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { ElementValueError } from '../src/params/graph.js';
import { loadNetlist } from '../src/load.js';

/** Plain-number expressions over the variables x and y (0.5…2) and a parameter k = x·y. */
const leaf = fc.oneof(fc.constantFrom('x', 'y', 'k', 'pi', '2', '0.5', '3'), fc.double({ min: 0.1, max: 10, noNaN: true }).map((v) => v.toPrecision(4)));
const { expr } = fc.letrec<{ expr: string }>((tie) => ({
  expr: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    leaf,
    fc.tuple(tie('expr'), fc.constantFrom('+', '-', '*', '/'), tie('expr')).map(([a, op, b]) => `(${a} ${op} ${b})`),
    fc.tuple(tie('expr'), fc.constantFrom('2', '3', '0.5', '-1')).map(([a, n]) => `(${a})^${n}`),
    fc.tuple(fc.constantFrom('sqrt', 'abs', 'exp', 'ln', 'log10', 'sin', 'cos', 'atan', 'round'), tie('expr')).map(([f, a]) => `${f}(${a})`),
    fc.tuple(fc.constantFrom('min', 'max'), tie('expr'), tie('expr')).map(([f, a, b]) => `${f}(${a}, ${b})`),
    tie('expr').map((a) => `-${a}`),
  ),
}));

function netlist(e: string): string {
  return [
    'let x = 1.2 vary 0.5 to 2',
    'let y = 0.8 vary 0.5 to 2',
    'let k = x*y',
    `let g = ${e}`,
    // a voltage gain takes any plain number: the expression's value reaches an element unchanged
    'voltage_gain e1 p=out cp=in gain=g',
    'resistor r1 a=in b=ground value=50 ohm',
    'resistor r2 a=out b=ground value=50 ohm',
    'port 1 plus=in',
    'port 2 plus=out',
    'sweep list freqs=1 GHz',
  ].join('\n');
}

describe('compiled parameters', () => {
  it('plain-number expressions give what mathjs gives at the same values (fast-check)', () => {
    let compared = 0;
    fc.assert(
      fc.property(expr, fc.double({ min: 0.5, max: 2, noNaN: true }), fc.double({ min: 0.5, max: 2, noNaN: true }), (e, x, y) => {
        const text = netlist(e);
        let model: DesignModel;
        try {
          model = DesignModel.fromText(text, 'p.sbx');
        } catch (err) {
          // an expression mathjs refuses at the netlist's own values (not finite, complex): not this test's subject
          if (err instanceof InputError) return;
          throw err;
        }
        model.setValues([x, y]);
        let reference: number | undefined;
        try {
          reference = loadNetlist(text, 'p.sbx', { set: model.setOptions() }).circuit.elements[0]!.props.gain;
        } catch (err) {
          if (!(err instanceof InputError)) throw err;
        }
        let fast: number | undefined;
        try {
          fast = model.currentCircuit().elements[0]!.props.gain;
        } catch (err) {
          if (!(err instanceof ElementValueError) && !(err instanceof InputError)) throw err;
        }
        // where mathjs has no real, finite value the model refuses the value too
        if (reference === undefined) {
          expect(fast === undefined || !Number.isFinite(fast)).toBe(true);
          return;
        }
        expect(fast).toBeDefined();
        compared++;
        // the same operations in the same order on the same SI numbers: equal to rounding (mathjs
        // may take a function through another formula: 1e-12 relative, common practice)
        expect(Math.abs(fast! - reference)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(reference)));
      }),
      { numRuns: 300, seed: 60063 },
    );
    expect(compared).toBeGreaterThan(100);
  });

  it('follows quantities with units through SI numbers (prefixes, compound units, angles, block parameters)', () => {
    const text = [
      'let c = 2.2 pF vary 1 pF to 10 pF',
      'let l = 12 nH vary 1 nH to 50 nH',
      'let f0 = 1/(2*pi*sqrt(l*c))',
      'let loss = 0.5 dB/m * (1 + c/10 pF)',
      'let theta = 30 deg + 10 deg * (l/12 nH)',
      'block tank terminals=a, b cval=1 pF',
      '  capacitor cb a=a b=b value=cval',
      'end',
      'tank t1 a=in b=ground cval=c*2 + 0.5 pF',
      'inductor l1 a=in b=out value=l q=40 at f0',
      'let len = 10 mm * (l/12 nH) + 20 mil',
      'line t2 a=out b=mid z0=50 ohm length=len eeff=2 alpha_c=loss at f0',
      'line t3 a=mid b=end z0=50 ohm theta=theta at 1 GHz',
      'resistor r2 a=end b=ground value=75 ohm',
      'resistor r1 a=mid b=ground value=50 ohm',
      'port 1 plus=in',
      'port 2 plus=mid',
      'sweep list freqs=1 GHz',
    ].join('\n');
    const model = DesignModel.fromText(text, 'u.sbx');
    expect(model.followsVariables).toBe(true);
    for (const [c, l] of [
      [4.7e-12, 33e-9],
      [1e-12, 1e-9],
      [10e-12, 50e-9],
    ] as const) {
      model.setValues({ c, l });
      const fast = model.currentCircuit().elements;
      const ref = loadNetlist(text, 'u.sbx', { set: model.setOptions() }).circuit.elements;
      expect(fast.length).toBe(ref.length);
      fast.forEach((el, i) => {
        for (const [key, v] of Object.entries(ref[i]!.props)) expect(Math.abs(el.props[key]! - v), `${el.name}.${key}`).toBeLessThanOrEqual(1e-12 * Math.abs(v));
        for (const [key, v] of Object.entries(ref[i]!.at)) expect(Math.abs(el.at[key]! - v), `${el.name} at ${key}`).toBeLessThanOrEqual(1e-12 * Math.abs(v));
      });
    }
  });
});
