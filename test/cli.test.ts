// End-to-end tests of the command line: the compiled CLI (npm test builds it first) run as a
// user would run it, checking exit codes, stdout/stderr and the files written.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseTouchstone } from '../src/io/touchstone.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');

function run(args: string[], cwd = root) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

// A series 50 ohm resistor between two 50 ohm ports: S11 = Z/(Z+2Z0) = 1/3, S21 = 2Z0/(Z+2Z0) = 2/3
// (closed form of a series impedance, common practice).
const SERIES = `title "series resistor"
resistor r1 a=p1 b=p2 value=rs
let rs = 50 ohm
port 1 plus=p1
port 2 plus=p2
sweep list freqs=1 MHz, 10 MHz
`.replace('resistor r1 a=p1 b=p2 value=rs\nlet rs = 50 ohm', 'let rs = 50 ohm\nresistor r1 a=p1 b=p2 value=rs');

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-cli-'));
  writeFileSync(join(dir, 'series.sbx'), SERIES);
  writeFileSync(join(dir, 'broken.sbx'), SERIES.replace('value=rs', 'value=rz').replace('port 2', 'prot 2'));
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
});

describe('scatterbox solve', () => {
  it('prints a table of |Sij| in dB and angles without -o', () => {
    const r = run(['solve', join(dir, 'series.sbx')]);
    expect(r.code).toBe(0);
    const lines = r.out.trim().split('\n');
    expect(lines[0]).toMatch(/f\/MHz\s+\|S11\|\/dB\s+∠S11\/°\s+\|S12\|\/dB/);
    // 20·log10(1/3) = −9.54 dB and 20·log10(2/3) = −3.52 dB
    expect(lines[1]!.trim().split(/\s+/)).toEqual(['1', '-9.54', '0.0', '-3.52', '0.0', '-3.52', '0.0', '-9.54', '0.0']);
  });

  it('writes Touchstone whose numbers are the closed form, and --set overrides a parameter', () => {
    const out = join(dir, 'series.s2p');
    expect(run(['solve', join(dir, 'series.sbx'), '-o', out]).code).toBe(0);
    const net = parseTouchstone(readFileSync(out, 'utf8'), { fileName: out });
    expect(net.values[0]).toBeCloseTo(1 / 3, 14);
    expect(net.values[2]).toBeCloseTo(2 / 3, 14);
    expect(run(['solve', join(dir, 'series.sbx'), '-o', out, '--set', 'rs=100 ohm']).code).toBe(0);
    const net2 = parseTouchstone(readFileSync(out, 'utf8'), { fileName: out });
    // Z = 100 ohm: S11 = 100/200 = 1/2
    expect(net2.values[0]).toBeCloseTo(0.5, 14);
  });

  it('--figures prints derived figures per frequency', () => {
    const r = run(['solve', join(dir, 'series.sbx'), '--figures', 'il(2,1), rl(1),vswr(1)']);
    expect(r.code).toBe(0);
    const [head, first] = r.out.trim().split('\n');
    expect(head!.trim().split(/\s+/)).toEqual(['f/MHz', 'il(2,1)/dB', 'rl(1)/dB', 'vswr(1)']);
    // |S21| = 2/3 → IL = 3.52 dB; |S11| = 1/3 → RL = 9.54 dB, VSWR = (1+1/3)/(1−1/3) = 2 (definitions, common practice)
    expect(first!.trim().split(/\s+/)).toEqual(['1', '3.52', '9.54', '2.0000']);
    const bad = run(['solve', join(dir, 'series.sbx'), '--figures', 'rll(1)']);
    expect(bad.code).toBe(1);
    expect(bad.err).toMatch(/unknown figure `rll`\n  help: did you mean `rl`\?/);
  });

  it('--sweep replaces the sweep of the file', () => {
    const out = join(dir, 'sweep.csv');
    expect(run(['solve', join(dir, 'series.sbx'), '-o', out, '--sweep', 'linear start=1 kHz stop=5 kHz points=5; list freqs=1 GHz']).code).toBe(0);
    const rows = readFileSync(out, 'utf8').trim().split('\n');
    expect(rows.map((r) => r.split(',')[0])).toEqual(['freq_hz', '1000', '2000', '3000', '4000', '5000', '1000000000']);
  });

  it('reports every error of a file with locations, exits 1 and writes nothing', () => {
    const out = join(dir, 'never.s2p');
    const r = run(['solve', join(dir, 'broken.sbx'), '-o', out]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/broken\.sbx:3:29: error: unknown parameter `rz`/);
    expect(r.err).toMatch(/help: did you mean `rs`\?/);
    expect(r.err).toMatch(/broken\.sbx:5:1: error: unknown statement `prot`/);
    expect(r.err).toMatch(/help: did you mean `port`\?/);
    expect(r.err).toMatch(/ 3 \| resistor r1 a=p1 b=p2 value=rz\n {3}\| {29}\^\^/);
    expect(existsSync(out)).toBe(false);
  });

  it('a failed run leaves an existing output file untouched and no temporary files', () => {
    const out = join(dir, 'keep.s2p');
    writeFileSync(out, 'precious');
    expect(run(['solve', join(dir, 'broken.sbx'), '-o', out]).code).toBe(1);
    // Z of a series-only two-port does not exist: the conversion fails before the file is touched
    const r = run(['solve', join(dir, 'series.sbx'), '-o', out, '--param', 'Z']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/Z-parameters do not exist/);
    expect(readFileSync(out, 'utf8')).toBe('precious');
    expect(readdirSync(dir).filter((f) => f.includes('.tmp'))).toEqual([]);
  });

  it('an extension that does not match the port count is an input error', () => {
    const r = run(['solve', join(dir, 'series.sbx'), '-o', join(dir, 'x.s3p')]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/ends in \.s3p but the network has 2 port\(s\)/);
  });

  it('a missing netlist file is an input error', () => {
    const r = run(['solve', join(dir, 'nope.sbx')]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/nope\.sbx: no such file/);
  });
});

