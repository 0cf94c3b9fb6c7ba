// What a yield run hands on (issue 16, items 2–4): the same samples on any number of threads, the
// drawn part values, the percentile envelopes of |S|, the margin histograms, the CSV of every
// sample, the page and the exact numbers of a partial file.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { quantileSeq } from 'mathjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DesignModel } from '../src/design/model.js';
import { evaluateSamplesParallel } from '../src/yield/parallel.js';
import { evaluateSamples, summarizeYield, type SampleSet } from '../src/yield/run.js';
import { drawSample, sampleDraws, samplerPlan } from '../src/yield/sampler.js';
import { decodeDoubles, encodeDoubles, formatPartial, mergePartials, parsePartial, shardRange } from '../src/yield/partial.js';
import { marginHistogram, yieldCsv, yieldJson } from '../src/yield/report.js';
import { marginHistogramSvg, renderYieldReport, yieldEnvelopeSvg } from '../src/yield/html.js';

const root = join(import.meta.dirname, '..');
const DEMO = join(root, 'circuits', 'bandpass-2g4.sbx');
let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-yield-out-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Every number of two sample sets, bit for bit (NaN equal to NaN). */
function expectSameSet(a: SampleSet, b: SampleSet) {
  expect(Buffer.from(a.margins.buffer, a.margins.byteOffset, a.margins.byteLength).equals(Buffer.from(b.margins.buffer, b.margins.byteOffset, b.margins.byteLength))).toBe(true);
  expect(Array.from(a.draws)).toEqual(Array.from(b.draws));
  expect(Array.from(a.values)).toEqual(Array.from(b.values));
  expect(a.errors).toEqual(b.errors);
  expect(a.envelope?.rows).toBe(b.envelope?.rows);
  if (a.envelope) expect(Array.from(a.envelope.magnitudes)).toEqual(Array.from(b.envelope!.magnitudes));
}

describe('threads', () => {
  it('1, 2 and 3 threads give the same samples bit for bit, envelopes included (determinism, issue item 3)', async () => {
    const model = DesignModel.load(DEMO);
    const one = evaluateSamples(model, { seed: 21, count: 1600, envelopeSamples: 40 });
    for (const jobs of [2, 3]) {
      const many = await evaluateSamplesParallel(model, { seed: 21, count: 1600, envelopeSamples: 40, jobs });
      expectSameSet(many, one);
    }
    // and a run that starts part-way (a shard) gives the same rows as the whole run
    const tail = await evaluateSamplesParallel(model, { seed: 21, first: 600, count: 1000, envelopeSamples: 40, jobs: 2 });
    expect(Array.from(tail.margins)).toEqual(Array.from(one.margins.subarray(600 * model.circuit.specs.length)));
    expect(tail.envelope?.rows).toBe(0);
  });
});

describe('drawn values', () => {
  it('each drawn value is the nominal value times (1 + own spread)·(1 + lot spread), recomputed from the draws (src/yield/sampler.ts formula)', () => {
    const model = DesignModel.load(DEMO);
    const set = evaluateSamples(model, { seed: 5, count: 50 });
    const plan = samplerPlan(model.circuit, 5);
    const d = sampleDraws(plan);
    const nT = model.circuit.tolerances.length;
    for (let i = 0; i < 50; i++) {
      drawSample(plan, i, d);
      model.circuit.tolerances.forEach((tol, t) => {
        // relative tolerances only in this demo: x = n·mult (add = 0)
        expect(d.add[t] === 0).toBe(true);
        expect(set.values[i * nT + t]).toBeCloseTo(tol.nominal * d.mult[t]!, 25);
      });
    }
    // 2 % uniform parts with a 1 % (σ, cut at 3σ) lot: every capacitor within (1 ± 0.02)(1 ± 0.03) of nominal
    const c1 = model.circuit.tolerances.findIndex((t) => t.target.kind === 'element' && model.circuit.elements[t.target.element]!.name === 'c1' && t.target.key === 'value');
    for (let i = 0; i < 50; i++) {
      const ratio = set.values[i * nT + c1]! / model.circuit.tolerances[c1]!.nominal;
      expect(ratio).toBeGreaterThanOrEqual(0.98 * 0.97);
      expect(ratio).toBeLessThanOrEqual(1.02 * 1.03);
    }
  });

  it('a toleranced part that follows a design variable spreads around the variable\'s current value', () => {
    const text = ['let lv = 10 nH vary 5 nH to 20 nH', 'inductor l1 a=in b=out value=lv tol 5%', 'resistor r1 a=out b=ground value=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=100 MHz', 'spec loss measure=il(2,1) max=3 dB over=100 MHz, 100 MHz'].join('\n');
    const model = DesignModel.fromText(text, join(dir, 'follow.sbx'));
    expect(model.toleranceNominals()[0]).toBeCloseTo(10e-9, 22);
    model.setValues({ lv: 15e-9 });
    expect(model.toleranceNominals()[0]).toBeCloseTo(15e-9, 22);
    const set = evaluateSamples(model, { seed: 1, count: 200 });
    for (const v of set.values) {
      expect(v).toBeGreaterThanOrEqual(15e-9 * 0.95 * (1 - 1e-12));
      expect(v).toBeLessThanOrEqual(15e-9 * 1.05 * (1 + 1e-12));
    }
  });
});

