// `scatterbox convert` and `scatterbox microstrip`, run as a user would.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { formatTouchstone, parseTouchstone } from '../src/io/touchstone.js';
import type { NetworkData } from '../src/network/types.js';

const root = join(import.meta.dirname, '..');
const run = (args: string[]) => {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'scatterbox.js'), ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};
const dir = mkdtempSync(join(tmpdir(), 'sbx-conv-'));

/** S of a series impedance Z between two ports of reference z0: S11 = Z/(Z+2z0), S21 = 2z0/(Z+2z0) (closed form, common practice). */
function seriesZ(zr: number, zi: number, z0 = 50): NetworkData {
  const dr = zr + 2 * z0;
  const di = zi;
  const d2 = dr * dr + di * di;
  const s11r = (zr * dr + zi * di) / d2;
  const s11i = (zi * dr - zr * di) / d2;
  const s21r = (2 * z0 * dr) / d2;
  const s21i = (-2 * z0 * di) / d2;
  return { parameter: 'S', ports: 2, frequencies: Float64Array.of(1e9), references: Float64Array.of(z0, z0), values: Float64Array.of(s11r, s11i, s21r, s21i, s21r, s21i, s11r, s11i) };
}

describe('scatterbox convert', () => {
  writeFileSync(join(dir, 'series.s2p'), formatTouchstone(seriesZ(30, 40), { digits: 17 }));

  it('writes the chain matrix of a series impedance: A = D = 1, B = Z, C = 0 (common practice)', () => {
    const out = join(dir, 'abcd.csv');
    expect(run(['convert', join(dir, 'series.s2p'), '-o', out, '--to', 'ABCD']).code).toBe(0);
    const [head, row] = readFileSync(out, 'utf8').trim().split('\n');
    expect(head).toBe('freq_hz,A_re,A_im,B_re,B_im,C_re,C_im,D_re,D_im');
    const v = row!.split(',').map(Number);
    const expected = [1e9, 1, 0, 30, 40, 0, 0, 1, 0];
    v.forEach((x, i) => expect(x).toBeCloseTo(expected[i]!, 10));
  });

  it('writes H of a series impedance as Touchstone 1.1: H = [[Z, 1], [−1, 0]], h11 = Z/R (common practice; normalisation of the standard, from memory)', () => {
    const out = join(dir, 'h.s2p');
    expect(run(['convert', join(dir, 'series.s2p'), '-o', out, '--to', 'H']).code).toBe(0);
    const lines = readFileSync(out, 'utf8').split('\n').filter((l) => l && !l.startsWith('!'));
    expect(lines[0]).toBe('# GHz H RI R 50');
    // two-port order N11 N21 N12 N22
    const v = lines[1]!.trim().split(/\s+/).map(Number);
    const expected = [1, 30 / 50, 40 / 50, -1, 0, 1, 0, 0, 0];
    v.forEach((x, i) => expect(x).toBeCloseTo(expected[i]!, 12));
  });

  it('Z of a series element does not exist: a clear error, nothing written', () => {
    const r = run(['convert', join(dir, 'series.s2p'), '-o', join(dir, 'z.s2p'), '--to', 'Z']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/Z-parameters do not exist/);
  });

  it('renormalising to 75 ohm matches the closed form at 75 ohm, and back to 50 is the identity', () => {
    const out = join(dir, 'r75.s2p');
    expect(run(['convert', join(dir, 'series.s2p'), '-o', out, '--renormalize', '75', '--digits', '17']).code).toBe(0);
    const got = parseTouchstone(readFileSync(out, 'utf8'), { fileName: out });
    const want = seriesZ(30, 40, 75);
    got.values.forEach((x, i) => expect(x).toBeCloseTo(want.values[i]!, 12));
    const back = join(dir, 'r50.s2p');
    expect(run(['convert', out, '-o', back, '--renormalize', '50']).code).toBe(0);
    const again = parseTouchstone(readFileSync(back, 'utf8'), { fileName: back });
    again.values.forEach((x, i) => expect(x).toBeCloseTo(seriesZ(30, 40).values[i]!, 12));
  });

  it('mixed mode of two identical uncoupled lines: Sdd21 = Scc21 = the line S21, no mode conversion (Bockelman & Eisenstadt, 1995)', () => {
    // ports 1→2 one line, 3→4 the other; each a matched delay S21 = e^(−jθ)
    const th = 0.7;
    const v = new Float64Array(32);
    const set = (i: number, j: number, re: number, im: number) => {
      v[2 * (i * 4 + j)] = re;
      v[2 * (i * 4 + j) + 1] = im;
    };
    for (const [a, b] of [[0, 1], [1, 0], [2, 3], [3, 2]]) set(a!, b!, Math.cos(th), -Math.sin(th));
    writeFileSync(join(dir, 'pair.s4p'), formatTouchstone({ parameter: 'S', ports: 4, frequencies: Float64Array.of(1e9), references: Float64Array.of(50, 50, 50, 50), values: v }, { digits: 17 }));
    const out = join(dir, 'pair-mm.s4p');
    expect(run(['convert', join(dir, 'pair.s4p'), '-o', out, '--mixed-mode', '1,3;2,4']).code).toBe(0);
    const text = readFileSync(out, 'utf8');
    expect(text).toMatch(/D1 D2 C1 C2/);
    const mm = parseTouchstone(text, { fileName: out });
    expect(Array.from(mm.references)).toEqual([100, 100, 25, 25]);
    const e = (i: number, j: number) => [mm.values[2 * (i * 4 + j)]!, mm.values[2 * (i * 4 + j) + 1]!];
    expect(e(1, 0)[0]).toBeCloseTo(Math.cos(th), 12); // Sdd21
    expect(e(1, 0)[1]).toBeCloseTo(-Math.sin(th), 12);
    expect(e(3, 2)[0]).toBeCloseTo(Math.cos(th), 12); // Scc21
    for (const [i, j] of [[2, 0], [3, 0], [0, 2], [1, 3]]) expect(Math.hypot(...e(i!, j!))).toBeLessThan(1e-14);
  });

  it('a bad pair list is an input error with an example', () => {
    const r = run(['convert', join(dir, 'pair.s4p'), '-o', join(dir, 'x.s4p'), '--mixed-mode', '1-3']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/port pairs are written p,n;p,n/);
  });
});

