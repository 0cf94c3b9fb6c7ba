/**
 * `scatterbox fit <netlist>`: moves the design variables within their ranges until every spec
 * passes (src/design/fit.ts), snaps them to their series or steps, prints the values and margins
 * before and after and the values as `--set` options, and writes the netlist with the new values
 * (`-o FILE`, or `--write-back` to the netlist itself), changing only the value texts.
 *
 * Exit codes: 0 every spec passes after snapping, 1 a spec fails, 2 usage error, 3 input error
 * (as for `check`).
 */
import type { Argv } from 'yargs';
import type { Io } from '../cli.js';
import { PREFIXES } from '../../src/design/family.js';
import { DesignModel } from '../../src/design/model.js';
import { fit, parseMargins, type FitMethod, type FitResult } from '../../src/design/fit.js';
import { editVariableValues, WriteBackError } from '../../src/design/write-back.js';
import { formatMargin } from '../../src/check/format.js';
import { writeFileAtomicSync } from '../../src/io/atomic.js';
import { checkOutputs } from '../../src/io/guard.js';
import { readInputText } from '../../src/io/source-file.js';
import { formatDiagnostics, loadNetlist, OutputError } from '../../src/index.js';
import { describeError, EXIT_CHECK_INPUT, EXIT_INPUT, EXIT_OK } from '../cli.js';
import type { Variable } from '../../src/elaborate/circuit.js';

export interface FitArgs {
  netlist: string;
  out?: string;
  writeBack: boolean;
  margin?: string[];
  method: FitMethod;
  starts: number;
  seed: number;
  maxEvals: number;
  snap: boolean;
  set?: string[];
  sweep?: string;
  quiet: boolean;
  strict?: boolean;
}


/** The options of `fit` (--set, --sweep, --quiet and --strict as for `solve`; one thread, so no --jobs). */
export function fitBuilder(y: Argv): Argv {
  return y
    .option('set', { type: 'string', array: true, describe: 'override a parameter: name=value, with units (repeatable); a variable\'s --set is its start value' })
    .option('sweep', { type: 'string', describe: 'replace the netlist sweep: segments as after `sweep`, joined by `;`' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'do not print warnings or the progress line' })
    .option('strict', { type: 'boolean', default: false, describe: 'treat every warning as an error (exit as for an input error), e.g. in CI' })
    .positional('netlist', { type: 'string', describe: 'netlist file (.sbx) with design variables and specs', demandOption: true })
    .option('out', { alias: 'o', type: 'string', describe: 'write a copy of the netlist with the fitted values to this file' })
    .option('write-back', { type: 'boolean', default: false, describe: 'write the fitted values into the netlist itself (atomically; only when every spec passes)' })
    .option('margin', { type: 'string', array: true, describe: 'target margin beyond pass: X (dB on dB specs, the same weight on others) or SPEC=VALUE in the spec\'s unit (repeatable)' })
    .option('method', { choices: ['auto', 'gradient', 'simplex'] as const, default: 'auto', describe: 'gradient method, derivative-free simplex, or the first falling back on the second' })
    .option('starts', { type: 'number', default: 1, describe: 'number of starts: the netlist\'s values, then random points in the ranges' })
    .option('seed', { type: 'number', default: 1, describe: 'seed of the random starts' })
    .option('max-evals', { type: 'number', default: 1000, describe: 'largest number of evaluations of the specs' })
    .option('snap', { type: 'boolean', default: true, describe: 'snap variables to their series or step (--no-snap: keep the fitted values)' })
    .check((argv) => {
      const whole = (key: string, option: string, min: number, max: number) => {
        const v = argv[key];
        if (Array.isArray(v)) throw new Error(`--${option} is given more than once`);
        if (typeof v !== 'number' || !Number.isInteger(v) || v < min || v > max) throw new Error(`--${option} must be a whole number from ${min} to ${max}, got ${String(v)}`);
      };
      whole('starts', 'starts', 1, 1000);
      whole('seed', 'seed', 0, 2 ** 32 - 1);
      whole('maxEvals', 'max-evals', 1, 1_000_000);
      if (Array.isArray(argv.out)) throw new Error('-o is given more than once');
      if (argv.out !== undefined && argv.writeBack) throw new Error('give either -o FILE or --write-back, not both');
      return true;
    })
    .example('$0 fit circuits/bandpass-2g4.sbx -o fitted.sbx', 'fit the variables to the specs and write a copy with the new values')
    .example('$0 fit circuits/bandpass-2g4.sbx --margin 0.4 --write-back', 'push every margin 0.4 dB beyond pass and update the netlist')
    .example('$0 fit filter.sbx --starts 8 --seed 3 --method simplex', 'eight starts, derivative-free')
    .epilog('Exit codes: 0 every spec passes after snapping, 1 a spec fails, 2 usage error, 3 input error.');
}

