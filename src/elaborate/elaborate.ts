import { joinSpans, type Arg, type Expr, type KeyArg, type NetlistAst, type NetlistItems, type RangeClause, type Statement, type StatementItem } from '../ast/ast.js';
import { statementOf } from '../ast/fast.js';
import { DiagnosticBag, type Diagnostic, type SourceSpan } from '../diagnostics/diagnostic.js';
import { closest, didYouMean } from '../diagnostics/suggest.js';
import { ELEMENTS, joinedNodes, outsideRange } from '../elements/registry.js';
import { GROUND, GROUND_NAME, type ElementInstance, type ElementType, type PropertySpec, type TerminalSpec } from '../elements/types.js';
import type { NetworkData } from '../network/types.js';
import type { Circuit, ParameterValue, Port, Unfollowed, ValueBinding, Variable } from './circuit.js';
import { SERIES_NAMES, isSeriesName, seriesValuesIn } from '../design/series.js';
import { describeQuantity, describeUnit, evaluate, literalToSI, math, toSICached, type EvalScope, type Quantity } from './evaluate.js';
import { dirname, isAbsolute, join } from 'node:path';
import { formatFrequency } from '../format/frequency.js';
import { floatingGroups } from './islands.js';
import { elaborateSpec } from './spec.js';
import { buildSweep } from './sweep.js';
import type { SpecDefinition } from '../check/types.js';
import { MAX_BLOCK_DEPTH, MAX_EXPANDED_ELEMENTS, MAX_PORTS, MAX_REFERENCE_OHMS, MIN_REFERENCE_OHMS } from '../limits.js';
import { compileExpr, NotCompilable, variableNode, type Compiled } from '../params/compile.js';

/** A parameter override from outside the netlist (`--set name=value`). */
export interface Override {
  name: string;
  expr: Expr;
  span: SourceSpan;
}

/** A network-data file could not be read: where and why. */
export class DataFileError extends Error {
  constructor(
    message: string,
    /** A place in the data file itself, when the reader knows one. */
    readonly place?: SourceSpan,
  ) {
    super(message);
    this.name = 'DataFileError';
  }
}

export interface ElaborateOptions {
  /**
   * Reads network data for data elements (`path` already resolved against the netlist's folder).
   * Throws {@link DataFileError} (or any error) when the file cannot be read.
   */
  readNetwork?: (path: string) => NetworkData;
  /** Replace parameter definitions by these expressions. */
  overrides?: Override[];
  /** Replace the netlist's sweep statements by these. */
  sweep?: Statement[];
  /**
   * The AST is the elaborator's to use up: its statement list is emptied and each top-level
   * statement let go once it is elaborated, so that a large netlist's AST can be collected while
   * its circuit is built (loadNetlist does this with the AST it parsed itself).
   */
  consume?: boolean;
}

/** Statement keywords that are not elements. */
export const STATEMENT_KEYWORDS = ['title', 'let', 'port', 'sweep', 'spec', 'block', 'end', 'include'] as const;

/** Statements that only make sense at the top level of a netlist, not inside a block. */
const TOP_LEVEL_ONLY = new Set(['title', 'port', 'sweep', 'spec', 'include', 'block']);

/** A parameter of a scope: its value (null when its definition failed) and where it was defined. */
interface ParamEntry {
  value: Quantity | null;
  span: SourceSpan;
  /** Identity for "never used" warnings, shared by every instance of a block. */
  key: string;
  /** The value as a function of the design variables, when it depends on any. */
  node?: Compiled;
}

/** Parameters visible at a place: a block instance's own, then the netlist's. */
class ParamScope {
  readonly entries = new Map<string, ParamEntry>();
  constructor(readonly parent?: ParamScope) {}
  find(name: string): ParamEntry | undefined {
    return this.entries.get(name) ?? this.parent?.find(name);
  }
  names(): string[] {
    return [...new Set([...this.entries.keys(), ...(this.parent?.names() ?? [])])];
  }
}

/** Where statements are being elaborated: at the top level, or inside a block instance. */
interface Context {
  scope: ParamScope;
  /** Prefix of the names of this instance's nodes and elements (`t1.` inside instance t1). */
  prefix: string;
  /** A block's terminal names and the outer nodes they are connected to; null at the top level. */
  terminals: Map<string, number> | null;
  /** Blocks being expanded, outermost first (for recursion errors). */
  chain: string[];
  /** `let` names of this statement list, for "defined later" messages. */
  later: Map<string, SourceSpan>;
}

/** A block definition: named terminals, parameters with defaults, and its body. */
interface BlockDefinition {
  name: string;
  header: Statement;
  terminals: string[];
  params: Map<string, { expr: Expr; span: SourceSpan }>;
  body: Statement[];
  used: boolean;
  /** Elements one instance expands to, counting nested instances (Infinity when it cannot be expanded). */
  size: number;
  /** Statements an instance runs, nested instances counted (elements, instances and the rest alike). */
  statements: number;
  /** An instance of it gave errors: further instances are not expanded. */
  failed?: boolean;
  /** An instance of it has been expanded (with errors elsewhere, it is not expanded again). */
  expanded?: boolean;
  /** Levels of block instances one instance opens, itself included. */
  depth: number;
  /** On a cycle of blocks using each other, or using such a block (already reported). */
  broken: boolean;
}

function spanKey(s: SourceSpan): string {
  return `${s.file}:${s.line}:${s.column}`;
}

/** The `let` names of a statement list and where they are defined (pending `let` lines are read and kept). */
function laterOf(statements: StatementItem[]): Map<string, SourceSpan> {
  const m = new Map<string, SourceSpan>();
  for (let i = 0; i < statements.length; i++) {
    if (statements[i]!.keyword !== 'let') continue;
    const st = (statements[i] = statementOf(statements[i]!));
    for (const a of st.args) if (a.kind === 'key' && !m.has(a.key)) m.set(a.key, a.keySpan);
  }
  return m;
}

const DEFAULT_REFERENCE = 50;

/** Shared by the elements with no `at` frequencies or no text properties (most of them). */
const NONE_AT: Record<string, number> = Object.freeze({}) as Record<string, number>;
const NONE_TEXT: Record<string, string> = Object.freeze({}) as Record<string, string>;

/** What defineElement needs of an element type, worked out once per type. */
interface TypeFacts {
  what: string;
  textKeys: readonly string[];
  /** Every key the type takes (for types whose terminals do not depend on their data). */
  allowed: string[];
}
const typeFactsCache = new Map<ElementType, TypeFacts>();
function typeFacts(type: ElementType): TypeFacts {
  let f = typeFactsCache.get(type);
  if (!f) {
    const textKeys = (type.textProperties ?? []).map((p) => p.key);
    f = { what: `\`${type.keyword}\``, textKeys, allowed: [...type.terminals.map((t) => t.key), ...type.properties.map((p) => p.key), ...textKeys] };
    typeFactsCache.set(type, f);
  }
  return f;
}

/**
 * Elaborates a parsed netlist: evaluates parameters (units carried through), checks every
 * statement against its schema, resolves nodes and builds the sweep. Errors and warnings go into
 * `bag`; the returned circuit is only meaningful when the bag has no errors.
 */
