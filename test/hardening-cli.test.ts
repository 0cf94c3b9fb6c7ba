// Issue 14 (hardening), the command line: the compiled CLI (npm test builds it first) run as a user
// would run it, with the reproducers of the new user's trial — option values, batch messages,
// reference impedances in comparisons, check without specs, reports on input errors, --at, --strict.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as math from 'mathjs';
import { beforeAll, describe, expect, it } from 'vitest';
import { formatTouchstone, parseTouchstone } from '../src/io/touchstone.js';
import type { NetworkData } from '../src/network/types.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');

function run(args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

// A series 50 ohm resistor between two 50 ohm ports: S11 = Z/(Z+2Z0) = 1/3, S21 = 2/3 (closed form
// of a series impedance, common practice).
const SERIES = `title "series resistor"
let rs = 50 ohm
resistor r1 a=p1 b=p2 value=rs
port 1 plus=p1
port 2 plus=p2
sweep list freqs=1 MHz, 10 MHz
`;
const SPEC = 'spec s21 measure=il(2,1) max=4 dB over=1 MHz, 10 MHz\n';
// A node on two 1e13 ohm resistors: reciprocal condition near 5e-12, the solver warns (see test/singular.test.ts).
const NEAR = 'resistor r1 a=in b=ground value=50 ohm\nresistor rx a=in b=mid value=1e13 ohm\nresistor rl a=mid b=ground value=1e13 ohm\nport 1 plus=in\nsweep list freqs=1 MHz\n';
// An isolated lossless tank at resonance: no unique nodal solution (see test/singular.test.ts).
const SINGULAR = 'let f0 = 1 MHz\nlet l = 1 uH\nresistor r1 a=in b=ground value=50 ohm\ninductor l1 a=t b=ground value=l\ncapacitor c1 a=t b=ground value=1/((2*pi*f0)^2*l)\nport 1 plus=in\nsweep list freqs=f0\n';

/**
 * S of a series impedance Z between port 1 (reference r1) and port 2 (reference r2), real
 * references, power waves: S11 = (Z + r2 − r1)/(Z + r1 + r2), S22 = (Z + r1 − r2)/(Z + r1 + r2),
 * S21 = S12 = 2·√(r1·r2)/(Z + r1 + r2) (closed form, common practice).
 */
function seriesZ(zr: number, zi: number, r1: number, r2 = r1, freqs = [1e6, 1e7]): NetworkData {
  const d = math.complex(zr + r1 + r2, zi);
  const z = math.complex(zr, zi);
  const s11 = math.divide(math.add(z, r2 - r1), d) as math.Complex;
  const s22 = math.divide(math.add(z, r1 - r2), d) as math.Complex;
  const s21 = math.divide(2 * Math.sqrt(r1 * r2), d) as math.Complex;
  const one = [s11.re, s11.im, s21.re, s21.im, s21.re, s21.im, s22.re, s22.im];
  return {
    parameter: 'S',
    ports: 2,
    frequencies: Float64Array.from(freqs),
    references: Float64Array.of(r1, r2),
    values: Float64Array.from(freqs.flatMap(() => one)),
  };
}

/**
 * Renormalises S to new references, all ports going from z to z2: S' = (S − Γ)(U − ΓS)⁻¹ with
 * Γ = (z2 − z)/(z2 + z) on every port (Kurokawa 1965, power waves; with one Γ for all ports the
 * diagonal scaling A⁻¹…A of the general form cancels). Computed with mathjs complex matrices.
 */
function renormalizeUniform(net: NetworkData, z2: number): NetworkData {
  const n = net.ports;
  const z = net.references[0]!;
  const g = (z2 - z) / (z2 + z);
  const values = new Float64Array(net.values.length);
  for (let k = 0; k < net.frequencies.length; k++) {
    const S = math.matrix(
      Array.from({ length: n }, (_, i) =>
        Array.from({ length: n }, (_, j) => {
          const at = 2 * ((k * n + i) * n + j);
          return math.complex(net.values[at]!, net.values[at + 1]!);
        }),
      ),
    );
    const G = math.multiply(math.identity(n), g) as math.Matrix;
    const U = math.identity(n) as math.Matrix;
    const S2 = math.multiply(math.subtract(S, G), math.inv(math.subtract(U, math.multiply(G, S)) as math.Matrix)) as math.Matrix;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const c = math.complex(S2.get([i, j]) as math.Complex);
        const at = 2 * ((k * n + i) * n + j);
        values[at] = c.re;
        values[at + 1] = c.im;
      }
    }
  }
  return { ...net, references: new Float64Array(n).fill(z2), values };
}

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-hcli-'));
  writeFileSync(join(dir, 'series.sbx'), SERIES + SPEC);
  writeFileSync(join(dir, 'nospec.sbx'), SERIES);
  writeFileSync(join(dir, 'broken.sbx'), SERIES.replace('value=rs', 'value=50 ohmz') + SPEC);
  writeFileSync(join(dir, 'warns.sbx'), 'let unused = 3\n' + SERIES + SPEC);
  writeFileSync(join(dir, 'near.sbx'), NEAR);
  writeFileSync(join(dir, 'singular.sbx'), SINGULAR);
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npx tsc -p . (npm test runs it before vitest)');
});

