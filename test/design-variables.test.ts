// Design variables (issue 15, item 1): `let name = value vary LOW to HIGH [series En | step S]`,
// their checks (each a located error, all of a file in one run), `--set` against the range, and
// the preferred-number series of IEC 60063.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNetlist } from '../src/ast/visitor.js';
import { DiagnosticBag, InputError, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { loadNetlist, type LoadOptions } from '../src/load.js';
import { SERIES_NAMES, isSeriesName, nearestInSeries, seriesTable, seriesValuesIn } from '../src/design/series.js';

const CIRCUIT = ['resistor r a=in b=out value=50 ohm', 'capacitor c1 a=out b=ground value=cshunt', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'];
const net = (...lets: string[]) => [...lets, ...CIRCUIT].join('\n') + '\n';

function failing(text: string, options: LoadOptions = {}): Diagnostic[] {
  try {
    loadNetlist(text, 'v.sbx', options);
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error');
    throw e;
  }
  throw new Error('expected an InputError');
}

/** The text a span points at, on its line of `text`. */
function at(text: string, d: Diagnostic): string {
  const line = text.split('\n')[d.span!.line - 1]!;
  return line.slice(d.span!.column - 1, d.span!.column - 1 + d.span!.length);
}

describe('parsing `vary`', () => {
  it('reads the three forms into the argument of a `let`', () => {
    const bag = new DiagnosticBag();
    const ast = parseNetlist(
      ['let cshunt = 3.3 pF vary 1 pF to 10 pF series E24', 'let lser   = 12 nH  vary 5 nH to 20 nH step 0.5 nH', 'let att = 6 vary 1 to 20'].join('\n'),
      'p.sbx',
      bag,
    );
    expect(bag.items).toEqual([]);
    const [c, l, a] = ast.statements.map((s) => s.args[0]!);
    if (c!.kind !== 'key' || l!.kind !== 'key' || a!.kind !== 'key') throw new Error('expected key arguments');
    expect(c.values[0]).toMatchObject({ kind: 'number', value: 3.3, unit: 'pF' });
    expect(c.range!.lower).toMatchObject({ kind: 'number', value: 1, unit: 'pF' });
    expect(c.range!.upper).toMatchObject({ kind: 'number', value: 10, unit: 'pF' });
    expect(c.range!.series).toMatchObject({ name: 'E24', span: { line: 1, column: 47, length: 3 } });
    expect(c.range!.keywordSpan).toMatchObject({ line: 1, column: 21, length: 4 });
    expect(c.span).toMatchObject({ column: 5, length: 45 }); // `cshunt` through `E24`
    expect(l.range!.step).toMatchObject({ kind: 'number', value: 0.5, unit: 'nH' });
    expect(l.range!.series).toBeUndefined();
    expect(a.values[0]).toMatchObject({ kind: 'number', value: 6, unit: undefined });
    expect(a.range!.lower).toMatchObject({ value: 1, unit: undefined });
    expect(a.range!.upper).toMatchObject({ value: 20, unit: undefined });
  });

  it('takes expressions as bounds and keeps vary, to, series and step usable as names', () => {
    const bag = new DiagnosticBag();
    const ast = parseNetlist(['let to = 2', 'let step = 3', 'let series = to*step', 'let vary = 1', 'let x = 2*to vary to-1 to (to+series)*2 step step/2'].join('\n'), 'p.sbx', bag);
    expect(bag.items).toEqual([]);
    const x = ast.statements[4]!.args[0]!;
    if (x.kind !== 'key') throw new Error('expected a key argument');
    expect(x.range!.lower).toMatchObject({ kind: 'chain', ops: ['-'] });
    expect(x.range!.upper).toMatchObject({ kind: 'chain', ops: ['*'] });
    expect(x.range!.step).toMatchObject({ kind: 'chain', ops: ['/'] });
  });

  it('does not take a range word for the unit of a number', () => {
    const bag = new DiagnosticBag();
    parseNetlist('let x = 3 to 5', 'p.sbx', bag);
    expect(bag.items.length).toBe(1);
    expect(bag.items[0]!.message).toMatch(/unexpected `to`/);
    expect(bag.items[0]!.help).toMatch(/vary LOW to HIGH/);
  });

  it('gives the same AST on the fast path and in the grammar for lines with ranges (fast-check, fixed seed)', () => {
    const v = fc.constantFrom('1', '4.7', '0', '2 pF', '10 nH', 'x', 'a*2', 'to', 'step');
    const tail = fc.constantFrom('', ' series E24', ' series e12', ' step 1', ' step 0.5 nH', ' series', ' step', ' to 3');
    const line = fc
      .tuple(fc.constantFrom('let x', 'let', 'resistor r1', 'sweep linear'), fc.constantFrom('x', 'step', 'value', 'to'), v, fc.constantFrom(' vary', ' vary ', ' to', ''), v, fc.constantFrom(' to ', ' ', ' vary '), v, tail)
      .map(([kw, k, a, w, b, w2, c, t]) => `${kw} ${k}=${a}${w} ${b}${w2}${c}${t}`);
    fc.assert(
      fc.property(fc.array(line, { minLength: 1, maxLength: 5 }), (ls) => {
        const text = ls.join('\n');
        const fastBag = new DiagnosticBag();
        const slowBag = new DiagnosticBag();
        const fast = parseNetlist(text, 'f.sbx', fastBag);
        const slow = parseNetlist(text, 'f.sbx', slowBag, { grammarOnly: true });
        expect(fast).toEqual(slow);
        expect(fastBag.items).toEqual(slowBag.items);
      }),
      { numRuns: 500, seed: 20261203 },
    );
  });
});

describe('elaborating design variables', () => {
  it('records each variable in SI units, in netlist order', () => {
    const { circuit } = loadNetlist(
      net('let att = 6 vary 1 to 20', 'let cshunt = 3.3 pF vary 1 pF to 10 pF series E24', 'let lser = 12 nH vary 5 nH to 20 nH step 0.5 nH', 'inductor l1 a=in b=ground value=lser', 'resistor r2 a=in b=ground value=att*1 ohm'),
      'v.sbx',
    );
    const vs = circuit.variables;
    expect(vs.map((v) => v.name)).toEqual(['att', 'cshunt', 'lser']);
    expect(vs[0]).toMatchObject({ value: 6, lower: 1, upper: 20, unit: null });
    expect(vs[0]!.series).toBeUndefined();
    expect(vs[0]!.step).toBeUndefined();
    // SI prefixes p = 1e-12, n = 1e-9; relative tolerance 1e-12
    expect(vs[1]!.unit).toBe('F');
    expect(vs[1]!.series).toBe('E24');
    expect(vs[1]!.value).toBeCloseTo(3.3e-12, 24);
    expect(vs[1]!.lower).toBeCloseTo(1e-12, 24);
    expect(vs[1]!.upper).toBeCloseTo(10e-12, 24);
    expect(vs[2]!.unit).toBe('H');
    expect(Math.abs(vs[2]!.step! - 0.5e-9) / 0.5e-9).toBeLessThan(1e-12);
    expect(Math.abs(vs[2]!.value - 12e-9) / 12e-9).toBeLessThan(1e-12);
    expect(vs[1]!.span).toMatchObject({ line: 2, column: 5, length: 6 });
  });

  it('lets dependent parameters follow a variable, also when it is set from outside', () => {
    const text = net('let cshunt = 2 pF vary 1 pF to 10 pF', 'let c2 = 2*cshunt', 'capacitor c2x a=in b=ground value=c2');
    const c2 = (o?: LoadOptions) => loadNetlist(text, 'v.sbx', o).circuit.parameters.find((p) => p.name === 'c2')!.value;
    expect(c2() / 4e-12).toBeCloseTo(1, 12);
    const set = loadNetlist(text, 'v.sbx', { set: ['cshunt=3 pF'] }).circuit;
    expect(c2({ set: ['cshunt=3 pF'] }) / 6e-12).toBeCloseTo(1, 12);
    expect(set.variables[0]!.value / 3e-12).toBeCloseTo(1, 12);
    expect(set.variables[0]!.lower / 1e-12).toBeCloseTo(1, 12);
    // the capacitor that uses c2 has the followed value
    const el = set.elements.find((e) => e.name === 'c2x')!;
    expect(el.props['value']! / 6e-12).toBeCloseTo(1, 12);
  });

  it('takes bounds as expressions of earlier parameters, with units', () => {
    const { circuit } = loadNetlist(net('let cmin = 1 pF', 'let cshunt = 4.7 pF vary cmin to 10*cmin series E12'), 'v.sbx');
    expect(circuit.variables[0]!.upper / 1e-11).toBeCloseTo(1, 12);
    expect(circuit.variables[0]!.series).toBe('E12');
  });

  it('accepts a value on a bound, and a plain number for a series or a step', () => {
    const { circuit } = loadNetlist(net('let cshunt = 1 pF vary 1 pF to 10 pF', 'let n = 20 vary 1 to 20 series E6', 'let k = 1 vary 1 to 2 step 0.25', 'resistor rn a=in b=ground value=n*k*1 ohm'), 'v.sbx');
    expect(circuit.variables.map((v) => [v.name, v.series ?? null, v.step ?? null])).toEqual([
      ['cshunt', null, null],
      ['n', 'E6', null],
      ['k', null, 0.25],
    ]);
  });

  it('reports every problem of the ranges in one run, each at its place', () => {
    const lines = [
      'let cshunt = 12 pF vary 1 pF to 10 pF', // 1: value outside
      'let a = 5 pF vary 10 pF to 1 pF', // 2: reversed range
      'let b = 5 pF vary 5 pF to 5 pF', // 3: empty range
      'let d = 5 pF vary 1 nH to 10 pF', // 4: lower bound of another unit
      'let e = 5 pF vary 1 pF to 10 pF step 0 pF', // 5: step not positive
      'let f = 5 pF vary 1 pF to 10 pF step 20 pF', // 6: step larger than the range
      'let g = 5 vary 0 to 10 series E24', // 7: series reaching 0
      'let h = 5 vary 1 to 10 series E25', // 8: unknown series
      'let i = 5 vary 1 to 10 series e24', // 9: case slip
      'let j = 1.06 vary 1.05 to 1.08 series E12', // 10: no series value in range
      'let k = 5 pF vary 1 pF to 10 pF step 1 nH', // 11: step of another unit
      'let m = -2 vary -5 to -1 series E6', // 12: negative range
    ];
    const text = net(...lines, 'resistor rr a=in b=ground value=(a+b+d+e+f+k)/1 pF*g*h*i*j*m*1 ohm');
    const errs = failing(text);
    const byLine = new Map<number, Diagnostic[]>();
    for (const d of errs) byLine.set(d.span!.line, [...(byLine.get(d.span!.line) ?? []), d]);
    const one = (line: number) => {
      const ds = byLine.get(line) ?? [];
      expect(ds.length, `line ${line}: ${ds.map((d) => d.message).join('; ')}`).toBe(1);
      return ds[0]!;
    };
    let d = one(1);
    expect(d.code).toBe('out-of-range');
    expect(d.message).toBe('`cshunt` = 12 pF lies outside its range 1 pF to 10 pF');
    expect(at(text, d)).toBe('12 pF');
    d = one(2);
    expect(d.code).toBe('empty-range');
    expect(d.message).toBe('the range 10 pF to 1 pF is empty');
    expect(at(text, d)).toBe('10 pF to 1 pF');
    expect(one(3).code).toBe('empty-range');
    d = one(4);
    expect(d.code).toBe('wrong-unit');
    expect(d.message).toMatch(/^the lower bound is an inductance.*but `d` is a capacitance/);
    expect(at(text, d)).toBe('1 nH');
    d = one(5);
    expect(d.code).toBe('bad-step');
    expect(d.message).toMatch(/must be positive/);
    expect(at(text, d)).toBe('0 pF');
    d = one(6);
    expect(d.code).toBe('bad-step');
    expect(d.message).toBe('the step 20 pF is larger than the range 1 pF to 10 pF');
    expect(at(text, d)).toBe('20 pF');
    d = one(7);
    expect(d.code).toBe('series-range');
    expect(d.message).toBe('series E24 does not fit a range that reaches 0 or below');
    expect(at(text, d)).toBe('0 to 10');
    d = one(8);
    expect(d.code).toBe('unknown-series');
    expect(at(text, d)).toBe('E25');
    expect(d.help).toMatch(/E24|E6|E12|E48|E96|E192/);
    d = one(9);
    expect(d.code).toBe('unknown-series');
    expect(d.help).toBe('did you mean `E24`?');
    d = one(10);
    expect(d.code).toBe('series-range');
    expect(d.message).toBe('no value of series E12 lies in the range 1.05 to 1.08');
    d = one(11);
    expect(d.code).toBe('wrong-unit');
    expect(at(text, d)).toBe('1 nH');
    d = one(12);
    expect(d.code).toBe('series-range');
    expect(errs.length).toBe(12);
  });

  it('refuses `vary` inside a block and on other statements, once per line', () => {
    const header = ['block tee terminals=a, b level=1 vary 1 to 2', '  resistor ra a=a b=b value=level*1 ohm', 'end', ...CIRCUIT].join('\n');
    const h = failing(header).filter((d) => d.code === 'vary-in-block');
    expect(h.length).toBe(1);
    expect(h[0]!.span).toMatchObject({ line: 1, column: 34, length: 4 });
    const text = [
      'block tee terminals=a, b level=1',
      '  let inner = 2 vary 1 to 3',
      '  resistor ra a=a b=b value=inner*level*1 ohm',
      'end',
      'tee t1 a=in b=out',
      'tee t2 a=in b=out',
      'resistor r2 a=in b=ground value=50 ohm vary 1 ohm to 100 ohm',
      'port 1 plus=in',
      'port 2 plus=out',
      'sweep list freqs=1 GHz',
    ].join('\n');
    const errs = failing(text);
    const codes = errs.map((d) => [d.code, d.span!.line, at(text, d)]);
    expect(codes).toContainEqual(['vary-in-block', 2, 'vary']);
    expect(codes).toContainEqual(['vary-not-let', 7, 'vary']);
    expect(errs.filter((d) => d.span!.line === 2).length).toBe(1);
    for (const d of errs) expect(d.message).not.toMatch(/[a-z][A-Za-z]+[A-Z][a-z]+:/);
  });

  it('checks a --set of a variable against its range, at the --set', () => {
    const text = net('let cshunt = 3.3 pF vary 1 pF to 10 pF series E24');
    const ok = loadNetlist(text, 'v.sbx', { set: ['cshunt=10 pF'] }).circuit;
    expect(ok.variables[0]!.value / 1e-11).toBeCloseTo(1, 12);
    const errs = failing(text, { set: ['cshunt=22 pF'] });
    expect(errs.length).toBe(1);
    expect(errs[0]!.code).toBe('out-of-range');
    expect(errs[0]!.message).toBe('`--set cshunt`: 22 pF lies outside the range of `cshunt`, 1 pF to 10 pF');
    expect(errs[0]!.span!.file).not.toBe('v.sbx');
    expect(errs[0]!.span!.column).toBe(8); // `cshunt=22 pF`: the value after `=`
    // a range is not something --set gives
    expect(failing(text, { set: ['cshunt=2 pF vary 1 pF to 3 pF'] })[0]!.code).toBe('bad-override');
  });
});

describe('preferred-number series (IEC 60063)', () => {
  // IEC 60063 tables; E6/E12/E24 are the well-known lists (common practice), E48/E96 (from memory).
  const E6 = [1.0, 1.5, 2.2, 3.3, 4.7, 6.8];
  const E12 = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];
  const E24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1];
  const E48 = [
    1.0, 1.05, 1.1, 1.15, 1.21, 1.27, 1.33, 1.4, 1.47, 1.54, 1.62, 1.69, 1.78, 1.87, 1.96, 2.05, 2.15, 2.26, 2.37, 2.49, 2.61, 2.74, 2.87, 3.01, 3.16, 3.32, 3.48, 3.65, 3.83, 4.02, 4.22, 4.42, 4.64, 4.87,
    5.11, 5.36, 5.62, 5.9, 6.19, 6.49, 6.81, 7.15, 7.5, 7.87, 8.25, 8.66, 9.09, 9.53,
  ];
  const E96 = [
    1.0, 1.02, 1.05, 1.07, 1.1, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.3, 1.33, 1.37, 1.4, 1.43, 1.47, 1.5, 1.54, 1.58, 1.62, 1.65, 1.69, 1.74, 1.78, 1.82, 1.87, 1.91, 1.96, 2.0, 2.05, 2.1, 2.15, 2.21,
    2.26, 2.32, 2.37, 2.43, 2.49, 2.55, 2.61, 2.67, 2.74, 2.8, 2.87, 2.94, 3.01, 3.09, 3.16, 3.24, 3.32, 3.4, 3.48, 3.57, 3.65, 3.74, 3.83, 3.92, 4.02, 4.12, 4.22, 4.32, 4.42, 4.53, 4.64, 4.75, 4.87,
    4.99, 5.11, 5.23, 5.36, 5.49, 5.62, 5.76, 5.9, 6.04, 6.19, 6.34, 6.49, 6.65, 6.81, 6.98, 7.15, 7.32, 7.5, 7.68, 7.87, 8.06, 8.25, 8.45, 8.66, 8.87, 9.09, 9.31, 9.53, 9.76,
  ];

  it('equal the published tables E6, E12, E24, E48, E96', () => {
    expect(seriesTable('E6')).toEqual(E6);
    expect(seriesTable('E12')).toEqual(E12);
    expect(seriesTable('E24')).toEqual(E24);
    expect(seriesTable('E48')).toEqual(E48);
    expect(seriesTable('E96')).toEqual(E96);
  });

  it('E192 has 192 values, E96 as every second, and 9.20 where the geometric formula gives 9.19 (IEC 60063)', () => {
    const t = seriesTable('E192');
    expect(t.length).toBe(192);
    expect(t.filter((_, i) => i % 2 === 0)).toEqual(E96);
    expect(t).toContain(9.2);
    expect(t).not.toContain(9.19);
    // the neighbours around it (from memory): …9.09, 9.20, 9.31…
    expect(t.slice(184, 187)).toEqual([9.09, 9.2, 9.31]);
    // otherwise the rounded geometric mean 10^(i/192), three digits
    t.forEach((v, i) => {
      if (i !== 185) expect(v).toBe(Math.round(100 * 10 ** (i / 192)) / 100);
    });
  });

  it('finds the nearest value by ratio over every decade', () => {
    expect(nearestInSeries(5e-12, 'E12')).toBe(4.7e-12);
    expect(nearestInSeries(5.2e-12, 'E12')).toBe(5.6e-12); // ln(5.6/5.2)=0.074 < ln(5.2/4.7)=0.101
    expect(nearestInSeries(9.6, 'E6')).toBe(10); // the next decade's 1.0
    expect(nearestInSeries(0.0124, 'E24')).toBe(0.012);
    expect(nearestInSeries(3.3e-9, 'E24')).toBe(3.3e-9);
    expect(nearestInSeries(1000, 'E96')).toBe(1000);
    expect(nearestInSeries(9.195, 'E192')).toBe(9.2);
    // the geometric midpoint of 4.7 and 5.6 (E12) is √(4.7·5.6) = 5.130…: just below goes down, just above up
    const mid = Math.sqrt(4.7 * 5.6);
    expect(nearestInSeries(mid * 0.999, 'E12')).toBe(4.7);
    expect(nearestInSeries(mid * 1.001, 'E12')).toBe(5.6);
    expect(() => nearestInSeries(0, 'E12')).toThrow(RangeError);
    expect(() => nearestInSeries(-1, 'E12')).toThrow(RangeError);
  });

  it('lists the values of a range, bounds included', () => {
    expect(seriesValuesIn(1e-12, 10e-12, 'E6')).toEqual([1e-12, 1.5e-12, 2.2e-12, 3.3e-12, 4.7e-12, 6.8e-12, 1e-11]);
    expect(seriesValuesIn(80, 130, 'E12')).toEqual([82, 100, 120]);
    expect(seriesValuesIn(1.05, 1.08, 'E12')).toEqual([]);
    expect(seriesValuesIn(1, 1000, 'E96').length).toBe(3 * 96 + 1);
  });

  it('knows its names', () => {
    expect([...SERIES_NAMES]).toEqual(['E6', 'E12', 'E24', 'E48', 'E96', 'E192']);
    expect(isSeriesName('E24')).toBe(true);
    expect(isSeriesName('E3')).toBe(false);
  });
});
