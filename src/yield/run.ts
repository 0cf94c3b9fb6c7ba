/**
 * A yield run: samples of the toleranced parts (src/yield/sampler.ts) evaluated by the design
 * model (src/design/model.ts: the compiled parameter graph and the re-stamped plan, only the spec
 * frequencies solved), the fraction that passes every spec with its Wilson interval, the failures
 * per spec, the worst samples, and which tolerances drive the failures.
 *
 * Sample k depends only on (seed, k): a run over samples first … first + count − 1 gives the same
 * per-sample results wherever and in whatever order it runs.
 *
 * @module
 */
import type { SpecResult } from '../check/types.js';
import type { DesignModel } from '../design/model.js';
import { specScale } from '../design/fit.js';
import { InputError } from '../diagnostics/diagnostic.js';
import { SingularSystemError } from '../solve/sweep.js';
import { drawSample, sampleDraws, samplerPlan } from './sampler.js';
import { pearson, wilsonInterval, type ProportionInterval } from './stats.js';
import { MAX_YIELD_SAMPLES } from '../limits.js';

export interface YieldOptions {
  samples: number;
  seed: number;
  /** The first sample's number (default 0). */
  first?: number;
  /** Confidence of the yield interval (default 0.95). */
  confidence?: number;
  /** How many of the worst samples to keep (default 5). */
  worst?: number;
  /** Called after each sample with the number done and the total. */
  onProgress?: (done: number, total: number) => void;
}

/** One tolerance as the results name it: what it applies to. */
export interface YieldTolerance {
  /** `c1.value`, `lres`… */
  name: string;
  lot?: string;
}

export interface YieldSample {
  /** The sample's number k. */
  sample: number;
  /** The specs it fails (names), or every spec when it could not be evaluated. */
  failing: string[];
  /** Why it could not be evaluated (a part value out of its range, a singular system), if so. */
  error?: string;
  /** Its violations, summed over the failing specs in units of each spec's scale (for ranking). */
  severity: number;
}

export interface YieldResult {
  seed: number;
  first: number;
  samples: number;
  passed: number;
  /** Samples that could not be evaluated (counted as failing every spec). */
  errors: number;
  interval: ProportionInterval;
  specs: { name: string; figure: string; unit: string; failures: number }[];
  tolerances: YieldTolerance[];
  /** Worst margin of spec s in sample i at margins[i·specs + s] (−Infinity: not evaluated). */
  margins: Float64Array;
  /** The standard draw of tolerance t in sample i at draws[i·tolerances + t] (2u − 1 or z). */
  draws: Float64Array;
  /** The worst samples, worst first. */
  worst: YieldSample[];
  /**
   * Per spec, per tolerance: the correlation (Pearson) of the tolerance's draw with the spec's worst
   * margin over the evaluated samples (NaN where either does not vary): a strong one (|r| near 1)
   * marks the tolerance that drives the spec's failures; a negative sign means that a part drawn
   * high lowers the margin.
   */
  drivers: Float64Array;
}

/**
 * The per-sample results of samples first … first + count − 1: all a summary needs, so that
 * shards computed apart and merged give what one run gives.
 */
export interface SampleSet {
  seed: number;
  first: number;
  count: number;
  specs: { name: string; figure: string; unit: string; scale: number }[];
  tolerances: YieldTolerance[];
  /** Worst margin of spec s in sample i at margins[i·specs + s] (−Infinity: not evaluated). */
  margins: Float64Array;
  /** The standard draw of tolerance t in sample i at draws[i·tolerances + t]. */
  draws: Float64Array;
  /** Per sample: why it could not be evaluated, or null. */
  errors: (string | null)[];
}

/** The specs and tolerances a set of samples of the model describes (its columns). */
export function sampleSetShape(model: DesignModel): Pick<SampleSet, 'specs' | 'tolerances'> {
  const circuit = model.circuit;
  return {
    specs: circuit.specs.map((sp) => ({ name: sp.name, figure: sp.figure, unit: sp.unit, scale: specScale(sp) })),
    tolerances: circuit.tolerances.map((t) => ({ name: t.target.kind === 'parameter' ? t.target.name : `${circuit.elements[t.target.element]!.name}.${t.target.key}`, ...(t.lot !== undefined ? { lot: t.lot } : {}) })),
  };
}

