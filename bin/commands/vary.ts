/**
 * `scatterbox vary <netlist> --over NAME=FROM..TO:COUNT [--over …]`: a family of curves. Every
 * value (or, with two `--over`, every combination) of design variables is evaluated on one design
 * model; the terminal shows each member's specs, and the family goes to a report, a plot, one
 * JSON/CSV file or one Touchstone file per member.
 *
 * Exit codes: 0 done (whatever the specs say), 1 an input or write error, or — with
 * `--require-pass` — some member fails a spec; 2 a usage error.
 */
import { dirname, extname } from 'node:path';
import { Presets, SingleBar } from 'cli-progress';
import type { Argv } from 'yargs';
import { formatMargin } from '../../src/check/format.js';
import { formatSpecTable } from '../../src/check/report.js';
import { DesignModel } from '../../src/design/model.js';
import { formatDiagnostics } from '../../src/diagnostics/diagnostic.js';
import { evaluateFamily, familyMembers, formatValue, parseOver, FamilyMemberError, type FamilyMember, type MemberResult, type OverAxis } from '../../src/design/family.js';
import { writeFileAtomicSync } from '../../src/io/atomic.js';
import { familyCsvChunks, formatFamilyJson, type FamilyVariable } from '../../src/io/family.js';
import { checkOutputs, ensureFolder, OutputError } from '../../src/io/guard.js';
import { formatFromPath } from '../../src/io/output.js';
import { MAX_NETWORK_VALUES } from '../../src/limits.js';
import { renderNetwork } from '../../src/io/output.js';
import { renderPlotSvg, renderReport, type Dataset } from '../../src/report/index.js';
import { describeError, EXIT_INPUT, EXIT_OK, type Io } from '../cli.js';

export interface VaryArgs {
  netlist: string;
  over: string[];
  out?: string;
  report?: string;
  plot?: string;
  kind: 'db' | 'phase' | 'gd' | 'smith';
  title?: string;
  requirePass: boolean;
  set?: string[];
  sweep?: string;
  quiet: boolean;
  strict?: boolean;
}

/** The options of `vary` (yargs builder). */
export function varyBuilder(y: Argv) {
  return y
    .option('set', { type: 'string', array: true, describe: 'override a parameter: name=value, with units (repeatable); a varied variable takes the --over values' })
    .option('sweep', { type: 'string', describe: 'replace the netlist sweep: segments as after `sweep`, joined by `;`' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'no warnings, no progress bar' })
    .option('strict', { type: 'boolean', default: false, describe: 'treat every warning of the netlist as an error (exit 1), e.g. in CI' })
    .positional('netlist', { type: 'string', describe: 'netlist file (.sbx) with design variables (let NAME = VALUE vary LOW to HIGH)', demandOption: true })
    .option('over', {
      type: 'string',
      array: true,
      demandOption: true,
      describe: 'a variable and its values: NAME=FROM..TO:COUNT (even steps), NAME=FROM..TO:COUNT:log (even ratio) or NAME=V1,V2,… (a list); values with units; twice for a grid of two variables',
    })
    .option('out', { alias: 'o', type: 'string', describe: 'the family as one .json or .csv file, or one Touchstone file per member: a name with {index} or {values}, e.g. out/lpf-{index}.s2p' })
    .option('report', { type: 'string', describe: 'an HTML report of the family (one legend entry per member)' })
    .option('plot', { type: 'string', describe: 'a static plot of the family (.svg or .png)' })
    .option('kind', { choices: ['db', 'phase', 'gd', 'smith'] as const, default: 'db', describe: 'what --plot draws' })
    .option('title', { type: 'string', describe: 'title of the report and the plot' })
    .option('require-pass', { type: 'boolean', default: false, describe: 'exit 1 when some member fails a spec' })
    .example('$0 vary circuits/match-50-75-915.sbx --over cshunt=1pF..2.2pF:5', 'the specs at five values of cshunt')
    .example('$0 vary circuits/match-50-75-915.sbx --over cshunt=1.2pF,1.5pF,1.8pF --report family.html', 'a report with one curve per value')
    .example('$0 vary circuits/match-50-75-915.sbx --over lser=4nH..10nH:4:log --over cshunt=1pF..2.2pF:3 -o family.csv', 'a grid of two variables as one CSV')
    .example('$0 vary circuits/match-50-75-915.sbx --over cshunt=1pF..2.2pF:4 -o "out/match-{index}.s2p"', 'one Touchstone file per member')
    .epilog('Exit codes: 0 done, 1 input or write error (or, with --require-pass, a member fails a spec), 2 usage error.');
}

/** How `-o` is written. */
type OutPlan = { kind: 'json' | 'csv'; path: string } | { kind: 'touchstone'; paths: string[] } | undefined;

