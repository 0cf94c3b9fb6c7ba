// Issue 14, elaboration and loading: every bad input below is a located error (or the right
// result), never a crash, a hang or an unbounded allocation. Each test carries its reproducer.
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { expandInputs } from '../src/io/inputs.js';
import { readNetworkFile } from '../src/io/read.js';
import { InputFileError } from '../src/io/source-file.js';
import { MAX_BLOCK_DEPTH, MAX_EXPANDED_ELEMENTS, MAX_FILE_BYTES, MAX_INCLUDE_DEPTH, MAX_PORTS, MAX_SWEEP_POINTS } from '../src/limits.js';
import { evaluateQuantity, loadNetlist, loadNetlistFile, type LoadOptions } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';

const lines = (...l: string[]) => l.join('\n') + '\n';
const LOAD = 'resistor r a=in b=ground value=50 ohm';
const PORT = 'port 1 plus=in';
const SWEEP = 'sweep list freqs=1 GHz';

/** The diagnostics of a load that must fail (an InputError, nothing else). */
function failing(text: string, options: LoadOptions = {}, file = 'h.sbx'): Diagnostic[] {
  try {
    loadNetlist(text, file, options);
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics;
    throw e;
  }
  throw new Error('expected an InputError');
}
const errorsOf = (text: string, options?: LoadOptions, file?: string) => failing(text, options, file).filter((d) => d.severity === 'error');

/** Every error has a place inside an input (a file, --set or --sweep), with a line and column. */
function expectLocated(ds: Diagnostic[]): void {
  expect(ds.length).toBeGreaterThan(0);
  for (const d of ds) {
    expect(d.span, d.message).toBeDefined();
    expect(d.span!.line).toBeGreaterThanOrEqual(1);
    expect(d.span!.column).toBeGreaterThanOrEqual(1);
    // no message names an internal function (camelCase followed by a colon)
    expect(d.message).not.toMatch(/\b[a-z]+[A-Z][A-Za-z]*:/);
  }
}

const dir = mkdtempSync(join(tmpdir(), 'sbx-hard-elab-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('names that are keys of JavaScript objects', () => {
  it('`let constructor`, `__proto__`, `hasOwnProperty`, `toString` are ordinary parameters', () => {
    const text = lines(
      'let constructor = 2',
      'let __proto__ = 3',
      'let hasOwnProperty = 5 ohm',
      'let toString = 7',
      'resistor r1 a=in b=ground value=constructor*__proto__*toString*hasOwnProperty',
      PORT,
      SWEEP,
    );
    const r = loadNetlist(text, 'h.sbx');
    expect(r.warnings).toEqual([]);
    expect(r.circuit.elements[0]!.props.value).toBe(210); // 2·3·7·5 ohm
    expect(r.circuit.parameters.map((p) => p.name)).toEqual(['constructor', '__proto__', 'hasOwnProperty', 'toString']);
  });

  it('blocks, block parameters, nodes, elements and specs may carry such names', () => {
    const text = lines(
      'block constructor terminals=__proto__ toString=50 ohm',
      '  resistor hasOwnProperty a=__proto__ b=ground value=toString',
      'end',
      'constructor valueOf __proto__=constructor toString=25 ohm',
      'port 1 plus=constructor',
      SWEEP,
      'spec toString measure=rl(1) min=1 dB over=0.5 GHz, 2 GHz',
    );
    const r = loadNetlist(text, 'h.sbx');
    expect(r.circuit.elements.map((e) => [e.name, e.props.value])).toEqual([['valueOf.hasOwnProperty', 25]]);
    expect(r.circuit.nodeNames).toEqual(['constructor']);
    expect(r.circuit.specs.map((s) => s.name)).toEqual(['toString']);
  });

  it('`--set constructor=…` overrides a parameter of that name', () => {
    const text = lines('let constructor = 50 ohm', 'resistor r1 a=in b=ground value=constructor', PORT, SWEEP);
    const r = loadNetlist(text, 'h.sbx', { set: ['constructor=75 ohm'] });
    expect(r.circuit.elements[0]!.props.value).toBe(75);
  });

  it('`--set __proto__=1` of a netlist without it is a located error with a suggestion', () => {
    for (const name of ['__proto__', 'constructor', 'hasOwnProperty', 'toString']) {
      const ds = errorsOf(lines('let x = 1', LOAD, PORT, SWEEP), { set: [`${name}=1`] });
      expect(ds).toEqual([expect.objectContaining({ code: 'unknown-parameter', message: `\`--set ${name}\`: the netlist has no parameter \`${name}\``, span: expect.objectContaining({ file: '--set', line: 1 }) })]);
    }
  });
});

