// `scatterbox vary` end to end (issue 15, item 3): the compiled CLI run as a user runs it. The
// outside-independent check: every member of a family equals a plain `solve --set name=value`
// run of the same netlist (to 1e-12), whatever file form the family is written in.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { DesignModel } from '../src/design/model.js';
import { parseJson } from '../src/io/json.js';
import { parseTouchstone } from '../src/io/touchstone.js';
import type { NetworkData } from '../src/network/types.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const DEMO = join(root, 'circuits', 'match-50-75-915.sbx');

function run(args: string[], cwd = root) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-vary-'));
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
});

/** S of `solve --set …` of the demo, written as JSON and read back: the single-run reference. */
function single(set: string[], name: string): NetworkData {
  const out = join(dir, `${name}.json`);
  const r = run(['solve', DEMO, '-o', out, ...set.flatMap((s) => ['--set', s])]);
  expect(r.err).toBe('');
  expect(r.code).toBe(0);
  return parseJson(readFileSync(out, 'utf8'));
}

/** Largest |a − b| over all values (both on the same sweep). */
function worstDifference(a: NetworkData, b: NetworkData): number {
  // frequencies to 1e-12 relative (a Touchstone file holds them in GHz, as decimal text)
  expect(a.frequencies.length).toBe(b.frequencies.length);
  a.frequencies.forEach((f, k) => expect(Math.abs(f - b.frequencies[k]!)).toBeLessThanOrEqual(1e-12 * b.frequencies[k]!));
  expect(a.values.length).toBe(b.values.length);
  let worst = 0;
  for (let k = 0; k < a.values.length; k++) worst = Math.max(worst, Math.abs(a.values[k]! - b.values[k]!));
  return worst;
}

interface FamilyJson {
  schema: string;
  variables: { name: string; unit: string | null; spacing: string }[];
  members: { member: number; label: string; values: number[]; specs: { name: string; pass: boolean; worst_margin: number | null }[]; network: unknown }[];
}

