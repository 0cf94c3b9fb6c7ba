/**
 * The state that the elaboration passes (src/elaborate/passes/) share: one explicit object in
 * place of the variables a single long function used to close over. `createState` makes it;
 * each pass reads what the passes before it left and adds its own part.
 *
 * @module
 */
import type { Expr, NetlistAst, NetlistItems, Statement, StatementItem } from '../ast/ast.js';
import { statementOf } from '../ast/fast.js';
import type { DiagnosticBag, SourceSpan } from '../diagnostics/diagnostic.js';
import type { ElementInstance } from '../elements/types.js';
import type { NetworkData } from '../network/types.js';
import type { Compiled } from '../params/compile.js';
import type { SpecDefinition } from '../check/types.js';
import type { Port, ToleranceDistribution, Unfollowed, Variable, YieldPlan } from './circuit.js';
import type { PendingInput, PendingTolerance } from './passes/tolerances.js';
import type { Quantity } from './evaluate.js';

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
export const STATEMENT_KEYWORDS = ['title', 'let', 'port', 'sweep', 'spec', 'block', 'end', 'include', 'lot', 'yield'] as const;

/** A parameter of a scope: its value (null when its definition failed) and where it was defined. */
export interface ParamEntry {
  value: Quantity | null;
  span: SourceSpan;
  /** Identity for "never used" warnings, shared by every instance of a block. */
  key: string;
  /** The value as a function of the design variables, when it depends on any. */
  node?: Compiled;
}

/** Parameters visible at a place: a block instance's own, then the netlist's. */
export class ParamScope {
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
export interface Context {
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
export interface BlockDefinition {
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

/** A parameter definition, for "never used" warnings (once per definition, not per instance). */
export interface ParamDefinition {
  name: string;
  span: SourceSpan;
  failed: boolean;
  what: string;
}

/** An element number that follows the variables (its element's index is filled in at the end). */
export interface PendingBinding {
  el: ElementInstance;
  target: 'prop' | 'at';
  key: string;
  value: Compiled;
  span: SourceSpan;
}

/** How a node is used: connections in all, the first one, and those by elements. */
export interface NodeUse {
  count: number;
  first: SourceSpan;
  by: string;
  elementUses: number;
}

/** Everything the passes share while one netlist is elaborated. */
export interface ElabState {
  readonly options: ElaborateOptions;
  /** The netlist's file, and the keywords of lines the grammar rejected (no "missing" errors for them). */
  readonly file: string;
  readonly failedKeywords: readonly string[];
  /**
   * Where diagnostics go now: the run's bag, or, while a block instance's body is elaborated, a
   * bag in front of it that notes the instance (see passes/blocks.ts).
   */
  bag: DiagnosticBag;
  /** The run's own bag. */
  readonly rootBag: DiagnosticBag;

  // parameters (passes/parameters.ts)
  /** `--set` overrides by name. */
  readonly overrides: Map<string, Override>;
  /** The netlist's own parameters (the top-level scope). */
  readonly globals: ParamScope;
  /** Parameters referenced before their definition (already an error there; not "unused" too). */
  readonly usedEarly: Set<string>;
  /** Keys (see ParamEntry) of the parameters referenced somewhere. */
  readonly usedKeys: Set<string>;
  /** Every parameter definition, for "never used" warnings. */
  readonly definitions: Map<string, ParamDefinition>;
  /** The design variables, in netlist order. */
  readonly variables: Variable[];
  /** Numbers outside the elements that depend on a variable (or cannot follow it). */
  readonly unfollowed: Unfollowed[];
  /** Places reported once per line rather than once per instance (a misplaced `vary`). */
  readonly reportedOnce: Set<string>;

  // tolerances (passes/tolerances.ts)
  /** The tolerances read so far (elements and lots resolved at the end). */
  readonly pendingTolerances: PendingTolerance[];
  /** The toleranced parameters that are not design variables (random inputs), in netlist order. */
  readonly randomInputs: PendingInput[];
  /** Numbers outside the elements that depend on random inputs only. */
  readonly randomUnfollowed: Unfollowed[];
  /** The lots by name (`failed`: declared, but its tolerance was wrong: reported). */
  readonly lots: Map<string, { name: string; distribution: ToleranceDistribution; span: SourceSpan; failed?: boolean }>;
  /** The `yield` statement's settings, once read. */
  yieldPlan?: YieldPlan;

