/**
 * Hardening of the lexer, grammar, AST, expression evaluation and diagnostics rendering (issue 14):
 * deep and long input never overflows the stack (it evaluates, or stops at the documented
 * MAX_EXPRESSION_DEPTH with a located error stating the limit); error rendering quotes the right
 * line for every line break the grammar knows (`\n`, `\r\n`, a lone `\r`); hints for unquoted file
 * names and for units within the expected dimension; names that are JavaScript object keys are
 * plain unknown names; no message names an internal function of the arithmetic library.
 *
 * Sources of the expected values:
 * - Integer sums and products of small integers are exact in IEEE 754 double precision (every
 *   integer up to 2^53 is representable): IEEE 754-2019, §3.2 — exact comparisons below.
 * - The SI prefixes p (1e-12), n (1e-9), k (1e3), M (1e6): the SI Brochure, 9th edition, table 7.
 * - The netlist language and its messages are our own (grammar/README.md).
 * No timed assertions; sizes are chosen so each test stays within a few seconds.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNetlist } from '../src/ast/visitor.js';
import { DiagnosticBag, InputError, formatDiagnostics, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { MAX_EXPRESSION_DEPTH } from '../src/limits.js';
import { evaluateQuantity, loadNetlist, type LoadOptions } from '../src/load.js';

const FILE = 'h.sbx';
const BASE = ['port 1 plus=in', 'port 2 plus=out', 'resistor r1 a=in b=out value=50 ohm', 'sweep linear start=1 GHz stop=2 GHz points=3'];

/** The InputError a netlist gives (fails the test on any other outcome). */
function inputError(text: string, options?: LoadOptions): InputError {
  try {
    loadNetlist(text, FILE, options);
  } catch (e) {
    if (e instanceof InputError) return e;
    throw new Error(`not an InputError: ${String(e)}`);
  }
  throw new Error('loaded without error');
}

function errors(e: InputError): Diagnostic[] {
  return e.diagnostics.filter((d) => d.severity === 'error');
}

/** Every diagnostic has a span inside the text of its file (line in range, column within the line + 1). */
function expectLocated(e: InputError, texts: Map<string, string>): void {
  for (const d of e.diagnostics) {
    expect(d.span, d.message).toBeDefined();
    const text = texts.get(d.span!.file);
    expect(text, `file ${d.span!.file}`).toBeDefined();
    const lines = text!.split(/\r\n|\n|\r/);
    expect(d.span!.line).toBeGreaterThanOrEqual(1);
    expect(d.span!.line).toBeLessThanOrEqual(lines.length);
    expect(d.span!.column).toBeGreaterThanOrEqual(1);
    expect(d.span!.column).toBeLessThanOrEqual(lines[d.span!.line - 1]!.length + 1);
  }
}

function parameter(text: string, name: string): number {
  const p = loadNetlist(text, FILE).circuit.parameters.find((q) => q.name === name);
  if (!p) throw new Error(`no parameter ${name}`);
  return p.value;
}

const netlist = (...lines: string[]) => [...BASE, ...lines].join('\n') + '\n';