export function elaborate(ast: NetlistAst | NetlistItems, bag: DiagnosticBag, options: ElaborateOptions = {}): Circuit {
  const rootBag = bag;
  const outerBagHasErrors = () => rootBag.hasErrors;
  const overrides = new Map<string, Override>();
  for (const o of options.overrides ?? []) overrides.set(o.name, o);
  /** Parameters referenced before their definition (already an error there; not "unused" too). */
  const usedEarly = new Set<string>();
  /** Keys (see ParamEntry) of the parameters referenced somewhere. */
  const usedKeys = new Set<string>();
  /** Every parameter definition, for "never used" warnings (once per definition, not per instance). */
  const definitions = new Map<string, { name: string; span: SourceSpan; failed: boolean; what: string }>();

  const given: StatementItem[] = 'items' in ast ? ast.items : ast.statements;
  const { top: topStatements, blocks } = splitBlocks(given, bag);
  if (options.consume) given.length = 0;
  let sawPort = false;
  const globals = new ParamScope();
  const topContext: Context = { scope: globals, prefix: '', terminals: null, chain: [], later: laterOf(topStatements) };

  /** Element numbers that follow the variables (their elements' indices filled in at the end). */
  const pendingBindings: { el: ElementInstance; target: 'prop' | 'at'; key: string; value: Compiled; span: SourceSpan }[] = [];
  /** Numbers outside the elements that depend on a variable. */
  const unfollowed: Unfollowed[] = [];
  /**
   * The expression as a function of the design variables, when it depends on any (only then is
   * anything compiled: a netlist without variables pays nothing). Where plain numbers cannot
   * follow it, it is recorded as not followed.
   */
  const follow = (e: Expr, ctx: Context, what: string): Compiled | undefined => {
    if (variables.length === 0) return undefined;
    try {
      return compileExpr(e, {
        node: (n) => ctx.scope.find(n)?.node,
        constant: (x) => evaluate(x, evalScope(ctx), new DiagnosticBag()),
      });
    } catch (err) {
      if (!(err instanceof NotCompilable)) throw err;
      unfollowed.push({ what, span: e.span, reason: err.message });
      return undefined;
    }
  };
  const evalScope = (ctx: Context): EvalScope => ({
    lookup: (n) => ctx.scope.find(n)?.value,
    names: () => ctx.scope.names(),
    used: (n) => {
      const p = ctx.scope.find(n);
      if (p) usedKeys.add(p.key);
    },
    explainMissing: (n) => {
      const later = ctx.later.get(n);
      if (!later || ctx.scope.find(n)) return undefined;
      usedEarly.add(spanKey(later));
      return `\`${n}\` is defined later, at line ${later.line}; a parameter can only use those defined before it`;
    },
  });

  const nodeIndex = new Map<string, number>();
  const nodeNames: string[] = [];
  const nodeUses: { count: number; first: SourceSpan; by: string; elementUses: number }[] = [];
  const useNode = (name: string, span: SourceSpan, by: string, isPort: boolean): number => {
    if (name === GROUND_NAME) return GROUND;
    let i = nodeIndex.get(name);
    if (i === undefined) {
      i = nodeNames.length;
      nodeIndex.set(name, i);
      nodeNames.push(name);
      nodeUses.push({ count: 0, first: span, by, elementUses: 0 });
    }
    countUse(i, by, isPort);
    return i;
  };
  function countUse(i: number, by: string, isPort: boolean) {
    const u = nodeUses[i]!;
    u.count++;
    if (!isPort) u.elementUses++;
  }

  let title: string | undefined;
  const elements: ElementInstance[] = [];
  const elementNames = new Map<string, SourceSpan>();
  const ports = new Map<number, Port>();
  const sweepStatements: Statement[] = [];
  const specStatements: Statement[] = [];
  const knownKeywords = () => [...STATEMENT_KEYWORDS.filter((k) => k !== 'end'), ...ELEMENTS.keys(), ...blocks.keys()];
  /** Keys that a misspelt argument of the statement being read was taken to mean. */
  let suggestedKeys = new Set<string>();

  /** Elements of the flattened netlist so far (instances counted whole when they are opened). */
  let expanded = 0;
  let statementsRun = 0;
  /** The design variables, in netlist order. */
  const variables: Variable[] = [];
  /** A misplaced `vary` (in a block body, on another statement), reported once per line, not once per instance. */
  const rangeReported = new Set<string>();
  const once = (span: SourceSpan) => !rangeReported.has(spanKey(span)) && !!rangeReported.add(spanKey(span));
  run(topStatements, topContext);

  function run(statements: (StatementItem | undefined)[], ctx: Context) {
    const release = options.consume && ctx === topContext;
    for (let i = 0; i < statements.length; i++) {
      const st = statementOf(statements[i]!);
      // a consumed top-level statement is let go once read (what it made keeps only its spans)
      if (release) statements[i] = undefined;
      if (ctx.terminals && TOP_LEVEL_ONLY.has(st.keyword)) {
        bag.error('not-in-block', `\`${st.keyword}\` cannot be used inside a block`, st.keywordSpan, st.keyword === 'block' ? 'define blocks at the top level and use them inside others' : 'put it at the top level of the netlist');
        continue;
      }
      if (st.keyword !== 'let') {
        for (const a of st.args) {
          if (a.kind === 'key' && a.range && once(a.range.keywordSpan)) bag.error('vary-not-let', '`vary` belongs on a `let` line: only a parameter can be a design variable', a.range.keywordSpan, 'write `let name = value vary LOW to HIGH` and use the name here');
        }
      }
      switch (st.keyword) {
        case 'title': {
          const text = st.args.find((a) => a.kind === 'text');
          if (st.label || !text || st.args.length !== 1) {
            bag.error('bad-title', 'a title is one quoted string', st.keywordSpan, 'write `title "433 MHz harmonic filter"`');
          } else if (title !== undefined) {
            bag.error('duplicate-title', 'the netlist has a title already', st.keywordSpan);
          } else title = (text as { value: string }).value;
          break;
        }
        case 'let':
          defineParameters(st, ctx);
          break;
        case 'port':
          if (ctx === topContext) sawPort = true;
          definePort(st, ctx);
          break;
        case 'sweep':
          sweepStatements.push(st);
          break;
        case 'spec':
          specStatements.push(st);
          break;
        case 'include':
          bag.error('bad-include', '`include` is resolved when the file is read; this one was not', st.keywordSpan, 'load netlists with loadNetlist or loadNetlistFile');
          break;
        default: {
          const type = ELEMENTS.get(st.keyword);
          if (type) {
            if (ctx === topContext && ++expanded === MAX_EXPANDED_ELEMENTS + 1) {
              bag.error('too-many-elements', `the netlist has more than ${MAX_EXPANDED_ELEMENTS} elements (the limit of elements after blocks are expanded)`, st.keywordSpan);
            }
            if (expanded > MAX_EXPANDED_ELEMENTS) break;
            try {
              defineElement(st, type, ctx);
            } catch (e) {
              if (!(e instanceof ReportedError)) throw e;
            }
            break;
          }
          const block = blocks.get(st.keyword);
          if (block) {
            instantiate(st, block, ctx);
            break;
          }
          bag.error('unknown-keyword', `unknown statement \`${st.keyword}\``, st.keywordSpan, didYouMean(st.keyword, knownKeywords()) ?? `a statement starts with one of: ${knownKeywords().join(', ')}`);
        }
      }
    }
  }

  /** The full name of an element or instance (with the instance path), or undefined if taken (reported). */
  function claimName(label: NonNullable<Statement['label']>, ctx: Context): string | undefined {
    const name = ctx.prefix + label.text;
    const prev = elementNames.get(name);
    if (prev) {
      bag.error('duplicate-name', `an element named \`${name}\` exists already (line ${prev.line})`, label.span);
      return undefined;
    }
    elementNames.set(name, label.span);
    return name;
  }

  function instantiate(st: Statement, block: BlockDefinition, ctx: Context) {
    const what = `block \`${block.name}\``;
    block.used = true;
    if (!st.label || st.label.isNumber) {
      bag.error('missing-name', `an instance of ${what} needs a name after the block name`, st.label?.span ?? st.keywordSpan, `e.g. \`${block.name} u1 ${block.terminals.map((t) => `${t}=<node>`).join(' ')}\``);
      return;
    }
    if (block.broken) return; // a cycle, reported at the block
    // An instance whose body gave errors once gives them again (reported once anyway): the run
    // has failed, so the block's other instances are not expanded (a doubling chain of blocks
    // with an error at its end would otherwise repeat it millions of times).
    if (block.failed) return;
    // Once the netlist has an error it will not be solved: each block is expanded once more
    // only for the diagnostics of its body, not once per instance.
    if (block.expanded && outerBagHasErrors()) return;
    if (ctx === topContext) {
      if (block.depth > MAX_BLOCK_DEPTH) {
        bag.error('too-deep', `an instance of ${what} opens ${block.depth} levels of nested block instances (at most ${MAX_BLOCK_DEPTH})`, st.keywordSpan, 'flatten some of the blocks');
        return;
      }
      if (expanded + block.size > MAX_EXPANDED_ELEMENTS) {
        const size = block.size < 1e15 ? `${block.size}` : 'more than 10^15';
        bag.error('too-many-elements', `an instance of ${what} expands to ${size} elements; with the others that is more than ${MAX_EXPANDED_ELEMENTS} (the limit of elements after blocks are expanded)`, st.keywordSpan, 'blocks that use other blocks several times multiply their elements');
        expanded = Infinity;
        return;
      }
      if (statementsRun + block.statements > MAX_EXPANDED_ELEMENTS) {
        // elements within the limit, but instances of blocks that bring few or no elements (e.g. a
        // chain of blocks ending in an unknown one) would still run that many statements
        const size = block.statements < 1e15 ? `${block.statements}` : 'more than 10^15';
        bag.error('too-many-elements', `an instance of ${what} expands to ${size} statements; with the others that is more than ${MAX_EXPANDED_ELEMENTS} (the limit of elements and statements after blocks are expanded)`, st.keywordSpan, 'blocks that use other blocks several times multiply their statements');
        expanded = Infinity;
        return;
      }
      expanded += block.size;
      statementsRun += block.statements;
    }
    if (ctx.chain.includes(block.name)) {
      const chain = [...ctx.chain.slice(ctx.chain.indexOf(block.name)), block.name].join(' → ');
      bag.error('recursive-block', `${what} contains itself: ${chain}`, st.keywordSpan, 'a block cannot use itself, directly or through other blocks');
      return;
    }
    const name = claimName(st.label, ctx);
    if (name === undefined) return;
    const args = keyArgs(st, [...block.terminals, ...block.params.keys()], what);
    const terminals = new Map<string, number>();
    let ok = true;
    for (const t of block.terminals) {
      const a = args.get(t);
      if (!a) {
        if (!suggestedKeys.has(t)) bag.error('missing-terminal', `instance \`${st.label.text}\` of ${what} needs terminal \`${t}\``, st.label.span, `add \`${t}=<node>\``);
        ok = false;
        continue;
      }
      const n = nodeArg(a, name, false, ctx);
      if (n === undefined) ok = false;
      else terminals.set(t, n);
    }
    const scope = new ParamScope(globals);
    const outer = evalScope(ctx);
    const defaults = evalScope(topContext);
    for (const [p, def] of block.params) {
      const a = args.get(p);
      if (a && (a.values.length !== 1 || a.at)) {
        bag.error('bad-value', `\`${p}\` takes one value`, a.span);
        ok = false;
        continue;
      }
      const value = finiteOrReport(a ? evaluate(a.values[0]!, outer, bag) : evaluate(def.expr, defaults, bag), a ? a.values[0]!.span : def.expr.span, bag, p);
      if (value === undefined) ok = false;
      const key = spanKey(def.span);
      const node = value !== undefined ? follow(a ? a.values[0]! : def.expr, a ? ctx : topContext, `parameter \`${p}\` of instance \`${name}\``) : undefined;
      scope.entries.set(p, { value: value ?? null, span: def.span, key, ...(node ? { node } : {}) });
      if (!definitions.has(key)) definitions.set(key, { name: p, span: def.span, failed: value === undefined, what: `parameter of block \`${block.name}\`` });
    }
    if (!ok) return;
    // Findings inside the body say which instance they came from (the first one, when several
    // instances give the same finding, which is then reported once).
    const outerBag = bag;
    const bodyFile = block.header.span.file;
    let first = Infinity;
    let last = -Infinity;
    for (const b of block.body) {
      first = Math.min(first, b.span.line);
      last = Math.max(last, b.span.line);
    }
    const note = `in instance \`${name}\` of block \`${block.name}\` (line ${st.span.line})`;
    let failed = false;
    bag = Object.create(outerBag, {
      add: {
        value: (d: Diagnostic) => {
          if (d.severity === 'error') failed = true;
          const inBody = d.span && d.span.file === bodyFile && d.span.line >= first && d.span.line <= last;
          outerBag.add(inBody && !d.help?.includes('in instance') ? { ...d, help: d.help ? `${d.help}; ${note}` : note } : d);
        },
      },
    }) as DiagnosticBag;
    try {
      run(block.body, { scope, prefix: `${name}.`, terminals, chain: [...ctx.chain, block.name], later: laterOf(block.body) });
    } finally {
      bag = outerBag;
    }
    if (failed) block.failed = true;
    block.expanded = true;
  }

  /** Reads a data file for the statement `st`; a failure becomes an error at its `file=` (and in the file). */
  function readNetworkFor(st: Statement, path: string): NetworkData {
    const read = options.readNetwork;
    if (!read) throw new DataFileError('network-data files cannot be read here (no reader was given)');
    const full = isAbsolute(path) ? path : join(dirname(st.span.file), path);
    try {
      return read(full);
    } catch (e) {
      const fileArg = st.args.find((a) => a.kind === 'key' && a.key === 'file');
      const at = fileArg && fileArg.kind === 'key' ? (fileArg.text?.span ?? fileArg.span) : st.span;
      if (e instanceof DataFileError && e.place) {
        bag.error('bad-data-file', e.message, e.place);
        bag.error('bad-data-file', `the network-data file ${JSON.stringify(path)} is malformed (see above)`, at);
      } else {
        const code = (e as NodeJS.ErrnoException).code;
        bag.error('bad-data-file', `cannot read ${JSON.stringify(path)}: ${code === 'ENOENT' ? 'no such file' : (e as Error).message}`, at, code === 'ENOENT' && !isAbsolute(path) ? `the path is relative to ${dirname(st.span.file) || '.'}` : undefined);
      }
      throw new ReportedError();
    }
  }

  function defineParameters(st: Statement, ctx: Context) {
    if (st.label) {
      bag.error('bad-let', 'write a parameter as `let name = value`', st.label.span);
      return;
    }
    if (st.args.length === 0) bag.error('bad-let', '`let` needs `name = value`', st.keywordSpan);
    for (const a of st.args) {
      if (a.kind !== 'key') {
        bag.error('bad-let', 'write a parameter as `let name = value`', a.span);
        continue;
      }
      if (a.at) {
        bag.error('bad-let', '`at` does not belong in a parameter definition', a.at.span);
        continue;
      }
      if (a.values.length !== 1) {
        bag.error('bad-let', 'a parameter takes one value', a.span);
        continue;
      }
      const prev = ctx.scope.entries.get(a.key);
      if (prev) {
        bag.error('duplicate-parameter', `parameter \`${a.key}\` is defined twice (first at line ${prev.span.line})`, a.keySpan);
        continue;
      }
      const o = ctx.terminals ? undefined : overrides.get(a.key);
      let value = finiteOrReport(evaluate(o ? o.expr : a.values[0]!, evalScope(ctx), bag), o ? o.expr.span : a.values[0]!.span, bag, a.key);
      if (o && value !== undefined) {
        // the override must be the same kind of quantity as the netlist's own value
        const own = evaluate(a.values[0]!, evalScope(ctx), new DiagnosticBag());
        if (own !== undefined && !sameDimension(own, value)) {
          bag.error('wrong-unit', `\`--set ${a.key}\`: the netlist's \`${a.key}\` is ${describeQuantity(own)}, but this is ${describeQuantity(value)}`, o.expr.span, `line ${a.keySpan.line} of ${a.keySpan.file} defines it`);
          value = undefined;
        }
      }
      const before = variables.length;
      if (a.range) {
        if (ctx.terminals) {
          if (once(a.range.keywordSpan)) {
            bag.error('vary-in-block', 'a design variable (`vary`) cannot be declared inside a block', a.range.keywordSpan, 'declare it at the top level and pass it to the block as a parameter');
          }
        } else if (value !== undefined) {
          defineVariable(a, a.range, ctx, value, o);
        }
      }
      const key = spanKey(a.keySpan);
      let node: Compiled | undefined;
      if (variables.length > before) node = variableNode(before);
      else if (value !== undefined) node = follow(o ? o.expr : a.values[0]!, ctx, `parameter \`${a.key}\``);
      ctx.scope.entries.set(a.key, { value: value ?? null, span: a.keySpan, key, ...(node ? { node } : {}) });
      if (!definitions.has(key)) definitions.set(key, { name: a.key, span: a.keySpan, failed: value === undefined, what: 'parameter' });
      if (o) usedKeys.add(key);
    }
  }

  /**
   * Checks a design variable's range against its value and records it: the bounds (and a step)
   * are evaluated once, with units, like the value.
   */
  function defineVariable(a: KeyArg, r: RangeClause, ctx: Context, value: Quantity, o: Override | undefined) {
    const scope = evalScope(ctx);
    const own = o ? evaluate(a.values[0]!, scope, new DiagnosticBag()) : value;
    const lowerQ = finiteOrReport(evaluate(r.lower, scope, bag), r.lower.span, bag, 'the lower bound');
    const upperQ = finiteOrReport(evaluate(r.upper, scope, bag), r.upper.span, bag, 'the upper bound');
    const stepQ = r.step ? finiteOrReport(evaluate(r.step, scope, bag), r.step.span, bag, 'the step') : undefined;
    if (own === undefined || lowerQ === undefined || upperQ === undefined || (r.step && stepQ === undefined)) return;
    let ok = true;
    const sameAs = (q: Quantity, e: Expr, what: string) => {
      if (sameDimension(own, q)) return;
      bag.error('wrong-unit', `${what} is ${describeQuantity(q)}, but \`${a.key}\` is ${describeQuantity(own)}`, e.span, 'give the range in the unit of the value');
      ok = false;
    };
    sameAs(lowerQ, r.lower, 'the lower bound');
    sameAs(upperQ, r.upper, 'the upper bound');
    if (stepQ !== undefined && r.step) sameAs(stepQ, r.step, 'the step');
    let series: Variable['series'];
    if (r.series) {
      if (isSeriesName(r.series.name)) series = r.series.name;
      else {
        bag.error('unknown-series', `unknown series \`${r.series.name}\``, r.series.span, didYouMean(r.series.name, SERIES_NAMES) ?? `the series are ${SERIES_NAMES.join(', ')}`);
        ok = false;
      }
    }
    if (!ok) return;
    const v = siOf(value);
    const lo = siOf(lowerQ).value;
    const hi = siOf(upperQ).value;
    const rangeText = `${showQuantity(lowerQ)} to ${showQuantity(upperQ)}`;
    const rangeSpan = joinSpans(r.lower.span, r.upper.span);
    if (!(lo < hi)) {
      bag.error('empty-range', `the range ${rangeText} is empty`, rangeSpan, 'write the lower bound first: `vary LOW to HIGH`, with LOW below HIGH');
      return;
    }
    // the netlist's own value lies in its range; an override too
    const inside = (x: number) => x >= lo - 1e-12 * Math.abs(lo) && x <= hi + 1e-12 * Math.abs(hi);
    const ownSI = o ? siOf(own).value : v.value;
    if (!inside(ownSI)) {
      bag.error('out-of-range', `\`${a.key}\` = ${showQuantity(own)} lies outside its range ${rangeText}`, a.values[0]!.span, 'give a value within the range, or widen the range');
      ok = false;
    }
    if (o && !inside(v.value)) {
      bag.error('out-of-range', `\`--set ${a.key}\`: ${showQuantity(value)} lies outside the range of \`${a.key}\`, ${rangeText}`, o.expr.span, `line ${a.keySpan.line} of ${a.keySpan.file} gives the range`);
      ok = false;
    }
    let step: number | undefined;
    if (stepQ !== undefined && r.step) {
      step = siOf(stepQ).value;
      if (!(step > 0)) {
        bag.error('bad-step', `the step must be positive, not ${showQuantity(stepQ)}`, r.step.span);
        ok = false;
      } else if (step > hi - lo) {
        bag.error('bad-step', `the step ${showQuantity(stepQ)} is larger than the range ${rangeText}`, r.step.span, 'give a smaller step or a wider range');
        ok = false;
      }
    }
    if (series && r.series) {
      if (!(lo > 0)) {
        bag.error('series-range', `series ${series} does not fit a range that reaches 0 or below`, rangeSpan, 'a preferred-number series holds positive values only: give a positive lower bound, or use `step`');
        ok = false;
      } else if (seriesValuesIn(lo, hi, series).length === 0) {
        bag.error('series-range', `no value of series ${series} lies in the range ${rangeText}`, rangeSpan, 'widen the range, or use a finer series');
        ok = false;
      }
    }
    if (!ok) return;
    const variable: Variable = { name: a.key, value: v.value, lower: lo, upper: hi, unit: v.unit === '' ? null : v.unit, span: a.keySpan };
    if (series) variable.series = series;
    if (step !== undefined) variable.step = step;
    variables.push(variable);
  }

  function keyArgs(st: Statement, allowed: string[], what: string, textKeys: readonly string[] = []): Map<string, KeyArg> {
    const m = new Map<string, KeyArg>();
    if (suggestedKeys.size > 0) suggestedKeys = new Set<string>();
    for (const a of st.args) {
      if (a.kind !== 'key') {
        bag.error('unexpected-text', `a quoted string is not an argument of ${what}`, a.span);
        continue;
      }
      if (a.text && allowed.includes(a.key) && !textKeys.includes(a.key)) {
        bag.error('unexpected-text', `\`${a.key}\` takes a value, not a quoted string`, a.text.span);
        continue;
      }
      if (!allowed.includes(a.key)) {
        const given = new Set(st.args.map((x) => (x.kind === 'key' ? x.key : '')));
        const near = closest(a.key, allowed.filter((k) => !given.has(k)));
        if (near) suggestedKeys.add(near);
        bag.error('unknown-argument', `${what} has no argument \`${a.key}\``, a.keySpan, near ? `did you mean \`${near}\`?` : `its arguments are: ${allowed.join(', ')}`);
        continue;
      }
      if (m.has(a.key)) {
        bag.error('duplicate-argument', `\`${a.key}\` is given twice`, a.keySpan);
        continue;
      }
      m.set(a.key, a);
    }
    return m;
  }

  function nodeArg(a: KeyArg, by: string, isPort: boolean, ctx: Context): number | undefined {
    const e = a.values[0]!;
    if (a.values.length !== 1 || e.kind !== 'name' || a.at) {
      const help = e.kind === 'number' && e.value === 0 ? `the reference node is called \`${GROUND_NAME}\`` : 'node names are plain names such as `in`, `mid` or `ground`';
      bag.error('bad-node', `\`${a.key}\` takes a node name`, e.span, help);
      return undefined;
    }
    if (/^(gnd|GND|Gnd|Ground|GROUND)$/.test(e.name)) {
      bag.warning('ground-alias', `node \`${e.name}\` is an ordinary node, not the reference`, e.span, `the reference node is called \`${GROUND_NAME}\``);
    }
    const terminal = ctx.terminals?.get(e.name);
    if (terminal !== undefined) {
      if (terminal !== GROUND) countUse(terminal, by, isPort);
      return terminal;
    }
    if (e.name === GROUND_NAME) return GROUND;
    return useNode(ctx.prefix + e.name, e.span, by, isPort);
  }

  /**
   * A number argument in SI units of `unit`. Where it depends on a design variable, its compiled
   * form goes to `onFollow` (an element's number), or, without one, it is recorded as not followed.
   */
  function numberArg(a: KeyArg, unit: string | null, quantity: string, ctx: Context = topContext, onFollow?: (c: Compiled, span: SourceSpan) => void): number | undefined {
    if (a.values.length !== 1) {
      bag.error('bad-value', `\`${a.key}\` takes one value`, a.span);
      return undefined;
    }
    const e = a.values[0]!;
    let r: { value: number } | { error: string } | undefined;
    if (e.kind === 'number' && Number.isFinite(e.value)) r = literalToSI(e.value, e.unit, unit);
    if (!r) {
      const q = evaluate(e, evalScope(ctx), bag, unit);
      if (q === undefined) return undefined;
      r = toSICached(q, unit);
      if (!('error' in r) && variables.length > 0) {
        const c = follow(e, ctx, `\`${a.key}\``);
        if (c && onFollow) onFollow(c, e.span);
        else if (c) unfollowed.push({ what: `\`${a.key}\``, span: e.span, reason: 'only the numbers of elements follow the variables' });
      }
    }
    if ('error' in r) {
      bag.error('wrong-unit', `\`${a.key}\` must be ${unit === null ? 'a plain number' : article(quantity) + ` (${unit})`}, but ${r.error}`, a.values[0]!.span, unitHelp(unit));
      return undefined;
    }
    if (!Number.isFinite(r.value)) {
      bag.error('bad-value', `\`${a.key}\` is not finite`, a.values[0]!.span);
      return undefined;
    }
    return r.value;
  }

  function atArg(a: KeyArg, ctx: Context, onFollow?: (c: Compiled, span: SourceSpan) => void): number | undefined {
    if (!a.at) return undefined;
    const e = a.at;
    // plain literals (`at 433 MHz`) through the cached unit factors, like numberArg
    let r = e.kind === 'number' && Number.isFinite(e.value) ? literalToSI(e.value, e.unit, 'Hz') : undefined;
    if (!r) {
      const q = evaluate(e, evalScope(ctx), bag, 'Hz');
      if (q === undefined) return undefined;
      r = toSICached(q, 'Hz');
      if (!('error' in r) && variables.length > 0) {
        const c = follow(e, ctx, `the frequency after \`at\``);
        if (c) onFollow?.(c, e.span);
      }
    }
    if ('error' in r) {
      bag.error('wrong-unit', `the value after \`at\` must be a frequency (Hz), but ${r.error}`, a.at.span, unitHelp('Hz'));
      return undefined;
    }
    if (!Number.isFinite(r.value) || r.value < 0) {
      bag.error('bad-value', `the frequency after \`at\` must be a finite frequency of 0 Hz or more`, a.at.span);
      return undefined;
    }
    return r.value;
  }

  function defineElement(st: Statement, type: NonNullable<ReturnType<typeof ELEMENTS.get>>, ctx: Context) {
    const { what, textKeys, allowed: fixedAllowed } = typeFacts(type);
    if (!st.label || st.label.isNumber) {
      bag.error('missing-name', `${what} needs a name after the keyword`, st.label?.span ?? st.keywordSpan, `e.g. \`${type.example}\``);
      return;
    }
    const name = claimName(st.label, ctx);
    if (name === undefined) return;
    // Terminals may depend on the text properties (a data file's ports): allow any key that looks
    // like one until they are known.
    let terminals: readonly TerminalSpec[] = type.terminals;
    const el: ElementInstance = { type: type.keyword, name, nodes: [], nodeNames: [], props: {}, at: NONE_AT, span: st.span, text: NONE_TEXT };
    let ok = true;
    if (type.resolve) {
      // the text properties alone, read quietly: the full check of every key follows
      const pre = new Map<string, KeyArg>();
      for (const a of st.args) if (a.kind === 'key' && textKeys.includes(a.key) && !pre.has(a.key)) pre.set(a.key, a);
      suggestedKeys = new Set();
      if (!readText(pre)) return;
      const fail = (message: string, key?: string, help?: string) => bag.error('bad-element', message, (key && pre.get(key)?.span) || st.label!.span, help);
      const resolved = type.resolve(el, { readNetwork: (path) => readNetworkFor(st, path), fail });
      if (!resolved) return;
      terminals = resolved;
    }
    const allowed = type.resolve ? [...terminals.map((t) => t.key), ...type.properties.map((p) => p.key), ...textKeys] : fixedAllowed;
    const args = keyArgs(st, allowed, what, textKeys);
    if (!type.resolve && !readText(args)) return;

    function readText(found: Map<string, KeyArg>): boolean {
      for (const p of type.textProperties ?? []) {
        const a = found.get(p.key);
        if (!a) {
          if (p.required) {
            if (!suggestedKeys.has(p.key)) bag.error('missing-property', `${what} \`${name}\` needs \`${p.key}\` (${p.doc})`, st.label!.span, p.choices ? `one of: ${p.choices.join(', ')}` : `add \`${p.key}="…"\``);
            return false;
          }
          if (p.defaultValue !== undefined) (el.text === NONE_TEXT ? (el.text = {}) : el.text)[p.key] = p.defaultValue;
          continue;
        }
        const bare = a.values.length === 1 && a.values[0]!.kind === 'name' && !a.at ? (a.values[0] as { name: string }).name : undefined;
        if (!a.text && !p.choices && bare !== undefined) {
          // a file name (or other text) written without quotes
          bag.error('bad-value', `\`${p.key}\` takes a quoted string: ${p.key === 'file' ? 'file names are quoted' : 'text is quoted'}`, a.values[0]!.span, `write \`${p.key}="${bare}"\``);
          return false;
        }
        const word = a.text?.value ?? bare;
        if (word === undefined) {
          bag.error('bad-value', p.choices ? `\`${p.key}\` is one of: ${p.choices.join(', ')}` : `\`${p.key}\` takes a quoted string`, a.span, p.choices ? undefined : `write \`${p.key}="…"\``);
          return false;
        }
        if (p.choices && !p.choices.includes(word)) {
          bag.error('bad-value', `\`${p.key}\` is one of: ${p.choices.join(', ')}`, a.text?.span ?? a.values[0]!.span, didYouMean(word, p.choices));
          return false;
        }
        (el.text === NONE_TEXT ? (el.text = {}) : el.text)[p.key] = word;
      }
      return true;
    }
    for (const t of terminals) {
      const a = args.get(t.key);
      if (!a) {
        if (suggestedKeys.has(t.key)) {
          ok = false;
          continue;
        }
        if (t.defaultNode !== undefined) {
          el.nodes.push(t.defaultNode === GROUND_NAME ? GROUND : useNode(ctx.prefix + t.defaultNode, st.label.span, name, false));
          el.nodeNames.push(t.defaultNode);
          continue;
        }
        bag.error('missing-terminal', `${what} \`${name}\` needs terminal \`${t.key}\` (${t.doc})`, st.label.span, `add \`${t.key}=<node>\``);
        ok = false;
        continue;
      }
      const n = nodeArg(a, name, false, ctx);
      if (n === undefined) ok = false;
      el.nodes.push(n ?? GROUND);
      el.nodeNames.push((a.values[0] as { name?: string }).name ?? '?');
    }
    for (const p of type.properties) {
      const a = args.get(p.key);
      if (!a) {
        if (p.required && suggestedKeys.has(p.key)) ok = false;
        else if (p.required) {
          bag.error('missing-property', `${what} \`${name}\` needs \`${p.key}\` (${p.doc})`, st.label.span, `add \`${p.key}=<${p.quantity}>\``);
          ok = false;
        } else if (p.defaultValue !== undefined) el.props[p.key] = p.defaultValue;
        continue;
      }
      if (a.at && !p.takesAt) {
        bag.error('unexpected-at', `\`${p.key}\` does not take \`at\``, a.at.span);
        ok = false;
      }
      if (p.takesAt && !a.at) {
        bag.error('missing-at', `\`${p.key}\` needs the frequency it holds at`, a.span, `write e.g. \`${p.key}=40 at 433 MHz\``);
        ok = false;
      }
      const v = numberArg(a, p.unit, p.quantity, ctx, (value, span) => pendingBindings.push({ el, target: 'prop', key: p.key, value, span }));
      if (v === undefined) {
        ok = false;
        continue;
      }
      if (!signOk(p, v)) {
        bag.error('bad-value', `\`${p.key}\` must be ${p.sign === 'positive' ? 'above zero' : p.sign === 'nonnegative' ? 'zero or more' : 'other than zero'}`, a.values[0]!.span);
        ok = false;
      }
      el.props[p.key] = v;
      if (p.takesAt && a.at) {
        const f = atArg(a, ctx, (value, span) => pendingBindings.push({ el, target: 'at', key: p.key, value, span }));
        if (f === undefined) ok = false;
        else (el.at === NONE_AT ? (el.at = {}) : el.at)[p.key] = f;
      }
    }
    if (!ok) return;
    // exact-length arrays (an array grown by push keeps room for 16): a large netlist keeps them all
    el.nodes = el.nodes.slice();
    el.nodeNames = el.nodeNames.slice();
    let valid = true;
    type.validate?.(el, (message, key, help) => {
      valid = false;
      bag.error('bad-element', message, (key && args.get(key)?.span) || st.label!.span, help);
    });
    if (!valid) return;
    if (el.nodes.length === 2 && el.nodes[0] === el.nodes[1]) {
      const node = el.nodes[0] === GROUND ? GROUND_NAME : nodeNames[el.nodes[0]!]!;
      bag.warning('shorted-element', `both terminals of \`${name}\` are on node \`${node}\`: it has no effect`, st.span);
    }
    elements.push(el);
  }

  function definePort(st: Statement, ctx: Context) {
    if (!st.label || !st.label.isNumber || !/^\d+$/.test(st.label.text) || Number(st.label.text) < 1) {
      bag.error('bad-port', 'a port needs a number from 1 after `port`', st.label?.span ?? st.keywordSpan, 'e.g. `port 1 plus=in ref=50 ohm`');
      return;
    }
    const digits = st.label.text.replace(/^0+/, '');
    if (digits.length > String(MAX_PORTS).length || Number(digits) > MAX_PORTS) {
      bag.error('too-many-ports', `port ${st.label.text.length > 20 ? `${st.label.text.slice(0, 20)}…` : st.label.text}: ports are numbered from 1 to at most ${MAX_PORTS} (the limit of ports)`, st.label.span, 'ports are numbered 1, 2, 3… without gaps');
      return;
    }
    const number = Number(st.label.text);
    if (ports.has(number)) {
      bag.error('duplicate-port', `port ${number} is defined twice (first at line ${ports.get(number)!.span.line})`, st.label.span);
      return;
    }
    const args = keyArgs(st, ['plus', 'minus', 'ref', 'ref_x'], '`port`');
    const plusArg = args.get('plus');
    if (!plusArg) {
      if (suggestedKeys.has('plus')) return;
      bag.error('missing-terminal', `port ${number} needs \`plus=<node>\``, st.label.span, '`minus` defaults to ground');
      return;
    }
    const by = `port ${number}`;
    const plus = nodeArg(plusArg, by, true, ctx);
    const minusArg = args.get('minus');
    const minus = minusArg ? nodeArg(minusArg, by, true, ctx) : GROUND;
    const refArg = args.get('ref');
    const reference = refArg ? numberArg(refArg, 'ohm', 'resistance', ctx) : DEFAULT_REFERENCE;
    const xArg = args.get('ref_x');
    const reactance = xArg ? numberArg(xArg, 'ohm', 'reactance', ctx) : 0;
    if (reactance === undefined) return;
    if (plus === undefined || minus === undefined || reference === undefined) return;
    if (!(reference > 0)) {
      bag.error('bad-value', 'a reference impedance must be above 0 ohm', refArg!.values[0]!.span);
      return;
    }
    if (reference < MIN_REFERENCE_OHMS || reference > MAX_REFERENCE_OHMS) {
      bag.error('bad-value', `a reference resistance must lie from ${sci(MIN_REFERENCE_OHMS)} to ${sci(MAX_REFERENCE_OHMS)} ohm (got ${reference} ohm)`, refArg!.values[0]!.span, 'the limits keep the power-wave normalisation (√R, 1/√R) finite and accurate');
      return;
    }
    if (Math.abs(reactance) > MAX_REFERENCE_OHMS) {
      bag.error('bad-value', `a reference reactance must lie from −${sci(MAX_REFERENCE_OHMS)} to ${sci(MAX_REFERENCE_OHMS)} ohm (got ${reactance} ohm)`, xArg!.values[0]!.span);
      return;
    }
    if (plus === minus) {
      bag.error('bad-port', `port ${number} has both terminals on the same node`, st.span);
      return;
    }
    const name = (a: KeyArg | undefined) => (a ? (a.values[0] as { name: string }).name : GROUND_NAME);
    ports.set(number, { number, plus, minus, plusName: name(plusArg), minusName: name(minusArg), reference, ...(reactance !== 0 ? { reactance } : {}), span: st.span });
  }

  // Sweep: the override wins over the file's statements.
  const sweepSource = options.sweep && options.sweep.length > 0 ? options.sweep : sweepStatements;
  const frequencies = buildSweep(sweepSource, bag, (a, unit, quantity) => numberArg(a, unit, quantity), (st, allowed, what) => keyArgs(st, allowed, what), (key) => suggestedKeys.has(key));
  if (sweepSource.length === 0 && !ast.failedKeywords.includes('sweep')) {
    bag.error('no-sweep', 'the netlist has no `sweep`', { file: ast.file, line: 1, column: 1, length: 1 }, 'add e.g. `sweep linear start=1 MHz stop=1 GHz points=201`, or give `--sweep` on the command line');
  }

  // Elements defined over a limited band (measured data) must cover the sweep.
  if (frequencies.length > 0) {
    const lo = frequencies[0]!;
    const hi = frequencies[frequencies.length - 1]!;
    for (const { element: el, range } of outsideRange(elements, lo, hi)) {
      bag.error('sweep-outside-data', `the sweep (${formatFrequency(lo)} to ${formatFrequency(hi)}) reaches outside the data of \`${el.name}\` (${formatFrequency(range[0])} to ${formatFrequency(range[1])})`, el.span, 'narrow the sweep, or let the element extrapolate with `extrapolate=hold`');
    }
  }

  // Errors of the elements' own over the sweep (a model that cannot be evaluated somewhere).
  if (frequencies.length > 0) {
    for (const el of elements) {
      const type = ELEMENTS.get(el.type)!;
      type.checkSweep?.(el, frequencies, (message, _key, help) => bag.error('bad-element', `\`${el.name}\`: ${message}`, el.span, help));
    }
  }

  // Warnings of the elements' own (models outside their ranges, lengths that look mistyped).
  if (frequencies.length > 0 && !bag.hasErrors) {
    const top = frequencies[frequencies.length - 1]!;
    for (const el of elements) for (const w of ELEMENTS.get(el.type)!.warnings?.(el, top) ?? []) bag.warning('element-range', `\`${el.name}\`: ${w}`, el.span);
  }

  // Ports: numbered 1..N without gaps.
  const portList = [...ports.values()].sort((a, b) => a.number - b.number);
  if (!sawPort && !ast.failedKeywords.includes('port')) {
    bag.error('no-ports', 'the netlist has no `port`', { file: ast.file, line: 1, column: 1, length: 1 }, 'add e.g. `port 1 plus=in`');
  }
  const missingPorts: number[] = [];
  const highest = portList.length ? portList[portList.length - 1]!.number : 0;
  for (let k = 1; k <= highest; k++) if (!ports.has(k)) missingPorts.push(k);
  if (missingPorts.length > 0) {
    const after = portList.find((p) => p.number > missingPorts[0]!)!;
    const shown = missingPorts.length > 12 ? `${missingPorts.slice(0, 10).join(', ')} … ${missingPorts[missingPorts.length - 1]} (${missingPorts.length} in all)` : missingPorts.join(', ');
    const list = missingPorts.length === 1 ? `port ${missingPorts[0]} is missing` : `ports ${shown} are missing`;
    bag.error('port-gap', `ports must be numbered from 1 without gaps; ${list}`, after.span);
  }

  // Specs, once the port count is known.
  const specs: SpecDefinition[] = [];
  const specNames = new Map<string, SourceSpan>();
  for (const st of specStatements) {
    const spec = elaborateSpec(st, portList.length, bag, (a, u, q) => numberArg(a, u, q), keyArgs, (k) => suggestedKeys.has(k));
    if (!spec) continue;
    const first = specNames.get(spec.name);
    if (first) {
      bag.error('duplicate-name', `a spec named \`${spec.name}\` exists already (line ${first.line})`, st.label!.span);
      continue;
    }
    specNames.set(spec.name, st.label!.span);
    specs.push(spec);
  }

  // Overrides that name no parameter.
  for (const o of overrides.values()) {
    if (!globals.entries.has(o.name)) {
      bag.error('unknown-parameter', `\`--set ${o.name}\`: the netlist has no parameter \`${o.name}\``, o.span, didYouMean(o.name, globals.entries.keys()));
    }
  }

  // Warnings about the connections (not when errors may have dropped some elements).
  if (!bag.hasErrors) nodeUses.forEach((u, i) => {
    const name = nodeNames[i]!;
    if (u.elementUses === 0) {
      bag.error('port-on-bare-node', `${u.by} is on node \`${name}\`, which no element touches`, u.first, didYouMean(name, nodeNames.filter((n) => n !== name)) ?? 'connect an element to the node, or check its spelling');
    } else if (u.count === 1) {
      bag.warning('dangling-node', `node \`${name}\` has a single connection (${u.by})`, u.first, didYouMean(name, nodeNames.filter((n) => n !== name)) ?? 'check the spelling of the node name');
    }
  });
  for (const [key, d] of definitions) {
    if (!usedKeys.has(key) && !usedEarly.has(key) && !d.failed) {
      bag.warning('unused-parameter', `${d.what} \`${d.name}\` is never used`, d.span);
    }
  }
  // blocks used inside used blocks count as used, also where expansion stopped (a cycle, a limit)
  const reach = [...blocks.values()].filter((b) => b.used);
  while (reach.length > 0) {
    for (const st of reach.pop()!.body) {
      const c = blocks.get(st.keyword);
      if (c && !c.used) {
        c.used = true;
        reach.push(c);
      }
    }
  }
  for (const b of blocks.values()) {
    if (!b.used) bag.warning('unused-block', `block \`${b.name}\` is never used`, b.header.label?.span ?? b.header.keywordSpan);
  }

  // Node groups with no path to ground: a group that carries a port is a balanced network and is
  // given a reference of its own (its first node), which changes nothing since no current can
  // flow to ground from it; a group with neither ground nor a port is a mistake.
  const localReferences: number[] = [];
  const portNodes = new Set(portList.flatMap((p) => [p.plus, p.minus]));
  const links = [...elements.flatMap((e) => joinedNodes(e)), ...portList.map((p) => [p.plus, p.minus])];
  for (const group of bag.hasErrors ? [] : floatingGroups(nodeNames.length, links)) {
    if (group.some((n) => portNodes.has(n))) {
      localReferences.push(group[0]!);
      continue;
    }
    const names = group.map((n) => `\`${nodeNames[n]}\``);
    const shown = names.length > 6 ? [...names.slice(0, 6), `and ${names.length - 6} more`] : names;
    bag.error('floating-nodes', `${group.length === 1 ? 'node' : 'nodes'} ${shown.join(', ')} ${group.length === 1 ? 'is' : 'are'} connected neither to ground nor to any port`, nodeUses[group[0]!]!.first, 'connect the group to `ground` or put a port across it');
  }

  const parameters: ParameterValue[] = [];
  for (const [name, p] of globals.entries) {
    if (p.value === null) continue;
    parameters.push({ name, ...siOf(p.value), span: p.span });
  }

  const bindings: ValueBinding[] = [];
  if (pendingBindings.length > 0) {
    const index = new Map(elements.map((e, i) => [e, i]));
    for (const b of pendingBindings) {
      const element = index.get(b.el);
      if (element !== undefined) bindings.push({ element, target: b.target, key: b.key, value: b.value, span: b.span });
    }
  }

  return {
    file: ast.file,
    title,
    nodeNames,
    elements,
    ports: portList,
    specs,
    localReferences,
    frequencies,
    parameters,
    variables,
    bindings,
    unfollowed,
    warnings: bag.items.filter((d) => d.severity === 'warning'),
  };
}

