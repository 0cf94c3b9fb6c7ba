import type { Argv } from 'yargs';
import type { Io } from '../cli.js';
import { DesignModel } from '../../src/design/model.js';
import { formatSensitivities, rankSensitivities } from '../../src/design/rank.js';
import { writeFileAtomicSync } from '../../src/io/atomic.js';
import { checkOutputs } from '../../src/io/guard.js';
import { formatDiagnostics } from '../../src/diagnostics/diagnostic.js';

export interface SensitivityArgs {
  netlist: string;
  set?: string[];
  sweep?: string;
  json?: string;
  quiet: boolean;
  strict?: boolean;
}


export const sensitivityBuilder = (y: Argv) =>
  y
    .positional('netlist', { type: 'string', describe: 'netlist file (.sbx) with design variables (`let … vary …`) and specs', demandOption: true })
    .option('set', { type: 'string', array: true, describe: 'override a parameter: name=value, with units (repeatable)' })
    .option('sweep', { type: 'string', describe: 'replace the netlist sweep: segments as after `sweep`, joined by `;`' })
    .option('json', { type: 'string', describe: 'also write the results as JSON: per spec its margin and the derivative for every variable' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'do not print warnings' })
    .option('strict', { type: 'boolean', default: false, describe: 'treat every warning as an error' })
    .example('$0 sensitivity circuits/match-50-75-915.sbx', 'which part each spec margin depends on most')
    .epilog('Derivatives are exact (the direct method on each point\'s factorisation), not differences of solves. Exit codes: 0 success, 1 input error, 2 usage error.');

/** `scatterbox sensitivity`: per spec, the variables that move its worst margin most, per 1 % change. */
export function runSensitivity(a: SensitivityArgs, io: Io, describeError: (e: unknown, quiet: boolean) => string): number {
  try {
    if (a.json) checkOutputs([a.json], [a.netlist]);
    const model = DesignModel.load(a.netlist, { set: a.set, sweep: a.sweep, strict: a.strict });
    if (!a.quiet && model.warnings.length > 0) io.err(formatDiagnostics(model.warnings, model.sources) + '\n');
    if (model.variables.length === 0) io.err(`note: ${a.netlist} declares no design variables: write \`let name = value vary LOW to HIGH\` for the values to study\n`);
    if (model.circuit.specs.length === 0) io.err(`note: ${a.netlist} has no specs: there is no margin to study\n`);
    const g = model.marginGradient();
    const ranked = rankSensitivities(g, model.variables, model.values);
    io.out(formatSensitivities(ranked));
    if (a.json) {
      const doc = {
        netlist: a.netlist,
        variables: model.variables.map((v, i) => ({ name: v.name, value: model.values[i], unit: v.unit, lower: v.lower, upper: v.upper })),
        specs: ranked.map(({ result: r, effects }) => ({
          name: r.spec.name,
          figure: r.spec.figure,
          unit: r.spec.unit,
          pass: r.pass,
          worstMargin: Number.isFinite(r.worstMargin) ? r.worstMargin : null,
          worstFrequency: Number.isFinite(r.worstFrequency) ? r.worstFrequency : null,
          effects: effects.map((e) => ({ variable: e.variable, derivative: e.derivative, perPercent: e.perPercent })),
        })),
      };
      writeFileAtomicSync(a.json, JSON.stringify(doc, null, 2) + '\n');
    }
    return 0;
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return 1;
  }
}