describe('nesting without recursion as deep as the input', () => {
  /** Blocks b1 … bn, each using the next; bn holds one resistor (or uses b1 when `cycle`). */
  function chain(n: number, cycle = false, uses = 1): string {
    const out: string[] = [];
    for (let i = 1; i <= n; i++) {
      out.push(`block b${i} terminals=p`);
      if (i < n || cycle) for (let k = 0; k < uses; k++) out.push(`  b${i < n ? i + 1 : 1} u${k} p=p`);
      else out.push('  resistor r a=p b=ground value=50 ohm');
      out.push('end');
    }
    out.push('b1 top p=in', PORT, SWEEP);
    return lines(...out);
  }

  it(`2,000 nested block instances stop at MAX_BLOCK_DEPTH (${MAX_BLOCK_DEPTH}) with a located error`, () => {
    const text = chain(2000);
    const ds = errorsOf(text);
    expectLocated(ds);
    expect(ds).toEqual([expect.objectContaining({ code: 'too-deep', message: `an instance of block \`b1\` opens 2000 levels of nested block instances (at most ${MAX_BLOCK_DEPTH})`, span: expect.objectContaining({ line: 2000 * 3 + 1, column: 1 }) })]);
  });

  it('nesting up to the limit flattens to the one element at the bottom', () => {
    const r = loadNetlist(chain(MAX_BLOCK_DEPTH), 'h.sbx');
    expect(r.circuit.elements).toHaveLength(1);
    expect(r.circuit.elements[0]!.name).toBe(`top.${Array.from({ length: MAX_BLOCK_DEPTH - 1 }, () => 'u0.').join('')}r`);
  });

  it('a 3,000-block cycle is one located "contains itself" error at the instance that closes it', () => {
    const ds = errorsOf(chain(3000, true));
    expectLocated(ds);
    expect(ds).toHaveLength(1);
    expect(ds[0]).toMatchObject({ code: 'recursive-block', span: { line: 2999 * 3 + 2, column: 3 } });
    expect(ds[0]!.message).toBe('block `b1` contains itself: b1 → b2 → b3 → b4 → b5 → … (2991 more) … → b2997 → b2998 → b2999 → b3000 → b1');
  });

  it(`a 3,000-file include chain stops at MAX_INCLUDE_DEPTH (${MAX_INCLUDE_DEPTH}) at the include that goes too deep`, () => {
    const files = new Map<string, string>();
    for (let i = 1; i <= 3000; i++) files.set(join(dir, `f${i}.sbx`), lines(`include "f${i + 1}.sbx"`));
    const readFile = (p: string) => {
      const t = files.get(p);
      if (t === undefined) throw Object.assign(new Error('no such file'), { code: 'ENOENT' });
      return t;
    };
    const top = join(dir, 'top.sbx');
    const ds = errorsOf(lines('include "f1.sbx"', LOAD, PORT, SWEEP), { readFile }, top);
    expectLocated(ds);
    expect(ds).toEqual([expect.objectContaining({ code: 'too-deep', message: `includes nest more than ${MAX_INCLUDE_DEPTH} files deep here (the limit of nested includes)`, span: expect.objectContaining({ file: join(dir, `f${MAX_INCLUDE_DEPTH}.sbx`), line: 1, column: 9 }) })]);
  });

  it('30 blocks each using the next twice (2^30 elements) stop at MAX_EXPANDED_ELEMENTS before expanding', () => {
    const text = chain(30, false, 2);
    expect(text.length).toBeLessThan(2100); // the reproducer: about 2 KB of text
    const ds = errorsOf(text);
    expectLocated(ds);
    expect(ds).toEqual([
      expect.objectContaining({
        code: 'too-many-elements',
        message: `an instance of block \`b1\` expands to ${2 ** 29} elements; with the others that is more than ${MAX_EXPANDED_ELEMENTS} (the limit of elements after blocks are expanded)`,
        span: expect.objectContaining({ line: 30 * 4, column: 1 }),
      }),
    ]);
  });

  it('the count made before expanding is the count expansion gives (2^10 resistors in parallel)', () => {
    const r = loadNetlist(chain(11, false, 2), 'h.sbx');
    expect(r.circuit.elements).toHaveLength(2 ** 10);
    // 1024 resistors of 50 ohm in parallel: 50/1024 ohm; S11 = (R − 50)/(R + 50) (closed form)
    const R = 50 / 1024;
    expect(solveSweep(r.circuit).values[0]).toBeCloseTo((R - 50) / (R + 50), 12);
  });
});

