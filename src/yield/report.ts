/**
 * The results of a yield run as text (the terminal table), JSON and a JUnit suite.
 *
 * @module
 */
import type { JunitSuite } from '../check/junit.js';
import type { YieldResult } from './run.js';
import { histogram, type Histogram } from './stats.js';
import { csvRow } from '../io/csv.js';

const pct = (x: number, digits = 1) => `${(100 * x).toFixed(digits)} %`;

/** A driver of a spec: a tolerance, whether its size (|draw|) or its signed draw, and the correlation. */
export interface SpecDriver {
  tolerance: string;
  /** 'draw': the signed draw correlates (a part drawn high moves the margin one way); 'size': its size does (off nominal either way). */
  by: 'draw' | 'size';
  r: number;
}

/**
 * The strongest drivers of spec s: per tolerance the stronger of the two correlations (of the
 * draw, and of its size, with the margin), those with |r| ≥ 0.2, strongest first.
 */
export function specDrivers(r: YieldResult, s: number, most = 3): SpecDriver[] {
  const nT = r.tolerances.length;
  const list: SpecDriver[] = [];
  for (let t = 0; t < nT; t++) {
    const a = r.drivers[s * nT + t]!;
    const b = r.spreadDrivers[s * nT + t]!;
    const useSize = Number.isFinite(b) && (!Number.isFinite(a) || Math.abs(b) > Math.abs(a));
    const c = useSize ? b : a;
    if (Number.isFinite(c) && Math.abs(c) >= 0.2) list.push({ tolerance: r.tolerances[t]!.name, by: useSize ? 'size' : 'draw', r: c });
  }
  list.sort((x, y) => Math.abs(y.r) - Math.abs(x.r) || x.tolerance.localeCompare(y.tolerance));
  return list.slice(0, most);
}

/** A driver as the summary writes it: `l2.value +0.44`, or `|c1.value| −0.31` for the size of the draw. */
export function driverText(d: SpecDriver): string {
  return `${d.by === 'size' ? `|${d.tolerance}|` : d.tolerance} ${d.r > 0 ? '+' : '−'}${Math.abs(d.r).toFixed(2)}`;
}

function drivers(r: YieldResult, s: number): string[] {
  return specDrivers(r, s).map(driverText);
}

/** The finite worst margins of spec s over the samples that could be evaluated. */
export function specMargins(r: YieldResult, s: number): Float64Array {
  const nS = r.specs.length;
  const out: number[] = [];
  for (let i = 0; i < r.samples; i++) {
    const m = r.margins[i * nS + s]!;
    if (Number.isFinite(m)) out.push(m);
  }
  return Float64Array.from(out);
}

/**
 * A histogram of spec s's worst margins: equal bins (Sturges' rule, at most 60) laid so that 0,
 * the pass line, is an edge whenever the margins straddle it; undefined without finite margins.
 */
export function marginHistogram(r: YieldResult, s: number): Histogram | undefined {
  const m = specMargins(r, s);
  if (m.length === 0) return undefined;
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of m) {
    lo = Math.min(lo, x);
    hi = Math.max(hi, x);
  }
  const bins = Math.min(60, Math.max(1, Math.ceil(Math.log2(m.length)) + 1));
  if (hi === lo) return histogram(m, { bins: 1 });
  const w = (hi - lo) / bins;
  const a = Math.floor(lo / w) * w;
  const b = Math.max(a + w, Math.ceil(hi / w) * w);
  return histogram(m, { bins: Math.max(1, Math.round((b - a) / w)), lo: Math.min(a, lo), hi: Math.max(b, hi) });
}

/** The terminal summary: the yield with its interval, failures and drivers per spec, the worst samples. */
export function formatYield(r: YieldResult, file: string, minYield?: number): string {
  const lines: string[] = [];
  const lots = new Set(r.tolerances.flatMap((t) => (t.lot ? [t.lot] : []))).size;
  lines.push(`yield of ${file}: ${r.samples} samples from ${r.first} (seed ${r.seed}), ${r.tolerances.length} tolerances${lots ? ` (${lots} lot${lots === 1 ? '' : 's'})` : ''}`);
  lines.push('');
  const iv = r.interval;
  lines.push(`yield ${pct(iv.estimate)} — ${r.passed} of ${r.samples} samples pass every spec; ${pct(iv.confidence, 0)} interval ${pct(iv.lower)} to ${pct(iv.upper)} (Wilson)`);
  if (r.errors > 0) lines.push(`${r.errors} sample${r.errors === 1 ? '' : 's'} could not be evaluated (counted as failing)`);
  lines.push('');
  const rows = r.specs.map((sp, s) => [sp.name, String(sp.failures), pct(1 - sp.failures / r.samples), drivers(r, s).join(', ') || '—']);
  const head = ['spec', 'failures', 'passes', 'drivers (correlation of a draw, or of its size |…|, with the margin)'];
  const width = head.map((h, c) => Math.max(h.length, ...rows.map((row) => row[c]!.length)));
  const row = (cells: string[]) => cells.map((x, c) => (c === 1 || c === 2 ? x.padStart(width[c]!) : x.padEnd(width[c]!))).join('  ').trimEnd();
  lines.push(row(head));
  lines.push(row(width.map((w) => '-'.repeat(w))));
  for (const x of rows) lines.push(row(x));
  if (r.worst.length > 0) {
    lines.push('');
    lines.push('worst samples:');
    for (const w of r.worst) lines.push(`  #${w.sample}: ${w.error ? `not evaluated (${w.error})` : `fails ${w.failing.join(', ')}`}`);
  }
  if (minYield !== undefined) {
    lines.push('');
    lines.push(iv.estimate >= minYield ? `yield ${pct(iv.estimate)} meets the target of ${pct(minYield)}` : `yield ${pct(iv.estimate)} is below the target of ${pct(minYield)}`);
  }
  return lines.join('\n') + '\n';
}

