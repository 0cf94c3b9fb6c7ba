import type { Argv } from 'yargs';
import type { Io } from '../cli.js';
import { Presets, SingleBar } from 'cli-progress';
import { DesignModel } from '../../src/design/model.js';
import { formatDiagnostics } from '../../src/diagnostics/diagnostic.js';
import { writeFileAtomicSync } from '../../src/io/atomic.js';
import { checkOutputs } from '../../src/io/guard.js';
import { formatJunit } from '../../src/check/junit.js';
import { evaluateSamples, sampleSetShape, summarizeYield, type SampleSet } from '../../src/yield/run.js';
import { designDigest, formatPartial, mergePartials, parsePartial, parseShard, shardRange } from '../../src/yield/partial.js';
import { readInputText } from '../../src/io/source-file.js';
import { MAX_YIELD_SAMPLES } from '../../src/limits.js';
import { formatYield, yieldJson, yieldSuite } from '../../src/yield/report.js';

export interface YieldArgs {
  netlist: string;
  samples: number;
  seed: number;
  minYield?: number;
  json?: string;
  junit?: string;
  shard?: string;
  out?: string;
  set?: string[];
  sweep?: string;
  quiet: boolean;
  strict?: boolean;
}


export const yieldBuilder = (y: Argv) =>
  y
    .positional('netlist', { type: 'string', describe: 'netlist file (.sbx) with tolerances (`tol …`) and specs', demandOption: true })
    .option('samples', { alias: 'n', type: 'number', default: 1000, describe: 'number of samples' })
    .option('seed', { type: 'number', default: 1, describe: 'seed of the draws (a whole number; sample k depends only on the seed and k)' })
    .option('min-yield', { type: 'number', describe: 'the yield target, 0 to 1: below it the exit code is 1 and the JUnit case fails' })
    .option('json', { type: 'string', describe: 'write the results as JSON: summary, per spec, every sample\'s margins and draws' })
    .option('junit', { type: 'string', describe: 'write a JUnit XML report (one case, `yield`, failing below --min-yield)' })
    .option('shard', { type: 'string', describe: 'compute only shard I of N (I/N) of the samples and write it with -o, for `scatterbox merge`' })
    .option('out', { alias: 'o', type: 'string', describe: 'with --shard: the partial file to write' })
    .option('set', { type: 'string', array: true, describe: 'override a parameter: name=value, with units (repeatable)' })
    .option('sweep', { type: 'string', describe: 'replace the netlist sweep: segments as after `sweep`, joined by `;`' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'no warnings, no progress bar' })
    .option('strict', { type: 'boolean', default: false, describe: 'treat every warning as an error' })
    .example('$0 yield circuits/bandpass-2g4.sbx --samples 2000 --seed 7', 'the fraction of builds that meet every spec')
    .example('$0 yield circuits/bandpass-2g4.sbx --min-yield 0.9 --junit yield.xml', 'fail a CI job below 90 %')
    .example('$0 yield circuits/bandpass-2g4.sbx --samples 100000 --shard 3/8 -o part-3.json', 'one slice of a big run, on its own machine')
    .epilog('Exit codes: 0 success (the yield at or above --min-yield), 1 below it or an input error, 2 usage error.');

