import { closeSync, existsSync, lstatSync, openSync, readSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { closeSweepPool, solveSweepParallel } from '../src/solve/parallel.js';
import { solveSweep } from '../src/solve/sweep.js';
import type { Circuit } from '../src/elaborate/circuit.js';
import type { NetworkData } from '../src/network/types.js';
import type { Diagnostic } from '../src/diagnostics/diagnostic.js';
import { basename, extname, join, resolve } from 'node:path';
import { Presets, SingleBar } from 'cli-progress';
import yargs, { type Argv } from 'yargs';
import { alignReferences, compareNetworks, CompareError, type Comparison, type Tolerance } from '../src/check/compare.js';
import { evaluateSpecs } from '../src/check/evaluate.js';
import { comparisonSuite, errorSuite, formatJunit, specSuite, type JunitSuite } from '../src/check/junit.js';
import { checkErrorJson, checkReportJson, formatComparisonTable, formatSpecTable } from '../src/check/report.js';
import { writeFileAtomicSync } from '../src/io/atomic.js';
import { checkBatchNames, checkDistinctOutputs, checkOutputs, ensureFolder } from '../src/io/guard.js';
import { expandInputs, InputsError } from '../src/io/inputs.js';
import { loadNetworkFile } from '../src/io/read.js';
import { touchstoneExtension } from '../src/io/touchstone.js';
import { figureTableChunks, tableChunks } from '../src/io/table.js';
import { convertData, parsePairs, parseReferences, type ConvertTarget } from '../src/io/convert-file.js';
import { evaluateQuantity } from '../src/load.js';
import { microstripDispersive, microstripStatic, microstripWidth } from '../src/models/microstrip.js';
import { formatFrequency } from '../src/check/format.js';
import { renderPlotSvg, renderReport, type Dataset } from '../src/report/index.js';
import { runVary, varyBuilder, type VaryArgs } from './commands/vary.js';
import { formatFromPath } from '../src/io/output.js';
import { FigureError, parseFigure } from '../src/figures/registry.js';
import { runSensitivity, sensitivityBuilder, type SensitivityArgs } from './commands/sensitivity.js';
import { mergeBuilder, runMerge, runYieldCommand, yieldBuilder, type MergeArgs, type YieldArgs } from './commands/yield.js';
import { fitBuilder, runFit, type FitArgs } from './commands/fit.js';
import { designBuilder, runDesign, type DesignArgs } from './commands/design.js';
import { liveBuilder, runLive, type LiveArgs } from './commands/live.js';
import {
  convertNetwork,
  ConversionError,
  formatDiagnostics,
  InputError,
  loadNetlistFile,
  OutputError,
  renderNetwork,
  SingularSystemError,
  solve,
  TouchstoneError,
  writeNetwork,
  type ComplexFormat,
  type FrequencyUnit,
  type OutputFormat,
  type ParameterKind,
  type TouchstoneVersion,
} from '../src/index.js';

/** Exit codes: 0 success, 1 an input (or solve, or write) error — for `check` and `diff`: a failed check —, 2 a usage error. */
export const EXIT_OK = 0;
export const EXIT_INPUT = 1;
export const EXIT_USAGE = 2;

export interface Io {
  out: (s: string) => void;
  err: (s: string) => void;
}

const defaultIo: Io = {
  out: (s) => process.stdout.write(s),
  err: (s) => process.stderr.write(s),
};

class UsageError extends Error {}

/** Exit code of `check` and `diff` for an input error (1 there means "a check failed"). */
export const EXIT_CHECK_INPUT = 3;

const toleranceOptions = (y: Argv) =>
  y
    .option('tol-db', { type: 'number', default: 0.01, describe: 'largest magnitude difference in dB' })
    .option('tol-deg', { type: 'number', default: 0.1, describe: 'largest phase difference in degrees' })
    .option('tol-abs', { type: 'number', describe: 'compare the complex difference |a − b| with this bound instead of dB and degrees' })
    .option('floor-db', { type: 'number', default: -100, describe: 'magnitudes below this (dB) are not judged in dB and degrees' });

const solveOptions = (y: Argv) =>
  y
    .option('jobs', { alias: 'j', type: 'number', default: availableParallelism(), describe: 'threads for long sweeps, this one included (1: solve in one thread)' })
    .option('set', { type: 'string', array: true, describe: 'override a parameter: name=value, with units (repeatable)' })
    .option('sweep', { type: 'string', describe: 'replace the netlist sweep: segments as after `sweep`, joined by `;`' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'do not print warnings' })
    .option('strict', { type: 'boolean', default: false, describe: 'treat every warning as an error (exit as for an input error), e.g. in CI' });

/** Runs the command line; returns the exit code. */
export async function main(argv: string[], io: Io = defaultIo): Promise<number> {
  let code = EXIT_OK;
  const parser = yargs(argv)
    .scriptName('scatterbox')
    .usage('$0 <command> [options]\n\nS-parameters of linear RF networks from a plain-text netlist.')
    .command(
      'solve <netlist..>',
      'solve netlists and write their S-parameters (or print a table)',
      (y: Argv) =>
        solveOptions(y)
          .positional('netlist', { type: 'string', array: true, describe: 'netlist files (.sbx), folders of them or patterns such as circuits/*.sbx', demandOption: true })
          .option('out', { alias: 'o', type: 'string', describe: 'output file; the format follows the extension (.sNp, .csv, .json)' })
          .option('out-dir', { type: 'string', describe: 'with several netlists: the folder to write one file per netlist into (<name>.sNp, or .csv/.json with --format)' })
          .option('format', { choices: ['touchstone', 'csv', 'json', 'table'] as const, describe: 'output format (default: from the extension; table without -o)' })
          .option('touchstone', { type: 'string', coerce: touchstoneVersion, describe: 'Touchstone version: 1.1 or 2.0 (default 1.1 when all port references are equal, else 2.0)' })
          .option('data', { choices: ['ri', 'ma', 'db'] as const, default: 'ri', describe: 'complex format: real/imaginary, magnitude/angle, dB/angle' })
          .option('freq-unit', { choices: ['Hz', 'kHz', 'MHz', 'GHz'] as const, default: 'GHz', describe: 'frequency unit of Touchstone files' })
          .option('param', { choices: ['S', 'Z', 'Y'] as const, default: 'S', describe: 'parameters to write (Z and Y where they exist)' })
          .option('digits', { type: 'number', describe: 'significant digits of written numbers' })
          .option('figures', { type: 'string', describe: 'print derived figures instead of S, comma-separated: db(S21), rl(1), il(2,1), vswr(1), phase(S21), uphase(S21), gd(S21), zin_re(1), zin_im(1), k, delta, mu_load, mu_source, mag, passivity, reciprocity' })
          .example('$0 solve circuits/harmonic-lowpass-433.sbx', 'print |S| in dB and angle per frequency')
          .example('$0 solve circuits/bandpass-2g4.sbx --figures "il(2,1),rl(1),vswr(1),gd(S21)"', 'print derived figures per frequency')
          .example('$0 solve circuits/harmonic-lowpass-433.sbx -o lowpass.s2p --data db', 'write a Touchstone 1.1 file in dB/angle')
          .example('$0 solve circuits/match-50-75-915.sbx -o match.s2p --touchstone 2.0', 'per-port references need version 2.0')
          .example('$0 solve filter.sbx --set fc=915MHz --sweep "linear start=1 MHz stop=3 GHz points=301"', 'override a parameter and the sweep')
          .example('$0 solve circuits/ --out-dir reference/', 'one Touchstone file per netlist, for golden files')
          .example('$0 solve pad.sbx -o pad.csv --param Z', 'write the Z matrix as CSV'),
      async (args) => {
        code = await runSolve(args as unknown as SolveArgs, io);
      },
    )
    .command(
      'check <netlist>',
      'solve a netlist and check its specs (and, with --against, a golden file)',
      (y: Argv) =>
        toleranceOptions(solveOptions(y))
          .positional('netlist', { type: 'string', describe: 'netlist file (.sbx)', demandOption: true })
          .option('junit', { type: 'string', describe: 'write a JUnit XML report to this file' })
          .option('json', { type: 'string', describe: 'write a JSON report to this file' })
          .option('against', { type: 'string', describe: 'golden file (.sNp or .json) the solved S-parameters must match' })
          .option('update', { type: 'boolean', default: false, describe: 'rewrite the golden file from this solve (atomically) instead of comparing' })
          .example('$0 check circuits/bandpass-2g4.sbx', 'evaluate the netlist\'s spec statements')
          .example('$0 check circuits/bandpass-2g4.sbx --junit report.xml', 'also write a JUnit report for CI')
          .example('$0 check filter.sbx --against golden/filter.s2p --tol-db 0.05', 'compare with a golden file')
          .example('$0 check filter.sbx --against golden/filter.s2p --update', 'accept the new response as golden')
          .epilog('Exit codes: 0 every check passes, 1 a check fails, 2 usage error, 3 input error.'),
      async (args) => {
        code = await runCheck(args as unknown as CheckArgs, io);
      },
    )
    .command(
      'sensitivity <netlist>',
      'per spec, the design variables that move its worst margin most (exact derivatives)',
      sensitivityBuilder,
      (args) => {
        code = runSensitivity(args as unknown as SensitivityArgs, io, describeError);
      },
    )
    .command(
      'yield <netlist>',
      'Monte Carlo over the netlist\'s tolerances: the fraction of builds that meet every spec, with its confidence interval',
      yieldBuilder,
      async (args) => {
        code = await runYieldCommand(args as unknown as YieldArgs, io, describeError);
      },
    )
    .command(
      'merge <partials..>',
      'merge the partial files of a sharded yield run into its result (the same as one run)',
      mergeBuilder,
      async (args) => {
        code = await runMerge(args as unknown as MergeArgs, io, describeError);
      },
    )
    .command(
      'diff <a> <b>',
      'compare two network-data files entry by entry',
      (y: Argv) =>
        toleranceOptions(y)
          .positional('a', { type: 'string', describe: 'first file (.sNp or .json)', demandOption: true })
          .positional('b', { type: 'string', describe: 'second file (.sNp or .json)', demandOption: true })
          .example('$0 diff old.s2p new.s2p', 'worst deviation per S entry and where')
          .example('$0 diff old.s2p new.s2p --tol-abs 1e-9', 'judge the complex difference instead')
          .epilog('Exit codes: 0 within tolerance, 1 they differ, 2 usage error, 3 input error.'),
      async (args) => {
        code = runDiff(args as unknown as DiffArgs, io);
      },
    )
    .command(
      'convert <input>',
      'convert network data: S/Z/Y, chain (ABCD), transfer (T), hybrid (H), new references, mixed-mode',
      (y: Argv) =>
        y
          .positional('input', { type: 'string', describe: 'network-data file (.sNp or .json)', demandOption: true })
          .option('out', { alias: 'o', type: 'string', demandOption: true, describe: 'output file (.sNp, .csv or .json)' })
          .option('to', { choices: ['S', 'Z', 'Y', 'ABCD', 'T', 'H'] as const, default: 'S', describe: 'representation to write (ABCD, T and H: two-ports, to .csv or .json)' })
          .option('renormalize', { type: 'string', describe: 'new reference impedances, with units (ohm if none): one for all ports, or one per port ("50 ohm, 75 ohm")' })
          .option('mixed-mode', { type: 'string', describe: 'single-ended port pairs forming differential pairs, p,n;p,n (e.g. "1,3;2,4")' })
          .option('format', { choices: ['touchstone', 'csv', 'json'] as const, describe: 'output format (default: from the extension)' })
          .option('touchstone', { type: 'string', coerce: touchstoneVersion, describe: 'Touchstone version: 1.1 or 2.0' })
          .option('data', { choices: ['ri', 'ma', 'db'] as const, default: 'ri', describe: 'complex format' })
          .option('freq-unit', { choices: ['Hz', 'kHz', 'MHz', 'GHz'] as const, default: 'GHz', describe: 'frequency unit of Touchstone files' })
          .option('digits', { type: 'number', describe: 'significant digits of written numbers' })
          .example('$0 convert filter.s2p -o filter-z.s2p --to Z', 'S to Z, where Z exists')
          .example('$0 convert filter.s2p -o filter-75.s2p --renormalize 75', 'the same network seen from 75 ohm ports')
          .example('$0 convert pair.s4p -o pair-mm.s4p --mixed-mode "1,3;2,4"', 'differential and common-mode S of a four-port')
          .example('$0 convert section.s2p -o section-abcd.csv --to ABCD', 'the chain matrix as CSV'),
      async (args) => {
        code = runConvert(args as unknown as ConvertArgs, io);
      },
    )
    .command(
      'microstrip',
      'microstrip width for a target impedance, and the line it gives',
      (y: Argv) =>
        y
          .option('z0', { type: 'string', demandOption: true, describe: 'target characteristic impedance, e.g. 50 ohm' })
          .option('height', { type: 'string', demandOption: true, describe: 'substrate height, e.g. 1.6 mm' })
          .option('er', { type: 'string', demandOption: true, describe: 'relative permittivity of the substrate' })
          .option('thickness', { type: 'string', default: '35 um', describe: 'strip thickness' })
          .option('freq', { type: 'string', default: '0 Hz', describe: 'frequency for the dispersive impedance (0: quasi-static)' })
          .example('$0 microstrip --z0 "50 ohm" --height "1.6 mm" --er 4.4', 'a 50 ohm line on 1.6 mm FR-4')
          .example('$0 microstrip --z0 "70.7 ohm" --height "0.508 mm" --er 3.66 --freq "2.45 GHz"', 'a Wilkinson arm at 2.45 GHz'),
      async (args) => {
        code = runMicrostrip(args as unknown as MicrostripArgs, io);
      },
    )
    .command(
      'report <input..>',
      'a self-contained HTML report: summary, specs, Smith chart, |S|, phase and group delay (several inputs: overlaid)',
      (y: Argv) =>
        solveOptions(y)
          .positional('input', { type: 'string', array: true, describe: 'netlists (.sbx) or network-data files (.sNp, .json); several are overlaid, one legend entry each', demandOption: true })
          .option('label', { type: 'string', array: true, describe: 'legend labels of the inputs, in their order (default: the file names)' })
          .option('out', { alias: 'o', type: 'string', demandOption: true, describe: 'the HTML file to write' })
          .option('at', { type: 'string', describe: 'frequencies for the table, comma-separated, inside the sweep (the nearest point is shown), e.g. "2.40 GHz, 2.44 GHz"' })
          .option('entry', { type: 'string', array: true, describe: 'entries to plot, e.g. 21 11 (default: all)' })
          .option('title', { type: 'string', describe: 'title (default: the netlist title or the file name)' })
          .example('$0 report circuits/bandpass-2g4.sbx -o report.html', 'report of a demo, specs included')
          .example('$0 report measured.s2p -o measured.html --at "915 MHz"', 'report of a data file')
          .example('$0 report circuits/bandpass-2g4.sbx circuits/data/bandpass-2g45-measured.s2p -o overlay.html', 'simulated against measured, overlaid'),
      async (args) => {
        code = await runReport(args as unknown as ReportArgs, io);
      },
    )
    .command(
      'fit <netlist>',
      'move the design variables within their ranges until every spec passes, then snap them to their series',
      (y: Argv) => fitBuilder(y),
      async (args) => {
        code = await runFit(args as unknown as FitArgs, io);
      },
    )
    .command(
      'design <kind>',
      'write a first design (lumped filter or matching network) as a netlist with variables and specs, and check it',
      designBuilder,
      (args) => {
        code = runDesign(args as unknown as DesignArgs, io);
      },
    )
    .command(
      'plot <input..>',
      'a static SVG (or PNG) plot for docs and code review (several inputs: overlaid)',
      (y: Argv) =>
        solveOptions(y)
          .positional('input', { type: 'string', array: true, describe: 'netlists (.sbx) or network-data files (.sNp, .json); several are overlaid, one legend entry each', demandOption: true })
          .option('label', { type: 'string', array: true, describe: 'legend labels of the inputs, in their order (default: the file names)' })
          .option('out', { alias: 'o', type: 'string', demandOption: true, describe: 'the .svg or .png file to write' })
          .option('kind', { choices: ['db', 'phase', 'gd', 'smith'] as const, default: 'db', describe: 'what to plot' })
          .option('entry', { type: 'string', array: true, describe: 'entries to plot, e.g. 21 11 (default: all)' })
          .option('width', { type: 'number', default: 720, describe: 'width in pixels' })
          .option('height', { type: 'number', default: 420, describe: 'height in pixels' })
          .option('title', { type: 'string', describe: 'title of the plot' })
          .example('$0 plot circuits/bandpass-2g4.sbx -o bandpass.svg --kind db', '|S| in dB with the spec limits')
          .example('$0 plot circuits/match-50-75-915.sbx -o match.png --kind smith --entry 11', 'a Smith chart as PNG')
          .example('$0 plot circuits/bandpass-2g4.sbx circuits/data/bandpass-2g45-measured.s2p -o overlay.svg --entry 21', 'simulated against measured'),
      async (args) => {
        code = await runPlot(args as unknown as PlotArgs, io);
      },
    )
    .command(
      'live <netlist>',
      'a local page that re-solves as the netlist changes, with sliders for its design variables',
      liveBuilder,
      async (args) => {
        code = await runLive(args as unknown as LiveArgs, io);
      },
    )
    .command(
      'vary <netlist>',
      'a family of curves: evaluate the design at several values of one or two design variables',
      varyBuilder,
      async (args) => {
        code = await runVary(args as unknown as VaryArgs, io);
      },
    )
    .demandCommand(1, 'give a command, e.g. `scatterbox solve circuits/harmonic-lowpass-433.sbx`')
    .check(checkNumericOptions)
    .strict()
    .recommendCommands()
    .example('$0 solve circuits/harmonic-lowpass-433.sbx -o lowpass.s2p', 'solve a demo and write Touchstone')
    .example('$0 check circuits/bandpass-2g4.sbx --junit report.xml', 'check the specs of a design in CI')
    .example('$0 solve --help', 'options of `solve`')
    .epilog('Exit codes: 0 success, 1 input error (for check and diff: a check failed), 2 usage error, 3 input error of check and diff. Messages go to stderr.')
    .help()
    .alias('h', 'help')
    .version()
    .wrap(Math.min(110, process.stdout.columns || 100))
    .exitProcess(false)
    .fail((msg, err) => {
      throw new UsageError(msg ?? err?.message ?? 'usage error');
    });
  try {
    await parser.parseAsync();
  } catch (e) {
    await closeSweepPool();
    if (e instanceof UsageError) {
      io.err(`scatterbox: ${e.message}\nRun \`scatterbox --help\` for usage.\n`);
      return EXIT_USAGE;
    }
    io.err(`scatterbox: internal error: ${(e as Error).stack ?? String(e)}\n`);
    return EXIT_INPUT;
  }
  await closeSweepPool();
  return code;
}

interface SolveArgs {
  netlist: string[];
  out?: string;
  outDir?: string;
  format?: OutputFormat | 'table';
  touchstone?: TouchstoneVersion;
  data: 'ri' | 'ma' | 'db';
  freqUnit: FrequencyUnit;
  param: ParameterKind;
  set?: string[];
  sweep?: string;
  digits?: number;
  figures?: string;
  jobs: number;
  quiet: boolean;
  strict?: boolean;
}

/**
 * Sweeps big enough to be worth starting worker threads for: points × (nodes + elements), a
 * rough measure of the work. A command-line run is a fresh process: the workers boot, load their
 * code and run it cold, and on a two-core machine they take the core V8's optimising compiler
 * would otherwise have, so the calling thread's own code is compiled later. Measured on the
 * reference machine, sweep alone, one thread against two, in fresh processes (LC ladders):
 * 100 sections × 20,001 points (6 M) 120–180 ms against 160–230; 300 × 20,001 (18 M) 230–250
 * against 240–290; 1,000 × 4,001 (12 M) 220–290 against 270–350; 1,000 × 10,001 (30 M) 400–520
 * against 395–500; 1,000 × 20,001 (60 M) 750–770 against 535–640; 10,000 × 4,001 (120 M)
 * 1,490–1,650 against 1,290–1,430. (In one long-lived process, with the pool kept warm, two
 * threads gain 1.7–1.9× on all of them: see the benchmark.)…
 */
const PARALLEL_MIN_WORK = 50_000_000;
/**
 * …and long enough: each thread copies the circuit and builds its own plan and ordering, which
 * costs about as much as solving a few hundred of its points whatever its size (measured: a
 * 2,001-point sweep of a 16-port data block gains nothing on two workers, 4,001 points of a ladder do).
 */
const PARALLEL_MIN_POINTS_PER_JOB = 2000;

/** Sweeps long enough to show progress for (on a terminal, without --quiet). */
const PROGRESS_MIN_POINTS = 2000;

/**
 * Solves the sweep, on worker threads where it is big enough. `quiet`: no progress bar; `warnIo`:
 * where to print a warning that the system came close to singular (none when undefined).
 */
async function solveWith(circuit: Circuit, jobs: number, quiet = false, warnIo?: Io, context: SolveContext = {}) {
  const bar = !quiet && process.stderr.isTTY && circuit.frequencies.length >= PROGRESS_MIN_POINTS ? progressBar('sweep', circuit.frequencies.length) : undefined;
  const held: string[] = [];
  const onWarning = context.strict
    ? (message: string) => void held.push(message)
    : warnIo
      ? (message: string) => warnIo.err(`warning: ${context.file ? `${context.file}: ` : ''}${message}\n`)
      : undefined;
  try {
    const work = circuit.frequencies.length * (circuit.nodeNames.length + circuit.elements.length);
    const net =
      jobs > 1 && circuit.frequencies.length >= PARALLEL_MIN_POINTS_PER_JOB * jobs && work >= PARALLEL_MIN_WORK
        ? await solveSweepParallel(circuit, { jobs, onProgress: bar?.update, onWarning })
        : solveSweep(circuit, { onProgress: bar?.update, onWarning });
    if (held.length > 0) throw new StrictError(held);
    return net;
  } finally {
    bar?.stop();
  }
}

/** What {@link solveWith} needs beyond the circuit: `strict` turns the solver's warnings into an error; `file` names the netlist in warnings (batches). */
interface SolveContext {
  strict?: boolean;
  file?: string;
}

/** Warnings raised after loading (the solver's) under `--strict`. */
class StrictError extends Error {
  constructor(readonly warnings: string[]) {
    super(warnings.join('\n'));
    this.name = 'StrictError';
  }
}

/** A progress bar on stderr (cli-progress); the caller decides whether one is wanted. */
function progressBar(what: string, total: number) {
  const bar = new SingleBar({ format: `${what} [{bar}] {value}/{total} points`, stream: process.stderr, hideCursor: true, clearOnComplete: true }, Presets.shades_classic);
  bar.start(total, 0);
  let last = 0;
  return {
    update: (done: number) => {
      if (done - last >= Math.max(1, total / 200) || done === total) {
        last = done;
        bar.update(done);
      }
    },
    stop: () => bar.stop(),
  };
}

function load(a: { set?: string[]; sweep?: string; quiet: boolean; strict?: boolean }, file: string, io: Io, batch = false) {
  const loaded = loadNetlistFile(file, { set: a.set, sweep: a.sweep, strict: a.strict });
  if (a.strict && loaded.warnings.length > 0) throw strictLoadError(loaded.warnings, loaded.sources);
  if (!a.quiet && loaded.warnings.length > 0) {
    // in a batch, warnings located elsewhere (an included file, --set) still name the netlist
    const elsewhere = batch && loaded.warnings.some((w) => w.span?.file !== file);
    io.err((elsewhere ? `warnings while loading ${file}:\n` : '') + formatDiagnostics(loaded.warnings, loaded.sources) + '\n');
  }
  return loaded;
}

/** Under --strict, the warnings of a load as errors (the library does this itself where it knows the option). */
function strictLoadError(warnings: Diagnostic[], sources: Map<string, string>): InputError {
  return new InputError(
    warnings.map((w) => ({ ...w, severity: 'error' as const, help: w.help ? `${w.help} (a warning, made an error by --strict)` : 'a warning, made an error by --strict' })),
    sources,
  );
}

async function runSolve(a: SolveArgs, io: Io): Promise<number> {
  try {
    const files = expandInputs(a.netlist);
    const batch = files.length > 1 || a.outDir !== undefined;
    if (batch && a.out) throw new OutputError('-o names one file, but several netlists were given', 'use --out-dir FOLDER to write one file per netlist');
    if (batch && !a.outDir) throw new OutputError('several netlists were given but no --out-dir', 'add --out-dir FOLDER');
    if (batch && a.format === 'table') throw new OutputError('the table format is for the terminal only', 'pick touchstone, csv or json');
    const options = (file: string) => ({
      parameter: a.param,
      version: a.touchstone,
      data: a.data.toUpperCase() as ComplexFormat,
      frequencyUnit: a.freqUnit,
      digits: a.digits,
      comments: [`scatterbox solve ${basename(file)}`],
    });
    if (batch) {
      checkBatchNames(files);
      ensureFolder(a.outDir!);
      let failed = 0;
      const batchInputs = new Set(files); // every file the batch has read so far: never an output
      const batchBar = !a.quiet && process.stderr.isTTY && files.length >= 20 ? new SingleBar({ format: 'netlists [{bar}] {value}/{total}', stream: process.stderr, clearOnComplete: true }, Presets.shades_classic) : undefined;
      batchBar?.start(files.length, 0);
      for (const file of files) {
        try {
          const loaded = load(a, file, io, true);
          const net = await solveWith(loaded.circuit, a.jobs, true, a.quiet ? undefined : io, { strict: a.strict, file });
          batchBar?.increment();
          const format = (a.format as OutputFormat | undefined) ?? 'touchstone';
          const ext = format === 'touchstone' ? touchstoneExtension(net.ports) : `.${format}`;
          const out = join(a.outDir!, basename(file, extname(file)) + ext);
          for (const f of loaded.sources.keys()) batchInputs.add(f);
          checkOutputs([out], batchInputs);
          writeNetwork(net, out, { ...options(file), format });
          if (!a.quiet && !batchBar) io.err(`${file} → ${out}\n`);
        } catch (e) {
          failed++;
          io.err(describeError(e, a.quiet, file) + '\n');
        }
      }
      batchBar?.stop();
      if (failed > 0) io.err(`${failed} of ${files.length} netlists failed; their files were not written\n`);
      return failed > 0 ? EXIT_INPUT : EXIT_OK;
    }
    const loaded = load(a, files[0]!, io);
    checkOutputs([a.out], loaded.sources.keys());
    const net = await solveWith(loaded.circuit, a.jobs, a.quiet, a.quiet ? undefined : io, { strict: a.strict });
    if (a.figures !== undefined) {
      if (a.out || batch) throw new OutputError('--figures prints to the terminal', 'leave out -o (use --format csv for CSV on stdout)');
      const columns = splitFigures(a.figures).map((text) => {
        const f = parseFigure(text, { ports: net.ports });
        return { name: f.canonical, unit: f.spec.unit, values: f.evaluate(net) };
      });
      for (const piece of figureTableChunks(net.frequencies, columns, a.format === 'csv')) io.out(piece);
      return EXIT_OK;
    }
    if (!a.out) {
      if (!a.format || a.format === 'table') for (const piece of tableChunks(a.param === 'S' ? net : convertNetwork(net, a.param))) io.out(piece);
      else io.out(renderNetwork(net, { ...options(files[0]!), format: a.format }));
      return EXIT_OK;
    }
    if (a.format === 'table') throw new OutputError('the table format is for the terminal only', 'leave out -o, or pick touchstone, csv or json');
    writeNetwork(net, a.out, { ...options(files[0]!), format: a.format });
    return EXIT_OK;
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return EXIT_INPUT;
  }
}

/** Splits `il(2,1), rl(1),k` at the commas that are not inside parentheses. */
function splitFigures(list: string): string[] {
  const out: string[] = [];
  let depth = 0;
  let cur = '';
  for (const ch of list) {
    if (ch === '(') depth++;
    if (ch === ')') depth--;
    if (ch === ',' && depth === 0) {
      out.push(cur.trim());
      cur = '';
    } else cur += ch;
  }
  if (cur.trim()) out.push(cur.trim());
  return out;
}

interface ReportArgs {
  input: string[];
  label?: string[];
  out: string;
  at?: string;
  entry?: string[];
  title?: string;
  set?: string[];
  sweep?: string;
  jobs: number;
  quiet: boolean;
  strict?: boolean;
}

/**
 * Reads a network-data file for a command: a malformed file is an InputError located in the file;
 * its warnings (e.g. noise data not used) go to stderr, or fail the run under --strict.
 */
function dataFile(path: string, io: Io, quiet = false, strict = false): NetworkData {
  const { net, warnings, sources } = loadNetworkFile(path);
  if (warnings.length > 0) {
    if (strict) throw new InputError(warnings.map((w) => ({ ...w, severity: 'error' as const })), sources);
    if (!quiet) io.err(`${formatDiagnostics(warnings, sources)}\n`);
  }
  return net;
}

/** Solves a netlist (with its specs) or reads a data file, for `report` and `plot`. */
async function networkOf(a: { input: string; set?: string[]; sweep?: string; jobs: number; quiet: boolean; strict?: boolean }, io: Io) {
  if (formatFromPath(a.input) || extname(a.input).toLowerCase() === '.json') {
    return { net: dataFile(a.input, io, a.quiet, a.strict), circuit: undefined, specs: undefined, inputs: [a.input] };
  }
  const { circuit, sources } = load(a, a.input, io);
  const net = await solveWith(circuit, a.jobs, a.quiet, a.quiet ? undefined : io, { strict: a.strict });
  return { net, circuit, specs: evaluateSpecs(circuit.specs, net), inputs: [...sources.keys()] };
}

function parseEntries(list: string[] | undefined, ports: number): [number, number][] | undefined {
  if (!list || list.length === 0) return undefined;
  return list
    .flatMap((x) => x.split(','))
    .map((x) => x.trim())
    .filter(Boolean)
    .map((x) => {
      const m = /^[sS]?(\d)(\d)$/.exec(x) ?? /^[sS]?\(?(\d+),(\d+)\)?$/.exec(x);
      if (!m) throw new OutputError(`an entry is written like 21 or S21 or 10,2, got ${JSON.stringify(x)}`);
      const i = Number(m[1]);
      const j = Number(m[2]);
      if (i < 1 || j < 1 || i > ports || j > ports) throw new OutputError(`entry ${x} is outside the ${ports}-port network`);
      return [i, j] as [number, number];
    });
}

/**
 * The inputs of an overlay (`report`/`plot` with several inputs), each solved or read, labelled by
 * `--label` (in order) or its file name.
 */
async function overlayOf(a: ReportArgs, io: Io): Promise<{ datasets: Dataset[]; inputs: string[] }> {
  const labels = a.label ?? [];
  if (labels.length > a.input.length) throw new OutputError(`${labels.length} labels for ${a.input.length} inputs`, 'give at most one --label per input, in the order of the inputs');
  const datasets: Dataset[] = [];
  const inputs: string[] = [];
  for (const [q, file] of a.input.entries()) {
    const { net, circuit, specs, inputs: read } = await networkOf({ ...a, input: file }, io);
    datasets.push({ label: labels[q] ?? basename(file), network: net, circuit, specs, source: file });
    inputs.push(...read);
  }
  return { datasets, inputs };
}

/** Every input's frequencies merged and sorted (for --at of an overlay). */
function mergedFrequencies(datasets: readonly Dataset[]): Float64Array {
  return Float64Array.from(new Set(datasets.flatMap((d) => Array.from(d.network.frequencies)))).sort();
}

async function runReport(a: ReportArgs, io: Io): Promise<number> {
  try {
    if (a.input.length > 1 || (a.label?.length ?? 0) > 0) {
      const { datasets, inputs } = await overlayOf(a, io);
      const tableFrequencies = a.at ? frequenciesInSweep(a.at, mergedFrequencies(datasets)) : undefined;
      const ports = Math.max(...datasets.map((d) => d.network.ports));
      const html = renderReport({ datasets, title: a.title, tableFrequencies, entries: parseEntries(a.entry, ports) });
      checkOutputs([a.out], inputs);
      writeFileAtomicSync(a.out, html);
      return EXIT_OK;
    }
    const { net, circuit, specs, inputs } = await networkOf({ ...a, input: a.input[0]! }, io);
    const tableFrequencies = a.at ? frequenciesInSweep(a.at, net.frequencies) : undefined;
    const html = renderReport({ title: a.title, source: a.input[0]!, net, circuit, specs, tableFrequencies, entries: parseEntries(a.entry, net.ports) });
    checkOutputs([a.out], inputs);
    writeFileAtomicSync(a.out, html);
    return EXIT_OK;
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return EXIT_INPUT;
  }
}

interface PlotArgs extends ReportArgs {
  kind: 'db' | 'phase' | 'gd' | 'smith';
  width: number;
  height: number;
}

async function runPlot(a: PlotArgs, io: Io): Promise<number> {
  try {
    const ext = extname(a.out).toLowerCase();
    if (ext !== '.svg' && ext !== '.png') throw new OutputError(`a plot is written as .svg or .png, not ${ext || 'a file without extension'}`);
    let svg: string;
    if (a.input.length > 1 || (a.label?.length ?? 0) > 0) {
      const { datasets, inputs } = await overlayOf(a, io);
      checkOutputs([a.out], inputs);
      const ports = Math.max(...datasets.map((d) => d.network.ports));
      svg = renderPlotSvg(datasets, { kind: a.kind, entries: parseEntries(a.entry, ports), width: a.width, height: a.height, title: a.title });
    } else {
      const { net, specs, inputs } = await networkOf({ ...a, input: a.input[0]! }, io);
      checkOutputs([a.out], inputs);
      svg = renderPlotSvg(net, { kind: a.kind, specs, entries: parseEntries(a.entry, net.ports), width: a.width, height: a.height, title: a.title });
    }
    if (ext === '.svg') writeFileAtomicSync(a.out, svg);
    else {
      const { Resvg } = await import('@resvg/resvg-js');
      const png = new Resvg(svg, { background: 'white', font: { loadSystemFonts: true } }).render().asPng();
      writeFileAtomicSync(a.out, png);
    }
    return EXIT_OK;
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return EXIT_INPUT;
  }
}

interface ConvertArgs {
  input: string;
  out: string;
  to: ConvertTarget;
  renormalize?: string;
  mixedMode?: string;
  format?: OutputFormat;
  touchstone?: TouchstoneVersion;
  data: 'ri' | 'ma' | 'db';
  freqUnit: FrequencyUnit;
  digits?: number;
}

function runConvert(a: ConvertArgs, io: Io): number {
  try {
    checkOutputs([a.out], [a.input]);
    const net = dataFile(a.input, io);
    const text = convertData(
      net,
      {
        to: a.to,
        renormalize: a.renormalize ? Array.from(parseReferences(referenceList(a.renormalize).join(','), net.ports)) : undefined,
        pairs: a.mixedMode ? parsePairs(a.mixedMode) : undefined,
        format: a.format,
        version: a.touchstone,
        data: a.data.toUpperCase() as ComplexFormat,
        frequencyUnit: a.freqUnit,
        digits: a.digits,
        comments: [`scatterbox convert ${basename(a.input)}`],
      },
      a.out,
    );
    writeFileAtomicSync(a.out, text);
    return EXIT_OK;
  } catch (e) {
    io.err(describeError(e, false) + '\n');
    return EXIT_INPUT;
  }
}

interface MicrostripArgs {
  z0: string;
  height: string;
  er: string;
  thickness: string;
  freq: string;
}

function runMicrostrip(a: MicrostripArgs, io: Io): number {
  try {
    const { z0, h, er, t, f } = microstripInputs(a);
    const w = microstripWidth(z0, h, t, er, f);
    const line = f > 0 ? microstripDispersive(f, w, h, t, er) : microstripStatic(w, h, t, er);
    const lambda = f > 0 ? 299792458 / (f * Math.sqrt(line.eeff)) : NaN;
    io.out(
      [
        `width        ${(w * 1e3).toPrecision(6)} mm  (w/h = ${(w / h).toPrecision(5)})`,
        `impedance    ${line.z0.toPrecision(6)} ohm${f > 0 ? ` at ${formatFrequency(f)}` : ' (quasi-static)'}`,
        `e_eff        ${line.eeff.toPrecision(6)}`,
        ...(f > 0 ? [`quarter wave ${((lambda / 4) * 1e3).toPrecision(6)} mm`] : []),
        'models: Hammerstad & Jensen (1980)' + (f > 0 ? '; dispersion: Kirschning & Jansen (1982), Jansen & Kirschning (1983)' : ''),
        '',
      ].join('\n'),
    );
    return EXIT_OK;
  } catch (e) {
    io.err(describeError(e, false) + '\n');
    return EXIT_INPUT;
  }
}

interface ToleranceArgs {
  tolDb: number;
  tolDeg: number;
  tolAbs?: number;
  floorDb: number;
}

function tolerance(a: ToleranceArgs): Tolerance {
  return { db: a.tolDb, deg: a.tolDeg, abs: a.tolAbs, floorDb: a.floorDb };
}

interface CheckArgs extends ToleranceArgs {
  netlist: string;
  junit?: string;
  json?: string;
  against?: string;
  update: boolean;
  set?: string[];
  sweep?: string;
  jobs: number;
  quiet: boolean;
  strict?: boolean;
}

async function runCheck(a: CheckArgs, io: Io): Promise<number> {
  try {
    if (a.update && !a.against) throw new OutputError('--update rewrites the golden file named by --against, but none was given', 'add --against FILE');
    const { circuit, sources } = load(a, a.netlist, io);
    checkOutputs([a.update ? a.against : undefined, a.junit, a.json], [...sources.keys(), ...(a.against && !a.update ? [a.against] : [])]);
    if (circuit.specs.length === 0 && !a.against) {
      throw new OutputError(`${a.netlist} has no spec statements, so there is nothing to check`, 'add `spec` statements to the netlist, or compare with a golden file (--against FILE)');
    }
    const net = await solveWith(circuit, a.jobs, a.quiet, a.quiet ? undefined : io, { strict: a.strict });
    const results = evaluateSpecs(circuit.specs, net);
    let golden: { file: string; comparison: Comparison; note?: string } | undefined;
    if (a.against && a.update) {
      writeNetwork(net, a.against, { comments: [`scatterbox check ${basename(a.netlist)} --update`] });
      io.err(`updated ${a.against}\n`);
    } else if (a.against) {
      if (!existsSync(a.against)) {
        throw new OutputError(`the golden file ${a.against} does not exist`, `run with --update to create it from this solve`);
      }
      const expected = dataFile(a.against, io, a.quiet, a.strict);
      const aligned = alignReferences(net, expected, { actual: `the solve of ${a.netlist}`, expected: a.against });
      golden = { file: a.against, comparison: compareNetworks(aligned.net, expected, tolerance(a)), note: aligned.note };
    }
    io.out(formatSpecTable(results));
    if (golden) io.out(`\nagainst ${golden.file}:\n${golden.note ? `note: ${golden.note}\n` : ''}${formatComparisonTable(golden.comparison, net.parameter)}`);
    const suites: JunitSuite[] = [specSuite(a.netlist, results)];
    if (golden) suites.push(comparisonSuite(golden.file, golden.comparison));
    if (a.junit) writeFileAtomicSync(a.junit, formatJunit(suites));
    if (a.json) writeFileAtomicSync(a.json, checkReportJson({ netlist: a.netlist, specs: results, golden }));
    const failed = results.filter((r) => !r.pass).length + (golden && !golden.comparison.pass ? 1 : 0);
    io.out(failed === 0 ? `\nall ${suites.reduce((n, s) => n + s.cases.length, 0)} checks pass\n` : `\n${failed} check${failed === 1 ? '' : 's'} failed\n`);
    return failed === 0 ? EXIT_OK : EXIT_INPUT;
  } catch (e) {
    const text = describeError(e, a.quiet);
    io.err(text + '\n');
    writeErrorReports(a, text, io);
    return EXIT_CHECK_INPUT;
  }
}

interface DiffArgs extends ToleranceArgs {
  a: string;
  b: string;
}

function runDiff(a: DiffArgs, io: Io): number {
  try {
    const expected = dataFile(a.b, io);
    const aligned = alignReferences(dataFile(a.a, io), expected, { actual: a.a, expected: a.b });
    if (aligned.note) io.out(`note: ${aligned.note}\n`);
    const c = compareNetworks(aligned.net, expected, tolerance(a));
    io.out(formatComparisonTable(c));
    io.out(c.pass ? 'within tolerance\n' : 'the files differ beyond the tolerance\n');
    return c.pass ? EXIT_OK : EXIT_INPUT;
  } catch (e) {
    io.err(describeError(e, false) + '\n');
    return EXIT_CHECK_INPUT;
  }
}

/** The message of an error as printed; `file`: the netlist it belongs to, named in a batch. */
export function describeError(e: unknown, quiet: boolean, file?: string): string {
  if (e instanceof InputError) {
    const shown = quiet ? e.diagnostics.filter((d) => d.severity === 'error') : e.diagnostics;
    const errors = e.diagnostics.filter((d) => d.severity === 'error').length;
    return `${formatDiagnostics(shown, e.sources)}\n\n${errors} error${errors === 1 ? '' : 's'}${file ? ` in ${file}` : ''}; nothing was written`;
  }
  if (file !== undefined) {
    const text = describeError(e, quiet);
    return text.startsWith('error: ') ? `error: ${file}: ${text.slice('error: '.length)}` : `error in ${file}:\n${text}`;
  }
  if (e instanceof StrictError) return `${e.warnings.map((w) => `error: ${w}`).join('\n')}\n  help: a warning, made an error by --strict`;
  if (e instanceof SingularSystemError) return `error: ${e.message}${e.help ? `\n  help: ${e.help}` : ''}`;
  if (e instanceof ConversionError) return `error: ${e.message}\n  help: write S-parameters (--param S), which exist for every solvable network`;
  if (e instanceof OutputError) return `error: ${e.message}${e.help ? `\n  help: ${e.help}` : ''}`;
  if (e instanceof TouchstoneError) return `${e.describe()}`;
  if (e instanceof RangeError || (e instanceof Error && e.name === 'TwoPortConversionError') || (e instanceof Error && e.name === 'FrequencyGridError')) return `error: ${withoutInternalName(e.message)}`;
  if (e instanceof FigureError) return `error: ${e.detail}${e.help ? `\n  help: ${e.help}` : ''}`;
  if (e instanceof CompareError || e instanceof InputsError) return `error: ${e.message}${'help' in e && e.help ? `\n  help: ${e.help}` : ''}`;
  const err = e as NodeJS.ErrnoException;
  if (err && typeof err.code === 'string' && err.path) {
    const what = err.code === 'ENOENT' ? 'no such file or folder' : err.code === 'EACCES' ? 'permission denied' : err.message;
    return `error: ${err.path}: ${what}`;
  }
  return `error: ${withoutInternalName((e as Error).message ?? String(e))}`;
}

/** A message from a model's argument check may begin with the function's name (`microstripWidth: …`): never shown. */
function withoutInternalName(message: string): string {
  return message.replace(/^[a-z]+[A-Z][A-Za-z0-9]*: /, '');
}

/** `--touchstone`: 1.1 or 2.0, also written 2, 2.00 or 1.10 (a script may pass the version as a number). */
function touchstoneVersion(v: unknown): TouchstoneVersion | undefined {
  if (v === undefined) return undefined;
  if (Array.isArray(v)) throw new Error('--touchstone is given more than once');
  const t = String(v).trim();
  if (/^1\.10*$/.test(t)) return '1.1';
  if (/^2(\.0*)?$/.test(t)) return '2.0';
  throw new Error(`--touchstone is 1.1 or 2.0, got ${JSON.stringify(t)}`);
}

/** Numeric options and what they accept; checked before any command runs (a usage error names the option). */
const NUMERIC_OPTIONS: [option: string, key: string, accepts: (x: number) => boolean, what: string][] = [
  ['tol-db', 'tolDb', (x) => Number.isFinite(x) && x >= 0, 'a finite number ≥ 0 (dB)'],
  ['tol-deg', 'tolDeg', (x) => Number.isFinite(x) && x >= 0, 'a finite number ≥ 0 (degrees)'],
  ['tol-abs', 'tolAbs', (x) => Number.isFinite(x) && x >= 0, 'a finite number ≥ 0'],
  ['floor-db', 'floorDb', (x) => Number.isFinite(x), 'a finite number (dB)'],
  ['digits', 'digits', (x) => Number.isInteger(x) && x >= 1 && x <= 17, 'a whole number from 1 to 17'],
  ['jobs', 'jobs', (x) => Number.isInteger(x) && x >= 1, 'a whole number ≥ 1'],
];
/** Numeric options of `plot` alone (`microstrip --height` is a length with units). */
const PLOT_OPTIONS: typeof NUMERIC_OPTIONS = [
  ['width', 'width', (x) => Number.isInteger(x) && x >= 1, 'a whole number of pixels ≥ 1'],
  ['height', 'height', (x) => Number.isInteger(x) && x >= 1, 'a whole number of pixels ≥ 1'],
];

/** yargs check: every numeric option given is one value and within its range. */
function checkNumericOptions(argv: Record<string, unknown>): true {
  const command = Array.isArray(argv._) ? argv._[0] : undefined;
  for (const [option, key, accepts, what] of command === 'plot' ? [...NUMERIC_OPTIONS, ...PLOT_OPTIONS] : NUMERIC_OPTIONS) {
    const v = argv[key];
    if (v === undefined) continue;
    if (Array.isArray(v)) throw new Error(`--${option} is given more than once`);
    if (typeof v !== 'number' || !accepts(v)) throw new Error(`--${option} must be ${what}, got ${String(v)}`);
  }
  return true;
}

/**
 * Reads the comma-separated quantities of an option (`--at "2.4 GHz, 2.5 GHz"`), each with
 * units as in a netlist; every bad item is reported, located in the option's text.
 */
function quantityList(text: string, unit: string | null, option: string): { value: number; column: number; length: number }[] {
  const diagnostics: Diagnostic[] = [];
  const items: { value: number; column: number; length: number }[] = [];
  let start = 0;
  for (const piece of text.split(',')) {
    const item = piece.trim();
    const column = start + (piece.length - piece.trimStart().length) + 1;
    start += piece.length + 1;
    if (!item) {
      diagnostics.push({ severity: 'error', code: 'bad-value', message: `${option} has an empty item`, span: { file: option, line: 1, column: Math.max(1, Math.min(column, text.length)), length: 1 }, help: 'separate the values by single commas' });
      continue;
    }
    try {
      items.push({ value: evaluateQuantity(item, unit, option), column, length: item.length });
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      for (const d of e.diagnostics) diagnostics.push(d.span ? { ...d, span: { ...d.span, file: option, line: 1, column: d.span.column + column - 1 } } : d);
    }
  }
  if (diagnostics.length > 0) throw new InputError(diagnostics, new Map([[option, text]]));
  return items;
}

/**
 * `--at` of report: frequencies for the table, each inside the sweep (to 1e-9 relative). One
 * between two sweep points shows the nearest point (marked with the frequency asked for); one
 * outside the sweep is an error, located in the option's text.
 */
function frequenciesInSweep(text: string, sweep: Float64Array): number[] {
  const items = quantityList(text, 'Hz', '--at');
  const lo = sweep[0]!;
  const hi = sweep[sweep.length - 1]!;
  const slack = 1e-9 * Math.max(Math.abs(hi), 1);
  const outside = items.filter((x) => !(x.value >= lo - slack && x.value <= hi + slack));
  if (outside.length > 0) {
    throw new InputError(
      outside.map((x) => ({
        severity: 'error' as const,
        code: 'outside-sweep',
        message: `${formatFrequency(x.value)} lies outside the sweep (${lo === hi ? formatFrequency(lo) : `${formatFrequency(lo)} to ${formatFrequency(hi)}`})`,
        span: { file: '--at', line: 1, column: x.column, length: x.length },
        help: 'pick frequencies inside the sweep, or widen the sweep (--sweep)',
      })),
      new Map([['--at', text]]),
    );
  }
  return items.map((x) => x.value);
}

/** `--renormalize` of convert: reference impedances with units (ohm when none is written), each positive and finite. */
function referenceList(text: string): number[] {
  const items = quantityList(text, 'ohm', '--renormalize');
  const bad = items.filter((x) => !(x.value > 0 && Number.isFinite(x.value)));
  if (bad.length > 0) {
    throw new InputError(
      bad.map((x) => ({ severity: 'error' as const, code: 'bad-value', message: `a reference impedance must be positive and finite, got ${x.value} ohm`, span: { file: '--renormalize', line: 1, column: x.column, length: x.length } })),
      new Map([['--renormalize', text]]),
    );
  }
  return items.map((x) => x.value);
}

/**
 * When `check` stops on an input error, its --junit and --json reports are still written (one
 * case in error carrying the messages), so that CI shows the failure. Never over one of the
 * run's inputs, and never over an existing file that is not such a report (or not a regular file).
 */
function writeErrorReports(a: CheckArgs, text: string, io: Io) {
  try {
    checkDistinctOutputs([a.junit, a.json]); // two reports onto one file: neither is written
  } catch {
    return;
  }
  const inputs = [a.netlist, a.against].filter((p): p is string => p !== undefined).map((p) => resolve(p));
  const reports: [string | undefined, () => string, RegExp][] = [
    [a.junit, () => formatJunit([errorSuite(a.netlist, text)]), /^<\?xml[^>]*>\s*<testsuites name="scatterbox"/],
    [a.json, () => checkErrorJson({ netlist: a.netlist, error: text }), /^\{\s*"schema": "scatterbox\.check\/1"/],
  ];
  for (const [path, body, ours] of reports) {
    if (!path || inputs.includes(resolve(path)) || !replaceable(path, ours)) continue;
    try {
      writeFileAtomicSync(path, body());
    } catch (e) {
      io.err(`${describeError(e, true).replace(/^error: /, `error: the report ${path} could not be written either: `)}\n`);
    }
  }
}

/** Whether `path` is absent, or a regular file beginning as `ours` does (a report of an earlier run). */
function replaceable(path: string, ours: RegExp): boolean {
  let st;
  try {
    st = lstatSync(path);
  } catch {
    return true;
  }
  if (!st.isFile()) return false;
  const head = Buffer.alloc(256);
  const fd = openSync(path, 'r');
  try {
    return ours.test(head.subarray(0, readSync(fd, head, 0, head.length, 0)).toString('utf8'));
  } finally {
    closeSync(fd);
  }
}

/** The inputs of `microstrip`, each with units, checked for the range the models take; every bad one reported, located in its option. */
function microstripInputs(a: MicrostripArgs): { z0: number; h: number; er: number; t: number; f: number } {
  const inputs: [key: 'z0' | 'h' | 'er' | 't' | 'f', option: string, text: string, unit: string | null, accepts: (x: number) => boolean, what: string][] = [
    ['z0', '--z0', a.z0, 'ohm', (x) => x > 0, 'above 0'],
    ['h', '--height', a.height, 'm', (x) => x > 0, 'above 0'],
    ['er', '--er', a.er, null, (x) => x >= 1, 'at least 1'],
    ['t', '--thickness', a.thickness, 'm', (x) => x >= 0, '0 or more'],
    ['f', '--freq', a.freq, 'Hz', (x) => x >= 0, '0 or more'],
  ];
  const diagnostics: Diagnostic[] = [];
  const sources = new Map<string, string>();
  const out = { z0: NaN, h: NaN, er: NaN, t: NaN, f: NaN };
  for (const [key, option, text, unit, accepts, what] of inputs) {
    sources.set(option, text);
    try {
      const v = evaluateQuantity(text, unit, option);
      if (!(Number.isFinite(v) && accepts(v))) {
        diagnostics.push({ severity: 'error', code: 'bad-value', message: `${option} must be a finite number ${what}, got ${v}`, span: { file: option, line: 1, column: 1, length: Math.max(1, text.length) } });
      }
      out[key] = v;
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      diagnostics.push(...e.diagnostics);
    }
  }
  if (diagnostics.length > 0) throw new InputError(diagnostics, sources);
  return out;
}
