// Writing fitted values back into netlist text (src/design/write-back.ts): only the value text of
// each variable's `let` line changes; every other byte stays; the edited netlist loads with the
// new values exactly.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { editVariableValues, netlistValue, valueRange, valueText, WriteBackError } from '../src/design/write-back.js';
import { evaluateQuantity, loadNetlist } from '../src/load.js';

const NETLIST = [
  '# a match',
  'let f0 = 915 MHz',
  'let lser   = 8 nH   vary 3 nH to 12 nH series E24      # the series part',
  'let cshunt = 1/(2*pi*f0*106 ohm) vary 0.5 pF to 4.7 pF  # a computed start',
  'let rr = 2.2 kohm vary 1 kohm to 10 kohm step 100 ohm',
  'let att = 6\tvary 1 to 20',
  'inductor  lser   a=radio b=feed   value=lser',
  'capacitor cshunt a=feed  b=ground value=cshunt',
  'resistor  rr a=feed b=ground value=rr',
  'resistor  ra a=radio b=ground value=att*1 kohm',
  'port 1 plus=radio',
  'port 2 plus=feed ref=75 ohm',
  'sweep list freqs=f0',
  '',
].join('\n');

/** The texts as a source map, the variables as the netlist reads them. */
function loaded(text: string, file = 'm.sbx', files: Record<string, string> = {}) {
  const sources = new Map<string, string>([[file, text], ...Object.entries(files)]);
  const { circuit } = loadNetlist(text, file, { readFile: (p) => files[p] ?? (() => { throw new Error(`no ${p}`); })() });
  return { sources, variables: circuit.variables, readFile: (p: string) => files[p]! };
}

/** Every byte outside the value ranges equal: the texts with each value range cut out are equal. */
function outside(text: string, ranges: [number, number][]): string {
  let out = '';
  let at = 0;
  for (const [a, b] of [...ranges].sort((x, y) => x[0] - y[0])) {
    out += text.slice(at, a) + '\u0000';
    at = b;
  }
  return out + text.slice(at);
}

describe('editVariableValues', () => {
  it('round trip: the edited text loads with the new values, and only the value texts changed', () => {
    const { sources, variables } = loaded(NETLIST);
    // series and step values as the fit gives them: the double the netlist holds for `6.8 nH`
    const values = [6.8e-9, 1.7e-12, 3300, 7.5].map((x, i) => netlistValue(x, variables[i]!.unit));
    expect(values[0]).not.toBe(6.8e-9); // 6.8 × 1e-9 in the netlist's arithmetic is one bit off the literal
    const edited = editVariableValues('m.sbx', sources, variables, values).get('m.sbx')!;
    const again = loadNetlist(edited, 'm.sbx').circuit.variables;
    expect(again.map((v) => v.value)).toEqual(values);
    // the series value written as the netlist writes it: `6.8 nH`
    expect(edited).toContain('let lser   = 6.8 nH   vary 3 nH to 12 nH series E24      # the series part');
    expect(edited).toContain('let cshunt = 1.7 pF vary 0.5 pF to 4.7 pF  # a computed start');
    expect(edited).toContain('let rr = 3.3 kohm vary 1 kohm to 10 kohm step 100 ohm');
    expect(edited).toContain('let att = 7.5\tvary 1 to 20');
    const before = variables.map((v) => valueRange(NETLIST, v));
    const after = again.map((v) => valueRange(edited, v));
    expect(outside(edited, after)).toBe(outside(NETLIST, before));
  });

  it('writes the exact double: a fitted value reads back bit for bit', () => {
    const { sources, variables } = loaded(NETLIST);
    const values = [6.304804161340096e-9, 1.723651554491814e-12, 2345.678901234, 7.123456789];
    const edited = editVariableValues('m.sbx', sources, variables, values).get('m.sbx')!;
    expect(loadNetlist(edited, 'm.sbx').circuit.variables.map((v) => v.value)).toEqual(values);
  });

  it('leaves a variable whose value does not change as it is written (its expression stays)', () => {
    const { sources, variables } = loaded(NETLIST);
    const values = variables.map((v) => v.value);
    values[0] = 1e-8;
    const edited = editVariableValues('m.sbx', sources, variables, values).get('m.sbx')!;
    expect(edited).toContain('let cshunt = 1/(2*pi*f0*106 ohm) vary');
    expect(edited).toContain('let lser   = 10 nH   vary');
  });

  it('keeps CRLF line ends and every other byte', () => {
    const crlf = NETLIST.replace(/\n/g, '\r\n');
    const { sources, variables } = loaded(crlf);
    const values = [5.6e-9, 2.2e-12, 1000, 1];
    const edited = editVariableValues('m.sbx', sources, variables, values).get('m.sbx')!;
    expect(edited.split('\r\n').length).toBe(crlf.split('\r\n').length);
    expect(edited.replace(/\r\n/g, '').includes('\n')).toBe(false);
    const again = loadNetlist(edited, 'm.sbx').circuit.variables;
    expect(outside(edited, again.map((v) => valueRange(edited, v)))).toBe(outside(crlf, variables.map((v) => valueRange(crlf, v))));
  });

  it('edits a variable defined in an included file in that file', () => {
    const part = 'let cpart = 2 pF vary 1 pF to 4 pF   # in the part file\n';
    const main = 'include "part.sbx"\ncapacitor c a=in b=ground value=cpart\nport 1 plus=in\nsweep list freqs=1 GHz\n';
    const { sources, variables, readFile } = loaded(main, 'main.sbx', { 'part.sbx': part });
    const out = editVariableValues('main.sbx', sources, variables, [netlistValue(3.3e-12, 'F')], readFile);
    expect([...out.keys()]).toEqual(['part.sbx']);
    expect(out.get('part.sbx')).toBe('let cpart = 3.3 pF vary 1 pF to 4 pF   # in the part file\n');
  });

  it('refuses a value continued over lines, with a plain message', () => {
    const text = 'let c = 2 pF \\\n  vary 1 pF to 4 pF\ncapacitor c a=in b=ground value=c\nport 1 plus=in\nsweep list freqs=1 GHz\n';
    const { sources, variables } = loaded(text);
    expect(() => editVariableValues('m.sbx', sources, variables, [3e-12])).toThrow(WriteBackError);
    expect(() => editVariableValues('m.sbx', sources, variables, [3e-12])).toThrow(/m\.sbx:1: the value of `c` and its `vary` are not on one line/);
  });
});

describe('valueText', () => {
  it('writes engineering prefixes where they read back exactly', () => {
    expect(valueText(evaluateQuantity('6.8 nH', 'H', 'x'), 'H')).toBe('6.8 nH');
    expect(valueText(evaluateQuantity('1.52 pF', 'F', 'x'), 'F')).toBe('1.52 pF');
    expect(valueText(2200, 'ohm')).toBe('2.2 kohm');
    expect(valueText(0.5, null)).toBe('0.5');
  });

  it('reads back to the same double for any value and unit (fast-check, seed 15)', () => {
    const units = ['F', 'H', 'ohm', 'Hz', 'm', null] as const;
    fc.assert(
      fc.property(fc.double({ min: 1e-16, max: 1e13, noNaN: true }), fc.constantFrom(...units), fc.boolean(), (x, unit, negative) => {
        const v = negative ? -x : x;
        expect(evaluateQuantity(valueText(v, unit), unit, 'x')).toBe(v);
      }),
      { seed: 15, numRuns: 300 },
    );
  });
});
