// Tolerances in the netlist (issue 16, item 1): `tol [normal] AMOUNT [%] [cut K] [lot NAME]`
// after a `let` value or an element's number, and `lot NAME tol …`. Parsed to plain data on the
// circuit (SI units, relative amounts as fractions), every mistake a located error, all of a file
// in one run; the fast path leaves such lines to the grammar; a fuzz of tolerance clauses only
// ever gives a circuit or located input errors.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNetlist, parseNetlistItems } from '../src/ast/visitor.js';
import { DiagnosticBag, InputError, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { elaborate } from '../src/elaborate/elaborate.js';
import { loadNetlist } from '../src/load.js';
import { ParameterGraph } from '../src/params/graph.js';

const CIRCUIT = ['port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'];
const net = (...lines: string[]) => [...lines, ...CIRCUIT].join('\n') + '\n';

function failing(text: string): Diagnostic[] {
  try {
    loadNetlist(text, 't.sbx');
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

// SI prefixes are exact powers of ten; the conversion through the unit library may round in the
// last place, so numbers are compared to a relative 1e-12 (common practice for double rounding).
const close = (x: number | undefined, want: number) => {
  expect(x).toBeDefined();
  expect(Math.abs(x! - want)).toBeLessThanOrEqual(1e-12 * Math.abs(want));
};

describe('tolerance forms', () => {
  const text = net(
    'lot caps tol normal 3% cut 2.5',
    'lot coils tol 1%',
    'let cs = 2.2 pF tol 5% lot caps',
    'let lv = 10 nH vary 5 nH to 20 nH tol normal 0.2 nH',
    'let k = 3 tol 0.5',
    'capacitor c1 a=in b=ground value=cs',
    'capacitor c2 a=in b=out value=2.2 pF tol 0.1 pF lot caps',
    'inductor l1 a=out b=ground value=lv q=40 at 100 MHz tol normal 10% cut 3',
    'resistor r1 a=out b=ground value=50*k tol normal 0.5 ohm',
    'microstrip m1 a=in b=out w=1.8 mm length=10 mm t=35 um h=0.8 mm tol normal 0.02 mm er=4.4 tol 0.1',
  );
  const { circuit } = loadNetlist(text, 't.sbx');

  it('reads lots as relative spreads', () => {
    expect(circuit.lots.map((l) => l.name)).toEqual(['caps', 'coils']);
    expect(circuit.lots[0]!.distribution).toEqual({ kind: 'normal', relativeSigma: 0.03, cut: 2.5 });
    expect(circuit.lots[1]!.distribution).toEqual({ kind: 'uniform', relative: 0.01 });
    expect(circuit.lots[0]!.span.line).toBe(1);
  });

  it('reads each tolerance with its target, distribution in SI units, lot and nominal value', () => {
    const t = circuit.tolerances;
    expect(t.length).toBe(8);
    // let cs: a random input (not a variable), uniform ±5 % of 2.2 pF, from lot caps
    expect(t[0]!.target).toEqual({ kind: 'parameter', name: 'cs', input: 1 });
    expect(t[0]!.distribution).toEqual({ kind: 'uniform', relative: 0.05 });
    expect(t[0]!.lot).toBe('caps');
    close(t[0]!.nominal, 2.2e-12);
    expect(t[0]!.unit).toBe('F');
    // let lv: a design variable (index 0) with a normal σ of 0.2 nH
    expect(t[1]!.target).toEqual({ kind: 'parameter', name: 'lv', input: 0, variable: 0 });
    expect(t[1]!.distribution.kind).toBe('normal');
    close((t[1]!.distribution as { sigma: number }).sigma, 0.2e-9);
    expect(t[1]!.unit).toBe('H');
    // let k: a plain number, ±0.5 absolute
    expect(t[2]!.target).toEqual({ kind: 'parameter', name: 'k', input: 2 });
    expect(t[2]!.distribution).toEqual({ kind: 'uniform', absolute: 0.5 });
    expect(t[2]!.unit).toBeNull();
    expect(t[2]!.nominal).toBe(3);
    // c2's value: element 1, ±0.1 pF absolute
    expect(t[3]!.target).toEqual({ kind: 'element', element: 1, key: 'value' });
    close((t[3]!.distribution as { absolute: number }).absolute, 0.1e-12);
    expect(t[3]!.lot).toBe('caps');
    // l1's Q (after its `at`): normal 10 % cut at 3σ
    expect(t[4]!.target).toEqual({ kind: 'element', element: 2, key: 'q' });
    expect(t[4]!.distribution).toEqual({ kind: 'normal', relativeSigma: 0.1, cut: 3 });
    expect(t[4]!.nominal).toBe(40);
    // r1: σ 0.5 ohm around 150 ohm (50*k)
    expect(t[5]!.target).toEqual({ kind: 'element', element: 3, key: 'value' });
    expect(t[5]!.distribution).toEqual({ kind: 'normal', sigma: 0.5 });
    expect(t[5]!.nominal).toBe(150);
    // microstrip substrate height and permittivity
    expect(t[6]!.target).toEqual({ kind: 'element', element: 4, key: 'h' });
    close((t[6]!.distribution as { sigma: number }).sigma, 0.02e-3);
    expect(t[6]!.unit).toBe('m');
    expect(t[7]!.target).toEqual({ kind: 'element', element: 4, key: 'er' });
    expect(t[7]!.distribution).toEqual({ kind: 'uniform', absolute: 0.1 });
    // the span covers the clause from `tol` to its end
    expect(at(text, { severity: 'error', code: '', message: '', span: t[0]!.span })).toBe('tol 5% lot caps');
    expect(at(text, { severity: 'error', code: '', message: '', span: t[4]!.span })).toBe('tol normal 10% cut 3');
  });

  it('keeps the design variables as they were, and makes a toleranced parameter a random input after them', () => {
    expect(circuit.variables.map((v) => v.name)).toEqual(['lv']);
    expect(circuit.randomInputs.map((r) => [r.name, r.index, r.unit])).toEqual([
      ['cs', 1, 'F'],
      ['k', 2, null],
    ]);
    close(circuit.randomInputs[0]!.value, 2.2e-12);
  });

  it('lets the elements computed from a toleranced parameter follow a drawn value', () => {
    // c1 = cs, r1 = 50*k: bindings on inputs 1 and 2; l1 follows the variable lv (input 0)
    const byElement = new Map(circuit.bindings.map((b) => [`${b.element}.${b.key}`, b]));
    expect(byElement.get('0.value')!.value.deps).toEqual([1]);
    expect(byElement.get('3.value')!.value.deps).toEqual([2]);
    expect(byElement.get('2.value')!.value.deps).toEqual([0]);
    const drawn = Float64Array.from([12e-9, 2.3e-12, 3.2]);
    close(byElement.get('0.value')!.value.fn(drawn), 2.3e-12);
    close(byElement.get('3.value')!.value.fn(drawn), 160);
    // the design tools' vector of the variables alone: the random inputs stay nominal
    const designOnly = Float64Array.from([12e-9]);
    close(byElement.get('0.value')!.value.fn(designOnly), 2.2e-12);
    expect(byElement.get('3.value')!.value.fn(designOnly)).toBe(150);
    // and the parameter graph takes the drawn values to the elements
    const graph = new ParameterGraph(circuit);
    const copy = graph.workingCopy(circuit);
    const changed = graph.apply(copy, drawn, Float64Array.from([12e-9, 2.2e-12, 3]), circuit.frequencies);
    expect(changed).toEqual([0, 3]);
    close(copy.elements[0]!.props.value, 2.3e-12);
    close(copy.elements[3]!.props.value, 160);
    expect(circuit.elements[3]!.props.value).toBe(150);
  });

  it('changes nothing for a netlist without tolerances', () => {
    const { circuit: plain } = loadNetlist(net('let c = 2 pF vary 1 pF to 3 pF', 'capacitor c1 a=in b=out value=c'), 'p.sbx');
    expect(plain.tolerances).toEqual([]);
    expect(plain.lots).toEqual([]);
    expect(plain.randomInputs).toEqual([]);
    expect(plain.bindings.map((b) => b.value.deps)).toEqual([[0]]);
  });

  it('keeps the words usable as names elsewhere', () => {
    const { circuit: c } = loadNetlist(net('let tol = 2', 'let normal = 3', 'let cut = tol*normal', 'let lot = cut', 'resistor r1 a=in b=out value=lot*1 ohm tol normal (normal)%'), 'n.sbx');
    expect(c.elements[0]!.props.value).toBe(6);
    expect(c.tolerances[0]!.distribution).toEqual({ kind: 'normal', relativeSigma: 0.03 });
  });

  it('records a port, sweep or spec number that follows a random input apart from the variables', () => {
    const { circuit: c } = loadNetlist(['let z = 50 ohm tol 1%', 'resistor r1 a=in b=out value=z', 'port 1 plus=in ref=z', 'port 2 plus=out', 'sweep list freqs=1 GHz'].join('\n'), 'u.sbx');
    expect(c.unfollowed).toEqual([]);
    expect(c.randomUnfollowed.map((u) => u.what)).toEqual(['`ref`']);
  });
});

describe('tolerance errors', () => {
  it('reports every mistake of a file in one run, each at its place', () => {
    const lines = [
      'lot caps tol normal 3%', // 1 fine
      'lot caps tol 2%', // 2 declared twice
      'lot bad tol 0.1 pF', // 3 a lot is relative
      'lot odd tol 5% lot caps', // 4 a lot from a lot
      'lot', // 5 no name
      'let a = 2.2 pF tol 0.1', // 6 bare number on a capacitance
      'let b = 2.2 pF tol 0.1 nH', // 7 wrong unit
      'let c = 2.2 pF tol 120%', // 8 uniform ≥ 100 %
      'let d = 2.2 pF tol normal 0%', // 9 σ = 0
      'let e = 2.2 pF tol normal 2% cut 0', // 10 cut 0
      'let f = 2.2 pF tol 5% cut 3', // 11 cut on uniform
      'let g = 2.2 pF tol 5% lot capz', // 12 unknown lot
      'let h = 2.2 pF tol 5 pF %', // 13 % of a capacitance
      'let i = 2.2 pF tol -0.1 pF', // 14 negative
      'capacitor c1 a=in tol 5% b=ground value=1 pF', // 15 on a node
      'port 1 plus=in ref=50 ohm tol 5%', // 16 on a port
      'sweep list freqs=1 GHz tol 1%', // 17 on the sweep
      'block tee terminals=x, y c=1 pF', // 18
      '  capacitor cc a=x b=y value=c tol 5%', // 19 inside a block
      'end', // 20
      'tee t1 x=in y=out c=2 pF tol 2%', // 21 on an instance's parameter
      'resistor r1 a=in b=out value=50 ohm tol 5% cut 2', // 22 cut on uniform
      'let j = 3 tol normal -1%', // 23 negative σ
      'capacitor cz tol 5% a=out b=ground value=1 pF', // 24 a statement's own tolerance
      'port 2 plus=out',
      'let m = 1 pF vary 0.5 pF to 2 pF tol normal 1 pF cut 1 pF', // 26 cut with a unit
    ];
    const text = lines.join('\n') + '\n';
    const errs = failing(text);
    const seen = errs.map((d) => [d.span!.line, at(text, d), d.message]);
    const expectAt = (line: number, place: string, message: RegExp) => {
      const e = errs.find((d) => d.span!.line === line && at(text, d) === place && message.test(d.message));
      expect(e, `line ${line} at \`${place}\`: ${message} — got ${JSON.stringify(seen)}`).toBeDefined();
    };
    expectAt(2, 'caps', /^lot `caps` is declared twice \(first at line 1\)$/);
    expectAt(3, '0.1 pF', /^a lot's tolerance is relative: give it in %$/);
    expectAt(4, 'caps', /^a lot cannot come from another lot$/);
    expectAt(5, 'lot', /^a lot needs a name after `lot`$/);
    expectAt(6, '0.1', /^the tolerance of `a` must be in F, like the value, but it is a plain number$/);
    expectAt(7, '0.1 nH', /^the tolerance of `b` must be in F, like the value, but it is an inductance \(H\)$/);
    expectAt(8, '120', /^a uniform tolerance in % must be at least 0% and below 100%, not 120%$/);
    expectAt(9, '0', /^the standard deviation must be above zero, not 0%$/);
    expectAt(10, '0', /^`cut` must be above zero, not 0$/);
    expectAt(11, '3', /^`cut` belongs to a normal tolerance/);
    expectAt(12, 'capz', /^unknown lot `capz`$/);
    expectAt(13, '5 pF', /^a tolerance in % is a plain number, not a capacitance \(F\)$/);
    expectAt(14, '-0.1 pF', /^a tolerance must be zero or more, not -0.1 pF$/);
    expectAt(15, 'tol', /^`a` is a node: a node has no tolerance$/);
    expectAt(16, 'tol', /^`ref` of `port` takes no tolerance$/);
    expectAt(17, 'tol', /^`freqs` of `sweep` takes no tolerance$/);
    expectAt(19, 'tol', /^a tolerance \(`tol`\) cannot be given inside a block$/);
    expectAt(21, 'tol', /^a parameter of a block instance \(`c`\) takes no tolerance$/);
    expectAt(22, '2', /^`cut` belongs to a normal tolerance/);
    expectAt(23, '-1', /^the standard deviation must be above zero, not -1%$/);
    expectAt(24, 'tol', /^`capacitor` takes no tolerance$/);
    expectAt(26, '1 pF', /^`cut` is a number of standard deviations, not a capacitance \(F\)$/);
    // the unknown lot gets a suggestion; the misplaced ones say how to do it instead
    expect(errs.find((d) => d.message.startsWith('unknown lot'))!.help).toBe('did you mean `caps`?');
    expect(errs.find((d) => d.span!.line === 19)!.help).toMatch(/top-level `let`/);
    expect(errs.find((d) => d.span!.line === 16)!.help).toMatch(/value=2\.2 pF tol 5%/);
    // nothing else: one error per bad line
    expect(errs.length).toBe(22);
  });

  it('refuses a tolerance on a text argument (a choice), at its `tol`', () => {
    const data = JSON.stringify(new URL('../circuits/data/bandpass-2g45-measured.s2p', import.meta.url).pathname);
    const text = net(`datafile u1 file=${data} p1=in p2=out interp=polar tol 5%`);
    const errs = failing(text);
    expect(errs.map((d) => [d.message, at(text, d)])).toEqual([['`interp` is text: it has no tolerance', 'tol']]);
    expect(errs[0]!.help).toMatch(/value=2\.2 pF tol 5%/);
  });

  it('explains grammar mistakes in a tolerance', () => {
    for (const [line, place, message] of [
      ['let a = 2 pF tol', 'tol', /^the line ends where a value was expected$/],
      ['let a = 2 pF tol 5% cut', 'cut', /^the line ends where a value was expected$/],
      ['let a = 2 pF tol 5% lot', 'lot', /^the line ends where a name was expected$/],
      ['let a = 2 pF cut 3', 'cut', /^unexpected `cut`/],
      ['let a = 2 pF tol 5%%', '%', /^unexpected `%`/],
    ] as const) {
      const text = net(line);
      const errs = failing(text);
      expect(errs.length, line).toBe(1);
      expect(errs[0]!.message, line).toMatch(message);
      // the caret is on the place or just past it
      const col = errs[0]!.span!.column;
      const start = line.lastIndexOf(place) + 1;
      expect(col === start || col === start + place.length, `${line}: column ${col}`).toBe(true);
    }
  });
});

describe('fast path and grammar', () => {
  function both(text: string) {
    const fastBag = new DiagnosticBag();
    const slowBag = new DiagnosticBag();
    const fast = parseNetlist(text, 'f.sbx', fastBag);
    const slow = parseNetlist(text, 'f.sbx', slowBag, { grammarOnly: true });
    return { fast, slow, fastBag, slowBag };
  }

  it('leaves lines with tolerance words to the grammar and gives the same AST', () => {
    const text = net(
      'lot caps tol normal 3%',
      'let c = 2.2 pF tol 5% lot caps',
      'let l = 10 nH tol 0.1 nH',
      'capacitor c1 a=in b=out value=c tol 1',
      'resistor r1 a=in b=ground value=50 tol normal 1 cut 2',
      'resistor r2 a=in b=ground value=50 lot',
      'resistor r3 a=in b=ground value=50 ohm',
    );
    const { fast, slow, fastBag, slowBag } = both(text);
    expect(fast).toEqual(slow);
    expect(fastBag.items).toEqual(slowBag.items);
    // only the last plain line is left pending (read by the fast path)
    const items = parseNetlistItems(text, 'f.sbx', new DiagnosticBag()).items;
    const pending = items.filter((i) => 'pending' in i).map((i) => (i as { line: number }).line);
    expect(pending).toEqual([7, 8, 9, 10]);
  });

  it('gives the same circuit and diagnostics from pending lines and from a read AST', () => {
    const text = net(
      'lot caps tol normal 3%',
      'let c = 2.2 pF tol 5% lot caps',
      'let k = 2',
      'capacitor c1 a=in b=out value=c',
      'capacitor c2 a=in b=ground value=k*1 pF tol 1% lot caps',
      'resistor r1 a=out b=ground value=50 ohm',
    );
    const lazyBag = new DiagnosticBag();
    const eagerBag = new DiagnosticBag();
    const lazy = elaborate(parseNetlistItems(text, 'f.sbx', lazyBag), lazyBag, { consume: true });
    const eager = elaborate(parseNetlist(text, 'f.sbx', eagerBag, { grammarOnly: true }), eagerBag);
    const plain = (c: typeof lazy) => ({ ...c, bindings: c.bindings.map(({ value, ...b }) => ({ ...b, deps: value.deps })) });
    expect(plain(lazy)).toEqual(plain(eager));
    const x = Float64Array.from([2.5e-12]);
    expect(lazy.bindings.map((b) => b.value.fn(x))).toEqual(eager.bindings.map((b) => b.value.fn(x)));
    expect(lazyBag.items).toEqual(eagerBag.items);
    expect(lazy.tolerances.length).toBe(2);
  });

  it('agrees on random lines with tolerance words (fast-check, fixed seed)', () => {
    const word = fc.constantFrom('tol', 'normal', 'cut', 'lot', '%', 'caps', 'value', 'pF', 'nH', 'ohm', '=', ' ', ',', 'at', 'vary', 'to');
    const num = fc.constantFrom('1', '2.2', '.5', '5', '0', '1e-3');
    const line = fc.tuple(fc.constantFrom('let c = 2 pF', 'capacitor c1 a=in b=out value=2.2 pF', 'lot caps', 'resistor r1 a=in b=out value=50'), fc.array(fc.oneof(word, num), { maxLength: 8 })).map(([head, rest]) => `${head} ${rest.join(' ')}`);
    fc.assert(
      fc.property(fc.array(line, { minLength: 1, maxLength: 4 }), (ls) => {
        const { fast, slow, fastBag, slowBag } = both(ls.join('\n'));
        expect(fast).toEqual(slow);
        expect(fastBag.items).toEqual(slowBag.items);
      }),
      { numRuns: 500, seed: 20261203 },
    );
  });
});

describe('fuzz of tolerance clauses', () => {
  it('only ever yields a circuit or located input errors (fast-check, fixed seed)', () => {
    const amount = fc.constantFrom('5', '0', '-1', '100', '99.9', '2.2', '0.1 pF', '0.1 nH', '1 ohm', '1e308*10', '(1', 'x', 'normal', '1/0', '1e-3 pF', '2*k');
    const clause = fc
      .record({
        normal: fc.boolean(),
        amount,
        pct: fc.boolean(),
        cut: fc.option(fc.constantFrom('3', '0', '-2', '1 pF', 'k', ''), { nil: undefined }),
        lot: fc.option(fc.constantFrom('caps', 'capz', '', '1'), { nil: undefined }),
      })
      .map((r) => `tol ${r.normal ? 'normal ' : ''}${r.amount}${r.pct ? '%' : ''}${r.cut !== undefined ? ` cut ${r.cut}` : ''}${r.lot !== undefined ? ` lot ${r.lot}` : ''}`);
    // well-formed clauses too, so that circuits come out as well as errors
    const good = fc.constantFrom('tol 5%', 'tol normal 2%', 'tol normal 2% cut 3', 'tol 1% lot caps', 'tol normal 0.5% cut 2 lot caps', 'tol 0%');
    const anyClause = fc.oneof({ weight: 3, arbitrary: good }, { weight: 2, arbitrary: clause });
    const host = fc.constantFrom(
      (t: string) => `let c = 2.2 pF ${t}`,
      (t: string) => `let v = 2 pF vary 1 pF to 3 pF ${t}`,
      (t: string) => `capacitor cx a=in b=ground value=1 pF ${t}`,
      (t: string) => `inductor lx a=in b=ground value=1 nH q=30 at 1 GHz ${t}`,
      (t: string) => `lot more ${t}`,
      (t: string) => `port 3 plus=in ${t}`,
      (t: string) => `resistor rx a=in ${t} b=out value=1 ohm`,
    );
    let circuits = 0;
    let failures = 0;
    fc.assert(
      fc.property(fc.array(fc.tuple(host, anyClause), { minLength: 1, maxLength: 3 }), (pairs) => {
        const text = ['let k = 2', 'lot caps tol normal 1%', 'capacitor c0 a=in b=out value=1 pF', ...pairs.map(([h, t], i) => h(t).replace(/\b(cx|lx|rx)\b/, `$1${i}`).replace(/^let (c|v) /, `let $1${i} `).replace(/^lot more/, `lot more${i}`)), ...CIRCUIT].join('\n');
        try {
          const { circuit } = loadNetlist(text, 'z.sbx');
          if (circuit.tolerances.length > 0) circuits++;
          for (const t of circuit.tolerances) {
            expect(Number.isFinite(t.nominal)).toBe(true);
            for (const v of Object.values(t.distribution)) if (typeof v === 'number') expect(Number.isFinite(v) && v >= 0).toBe(true);
          }
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          failures++;
          for (const d of e.diagnostics) {
            expect(d.span, d.message).toBeDefined();
            expect(d.span!.line).toBeGreaterThanOrEqual(1);
            expect(d.message).not.toMatch(/internal|undefined|NaN|\w+\(\):/);
          }
        }
      }),
      { numRuns: 400, seed: 16 },
    );
    // both outcomes occur (the fuzz is not all errors, nor all fine)
    expect(circuits).toBeGreaterThan(10);
    expect(failures).toBeGreaterThan(10);
  });
});
