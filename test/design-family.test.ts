// Families (issue 15, item 3): the `--over` option of `vary` (linear, log and list forms, values
// with units, checked against the variable's range), the members of one or two axes, their
// labels, and evaluation on a design model. Errors are located in the option's text.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { DesignModel } from '../src/design/model.js';
import { evaluateFamily, familyMembers, FamilyMemberError, formatValue, parseOver, spacedValues } from '../src/design/family.js';
import type { Variable } from '../src/elaborate/circuit.js';
import { MAX_FAMILY_MEMBERS } from '../src/limits.js';

const DEMO = 'circuits/match-50-75-915.sbx';
const model = DesignModel.load(DEMO);
const vars = model.variables;

/** The errors of an `--over` text (fails the test when it is accepted). */
function errors(text: string, what = '--over'): Diagnostic[] {
  try {
    parseOver(text, vars, what);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    return e.diagnostics.filter((d) => d.severity === 'error');
  }
  throw new Error(`expected an InputError for ${JSON.stringify(text)}`);
}

/** The text a diagnostic points at. */
function pointed(text: string, d: Diagnostic): string {
  return text.slice(d.span!.column - 1, d.span!.column - 1 + d.span!.length);
}

/** |a − b| ≤ tol·|b| for every element. */
function closeAll(a: readonly number[], b: readonly number[], tol: number) {
  expect(a.length).toBe(b.length);
  a.forEach((x, k) => expect(Math.abs(x - b[k]!)).toBeLessThanOrEqual(tol * Math.abs(b[k]!)));
}

describe('the demo declares the variables the tests vary', () => {
  it('match-50-75-915 has lser (3 nH to 12 nH) and cshunt (0.5 pF to 4.7 pF)', () => {
    expect(vars.map((v) => v.name)).toEqual(['lser', 'cshunt']);
    expect(vars[1]!.unit).toBe('F');
    closeAll([vars[1]!.lower, vars[1]!.upper], [0.5e-12, 4.7e-12], 1e-15);
  });
});

describe('--over, linear form NAME=FROM..TO:COUNT', () => {
  it('gives COUNT evenly spaced values with both ends, units as in a netlist', () => {
    const a = parseOver('cshunt=1pF..3pF:5', vars);
    expect(a).toMatchObject({ name: 'cshunt', index: 1, unit: 'F', spacing: 'linear' });
    // value_k = FROM + (TO − FROM)·k/(COUNT − 1) (common practice), to 1e-15 relative
    closeAll(a.values, [1e-12, 1.5e-12, 2e-12, 2.5e-12, 3e-12], 1e-15);
    expect(a.values[0]).toBe(1e-12);
    expect(a.values[4]).toBe(3e-12);
  });

  it('takes spaces, the explicit `lin` spacing, a value without unit in SI, and expressions', () => {
    closeAll(parseOver(' cshunt = 1 pF .. 2 pF : 3 ', vars).values, [1e-12, 1.5e-12, 2e-12], 1e-15);
    closeAll(parseOver('cshunt=1e-12..2e-12:3:lin', vars).values, [1e-12, 1.5e-12, 2e-12], 1e-15);
    closeAll(parseOver('lser=2*2nH..8nH:3', vars).values, [4e-9, 6e-9, 8e-9], 1e-15);
  });

  it('runs downwards when FROM is above TO', () => {
    closeAll(parseOver('cshunt=2pF..1pF:3', vars).values, [2e-12, 1.5e-12, 1e-12], 1e-15);
  });
});

