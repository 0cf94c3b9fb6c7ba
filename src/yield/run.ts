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
import { drawSample, sampleDraws, samplerPlan, type SampleDraws, type SamplerPlan } from './sampler.js';
import { pearson, percentilesInPlace, wilsonInterval, type ProportionInterval } from './stats.js';
import { MAX_ENVELOPE_VALUES, MAX_YIELD_SAMPLES } from '../limits.js';

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
  /** The SI unit of its value ('F', 'H'…), or null for a plain number. */
  unit: string | null;
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
  /** Per sample: why it could not be evaluated, or null. */
  perSampleErrors: readonly (string | null)[];
  /**
   * Per spec, per tolerance: the correlation (Pearson) of the tolerance's draw with the spec's worst
   * margin over the evaluated samples (NaN where either does not vary): a strong one (|r| near 1)
   * marks the tolerance that drives the spec's failures; a negative sign means that a part drawn
   * high lowers the margin.
   */
  drivers: Float64Array;
  /**
   * Per spec, per tolerance: the correlation of the size of the tolerance's draw (|2u − 1| or |z|)
   * with the spec's worst margin: strongly negative where a part off its nominal either way lowers
   * the margin (a spec at its best near the nominal, as a match is), which the signed
   * {@link drivers} miss.
   */
  spreadDrivers: Float64Array;
  /** The drawn value of tolerance t in sample i (SI units) at values[i·tolerances + t]. */
  values: Float64Array;
  /** Percentile envelopes of |S_ij| over the sweep, when the run solved whole sweeps. */
  envelope?: YieldEnvelope;
}

/** Percentiles of |S_ij| in dB over the evaluated envelope samples, at every point of the sweep. */
export interface YieldEnvelope {
  /** Envelope samples that could be evaluated (those that could not are left out). */
  samples: number;
  ports: number;
  frequencies: Float64Array;
  /** The percentiles, in percent (1, 50, 99). */
  percentiles: number[];
  /** 20·log10 |S_ij| at percentile q, frequency k: db[(q·F + k)·p² + i·p + j]. */
  db: Float64Array;
}

/** The percentiles the envelopes show, in percent. */
export const ENVELOPE_PERCENTILES = [1, 50, 99];

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
  /** The drawn value of tolerance t in sample i (SI units) at values[i·tolerances + t]. */
  values: Float64Array;
  /** Per sample: why it could not be evaluated, or null. */
  errors: (string | null)[];
  /** The whole sweep of the run's first samples, for percentile envelopes (when asked for). */
  envelope?: EnvelopeRows;
}

/**
 * |S_ij| over the whole sweep of samples 0 … samples − 1 of a run (its envelope samples), as far
 * as they fall in a set: the set's row r (sample first + r) for r < rows.
 */
export interface EnvelopeRows {
  /** The run's envelope samples: samples 0 … samples − 1 have their whole sweep solved. */
  samples: number;
  ports: number;
  frequencies: Float64Array;
  /** Rows of this set that are envelope samples: max(0, min(count, samples − first)). */
  rows: number;
  /** |S_ij| of row r at frequency k at magnitudes[(r·F + k)·p² + i·p + j] (NaN: not evaluated). */
  magnitudes: Float64Array;
}

/** The rows of a set of `count` samples from `first` that are among a run's first `samples`. */
export function envelopeRows(first: number, count: number, samples: number): number {
  return Math.max(0, Math.min(count, samples - first));
}

/** The specs and tolerances a set of samples of the model describes (its columns). */
export function sampleSetShape(model: DesignModel): Pick<SampleSet, 'specs' | 'tolerances'> {
  const circuit = model.circuit;
  return {
    specs: circuit.specs.map((sp) => ({ name: sp.name, figure: sp.figure, unit: sp.unit, scale: specScale(sp) })),
    tolerances: circuit.tolerances.map((t) => ({ name: t.target.kind === 'parameter' ? t.target.name : `${circuit.elements[t.target.element]!.name}.${t.target.key}`, unit: t.unit, ...(t.lot !== undefined ? { lot: t.lot } : {}) })),
  };
}

/** The flat arrays samples are evaluated into, row by row (see {@link SampleSet}). */
export interface SampleRows {
  margins: Float64Array;
  draws: Float64Array;
  values: Float64Array;
  /** Magnitudes of the envelope rows (see {@link EnvelopeRows}), when asked for. */
  magnitudes?: Float64Array;
}

