import { dirname, extname, isAbsolute, join, resolve } from 'node:path';
import type { NetlistAst, NetlistItems, Statement, StatementItem } from './ast/ast.js';
import { statementOf } from './ast/fast.js';
import { parseNetlist, parseNetlistItems } from './ast/visitor.js';
import { DiagnosticBag, InputError, type Diagnostic } from './diagnostics/diagnostic.js';
import type { Circuit } from './elaborate/circuit.js';
import { DataFileError, elaborate, type Override } from './elaborate/elaborate.js';
import { evaluate, toSI } from './elaborate/evaluate.js';
import { JsonNetworkError, parseJson } from './io/json.js';
import { readInputText } from './io/source-file.js';
import { MAX_INCLUDE_DEPTH } from './limits.js';
import { parseTouchstone, TouchstoneError } from './io/touchstone.js';
import { isMixedMode, singleEnded } from './network/mixed-mode.js';
import type { NetworkData } from './network/types.js';

/** Options for turning a netlist into a circuit. */
export interface LoadOptions {
  /** Parameter overrides, each `name=expression` (e.g. `fc=915 MHz`). */
  set?: string[];
  /** Sweep replacing the netlist's own: one or more segments separated by `;`, each written as after `sweep` (e.g. `linear start=1 MHz stop=1 GHz points=101`). */
  sweep?: string;
  /**
   * Reads an included file or a data file (default: from disk, UTF-8, only regular files of at
   * most MAX_FILE_BYTES); paths are relative to the including file.
   */
  readFile?: (path: string) => string;
  /** Every warning becomes an error (same code, message and place), so that the load throws. */
  strict?: boolean;
}

export interface LoadResult {
  circuit: Circuit;
  /** Warnings (errors throw an {@link InputError} instead). */
  warnings: Diagnostic[];
  /** Source texts by file name, for formatting diagnostics. */
  sources: Map<string, string>;
}

/** Parses a netlist text into its AST; problems go into `bag`. */
export function parse(text: string, file: string, bag: DiagnosticBag): NetlistAst {
  return parseNetlist(text, file, bag);
}

const SET_FILE = '--set';
const SWEEP_FILE = '--sweep';

/**
 * Parses, elaborates and checks a netlist. Throws {@link InputError} carrying every error (and
 * warning) found in the file and the options, in one go.
 */
