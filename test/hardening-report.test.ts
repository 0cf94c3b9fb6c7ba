// Issue 14 (hardening), the figures, report and plot part: each test carries the reproducer of one
// item and checks it against a source outside the code under test (named beside each check).
//
// - zin_re / zin_im with a complex reference R + jX (power waves, K. Kurokawa, "Power waves and the
//   scattering matrix", IEEE Trans. MTT 13(2), 1965): Zin = (Zr* + S·Zr)/(1 − S), checked against
//   the impedance of a known load and the input impedance of a two-port from its Z matrix.
// - the stability figures named after what they measure (`mu_load`, `mu_source`; Edwards & Sinsky
//   1992), the old names an error with a did-you-mean.
// - no empty chart with success; the Smith chart legend with a complex reference; the dB axis
//   ranged from the data that matters; mixed-mode labels; messages that name no function.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { all, create } from 'mathjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { evaluateSpecs } from '../src/check/evaluate.js';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { inputImpedance, inputReactance, inputResistance } from '../src/figures/entry.js';
import { computeFigure, FigureError, FIGURES, parseFigure } from '../src/figures/registry.js';
import { OutputError } from '../src/io/output.js';
import { loadNetlist } from '../src/load.js';
import { modeLabels } from '../src/network/mixed-mode.js';
import type { NetworkData } from '../src/network/types.js';
import { gammaToImpedance, renderPlotSvg, renderReport } from '../src/report/index.js';
import { solveSweep } from '../src/solve/sweep.js';
import { network, twoThroughLines } from './report-fixtures.js';

const math = create(all, {});
const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const lines = (...l: string[]) => l.join('\n') + '\n';
type C = { re: number; im: number };

function expectRel(got: number, want: number, rel: number, what: string): void {
  expect(Math.abs(got - want), `${what}: got ${got}, want ${want}`).toBeLessThanOrEqual(rel * Math.max(1, Math.abs(want)));
}

// --- 1. zin with a complex reference ----------------------------------------------------------------