describe('scatterbox vary: the family equals single runs', () => {
  it('-o family.json: each member is the solve of `--set cshunt=value` (to 1e-12), with its specs', () => {
    const out = join(dir, 'family.json');
    const r = run(['vary', DEMO, '--over', 'cshunt=1pF..2.2pF:4', '-o', out]);
    expect(r.code).toBe(0);
    const fam = JSON.parse(readFileSync(out, 'utf8')) as FamilyJson;
    expect(fam.schema).toBe('scatterbox.family/1');
    expect(fam.variables).toEqual([{ name: 'cshunt', unit: 'F', spacing: 'linear' }]);
    expect(fam.members.map((m) => m.label)).toEqual(['cshunt = 1 pF', 'cshunt = 1.4 pF', 'cshunt = 1.8 pF', 'cshunt = 2.2 pF']);
    for (const m of fam.members) {
      const net = parseJson(JSON.stringify(m.network));
      const ref = single([`cshunt=${m.values[0]} F`], `single-${m.member}`);
      expect(worstDifference(net, ref)).toBeLessThanOrEqual(1e-12);
      expect(m.specs.map((s) => s.name)).toEqual(['channel_match', 'feed_vswr', 'channel_loss', 'usable_band']);
    }
    // the terminal shows a table per member and the count
    expect(r.out).toContain('cshunt = 1.4 pF  (member 2 of 4)');
    expect(r.out.match(/^spec\s+limit\s+result\s+worst margin\s+at$/gm)).toHaveLength(4);
    expect(r.out).toMatch(/\d of 4 members pass(es)? every spec\n$/);
  });

  it('-o family.csv: one table with the variable columns; split by member, each equals its single run', () => {
    const out = join(dir, 'grid.csv');
    const r = run(['vary', DEMO, '--over', 'lser=4nH..8nH:2:log', '--over', 'cshunt=1.2pF,2pF', '-o', out]);
    expect(r.code).toBe(0);
    const [head, ...rows] = readFileSync(out, 'utf8').trim().split('\n');
    const cols = head!.split(',');
    expect(cols.slice(0, 4)).toEqual(['member', 'lser_H', 'cshunt_F', 'freq_hz']);
    expect(cols[4]).toBe('S11_re');
    const points = DesignModel.load(DEMO).circuit.frequencies.length;
    expect(rows).toHaveLength(4 * points);
    const byMember = new Map<string, string[][]>();
    for (const row of rows) {
      const f = row.split(',');
      if (!byMember.has(f[0]!)) byMember.set(f[0]!, []);
      byMember.get(f[0]!)!.push(f);
    }
    expect([...byMember.keys()]).toEqual(['1', '2', '3', '4']);
    for (const [member, list] of byMember) {
      const [lser, cshunt] = [Number(list[0]![1]), Number(list[0]![2])];
      const ref = single([`lser=${lser} H`, `cshunt=${cshunt} F`], `grid-${member}`);
      let worst = 0;
      list.forEach((f, k) => {
        expect(Number(f[3])).toBe(ref.frequencies[k]);
        for (let q = 0; q < 8; q++) worst = Math.max(worst, Math.abs(Number(f[4 + q]) - ref.values[8 * k + q]!));
      });
      expect(worst).toBeLessThanOrEqual(1e-12);
    }
    // the grid: lser in an even ratio over 4..8 nH (2 values: the ends), cshunt from the list, last axis fastest
    expect([...byMember.values()].map((l) => [Number(l[0]![1]), Number(l[0]![2])])).toEqual([
      [4e-9, 1.2e-12],
      [4e-9, 2e-12],
      [8e-9, 1.2e-12],
      [8e-9, 2e-12],
    ]);
  });

  it("-o 'out/m-{index}.s2p' writes one Touchstone file per member (folder made), equal to the single runs", () => {
    const pattern = join(dir, 'out', 'm-{index}.s2p');
    const r = run(['vary', DEMO, '--over', 'cshunt=1pF..2pF:3', '-o', pattern]);
    expect(r.code).toBe(0);
    expect(readdirSync(join(dir, 'out')).sort()).toEqual(['m-1.s2p', 'm-2.s2p', 'm-3.s2p']);
    const text = readFileSync(join(dir, 'out', 'm-2.s2p'), 'utf8');
    expect(text).toContain('! member 2 of 3: cshunt = 1.5 pF');
    const net = parseTouchstone(text, { fileName: 'm-2.s2p' });
    const ref = single(['cshunt=1.5e-12 F'], 'ts-2');
    expect(worstDifference(net, ref)).toBeLessThanOrEqual(1e-12);
    const named = run(['vary', DEMO, '--over', 'cshunt=1pF,1.5pF', '-o', join(dir, 'named', 'x_{values}.s2p')]);
    expect(named.code).toBe(0);
    expect(readdirSync(join(dir, 'named')).sort()).toEqual(['x_cshunt-1.5pF.s2p', 'x_cshunt-1pF.s2p']);
  });
});