/**
 * Evaluates single samples of a model into flat arrays: the sample's worst margin per spec at
 * margins[i·specs + s], its standard draws and drawn values at [i·tolerances + t], and, for the
 * run's envelope samples, |S| over the whole sweep. The result of sample k depends only on the
 * model's design (netlist, options, variable values), the seed and k, not on which samples the
 * model evaluated before: the threads of a run and the shards of a sharded run each use their own.
 */
export class SampleEvaluator {
  private readonly plan: SamplerPlan;
  private readonly scratch: SampleDraws;
  private readonly lotScratch: Float64Array;
  private readonly nominals: Float64Array;
  readonly specCount: number;
  readonly toleranceCount: number;
  /** Values per envelope row: points × ports². */
  readonly envelopeStride: number;

  /** `envelopeSamples`: samples 0 … envelopeSamples − 1 also have their whole sweep solved. */
  constructor(
    private readonly model: DesignModel,
    seed: number,
    readonly envelopeSamples = 0,
  ) {
    this.plan = samplerPlan(model.circuit, seed);
    this.scratch = sampleDraws(this.plan);
    this.lotScratch = new Float64Array(this.plan.lots.length);
    this.nominals = model.toleranceNominals();
    this.specCount = model.circuit.specs.length;
    this.toleranceCount = model.circuit.tolerances.length;
    const p = model.circuit.ports.length;
    this.envelopeStride = model.circuit.frequencies.length * p * p;
  }

  /**
   * Evaluates sample k into row i of the arrays (and, for an envelope sample, row i of the
   * magnitudes); why it could not be evaluated, or null.
   */
  evaluate(k: number, i: number, rows: SampleRows): string | null {
    const nS = this.specCount;
    const nT = this.toleranceCount;
    const d = this.scratch;
    drawSample(this.plan, k, d, this.lotScratch);
    rows.draws.set(d.unit, i * nT);
    for (let t = 0; t < nT; t++) rows.values[i * nT + t] = this.nominals[t]! * d.mult[t]! + d.add[t]!;
    this.model.setDraws(d);
    let results: SpecResult[] | undefined;
    let error: string | null = null;
    const wantSweep = k < this.envelopeSamples && rows.magnitudes !== undefined;
    try {
      results = this.model.checkSpecs();
      if (wantSweep) {
        const v = this.model.solve().values;
        const out = rows.magnitudes!;
        const at = i * this.envelopeStride;
        for (let q = 0; q < this.envelopeStride; q++) out[at + q] = Math.hypot(v[2 * q]!, v[2 * q + 1]!);
      }
    } catch (e) {
      if (e instanceof InputError) error = e.diagnostics[0]?.message ?? 'a part value cannot be taken';
      else if (e instanceof SingularSystemError) error = e.message;
      else throw e;
      if (wantSweep) rows.magnitudes!.fill(NaN, i * this.envelopeStride, (i + 1) * this.envelopeStride);
    }
    for (let s = 0; s < nS; s++) rows.margins[i * nS + s] = results ? results[s]!.worstMargin : -Infinity;
    return error;
  }

  /** Puts the model back to its nominal parts. */
  finish(): void {
    this.model.setDraws(undefined);
  }
}

/** Checks the first sample and the count of a run (RangeError). */
export function checkSampleRange(first: number, count: number): void {
  if (!Number.isSafeInteger(count) || count < 1 || count > MAX_YIELD_SAMPLES) throw new RangeError(`the number of samples is a whole number from 1 to ${MAX_YIELD_SAMPLES}, not ${count}`);
  if (!Number.isSafeInteger(first) || first < 0) throw new RangeError(`the first sample is a whole number from 0, not ${first}`);
}

/** What {@link evaluateSamples} runs. */
export interface EvaluateOptions {
  seed: number;
  /** The first sample's number (default 0). */
  first?: number;
  count: number;
  /** The run's first `envelopeSamples` samples also have their whole sweep solved (default 0). */
  envelopeSamples?: number;
  onProgress?: (done: number, total: number) => void;
}

/** The arrays of a set of samples of the model, zeroed (shared between threads when `share`). */
export function sampleRows(model: DesignModel, first: number, count: number, envelopeSamples: number, share = false): SampleRows {
  const c = model.circuit;
  const array = (n: number) => (share ? new Float64Array(new SharedArrayBuffer(8 * n)) : new Float64Array(n));
  const p = c.ports.length;
  const rows = envelopeRows(first, count, envelopeSamples);
  const stride = c.frequencies.length * p * p;
  if (rows * stride > MAX_ENVELOPE_VALUES) {
    throw new RangeError(`the whole sweeps of ${rows} samples hold ${rows * stride} magnitudes, more than the limit of ${MAX_ENVELOPE_VALUES}: take fewer envelope samples (at most ${Math.floor(MAX_ENVELOPE_VALUES / stride)}) or fewer sweep points`);
  }
  return {
    margins: array(count * c.specs.length),
    draws: array(count * c.tolerances.length),
    values: array(count * c.tolerances.length),
    ...(envelopeSamples > 0 ? { magnitudes: array(rows * stride) } : {}),
  };
}