/** The results as JSON (schema `scatterbox.yield/1`): summary, specs, tolerances, worst samples and every sample's margins and draws. */
export function yieldJson(r: YieldResult, file: string): string {
  const nS = r.specs.length;
  const nT = r.tolerances.length;
  const finite = (x: number) => (Number.isFinite(x) ? x : null);
  const doc = {
    schema: 'scatterbox.yield/1',
    netlist: file,
    seed: r.seed,
    first: r.first,
    samples: r.samples,
    passed: r.passed,
    errors: r.errors,
    yield: r.interval.estimate,
    interval: { lower: r.interval.lower, upper: r.interval.upper, confidence: r.interval.confidence, method: 'Wilson score' },
    specs: r.specs.map((sp, s) => {
      const h = marginHistogram(r, s);
      return {
        ...sp,
        drivers: r.tolerances.map((t, q) => ({ tolerance: t.name, r: finite(r.drivers[s * nT + q]!), rSize: finite(r.spreadDrivers[s * nT + q]!) })),
        ...(h ? { histogram: { edges: Array.from(h.edges), counts: Array.from(h.counts) } } : {}),
      };
    }),
    tolerances: r.tolerances,
    worst: r.worst.map((w) => ({ sample: w.sample, failing: w.failing, ...(w.error ? { error: w.error } : {}) })),
    ...(r.envelope
      ? {
          envelope: {
            samples: r.envelope.samples,
            percentiles: r.envelope.percentiles,
            frequencies: Array.from(r.envelope.frequencies),
            entries: envelopeEntries(r).map(({ i, j, db }) => ({ entry: `S${i + 1}${j + 1}`, db: db.map((row) => Array.from(row, finite)) })),
          },
        }
      : {}),
    perSample: Array.from({ length: r.samples }, (_, i) => ({
      sample: r.first + i,
      margins: Array.from(r.margins.subarray(i * nS, (i + 1) * nS), finite),
      draws: Array.from(r.draws.subarray(i * nT, (i + 1) * nT)),
      values: Array.from(r.values.subarray(i * nT, (i + 1) * nT)),
      ...(r.perSampleErrors?.[i] ? { error: r.perSampleErrors[i] } : {}),
    })),
  };
  return JSON.stringify(doc, null, 1) + '\n';
}

/** A JUnit suite of one case, `yield`, failing below the target (and one case per spec, failing where a sample failed it). */
export function yieldSuite(r: YieldResult, file: string, minYield: number | undefined): JunitSuite {
  const iv = r.interval;
  const cases: JunitSuite['cases'] = [];
  const summary = `yield ${pct(iv.estimate)} (${r.passed} of ${r.samples}), ${pct(iv.confidence, 0)} interval ${pct(iv.lower)} to ${pct(iv.upper)}`;
  if (minYield !== undefined && iv.estimate < minYield) cases.push({ name: 'yield', failure: { message: `${summary} is below the target of ${pct(minYield)}`, detail: summary } });
  else cases.push({ name: 'yield' });
  return { name: `${file} (yield)`, cases };
}

/** Per entry (i, j, 0-based) of the envelopes: its percentile rows of 20·log10|S_ij| over the sweep. */
export function envelopeEntries(r: YieldResult): { i: number; j: number; db: Float64Array[] }[] {
  const env = r.envelope;
  if (!env) return [];
  const p = env.ports;
  const F = env.frequencies.length;
  const stride = F * p * p;
  const out: { i: number; j: number; db: Float64Array[] }[] = [];
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      const db = env.percentiles.map((_, q) => Float64Array.from({ length: F }, (_, k) => env.db[q * stride + k * p * p + i * p + j]!));
      out.push({ i, j, db });
    }
  }
  return out;
}

/**
 * Every sample as CSV (RFC 4180): its number, whether it passes every spec, why it could not be
 * evaluated, its worst margin per spec and its drawn part values (SI units, the unit in the
 * column's name).
 */
export function yieldCsv(r: YieldResult): string {
  const nS = r.specs.length;
  const nT = r.tolerances.length;
  const lines: string[] = [];
  lines.push(
    csvRow([
      'sample',
      'pass',
      'error',
      ...r.specs.map((sp) => `${sp.name} margin${sp.unit ? ` (${sp.unit})` : ''}`),
      ...r.tolerances.map((t) => `${t.name}${t.unit ? ` (${t.unit})` : ''}`),
    ]),
  );
  for (let i = 0; i < r.samples; i++) {
    const error = r.perSampleErrors?.[i] ?? '';
    let pass = !error;
    const margins: string[] = [];
    for (let s = 0; s < nS; s++) {
      const m = r.margins[i * nS + s]!;
      if (!(m >= 0)) pass = false;
      margins.push(Number.isFinite(m) ? String(m) : '');
    }
    lines.push(csvRow([String(r.first + i), pass ? '1' : '0', error, ...margins, ...Array.from(r.values.subarray(i * nT, (i + 1) * nT), String)]));
  }
  return lines.join('\n') + '\n';
}