describe('only regular files are read', () => {
  const fifo = join(dir, 'pipe.sbx');
  execFileSync('mkfifo', [fifo]);
  const folder = join(dir, 'folder.sbx');
  mkdirSync(folder);
  const top = (include: string) => {
    const p = join(dir, `top-${Math.random().toString(36).slice(2)}.sbx`);
    writeFileSync(p, lines(include, LOAD, PORT, SWEEP));
    return p;
  };
  function fileErrors(path: string): Diagnostic[] {
    try {
      loadNetlistFile(path);
    } catch (e) {
      if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error');
      throw e;
    }
    throw new Error('expected an InputError');
  }

  it('a FIFO as the netlist is refused without being opened (naming the path)', () => {
    expect(() => loadNetlistFile(fifo)).toThrow(InputFileError);
    try {
      loadNetlistFile(fifo);
    } catch (e) {
      expect(e).toMatchObject({ code: 'ENOTREG', path: fifo, message: 'is not a regular file (a pipe, device or socket); only regular files are read' });
    }
  });

  it('a folder and a missing file as the netlist', () => {
    expect(() => loadNetlistFile(folder)).toThrow(expect.objectContaining({ code: 'EISDIR', path: folder, message: 'is a folder, not a file' }));
    expect(() => loadNetlistFile(join(dir, 'nowhere.sbx'))).toThrow(expect.objectContaining({ code: 'ENOENT', message: 'no such file' }));
  });

  it('`include "/dev/zero"`, a FIFO and a folder as included files: errors at the file name', () => {
    for (const [name, why] of [
      ['/dev/zero', 'is not a regular file (a pipe, device or socket); only regular files are read'],
      [fifo, 'is not a regular file (a pipe, device or socket); only regular files are read'],
      [folder, 'is a folder, not a file'],
      [join(dir, 'nowhere.sbx'), 'no such file'],
    ]) {
      const p = top(`include "${name}"`);
      const ds = fileErrors(p);
      expectLocated(ds);
      expect(ds).toEqual([expect.objectContaining({ code: 'bad-include', message: `cannot read ${JSON.stringify(name)}: ${why}`, span: expect.objectContaining({ file: p, line: 1, column: 9 }) })]);
    }
  });

  it('a FIFO and /dev/zero as data files: errors at `file=`', () => {
    for (const name of [fifo, '/dev/zero']) {
      const p = top(`datafile d file="${name}" p1=in`);
      const ds = fileErrors(p);
      expectLocated(ds);
      expect(ds).toEqual([expect.objectContaining({ code: 'bad-data-file', message: `cannot read ${JSON.stringify(name)}: is not a regular file (a pipe, device or socket); only regular files are read`, span: expect.objectContaining({ file: p, line: 1, column: 17 }) })]);
    }
    expect(() => readNetworkFile(fifo)).toThrow(expect.objectContaining({ code: 'ENOTREG', path: fifo }));
    expect(() => readNetworkFile('/dev/zero')).toThrow(expect.objectContaining({ code: 'ENOTREG' }));
  });

  it(`a file over MAX_FILE_BYTES (${MAX_FILE_BYTES}) is refused before it is read`, () => {
    const big = join(dir, 'big.s2p');
    writeFileSync(big, '');
    truncateSync(big, MAX_FILE_BYTES + 1); // sparse: no data is written
    expect(() => readNetworkFile(big)).toThrow(expect.objectContaining({ code: 'EFBIG', message: `is ${MAX_FILE_BYTES + 1} bytes, larger than ${MAX_FILE_BYTES} bytes (the limit of file size)` }));
    const p = top('include "big.s2p"');
    expect(fileErrors(p)).toEqual([expect.objectContaining({ code: 'bad-include', span: expect.objectContaining({ file: p, line: 1, column: 9 }) })]);
    rmSync(big);
  });

  it('folders and patterns expand to regular files only', () => {
    const d = join(dir, 'batch');
    mkdirSync(d);
    writeFileSync(join(d, 'a.sbx'), lines(LOAD, PORT, SWEEP));
    execFileSync('mkfifo', [join(d, 'b.sbx')]);
    mkdirSync(join(d, 'c.sbx'));
    expect(expandInputs([d])).toEqual([join(d, 'a.sbx')]);
    expect(expandInputs([join(d, '*.sbx')])).toEqual([join(d, 'a.sbx')]);
  });
});

