/**
 * The results of a yield run as text (the terminal table), JSON and a JUnit suite.
 *
 * @module
 */
import type { JunitSuite } from '../check/junit.js';
import type { YieldResult } from './run.js';

const pct = (x: number, digits = 1) => `${(100 * x).toFixed(digits)} %`;

/** The strongest drivers of a spec: tolerances whose draw correlates with its margin by |r| ≥ 0.2, strongest first. */
function drivers(r: YieldResult, s: number, most = 3): string[] {
  const nT = r.tolerances.length;
  const list: { name: string; r: number }[] = [];
  for (let t = 0; t < nT; t++) {
    const c = r.drivers[s * nT + t]!;
    if (Number.isFinite(c) && Math.abs(c) >= 0.2) list.push({ name: r.tolerances[t]!.name, r: c });
  }
  list.sort((a, b) => Math.abs(b.r) - Math.abs(a.r) || a.name.localeCompare(b.name));
  return list.slice(0, most).map((d) => `${d.name} ${d.r > 0 ? '+' : '−'}${Math.abs(d.r).toFixed(2)}`);
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
  const head = ['spec', 'failures', 'passes', 'drivers (correlation of the draw with the margin)'];
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
    specs: r.specs.map((sp, s) => ({ ...sp, drivers: r.tolerances.map((t, q) => ({ tolerance: t.name, r: finite(r.drivers[s * nT + q]!) })) })),
    tolerances: r.tolerances,
    worst: r.worst.map((w) => ({ sample: w.sample, failing: w.failing, ...(w.error ? { error: w.error } : {}) })),
    perSample: Array.from({ length: r.samples }, (_, i) => ({
      sample: r.first + i,
      margins: Array.from(r.margins.subarray(i * nS, (i + 1) * nS), finite),
      draws: Array.from(r.draws.subarray(i * nT, (i + 1) * nT)),
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