describe('--over, log form NAME=FROM..TO:COUNT:log', () => {
  it('is exactly geometric: value_k = FROM·(TO/FROM)^(k/(COUNT−1)) (common practice)', () => {
    const a = parseOver('lser=3nH..12nH:5:log', vars);
    expect(a.spacing).toBe('log');
    const want = [0, 1, 2, 3, 4].map((k) => 3e-9 * Math.pow(12e-9 / 3e-9, k / 4));
    closeAll(a.values, want, 1e-15);
    // 3, 4.2426, 6, 8.4853, 12 nH: every ratio √2 (to 1e-14)
    for (let k = 1; k < 5; k++) expect(Math.abs(a.values[k]! / a.values[k - 1]! - Math.SQRT2)).toBeLessThan(1e-14);
    expect(a.values[2]! / 1e-9).toBeCloseTo(6, 12);
  });

  it('spacedValues hits both ends exactly and matches the closed forms on random ranges', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-15, max: 1e3, noNaN: true }), fc.double({ min: 1e-15, max: 1e3, noNaN: true }), fc.integer({ min: 2, max: 50 }), (from, to, count) => {
        const lin = spacedValues(from, to, count, 'linear');
        const log = spacedValues(from, to, count, 'log');
        expect(lin[0]).toBe(from);
        expect(lin[count - 1]).toBe(to);
        expect(log[0]).toBe(from);
        expect(log[count - 1]).toBe(to);
        for (let k = 0; k < count; k++) {
          const g = from * Math.pow(to / from, k / (count - 1));
          expect(Math.abs(log[k]! - g)).toBeLessThanOrEqual(1e-12 * g);
          const l = from + ((to - from) * k) / (count - 1);
          expect(Math.abs(lin[k]! - l)).toBeLessThanOrEqual(1e-12 * Math.max(Math.abs(from), Math.abs(to)));
        }
      }),
      { seed: 15, numRuns: 300 },
    );
  });
});

describe('--over, list form NAME=V1,V2,…', () => {
  it('takes the values in their order, each with its own unit', () => {
    const a = parseOver('cshunt=1pF, 2.2pF,4.7e-12', vars);
    expect(a.spacing).toBe('list');
    closeAll(a.values, [1e-12, 2.2e-12, 4.7e-12], 1e-15);
    expect(parseOver('cshunt=1.5 pF', vars).values).toEqual([1.5e-12]);
  });
});

describe('--over errors, located in the option text', () => {
  it('an unknown name points at the name and suggests the nearest variable', () => {
    const text = 'cshnt=1pF..2pF:3';
    const [d] = errors(text);
    expect(d!.message).toBe('`cshnt` is not a design variable of the netlist');
    expect(d!.span).toMatchObject({ file: '--over', line: 1, column: 1 });
    expect(pointed(text, d!)).toBe('cshnt');
    expect(d!.help).toBe('did you mean `cshunt`?');
    expect(errors('zz=1..2:3')[0]!.help).toBe('the design variables are lser, cshunt');
  });

  it('a value in the wrong unit points at that value; every bad value of the option is reported', () => {
    const text = 'cshunt=1nH..2 ohm:3';
    const ds = errors(text);
    expect(ds).toHaveLength(2);
    expect(ds[0]!.message).toMatch(/must be in F, but it is an inductance \(H\)/);
    expect(pointed(text, ds[0]!)).toBe('1nH');
    expect(pointed(text, ds[1]!)).toBe('2 ohm');
  });

  it('a value outside the range names the range', () => {
    const text = 'cshunt=0.1pF..2pF:3';
    const [d] = errors(text);
    expect(d!.message).toBe('cshunt = 100 fF lies outside its range 500 fF to 4.7 pF'); // engineering notation: mantissa in [1, 1000)
    expect(pointed(text, d!)).toBe('0.1pF');
    const list = 'cshunt=1pF,9pF,2pF,10pF';
    const ds = errors(list);
    expect(ds.map((x) => pointed(list, x))).toEqual(['9pF', '10pF']);
  });

  it('a bad COUNT, spacing or shape says what is expected', () => {
    const text = 'cshunt=1pF..2pF:x';
    expect(errors(text)[0]!.message).toBe('COUNT must be a whole number of values, got `x`');
    expect(pointed(text, errors(text)[0]!)).toBe('x');
    expect(errors('cshunt=1pF..2pF:1')[0]!.message).toMatch(/COUNT must be at least 2/);
    expect(errors(`cshunt=1pF..2pF:${MAX_FAMILY_MEMBERS + 1}`)[0]!.message).toBe(`COUNT ${MAX_FAMILY_MEMBERS + 1} is more than the limit of ${MAX_FAMILY_MEMBERS} members`);
    const cubic = 'cshunt=1pF..2pF:3:cubic';
    expect(errors(cubic)[0]!.message).toMatch(/`cubic` is no spacing/);
    expect(pointed(cubic, errors(cubic)[0]!)).toBe('cubic');
    expect(errors('cshunt=1pF..2pF')[0]!.message).toMatch(/no :COUNT/);
    expect(errors('cshunt')[0]!.message).toMatch(/has no `=`/);
    expect(errors('=1pF')[0]!.message).toMatch(/names no variable/);
    expect(errors('cshunt=')[0]!.message).toMatch(/gives no values/);
    expect(errors('cshunt=1pF,,2pF')[0]!.message).toMatch(/an empty value/);
  });

  it('a log range through zero or across signs is refused', () => {
    const v: Variable[] = [{ name: 'g', value: 0, lower: -10, upper: 10, unit: null, span: { file: 'x', line: 1, column: 1, length: 1 } }];
    expect(() => parseOver('g=-1..1:3:log', v)).toThrow(/same sign and not zero/);
    expect(() => parseOver('g=0..1:3:log', v)).toThrow(/same sign and not zero/);
    closeAll(parseOver('g=-1..-4:3:log', v).values, [-1, -2, -4], 1e-15);
  });

  it('names the option given (the second --over of two)', () => {
    expect(errors('cshnt=1pF', '--over (second)')[0]!.span!.file).toBe('--over (second)');
  });
});