describe('envelopes', () => {
  it('the 1/50/99 % envelopes equal the type-7 quantiles of |S_ij| of the envelope samples, each solved on its own (mathjs quantileSeq as the outside reference)', () => {
    const model = DesignModel.load(DEMO);
    const N = 60;
    const r = summarizeYield(evaluateSamples(model, { seed: 9, count: 80, envelopeSamples: N }));
    expect(r.envelope?.samples).toBe(N);
    // each envelope sample solved again, through the model's own sweep, from its draws alone
    const plan = samplerPlan(model.circuit, 9);
    const d = sampleDraws(plan);
    const F = model.circuit.frequencies.length;
    const mags: Float64Array[] = [];
    for (let k = 0; k < N; k++) {
      drawSample(plan, k, d);
      model.setDraws(d);
      const v = model.solve().values;
      mags.push(Float64Array.from({ length: F * 4 }, (_, q) => Math.hypot(v[2 * q]!, v[2 * q + 1]!)));
    }
    model.setDraws(undefined);
    const env = r.envelope!;
    for (const k of [0, 100, 143, 150, 200, F - 1]) {
      for (const q of [1, 2]) {
        // S21 (q = 2: row 1, column 0) and S12 (q = 1)
        const column = mags.map((m) => m[k * 4 + q]!);
        env.percentiles.forEach((p, l) => {
          const want = 20 * Math.log10(quantileSeq(column, p / 100) as number);
          expect(env.db[l * F * 4 + k * 4 + q]).toBeCloseTo(want, 10);
        });
      }
    }
    // the envelopes are ordered: 1 % ≤ median ≤ 99 % everywhere
    for (let v = 0; v < F * 4; v++) {
      expect(env.db[v]!).toBeLessThanOrEqual(env.db[F * 4 + v]!);
      expect(env.db[F * 4 + v]!).toBeLessThanOrEqual(env.db[2 * F * 4 + v]!);
    }
  });

  it('the envelope plot draws the three percentiles and the nominal response, with the spec limits', () => {
    const model = DesignModel.load(DEMO);
    const r = summarizeYield(evaluateSamples(model, { seed: 9, count: 30, envelopeSamples: 30 }));
    const network = model.solve();
    const svg = yieldEnvelopeSvg(r, { nominal: { network, specs: [] } });
    for (const label of ['1 % of builds', 'median', '99 % of builds', 'nominal']) expect(svg).toContain(label);
    const none = summarizeYield(evaluateSamples(model, { seed: 9, count: 5 }));
    expect(() => yieldEnvelopeSvg(none)).toThrow(/--envelopes N/);
  });
});

describe('margin histograms', () => {
  it('count every evaluated sample once and put the pass line (0) on a bin edge', () => {
    const model = DesignModel.load(DEMO);
    const r = summarizeYield(evaluateSamples(model, { seed: 4, count: 400 }));
    r.specs.forEach((sp, s) => {
      const h = marginHistogram(r, s)!;
      const total = Array.from(h.counts).reduce((a, b) => a + b, 0) + h.below + h.above;
      expect(total).toBe(r.samples - r.errors);
      expect(h.below + h.above).toBe(0);
      const lo = h.edges[0]!;
      const hi = h.edges[h.edges.length - 1]!;
      if (lo < 0 && hi > 0) {
        // 0 is an edge (to rounding of the bin width, relative 1e-9)
        const width = h.edges[1]! - h.edges[0]!;
        expect(Math.min(...Array.from(h.edges, (e) => Math.abs(e)))).toBeLessThan(1e-9 * width);
      }
      // failures of the spec = samples with a margin below 0 (the histogram's counts left of 0)
      let left = 0;
      h.counts.forEach((c, b) => {
        if (h.edges[b + 1]! <= 1e-9 * (h.edges[1]! - h.edges[0]!)) left += c;
      });
      expect(left).toBe(sp.failures - r.errors);
      const svg = marginHistogramSvg(h, { unit: sp.unit, title: sp.name });
      expect(svg.startsWith('<svg')).toBe(true);
    });
  });
});