  // blocks (passes/blocks.ts)
  readonly blocks: Map<string, BlockDefinition>;
  /** The netlist's top-level statements (block definitions taken out). */
  top: (StatementItem | undefined)[];
  readonly topContext: Context;
  /** Elements of the flattened netlist so far (instances counted whole when they are opened). */
  expanded: number;
  statementsRun: number;

  // nodes (nodes.ts)
  readonly nodeIndex: Map<string, number>;
  readonly nodeNames: string[];
  readonly nodeUses: NodeUse[];

  // statements and arguments (passes/walk.ts, args.ts)
  title: string | undefined;
  readonly sweepStatements: Statement[];
  readonly specStatements: Statement[];
  /** Keys that a misspelt argument of the statement being read was taken to mean. */
  suggestedKeys: Set<string>;

  // elements (passes/elements.ts)
  readonly elements: ElementInstance[];
  readonly elementNames: Map<string, SourceSpan>;
  /** Element numbers that follow the variables. */
  readonly pendingBindings: PendingBinding[];

  // ports (passes/ports.ts)
  readonly ports: Map<number, Port>;
  /** A `port` statement at the top level was seen (even a wrong one). */
  sawPort: boolean;
  /** The ports sorted by number (once the ports pass has run). */
  portList: Port[];

  // sweep, specs, checks
  frequencies: Float64Array;
  readonly specs: SpecDefinition[];
  readonly localReferences: number[];
}

/** The state before any pass: the overrides read, nothing else. */
export function createState(ast: NetlistAst | NetlistItems, bag: DiagnosticBag, options: ElaborateOptions): ElabState {
  const overrides = new Map<string, Override>();
  for (const o of options.overrides ?? []) overrides.set(o.name, o);
  const globals = new ParamScope();
  return {
    options,
    file: ast.file,
    failedKeywords: ast.failedKeywords,
    bag,
    rootBag: bag,
    overrides,
    globals,
    usedEarly: new Set(),
    usedKeys: new Set(),
    definitions: new Map(),
    variables: [],
    unfollowed: [],
    reportedOnce: new Set(),
    pendingTolerances: [],
    randomInputs: [],
    randomUnfollowed: [],
    lots: new Map(),
    blocks: new Map(),
    top: [],
    topContext: { scope: globals, prefix: '', terminals: null, chain: [], later: new Map() },
    expanded: 0,
    statementsRun: 0,
    nodeIndex: new Map(),
    nodeNames: [],
    nodeUses: [],
    title: undefined,
    sweepStatements: [],
    specStatements: [],
    suggestedKeys: new Set(),
    elements: [],
    elementNames: new Map(),
    pendingBindings: [],
    ports: new Map(),
    sawPort: false,
    portList: [],
    frequencies: new Float64Array(0),
    specs: [],
    localReferences: [],
  };
}

/** Unwinds out of an element whose problem was already reported. */
export class ReportedError extends Error {}

export function spanKey(s: SourceSpan): string {
  return `${s.file}:${s.line}:${s.column}`;
}

/** Whether `span` is reported here for the first time (a misplaced `vary`: once per line, not once per instance). */
export function firstReport(s: ElabState, span: SourceSpan): boolean {
  return !s.reportedOnce.has(spanKey(span)) && !!s.reportedOnce.add(spanKey(span));
}

/** The `let` names of a statement list and where they are defined (pending `let` lines are read and kept). */
export function laterOf(statements: (StatementItem | undefined)[]): Map<string, SourceSpan> {
  const m = new Map<string, SourceSpan>();
  for (let i = 0; i < statements.length; i++) {
    if (statements[i]!.keyword !== 'let') continue;
    const st = (statements[i] = statementOf(statements[i]!));
    for (const a of st.args) if (a.kind === 'key' && !m.has(a.key)) m.set(a.key, a.keySpan);
  }
  return m;
}