describe('ports and references', () => {
  it('`port 99999999999999999999999999`, `port 100000000` and `port 1001` state MAX_PORTS', () => {
    for (const n of ['99999999999999999999999999', '100000000', String(MAX_PORTS + 1)]) {
      const ds = errorsOf(lines(LOAD, PORT, `port ${n} plus=in`, SWEEP));
      expectLocated(ds);
      expect(ds).toEqual([expect.objectContaining({ code: 'too-many-ports', span: expect.objectContaining({ line: 3, column: 6 }) })]);
      expect(ds[0]!.message).toContain(`at most ${MAX_PORTS} (the limit of ports)`);
    }
  });

  it('a gap before a high port number is listed briefly', () => {
    const ds = errorsOf(lines(LOAD, `port ${MAX_PORTS} plus=in`, SWEEP));
    expect(ds).toEqual([expect.objectContaining({ code: 'port-gap', message: `ports must be numbered from 1 without gaps; ports 1, 2, 3, 4, 5, 6, 7, 8, 9, 10 … ${MAX_PORTS - 1} (${MAX_PORTS - 1} in all) are missing` })]);
  });

  it('a port on a node that nothing else touches is an error', () => {
    const ds = errorsOf(lines(LOAD, PORT, 'port 2 plus=outt', SWEEP));
    expectLocated(ds);
    expect(ds).toEqual([expect.objectContaining({ code: 'port-on-bare-node', message: 'port 2 is on node `outt`, which no element touches', span: expect.objectContaining({ line: 3, column: 13 }) })]);
  });

  it('`ref=1e300 ohm` (NaN before) and other references outside 1e-6 … 1e9 ohm are located errors', () => {
    for (const [ref, col] of [['ref=1e300 ohm', 20], ['ref=1e-7 ohm', 20], ['ref=2e9 ohm', 20], ['ref_x=1e300 ohm', 22]] as const) {
      const ds = errorsOf(lines(LOAD, `port 1 plus=in ${ref}`, SWEEP));
      expectLocated(ds);
      expect(ds).toEqual([expect.objectContaining({ code: 'bad-value', span: expect.objectContaining({ line: 2, column: col }) })]);
    }
    // the ends of the range are allowed, and solve to finite numbers: S11 = (R − Z0)/(R + Z0)
    for (const z0 of [1e-6, 1e9]) {
      const r = loadNetlist(lines(LOAD, `port 1 plus=in ref=${z0} ohm`, SWEEP), 'h.sbx');
      expect(solveSweep(r.circuit).values[0]).toBeCloseTo((50 - z0) / (50 + z0), 9);
    }
  });

  it('values that overflow to Infinity are errors at their statement', () => {
    const cases: [string, number, number][] = [
      ['let x = 1e308*10', 1, 9],
      ['let x = 1e300 ohm * 1e300', 1, 9],
      ['resistor r2 a=in b=ground value=1e300 ohm * 1e300', 1, 33],
      ['block b terminals=p v=1e300 ohm * 1e300\n  resistor r a=p b=ground value=v\nend\nb u1 p=in', 1, 23],
    ];
    for (const [line, l, c] of cases) {
      const ds = errorsOf(lines(line, LOAD, PORT, SWEEP));
      expectLocated(ds);
      expect(ds).toEqual([expect.objectContaining({ span: expect.objectContaining({ line: l, column: c }) })]);
      expect(ds[0]!.message).toMatch(/not (a )?finite/);
    }
  });
});