describe('deep and long expressions', () => {
  it('300 nested parentheses: a located too-deep error stating the limit, no stack overflow', () => {
    const line = `let x = ${'('.repeat(300)}1${')'.repeat(300)}`;
    const e = inputError(netlist(line));
    const [d, ...rest] = errors(e);
    expect(rest).toEqual([]);
    expect(d!.code).toBe('too-deep');
    expect(d!.message).toContain(String(MAX_EXPRESSION_DEPTH));
    // the caret is under the parenthesis one level beyond the limit
    expect(d!.span).toEqual({ file: FILE, line: BASE.length + 1, column: 'let x = '.length + MAX_EXPRESSION_DEPTH + 1, length: 1 });
  });

  it('parentheses nested exactly to the limit still evaluate', () => {
    const line = `let x = ${'('.repeat(MAX_EXPRESSION_DEPTH)}2+3${')'.repeat(MAX_EXPRESSION_DEPTH)}`;
    expect(parameter(netlist(line, 'resistor r2 a=in b=out value=x*1 ohm'), 'x')).toBe(5);
  });

  it('a 10,000-term sum evaluates (to 10000, exact), in a netlist, through --set and evaluateQuantity', () => {
    const sum = Array(10_000).fill('1').join('+');
    expect(parameter(netlist(`let x = ${sum}`, 'resistor r2 a=in b=out value=x*1 ohm'), 'x')).toBe(10_000);
    const set = loadNetlist(netlist('let x = 1', 'resistor r2 a=in b=out value=x*1 ohm'), FILE, { set: [`x=${sum}`] });
    expect(set.circuit.parameters.find((p) => p.name === 'x')!.value).toBe(10_000);
    expect(evaluateQuantity(sum, null, '--x')).toBe(10_000);
  });

  it('a 10,000-factor product and a 10,000-term sum with units evaluate', () => {
    // 2 * 0.5 * 2 * 0.5 … : every partial product is 1 or 2, exact
    expect(evaluateQuantity(Array(5_000).fill('2*0.5').join('*'), null, '--x')).toBe(1);
    // 10,000 × 1 mm = 10 m; the partial sums k·1e-3 are not all exact: 1e-9 relative
    expect(evaluateQuantity(Array(10_000).fill('1 mm').join('+'), 'm', '--x')).toBeCloseTo(10, 9);
  });

  it('a chain of 10,000 signs, 300 nested calls, 10,000 powers, 10,000 unclosed parentheses: located too-deep errors', () => {
    for (const value of [`${'-'.repeat(10_000)}1`, `${'abs('.repeat(300)}1${')'.repeat(300)}`, Array(10_000).fill('1').join('^'), `${'('.repeat(10_000)}1`, `${'-('.repeat(5_000)}1`]) {
      const e = inputError(netlist(`let x = ${value}`));
      const es = errors(e);
      expect(es.map((d) => d.code)).toEqual(['too-deep']);
      expect(es[0]!.message).toContain(String(MAX_EXPRESSION_DEPTH));
      expectLocated(e, new Map([[FILE, netlist(`let x = ${value}`)]]));
    }
  });

  it('a short chain of signs and powers keeps its meaning', () => {
    expect(evaluateQuantity('--3', null, '--x')).toBe(3);
    expect(evaluateQuantity('-+-3', null, '--x')).toBe(3);
    expect(evaluateQuantity('2^3^2', null, '--x')).toBe(512); // right-associative: 2^(3^2)
    expect(evaluateQuantity('-2^2', null, '--x')).toBe(-4); // the sign applies to the power
    expect(evaluateQuantity('10-2-3', null, '--x')).toBe(5); // left to right
    expect(evaluateQuantity('64/4/2', null, '--x')).toBe(8);
    expect(evaluateQuantity('1 dB/m * 3', 'dB/m', '--x')).toBe(3); // a compound unit at the head of a chain
  });

  it('too deep in --set, --sweep and evaluateQuantity: a located error at the option', () => {
    const deep = `${'('.repeat(300)}1${')'.repeat(300)}`;
    const set = inputError(netlist('let x = 1', 'resistor r2 a=in b=out value=x*1 ohm'), { set: [`x=${deep}`] });
    expect(errors(set).map((d) => [d.code, d.span!.file])).toEqual([['too-deep', '--set']]);
    const sweep = inputError(netlist(), { sweep: `linear start=${deep} GHz stop=2 GHz points=3` });
    expect(errors(sweep).map((d) => [d.code, d.span!.file])).toEqual([['too-deep', '--sweep']]);
    try {
      evaluateQuantity(deep, null, '--h');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      const d = (e as InputError).diagnostics[0]!;
      expect(d.code).toBe('too-deep');
      expect(d.span!.file).toBe('--h');
      expect(d.span!.column).toBeLessThanOrEqual(deep.length);
    }
  });

  it('a 10-million-character string: as a title, unclosed, full of escapes, as a data file name', () => {
    const long = 'a'.repeat(10_000_000);
    expect(loadNetlist(netlist(`title "${long}"`), FILE).circuit.title).toBe(long);
    // escapes resolved: \" is a quote (grammar/README.md, quoted strings)
    const escaped = loadNetlist(netlist(`title "${'\\"'.repeat(500_000)}"`), FILE).circuit.title;
    expect(escaped).toBe('"'.repeat(500_000));
    const open = inputError(netlist(`title "${long}`));
    expect(errors(open).map((d) => [d.code, d.message, d.span!.line, d.span!.column])).toEqual([['syntax', 'this quoted string is not closed', BASE.length + 1, 7]]);
    // the shown line is cut to a window around the caret, not ten million characters
    expect(open.message.length).toBeLessThan(1000);
    const data = inputError(netlist(`datafile d1 file="${long}.s2p"`, 'resistor r2 a=in b=out value=1 ohm'));
    expect(errors(data).length).toBeGreaterThan(0);
    expect(data.message.length).toBeLessThan(5000);
  });

  it('a 10-million-digit number, name and unit: one located error each, messages of one line', () => {
    for (const [value, code] of [
      ['1'.repeat(10_000_000), 'bad-number'],
      [`1 ${'q'.repeat(10_000_000)}`, 'unknown-unit'],
      ['q'.repeat(10_000_000), 'unknown-parameter'],
    ] as const) {
      const text = netlist(`resistor r2 a=in b=out value=${value}`);
      const e = inputError(text);
      expect(errors(e).map((d) => d.code)).toEqual([code]);
      expect(errors(e)[0]!.message.length).toBeLessThan(100);
      expectLocated(e, new Map([[FILE, text]]));
    }
  });

  it('stray characters: a run of ten million is one error; a thousand apart are ten and a count of the rest', () => {
    let text = netlist(`let x = 1 ${'!'.repeat(10_000_000)}`, 'resistor r2 a=in b=out value=x*1 ohm');
    let e = inputError(text);
    expect(errors(e).map((d) => [d.message, d.span])).toEqual([['unexpected character "!"', { file: FILE, line: BASE.length + 1, column: 11, length: 10_000_000 }]]);
    text = netlist(`let x = 1 ${'! '.repeat(1000)}`, 'resistor r2 a=in b=out value=x*1 ohm', 'title "a!b" # c!d');
    e = inputError(text);
    const es = errors(e);
    expect(es.length).toBe(11);
    expect(es.slice(0, 10).map((d) => d.span!.column)).toEqual(Array.from({ length: 10 }, (_, i) => 11 + 2 * i));
    expect(es[10]!.message).toBe('990 more unexpected characters on this line');
    expectLocated(e, new Map([[FILE, text]]));
  });

  it('random deep and long expressions (fast-check): the value computed in plain arithmetic, or a located too-deep error', () => {
    // wrappers around a sum of integers, each with its nesting cost: `(` 1, `abs(` 1, `-(` 2 (a sign and a parenthesis)
    const wrapper = fc.constantFrom(['(', 1, (x: number) => x], ['abs(', 1, Math.abs], ['-(', 2, (x: number) => -x], ['+(', 2, (x: number) => x]) as fc.Arbitrary<[string, number, (x: number) => number]>;
    const term = fc.integer({ min: -9, max: 9 });
    fc.assert(
      fc.property(fc.array(wrapper, { maxLength: 260 }), fc.array(term, { minLength: 1, maxLength: 3000 }), (wraps, terms) => {
        const body = terms.map((t, i) => (i === 0 ? String(t) : t < 0 ? `-${-t}` : `+${t}`)).join('');
        const text = wraps.map((w) => w[0]).join('') + body + ')'.repeat(wraps.length);
        const depth = wraps.reduce((s, w) => s + w[1], 0) + (terms[0]! < 0 ? 1 : 0);
        let expected = terms.reduce((s, t) => s + t, 0);
        for (let i = wraps.length - 1; i >= 0; i--) expected = wraps[i]![2](expected);
        try {
          const v = evaluateQuantity(text, null, '--x');
          expect(depth).toBeLessThanOrEqual(MAX_EXPRESSION_DEPTH);
          expect(v).toBe(expected + 0); // + 0: -0 and 0 alike
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          expect(depth).toBeGreaterThan(MAX_EXPRESSION_DEPTH);
          expect(e.diagnostics.map((d) => d.code)).toEqual(['too-deep']);
          expectLocated(e, new Map([['--x', text]]));
        }
      }),
      { numRuns: 60, seed: 14_2026 },
    );
  });
});

