import type { Argv } from 'yargs';
import type { Io } from '../cli.js';
import { Presets, SingleBar } from 'cli-progress';
import { DesignModel } from '../../src/design/model.js';
import { formatDiagnostics } from '../../src/diagnostics/diagnostic.js';
import { writeFileAtomicSync } from '../../src/io/atomic.js';
import { checkOutputs } from '../../src/io/guard.js';
import { formatJunit } from '../../src/check/junit.js';
import { availableParallelism } from 'node:os';
import { sampleRows, sampleSetOf, summarizeYield, type SampleSet } from '../../src/yield/run.js';
import { evaluateSamplesParallel } from '../../src/yield/parallel.js';
import { designDigest, formatPartial, mergePartials, parsePartial, parseShard, shardRange, type PartialMeta } from '../../src/yield/partial.js';
import { readInputText } from '../../src/io/source-file.js';
import { MAX_YIELD_SAMPLES } from '../../src/limits.js';
import { formatYield, yieldCsv, yieldJson, yieldSuite } from '../../src/yield/report.js';
import { renderYieldReport, yieldEnvelopeSvg, type YieldNominal } from '../../src/yield/html.js';
import { evaluateSpecs } from '../../src/check/evaluate.js';
import { basename, extname } from 'node:path';

export interface YieldArgs {
  netlist: string;
  samples?: number;
  seed?: number;
  jobs: number;
  minYield?: number;
  json?: string;
  junit?: string;
  csv?: string;
  report?: string;
  plot?: string;
  envelopes?: number;
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
    .option('samples', { alias: 'n', type: 'number', describe: 'number of samples (default: the netlist\'s `yield samples=`, else 1000)' })
    .option('seed', { type: 'number', describe: 'seed of the draws, a whole number; sample k depends only on the seed and k (default: the netlist\'s `yield seed=`, else 1)' })
    .option('jobs', { alias: 'j', type: 'number', default: availableParallelism(), describe: 'threads, this one included (1: one thread); the results are the same for any count' })
    .option('min-yield', { type: 'number', describe: 'the yield target, 0 to 1: below it the exit code is 1 and the JUnit case fails (default: the netlist\'s `yield min=`)' })
    .option('json', { type: 'string', describe: 'write the results as JSON: summary, per spec, every sample\'s margins and draws' })
    .option('junit', { type: 'string', describe: 'write a JUnit XML report (one case, `yield`, failing below --min-yield)' })
    .option('csv', { type: 'string', describe: 'write every sample as CSV: pass or fail, its worst margin per spec and its drawn part values' })
    .option('report', { type: 'string', describe: 'write the yield as an HTML page: failures and drivers per spec, margin histograms, response envelopes' })
    .option('plot', { type: 'string', describe: 'write the percentile envelopes of |S| as a static plot (.svg or .png)' })
    .option('envelopes', { type: 'number', describe: 'solve the whole sweep of the first N samples for the percentile envelopes of |S| (default 1000 with --report or --plot, else 0)' })
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
export async function runYieldCommand(a: YieldArgs, io: Io, describeError: (e: unknown, quiet: boolean) => string): Promise<number> {
  try {
    if (a.samples !== undefined && (!Number.isSafeInteger(a.samples) || a.samples < 1 || a.samples > MAX_YIELD_SAMPLES)) throw new RangeError(`--samples must be a whole number from 1 to ${MAX_YIELD_SAMPLES} (the limit of samples), not ${a.samples}`);
    if (a.seed !== undefined && (!Number.isSafeInteger(a.seed) || a.seed < 0)) throw new RangeError(`--seed must be a whole number from 0 to 2^53 − 1, not ${a.seed}`);
    if (a.minYield !== undefined && !(a.minYield >= 0 && a.minYield <= 1)) throw new RangeError(`--min-yield is a fraction from 0 to 1 (0.95 for 95 %), not ${a.minYield}`);
    if (!Number.isSafeInteger(a.jobs) || a.jobs < 1 || a.jobs > 1024) throw new RangeError(`--jobs must be a whole number of threads from 1 to 1024, not ${a.jobs}`);
    const shard = a.shard !== undefined ? parseShard(a.shard) : undefined;
    if (shard && !a.out) throw new RangeError('--shard writes its samples to a partial file: give it with -o FILE');
    if (!shard && a.out) throw new RangeError('-o names the partial file of a --shard run; the results of a whole run go to --json');
    if (shard && (a.json || a.junit || a.minYield !== undefined || a.csv || a.report || a.plot)) throw new RangeError('a shard has no yield of its own: give --json, --junit, --csv, --report, --plot and --min-yield to `scatterbox merge` (and --envelopes N to every shard for envelopes)');
    if (a.plot) plotFormat(a.plot);
    if (a.envelopes !== undefined && (!Number.isSafeInteger(a.envelopes) || a.envelopes < 0 || a.envelopes > MAX_YIELD_SAMPLES)) throw new RangeError(`--envelopes takes a whole number of samples from 0 to ${MAX_YIELD_SAMPLES}, not ${a.envelopes}`);
    checkOutputs([a.json, a.junit, a.out, a.csv, a.report, a.plot], [a.netlist]);
    const model = DesignModel.load(a.netlist, { set: a.set, sweep: a.sweep, strict: a.strict });
    // the netlist's `yield` statement gives what the options leave out
    const plan = model.circuit.yieldPlan;
    const samples = a.samples ?? plan?.samples ?? DEFAULT_SAMPLES;
    const seed = a.seed ?? plan?.seed ?? 1;
    const minYield = a.minYield ?? plan?.min;
    const envelopeSamples = Math.min(samples, a.envelopes ?? (a.report || a.plot ? DEFAULT_ENVELOPE_SAMPLES : 0));
    if (!a.quiet && model.warnings.length > 0) io.err(formatDiagnostics(model.warnings, model.sources) + '\n');
    if (model.circuit.tolerances.length === 0) io.err(`note: ${a.netlist} gives no tolerances (\`tol …\`): every sample is the nominal design\n`);
    if (model.circuit.specs.length === 0) throw new RangeError(`${a.netlist} has no specs: a yield needs specs to pass`);
    const bar = !a.quiet && process.stderr.isTTY && samples >= 200 ? new SingleBar({ format: 'yield {bar} {value}/{total} samples', hideCursor: true, clearOnComplete: true, stream: process.stderr }, Presets.shades_classic) : undefined;
    const [first, count] = shard ? shardRange(samples, shard.shard, shard.shards) : [0, samples];
    bar?.start(count, 0);
    const set: SampleSet =
      count > 0
        ? await evaluateSamplesParallel(model, { seed, first, count, jobs: a.jobs, envelopeSamples, onProgress: bar ? (done) => bar.update(done) : undefined })
        : sampleSetOf(model, { seed, first, count: 0, envelopeSamples }, sampleRows(model, first, 0, envelopeSamples), []);
    bar?.stop();
    if (shard) {
      writeFileAtomicSync(a.out!, formatPartial(set, { netlist: a.netlist, digest: designDigest(model.sources, a), total: samples, shard: shard.shard, shards: shard.shards, ...(plan?.min !== undefined ? { min: plan.min } : {}) }));
      io.out(`shard ${shard.shard} of ${shard.shards}: samples ${first} to ${first + count - 1} of ${samples} (seed ${seed}) written to ${a.out}\n`);
      return 0;
    }
    const nominal = a.report || (a.plot && envelopeSamples > 0) ? nominalOf(model) : undefined;
    return await report(summarizeYield(set), a.netlist, { ...a, minYield }, io, nominal);
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return 1;
  }
}

/** Samples of a run when neither --samples nor the netlist says. */
export const DEFAULT_SAMPLES = 1000;

/** Envelope samples with --report or --plot when --envelopes is not given. */
export const DEFAULT_ENVELOPE_SAMPLES = 1000;

/** The format of a --plot file by its extension. */
function plotFormat(file: string): 'svg' | 'png' {
  const ext = extname(file).toLowerCase();
  if (ext === '.svg' || ext === '.png') return ext.slice(1) as 'svg' | 'png';
  throw new RangeError(`--plot writes .svg or .png files, not \`${basename(file)}\``);
}

/** The nominal design of a model: its whole sweep and spec results (for the page and plot). */
function nominalOf(model: DesignModel): YieldNominal {
  const network = model.solve();
  return { network, specs: evaluateSpecs(model.circuit.specs, network) };
}

/** Prints a run's summary and writes its reports; the exit code (1 below --min-yield). */
async function report(
  r: ReturnType<typeof summarizeYield>,
  netlist: string,
  a: { json?: string; junit?: string; csv?: string; report?: string; plot?: string; minYield?: number },
  io: Io,
  nominal?: YieldNominal,
): Promise<number> {
  io.out(formatYield(r, netlist, a.minYield));
  const files: [string, string | Uint8Array][] = [];
  if (a.json) files.push([a.json, yieldJson(r, netlist)]);
  if (a.junit) files.push([a.junit, formatJunit([yieldSuite(r, netlist, a.minYield)])]);
  if (a.csv) files.push([a.csv, yieldCsv(r)]);
  if (a.report) files.push([a.report, renderYieldReport(r, netlist, { minYield: a.minYield, nominal })]);
  if (a.plot) {
    const svg = yieldEnvelopeSvg(r, { nominal });
    if (plotFormat(a.plot) === 'svg') files.push([a.plot, svg]);
    else {
      const { Resvg } = await import('@resvg/resvg-js');
      files.push([a.plot, new Resvg(svg, { background: 'white', font: { loadSystemFonts: true } }).render().asPng()]);
    }
  }
  // every file is made before any is written: a failure leaves none half-done
  for (const [file, data] of files) writeFileAtomicSync(file, data);
  return a.minYield !== undefined && r.interval.estimate < a.minYield ? 1 : 0;
}

export interface MergeArgs {
  partials: string[];
  minYield?: number;
  json?: string;
  junit?: string;
  csv?: string;
  report?: string;
  plot?: string;
  quiet: boolean;
}

export const mergeBuilder = (y: Argv) =>
  y
    .positional('partials', { type: 'string', array: true, describe: 'the partial files of every shard of one `yield --shard I/N` run, in any order', demandOption: true })
    .option('min-yield', { type: 'number', describe: 'the yield target, 0 to 1: below it the exit code is 1 and the JUnit case fails (default: the netlist\'s `yield min=`)' })
    .option('json', { type: 'string', describe: 'write the results as JSON (the same bytes as a single run\'s --json)' })
    .option('junit', { type: 'string', describe: 'write a JUnit XML report' })
    .option('csv', { type: 'string', describe: 'write every sample as CSV (as a single run\'s --csv)' })
    .option('report', { type: 'string', describe: 'write the yield as an HTML page (as a single run\'s --report)' })
    .option('plot', { type: 'string', describe: 'write the percentile envelopes as a static plot (.svg or .png; the shards must have run with --envelopes N)' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'no notes' })
    .example('$0 merge part-*.json --min-yield 0.9 --junit yield.xml', 'the yield of a sharded run, for CI')
    .epilog('The merged result is exactly what one run of all the samples gives. Exit codes: 0 success, 1 below --min-yield or an input error, 2 usage error.');

/** `scatterbox merge`: the partial files of a sharded yield run into its result. */
export async function runMerge(a: MergeArgs, io: Io, describeError: (e: unknown, quiet: boolean) => string): Promise<number> {
  try {
    if (a.minYield !== undefined && !(a.minYield >= 0 && a.minYield <= 1)) throw new RangeError(`--min-yield is a fraction from 0 to 1 (0.95 for 95 %), not ${a.minYield}`);
    if (a.plot) plotFormat(a.plot);
    checkOutputs([a.json, a.junit, a.csv, a.report, a.plot], a.partials);
    const parts = a.partials.map((file) => ({ file, ...parsePartial(readInputText(file), file) }));
    const { set, meta } = mergePartials(parts);
    if (a.plot && !set.envelope) throw new RangeError('the shards solved no whole sweeps: run them with --envelopes N for a plot of the envelopes');
    return await report(summarizeYield(set), meta.netlist, { ...a, minYield: a.minYield ?? meta.min }, io, a.report || a.plot ? nominalFromNetlist(meta, io, a.quiet) : undefined);
  } catch (e) {
    io.err(describeError(e, a.quiet) + '\n');
    return 1;
  }
}

/**
 * The nominal design of a merged run, for the page and plot: the netlist the partials name, when
 * it is still there and is the design they ran (the same digest, without --set or --sweep).
 */
function nominalFromNetlist(meta: PartialMeta, io: Io, quiet: boolean): YieldNominal | undefined {
  try {
    const model = DesignModel.load(meta.netlist);
    if (designDigest(model.sources, {}) === meta.digest) return nominalOf(model);
  } catch {
    // not at hand: the page shows the samples alone
  }
  if (!quiet) io.err(`note: ${meta.netlist} is not the design the shards ran (or is not at hand): the page and plot show no nominal response or spec limits\n`);
  return undefined;
}