describe('sweeps', () => {
  const freqs = (sweep: string) => Array.from(loadNetlist(lines(LOAD, PORT, sweep), 'h.sbx').circuit.frequencies);

  it(`\`per_decade=1e308\`, huge \`points\` and several segments together stop at MAX_SWEEP_POINTS (${MAX_SWEEP_POINTS})`, () => {
    const cases: [string, RegExp][] = [
      ['sweep log start=1 MHz stop=1 GHz per_decade=1e308', /the sweep would have more than 10\^15 points/],
      ['sweep linear start=1 MHz stop=1 GHz points=1e8', /`points` must be a whole number from 1 to 10000000/],
      ['sweep linear start=0 Hz stop=1 GHz step=1e-300 Hz', /the sweep would have more than 10\^15 points/],
      ['sweep linear start=1 MHz stop=1 GHz points=6000000\nsweep linear start=1 GHz stop=2 GHz points=6000000', /the sweep would have 12000000 points, all segments together \(at most 10000000\)/],
    ];
    for (const [sweep, message] of cases) {
      const ds = errorsOf(lines(LOAD, PORT, sweep));
      expectLocated(ds);
      expect(ds).toHaveLength(1);
      expect(ds[0]!.message).toMatch(message);
    }
  });

  it('a log sweep from 1e-300 Hz gives all its points (the ratio stop/start overflows; the logarithms do not)', () => {
    const f = freqs('sweep log start=1e-300 Hz stop=1 GHz points=5');
    expect(f).toHaveLength(5);
    // 10^(−300 + k·309/4) (definition of a logarithmic sweep), to 1e-14 relative
    f.forEach((x, k) => expect(Math.abs(x / 10 ** (-300 + (k * 309) / 4) - 1)).toBeLessThan(1e-14));
  });

  it('a log sweep from 1e-320 MHz gives finite, ascending points', () => {
    const f = freqs('sweep log start=1e-320 MHz stop=1 GHz per_decade=2');
    expect(f.length).toBeGreaterThan(600);
    expect(f.every((x, i) => Number.isFinite(x) && x > 0 && (i === 0 || x > f[i - 1]!))).toBe(true);
    expect(f[f.length - 1]).toBe(1e9);
  });

  it('points are the doubles nearest to their decimal values, so a listed point merges with them', () => {
    // 1 GHz + k·0.1 GHz: the decimal k-th point is Number(`${10 + k}e8`) (exact decimal arithmetic)
    const f = freqs('sweep linear start=1 GHz stop=3 GHz step=0.1 GHz\nsweep list freqs=2 GHz');
    expect(f).toEqual(Array.from({ length: 21 }, (_, k) => Number(`${10 + k}e8`)));
    const g = freqs('sweep linear start=0.1 GHz stop=0.3 GHz points=21');
    expect(g).toEqual(Array.from({ length: 21 }, (_, k) => Number(`${100 + 10 * k}e6`)));
  });

  it('a log sweep lands on its decades exactly and on 10^(k/n) elsewhere to 1e-14', () => {
    const f = freqs('sweep log start=1 MHz stop=1 GHz per_decade=10');
    expect(f).toHaveLength(31);
    for (const d of [1e6, 1e7, 1e8, 1e9]) expect(f).toContain(d); // 9999999.999999998 before
    f.forEach((x, k) => expect(Math.abs(x / 10 ** (6 + k / 10) - 1)).toBeLessThan(1e-14));
  });

  it('points that differ only in their 16th digit stay apart', () => {
    // 2e-12 apart (points closer than 1e-12 relative are one point): rounding them to 15 digits
    // would move each by far more than a millionth of the distance between them
    const f = freqs('sweep list freqs=1000000000002001 Hz, 1000000000004003 Hz');
    expect(f).toEqual([1000000000002001, 1000000000004003]);
  });
});

describe('microstrip outside its models', () => {
  const ms = (props: string) => lines(`microstrip m a=in b=out ${props}`, 'resistor r a=out b=ground value=50 ohm', PORT, SWEEP);

  it('a width far outside the models is an error at `w`, naming no internal function', () => {
    const ds = errorsOf(ms('w=1e-15 m h=0.8 mm t=35 um er=4.4 length=10 mm'));
    expectLocated(ds);
    expect(ds).toEqual([expect.objectContaining({ code: 'bad-element', span: expect.objectContaining({ line: 1, column: 25 }) })]);
    expect(ds[0]!.message).toMatch(/^the microstrip model cannot be evaluated for w\/h = 1.25e-12/);
  });

  it('w=1e-9 m and w=1 km are outside the stated ranges: warnings, and finite results', () => {
    for (const w of ['1e-9 m', '1 km']) {
      const r = loadNetlist(ms(`w=${w} h=0.8 mm t=35 um er=4.4 length=10 mm`), 'h.sbx');
      expect(r.warnings.map((d) => d.code)).toContain('element-range');
      expect(solveSweep(r.circuit).values.every(Number.isFinite)).toBe(true);
    }
  });

  it('a dispersion the model cannot evaluate at a sweep frequency is a located error, not an exception mid-solve', () => {
    // εr = 128, w/h = 1e-3 at 100 GHz: the Jansen–Kirschning ratio R13/R14 turns negative
    const text = lines('microstrip m a=in b=out w=0.8 um h=0.8 mm t=0.1 um er=128 length=1 mm', 'resistor r a=out b=ground value=50 ohm', PORT, 'sweep list freqs=1 GHz, 100 GHz');
    const ds = errorsOf(text);
    expectLocated(ds);
    expect(ds).toEqual([expect.objectContaining({ code: 'bad-element', span: expect.objectContaining({ line: 1, column: 1 }) })]);
    expect(ds[0]!.message).toMatch(/^`m`: the microstrip model cannot be evaluated at 100 GHz: /);
  });
});