/** Significant digits of the values in the table. */
const TABLE_DIGITS = 6;

/** A display scale for a variable: its unit with the engineering prefix of its start value. */
function displayUnit(v: Variable, x: number): [number, string] {
  if (!v.unit) return [1, ''];
  const a = Math.abs(x) || Math.abs(v.upper) || 1;
  for (const [f, p] of PREFIXES) if (a >= f * 0.9995) return [f, `${p}${v.unit}`];
  return [1e-15, `f${v.unit}`];
}

function table(head: string[], rows: string[][]): string {
  const widths = head.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c]!.length)));
  const line = (cells: string[]) => cells.map((x, c) => x.padEnd(widths[c]!)).join('  ').trimEnd();
  return [line(head), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n') + '\n';
}

/** The report of a fit: the two tables, how it ended, and the values as --set options. */
export function formatFitReport(r: FitResult, setOptions: string[]): string {
  const vrows = r.variables.map((v, i) => {
    const [f, unit] = displayUnit(v, r.start[i]!);
    const show = (x: number) => String(Number((x / f).toPrecision(TABLE_DIGITS)));
    const snapped = r.snapped[i] === r.fitted[i] ? '' : `${show(r.snapped[i]!)}${v.series ? ` (${v.series})` : v.step !== undefined ? ' (step)' : ''}`;
    return [v.name, show(r.start[i]!), show(r.fitted[i]!), snapped, unit];
  });
  const srows = r.after.map((a, s) => {
    const b = r.before[s]!;
    const m = (x: SpecResultLike) => (x.points === 0 ? 'no points in band' : formatMargin(x.worstMargin, a.spec.unit));
    return [a.spec.name, m(b), m(r.atFitted[s]!), m(a), r.targets[s]! > 0 ? formatMargin(r.targets[s]!, a.spec.unit) : '', a.pass ? 'pass' : 'FAIL'];
  });
  const stop = { target: 'the target margins are met', 'max-evals': 'the largest number of evaluations was reached', stalled: 'no further progress', 'no-variables': 'no variable can move' }[r.stop];
  const failing = r.after.filter((a) => !a.pass).length;
  const lines = [
    table(['variable', 'start', 'fitted', 'snapped', 'unit'], vrows),
    table(['spec', 'margin before', 'fitted', 'snapped', 'target', 'result'], srows),
    `${plural(r.evaluations, 'evaluation')} (${r.gradients} with derivatives), ${plural(r.iterations, 'step')}; ${r.method === 'none' ? `the values of start ${r.bestStart} kept` : `best from start ${r.bestStart} by the ${r.method} method`}; stopped: ${stop}`,
    failing === 0 ? `every spec passes${r.targetMet ? '' : ' (not every one with its target margin)'}` : `${failing} spec${failing === 1 ? '' : 's'} fail${failing === 1 ? 's' : ''}`,
    ...(r.after.some((a) => a.points === 0) ? ['(a spec with no sweep point in its band cannot pass: widen the sweep, e.g. with --sweep, or the band)'] : []),
    ...(failing > 0 && r.stop === 'stalled' && r.atFitted.some((a) => !a.pass && a.points > 0) ? ['(the search is local and ended short of the specs: more starts, e.g. --starts 8, may find a design that passes)'] : []),
    '',
    'values as options:',
    setOptions.map((s) => `--set '${s}'`).join(' '),
    '',
  ];
  return lines.join('\n');
}

type SpecResultLike = { points: number; worstMargin: number };

const plural = (n: number, what: string) => `${n} ${what}${n === 1 ? '' : 's'}`;

/** A progress line on stderr, redrawn in place (only on a terminal). */
function progressLine(io: Io) {
  let last = 0;
  let shown = false;
  return {
    update: (p: { evaluations: number; start: number; phase: string; penalty: number; failing: number }) => {
      const now = Date.now();
      if (now - last < 100) return;
      last = now;
      shown = true;
      io.err(`\rfit: ${p.evaluations} evaluations, start ${p.start}, ${p.phase}, penalty ${p.penalty.toPrecision(3)}, ${p.failing} spec${p.failing === 1 ? '' : 's'} failing\x1b[K`);
    },
    stop: () => {
      if (shown) io.err('\r\x1b[K');
    },
  };
}