/** The set of samples first … first + count − 1 that the arrays hold. */
export function sampleSetOf(model: DesignModel, o: { seed: number; first: number; count: number; envelopeSamples: number }, rows: SampleRows, errors: (string | null)[]): SampleSet {
  const c = model.circuit;
  return {
    seed: o.seed,
    first: o.first,
    count: o.count,
    ...sampleSetShape(model),
    margins: rows.margins,
    draws: rows.draws,
    values: rows.values,
    errors,
    ...(rows.magnitudes
      ? { envelope: { samples: o.envelopeSamples, ports: c.ports.length, frequencies: Float64Array.from(c.frequencies), rows: envelopeRows(o.first, o.count, o.envelopeSamples), magnitudes: rows.magnitudes } }
      : {}),
  };
}

/** Evaluates samples first … first + count − 1 of the model's tolerances in this thread (see {@link SampleSet}). */
export function evaluateSamples(model: DesignModel, options: EvaluateOptions): SampleSet {
  const n = options.count;
  const first = options.first ?? 0;
  const envelopeSamples = options.envelopeSamples ?? 0;
  checkSampleRange(first, n);
  checkEnvelopeSamples(envelopeSamples);
  const rows = sampleRows(model, first, n, envelopeSamples);
  const ev = new SampleEvaluator(model, options.seed, envelopeSamples);
  const errors: (string | null)[] = [];
  try {
    for (let i = 0; i < n; i++) {
      errors.push(ev.evaluate(first + i, i, rows));
      options.onProgress?.(i + 1, n);
    }
  } finally {
    ev.finish();
  }
  return sampleSetOf(model, { seed: options.seed, first, count: n, envelopeSamples }, rows, errors);
}

/** Checks a number of envelope samples (RangeError). */
export function checkEnvelopeSamples(n: number): void {
  if (!Number.isSafeInteger(n) || n < 0 || n > MAX_YIELD_SAMPLES) throw new RangeError(`the number of envelope samples is a whole number from 0 to ${MAX_YIELD_SAMPLES}, not ${n}`);
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
  const spreadDrivers = new Float64Array(nS * nT);
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
      for (let i = 0; i < c; i++) x[i] = Math.abs(x[i]!);
      spreadDrivers[s * nT + t] = c >= 3 ? pearson(x, m, c) : NaN;
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
    perSampleErrors: set.errors,
    drivers,
    spreadDrivers,
    values: set.values,
    ...(set.envelope ? { envelope: envelopePercentiles(set.envelope, set.errors) } : {}),
  };
}

/** The percentile envelopes of a set's envelope rows, over the rows that could be evaluated. */
export function envelopePercentiles(env: EnvelopeRows, errors: readonly (string | null)[]): YieldEnvelope {
  const stride = env.frequencies.length * env.ports * env.ports;
  const good: number[] = [];
  for (let r = 0; r < env.rows; r++) if (!errors[r]) good.push(r);
  const q = ENVELOPE_PERCENTILES.length;
  const db = new Float64Array(q * stride).fill(NaN);
  const column = new Float64Array(good.length);
  const out = new Float64Array(q);
  const levels = ENVELOPE_PERCENTILES.map((p) => p / 100);
  if (good.length > 0) {
    for (let v = 0; v < stride; v++) {
      for (let g = 0; g < good.length; g++) column[g] = env.magnitudes[good[g]! * stride + v]!;
      percentilesInPlace(column, levels, out);
      for (let l = 0; l < q; l++) db[l * stride + v] = 20 * Math.log10(out[l]!);
    }
  }
  return { samples: good.length, ports: env.ports, frequencies: env.frequencies, percentiles: [...ENVELOPE_PERCENTILES], db };
}

/** Runs `options.samples` samples of the model's tolerances and evaluates its specs for each. */
export function runYield(model: DesignModel, options: YieldOptions): YieldResult {
  const set = evaluateSamples(model, { seed: options.seed, first: options.first, count: options.samples, onProgress: options.onProgress });
  return summarizeYield(set, { confidence: options.confidence, worst: options.worst });
}