describe('scatterbox microstrip', () => {
  it('50 ohm on 1.6 mm FR-4 (εr 4.4) is about 3 mm wide and analyses back to 50 ohm', () => {
    const r = run(['microstrip', '--z0', '50 ohm', '--height', '1.6 mm', '--er', '4.4']);
    expect(r.code).toBe(0);
    const w = Number(/width\s+([\d.]+) mm/.exec(r.out)![1]);
    // common practice (from memory): a 50 ohm line on 1.6 mm FR-4 is close to 3 mm wide
    expect(w).toBeGreaterThan(2.8);
    expect(w).toBeLessThan(3.2);
    expect(r.out).toMatch(/impedance\s+50\.0000 ohm/);
  });

  it('a height with the wrong unit is a located error', () => {
    const r = run(['microstrip', '--z0', '50 ohm', '--height', '1.6 nF', '--er', '4.4']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/--height:1:1: error: --height must be in m, but it is a capacitance \(F\)/);
  });
});

describe('scatterbox report and plot', () => {
  it('report writes one self-contained HTML file with the specs', () => {
    const out = join(dir, 'r.html');
    const r = run(['report', 'circuits/pad-10db-pi.sbx', '-o', out, '--at', '1 GHz']);
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html.toLowerCase().startsWith('<!doctype html>')).toBe(true);
    expect(html).toMatch(/loss_upper/);
    expect(html).not.toMatch(/\s(src|href)=["']https?:/);
  });

  it('plot writes SVG, or PNG through the rasteriser; other extensions are refused', () => {
    const svg = join(dir, 'p.svg');
    expect(run(['plot', 'circuits/match-50-75-915.sbx', '-o', svg, '--kind', 'smith', '--entry', '11']).code).toBe(0);
    expect(readFileSync(svg, 'utf8')).toMatch(/^<svg[\s\S]*<\/svg>\s*$/);
    const png = join(dir, 'p.png');
    expect(run(['plot', 'circuits/pad-10db-pi.sbx', '-o', png]).code).toBe(0);
    // PNG signature (PNG specification, ISO/IEC 15948): 89 50 4E 47 0D 0A 1A 0A
    expect(Array.from(readFileSync(png).subarray(0, 8))).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const bad = run(['plot', 'circuits/pad-10db-pi.sbx', '-o', join(dir, 'p.gif')]);
    expect(bad.code).toBe(1);
    expect(bad.err).toMatch(/\.svg or \.png/);
  });
});
