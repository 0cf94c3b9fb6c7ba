// A yield run (issue 16, first steps): samples of the toleranced parts through the design model.
// The yield is checked against the exact probability of a closed form, integrated numerically
// (common practice), and the draws against their distributions.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DesignModel } from '../src/design/model.js';
import { loadNetlist } from '../src/load.js';
import { runYield } from '../src/yield/run.js';
import { drawSample, sampleDraws, samplerPlan } from '../src/yield/sampler.js';
import { wilsonInterval } from '../src/yield/stats.js';

/**
 * A Π pad between 50 Ω ports: shunt r1, series r2, shunt r1 (both shunt parts one value), every
 * part ±5 % uniform, and an insertion-loss window. ABCD of the pad (Pozar, Microwave Engineering,
 * tables 4.1 and 4.2): with all parts real, IL = 20·log10(N/2), N = 2 + 2·r2/r1 + r2/Z0 + Z0·(2 + r2/r1)/r1
 * for equal shunt parts; here the two shunt parts are drawn apart, so N comes from the full ABCD product.
 */
function padIl(ra: number, rb: number, rc: number, z0 = 50): number {
  // shunt ra, series rb, shunt rc: [[1,0],[1/ra,1]]·[[1,rb],[0,1]]·[[1,0],[1/rc,1]]
  const a = 1 + rb / rc;
  const b = rb;
  const c = 1 / ra + 1 / rc + rb / (ra * rc);
  const d = 1 + rb / ra;
  return 20 * Math.log10((a + b / z0 + c * z0 + d) / 2);
}

const PAD = (lo: number, hi: number) =>
  [
    'let rsh = 96.25 ohm',
    'let rse = 71.15 ohm',
    'resistor ra a=in b=ground value=rsh tol 5%',
    'resistor rb a=in b=out value=rse tol 5%',
    'resistor rc a=out b=ground value=rsh tol 5%',
    'port 1 plus=in',
    'port 2 plus=out',
    'sweep list freqs=100 MHz',
    `spec window_hi measure=il(2,1) max=${hi} dB over=100 MHz, 100 MHz`,
    `spec window_lo measure=il(2,1) min=${lo} dB over=100 MHz, 100 MHz`,
  ].join('\n');

describe('yield against a closed form', () => {
  it('a Π pad of ±5 % parts meets a ±0.15 dB window with the probability the closed form integrates to', () => {
    const [lo, hi] = [9.85, 10.15];
    const model = DesignModel.fromText(PAD(lo, hi), 'pad.sbx');
    const nominal = padIl(96.25, 71.15, 96.25);
    expect(nominal).toBeGreaterThan(lo);
    expect(nominal).toBeLessThan(hi);
    // the exact probability: the fraction of the cube of the three uniform parts where the window
    // holds, by the midpoint rule on a 120³ grid (error well below the Monte Carlo spread)
    const g = 120;
    let inside = 0;
    for (let i = 0; i < g; i++) {
      const ra = 96.25 * (0.95 + (0.1 * (i + 0.5)) / g);
      for (let j = 0; j < g; j++) {
        const rb = 71.15 * (0.95 + (0.1 * (j + 0.5)) / g);
        for (let k = 0; k < g; k++) {
          const il = padIl(ra, rb, 96.25 * (0.95 + (0.1 * (k + 0.5)) / g));
          if (il >= lo && il <= hi) inside++;
        }
      }
    }
    const exact = inside / g ** 3;
    expect(exact).toBeGreaterThan(0.2);
    expect(exact).toBeLessThan(0.95);
    const r = runYield(model, { samples: 4000, seed: 11 });
    expect(r.errors).toBe(0);
    // the exact value lies in the 99.9 % Wilson interval of the run (a fixed seed: deterministic)
    const wide = wilsonInterval(r.passed, r.samples, 0.999);
    expect(exact).toBeGreaterThanOrEqual(wide.lower);
    expect(exact).toBeLessThanOrEqual(wide.upper);
    expect(r.interval.confidence).toBe(0.95);
  });

  it('each sample is the closed form at its drawn parts (the model takes the draws exactly)', () => {
    const text = PAD(0, 100);
    const model = DesignModel.fromText(text, 'pad.sbx');
    const plan = samplerPlan(model.circuit, 5);
    const d = sampleDraws(plan);
    for (let k = 0; k < 20; k++) {
      drawSample(plan, k, d);
      model.setDraws(d);
      const il = model.checkSpecs()[0]!.worstValue;
      const [ra, rb, rc] = [96.25 * d.mult[0]!, 71.15 * d.mult[1]!, 96.25 * d.mult[2]!];
      expect(Math.abs(il - padIl(ra, rb, rc))).toBeLessThanOrEqual(1e-12);
      // uniform ±5 %: the factor lies within [0.95, 1.05]
      for (const m of d.mult) expect(Math.abs(m - 1)).toBeLessThanOrEqual(0.05);
    }
    model.setDraws(undefined);
    const nominal = loadNetlist(text, 'pad.sbx').circuit;
    expect(model.currentCircuit().elements.map((e) => e.props.value)).toEqual(nominal.elements.map((e) => e.props.value));
  });
});