describe('scatterbox vary: report, plot and exit codes', () => {
  it('--report and --plot show one legend entry per member', () => {
    const html = join(dir, 'family.html');
    const svg = join(dir, 'family.svg');
    const r = run(['vary', DEMO, '--over', 'cshunt=1pF..2.2pF:5', '--report', html, '--plot', svg]);
    expect(r.code).toBe(0);
    const page = readFileSync(html, 'utf8');
    expect(page.match(/data-testid="legend-input"/g)).toHaveLength(5);
    expect(page.match(/data-testid="spec-group"/g)).toHaveLength(5);
    expect(page).toContain('data-input="cshunt = 1.3 pF"');
    const plot = readFileSync(svg, 'utf8');
    expect(plot.match(/data-legend="input"/g)).toHaveLength(5);
    // the demo's reciprocal two-port: S11, S21 = S12 and S22 per member on the magnitude plot
    expect(plot.match(/<path [^>]*data-entry="cshunt = [^"]*"/g)).toHaveLength(15);
  });

  it('--require-pass exits 1 when a member fails a spec, 0 when every member passes', () => {
    const failing = run(['vary', DEMO, '--over', 'cshunt=1pF,1.64pF', '--require-pass']);
    expect(failing.code).toBe(1);
    expect(run(['vary', DEMO, '--over', 'cshunt=1pF,1.64pF']).code).toBe(0);
    // the demo's own value (1/(ω0·xp), exact in the netlist) passes every spec (`check` says so)
    const nominal = DesignModel.load(DEMO).nominalValues[1]!;
    const passing = run(['vary', DEMO, '--over', `cshunt=${nominal}`, '--require-pass']);
    expect(passing.out).toContain('1 of 1 member passes every spec');
    expect(passing.code).toBe(0);
  });

  it('bad --over: a located error, exit 1, nothing written', () => {
    const out = join(dir, 'never.json');
    const r = run(['vary', DEMO, '--over', 'cshunt=0.1pF..2pF:3', '-o', out]);
    expect(r.code).toBe(1);
    expect(r.err).toContain('--over:1:8: error: cshunt = 100 fF lies outside its range 500 fF to 4.7 pF');
    expect(r.err).toMatch(/\n {3}\| {8}\^{5}\n/); // the caret under `0.1pF`, column 8
    expect(existsSync(out)).toBe(false);
    const unknown = run(['vary', DEMO, '--over', 'cshnt=1pF..2pF:3']);
    expect(unknown.code).toBe(1);
    expect(unknown.err).toContain("help: did you mean `cshunt`?");
    expect(run(['vary', DEMO]).code).toBe(2); // --over is required: a usage error
  });

  it('outputs are checked before the first solve: one Touchstone name for many members, the netlist itself', () => {
    const one = run(['vary', DEMO, '--over', 'cshunt=1pF..2pF:3', '-o', join(dir, 'one.s2p')]);
    expect(one.code).toBe(1);
    expect(one.err).toContain('names one Touchstone file, but the family has 3 members');
    expect(one.out).toBe(''); // nothing was solved or printed
    const self = run(['vary', DEMO, '--over', 'cshunt=1pF,2pF', '--report', DEMO]);
    expect(self.code).toBe(1);
    expect(self.err).toContain('is an input of this run');
    expect(self.out).toBe('');
    const json = run(['vary', DEMO, '--over', 'cshunt=1pF,2pF', '-o', join(dir, 'x-{index}.json')]);
    expect(json.err).toContain('is one JSON file for the whole family, so {index} and {values} have no place in its name');
    expect(json.out).toBe('');
    const ext = run(['vary', DEMO, '--over', 'cshunt=1pF,2pF', '-o', join(dir, 'x-{index}.s3p')]);
    expect(ext.err).toContain('the file name ends in .s3p but the network has 2 port(s)');
  });
});

describe('scatterbox vary: a member that cannot be evaluated', () => {
  it('names the member, shows the netlist error located, exits 1 and writes nothing', () => {
    const netlist = join(dir, 'zero.sbx');
    writeFileSync(netlist, 'let rs = 50 ohm vary 0 ohm to 100 ohm\nresistor r1 a=p1 b=p2 value=rs\nport 1 plus=p1\nport 2 plus=p2\nsweep list freqs=1 MHz\n');
    const out = join(dir, 'zero.json');
    const r = run(['vary', netlist, '--over', 'rs=10,0', '-o', out]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/^while evaluating rs = 0 ohm \(member 2\):\n.*zero\.sbx:2:29: error: `value` must be other than zero\n/);
    expect(r.err.match(/nothing was written/g)).toHaveLength(1);
    expect(existsSync(out)).toBe(false);
  });
});

describe('the documented example (README, Design exploration)', () => {
  it('prints the summary shown in the docs', () => {
    const r = run(['vary', 'circuits/match-50-75-915.sbx', '--over', 'cshunt=1.5pF,1.64pF,1.8pF']);
    expect(r.code).toBe(0);
    const tail = r.out.slice(r.out.indexOf('member  values'));
    expect(tail).toBe(
      [
        'member  values            channel_match  feed_vswr     channel_loss  usable_band   all',
        '------  ----------------  -------------  ------------  ------------  ------------  ----',
        '1       cshunt = 1.5 pF   FAIL -6.92 dB  pass 0.05     pass 0.08 dB  pass 3.65 dB  FAIL',
        '2       cshunt = 1.64 pF  pass 3.68 dB   pass 0.08     pass 0.08 dB  pass 2.09 dB  pass',
        '3       cshunt = 1.8 pF   FAIL -4.95 dB  pass 0.00451  pass 0.07 dB  pass 0.16 dB  FAIL',
        '',
        '1 of 3 members passes every spec',
        '',
      ].join('\n'),
    );
  });
});