describe('zin_re and zin_im with a complex reference (ref_x)', () => {
  const freqs = [0.5e9, 1e9, 2e9];

  it('a series R–L load reads back as R + jωL, whatever the reference reactance (closed form)', () => {
    // ZL = 30 Ω + jωL with L = 6.366 nH (40 Ω at 1 GHz); the load's impedance is a closed form
    // (common practice), independent of the port's reference
    const L = 40 / (2 * Math.PI * 1e9);
    for (const [rr, xr] of [
      [50, 20],
      [50, -20],
      [36, 21],
      [75, 0],
    ] as const) {
      const text = lines(`resistor r a=in b=m value=30 ohm`, `inductor l a=m b=ground value=${L}`, `port 1 plus=in ref=${rr} ohm ref_x=${xr} ohm`, `sweep list freqs=${freqs.join(', ')}`);
      const net = solveSweep(loadNetlist(text, 'load.sbx').circuit);
      const re = computeFigure(net, 'zin_re(1)');
      const im = computeFigure(net, 'zin_im(1)');
      const z = inputImpedance(net, 1);
      freqs.forEach((f, k) => {
        const x = 2 * Math.PI * f * L;
        // tolerance 1e-9 relative: the solve and the figure are a few roundings each
        expectRel(re[k]!, 30, 1e-9, `zin_re at ${f} Hz, Zr = ${rr} + j${xr}`);
        expectRel(im[k]!, x, 1e-9, `zin_im at ${f} Hz, Zr = ${rr} + j${xr}`);
        expectRel(z[2 * k]!, 30, 1e-9, 'Re inputImpedance');
        expectRel(z[2 * k + 1]!, x, 1e-9, 'Im inputImpedance');
      });
    }
  });

  it('from a given S: Zin = R(1 + S)/(1 − S) − jX, the inverse of Γ = (Z − Zr*)/(Z + Zr) (Kurokawa 1965, with mathjs)', () => {
    const zr = math.complex(36, 21);
    const loads = [math.complex(10, 25), math.complex(200, -80), math.complex(36, -21), math.complex(5, 0)];
    // S of each load for the reference Zr, computed with mathjs from Kurokawa's definition
    const gammas = loads.map((zl) => math.divide(math.subtract(zl, math.conj(zr)), math.add(zl, zr)) as unknown as C);
    const net = network(
      loads.map((_, k) => 1e9 + k * 1e6),
      (k) => [[[gammas[k]!.re, gammas[k]!.im]]],
      [36],
    );
    net.referenceReactances = Float64Array.of(21);
    const re = inputResistance(net, 1);
    const im = inputReactance(net, 1);
    loads.forEach((zl, k) => {
      expectRel(re[k]!, (zl as unknown as C).re, 1e-12, `R of load ${k}`);
      expectRel(im[k]!, (zl as unknown as C).im, 1e-12, `X of load ${k}`);
    });
  });

  it('the Smith chart helper gammaToImpedance takes the reference reactance too (Kurokawa 1965, mathjs)', () => {
    const zr = math.complex(36, 21);
    const zl = math.complex(10, 25);
    const g = math.divide(math.subtract(zl, math.conj(zr)), math.add(zl, zr)) as unknown as C;
    const [r, x] = gammaToImpedance(g.re, g.im, 36, 21);
    expectRel(r, 10, 1e-12, 'R');
    expectRel(x, 25, 1e-12, 'X');
  });

  it('a two-port: Zin at port 1 with port 2 in its complex reference is Z11 − Z12·Z21/(Z22 + Zr2) (common practice, mathjs)', () => {
    // T network: series 20 Ω, shunt 100 Ω, series 40 Ω → Z = [[120, 100], [100, 140]] (closed form)
    const text = lines(
      'resistor a1 a=p1 b=m value=20 ohm',
      'resistor sh a=m b=ground value=100 ohm',
      'resistor a2 a=m b=p2 value=40 ohm',
      'port 1 plus=p1 ref=50 ohm ref_x=30 ohm',
      'port 2 plus=p2 ref=25 ohm ref_x=-10 ohm',
      'sweep list freqs=1 GHz',
    );
    const net = solveSweep(loadNetlist(text, 'two.sbx').circuit);
    // a2 = 0 means V2 = −Zr2·I2: port 2 is loaded by Zr2 = 25 − j10 Ω
    const want = math.subtract(120, math.divide(100 * 100, math.add(140, math.complex(25, -10)))) as unknown as C;
    expectRel(computeFigure(net, 'zin_re(1)')[0]!, want.re, 1e-9, 'zin_re(1)');
    expectRel(computeFigure(net, 'zin_im(1)')[0]!, want.im, 1e-9, 'zin_im(1)');
  });

  it('a spec on zin_im of a conjugate-matched port passes at the load reactance, not X off (the reproducer)', () => {
    // ZL = 30 + j40 Ω at 1 GHz seen from a reference of 30 − j40 Ω (the conjugate): S11 = 0
    const L = 40 / (2 * Math.PI * 1e9);
    const text = lines(`resistor r a=in b=x value=30 ohm`, `inductor l1 a=x b=ground value=${L}`, 'port 1 plus=in ref=30 ohm ref_x=-40 ohm', 'sweep list freqs=1 GHz', 'spec x measure=zin_im(1) min=39.999 ohm above=0 Hz', 'spec y measure=zin_im(1) max=40.001 ohm above=0 Hz');
    const { circuit } = loadNetlist(text, 'cm.sbx');
    const net = solveSweep(circuit);
    for (const r of evaluateSpecs(circuit.specs, net)) {
      expect(r.pass, r.spec.name).toBe(true);
      expectRel(r.worstValue, 40, 1e-9, 'zin_im(1)');
    }
  });
});

// --- 2. stability figure names -------------------------------------------------------------------------