describe('error rendering', () => {
  it('20,000 bad lines: every error reported, each rendered with its own line and caret', () => {
    const bad = Array.from({ length: 20_000 }, (_, i) => `resistor r${i + 2} a=in b=out value=(${i}`);
    const text = netlist(...bad);
    const e = inputError(text);
    const es = errors(e);
    expect(es.length).toBe(20_000);
    const blocks = formatDiagnostics(es, e.sources).split('\n\n');
    expect(blocks.length).toBe(20_000);
    blocks.forEach((b, i) => {
      const line = bad[i]!;
      const [, shown, caret] = b.split('\n');
      expect(shown).toBe(` ${BASE.length + 1 + i} | ${line}`);
      // the caret just past the last character: the line ends where `)` was expected
      expect(caret!.indexOf('^') - caret!.indexOf('|') - 2).toBe(line.length);
    });
  });

  for (const [name, br] of [
    ['a lone carriage return', '\r'],
    ['carriage return and line feed', '\r\n'],
    ['line feed', '\n'],
  ] as const) {
    it(`${name} breaks lines for the display as for the grammar (line number, shown line, caret)`, () => {
      const lines = [...BASE, 'let a = 1', 'let b = (2', 'capacitor c1 a=in b=ground value=3 pq'];
      const text = lines.join(br) + br;
      const e = inputError(text);
      const es = errors(e);
      expect(es.map((d) => [d.span!.line, d.span!.column])).toEqual([
        [BASE.length + 2, 'let b = (2'.length + 1],
        [BASE.length + 3, 'capacitor c1 a=in b=ground value=3 '.length + 1],
      ]);
      const out = formatDiagnostics(es, e.sources).split('\n');
      expect(out[1]).toBe(` ${BASE.length + 2} | let b = (2`);
      expect(out[2]).toBe(`   | ${' '.repeat('let b = (2'.length)}^`);
      const second = out.indexOf(` ${BASE.length + 3} | capacitor c1 a=in b=ground value=3 pq`);
      expect(second).toBeGreaterThan(0);
      expect(out[second + 1]).toBe(`   | ${' '.repeat('capacitor c1 a=in b=ground value=3 '.length)}^^`);
    });
  }

  it('a backslash continues a line before a lone carriage return too', () => {
    for (const br of ['\r', '\r\n', '\n']) {
      const text = [...BASE, `let a = 1 + \\${br}  2`, 'resistor r2 a=in b=out value=a*1 ohm'].join(br) + br;
      expect(parameter(text, 'a')).toBe(3);
    }
  });

  it('a long line is shown as a window around the caret, the caret still under its text', () => {
    const line = `${'x'.repeat(500)}ERR${'y'.repeat(10)}`;
    const out = formatDiagnostics([{ severity: 'error', code: 'c', message: 'm', span: { file: FILE, line: 2, column: 501, length: 3 } }], new Map([[FILE, `a\n${line}\n`]]));
    const [, shown, caret] = out.split('\n');
    expect(shown!.length).toBeLessThan(130);
    expect(shown!.startsWith(' 2 | …')).toBe(true);
    expect(shown!.slice(caret!.indexOf('^'), caret!.lastIndexOf('^') + 1)).toBe('ERR');
  });

  it('a mix of line breaks in one file: each error quotes its own line', () => {
    const text = 'let a = (1\rlet b = (2\r\nlet c = (3\nlet d = (4';
    const bag = new DiagnosticBag();
    parseNetlist(text, FILE, bag);
    const out = formatDiagnostics(bag.items, new Map([[FILE, text]]));
    for (const [i, l] of ['let a = (1', 'let b = (2', 'let c = (3', 'let d = (4'].entries()) expect(out).toContain(` ${i + 1} | ${l}\n   | ${' '.repeat(l.length)}^`);
  });
});

