/**
 * Which variables a spec's margin depends on most: the derivatives of the worst margins
 * (DesignModel.marginGradient) turned into the change of each margin for a 1 % change of each
 * variable, ranked, and printed as a table.
 *
 * @module
 */
import type { Variable } from '../elaborate/circuit.js';
import type { SpecResult } from '../check/types.js';
import { describeSpec, formatFrequency, formatMargin } from '../check/format.js';
import type { MarginGradient } from './model.js';
import { formatValue } from './family.js';

/** One variable's effect on one spec's worst margin. */
export interface VariableEffect {
  variable: string;
  /** Its value (SI units) and unit. */
  value: number;
  unit: string | null;
  /** d(worst margin)/d(variable), in the spec's unit per SI unit of the variable. */
  derivative: number;
  /** The change of the worst margin for a +1 % change of the variable (linearised), in the spec's unit. */
  perPercent: number;
}

/** A spec's result and its variables' effects, the largest first. */
export interface SpecSensitivity {
  result: SpecResult;
  effects: VariableEffect[];
}

/** Ranks, per spec, the variables by how much a 1 % change moves its worst margin. */
export function rankSensitivities(g: MarginGradient, variables: readonly Variable[], values: ArrayLike<number>): SpecSensitivity[] {
  const nv = variables.length;
  return g.results.map((result, s) => {
    const effects = variables.map((v, i) => {
      const derivative = g.gradient[s * nv + i]!;
      return { variable: v.name, value: values[i]!, unit: v.unit, derivative, perPercent: derivative * 0.01 * values[i]! };
    });
    effects.sort((a, b) => Math.abs(b.perPercent) - Math.abs(a.perPercent) || a.variable.localeCompare(b.variable));
    return { result, effects };
  });
}

/** The sensitivities as a plain-text table per spec. */
export function formatSensitivities(list: readonly SpecSensitivity[]): string {
  const lines: string[] = [];
  for (const { result: r, effects } of list) {
    const where = Number.isFinite(r.worstFrequency) ? ` at ${formatFrequency(r.worstFrequency)}` : '';
    lines.push(`${r.spec.name}: ${describeSpec(r.spec)}`);
    lines.push(`  worst margin ${formatMargin(r.worstMargin, r.spec.unit)}${where} — ${r.pass ? 'pass' : 'FAIL'}`);
    if (effects.length === 0) {
      lines.push('  (no design variables)');
      continue;
    }
    const rows = effects.map((e) => [e.variable, formatValue(e.value, e.unit), signed(formatMargin(e.perPercent, r.spec.unit), e.perPercent)]);
    const head = ['variable', 'value', 'margin change for +1 %'];
    const width = head.map((h, c) => Math.max(h.length, ...rows.map((row) => row[c]!.length)));
    const row = (cells: string[]) => `  ${cells.map((x, c) => (c === 2 ? x.padStart(width[c]!) : x.padEnd(width[c]!))).join('  ')}`.trimEnd();
    lines.push(row(head));
    for (const r2 of rows) lines.push(row(r2));
  }
  return lines.join('\n') + '\n';
}

function signed(text: string, v: number): string {
  return v > 0 ? `+${text}` : text.replace(/^-/, '−');
}