describe('CSV of the samples', () => {
  it('has one RFC 4180 record per sample: pass/fail agreeing with the margins and the summary, the drawn values in SI units', () => {
    const model = DesignModel.load(DEMO);
    const r = summarizeYield(evaluateSamples(model, { seed: 2, count: 120 }));
    const lines = yieldCsv(r).trimEnd().split('\n');
    const head = lines[0]!.split(',');
    expect(head.slice(0, 3)).toEqual(['sample', 'pass', 'error']);
    expect(head).toContain('antenna_match margin (dB)');
    expect(head).toContain('c1.value (F)');
    expect(lines.length).toBe(121);
    let passed = 0;
    const nS = r.specs.length;
    const nT = r.tolerances.length;
    lines.slice(1).forEach((line, i) => {
      const cells = line.split(',');
      expect(cells.length).toBe(3 + nS + nT);
      expect(Number(cells[0])).toBe(i);
      const margins = cells.slice(3, 3 + nS).map(Number);
      expect(cells[1]).toBe(margins.every((m) => m >= 0) ? '1' : '0');
      if (cells[1] === '1') passed++;
      cells.slice(3 + nS).forEach((v, t) => expect(Number(v)).toBe(r.values[i * nT + t]));
    });
    expect(passed).toBe(r.passed);
  });
});

describe('the yield page', () => {
  it('shows the yield, a row and a histogram per spec, the envelopes, and the verdict against the target', () => {
    const model = DesignModel.load(DEMO);
    const r = summarizeYield(evaluateSamples(model, { seed: 2, count: 200, envelopeSamples: 20 }));
    const page = renderYieldReport(r, 'circuits/bandpass-2g4.sbx', { minYield: 0.95 });
    expect(page).toContain(`data-yield="${r.interval.estimate}"`);
    expect(page.match(/data-testid="yield-spec"/g)?.length).toBe(r.specs.length);
    expect(page.match(/data-testid="histogram"/g)?.length).toBe(r.specs.length);
    expect(page).toContain('data-testid="envelope-plot"');
    expect(page).toContain(`data-status="${r.interval.estimate >= 0.95 ? 'pass' : 'fail'}"`);
    // no script, no outside resource (the SVG namespace URI is a name, not a fetch)
    expect(page.replaceAll('xmlns="http://www.w3.org/2000/svg"', '')).not.toMatch(/<script|https?:\/\//);
    const plain = renderYieldReport(summarizeYield(evaluateSamples(model, { seed: 2, count: 10 })), 'x.sbx');
    expect(plain).toContain('data-testid="no-envelope"');
    expect(plain).toContain('data-status="none"');
  });
});

describe('partial files', () => {
  it('keep every double exactly: ±0, ±∞, NaN, subnormals and random bit patterns (fast-check)', () => {
    const specials = Float64Array.from([0, -0, Infinity, -Infinity, NaN, 5e-324, -Number.MAX_VALUE, 1 / 3]);
    const back = decodeDoubles(encodeDoubles(specials), specials.length)!;
    expect(Buffer.from(back.buffer).equals(Buffer.from(specials.buffer))).toBe(true);
    fc.assert(
      fc.property(fc.array(fc.double(), { maxLength: 50 }), (xs) => {
        const a = Float64Array.from(xs);
        const b = decodeDoubles(encodeDoubles(a), a.length)!;
        expect(Buffer.from(b.buffer).equals(Buffer.from(a.buffer))).toBe(true);
      }),
      { numRuns: 200, seed: 7 },
    );
    expect(decodeDoubles(encodeDoubles(specials), specials.length + 1)).toBeUndefined();
    expect(decodeDoubles('not base64!', 1)).toBeUndefined();
    expect(decodeDoubles(42, 0)).toBeUndefined();
  });

  it('shards with envelopes, merged in the library, give the JSON of the single run', () => {
    const model = DesignModel.load(DEMO);
    const whole = evaluateSamples(model, { seed: 3, count: 90, envelopeSamples: 25 });
    const meta = { netlist: 'bp.sbx', digest: 'd', total: 90, shards: 3 };
    const parts = [3, 1, 2].map((shard) => {
      const [first, count] = shardRange(90, shard, 3);
      const set = evaluateSamples(model, { seed: 3, first, count, envelopeSamples: 25 });
      const file = join(dir, `part-${shard}.json`);
      writeFileSync(file, formatPartial(set, { ...meta, shard }));
      return { file, ...parsePartial(readFileSync(file, 'utf8'), file) };
    });
    const merged = mergePartials(parts).set;
    expectSameSet(merged, whole);
    expect(yieldJson(summarizeYield(merged), 'bp.sbx')).toBe(yieldJson(summarizeYield(whole), 'bp.sbx'));
  });
});