describe('hints', () => {
  it('an unquoted file name says that file names are quoted (datafile and include)', () => {
    let e = inputError(netlist('datafile d1 file=hemt.s2p'));
    expect(errors(e)).toEqual([
      {
        severity: 'error',
        code: 'syntax',
        message: '`hemt.s2p` looks like a file name: file names are written in quotes',
        span: { file: FILE, line: BASE.length + 1, column: 'datafile d1 file='.length + 1, length: 'hemt.s2p'.length },
        help: 'write `file="hemt.s2p"`',
      },
    ]);
    e = inputError(netlist('include parts/lowpass.sbx'));
    expect(errors(e).map((d) => [d.message, d.help])).toEqual([['`parts/lowpass.sbx` looks like a file name: file names are written in quotes', 'write `include "parts/lowpass.sbx"`']]);
  });

  it('a unit that is a prefix alone: suggested within the expected dimension (`1p` for a capacitance → `pF`)', () => {
    const cases: [string, string][] = [
      ['capacitor c1 a=in b=ground value=1p', 'pF'],
      ['inductor l1 a=in b=ground value=10n', 'nH'],
      ['resistor r2 a=in b=ground value=1k', 'kohm'],
      ['capacitor c1 a=in b=ground value=1 pf', 'pF'],
      ['inductor l1 a=in b=ground value=10 nh', 'nH'],
    ];
    for (const [line, unit] of cases) {
      const es = errors(inputError(netlist(line)));
      expect(es.map((d) => [d.code, d.help])).toEqual([['unknown-unit', `did you mean \`${unit}\`?`]]);
    }
    // with no dimension known (a parameter), a bare prefix says what it is
    const es = errors(inputError(netlist('let c = 1p', 'capacitor c1 a=in b=ground value=c')));
    expect(es[0]!.help).toBe('`p` is a prefix: write it with its unit, e.g. `pF`, `pH` or `ps`');
  });

  it('the suggested units convert as their prefixes say (SI Brochure, table 7)', () => {
    expect(evaluateQuantity('1 pF', 'F', '--x')).toBeCloseTo(1e-12, 24);
    expect(evaluateQuantity('10 nH', 'H', '--x')).toBeCloseTo(1e-8, 20);
    expect(evaluateQuantity('1 kohm', 'ohm', '--x')).toBe(1000);
  });
});