export function loadNetlist(text: string, file: string, options: LoadOptions = {}): LoadResult {
  const bag = new DiagnosticBag();
  const sources = new Map<string, string>([[file, text]]);
  const read = options.readFile ?? readInputText;
  const ast = expandIncludes(parseNetlistItems(text, file, bag), [file], bag, sources, read);
  const dataCache = new Map<string, NetworkData>();
  const readNetwork = (path: string): NetworkData => {
    const cached = dataCache.get(path);
    if (cached) return cached;
    const body = read(path);
    sources.set(path, body);
    let net: NetworkData;
    try {
      const onWarning = (message: string, line: number, column: number) => bag.warning('data-file', message, { file: path, line, column, length: 1 });
      net = extname(path).toLowerCase() === '.json' ? parseJson(body) : parseTouchstone(body, { fileName: path, onWarning });
    } catch (e) {
      if (e instanceof TouchstoneError) throw new DataFileError(e.message, { file: path, line: e.line, column: e.column, length: 1 });
      if (e instanceof JsonNetworkError) throw new DataFileError(e.message, { file: path, line: e.line, column: e.column, length: 1 });
      throw new DataFileError((e as Error).message);
    }
    // a mixed-mode file's rows are modes; the element's terminals are the single-ended ports
    if (isMixedMode(net)) net = singleEnded(net);
    dataCache.set(path, net);
    return net;
  };

  const overrides: Override[] = [];
  const setLines = options.set ?? [];
  if (setLines.length > 0) {
    sources.set(SET_FILE, setLines.join('\n'));
    const good = new Set<number>();
    const named = new Map<string, number>();
    setLines.forEach((line, i) => {
      const m = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*\S/.exec(line);
      const span = { file: SET_FILE, line: i + 1, column: 1, length: Math.max(1, line.length) };
      if (!m || /[\r\n]/.test(line)) {
        bag.error('bad-override', `\`--set ${line.length > 60 ? `${line.slice(0, 60)}…` : line}\`: write \`name=value\``, span, 'e.g. `--set fc=915MHz`');
        return;
      }
      const first = named.get(m[1]!);
      if (first !== undefined) {
        bag.error('duplicate-override', `\`${m[1]}\` is given twice with --set (first as --set number ${first + 1})`, { ...span, column: line.indexOf(m[1]!) + 1, length: m[1]!.length }, 'give each parameter once');
        return;
      }
      named.set(m[1]!, i);
      good.add(i);
    });
    // Parsed as `let` lines of their own text, then moved back over the `let ` prefix.
    const text = setLines.map((l, i) => (good.has(i) ? `let ${l}` : '')).join('\n');
    const parsed = parseNetlist(text, SET_FILE, relay(bag, 4));
    for (const st of parsed.statements) {
      shiftSpans(st, 4);
      const arg = st.args[0];
      if (st.args.length === 1 && arg && arg.kind === 'key' && arg.values.length === 1 && !arg.at && !arg.range) {
        overrides.push({ name: arg.key, expr: arg.values[0]!, span: arg.keySpan });
      } else {
        bag.error('bad-override', '`--set` takes one `name=value`', st.span, 'give each override its own `--set`');
      }
    }
  }

  let sweep: Statement[] | undefined;
  if (options.sweep !== undefined) {
    const segments = options.sweep.split(';').map((s) => s.trim()).filter(Boolean);
    sources.set(SWEEP_FILE, segments.join('\n'));
    const parsed = parseNetlist(segments.map((s) => `sweep ${s}`).join('\n'), SWEEP_FILE, relay(bag, 6));
    sweep = parsed.statements.map((st) => shiftSpans(st, 6));
    if (segments.length === 0) bag.error('bad-sweep', '`--sweep` is empty', { file: SWEEP_FILE, line: 1, column: 1, length: 1 });
  }

  const circuit = elaborate(ast, bag, { overrides, sweep, readNetwork, consume: true });
  if (options.strict) bag.warningsAsErrors();
  if (bag.hasErrors) throw new InputError(bag.items, sources);
  return { circuit, warnings: bag.items.filter((d) => d.severity === 'warning'), sources };
}

/**
 * Replaces every `include "file"` statement by the statements of that file (paths relative to
 * the including file), recursively. A file that includes itself, directly or through others, is
 * an error showing the chain.
 */
function expandIncludes(ast: NetlistItems, chain: string[], bag: DiagnosticBag, sources: Map<string, string>, read: (path: string) => string): NetlistItems {
  const statements: StatementItem[] = [];
  const failedKeywords = [...ast.failedKeywords];
  let inBlock = false;
  for (const item of ast.items) {
    if (item.keyword === 'block') inBlock = true;
    if (item.keyword === 'end') inBlock = false;
    if (item.keyword !== 'include') {
      statements.push(item);
      continue;
    }
    const st = statementOf(item);
    if (inBlock) {
      bag.error('not-in-block', '`include` cannot be used inside a block', st.keywordSpan, 'include the file at the top level; its blocks can then be used inside others');
      continue;
    }
    const arg = st.args[0];
    if (st.label || st.args.length !== 1 || !arg || arg.kind !== 'text') {
      bag.error('bad-include', '`include` takes one quoted file name', st.keywordSpan, 'e.g. `include "parts/lowpass-section.sbx"`');
      continue;
    }
    if (chain.length > MAX_INCLUDE_DEPTH) {
      bag.error('too-deep', `includes nest more than ${MAX_INCLUDE_DEPTH} files deep here (the limit of nested includes)`, arg.span, `the chain starts ${chain.slice(0, 3).join(' → ')} → …`);
      continue;
    }
    const path = isAbsolute(arg.value) ? arg.value : join(dirname(ast.file), arg.value);
    const key = resolve(path);
    const seen = chain.map((c) => resolve(c));
    if (seen.includes(key)) {
      const cycle = [...chain.slice(seen.indexOf(key)), path].join(' → ');
      bag.error('include-cycle', `this file is already being included: ${cycle}`, arg.span, 'a file cannot include itself, directly or through others');
      continue;
    }
    let text: string;
    try {
      text = read(path);
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      bag.error('bad-include', `cannot read ${JSON.stringify(arg.value)}: ${code === 'ENOENT' ? 'no such file' : (e as Error).message}`, arg.span, code === 'ENOENT' && !isAbsolute(arg.value) ? `the path is relative to ${dirname(ast.file) || '.'}` : undefined);
      continue;
    }
    sources.set(path, text);
    const inner = expandIncludes(parseNetlistItems(text, path, bag), [...chain, path], bag, sources, read);
    for (const it of inner.items) statements.push(it);
    failedKeywords.push(...inner.failedKeywords);
  }
  return { file: ast.file, items: statements, failedKeywords };
}

