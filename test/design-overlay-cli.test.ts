// `report` and `plot` with several inputs (issue 15, item 6), run as a user runs them: a netlist
// against measured data, labels, inputs of different port counts, errors.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseTouchstone } from '../src/io/touchstone.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const SIM = 'circuits/bandpass-2g4.sbx';
const MEASURED = 'circuits/data/bandpass-2g45-measured.s2p';

function run(args: string[], cwd = root) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

interface ReportData {
  f: number[];
  inputs: { label: string }[];
  entries: { label: string; re: (number | null)[]; im: (number | null)[] }[];
}
function dataOf(html: string): ReportData {
  return JSON.parse(/<script type="application\/json" id="sbx-data">([\s\S]*?)<\/script>/.exec(html)![1]!) as ReportData;
}
const count = (text: string, re: RegExp) => (text.match(re) ?? []).length;

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-overlay-'));
  // a one-port: 40 ohm then 60 ohm on 50 ohm, Γ = (R − 50)/(R + 50) = −1/9 and 1/11 (common practice)
  writeFileSync(join(dir, 'antenna.s1p'), '# GHz S RI R 50\n2.3 -0.111111111111111 0\n2.6 0.0909090909090909 0\n');
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
});

describe('scatterbox report with several inputs', () => {
  it('a netlist against measured data: one legend entry each, one spec table (the netlist), the data as read', () => {
    const out = join(dir, 'overlay.html');
    const r = run(['report', SIM, MEASURED, '-o', out]);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect([...html.matchAll(/data-testid="legend-input" data-input="([^"]+)"/g)].map((m) => m[1])).toEqual(['bandpass-2g4.sbx', 'bandpass-2g45-measured.s2p']);
    expect(count(html, /data-testid="spec-group"/g)).toBe(1);
    expect(html).toContain('data-testid="spec-group" data-input="bandpass-2g4.sbx"');
    // outside check: the measured trace holds the file's own S11, read here with the Touchstone reader
    const file = parseTouchstone(readFileSync(join(root, MEASURED), 'utf8'), { fileName: MEASURED });
    const data = dataOf(html);
    const s11 = data.entries.find((e) => e.label === 'bandpass-2g45-measured.s2p · S11')!;
    const mine = s11.re.map((x, k) => [data.f[k]!, x] as const).filter(([, x]) => x !== null);
    expect(mine).toHaveLength(file.frequencies.length);
    mine.forEach(([f, x], k) => {
      expect(f).toBe(file.frequencies[k]);
      expect(Math.abs(x! - file.values[8 * k]!)).toBeLessThanOrEqual(1e-12);
    });
  });

  it('--label names the inputs in their order; more labels than inputs is an error', () => {
    const out = join(dir, 'labelled.html');
    expect(run(['report', SIM, MEASURED, '--label', 'simulated', '--label', 'measured', '-o', out]).code).toBe(0);
    expect([...readFileSync(out, 'utf8').matchAll(/data-testid="legend-input" data-input="([^"]+)"/g)].map((m) => m[1])).toEqual(['simulated', 'measured']);
    const bad = run(['report', SIM, '--label', 'a', '--label', 'b', '-o', join(dir, 'never.html')]);
    expect(bad.code).toBe(1);
    expect(bad.err).toContain('error: 2 labels for 1 inputs');
    expect(existsSync(join(dir, 'never.html'))).toBe(false);
  });

  it('inputs of different port counts: each shows its own entries, and the page says so', () => {
    const out = join(dir, 'mixed.html');
    const r = run(['report', MEASURED, join(dir, 'antenna.s1p'), '-o', out]);
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('Note: the inputs have different port counts (bandpass-2g45-measured.s2p: 2, antenna.s1p: 1): each shows its own entries.');
    const ant = dataOf(html).entries.filter((e) => e.label.startsWith('antenna.s1p'));
    expect(ant.map((e) => e.label)).toEqual(['antenna.s1p · S11']);
    expect(ant[0]!.re.filter((x) => x !== null)).toEqual([-0.111111111111, 0.0909090909091]);
  });

  it('an output that is one of the inputs is refused', () => {
    const copy = join(dir, 'copy.s1p');
    writeFileSync(copy, readFileSync(join(dir, 'antenna.s1p')));
    const r = run(['report', MEASURED, copy, '-o', copy]);
    expect(r.code).toBe(1);
    expect(r.err).toContain('is an input of this run');
    expect(readFileSync(copy, 'utf8')).toBe(readFileSync(join(dir, 'antenna.s1p'), 'utf8'));
  });
});

describe('scatterbox plot with several inputs', () => {
  it('one trace per input and entry, one legend entry per input', () => {
    const out = join(dir, 'overlay.svg');
    expect(run(['plot', SIM, MEASURED, '--entry', '21', '-o', out]).code).toBe(0);
    const svg = readFileSync(out, 'utf8');
    // S21 of each; the netlist's specs on rl(1) and vswr(2) bring its S11 and S22 onto the plot too
    expect([...svg.matchAll(/<path [^>]*data-entry="([^"]+)"/g)].map((m) => m[1])).toEqual([
      'bandpass-2g4.sbx · S21',
      'bandpass-2g4.sbx · S11',
      'bandpass-2g4.sbx · S22',
      'bandpass-2g45-measured.s2p · S21',
    ]);
    expect(count(svg, /data-legend="input"/g)).toBe(2);
  });

  it('an entry one input lacks is left out for it, with a note in the plot; PNG works too', () => {
    const out = join(dir, 'mixed.svg');
    expect(run(['plot', MEASURED, join(dir, 'antenna.s1p'), '--entry', '21', '-o', out]).code).toBe(0);
    expect(readFileSync(out, 'utf8')).toContain('note: antenna.s1p: S21 left out (it has 1 port)');
    const png = join(dir, 'smith.png');
    expect(run(['plot', MEASURED, join(dir, 'antenna.s1p'), '--kind', 'smith', '-o', png]).code).toBe(0);
    expect(readFileSync(png).subarray(1, 4).toString()).toBe('PNG');
  });
});
