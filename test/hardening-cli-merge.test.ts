// Issue 14 (hardening), the command line: behaviour whose library side is done on other branches of
// the same issue (the --set checks in src/load.ts; the digits of the JSON and two-port writers).
// The CLI already hands the options over; these tests pass once those branches are merged.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { formatTouchstone } from '../src/io/touchstone.js';
import type { NetworkData } from '../src/network/types.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');

function run(args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

const SERIES = `let rs = 50 ohm
resistor r1 a=p1 b=p2 value=rs
port 1 plus=p1
port 2 plus=p2
sweep list freqs=1 MHz, 10 MHz
`;

/** Whether every number of `values` is written with at most `digits` significant digits. */
function roundedTo(values: number[], digits: number): boolean {
  return values.every((x) => Number(x.toPrecision(digits)) === x);
}

/** S of a series impedance Z between 50 ohm ports: S11 = Z/(Z+100), S21 = 100/(Z+100) (closed form, common practice). */
function seriesZ(zr: number, zi: number): NetworkData {
  const dr = zr + 100;
  const d2 = dr * dr + zi * zi;
  const s11r = (zr * dr + zi * zi) / d2;
  const s11i = (zi * dr - zr * zi) / d2;
  const s21r = (100 * dr) / d2;
  const s21i = (-100 * zi) / d2;
  return { parameter: 'S', ports: 2, frequencies: Float64Array.of(1e9), references: Float64Array.of(50, 50), values: Float64Array.of(s11r, s11i, s21r, s21i, s21r, s21i, s11r, s11i) };
}

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-hclim-'));
  writeFileSync(join(dir, 'series.sbx'), SERIES);
  writeFileSync(join(dir, 'z.s2p'), formatTouchstone(seriesZ(30.123456789, 40.987654321), { digits: 17 }));
});

describe('--set (library side: src/load.ts)', () => {
  it('the same name twice is an error naming it, not the last one silently winning', () => {
    const r = run(['solve', join(dir, 'series.sbx'), '--set', 'rs=10 ohm', '--set', 'rs=20 ohm']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/--set/);
    expect(r.err).toMatch(/`rs`/);
  });

  it('a value of the wrong dimension is reported located at --set', () => {
    const r = run(['solve', join(dir, 'series.sbx'), '--set', 'rs=10 mm']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/^--set:1:\d+: error:/m);
  });
});

describe('--digits reaches every writer (writer side: src/io/json.ts, src/io/convert-file.ts)', () => {
  it('solve -o x.json --digits 3 writes numbers of at most 3 significant digits (S11 = 1/3 → 0.333)', () => {
    const out = join(dir, 'd3.json');
    expect(run(['solve', join(dir, 'series.sbx'), '-o', out, '--digits', '3']).code).toBe(0);
    const doc = JSON.parse(readFileSync(out, 'utf8'));
    const values = (doc.data as number[][][][]).flat(3);
    expect(values.length).toBe(16);
    expect(roundedTo(values, 3)).toBe(true);
    // S11 = Z/(Z+2·Z0) = 50/150 (closed form)
    expect(values[0]).toBe(0.333);
  });

  it('convert --to ABCD --digits 4 (CSV) and --to T (JSON) round their numbers', () => {
    const csv = join(dir, 'abcd.csv');
    expect(run(['convert', join(dir, 'z.s2p'), '-o', csv, '--to', 'ABCD', '--digits', '4']).code).toBe(0);
    const row = readFileSync(csv, 'utf8').trim().split('\n')[1]!.split(',').map(Number);
    expect(roundedTo(row.slice(1), 4)).toBe(true);
    // B of a series impedance is Z (common practice): 30.12 + j40.99 at 4 digits
    expect(row[3]).toBe(30.12);
    expect(row[4]).toBe(40.99);
    const json = join(dir, 't.json');
    expect(run(['convert', join(dir, 'z.s2p'), '-o', json, '--to', 'T', '--digits', '4']).code).toBe(0);
    const numbers = (readFileSync(json, 'utf8').match(/-?\d+\.\d+(e[-+]?\d+)?/g) ?? []).map(Number);
    expect(numbers.length).toBeGreaterThan(0);
    expect(roundedTo(numbers, 4)).toBe(true);
  });
});