describe('names that are JavaScript object keys', () => {
  const keys = ['constructor', '__proto__', 'hasOwnProperty', 'toString', 'valueOf', 'isPrototypeOf', '__defineGetter__'];

  it('as a parameter, a function, a unit: located errors, never a TypeError', () => {
    for (const k of keys) {
      for (const [line, code] of [
        [`capacitor c1 a=in b=ground value=${k}`, 'unknown-parameter'],
        [`capacitor c1 a=in b=ground value=${k}(1)`, 'unknown-function'],
        [`capacitor c1 a=in b=ground value=1 ${k}`, 'unknown-unit'],
        [`let x = 2*${k}`, 'unknown-parameter'],
      ] as const) {
        const text = netlist(line);
        const e = inputError(text);
        expect(errors(e).map((d) => d.code), line).toEqual([code]);
        expectLocated(e, new Map([[FILE, text]]));
      }
    }
  });

  it('in evaluateQuantity (the options of the command line)', () => {
    for (const k of keys) {
      for (const text of [k, `${k}(2)`, `1 ${k}`, `pi*${k}`]) {
        expect(() => evaluateQuantity(text, null, '--x'), text).toThrow(InputError);
      }
    }
    expect(evaluateQuantity('2*pi', null, '--x')).toBe(2 * Math.PI);
    expect(evaluateQuantity('e', null, '--x')).toBe(Math.E);
  });
});

describe('messages name no internal function', () => {
  const leaks = /function|Unexpected type|addScalar|index:|expected:|actual:|Unit in|cot\b/;

  it('arithmetic across units, functions of the wrong kind, complex and infinite results', () => {
    const cases: [string, RegExp][] = [
      ['1 + 2 ohm', /^cannot add a plain number and a resistance \(ohm\): their units do not match$/],
      ['2 ohm - 1 F', /^cannot subtract a resistance \(ohm\) and a capacitance \(F\): their units do not match$/],
      ['sin(2 ohm)', /^`sin` cannot take a resistance \(ohm\)$/],
      ['ln(2 ohm)', /^`ln` cannot take a resistance \(ohm\)$/],
      ['min(1 ohm, 2)', /^`min` cannot take a resistance \(ohm\) and a plain number$/],
      ['round(2.5 ohm)', /^`round` cannot take a resistance \(ohm\)$/],
      ['sqrt(-2 ohm)', /^the result is not a real number$/],
      ['(-8)^(1/3)', /^the result is not a real number$/],
      ['1e300 ohm * 1e300 ohm', /^the result is not a finite number$/],
      ['2 ^ (1 ohm)', /^cannot raise a plain number and a resistance \(ohm\): an exponent must be a plain number$/],
    ];
    for (const [text, message] of cases) {
      try {
        evaluateQuantity(text, null, '--x');
        expect.unreachable(text);
      } catch (e) {
        expect(e, text).toBeInstanceOf(InputError);
        const d = (e as InputError).diagnostics[0]!;
        expect(d.message, text).toMatch(message);
        expect(d.span!.file).toBe('--x');
      }
    }
  });

  it('random operations on quantities of random units (fast-check): plain messages, located in the input', () => {
    const q = fc.constantFrom('2', '3 ohm', '1 F', '2 nH', '5 GHz', '1 m', '0.5 rad', '-4', '1 dB', '2 S', '0');
    const op = fc.constantFrom('+', '-', '*', '/', '^');
    const fn = fc.constantFrom('', 'sqrt', 'exp', 'ln', 'log10', 'sin', 'cos', 'tan', 'atan', 'abs', 'round', 'min', 'max');
    const operand = fc.tuple(fn, q, q).map(([f, a, b]) => (f === '' ? `(${a})` : f === 'min' || f === 'max' ? `${f}(${a}, ${b})` : `${f}(${a})`));
    fc.assert(
      fc.property(operand, fc.array(fc.tuple(op, operand), { maxLength: 4 }), (first, rest) => {
        const text = first + rest.map(([o, x]) => ` ${o} ${x}`).join('');
        try {
          const v = evaluateQuantity(text, null, '--x');
          expect(Number.isFinite(v)).toBe(true);
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          for (const d of e.diagnostics) {
            expect(d.message).not.toMatch(leaks);
            expect(d.help ?? '').not.toMatch(leaks);
          }
          expectLocated(e, new Map([['--x', text]]));
        }
      }),
      { numRuns: 300, seed: 1_414 },
    );
  });
});