describe('--touchstone takes the version however it is written', () => {
  for (const [given, version] of [['2.0', '2.0'], ['2', '2.0'], ['2.00', '2.0'], ['1.1', '1.1'], ['1.10', '1.1']] as const) {
    it(`solve --touchstone ${given} writes version ${version}`, () => {
      const out = join(dir, `v${given}.s2p`);
      const r = run(['solve', join(dir, 'series.sbx'), '-o', out, '--touchstone', given]);
      expect(r.err).toBe('');
      expect(r.code).toBe(0);
      const text = readFileSync(out, 'utf8');
      // Touchstone 2.0 files start their data description with [Version] 2.0; 1.1 files have none (IBIS Touchstone 2.0 spec)
      if (version === '2.0') expect(text).toMatch(/^\[Version\] 2\.0$/m);
      else expect(text).not.toMatch(/\[Version\]/);
      // the numbers are the closed form whatever the version: S11 = 1/3, S21 = 2/3 (to 1e-12)
      const net = parseTouchstone(text, { fileName: out });
      expect(net.values[0]).toBeCloseTo(1 / 3, 12);
      expect(net.values[2]).toBeCloseTo(2 / 3, 12);
    });
  }

  it('convert --touchstone 2.0 is accepted too, and an unknown version is a usage error naming the option', () => {
    const src = join(dir, 'conv-src.s2p');
    writeFileSync(src, formatTouchstone(seriesZ(30, 40, 50), { digits: 17 }));
    const out = join(dir, 'conv-2.s2p');
    const r = run(['convert', src, '-o', out, '--touchstone', '2.0']);
    expect(r.code).toBe(0);
    expect(readFileSync(out, 'utf8')).toMatch(/^\[Version\] 2\.0$/m);
    const bad = run(['solve', join(dir, 'series.sbx'), '--touchstone', '3']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--touchstone is 1\.1 or 2\.0, got "3"/);
  });
});