describe('the stability figures are named after what they measure', () => {
  // a unilateral two-port, S12 = 0: μ (load plane) = 1/|S22| and μ′ (source plane) = 1/|S11|
  // (Edwards & Sinsky 1992, the unilateral case of μ = (1 − |S11|²)/(|S22 − Δ·S11*| + |S12·S21|), from memory)
  const net = network([1e9], () => [
    [
      [0.5, 0],
      [0, 0],
    ],
    [
      [3, 1],
      [0, 0.25],
    ],
  ]);

  it('mu_load is the load-plane μ and mu_source the source-plane μ′', () => {
    expectRel(computeFigure(net, 'mu_load')[0]!, 1 / 0.25, 1e-12, 'mu_load');
    expectRel(computeFigure(net, 'mu_source')[0]!, 1 / 0.5, 1e-12, 'mu_source');
    expect(FIGURES.map((f) => f.name)).toEqual(expect.arrayContaining(['mu_load', 'mu_source']));
  });

  it('the old names are removed, and their error points at the new name', () => {
    for (const [old, now] of [
      ['mu', 'mu_load'],
      ['MU', 'mu_load'],
      ['mu2', 'mu_source'],
      ['Mu2', 'mu_source'],
    ] as const) {
      let err: unknown;
      try {
        parseFigure(old);
      } catch (e) {
        err = e;
      }
      expect(err, old).toBeInstanceOf(FigureError);
      expect((err as FigureError).code).toBe('unknown-figure');
      expect((err as FigureError).help).toBe(`did you mean \`${now}\`?`);
      expect((err as FigureError).detail).toContain(`\`${now}\``);
    }
    expect(FIGURES.map((f) => f.name)).not.toContain('mu');
    expect(FIGURES.map((f) => f.name)).not.toContain('mu2');
  });

  it('in a netlist, `measure=mu2` is a located error with the did-you-mean', () => {
    const text = lines('resistor r a=in b=out value=10 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz', 'spec st measure=mu2 min=1');
    let err: unknown;
    try {
      loadNetlist(text, 'st.sbx');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    const d = (err as InputError).diagnostics.find((x) => x.severity === 'error')!;
    expect(d.help).toBe('did you mean `mu_source`?');
    expect(d.span?.line).toBe(5);
    expect(d.span?.column).toBe(17); // under `mu2`
  });

  it('the CLI help and the grammar reference list the new names, not the old', () => {
    const grammar = readFileSync(join(root, 'grammar', 'README.md'), 'utf8');
    expect(grammar).toContain('| `mu_load`');
    expect(grammar).toContain('| `mu_source`');
    expect(grammar).not.toMatch(/\| `mu2?` /);
    const cliSource = readFileSync(join(root, 'bin', 'cli.ts'), 'utf8');
    expect(cliSource).toContain('mu_load, mu_source');
    expect(cliSource).not.toMatch(/\bmu, mu2\b/);
  });
});

// --- 4. no empty chart with success ---------------------------------------------------------------------

describe('plots are never empty with success', () => {
  let net: NetworkData;
  beforeAll(() => {
    const text = readFileSync(join(root, 'circuits', 'bandpass-2g4.sbx'), 'utf8');
    net = solveSweep(loadNetlist(text, 'bandpass-2g4.sbx').circuit);
  });

  /** Points of the path drawn for `entry` (M/L commands), 0 if there is none. */
  function drawn(svg: string, entry: string): number {
    const m = new RegExp(`<path d="([^"]*)"[^>]*data-entry="${entry}"`).exec(svg) ?? new RegExp(`<g data-entry="${entry}"><path d="([^"]*)"`).exec(svg);
    return m ? (m[1]!.match(/[ML]/g) ?? []).length : 0;
  }

  it('a Smith chart of a transmission entry is an error naming the entry (the reproducer: --kind smith --entry 21)', () => {
    for (const entries of [[[2, 1]], [[1, 1], [1, 2]]] as [number, number][][]) {
      let err: unknown;
      try {
        renderPlotSvg(net, { kind: 'smith', entries });
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(OutputError);
      expect((err as OutputError).message).toMatch(/Smith chart shows reflections, and S(21|12) is a transmission/);
      expect((err as OutputError).help).toContain('S11');
    }
  });

  it('every kind with every single entry draws that entry (a 2-port, 201 points)', () => {
    for (const kind of ['db', 'phase', 'gd', 'smith'] as const) {
      for (const [i, j] of [
        [1, 1],
        [2, 1],
        [1, 2],
        [2, 2],
      ] as const) {
        if (kind === 'smith' && i !== j) continue;
        const svg = renderPlotSvg(net, { kind, entries: [[i, j]] });
        // an entry asked for is drawn on its own, even where it equals another (S22 = S11 here)
        const label = `S${i}${j}`;
        expect(drawn(svg, label), `${kind} ${label}`).toBeGreaterThan(50);
      }
    }
  });

  it('group delay of a reflection asked for alone is that reflection, not another entry', () => {
    const svg = renderPlotSvg(net, { kind: 'gd', entries: [[1, 1]] });
    expect(drawn(svg, 'S11')).toBeGreaterThan(50);
    expect(svg).not.toContain('data-entry="S21"');
  });

  it('an entry that is exactly 0 everywhere is named in the plot; a plot of nothing else is an error', () => {
    // two ports with no path between them: S21 = S12 = 0 exactly
    const iso = network([1e9, 2e9, 3e9], (k) => [
      [
        [0.2 + 0.1 * k, 0.1],
        [0, 0],
      ],
      [
        [0, 0],
        [0.3, -0.1 * k],
      ],
    ]);
    const svg = renderPlotSvg(iso, { kind: 'db', entries: [[1, 1], [2, 1]] });
    expect(drawn(svg, 'S11')).toBe(3);
    expect(svg).toMatch(/<text [^>]*data-empty="S21">S21: not drawn, exactly 0 at every point \(−∞ dB\)<\/text>/);
    expect(() => renderPlotSvg(iso, { kind: 'db', entries: [[2, 1]] })).toThrow(/nothing to plot: S21 has no value to draw/);
    // one sweep point has no group delay
    const one = network([1e9], () => [[[0.5, 0.1]]]);
    expect(() => renderPlotSvg(one, { kind: 'gd' })).toThrow(/group delay needs at least two sweep points/);
  });

  it('a sweep of one point is drawn as a dot on each rectangular plot', () => {
    const one = network([1e9], () => [
      [
        [0.5, 0.1],
        [0.2, 0.3],
      ],
      [
        [0.2, 0.3],
        [0.1, -0.4],
      ],
    ]);
    for (const kind of ['db', 'phase'] as const) {
      const svg = renderPlotSvg(one, { kind, entries: [[1, 1], [2, 1]] });
      expect(svg, kind).toMatch(/<circle [^>]*data-point="S11"\/>/);
      expect(svg, kind).toMatch(/<circle [^>]*data-point="S21"\/>/);
    }
  });

  describe('the command line', () => {
    let dir: string;
    beforeAll(() => {
      if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
      dir = mkdtempSync(join(tmpdir(), 'sbx-hardening-report-'));
    });
    afterAll(() => rmSync(dir, { recursive: true, force: true }));

    it('`plot --kind smith --entry 21` fails with a plain message and writes nothing', () => {
      const out = join(dir, 'smith.svg');
      const r = spawnSync(process.execPath, [cli, 'plot', 'circuits/bandpass-2g4.sbx', '-o', out, '--kind', 'smith', '--entry', '21'], { cwd: root, encoding: 'utf8' });
      expect(r.status).not.toBe(0);
      expect(r.stderr).toContain('error: a Smith chart shows reflections, and S21 is a transmission');
      expect(r.stderr).toContain('help: ');
      expect(existsSync(out)).toBe(false);
      expect(readdirSync(dir)).toEqual([]);
    });
  });
});

// --- 5. the Smith chart legend with a complex reference -------------------------------------------------

describe('the reference of a port is shown as R + jX', () => {
  const L = 40 / (2 * Math.PI * 1e9);
  const oneport = (x: number) =>
    solveSweep(loadNetlist(lines(`resistor r a=in b=m value=30 ohm`, `inductor l a=m b=ground value=${L}`, `port 1 plus=in ref=50 ohm ref_x=${x} ohm`, 'sweep linear start=1 GHz stop=2 GHz points=11'), 'one.sbx').circuit);

  it('in the static Smith chart legend', () => {
    expect(renderPlotSvg(oneport(20), { kind: 'smith' })).toContain('>Z0 = 50 + j20 Ω</text>');
    expect(renderPlotSvg(oneport(-12.5), { kind: 'smith' })).toContain('>Z0 = 50 − j12.5 Ω</text>');
    // a real reference as before
    expect(renderPlotSvg(oneport(0), { kind: 'smith' })).toContain('>Z0 = 50 Ω</text>');
  });

  it('per port when the references differ', () => {
    const text = lines('resistor a1 a=p1 b=p2 value=20 ohm', 'resistor sh a=p2 b=ground value=100 ohm', 'port 1 plus=p1 ref=50 ohm ref_x=30 ohm', 'port 2 plus=p2 ref=25 ohm', 'sweep linear start=1 GHz stop=2 GHz points=5');
    const net = solveSweep(loadNetlist(text, 'two.sbx').circuit);
    const svg = renderPlotSvg(net, { kind: 'smith' });
    expect(svg).toContain('>port 1: 50 + j30 Ω</text>');
    expect(svg).toContain('>port 2: 25 Ω</text>');
  });

  it('in the report: the ports card, the Smith caption and the reactance the readout uses', () => {
    const net = oneport(20);
    const html = renderReport({ source: 'one.sbx', net });
    expect(html).toMatch(/<tr data-testid="port-row" data-port="1" data-reference="50" data-reactance="20">.*<td class="num">50 \+ j20 Ω<\/td><\/tr>/);
    expect(html).toContain('reflections, normalised to 50 + j20 Ω');
    const data = JSON.parse(/<script type="application\/json" id="sbx-data">([\s\S]*?)<\/script>/.exec(html)![1]!) as { entries: { label: string; z0: number; x0: number }[] };
    expect(data.entries.find((e) => e.label === 'S11')).toMatchObject({ z0: 50, x0: 20 });
  });
});

// --- 6. the dB axis from the data that matters -------------------------------------------------------

describe('the dB axis is not stretched by numerical zeros', () => {
  // S11 about −6 dB, S22 −100 dB, S21 = S12 = 1e-20 (−400 dB, a numerical zero)
  const net = network([1e9, 2e9, 3e9, 4e9], (k) => [
    [
      [0.5, 0.01 * k],
      [1e-20, 0],
    ],
    [
      [1e-20, 0],
      [1e-5, 0],
    ],
  ]);
  const yMin = (svg: string) => Number(/data-y-min="([^"]+)"/.exec(svg)![1]);

  it('the static plot reaches at most 120 dB below the largest value, plus one tick step (common practice)', () => {
    const svg = renderPlotSvg(net, { kind: 'db' });
    const top = 20 * Math.log10(Math.hypot(0.5, 0.03)); // the largest |S| in dB, at 4 GHz
    const y = yMin(svg);
    expect(y).toBeGreaterThanOrEqual(top - 120 - 20); // one tick step of 20 dB at most beyond the floor
    expect(y).toBeLessThanOrEqual(-100); // S22 at −100 dB is still on the axis
  });

  it('a spec limit below the floor stays on the axis', () => {
    const text = lines('resistor r a=in b=out value=1 Mohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep linear start=1 GHz stop=2 GHz points=3', 'spec deep measure=il(2,1) max=250 dB above=0 Hz');
    const { circuit } = loadNetlist(text, 'deep.sbx');
    const n = solveSweep(circuit);
    const svg = renderPlotSvg(n, { kind: 'db', specs: evaluateSpecs(circuit.specs, n) });
    expect(yMin(svg)).toBeLessThanOrEqual(-250);
  });

  it('the report hands the same span to its plots', () => {
    const html = renderReport({ source: 'zeros', net });
    expect(html).toContain('"dbSpan":120');
  });
});

// --- 7. mixed-mode labels ---------------------------------------------------------------------------------

describe('mixed-mode data is labelled by mode', () => {
  // a 4-port of two uncoupled through lines, 1→2 and 3→4, with some reflection; pairs (1,3) and (2,4)
  const { mm } = twoThroughLines();
  // the naming of D. E. Bockelman and W. R. Eisenstadt, "Combined differential and common-mode
  // scattering parameters", IEEE Trans. MTT 43(7), 1995: S, the response mode, the drive mode,
  // then the response and drive pair numbers (from memory)
  const modes = modeLabels(2);
  const label = (i: number, j: number) => `S${modes[i - 1]![0]!.toLowerCase()}${modes[j - 1]![0]!.toLowerCase()}${modes[i - 1]!.slice(1)}${modes[j - 1]!.slice(1)}`;

  it('the report labels every entry Sdd11, Sdc21, …', () => {
    const html = renderReport({ source: 'mm', net: mm, entries: [[1, 1], [2, 1], [2, 3], [3, 4]] });
    const data = JSON.parse(/<script type="application\/json" id="sbx-data">([\s\S]*?)<\/script>/.exec(html)![1]!) as { entries: { label: string; i: number; j: number }[] };
    for (const e of data.entries) expect(e.label).toBe(label(e.i, e.j));
    const labels = data.entries.map((e) => e.label);
    expect(labels).toEqual(expect.arrayContaining(['Sdd11', 'Sdd21', 'Sdc21', 'Scc12']));
    expect(labels.some((l) => /^S\d/.test(l))).toBe(false);
  });

  it('the static plots label the modes too, the Smith chart its mode reflections', () => {
    const svg = renderPlotSvg(mm, { kind: 'db', entries: [[2, 1], [4, 3]] });
    expect(svg).toContain('>Sdd21</text>');
    expect(svg).toContain('>Scc21</text>');
    const smith = renderPlotSvg(mm, { kind: 'smith' });
    expect(smith).toMatch(/data-entry="Sdd11"/);
    expect(smith).toMatch(/data-entry="Scc22"|>Sdd11 = [^<]*Scc22/);
    expect(() => renderPlotSvg(mm, { kind: 'smith', entries: [[2, 3]] })).toThrow(/Sdc21 is a transmission/);
  });
});

// --- 8. no message names a function of ours -------------------------------------------------------------

describe('messages name no internal function', () => {
  it('no error text in src/report or src/figures starts with an identifier and a colon', () => {
    const bad: string[] = [];
    for (const folder of ['report', 'figures']) {
      for (const file of readdirSync(join(root, 'src', folder))) {
        const text = readFileSync(join(root, 'src', folder, file), 'utf8');
        for (const m of text.matchAll(/new [A-Za-z]*Error\(\s*(?:'[a-z-]+',\s*(?:text|''),\s*)?[`'"]([A-Za-z_$][\w$]*|\$\{who\}):/g)) bad.push(`${folder}/${file}: ${m[0]}`);
        if (/\$\{who\}/.test(text)) bad.push(`${folder}/${file}: \${who}`);
      }
    }
    expect(bad).toEqual([]);
  });

  it('errors thrown at run time do not start with a function name (the reproducer: renderPlotSvg:)', () => {
    const net = network([1e9], () => [[[0.5, 0]]]);
    const messages: string[] = [];
    const grab = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        messages.push((e as Error).message);
        return;
      }
      throw new Error('expected an error');
    };
    grab(() => renderPlotSvg(net, { kind: 'bogus' as 'db' }));
    grab(() => renderPlotSvg(net, { kind: 'db', width: 60, height: 60 }));
    grab(() => renderPlotSvg(net, { kind: 'smith', width: 100, height: 100 }));
    grab(() => renderPlotSvg({ ...net, frequencies: new Float64Array(0), values: new Float64Array(0) }, { kind: 'db' }));
    grab(() => renderReport({ source: 'x', net: { ...net, frequencies: new Float64Array(0), values: new Float64Array(0) } }));
    grab(() => computeFigure({ ...net, values: new Float64Array(3) }, 'rl(1)'));
    grab(() => inputImpedance(net, 2));
    grab(() => inputResistance(net, 1, new Float64Array(7)));
    for (const m of messages) {
      expect(m).not.toMatch(/^[A-Za-z_$][\w$]*:/);
      expect(m).not.toMatch(/renderPlotSvg|renderReport|inputImpedance|inputResistance|magnitudeDb|checkShape|outputArray/);
    }
    expect(messages.length).toBe(8);
  });
});
