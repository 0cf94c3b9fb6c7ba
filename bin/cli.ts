import yargs, { type Argv } from 'yargs';
import {
  convertNetwork,
  ConversionError,
  formatDiagnostics,
  formatTable,
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

/** Exit codes: 0 success, 1 an input (or solve, or write) error, 2 a usage error. */
export const EXIT_OK = 0;
export const EXIT_INPUT = 1;
export const EXIT_USAGE = 2;

interface Io {
  out: (s: string) => void;
  err: (s: string) => void;
}

const defaultIo: Io = {
  out: (s) => process.stdout.write(s),
  err: (s) => process.stderr.write(s),
};

class UsageError extends Error {}

/** Runs the command line; returns the exit code. */
export async function main(argv: string[], io: Io = defaultIo): Promise<number> {
  let code = EXIT_OK;
  const parser = yargs(argv)
    .scriptName('scatterbox')
    .usage('$0 <command> [options]\n\nS-parameters of linear RF networks from a plain-text netlist.')
    .command(
      'solve <netlist>',
      'solve a netlist and write its S-parameters (or print a table)',
      (y: Argv) =>
        y
          .positional('netlist', { type: 'string', describe: 'netlist file (.sbx)', demandOption: true })
          .option('out', { alias: 'o', type: 'string', describe: 'output file; the format follows the extension (.sNp, .csv, .json)' })
          .option('format', { choices: ['touchstone', 'csv', 'json', 'table'] as const, describe: 'output format (default: from the extension; table without -o)' })
          .option('touchstone', { choices: ['1.1', '2.0'] as const, describe: 'Touchstone version (default 1.1 when all port references are equal, else 2.0)' })
          .option('data', { choices: ['ri', 'ma', 'db'] as const, default: 'ri', describe: 'complex format: real/imaginary, magnitude/angle, dB/angle' })
          .option('freq-unit', { choices: ['Hz', 'kHz', 'MHz', 'GHz'] as const, default: 'GHz', describe: 'frequency unit of Touchstone files' })
          .option('param', { choices: ['S', 'Z', 'Y'] as const, default: 'S', describe: 'parameters to write (Z and Y where they exist)' })
          .option('set', { type: 'string', array: true, describe: 'override a parameter: name=value, with units (repeatable)' })
          .option('sweep', { type: 'string', describe: 'replace the netlist sweep: segments as after `sweep`, joined by `;`' })
          .option('digits', { type: 'number', describe: 'significant digits of written numbers' })
          .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'do not print warnings' })
          .example('$0 solve circuits/harmonic-lowpass-433.sbx', 'print |S| in dB and angle per frequency')
          .example('$0 solve circuits/harmonic-lowpass-433.sbx -o lowpass.s2p --data db', 'write a Touchstone 1.1 file in dB/angle')
          .example('$0 solve circuits/match-50-75-915.sbx -o match.s2p --touchstone 2.0', 'per-port references need version 2.0')
          .example('$0 solve filter.sbx --set fc=915MHz --sweep "linear start=1 MHz stop=3 GHz points=301"', 'override a parameter and the sweep')
          .example('$0 solve pad.sbx -o pad.csv --param Z', 'write the Z matrix as CSV'),
      async (args) => {
        code = runSolve(args as unknown as SolveArgs, io);
      },
    )
    .demandCommand(1, 'give a command, e.g. `scatterbox solve circuits/harmonic-lowpass-433.sbx`')
    .strict()
    .recommendCommands()
    .example('$0 solve circuits/harmonic-lowpass-433.sbx -o lowpass.s2p', 'solve a demo and write Touchstone')
    .example('$0 solve --help', 'options of `solve`')
    .epilog('Exit codes: 0 success, 1 input error, 2 usage error. Messages go to stderr.')
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
    if (e instanceof UsageError) {
      io.err(`scatterbox: ${e.message}\nRun \`scatterbox --help\` for usage.\n`);
      return EXIT_USAGE;
    }
    io.err(`scatterbox: internal error: ${(e as Error).stack ?? String(e)}\n`);
    return EXIT_INPUT;
  }
  return code;
}

interface SolveArgs {
  netlist: string;
  out?: string;
  format?: OutputFormat | 'table';
  touchstone?: TouchstoneVersion;
  data: 'ri' | 'ma' | 'db';
  freqUnit: FrequencyUnit;
  param: ParameterKind;
  set?: string[];
  sweep?: string;
  digits?: number;
  quiet: boolean;
}

function runSolve(a: SolveArgs, io: Io): number {
  try {
    const loaded = loadNetlistFile(a.netlist, { set: a.set, sweep: a.sweep });
    if (!a.quiet && loaded.warnings.length > 0) io.err(formatDiagnostics(loaded.warnings, loaded.sources) + '\n');
    const net = solve(loaded.circuit);
    const options = {
      parameter: a.param,
      version: a.touchstone,
      data: a.data.toUpperCase() as ComplexFormat,
      frequencyUnit: a.freqUnit,
      digits: a.digits,
      comments: [`scatterbox solve ${a.netlist}`],
    };
    if (!a.out) {
      if (!a.format || a.format === 'table') {
        io.out(formatTable(a.param === 'S' ? net : convertNetwork(net, a.param)));
      } else {
        io.out(renderNetwork(net, { ...options, format: a.format }));
      }
      return EXIT_OK;
    }
    if (a.format === 'table') {
      throw new OutputError('the table format is for the terminal only', 'leave out -o, or pick touchstone, csv or json');
    }
    writeNetwork(net, a.out, { ...options, format: a.format });
    return EXIT_OK;
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return EXIT_INPUT;
  }
}

function describeError(e: unknown, quiet: boolean): string {
  if (e instanceof InputError) {
    const shown = quiet ? e.diagnostics.filter((d) => d.severity === 'error') : e.diagnostics;
    const errors = e.diagnostics.filter((d) => d.severity === 'error').length;
    return `${formatDiagnostics(shown, e.sources)}\n\n${errors} error${errors === 1 ? '' : 's'}; nothing was written`;
  }
  if (e instanceof SingularSystemError) return `error: ${e.message}${e.help ? `\n  help: ${e.help}` : ''}`;
  if (e instanceof ConversionError) return `error: ${e.message}\n  help: write S-parameters (--param S), which exist for every solvable network`;
  if (e instanceof OutputError) return `error: ${e.message}${e.help ? `\n  help: ${e.help}` : ''}`;
  if (e instanceof TouchstoneError) return `${e.describe()}`;
  const err = e as NodeJS.ErrnoException;
  if (err && typeof err.code === 'string' && err.path) {
    const what = err.code === 'ENOENT' ? 'no such file or folder' : err.code === 'EACCES' ? 'permission denied' : err.message;
    return `error: ${err.path}: ${what}`;
  }
  return `error: ${(e as Error).message ?? String(e)}`;
}