describe('numeric options are checked before anything runs (usage errors, exit 2)', () => {
  const cases: [string, string[], RegExp][] = [
    ['diff --tol-db NaN', ['diff', 'a.s2p', 'a.s2p', '--tol-db', 'NaN'], /--tol-db must be a finite number ≥ 0/],
    ['diff --tol-db -1', ['diff', 'a.s2p', 'a.s2p', '--tol-db', '-1'], /--tol-db must be a finite number ≥ 0/],
    ['diff --tol-deg Infinity', ['diff', 'a.s2p', 'a.s2p', '--tol-deg', 'Infinity'], /--tol-deg must be a finite number ≥ 0/],
    ['diff --tol-abs -1e-9', ['diff', 'a.s2p', 'a.s2p', '--tol-abs=-1e-9'], /--tol-abs must be a finite number ≥ 0/],
    ['diff --tol-abs abc', ['diff', 'a.s2p', 'a.s2p', '--tol-abs', 'abc'], /--tol-abs must be a finite number ≥ 0/],
    ['diff --floor-db NaN', ['diff', 'a.s2p', 'a.s2p', '--floor-db', 'NaN'], /--floor-db must be a finite number/],
    ['check --tol-deg NaN', ['check', 'x.sbx', '--tol-deg', 'NaN'], /--tol-deg must be/],
    ['solve --digits 0', ['solve', 'x.sbx', '--digits', '0'], /--digits must be a whole number from 1 to 17, got 0/],
    ['solve --digits 18', ['solve', 'x.sbx', '--digits', '18'], /--digits must be a whole number from 1 to 17/],
    ['solve --digits 2.5', ['solve', 'x.sbx', '--digits', '2.5'], /--digits must be a whole number/],
    ['convert --digits NaN', ['convert', 'a.s2p', '-o', 'b.s2p', '--digits', 'NaN'], /--digits must be a whole number/],
    ['solve --jobs 0', ['solve', 'x.sbx', '--jobs', '0'], /--jobs must be a whole number ≥ 1, got 0/],
    ['solve -j Infinity', ['solve', 'x.sbx', '-j', 'Infinity'], /--jobs must be a whole number ≥ 1/],
    ['plot --width NaN', ['plot', 'x.sbx', '-o', 'x.svg', '--width', 'NaN'], /--width must be a whole number of pixels/],
    ['plot --height -5', ['plot', 'x.sbx', '-o', 'x.svg', '--height', '-5'], /--height must be a whole number of pixels/],
    ['solve --digits twice', ['solve', 'x.sbx', '--digits', '3', '--digits', '4'], /--digits is given more than once/],
  ];
  for (const [name, args, message] of cases) {
    it(name, () => {
      const r = run(args);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(message);
    });
  }

  it('diff a a --tol-db 0 is valid and passes (identical files differ by nothing)', () => {
    const f = join(dir, 'same.s2p');
    writeFileSync(f, formatTouchstone(seriesZ(30, 40, 50), { digits: 17 }));
    const r = run(['diff', f, f, '--tol-db', '0', '--tol-deg', '0']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/within tolerance/);
  });
});

describe('batch solve names the netlist of every error and warning', () => {
  it('located errors, a singular system, a write error and a solver warning each name their netlist', () => {
    const b = join(dir, 'batch');
    mkdirSync(b, { recursive: true });
    writeFileSync(join(b, 'good.sbx'), SERIES);
    writeFileSync(join(b, 'broken.sbx'), SERIES.replace('value=rs', 'value=50 ohmz'));
    writeFileSync(join(b, 'tank.sbx'), SINGULAR);
    writeFileSync(join(b, 'near.sbx'), NEAR);
    writeFileSync(join(b, 'blocked.sbx'), SERIES);
    const od = join(dir, 'batch-out');
    mkdirSync(join(od, 'blocked.s2p'), { recursive: true }); // a folder where the output file would go: the write fails
    const files = ['good', 'broken', 'tank', 'near', 'blocked'].map((n) => join(b, `${n}.sbx`));
    const r = run(['solve', ...files, '--out-dir', od]);
    expect(r.code).toBe(1);
    const lines = r.err.split('\n');
    // every line that says error or warning names a netlist of the batch
    const flagged = lines.filter((l) => /\b(error|warning)\b/.test(l));
    expect(flagged.length).toBeGreaterThanOrEqual(4);
    for (const l of flagged) expect(l).toMatch(/(broken|tank|near|blocked)\.sbx/);
    expect(r.err).toMatch(/1 error in .*broken\.sbx; nothing was written/);
    expect(r.err).toMatch(/error: .*tank\.sbx: /);
    expect(r.err).toMatch(/error: .*blocked\.sbx: /);
    expect(r.err).toMatch(/warning: .*near\.sbx: the nodal system is nearly singular/);
    expect(r.err).toMatch(/3 of 5 netlists failed/);
    expect(existsSync(join(od, 'good.s2p'))).toBe(true);
    expect(existsSync(join(od, 'near.s1p'))).toBe(true);
  });
});