/** `scatterbox yield`: Monte Carlo over the netlist's tolerances. */
export function runYieldCommand(a: YieldArgs, io: Io, describeError: (e: unknown, quiet: boolean) => string): number {
  try {
    if (!Number.isSafeInteger(a.samples) || a.samples < 1 || a.samples > MAX_YIELD_SAMPLES) throw new RangeError(`--samples must be a whole number from 1 to ${MAX_YIELD_SAMPLES} (the limit of samples), not ${a.samples}`);
    if (!Number.isSafeInteger(a.seed) || a.seed < 0) throw new RangeError(`--seed must be a whole number from 0 to 2^53 − 1, not ${a.seed}`);
    if (a.minYield !== undefined && !(a.minYield >= 0 && a.minYield <= 1)) throw new RangeError(`--min-yield is a fraction from 0 to 1 (0.95 for 95 %), not ${a.minYield}`);
    const shard = a.shard !== undefined ? parseShard(a.shard) : undefined;
    if (shard && !a.out) throw new RangeError('--shard writes its samples to a partial file: give it with -o FILE');
    if (!shard && a.out) throw new RangeError('-o names the partial file of a --shard run; the results of a whole run go to --json');
    if (shard && (a.json || a.junit || a.minYield !== undefined)) throw new RangeError('a shard has no yield of its own: give --json, --junit and --min-yield to `scatterbox merge`');
    checkOutputs([a.json, a.junit, a.out], [a.netlist]);
    const model = DesignModel.load(a.netlist, { set: a.set, sweep: a.sweep, strict: a.strict });
    if (!a.quiet && model.warnings.length > 0) io.err(formatDiagnostics(model.warnings, model.sources) + '\n');
    if (model.circuit.tolerances.length === 0) io.err(`note: ${a.netlist} gives no tolerances (\`tol …\`): every sample is the nominal design\n`);
    if (model.circuit.specs.length === 0) throw new RangeError(`${a.netlist} has no specs: a yield needs specs to pass`);
    const bar = !a.quiet && process.stderr.isTTY && a.samples >= 200 ? new SingleBar({ format: 'yield {bar} {value}/{total} samples', hideCursor: true, clearOnComplete: true, stream: process.stderr }, Presets.shades_classic) : undefined;
    const [first, count] = shard ? shardRange(a.samples, shard.shard, shard.shards) : [0, a.samples];
    bar?.start(count, 0);
    const set: SampleSet =
      count > 0
        ? evaluateSamples(model, { seed: a.seed, first, count, onProgress: bar ? (done) => bar.update(done) : undefined })
        : { seed: a.seed, first, count: 0, ...sampleSetShape(model), margins: new Float64Array(0), draws: new Float64Array(0), errors: [] };
    bar?.stop();
    if (shard) {
      writeFileAtomicSync(a.out!, formatPartial(set, { netlist: a.netlist, digest: designDigest(model.sources, a), total: a.samples, shard: shard.shard, shards: shard.shards }));
      io.out(`shard ${shard.shard} of ${shard.shards}: samples ${first} to ${first + count - 1} of ${a.samples} (seed ${a.seed}) written to ${a.out}\n`);
      return 0;
    }
    return report(summarizeYield(set), a.netlist, a, io);
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return 1;
  }
}

/** Prints a run's summary and writes its reports; the exit code (1 below --min-yield). */
function report(r: ReturnType<typeof summarizeYield>, netlist: string, a: { json?: string; junit?: string; minYield?: number }, io: Io): number {
  io.out(formatYield(r, netlist, a.minYield));
  if (a.json) writeFileAtomicSync(a.json, yieldJson(r, netlist));
  if (a.junit) writeFileAtomicSync(a.junit, formatJunit([yieldSuite(r, netlist, a.minYield)]));
  return a.minYield !== undefined && r.interval.estimate < a.minYield ? 1 : 0;
}

export interface MergeArgs {
  partials: string[];
  minYield?: number;
  json?: string;
  junit?: string;
  quiet: boolean;
}

export const mergeBuilder = (y: Argv) =>
  y
    .positional('partials', { type: 'string', array: true, describe: 'the partial files of every shard of one `yield --shard I/N` run, in any order', demandOption: true })
    .option('min-yield', { type: 'number', describe: 'the yield target, 0 to 1: below it the exit code is 1 and the JUnit case fails' })
    .option('json', { type: 'string', describe: 'write the results as JSON (the same bytes as a single run\'s --json)' })
    .option('junit', { type: 'string', describe: 'write a JUnit XML report' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'no notes' })
    .example('$0 merge part-*.json --min-yield 0.9 --junit yield.xml', 'the yield of a sharded run, for CI')
    .epilog('The merged result is exactly what one run of all the samples gives. Exit codes: 0 success, 1 below --min-yield or an input error, 2 usage error.');

/** `scatterbox merge`: the partial files of a sharded yield run into its result. */
export function runMerge(a: MergeArgs, io: Io, describeError: (e: unknown, quiet: boolean) => string): number {
  try {
    if (a.minYield !== undefined && !(a.minYield >= 0 && a.minYield <= 1)) throw new RangeError(`--min-yield is a fraction from 0 to 1 (0.95 for 95 %), not ${a.minYield}`);
    checkOutputs([a.json, a.junit], a.partials);
    const parts = a.partials.map((file) => ({ file, ...parsePartial(readInputText(file), file) }));
    const { set, meta } = mergePartials(parts);
    return report(summarizeYield(set), meta.netlist, a, io);
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return 1;
  }
}