/** Unwinds out of an element whose problem was already reported. */
class ReportedError extends Error {}

/**
 * Separates block definitions (`block NAME terminals=… [param=default …]` … `end`) from the
 * top-level statements.
 */
function splitBlocks(statements: readonly StatementItem[], bag: DiagnosticBag): { top: StatementItem[]; blocks: Map<string, BlockDefinition> } {
  const top: StatementItem[] = [];
  const blocks = new Map<string, BlockDefinition>();
  let open: BlockDefinition | undefined;
  for (const item of statements) {
    // top-level lines stay pending until they are elaborated; block bodies are read now (kept)
    if (!open && item.keyword !== 'end' && item.keyword !== 'block') {
      top.push(item);
      continue;
    }
    const st = statementOf(item);
    if (st.keyword === 'end') {
      if (!open) {
        bag.error('bad-block', '`end` without a `block` to close', st.keywordSpan);
        continue;
      }
      if (st.label && st.label.text !== open.name) {
        bag.error('bad-block', `\`end ${st.label.text}\` closes block \`${open.name}\``, st.label.span, `write \`end\` or \`end ${open.name}\``);
      }
      if (st.args.length > 0) bag.error('bad-block', '`end` takes no arguments', st.args[0]!.span);
      open = undefined;
      continue;
    }
    if (st.keyword === 'block') {
      if (open) {
        bag.error('bad-block', `block \`${open.name}\` is not closed before this one`, st.keywordSpan, 'add `end` before it; blocks are defined one after another, and may use each other');
        open = undefined;
      }
      const def = blockHeader(st, bag);
      if (!def) {
        open = { name: '?', header: st, terminals: [], params: new Map(), body: [], used: true, size: 0, statements: 0, depth: 1, broken: true };
        continue;
      }
      if (blocks.has(def.name) || ELEMENTS.has(def.name) || (STATEMENT_KEYWORDS as readonly string[]).includes(def.name)) {
        bag.error('duplicate-name', blocks.has(def.name) ? `block \`${def.name}\` is defined twice (first at line ${blocks.get(def.name)!.header.span.line})` : `\`${def.name}\` is a keyword of the language and cannot name a block`, st.label!.span);
      } else blocks.set(def.name, def);
      open = def;
      continue;
    }
    open!.body.push(st);
  }
  if (open) bag.error('bad-block', `block \`${open.name}\` has no \`end\``, open.header.keywordSpan, 'close it with `end`');
  measureBlocks(blocks, bag);
  return { top, blocks };
}