describe('diff and check --against compare at the reference impedances of the reference side', () => {
  it('a 50 ohm file and the 75 ohm renormalisation of it (Kurokawa closed form) are the same network: diff passes and says so', () => {
    const a = join(dir, 'z50.s2p');
    const b = join(dir, 'z75.s2p');
    const net50 = seriesZ(30, 40, 50);
    writeFileSync(a, formatTouchstone(net50, { digits: 17 }));
    writeFileSync(b, formatTouchstone(renormalizeUniform(net50, 75), { digits: 17 }));
    const r = run(['diff', a, b, '--tol-abs', '1e-12']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/note: .*z50\.s2p renormalised from 50 Ω to 75 Ω \(the references of .*z75\.s2p\) before comparing/);
    expect(r.out).toMatch(/within tolerance/);
  });

  it('the closed form of the same series impedance seen from 50 and 75 ohm ports agrees; another impedance does not', () => {
    const a = join(dir, 'y50.s2p');
    const same = join(dir, 'y75.s2p');
    const other = join(dir, 'y75-other.s2p');
    writeFileSync(a, formatTouchstone(seriesZ(30, 40, 50), { digits: 17 }));
    writeFileSync(same, formatTouchstone(seriesZ(30, 40, 75), { digits: 17 }));
    writeFileSync(other, formatTouchstone(seriesZ(33, 40, 75), { digits: 17 }));
    expect(run(['diff', a, same, '--tol-abs', '1e-12']).code).toBe(0);
    const r = run(['diff', a, other]);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/note: .*renormalised from 50 Ω to 75 Ω/);
    expect(r.out).toMatch(/FAIL/);
  });

  it('per-port references (50, 75 ohm; Touchstone 2.0) against 50 ohm: renormalised per port', () => {
    const a = join(dir, 'p50.s2p');
    const b = join(dir, 'p5075.s2p');
    writeFileSync(a, formatTouchstone(seriesZ(30, 40, 50, 50), { digits: 17 }));
    writeFileSync(b, formatTouchstone(seriesZ(30, 40, 50, 75), { digits: 17, version: '2.0' }));
    const r = run(['diff', a, b, '--tol-abs', '1e-12']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/renormalised from 50 Ω to 50 Ω, 75 Ω/);
  });

  it('check --against a 75 ohm golden file of the 50 ohm netlist passes with a note; a different golden fails', () => {
    const golden = join(dir, 'golden75.s2p');
    writeFileSync(golden, formatTouchstone(seriesZ(50, 0, 75), { digits: 17 }));
    const r = run(['check', join(dir, 'series.sbx'), '--against', golden, '--tol-abs', '1e-12']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/note: the solve of .*series\.sbx renormalised from 50 Ω to 75 Ω/);
    const wrong = join(dir, 'golden75-wrong.s2p');
    writeFileSync(wrong, formatTouchstone(seriesZ(60, 0, 75), { digits: 17 }));
    const f = run(['check', join(dir, 'series.sbx'), '--against', wrong]);
    expect(f.code).toBe(1);
  });

  it('equal references give no note', () => {
    const a = join(dir, 'e50.s2p');
    writeFileSync(a, formatTouchstone(seriesZ(30, 40, 50), { digits: 17 }));
    const r = run(['diff', a, a]);
    expect(r.code).toBe(0);
    expect(r.out).not.toMatch(/note:/);
  });
});

describe('check needs something to check', () => {
  it('a netlist without specs and without --against is an input error (exit 3), not "all 0 checks pass"', () => {
    const r = run(['check', join(dir, 'nospec.sbx')]);
    expect(r.code).toBe(3);
    expect(r.out).not.toMatch(/all 0 checks pass/);
    expect(r.err).toMatch(/nospec\.sbx has no spec statements, so there is nothing to check/);
    expect(r.err).toMatch(/help: .*--against/);
  });

  it('with --against a golden file, a netlist without specs is checked against it', () => {
    const golden = join(dir, 'nospec-golden.s2p');
    writeFileSync(golden, formatTouchstone(seriesZ(50, 0, 50), { digits: 17 }));
    const r = run(['check', join(dir, 'nospec.sbx'), '--against', golden]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/all 4 checks pass/);
  });
});

