import { readFileSync } from 'node:fs';
import type { NetlistAst, Statement } from './ast/ast.js';
import { parseNetlist } from './ast/visitor.js';
import { DiagnosticBag, InputError, type Diagnostic } from './diagnostics/diagnostic.js';
import type { Circuit } from './elaborate/circuit.js';
import { elaborate, type Override } from './elaborate/elaborate.js';

/** Options for turning a netlist into a circuit. */
export interface LoadOptions {
  /** Parameter overrides, each `name=expression` (e.g. `fc=915 MHz`). */
  set?: string[];
  /** Sweep replacing the netlist's own: one or more segments separated by `;`, each written as after `sweep` (e.g. `linear start=1 MHz stop=1 GHz points=101`). */
  sweep?: string;
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
  const ast = parseNetlist(text, file, bag);

  const overrides: Override[] = [];
  const setText = (options.set ?? []).join('\n');
  if (setText) {
    sources.set(SET_FILE, setText);
    for (const [i, line] of (options.set ?? []).entries()) {
      const m = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=(.*)$/.exec(line);
      if (!m || !m[2]!.trim()) {
        bag.error('bad-override', `\`--set ${line}\`: write \`name=value\``, { file: SET_FILE, line: i + 1, column: 1, length: Math.max(1, line.length) }, 'e.g. `--set fc=915MHz`');
        continue;
      }
      const sub = new DiagnosticBag();
      const parsed = parseNetlist(`${' '.repeat(0)}let ${line}`, SET_FILE, sub);
      for (const d of sub.items) bag.add(shift(d, i + 1, -4));
      const st = parsed.statements[0];
      const arg = st?.args[0];
      if (arg && arg.kind === 'key' && arg.values.length === 1) {
        overrides.push({ name: arg.key, expr: arg.values[0]!, span: { file: SET_FILE, line: i + 1, column: 1, length: arg.key.length } });
      }
    }
  }

  let sweep: Statement[] | undefined;
  if (options.sweep !== undefined) {
    const segments = options.sweep.split(';').map((s) => s.trim()).filter(Boolean);
    sources.set(SWEEP_FILE, segments.join('\n'));
    const sub = new DiagnosticBag();
    const parsed = parseNetlist(segments.map((s) => `sweep ${s}`).join('\n'), SWEEP_FILE, sub);
    for (const d of sub.items) bag.add(shift(d, undefined, -6));
    sweep = parsed.statements.map((st) => shiftStatement(st));
    if (segments.length === 0) bag.error('bad-sweep', '`--sweep` is empty', { file: SWEEP_FILE, line: 1, column: 1, length: 1 });
  }

  const circuit = elaborate(ast, bag, { overrides, sweep });
  if (bag.hasErrors) throw new InputError(bag.items, sources);
  return { circuit, warnings: bag.items.filter((d) => d.severity === 'warning'), sources };
}

/** Reads and loads a netlist file. */
export function loadNetlistFile(path: string, options: LoadOptions = {}): LoadResult {
  return loadNetlist(readFileSync(path, 'utf8'), path, options);
}

function shift(d: Diagnostic, line: number | undefined, columns: number): Diagnostic {
  if (!d.span) return d;
  return { ...d, span: { ...d.span, line: line ?? d.span.line, column: Math.max(1, d.span.column + columns) } };
}

/** Moves the spans of a `--sweep` statement back over the `sweep ` prefix that was added to parse it. */
function shiftStatement(st: Statement): Statement {
  const fix = <T extends { span: { column: number } }>(x: T): T => {
    const seen = new WeakSet<object>();
    const walk = (o: unknown): void => {
      if (!o || typeof o !== 'object' || seen.has(o)) return;
      seen.add(o);
      const rec = o as Record<string, unknown>;
      if (typeof rec.column === 'number' && typeof rec.line === 'number') rec.column = Math.max(1, (rec.column as number) - 6);
      for (const v of Object.values(rec)) walk(v);
    };
    walk(x);
    return x;
  };
  return fix(st);
}