/** Shows a chain of block names, shortened in the middle when long. */
function showChain(names: string[]): string {
  if (names.length <= 12) return names.join(' → ');
  return [...names.slice(0, 5), `… (${names.length - 10} more) …`, ...names.slice(-5)].join(' → ');
}

/**
 * Finds cycles of blocks that use each other (each reported once, at the instance that closes
 * it) and works out, bottom-up, how many elements one instance of each block expands to and how
 * deep its instances nest — before anything is expanded, and without recursion (a chain of
 * thousands of blocks must not overflow the stack).
 */
function measureBlocks(blocks: Map<string, BlockDefinition>, bag: DiagnosticBag): void {
  const WHITE = 0;
  const GREY = 1;
  const BLACK = 2;
  const colour = new Map<BlockDefinition, number>();
  const children = new Map<BlockDefinition, { block: BlockDefinition; st: Statement }[]>();
  for (const b of blocks.values()) {
    const list: { block: BlockDefinition; st: Statement }[] = [];
    for (const st of b.body) {
      const c = blocks.get(st.keyword);
      if (c) list.push({ block: c, st });
    }
    children.set(b, list);
  }
  for (const root of blocks.values()) {
    if ((colour.get(root) ?? WHITE) !== WHITE) continue;
    // explicit stack: the block and the index of its next child
    const stack: { block: BlockDefinition; next: number }[] = [{ block: root, next: 0 }];
    colour.set(root, GREY);
    while (stack.length > 0) {
      const top = stack[stack.length - 1]!;
      const list = children.get(top.block)!;
      if (top.next < list.length) {
        const { block: c, st } = list[top.next++]!;
        const cc = colour.get(c) ?? WHITE;
        if (cc === WHITE) {
          colour.set(c, GREY);
          stack.push({ block: c, next: 0 });
        } else if (cc === GREY) {
          const from = stack.findIndex((f) => f.block === c);
          const chain = [...stack.slice(from).map((f) => f.block.name), c.name];
          for (let i = from; i < stack.length; i++) stack[i]!.block.broken = true;
          bag.error('recursive-block', `block \`${c.name}\` contains itself: ${showChain(chain)}`, st.keywordSpan, 'a block cannot use itself, directly or through other blocks');
        }
        continue;
      }
      // all children done: measure this block
      const b = top.block;
      let size = 0;
      let statements = b.body.length;
      let depth = 1;
      for (const st of b.body) {
        const c = blocks.get(st.keyword);
        if (!c) {
          if (ELEMENTS.has(st.keyword)) size += 1;
          continue;
        }
        if (c.broken) b.broken = true;
        size += c.size;
        statements += c.statements;
        depth = Math.max(depth, c.depth + 1);
      }
      b.size = size;
      b.statements = statements;
      b.depth = depth;
      colour.set(b, BLACK);
      stack.pop();
    }
  }
}