describe('check --junit and --json on an input error', () => {
  it('write a report with one case in error carrying the diagnostics; the exit code stays 3', () => {
    const junit = join(dir, 'broken.xml');
    const json = join(dir, 'broken.json');
    const r = run(['check', join(dir, 'broken.sbx'), '--junit', junit, '--json', json]);
    expect(r.code).toBe(3);
    const xml = readFileSync(junit, 'utf8');
    // JUnit XML: an <error> element inside the <testcase> for a test that could not run (common practice of CI report readers)
    expect(xml).toMatch(/<testsuites name="scatterbox" tests="1" failures="0" errors="1">/);
    expect(xml).toMatch(/<testcase [^>]*name="load and solve">\s*<error type="input" message="[^"]*broken\.sbx:3:32: error: unknown unit `ohmz`"/);
    expect(xml).toMatch(/\| +\^\^\^\^/); // the caret line
    const report = JSON.parse(readFileSync(json, 'utf8'));
    expect(report.pass).toBe(false);
    expect(report.error).toMatch(/broken\.sbx:3:32: error: unknown unit `ohmz`/);
  });

  it('never over an existing file that is not a report, nor over the netlist', () => {
    const keep = join(dir, 'notes.txt');
    writeFileSync(keep, 'my notes\n');
    const r = run(['check', join(dir, 'broken.sbx'), '--junit', keep]);
    expect(r.code).toBe(3);
    expect(readFileSync(keep, 'utf8')).toBe('my notes\n');
    const before = readFileSync(join(dir, 'broken.sbx'), 'utf8');
    expect(run(['check', join(dir, 'broken.sbx'), '--json', join(dir, 'broken.sbx')]).code).toBe(3);
    expect(readFileSync(join(dir, 'broken.sbx'), 'utf8')).toBe(before);
  });

  it('a report of an earlier run is replaced', () => {
    const junit = join(dir, 'again.xml');
    expect(run(['check', join(dir, 'series.sbx'), '--junit', junit]).code).toBe(0);
    expect(readFileSync(junit, 'utf8')).toMatch(/errors="0"/);
    expect(run(['check', join(dir, 'broken.sbx'), '--junit', junit]).code).toBe(3);
    expect(readFileSync(junit, 'utf8')).toMatch(/errors="1"/);
  });
});

describe('report --at', () => {
  it('a frequency outside the sweep is an error located in the option, and nothing is written', () => {
    const out = join(dir, 'at.html');
    const r = run(['report', join(dir, 'series.sbx'), '-o', out, '--at', '5 MHz, 5 GHz']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/--at:1:8: error: 5 GHz lies outside the sweep \(1 MHz to 10 MHz\)/);
    expect(r.err).toMatch(/ 1 \| 5 MHz, 5 GHz\n +\| +\^\^\^\^\^/);
    expect(existsSync(out)).toBe(false);
  });

  it('a frequency between two sweep points shows the nearest point, marked with the one asked for', () => {
    const out = join(dir, 'at-in.html');
    const r = run(['report', join(dir, 'series.sbx'), '-o', out, '--at', '4 MHz']);
    expect(r.code).toBe(0);
    expect(readFileSync(out, 'utf8')).toMatch(/data-frequency="1000000" data-asked="4000000"/);
  });
});