/** Runs `vary`; returns the exit code. */
export async function runVary(a: VaryArgs, io: Io): Promise<number> {
  try {
    const overs = a.over ?? [];
    if (overs.length === 0 || overs.length > 2) throw new OutputError(`vary takes one or two --over options, got ${overs.length}`, 'give --over NAME=FROM..TO:COUNT once, or twice for a grid of two variables');
    for (const [option, path] of [['--plot', a.plot], ['--report', a.report]] as const) {
      if (path === undefined) continue;
      const ext = extname(path).toLowerCase();
      if (option === '--plot' && ext !== '.svg' && ext !== '.png') throw new OutputError(`--plot is written as .svg or .png, not ${ext || 'a file without extension'}`);
    }
    const model = DesignModel.load(a.netlist, { set: a.set, sweep: a.sweep, strict: a.strict });
    if (!a.quiet && model.warnings.length > 0) io.err(formatDiagnostics(model.warnings, model.sources) + '\n');
    const texts = overs.map((text, q) => ({ what: overs.length === 1 ? '--over' : `--over (${q === 0 ? 'first' : 'second'})`, text }));
    const axes: OverAxis[] = texts.map((t) => parseOver(t.text, model.variables, t.what));
    const members = familyMembers(axes, texts);
    const circuit = model.circuit;
    const ports = circuit.ports.length;
    const total = members.length * circuit.frequencies.length * ports * ports;
    if (total > MAX_NETWORK_VALUES) {
      throw new OutputError(`the family would hold ${members.length} × ${circuit.frequencies.length} points × ${ports}² = ${total} complex values, more than the limit of ${MAX_NETWORK_VALUES}`, 'take fewer values or fewer sweep points (--sweep)');
    }
    if (a.requirePass && circuit.specs.length === 0) {
      throw new OutputError(`${a.netlist} has no spec statements, so --require-pass has nothing to check`, 'add `spec` statements to the netlist, or leave out --require-pass');
    }
    // every output checked before the first solve
    const out = outPlan(a.out, members, axes, ports);
    if (out?.kind === 'touchstone') for (const folder of new Set(out.paths.map((p) => dirname(p)))) ensureFolder(folder);
    const outputs = [a.report, a.plot, ...(out === undefined ? [] : out.kind === 'touchstone' ? out.paths : [out.path])];
    checkOutputs(outputs, model.sources.keys());

    const bar =
      !a.quiet && process.stderr.isTTY && members.length >= PROGRESS_MIN_MEMBERS
        ? new SingleBar({ format: 'members [{bar}] {value}/{total}', stream: process.stderr, hideCursor: true, clearOnComplete: true }, Presets.shades_classic)
        : undefined;
    bar?.start(members.length, 0);
    let results: MemberResult[];
    try {
      results = evaluateFamily(model, axes, members, (done) => bar?.update(done));
    } finally {
      bar?.stop();
    }

    // the terminal: one table per member, then the count
    const passing = results.filter((r) => r.specs.every((s) => s.pass)).length;
    if (circuit.specs.length === 0) {
      for (const r of results) io.out(`${r.label}  (member ${r.index + 1} of ${results.length})\n`);
      io.out(`no specs in this netlist: nothing to check per member\n`);
    } else {
      for (const r of results) {
        io.out(`${r.label}  (member ${r.index + 1} of ${results.length})\n`);
        io.out(formatSpecTable(r.specs));
        io.out('\n');
      }
    }
    if (circuit.specs.length > 0 && results.length > 1) io.out(`${summaryTable(results)}\n`);
    if (circuit.specs.length > 0) io.out(`${passing} of ${results.length} member${results.length === 1 ? '' : 's'} pass${passing === 1 ? 'es' : ''} every spec\n`);

    // every file is made before the first is written, so that a failure leaves none half done
    const title = a.title ?? `${circuit.title ?? a.netlist}: ${axes.map((x) => x.name).join(' × ')} varied`;
    const datasets: Dataset[] = results.map((r) => ({ label: r.label, network: r.network, specs: r.specs, circuit, source: a.netlist }));
    const files: [string, string | Uint8Array | Iterable<string>][] = [];
    if (a.report) files.push([a.report, renderReport({ datasets, title, source: a.netlist })]);
    if (a.plot) {
      const svg = renderPlotSvg(datasets, { kind: a.kind, title: a.title });
      if (extname(a.plot).toLowerCase() === '.svg') files.push([a.plot, svg]);
      else {
        const { Resvg } = await import('@resvg/resvg-js');
        files.push([a.plot, new Resvg(svg, { background: 'white', font: { loadSystemFonts: true } }).render().asPng()]);
      }
    }
    if (out) files.push(...familyFiles(out, a, axes, results, title));
    for (const [path, data] of files) writeFileAtomicSync(path, data);
    return a.requirePass && passing < results.length ? EXIT_INPUT : EXIT_OK;
  } catch (e) {
    if (e instanceof FamilyMemberError) {
      const text = describeError(e.cause, a.quiet);
      io.err(`while evaluating ${e.member.label} (member ${e.member.index + 1}):\n${text}${/nothing was written$/.test(text) ? '' : '\nnothing was written'}\n`);
      return EXIT_INPUT;
    }
    io.err(describeError(e, a.quiet) + '\n');
    return EXIT_INPUT;
  }
}