function blockHeader(st: Statement, bag: DiagnosticBag): BlockDefinition | undefined {
  if (!st.label || st.label.isNumber) {
    bag.error('missing-name', '`block` needs a name', st.label?.span ?? st.keywordSpan, 'e.g. `block tee terminals=left, right l=10 nH c=2 pF`');
    return undefined;
  }
  const terminals: string[] = [];
  const params = new Map<string, { expr: Expr; span: SourceSpan }>();
  let ok = true;
  for (const a of st.args) {
    if (a.kind !== 'key') {
      bag.error('unexpected-text', 'a quoted string is not an argument of `block`', a.span);
      ok = false;
      continue;
    }
    if (a.key === 'terminals') {
      for (const e of a.values) {
        if (e.kind !== 'name' || e.name === GROUND_NAME) {
          bag.error('bad-block', e.kind === 'name' ? '`ground` is shared by every block and cannot be a terminal' : 'terminals are names', e.span);
          ok = false;
        } else if (terminals.includes(e.name)) {
          bag.error('bad-block', `terminal \`${e.name}\` is listed twice`, e.span);
          ok = false;
        } else terminals.push(e.name);
      }
      continue;
    }
    if (a.range) {
      bag.error('vary-in-block', 'a design variable (`vary`) cannot be declared inside a block', a.range.keywordSpan, 'declare it at the top level with `let` and give it to the block where the block is used');
      ok = false;
      continue;
    }
    if (a.values.length !== 1 || a.at) {
      bag.error('bad-block', `the default of parameter \`${a.key}\` is one value`, a.span);
      ok = false;
      continue;
    }
    if (params.has(a.key)) {
      bag.error('duplicate-parameter', `parameter \`${a.key}\` is defined twice`, a.keySpan);
      ok = false;
      continue;
    }
    params.set(a.key, { expr: a.values[0]!, span: a.keySpan });
  }
  if (terminals.length === 0) {
    bag.error('bad-block', `block \`${st.label.text}\` needs \`terminals=<names>\``, st.label.span, 'e.g. `terminals=in, out`');
    ok = false;
  }
  for (const p of params.keys()) {
    if (terminals.includes(p)) {
      bag.error('bad-block', `\`${p}\` is both a terminal and a parameter`, params.get(p)!.span);
      ok = false;
    }
  }
  return ok ? { name: st.label.text, header: st, terminals, params, body: [], used: false, size: 0, statements: 0, depth: 1, broken: false } : undefined;
}