describe('convert --renormalize takes units', () => {
  it('"75 ohm" and "50 ohm, 75 ohm" give the closed form of the series impedance seen from those ports', () => {
    const src = join(dir, 'rn-src.s2p');
    writeFileSync(src, formatTouchstone(seriesZ(30, 40, 50), { digits: 17 }));
    for (const [option, r1, r2] of [['75 ohm', 75, 75], ['75', 75, 75], ['50 ohm, 75 ohm', 50, 75], ['0.05 kohm,75ohm', 50, 75]] as const) {
      const out = join(dir, `rn-${r1}-${r2}.s2p`);
      const r = run(['convert', src, '-o', out, '--renormalize', option]);
      expect(r.err).toBe('');
      expect(r.code).toBe(0);
      const got = parseTouchstone(readFileSync(out, 'utf8'), { fileName: out });
      const want = seriesZ(30, 40, r1, r2);
      expect(Array.from(got.references)).toEqual([r1, r2]);
      // to 1e-12: two renormalisation steps in doubles against the closed form
      want.values.forEach((x, i) => expect(Math.abs(got.values[i]! - x)).toBeLessThan(1e-12));
    }
  });

  it('a wrong unit or a value that is not positive is an error located at --renormalize', () => {
    const src = join(dir, 'rn-src2.s2p');
    writeFileSync(src, formatTouchstone(seriesZ(30, 40, 50), { digits: 17 }));
    const r = run(['convert', src, '-o', join(dir, 'rn-bad.s2p'), '--renormalize', '50 ohm, 75 m']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/--renormalize:1:9: error: --renormalize must be in ohm, but it is a length/);
    const z = run(['convert', src, '-o', join(dir, 'rn-bad.s2p'), '--renormalize=-5 ohm']);
    expect(z.code).toBe(1);
    expect(z.err).toMatch(/--renormalize:1:1: error: a reference impedance must be positive and finite/);
    expect(existsSync(join(dir, 'rn-bad.s2p'))).toBe(false);
  });
});

describe('--strict', () => {
  it('turns a load warning into an error: solve exits 1, check 3, report and plot 1; without it they pass', () => {
    const f = join(dir, 'warns.sbx');
    expect(run(['solve', f]).code).toBe(0);
    const s = run(['solve', f, '--strict', '-o', join(dir, 'strict.s2p')]);
    expect(s.code).toBe(1);
    expect(s.err).toMatch(/warns\.sbx:1:5: error: parameter `unused` is never used/);
    expect(existsSync(join(dir, 'strict.s2p'))).toBe(false);
    // --quiet hides warnings but does not let them pass under --strict
    expect(run(['solve', f, '--strict', '--quiet']).code).toBe(1);
    expect(run(['check', f]).code).toBe(0);
    expect(run(['check', f, '--strict']).code).toBe(3);
    expect(run(['report', f, '-o', join(dir, 'strict.html'), '--strict']).code).toBe(1);
    expect(run(['plot', f, '-o', join(dir, 'strict.svg'), '--strict']).code).toBe(1);
    expect(existsSync(join(dir, 'strict.html'))).toBe(false);
  });

  it("turns the solver's nearly-singular warning into an error", () => {
    const f = join(dir, 'near.sbx');
    expect(run(['solve', f, '-o', join(dir, 'near.s1p')]).code).toBe(0);
    const r = run(['solve', f, '-o', join(dir, 'near-strict.s1p'), '--strict']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/error: the nodal system is nearly singular at 1 MHz/);
    expect(r.err).toMatch(/--strict/);
    expect(existsSync(join(dir, 'near-strict.s1p'))).toBe(false);
  });
});

describe('microstrip inputs', () => {
  it('every input out of the models\' range is a located error at its option, all of them in one run', () => {
    const r = run(['microstrip', '--z0=-50 ohm', '--height', '0 mm', '--er', '0.5']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/--z0:1:1: error: --z0 must be a finite number above 0, got -50/);
    expect(r.err).toMatch(/--height:1:1: error: --height must be a finite number above 0, got 0/);
    // a relative permittivity below 1 (that of vacuum) is no substrate (common practice)
    expect(r.err).toMatch(/--er:1:1: error: --er must be a finite number at least 1, got 0\.5/);
    expect(r.err).toMatch(/3 errors/);
  });

  it('an impedance no strip width gives is an error that names no internal function', () => {
    const r = run(['microstrip', '--z0', '5000 ohm', '--height', '1.6 mm', '--er', '4.4']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/^error: /);
    expect(r.err).not.toMatch(/\b[a-z]+[A-Z][A-Za-z0-9]*:/);
  });
});