/**
 * Evaluates a quantity written as in a netlist (`1.6 mm`, `2.45 GHz`, `50`) to a number in SI
 * units of `unit` (null: a plain number). Throws {@link InputError} with the problem located in
 * `what` (e.g. `--h`).
 */
export function evaluateQuantity(text: string, unit: string | null, what: string): number {
  const bag = new DiagnosticBag();
  const ast = parseNetlist(`let x = ${text}`, what, relay(bag, 8));
  const arg = ast.statements[0]?.args[0];
  const sources = new Map([[what, text]]);
  if (!bag.hasErrors && arg && arg.kind === 'key' && arg.values.length === 1 && !arg.at) {
    shiftSpans(arg, 8);
    const q = evaluate(arg.values[0]!, { lookup: () => undefined, names: () => [] }, bag);
    if (q !== undefined) {
      const r = toSI(q, unit);
      if ('value' in r && Number.isFinite(r.value)) return r.value;
      if ('value' in r) bag.error('bad-number', `${what} is not a finite number`, arg.values[0]!.span);
      else
      bag.error('wrong-unit', `${what} must be ${unit === null ? 'a plain number' : `in ${unit}`}, but ${r.error}`, arg.values[0]!.span);
    }
  } else if (!bag.hasErrors) bag.error('bad-value', `${what} takes one value`, { file: what, line: 1, column: 1, length: Math.max(1, text.length) });
  throw new InputError(bag.items, sources);
}

/**
 * Reads and loads a netlist file. A file that cannot be read (missing, a folder, not a regular
 * file, over MAX_FILE_BYTES) throws InputFileError (io/source-file.ts), naming the path.
 */
export function loadNetlistFile(path: string, options: LoadOptions = {}): LoadResult {
  return loadNetlist(readInputText(path), path, options);
}

/** A bag that moves the spans of what it receives `columns` to the left before passing them on. */
function relay(bag: DiagnosticBag, columns: number): DiagnosticBag {
  const sub = new DiagnosticBag();
  sub.add = (d: Diagnostic) => bag.add(d.span ? { ...d, span: moveSpan({ ...d.span }, columns) } : d);
  sub.error = (code, message, span, help) => sub.add({ severity: 'error', code, message, span, help });
  sub.warning = (code, message, span, help) => sub.add({ severity: 'warning', code, message, span, help });
  Object.defineProperty(sub, 'hasErrors', { get: () => bag.hasErrors });
  return sub;
}

function moveSpan<T extends { column: number; length: number }>(span: T, columns: number): T {
  const col = span.column - columns;
  if (col < 1) {
    span.length = Math.max(1, span.length + col - 1);
    span.column = 1;
  } else span.column = col;
  return span;
}

/** Moves every span inside an AST node `columns` to the left (over a prefix added to parse it). */
function shiftSpans<T extends object>(node: T, columns: number): T {
  const seen = new Set<object>();
  const walk = (o: unknown): void => {
    if (!o || typeof o !== 'object' || seen.has(o)) return;
    seen.add(o);
    const rec = o as Record<string, unknown>;
    if (typeof rec.column === 'number' && typeof rec.line === 'number' && typeof rec.length === 'number') {
      moveSpan(rec as unknown as { column: number; length: number }, columns);
      return;
    }
    for (const v of Object.values(rec)) walk(v);
  };
  walk(node);
  return node;
}