export async function runFit(a: FitArgs, io: Io): Promise<number> {
  let bar: ReturnType<typeof progressLine> | undefined;
  try {
    const model = DesignModel.load(a.netlist, { set: a.set, sweep: a.sweep, strict: a.strict });
    const warnings = model.circuit.warnings;
    if (!a.quiet && warnings.length > 0) io.err(formatDiagnostics(warnings, model.sources) + '\n');
    if (model.variables.length === 0) {
      throw new OutputError(`${a.netlist} has no design variables, so there is nothing to fit`, 'declare one on a `let` line, e.g. `let cshunt = 3.3 pF vary 1 pF to 10 pF series E24`');
    }
    if (model.circuit.specs.length === 0) throw new OutputError(`${a.netlist} has no spec statements, so there is nothing to fit to`, 'add `spec` statements to the netlist');
    const { margin, specMargins } = parseMargins(a.margin ?? [], model.circuit.specs);
    checkOutputs([a.out], [...model.sources.keys()].filter((f) => f !== '--set' && f !== '--sweep'));
    bar = !a.quiet && process.stderr.isTTY ? progressLine(io) : undefined;
    const result = fit(model, { method: a.method, margin, specMargins, starts: a.starts, seed: a.seed, maxEvals: a.maxEvals, snap: a.snap, onProgress: bar?.update });
    bar?.stop();
    bar = undefined;
    io.out(`fit ${a.netlist}: ${model.variables.length} variable${model.variables.length === 1 ? '' : 's'}, ${model.circuit.specs.length} spec${model.circuit.specs.length === 1 ? '' : 's'}\n\n`);
    io.out(formatFitReport(result, model.setOptions(result.snapped)));
    if (a.out !== undefined || a.writeBack) {
      const texts = editedTexts(a.netlist, model.sources, result.snapped);
      const others = (a.set ?? []).map((s) => /^\s*([A-Za-z_][A-Za-z0-9_]*)/.exec(s)?.[1]).filter((n): n is string => n !== undefined && model.indexOf(n) < 0);
      if (others.length > 0) io.err(`note: --set ${others.join(', ')} ${others.length === 1 ? 'is' : 'are'} not written into the netlist (only the variables are)\n`);
      if (a.out !== undefined) {
        const elsewhere = [...texts.keys()].filter((f) => f !== a.netlist);
        if (elsewhere.length > 0) {
          throw new OutputError(`-o writes a copy of ${a.netlist} only, but ${elsewhere.join(', ')} (included) define${elsewhere.length === 1 ? 's' : ''} variables that changed`, 'use --write-back to update the files in place, or move the variables into the netlist');
        }
        writeFileAtomicSync(a.out, texts.get(a.netlist) ?? model.sources.get(a.netlist)!);
        io.err(`wrote ${a.out}\n`);
      } else if (!result.pass) {
        io.err(`not written back: a spec fails after snapping (use -o FILE to keep the values)\n`);
      } else if (texts.size === 0) {
        io.err(`${a.netlist} already holds these values; nothing written\n`);
      } else {
        for (const [file, text] of texts) {
          writeFileAtomicSync(file, text);
          io.err(`updated ${file}\n`);
        }
      }
    }
    return result.pass ? EXIT_OK : EXIT_INPUT;
  } catch (e) {
    bar?.stop();
    if (e instanceof WriteBackError) {
      io.err(`error: ${e.message}${e.help ? `\n  help: ${e.help}` : ''}\nnothing was written\n`);
      return EXIT_CHECK_INPUT;
    }
    io.err(describeError(e, a.quiet) + '\n');
    return EXIT_CHECK_INPUT;
  }
}

/** The texts of the netlist (and its included files) with the new values, by file; the netlist's own values are read without --set. */
function editedTexts(file: string, sources: ReadonlyMap<string, string>, values: Float64Array): Map<string, string> {
  const read = (p: string) => sources.get(p) ?? readInputText(p);
  const own = loadNetlist(sources.get(file)!, file, { readFile: read }).circuit.variables;
  return editVariableValues(file, sources, own, values, read);
}