describe('text arguments', () => {
  it('`file=hemt` without quotes: file names are quoted', () => {
    const ds = errorsOf(lines('datafile d file=hemt p1=in', LOAD, PORT, SWEEP));
    expectLocated(ds);
    expect(ds).toEqual([expect.objectContaining({ code: 'bad-value', message: '`file` takes a quoted string: file names are quoted', help: 'write `file="hemt"`', span: expect.objectContaining({ line: 1, column: 17, length: 4 }) })]);
  });
});

describe('quantities of options', () => {
  it('a value that overflows is an error at the option', () => {
    expect(() => evaluateQuantity('1e300 m * 1e300', 'm', '--h')).toThrow(InputError);
    try {
      evaluateQuantity('1e300 m * 1e300', 'm', '--h');
    } catch (e) {
      expect((e as InputError).diagnostics).toEqual([expect.objectContaining({ code: 'bad-number', message: 'the result is not a finite number', span: expect.objectContaining({ file: '--h', line: 1, column: 1 }) })]);
    }
    expect(evaluateQuantity('1.6 mm', 'm', '--h')).toBeCloseTo(1.6e-3, 15);
  });
});

describe('--set', () => {
  const T = lines('let x = 50 ohm', 'resistor r a=in b=ground value=x', PORT, SWEEP);

  it('the same name twice is an error at the second', () => {
    const ds = errorsOf(T, { set: ['x=60 ohm', 'x=70 ohm'] });
    expect(ds).toEqual([expect.objectContaining({ code: 'duplicate-override', message: '`x` is given twice with --set (first as --set number 1)', span: { file: '--set', line: 2, column: 1, length: 1 } })]);
  });

  it('an unknown name (with did-you-mean), a bad expression and a wrong unit are all located at --set', () => {
    expect(errorsOf(T, { set: ['xx=3 ohm'] })).toEqual([expect.objectContaining({ code: 'unknown-parameter', help: 'did you mean `x`?', span: expect.objectContaining({ file: '--set', line: 1, column: 1 }) })]);
    expect(errorsOf(T, { set: ['x=zz'] })).toEqual([expect.objectContaining({ code: 'unknown-parameter', span: expect.objectContaining({ file: '--set', line: 1, column: 3 }) })]);
    expect(errorsOf(T, { set: ['x=5 GHz'] })).toEqual([
      expect.objectContaining({ code: 'wrong-unit', message: "`--set x`: the netlist's `x` is a resistance (ohm), but this is a frequency (Hz)", span: expect.objectContaining({ file: '--set', line: 1, column: 3 }) }),
    ]);
    expect(errorsOf(T, { set: ['x 5'] })).toEqual([expect.objectContaining({ code: 'bad-override', span: expect.objectContaining({ file: '--set', line: 1, column: 1 }) })]);
  });
});

describe('strict', () => {
  const T = lines('let unused = 3', LOAD, PORT, SWEEP);

  it('without it a warning is only a warning', () => {
    expect(loadNetlist(T, 'h.sbx').warnings).toEqual([expect.objectContaining({ severity: 'warning', code: 'unused-parameter' })]);
  });

  it('with it every warning is an error with the same code, message and place', () => {
    const warning = loadNetlist(T, 'h.sbx').warnings[0]!;
    expect(failing(T, { strict: true })).toEqual([{ ...warning, severity: 'error' }]);
  });
});
