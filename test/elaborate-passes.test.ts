// Elaboration as a row of passes (issue 15, item 7): what crosses from one pass to the next and
// the order the passes report in. The expected numbers are the netlist's own arithmetic (each
// written beside its check); the codes and their order are this project's own.
import { describe, expect, it } from 'vitest';
import { InputError, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { loadNetlist, type LoadOptions } from '../src/load.js';

function diagnostics(text: string, options: LoadOptions = {}): Diagnostic[] {
  try {
    loadNetlist(text, 'p.sbx', options);
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics;
    throw e;
  }
  throw new Error('expected an InputError');
}

/** |a − b| ≤ rel·|b| */
function near(a: number, b: number, rel: number): boolean {
  return Math.abs(a - b) <= rel * Math.abs(b);
}

const VARIED = [
  'let c = 2 pF vary 1 pF to 4 pF',
  'let f = 500 MHz vary 100 MHz to 900 MHz',
  'let z = 50 ohm',
  'let l = 3*c*(1 nH)/(1 pF)',
  'block tee terminals=a, b cb=c',
  '  capacitor cx a=a b=ground value=cb',
  '  resistor rx a=a b=b value=z',
  'end',
  'resistor r1 a=in b=mid value=z',
  'capacitor c1 a=mid b=ground value=c/2',
  'inductor l1 a=mid b=out value=l q=40 at f',
  'tee t1 a=out b=ground cb=c*2',
  'tee t2 a=out b=ground',
  'port 1 plus=in',
  'port 2 plus=out ref=z*c/(2 pF)',
  'sweep linear start=1 MHz stop=2*f points=3',
  'spec s1 measure=rl(1) min=10 dB over=f/2, f',
].join('\n');

describe('elaboration passes: the parameter graph hooks', () => {
  const { circuit } = loadNetlist(VARIED, 'p.sbx');
  const names = circuit.elements.map((e) => e.name);

  it('binds the element numbers that depend on variables, inside block instances too, by element index', () => {
    expect(names).toEqual(['r1', 'c1', 'l1', 't1.cx', 't1.rx', 't2.cx', 't2.rx']);
    expect(circuit.variables.map((v) => v.name)).toEqual(['c', 'f']);
    expect(circuit.bindings.map((b) => [names[b.element], b.target, b.key, b.value.deps, b.span.line])).toEqual([
      ['c1', 'prop', 'value', [0], 10],
      ['l1', 'prop', 'value', [0], 11],
      ['l1', 'at', 'q', [1], 11],
      ['t1.cx', 'prop', 'value', [0], 6], // the instance's parameter cb = c*2, given at the instance
      ['t2.cx', 'prop', 'value', [0], 6], // the block's default cb = c, evaluated at the top level
    ]);
  });

  it('compiles each bound number to the value elaboration gave it, and follows new variable values', () => {
    const nominal = new Float64Array(circuit.variables.map((v) => v.value));
    for (const b of circuit.bindings) {
      const el = circuit.elements[b.element]!;
      const elaborated = b.target === 'prop' ? el.props[b.key]! : el.at[b.key]!;
      expect(near(b.value.fn(nominal), elaborated, 1e-12)).toBe(true);
    }
    // c = 3 pF, f = 700 MHz: the netlist's arithmetic gives c/2, 3·c·1e3 (nH/pF), f, 2·c and c
    const x = new Float64Array([3e-12, 7e8]);
    const expected = [1.5e-12, 9e-9, 7e8, 6e-12, 3e-12];
    circuit.bindings.forEach((b, i) => expect(near(b.value.fn(x), expected[i]!, 1e-12)).toBe(true));
  });

  it('records numbers outside the elements that depend on a variable, in pass order: port, sweep, spec', () => {
    expect(circuit.unfollowed.map((u) => [u.what, u.span.line, u.reason])).toEqual([
      ['`ref`', 15, 'only the numbers of elements follow the variables'],
      ['`stop`', 16, 'only the numbers of elements follow the variables'],
      ['`over`', 17, 'only the numbers of elements follow the variables'],
      ['`over`', 17, 'only the numbers of elements follow the variables'],
    ]);
  });

  it('compiles nothing without variables', () => {
    const plain = loadNetlist(VARIED.replace(' vary 1 pF to 4 pF', '').replace(' vary 100 MHz to 900 MHz', ''), 'p.sbx').circuit;
    expect(plain.variables).toEqual([]);
    expect(plain.bindings).toEqual([]);
    expect(plain.unfollowed).toEqual([]);
  });
});

describe('elaboration passes: the order of their findings', () => {
  it('reports the sweep, then the ports, then the closing checks', () => {
    const found = diagnostics('let a = 1 ohm\nresistor r a=x b=ground value=a\n', { set: ['zz=2'] });
    expect(found.map((d) => d.code)).toEqual(['no-sweep', 'no-ports', 'unknown-parameter']);
  });

  it('warns about connections, then unused parameters, then unused blocks', () => {
    const text = ['let unused = 1', 'block spare terminals=a', '  resistor r a=a b=ground value=1 ohm', 'end', 'resistor r1 a=in b=ground value=50 ohm', 'resistor r2 a=in b=stub value=1 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz'].join('\n');
    const { warnings } = loadNetlist(text, 'p.sbx');
    expect(warnings.map((w) => [w.code, w.span?.line])).toEqual([
      ['dangling-node', 6],
      ['unused-parameter', 1],
      ['unused-block', 2],
    ]);
  });
});