describe('usage', () => {
  it('unknown commands and options are usage errors (exit 2) on stderr', () => {
    const r = run(['solv', 'x.sbx']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/solve/);
    const r2 = run(['solve', join(dir, 'series.sbx'), '--bogus']);
    expect(r2.code).toBe(2);
    expect(r2.err).toMatch(/Unknown argument: bogus/i);
    expect(run([]).code).toBe(2);
  });

  it('--help of the program and of solve show examples', () => {
    const top = run(['--help']);
    expect(top.code).toBe(0);
    expect(top.out).toMatch(/Examples:/);
    expect(top.out).toMatch(/scatterbox solve circuits\//);
    const sub = run(['solve', '--help']);
    expect(sub.code).toBe(0);
    expect(sub.out).toMatch(/--set/);
    expect(sub.out).toMatch(/Examples:/);
  });

  it('warns on stderr when the nodal system is nearly singular, and not with --quiet', () => {
    // a node on two 1e13 ohm resistors: reciprocal condition near 5e-12 (see test/singular.test.ts)
    const f = join(dir, 'near.sbx');
    writeFileSync(f, 'resistor r1 a=in b=ground value=50 ohm\nresistor rx a=in b=mid value=1e13 ohm\nresistor rl a=mid b=ground value=1e13 ohm\nport 1 plus=in\nsweep list freqs=1 MHz\n');
    const loud = run(['solve', f, '-o', join(dir, 'near.s1p')]);
    expect(loud.code).toBe(0);
    expect(loud.err).toMatch(/warning: the nodal system is nearly singular at 1 MHz/);
    const quiet = run(['solve', f, '-o', join(dir, 'near.s1p'), '--quiet']);
    expect(quiet.code).toBe(0);
    expect(quiet.err).not.toMatch(/nearly singular/);
  });
});

