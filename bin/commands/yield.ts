import type { Argv } from 'yargs';
import { Presets, SingleBar } from 'cli-progress';
import { DesignModel } from '../../src/design/model.js';
import { formatDiagnostics } from '../../src/diagnostics/diagnostic.js';
import { writeFileAtomicSync } from '../../src/io/atomic.js';
import { checkOutputs } from '../../src/io/guard.js';
import { formatJunit } from '../../src/check/junit.js';
import { runYield } from '../../src/yield/run.js';
import { MAX_YIELD_SAMPLES } from '../../src/limits.js';
import { formatYield, yieldJson, yieldSuite } from '../../src/yield/report.js';

export interface YieldArgs {
  netlist: string;
  samples: number;
  seed: number;
  minYield?: number;
  json?: string;
  junit?: string;
  set?: string[];
  sweep?: string;
  quiet: boolean;
  strict?: boolean;
}

interface Io {
  out: (s: string) => void;
  err: (s: string) => void;
}

export const yieldBuilder = (y: Argv) =>
  y
    .positional('netlist', { type: 'string', describe: 'netlist file (.sbx) with tolerances (`tol …`) and specs', demandOption: true })
    .option('samples', { alias: 'n', type: 'number', default: 1000, describe: 'number of samples' })
    .option('seed', { type: 'number', default: 1, describe: 'seed of the draws (a whole number; sample k depends only on the seed and k)' })
    .option('min-yield', { type: 'number', describe: 'the yield target, 0 to 1: below it the exit code is 1 and the JUnit case fails' })
    .option('json', { type: 'string', describe: 'write the results as JSON: summary, per spec, every sample\'s margins and draws' })
    .option('junit', { type: 'string', describe: 'write a JUnit XML report (one case, `yield`, failing below --min-yield)' })
    .option('set', { type: 'string', array: true, describe: 'override a parameter: name=value, with units (repeatable)' })
    .option('sweep', { type: 'string', describe: 'replace the netlist sweep: segments as after `sweep`, joined by `;`' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'no warnings, no progress bar' })
    .option('strict', { type: 'boolean', default: false, describe: 'treat every warning as an error' })
    .example('$0 yield circuits/bandpass-2g4.sbx --samples 2000 --seed 7', 'the fraction of builds that meet every spec')
    .example('$0 yield circuits/bandpass-2g4.sbx --min-yield 0.9 --junit yield.xml', 'fail a CI job below 90 %')
    .epilog('Exit codes: 0 success (the yield at or above --min-yield), 1 below it or an input error, 2 usage error.');

/** `scatterbox yield`: Monte Carlo over the netlist's tolerances. */
export function runYieldCommand(a: YieldArgs, io: Io, describeError: (e: unknown, quiet: boolean) => string): number {
  try {
    if (!Number.isSafeInteger(a.samples) || a.samples < 1 || a.samples > MAX_YIELD_SAMPLES) throw new RangeError(`--samples must be a whole number from 1 to ${MAX_YIELD_SAMPLES} (the limit of samples), not ${a.samples}`);
    if (!Number.isSafeInteger(a.seed) || a.seed < 0) throw new RangeError(`--seed must be a whole number from 0 to 2^53 − 1, not ${a.seed}`);
    if (a.minYield !== undefined && !(a.minYield >= 0 && a.minYield <= 1)) throw new RangeError(`--min-yield is a fraction from 0 to 1 (0.95 for 95 %), not ${a.minYield}`);
    checkOutputs([a.json, a.junit], [a.netlist]);
    const model = DesignModel.load(a.netlist, { set: a.set, sweep: a.sweep, strict: a.strict });
    if (!a.quiet && model.warnings.length > 0) io.err(formatDiagnostics(model.warnings, model.sources) + '\n');
    if (model.circuit.tolerances.length === 0) io.err(`note: ${a.netlist} gives no tolerances (\`tol …\`): every sample is the nominal design\n`);
    if (model.circuit.specs.length === 0) throw new RangeError(`${a.netlist} has no specs: a yield needs specs to pass`);
    const bar = !a.quiet && process.stderr.isTTY && a.samples >= 200 ? new SingleBar({ format: 'yield {bar} {value}/{total} samples', hideCursor: true, clearOnComplete: true, stream: process.stderr }, Presets.shades_classic) : undefined;
    bar?.start(a.samples, 0);
    const r = runYield(model, { samples: a.samples, seed: a.seed, onProgress: bar ? (done) => bar.update(done) : undefined });
    bar?.stop();
    io.out(formatYield(r, a.netlist, a.minYield));
    if (a.json) writeFileAtomicSync(a.json, yieldJson(r, a.netlist));
    if (a.junit) writeFileAtomicSync(a.junit, formatJunit([yieldSuite(r, a.netlist, a.minYield)]));
    return a.minYield !== undefined && r.interval.estimate < a.minYield ? 1 : 0;
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return 1;
  }
}