/** Evaluates samples first … first + count − 1 of the model's tolerances (see {@link SampleSet}). */
export function evaluateSamples(model: DesignModel, options: { seed: number; first?: number; count: number; onProgress?: (done: number, total: number) => void }): SampleSet {
  const circuit = model.circuit;
  const specs = circuit.specs;
  const nS = specs.length;
  const nT = circuit.tolerances.length;
  const n = options.count;
  const first = options.first ?? 0;
  if (!Number.isSafeInteger(n) || n < 1 || n > MAX_YIELD_SAMPLES) throw new RangeError(`the number of samples is a whole number from 1 to ${MAX_YIELD_SAMPLES}, not ${n}`);
  if (!Number.isSafeInteger(first) || first < 0) throw new RangeError(`the first sample is a whole number from 0, not ${first}`);
  const plan = samplerPlan(circuit, options.seed);
  const draws = sampleDraws(plan);
  const lotScratch = new Float64Array(plan.lots.length);
  const margins = new Float64Array(n * nS);
  const allDraws = new Float64Array(n * nT);
  const errors: (string | null)[] = [];
  for (let i = 0; i < n; i++) {
    drawSample(plan, first + i, draws, lotScratch);
    allDraws.set(draws.unit, i * nT);
    model.setDraws(draws);
    let results: SpecResult[] | undefined;
    let error: string | null = null;
    try {
      results = model.checkSpecs();
    } catch (e) {
      if (e instanceof InputError) error = e.diagnostics[0]?.message ?? 'a part value cannot be taken';
      else if (e instanceof SingularSystemError) error = e.message;
      else throw e;
    }
    errors.push(error);
    for (let s = 0; s < nS; s++) margins[i * nS + s] = results ? results[s]!.worstMargin : -Infinity;
    options.onProgress?.(i + 1, n);
  }
  model.setDraws(undefined);
  return {
    seed: options.seed,
    first,
    count: n,
    ...sampleSetShape(model),
    margins,
    draws: allDraws,
    errors,
  };
}

/** The yield, failures, worst samples and drivers of a set of samples (see {@link YieldResult}). */
export function summarizeYield(set: SampleSet, options: { confidence?: number; worst?: number } = {}): YieldResult {
  const nS = set.specs.length;
  const nT = set.tolerances.length;
  const n = set.count;
  const { margins } = set;
  const failures = new Int32Array(nS);
  const keepWorst = options.worst ?? 5;
  const worst: YieldSample[] = [];
  // worst first: more failing specs, then the larger violation, then the lower sample number
  const worse = (a: YieldSample, b: YieldSample) => b.failing.length - a.failing.length || b.severity - a.severity || a.sample - b.sample;
  let passed = 0;
  let errors = 0;
  for (let i = 0; i < n; i++) {
    const error = set.errors[i];
    const failing: string[] = [];
    let severity = 0;
    if (error === null || error === undefined) {
      for (let s = 0; s < nS; s++) {
        const m = margins[i * nS + s]!;
        // a margin that is not a number fails, as evaluateSpecs counts it
        if (!(m >= 0)) {
          failures[s]++;
          failing.push(set.specs[s]!.name);
          severity += Number.isFinite(m) ? -m / set.specs[s]!.scale : 1e6;
        }
      }
    } else {
      errors++;
      for (let s = 0; s < nS; s++) {
        failures[s]++;
        failing.push(set.specs[s]!.name);
      }
      severity = Infinity;
    }
    if (failing.length === 0) {
      passed++;
      continue;
    }
    if (keepWorst <= 0) continue;
    const entry: YieldSample = { sample: set.first + i, failing, severity, ...(error ? { error } : {}) };
    if (worst.length < keepWorst || worse(entry, worst[worst.length - 1]!) < 0) {
      worst.push(entry);
      worst.sort(worse);
      if (worst.length > keepWorst) worst.pop();
    }
  }
  // which tolerance each spec's margin follows, over the samples that could be evaluated
  const drivers = new Float64Array(nS * nT);
  const m = new Float64Array(n);
  const x = new Float64Array(n);
  for (let s = 0; s < nS; s++) {
    for (let t = 0; t < nT; t++) {
      let c = 0;
      for (let i = 0; i < n; i++) {
        if (set.errors[i] || !Number.isFinite(margins[i * nS + s]!)) continue;
        m[c] = margins[i * nS + s]!;
        x[c] = set.draws[i * nT + t]!;
        c++;
      }
      drivers[s * nT + t] = c >= 3 ? pearson(x, m, c) : NaN;
    }
  }
  return {
    seed: set.seed,
    first: set.first,
    samples: n,
    passed,
    errors,
    interval: wilsonInterval(passed, n, options.confidence ?? 0.95),
    specs: set.specs.map((sp, s) => ({ name: sp.name, figure: sp.figure, unit: sp.unit, failures: failures[s]! })),
    tolerances: set.tolerances,
    margins,
    draws: set.draws,
    worst,
    drivers,
  };
}

/** Runs `options.samples` samples of the model's tolerances and evaluates its specs for each. */
export function runYield(model: DesignModel, options: YieldOptions): YieldResult {
  const set = evaluateSamples(model, { seed: options.seed, first: options.first, count: options.samples, onProgress: options.onProgress });
  return summarizeYield(set, { confidence: options.confidence, worst: options.worst });
}