/** Families at least this large show a progress bar on a terminal (stderr, without --quiet). */
const PROGRESS_MIN_MEMBERS = 20;

/** One line per member: each spec's verdict and worst margin, then whether all pass. */
function summaryTable(results: readonly MemberResult[]): string {
  const names = results[0]!.specs.map((r) => r.spec.name);
  const head = ['member', 'values', ...names, 'all'];
  const rows = results.map((m) => [
    String(m.index + 1),
    m.label,
    ...m.specs.map((r) => (r.points === 0 ? 'FAIL (no points)' : `${r.pass ? 'pass' : 'FAIL'} ${formatMargin(r.worstMargin, r.spec.unit)}`)),
    m.specs.every((r) => r.pass) ? 'pass' : 'FAIL',
  ]);
  const widths = head.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c]!.length)));
  const line = (cells: string[]) => cells.map((x, c) => x.padEnd(widths[c]!)).join('  ').trimEnd();
  return [line(head), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n') + '\n';
}

/** The files of `-o`: paths and texts (every number checked before any is written). */
function familyFiles(out: NonNullable<OutPlan>, a: VaryArgs, axes: readonly OverAxis[], results: readonly MemberResult[], title: string): [string, string | Iterable<string>][] {
  const variables: FamilyVariable[] = axes.map((x) => ({ name: x.name, unit: x.unit, spacing: x.spacing }));
  if (out.kind === 'touchstone') {
    const paths = out.paths;
    return results.map((r, k) => [paths[k]!, renderNetwork(r.network, { comments: [`scatterbox vary ${a.netlist}`, `member ${r.index + 1} of ${results.length}: ${r.label}`] }, paths[k]!)]);
  }
  if (out.kind === 'json') return [[out.path, formatFamilyJson(title, variables, results)]];
  return [[out.path, familyCsvChunks(variables, results)]];
}

/**
 * Where `-o` goes: `.json` or `.csv` is one file for the whole family; a Touchstone name (`.sNp`)
 * is one file per member, its `{index}` replaced by the member number (from 1, zero-padded to the
 * same width) and `{values}` by the values (`cshunt-1.5pF`, joined by `_` for two variables).
 */
function outPlan(path: string | undefined, members: readonly FamilyMember[], axes: readonly OverAxis[], ports: number): OutPlan {
  if (path === undefined) return undefined;
  const format = formatFromPath(path);
  if ((format === 'json' || format === 'csv') && /\{(index|values)\}/.test(path)) {
    throw new OutputError(`${path} is one ${format.toUpperCase()} file for the whole family, so {index} and {values} have no place in its name`, 'name the file plainly (family.json), or write one Touchstone file per member (out/lpf-{index}.s2p)');
  }
  if (format === 'json' || format === 'csv') return { kind: format, path };
  if (format !== 'touchstone') {
    throw new OutputError(`cannot tell what to write from the name ${JSON.stringify(path)}`, 'use .json or .csv for the family in one file, or a Touchstone name with {index} (e.g. out/lpf-{index}.s2p) for one file per member');
  }
  const placeholder = /\{(index|values)\}/.test(path);
  if (!placeholder && members.length > 1) {
    throw new OutputError(`${path} names one Touchstone file, but the family has ${members.length} members`, `put {index} or {values} in the name for one file per member (e.g. ${path.replace(/(\.s\d+p)$/i, '-{index}$1')}), or write .json or .csv`);
  }
  const want = `.s${ports}p`;
  if (extname(path).toLowerCase() !== want) throw new OutputError(`the file name ends in ${extname(path)} but the network has ${ports} port(s)`, `name the files with ${want}`);
  const width = String(members.length).length;
  const paths = members.map((m) =>
    path.replace(/\{index\}/g, String(m.index + 1).padStart(width, '0')).replace(/\{values\}/g, axes.map((x, q) => `${x.name}-${fileValue(m.values[q]!, x.unit)}`).join('_')),
  );
  return { kind: 'touchstone', paths };
}

/** A value for a file name: `1.5pF`, `6.2nH`, `50ohm` (µ written as u; nothing but letters, digits, `.`, `-`, `+`). */
function fileValue(x: number, unit: string | null): string {
  return formatValue(x, unit)
    .replace(/µ/g, 'u')
    .replace(/\s+/g, '')
    .replace(/[^A-Za-z0-9.+-]/g, '_');
}