/** 1e-6, 1e9: a limit as written in the documentation. */
function sci(x: number): string {
  return x.toExponential().replace('e+', 'e');
}

/**
 * The value itself when it is finite; otherwise undefined, reported at `span` (`1e308 * 10`,
 * `1e300 ohm * 1e300`: arithmetic that overflows into Infinity).
 */
function finiteOrReport(q: Quantity | undefined, span: SourceSpan, bag: DiagnosticBag, name: string): Quantity | undefined {
  if (q === undefined) return undefined;
  const v = typeof q === 'number' ? q : (q as unknown as { value: number | null }).value;
  if (typeof v === 'number' && !Number.isFinite(v)) {
    bag.error('bad-number', `\`${name}\` is not a finite number`, span, 'the arithmetic overflows the range of numbers (about ±1.8e308)');
    return undefined;
  }
  return q;
}

/** Whether two values are the same kind of quantity (a plain number and a dimensionless unit are). */
function sameDimension(a: Quantity, b: Quantity): boolean {
  const plain = (q: Quantity) => typeof q === 'number' || q.dimensions.every((d) => d === 0);
  if (plain(a) || plain(b)) return plain(a) && plain(b);
  return (a as Exclude<Quantity, number>).equalBase(b as Exclude<Quantity, number>);
}