describe('members of a family', () => {
  it('one axis: a member per value, labelled `name = value unit` in engineering notation', () => {
    const ms = familyMembers([parseOver('cshunt=1pF..2pF:3', vars)]);
    expect(ms.map((m) => m.label)).toEqual(['cshunt = 1 pF', 'cshunt = 1.5 pF', 'cshunt = 2 pF']);
    expect(ms.map((m) => m.index)).toEqual([0, 1, 2]);
  });

  it('two axes: the grid of both, the last axis running fastest', () => {
    const ms = familyMembers([parseOver('lser=4nH,8nH', vars), parseOver('cshunt=1pF..2pF:3', vars)]);
    expect(ms).toHaveLength(6);
    expect(ms.map((m) => m.label)).toEqual([
      'lser = 4 nH, cshunt = 1 pF',
      'lser = 4 nH, cshunt = 1.5 pF',
      'lser = 4 nH, cshunt = 2 pF',
      'lser = 8 nH, cshunt = 1 pF',
      'lser = 8 nH, cshunt = 1.5 pF',
      'lser = 8 nH, cshunt = 2 pF',
    ]);
    closeAll(ms[4]!.values, [8e-9, 1.5e-12], 1e-15);
  });

  it('refuses the same variable twice and a grid over the limit', () => {
    expect(() => familyMembers([parseOver('cshunt=1pF', vars), parseOver('cshunt=2pF', vars)])).toThrow(/cshunt is varied twice/);
    const big = [parseOver('lser=3nH..12nH:100', vars), parseOver('cshunt=1pF..2pF:11', vars)];
    expect(() => familyMembers(big, [{ what: '--over', text: 'a' }, { what: '--over (second)', text: 'b' }])).toThrow(`more than the limit of ${MAX_FAMILY_MEMBERS}`);
  });

  it('formatValue writes engineering notation with six significant digits', () => {
    expect(formatValue(1.5e-12, 'F')).toBe('1.5 pF');
    expect(formatValue(6.2e-9, 'H')).toBe('6.2 nH');
    expect(formatValue(4.7e-6, 'H')).toBe('4.7 µH');
    expect(formatValue(50, 'ohm')).toBe('50 ohm');
    expect(formatValue(1500, 'ohm')).toBe('1.5 kohm');
    expect(formatValue(0.9999999e-9, 'F')).toBe('1 nF'); // rounds up into the next prefix
    expect(formatValue(0.70710678, null)).toBe('0.707107');
    expect(formatValue(0, 'F')).toBe('0 F');
  });
});

