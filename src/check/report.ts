import type { Comparison } from './compare.js';
import { describeSpec, formatFrequency, formatMargin } from './format.js';
import type { SpecResult } from './types.js';

function table(head: string[], rows: string[][]): string {
  const widths = head.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c]!.length)));
  const line = (cells: string[]) => cells.map((x, c) => x.padEnd(widths[c]!)).join('  ').trimEnd();
  return [line(head), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n') + '\n';
}

/** The spec table of `scatterbox check`: spec, limit, pass or fail, worst margin and where. */
export function formatSpecTable(results: readonly SpecResult[]): string {
  if (results.length === 0) return 'no specs in this netlist\n';
  const rows = results.map((r) => [
    r.spec.name,
    describeSpec(r.spec),
    r.pass ? 'pass' : 'FAIL',
    r.points === 0 ? 'no points in band' : formatMargin(r.worstMargin, r.spec.unit),
    r.points === 0 ? '' : formatFrequency(r.worstFrequency),
  ]);
  return table(['spec', 'limit', 'result', 'worst margin', 'at'], rows);
}

/** The golden-file table: per entry, the worst dB, degree and complex deviations and where. */
export function formatComparisonTable(c: Comparison, parameter = 'S'): string {
  const absMode = c.tolerance.abs !== undefined;
  const rows = c.entries.map((e) => {
    const name = `${parameter}${e.i}${c.entries.length >= 100 ? ',' : ''}${e.j}`;
    const cells = [name];
    if (absMode) cells.push(e.abs.toExponential(2), formatFrequency(e.absFrequency));
    else {
      cells.push(
        Number.isNaN(e.dbFrequency) ? '—' : `${e.db.toFixed(4)} dB`,
        Number.isNaN(e.dbFrequency) ? '' : formatFrequency(e.dbFrequency),
        Number.isNaN(e.degFrequency) ? '—' : `${e.deg.toFixed(3)}°`,
        Number.isNaN(e.degFrequency) ? '' : formatFrequency(e.degFrequency),
      );
    }
    cells.push(e.pass ? 'pass' : 'FAIL');
    return cells;
  });
  const head = absMode ? ['entry', '|Δ|', 'at', 'result'] : ['entry', 'Δ|S|', 'at', 'Δ∠', 'at', 'result'];
  const tol = absMode ? `tolerance |Δ| ≤ ${c.tolerance.abs}` : `tolerance ${c.tolerance.db} dB, ${c.tolerance.deg}° (not judged below ${c.tolerance.floorDb} dB)`;
  return table(head, rows) + tol + '\n';
}

/** The machine-readable report of `scatterbox check --json`. */
export function checkReportJson(input: { netlist: string; specs: readonly SpecResult[]; golden?: { file: string; comparison: Comparison; note?: string } }): string {
  const num = (x: number) => (Number.isFinite(x) ? x : Number.isNaN(x) ? null : x > 0 ? 'inf' : '-inf');
  const out = {
    schema: 'scatterbox.check/1',
    netlist: input.netlist,
    pass: input.specs.every((r) => r.pass) && (input.golden ? input.golden.comparison.pass : true),
    specs: input.specs.map((r) => ({
      name: r.spec.name,
      figure: r.spec.figure,
      bound: r.spec.bound,
      limit: r.spec.limit,
      unit: r.spec.unit,
      band_hz: r.spec.band.map(num),
      pass: r.pass,
      points: r.points,
      worst_margin: num(r.worstMargin),
      worst_frequency_hz: num(r.worstFrequency),
      worst_value: num(r.worstValue),
      worst_limit: num(r.worstLimit),
      line: r.spec.span.line,
    })),
    golden: input.golden
      ? {
          file: input.golden.file,
          // set when the solved data was renormalised to the golden file's references
          ...(input.golden.note ? { note: input.golden.note } : {}),
          pass: input.golden.comparison.pass,
          tolerance: input.golden.comparison.tolerance,
          entries: input.golden.comparison.entries.map((e) => ({
            i: e.i,
            j: e.j,
            pass: e.pass,
            db: num(e.db),
            db_frequency_hz: num(e.dbFrequency),
            deg: num(e.deg),
            deg_frequency_hz: num(e.degFrequency),
            abs: num(e.abs),
            abs_frequency_hz: num(e.absFrequency),
          })),
        }
      : null,
  };
  return JSON.stringify(out, null, 2) + '\n';
}

/**
 * The JSON report of a `scatterbox check` that stopped on an input error: `pass` false, no
 * results, and `error` the messages as printed.
 */
export function checkErrorJson(input: { netlist: string; error: string }): string {
  return JSON.stringify({ schema: 'scatterbox.check/1', netlist: input.netlist, pass: false, error: input.error, specs: [], golden: null }, null, 2) + '\n';
}