function signOk(p: PropertySpec, v: number): boolean {
  switch (p.sign) {
    case 'positive':
      return v > 0;
    case 'nonnegative':
      return v >= 0;
    case 'nonzero':
      return v !== 0;
    default:
      return true;
  }
}

function article(quantity: string): string {
  return /^[aeiou]/.test(quantity) ? `an ${quantity}` : `a ${quantity}`;
}

const UNIT_EXAMPLES: Record<string, string> = {
  F: 'e.g. `4.7 pF`',
  H: 'e.g. `22 nH`',
  ohm: 'e.g. `50 ohm` or `4.7 kohm`',
  S: 'e.g. `20 mS`',
  Hz: 'e.g. `433 MHz`',
};

function unitHelp(unit: string | null): string | undefined {
  if (unit === null) return 'give a plain number';
  const ex = UNIT_EXAMPLES[unit];
  return `give ${describeUnit(unit)}${ex ? `, ${ex}` : ''}; a bare number is read in ${unit}`;
}

const SI_UNITS = ['ohm', 'S', 'F', 'H', 'Hz', 's', 'm', 'rad', 'dB', 'dB/m'];

/** A value as a message shows it: `10 pF`, `6`. */
function showQuantity(q: Quantity): string {
  return typeof q === 'number' ? String(q) : q.format({ precision: 6 });
}

function siOf(q: Quantity): { value: number; unit: string } {
  if (typeof q === 'number') return { value: q, unit: '' };
  for (const u of SI_UNITS) if (q.equalBase(math.unit(1, u))) return { value: q.toNumber(u), unit: u };
  try {
    const si = q.toSI();
    return { value: (si as unknown as { value: number }).value, unit: si.formatUnits() };
  } catch {
    // units of our own (dB) have no SI form
    return { value: (q as unknown as { value: number }).value, unit: q.formatUnits() };
  }
}

export type { Arg };