describe('draws', () => {
  it('sample k is the same in a run of its own and inside a longer run (shards agree)', () => {
    const model = DesignModel.fromText(PAD(9.9, 10.1), 'pad.sbx');
    const whole = runYield(model, { samples: 60, seed: 3 });
    const part = runYield(model, { samples: 20, seed: 3, first: 40 });
    expect(Array.from(part.margins)).toEqual(Array.from(whole.margins.subarray(40 * 2, 60 * 2)));
    expect(Array.from(part.draws)).toEqual(Array.from(whole.draws.subarray(40 * 3, 60 * 3)));
  });

  it('parts of one lot share its draw; a toleranced parameter moves every element computed from it', () => {
    const text = [
      'lot caps tol normal 2%',
      'let ctop = 10 pF tol 1%',
      'capacitor c1 a=in b=ground value=ctop/2 tol 0.5% lot caps',
      'capacitor c2 a=out b=ground value=4.7 pF tol 0.5% lot caps',
      'resistor r1 a=in b=out value=50 ohm',
      'port 1 plus=in',
      'port 2 plus=out',
      'sweep list freqs=1 GHz',
      'spec s measure=il(2,1) max=10 dB over=1 GHz, 1 GHz',
    ].join('\n');
    const model = DesignModel.fromText(text, 'lot.sbx');
    const c = model.circuit;
    const plan = samplerPlan(c, 9);
    const d = sampleDraws(plan);
    const names = c.tolerances.map((t) => (t.target.kind === 'parameter' ? t.target.name : `${c.elements[t.target.element]!.name}.${t.target.key}`));
    expect(names).toEqual(['ctop', 'c1.value', 'c2.value']);
    // the two capacitors' factors divided by their own spreads give the same lot factor
    let shared = 0;
    for (let k = 0; k < 200; k++) {
      drawSample(plan, k, d);
      const lot1 = d.mult[1]! / (1 + 0.005 * d.unit[1]!);
      const lot2 = d.mult[2]! / (1 + 0.005 * d.unit[2]!);
      expect(Math.abs(lot1 - lot2)).toBeLessThanOrEqual(1e-15);
      if (Math.abs(lot1 - 1) > 0.005) shared++;
      // c1 = ctop/2 drawn, then its own and the lot's factor
      model.setDraws(d);
      const el = model.currentCircuit().elements;
      expect(el[0]!.props.value! / ((10e-12 * d.mult[0]!) / 2)).toBeCloseTo(d.mult[1]!, 12);
      expect(el[1]!.props.value! / 4.7e-12).toBeCloseTo(d.mult[2]!, 12);
    }
    // a 2 % normal lot spread moves most lots by more than 0.5 % (P(|z| > 0.25) ≈ 0.80, common practice)
    expect(shared).toBeGreaterThan(130);
  });

  it('normal relative spreads have the stated σ (sample standard deviation within 4 standard errors)', () => {
    const text = ['let r = 100 ohm tol normal 3%', 'resistor r1 a=in b=out value=r', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 MHz', 'spec s measure=il(2,1) max=10 dB over=1 MHz, 1 MHz'].join('\n');
    const plan = samplerPlan(loadNetlist(text, 'n.sbx').circuit, 21);
    const d = sampleDraws(plan);
    const n = 20000;
    let sum = 0;
    let sum2 = 0;
    for (let k = 0; k < n; k++) {
      drawSample(plan, k, d);
      sum += d.mult[0]! - 1;
      sum2 += (d.mult[0]! - 1) ** 2;
    }
    const mean = sum / n;
    const sd = Math.sqrt(sum2 / n - mean * mean);
    // standard error of the mean σ/√n, of the standard deviation about σ/√(2n) (common practice)
    expect(Math.abs(mean)).toBeLessThanOrEqual((4 * 0.03) / Math.sqrt(n));
    expect(Math.abs(sd - 0.03)).toBeLessThanOrEqual((4 * 0.03) / Math.sqrt(2 * n));
  });
});

describe('yield options (fuzz)', () => {
  it('any numbers for --samples, --seed, --min-yield, --jobs and --envelopes give a result or a plain refusal, never an internal error (fast-check)', async () => {
    const fc = (await import('fast-check')).default;
    const { runYieldCommand } = await import('../bin/commands/yield.js');
    const dir = mkdtempSync(join(tmpdir(), 'sbx-yield-fuzz-'));
    const net = join(dir, 'pad.sbx');
    writeFileSync(net, PAD(9.85, 10.15) + '\n');
    const num = fc.oneof(fc.integer({ min: -5, max: 40 }), fc.double(), fc.constantFrom(NaN, Infinity, -0, 1e300, 2 ** 53, 0.5));
    try {
      await fc.assert(
        fc.asyncProperty(num, num, fc.option(num), fc.option(num), fc.option(num), async (samples, seed, minYield, jobs, envelopes) => {
          const out: string[] = [];
          const err: string[] = [];
          const code = await runYieldCommand(
            { netlist: net, samples, seed, minYield: minYield ?? undefined, jobs: jobs ?? 1, envelopes: envelopes ?? undefined, quiet: true },
            { out: (s) => void out.push(s), err: (s) => void err.push(s) },
            (e) => `error: ${(e as Error).message}`,
          );
          expect([0, 1]).toContain(code);
          if (err.length > 0) expect(err.join('')).toMatch(/^error: --(samples|seed|min-yield|jobs|envelopes) /);
          else expect(out.join('')).toMatch(/^yield of /);
        }),
        { numRuns: 60, seed: 16 },
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('scatterbox yield', () => {
  const root = join(import.meta.dirname, '..');
  const cli = join(root, 'bin', 'scatterbox.js');
  let dir: string;
  const run = (args: string[]) => {
    const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8' });
    return { code: r.status, out: r.stdout, err: r.stderr };
  };
  beforeAll(() => {
    if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
    dir = mkdtempSync(join(tmpdir(), 'sbx-yield-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('prints the yield and its interval, writes JSON and JUnit, and fails below --min-yield', () => {
    const net = join(dir, 'pad.sbx');
    writeFileSync(net, PAD(9.85, 10.15) + '\n');
    const json = join(dir, 'y.json');
    const junit = join(dir, 'y.xml');
    const ok = run(['yield', net, '--samples', '300', '--seed', '2', '--min-yield', '0.1', '--json', json, '--junit', junit]);
    expect(ok.code).toBe(0);
    expect(ok.out).toMatch(/^yield of .*pad\.sbx: 300 samples from 0 \(seed 2\), 3 tolerances/);
    const doc = JSON.parse(readFileSync(json, 'utf8'));
    expect(doc.schema).toBe('scatterbox.yield/1');
    expect(doc.perSample).toHaveLength(300);
    expect(ok.out).toContain(`${doc.passed} of 300 samples pass every spec`);
    // the printed interval is the Wilson interval of the counts
    const w = wilsonInterval(doc.passed, 300);
    expect(doc.interval.lower).toBeCloseTo(w.lower, 15);
    expect(readFileSync(junit, 'utf8')).toContain('<testcase classname="');
    expect(readFileSync(junit, 'utf8')).not.toContain('<failure');
    const low = run(['yield', net, '--samples', '300', '--seed', '2', '--min-yield', '0.999', '--junit', junit]);
    expect(low.code).toBe(1);
    expect(low.out).toContain('is below the target of 99.9 %');
    expect(readFileSync(junit, 'utf8')).toContain('<failure');
  });

  it('refuses bad options plainly, before anything runs', () => {
    const net = join(dir, 'pad2.sbx');
    writeFileSync(net, PAD(9.85, 10.15) + '\n');
    for (const [args, text] of [
      [['--samples', '0'], '--samples must be a whole number from 1 to 10000000'],
      [['--samples', '2.5'], '--samples must be a whole number from 1 to 10000000'],
      [['--seed', '-1'], '--seed must be a whole number from 0'],
      [['--min-yield', '95'], '--min-yield is a fraction from 0 to 1'],
    ] as const) {
      const r = run(['yield', net, ...args]);
      expect(r.code).toBe(1);
      expect(r.err).toContain(text);
    }
  });
});