describe('evaluateFamily on a design model', () => {
  it('each member equals a fresh model at that value (S to 1e-12) and leaves specs per member', () => {
    const m = DesignModel.load(DEMO);
    const axes = [parseOver('cshunt=1pF..2.2pF:3', m.variables)];
    const results = evaluateFamily(m, axes, familyMembers(axes));
    expect(results).toHaveLength(3);
    for (const r of results) {
      // outside check: a model made with the value as a --set override, never stepped
      const fresh = DesignModel.load(DEMO, { set: [`cshunt=${r.values[0]} F`] });
      const want = fresh.solve();
      expect(r.network.values.length).toBe(want.values.length);
      let worst = 0;
      for (let k = 0; k < want.values.length; k++) worst = Math.max(worst, Math.abs(r.network.values[k]! - want.values[k]!));
      expect(worst).toBeLessThanOrEqual(1e-12);
      expect(r.specs.map((s) => s.spec.name)).toEqual(['channel_match', 'feed_vswr', 'channel_loss', 'usable_band']);
      expect(r.specs.map((s) => s.worstMargin)).toEqual(fresh.checkSpecs().map((s) => s.worstMargin));
    }
    // 1 pF is far from the matched 1.64 pF: the channel match fails there
    expect(results[0]!.specs[0]!.pass).toBe(false);
  });

  it('an error of a member names the member', () => {
    const failing = { variables: vars, setValues: () => undefined, solve: () => { throw new RangeError('boom'); }, checkSpecs: () => [] };
    const axes = [parseOver('cshunt=1pF,2pF', vars)];
    try {
      evaluateFamily(failing, axes, familyMembers(axes));
      throw new Error('expected an error');
    } catch (e) {
      expect(e).toBeInstanceOf(FamilyMemberError);
      expect((e as Error).message).toBe('at cshunt = 1 pF (member 1): boom');
    }
  });
});

describe('fuzz: --over never throws anything but a located InputError', () => {
  const piece = fc.constantFrom('cshunt', 'lser', 'x', '=', '..', '...', ':', ':log', ':lin', ',', ' ', '1', '2.2', '1e308', '-1e-320', 'pF', 'nH', 'ohm', 'e', '(', ')', '*', '__proto__', 'constructor', '"', '\n', '\u00b5', 'NaN', '1000000', '0', 'k');
  const texts = fc.oneof(fc.string({ maxLength: 40 }), fc.array(piece, { maxLength: 14 }).map((a) => a.join('')), fc.tuple(fc.constantFrom('cshunt', 'lser'), fc.array(piece, { maxLength: 10 })).map(([n, a]) => `${n}=${a.join('')}`));
  it('on random and structured texts (fixed seed)', () => {
    fc.assert(
      fc.property(texts, (text) => {
        try {
          const a = parseOver(text, vars);
          // accepted: values are finite, inside the range, and at most the limit
          const v = vars[a.index]!;
          expect(a.values.length).toBeGreaterThan(0);
          expect(a.values.length).toBeLessThanOrEqual(MAX_FAMILY_MEMBERS);
          for (const x of a.values) expect(Number.isFinite(x) && x >= v.lower && x <= v.upper).toBe(true);
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          for (const d of e.diagnostics) {
            expect(d.span).toBeDefined();
            expect(d.span!.file).toBe('--over');
            expect(d.span!.line).toBe(1);
            expect(d.span!.column).toBeGreaterThanOrEqual(1);
            expect(d.span!.column).toBeLessThanOrEqual(Math.max(1, text.length));
            expect(d.message).not.toMatch(/^[a-z]+[A-Z]\w*: /); // no internal function name
          }
          expect(e.sources?.get('--over')).toBe(text);
        }
      }),
      { seed: 1515, numRuns: 2000 },
    );
  });
});
