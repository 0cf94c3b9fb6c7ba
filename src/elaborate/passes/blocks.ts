/**
 * The blocks pass: block definitions (`block NAME terminals=… [param=default …]` … `end`) taken
 * out of the netlist and measured before anything is expanded (cycles, elements and statements
 * per instance, nesting depth), and — as the walk meets them — block instances expanded: their
 * terminals connected, their parameters evaluated into a scope of their own, their body walked
 * with a name prefix, findings noted with the instance they came from.
 *
 * @module
 */
import type { Expr, NetlistAst, NetlistItems, Statement, StatementItem } from '../../ast/ast.js';
import { statementOf } from '../../ast/fast.js';
import type { Diagnostic, DiagnosticBag, SourceSpan } from '../../diagnostics/diagnostic.js';
import { ELEMENTS } from '../../elements/registry.js';
import { GROUND_NAME } from '../../elements/types.js';
import { MAX_BLOCK_DEPTH, MAX_EXPANDED_ELEMENTS } from '../../limits.js';
import { keyArgs } from '../args.js';
import { evaluate } from '../evaluate.js';
import { nodeArg } from '../nodes.js';
import { laterOf, ParamScope, spanKey, STATEMENT_KEYWORDS, type BlockDefinition, type Context, type ElabState } from '../state.js';
import { finiteOrReport } from '../values.js';
import { claimName } from './elements.js';
import { evalScope, follow } from './parameters.js';
import { runStatements } from './walk.js';

/**
 * Takes the block definitions out of the netlist's statements into `s.blocks` and leaves the
 * rest, the top level, in `s.top` (with the `let` names it defines, for "defined later").
 */
export function defineBlocks(s: ElabState, ast: NetlistAst | NetlistItems): void {
  const given: StatementItem[] = 'items' in ast ? ast.items : ast.statements;
  const { top, blocks } = splitBlocks(given, s.bag);
  if (s.options.consume) given.length = 0;
  for (const [name, b] of blocks) s.blocks.set(name, b);
  s.top = top;
  s.topContext.later = laterOf(top);
}

export function instantiate(s: ElabState, st: Statement, block: BlockDefinition, ctx: Context): void {
  const what = `block \`${block.name}\``;
  block.used = true;
  if (!st.label || st.label.isNumber) {
    s.bag.error('missing-name', `an instance of ${what} needs a name after the block name`, st.label?.span ?? st.keywordSpan, `e.g. \`${block.name} u1 ${block.terminals.map((t) => `${t}=<node>`).join(' ')}\``);
    return;
  }
  if (block.broken) return; // a cycle, reported at the block
  // An instance whose body gave errors once gives them again (reported once anyway): the run
  // has failed, so the block's other instances are not expanded (a doubling chain of blocks
  // with an error at its end would otherwise repeat it millions of times).
  if (block.failed) return;
  // Once the netlist has an error it will not be solved: each block is expanded once more
  // only for the diagnostics of its body, not once per instance.
  if (block.expanded && s.rootBag.hasErrors) return;
  if (ctx === s.topContext) {
    if (block.depth > MAX_BLOCK_DEPTH) {
      s.bag.error('too-deep', `an instance of ${what} opens ${block.depth} levels of nested block instances (at most ${MAX_BLOCK_DEPTH})`, st.keywordSpan, 'flatten some of the blocks');
      return;
    }
    if (s.expanded + block.size > MAX_EXPANDED_ELEMENTS) {
      const size = block.size < 1e15 ? `${block.size}` : 'more than 10^15';
      s.bag.error('too-many-elements', `an instance of ${what} expands to ${size} elements; with the others that is more than ${MAX_EXPANDED_ELEMENTS} (the limit of elements after blocks are expanded)`, st.keywordSpan, 'blocks that use other blocks several times multiply their elements');
      s.expanded = Infinity;
      return;
    }
    if (s.statementsRun + block.statements > MAX_EXPANDED_ELEMENTS) {
      // elements within the limit, but instances of blocks that bring few or no elements (e.g. a
      // chain of blocks ending in an unknown one) would still run that many statements
      const size = block.statements < 1e15 ? `${block.statements}` : 'more than 10^15';
      s.bag.error('too-many-elements', `an instance of ${what} expands to ${size} statements; with the others that is more than ${MAX_EXPANDED_ELEMENTS} (the limit of elements and statements after blocks are expanded)`, st.keywordSpan, 'blocks that use other blocks several times multiply their statements');
      s.expanded = Infinity;
      return;
    }
    s.expanded += block.size;
    s.statementsRun += block.statements;
  }
  if (ctx.chain.includes(block.name)) {
    const chain = [...ctx.chain.slice(ctx.chain.indexOf(block.name)), block.name].join(' → ');
    s.bag.error('recursive-block', `${what} contains itself: ${chain}`, st.keywordSpan, 'a block cannot use itself, directly or through other blocks');
    return;
  }
  const name = claimName(s, st.label, ctx);
  if (name === undefined) return;
  const args = keyArgs(s, st, [...block.terminals, ...block.params.keys()], what);
  const terminals = new Map<string, number>();
  let ok = true;
  for (const t of block.terminals) {
    const a = args.get(t);
    if (!a) {
      if (!s.suggestedKeys.has(t)) s.bag.error('missing-terminal', `instance \`${st.label.text}\` of ${what} needs terminal \`${t}\``, st.label.span, `add \`${t}=<node>\``);
      ok = false;
      continue;
    }
    const n = nodeArg(s, a, name, false, ctx);
    if (n === undefined) ok = false;
    else terminals.set(t, n);
  }
  const scope = new ParamScope(s.globals);
  const outer = evalScope(s, ctx);
  const defaults = evalScope(s, s.topContext);
  for (const [p, def] of block.params) {
    const a = args.get(p);
    if (a && (a.values.length !== 1 || a.at)) {
      s.bag.error('bad-value', `\`${p}\` takes one value`, a.span);
      ok = false;
      continue;
    }
    const value = finiteOrReport(a ? evaluate(a.values[0]!, outer, s.bag) : evaluate(def.expr, defaults, s.bag), a ? a.values[0]!.span : def.expr.span, s.bag, p);
    if (value === undefined) ok = false;
    const key = spanKey(def.span);
    const node = value !== undefined ? follow(s, a ? a.values[0]! : def.expr, a ? ctx : s.topContext, `parameter \`${p}\` of instance \`${name}\``) : undefined;
    scope.entries.set(p, { value: value ?? null, span: def.span, key, ...(node ? { node } : {}) });
    if (!s.definitions.has(key)) s.definitions.set(key, { name: p, span: def.span, failed: value === undefined, what: `parameter of block \`${block.name}\`` });
  }
  if (!ok) return;
  // Findings inside the body say which instance they came from (the first one, when several
  // instances give the same finding, which is then reported once).
  const outerBag = s.bag;
  const bodyFile = block.header.span.file;
  let first = Infinity;
  let last = -Infinity;
  for (const b of block.body) {
    first = Math.min(first, b.span.line);
    last = Math.max(last, b.span.line);
  }
  const note = `in instance \`${name}\` of block \`${block.name}\` (line ${st.span.line})`;
  let failed = false;
  s.bag = Object.create(outerBag, {
    add: {
      value: (d: Diagnostic) => {
        if (d.severity === 'error') failed = true;
        const inBody = d.span && d.span.file === bodyFile && d.span.line >= first && d.span.line <= last;
        outerBag.add(inBody && !d.help?.includes('in instance') ? { ...d, help: d.help ? `${d.help}; ${note}` : note } : d);
      },
    },
  }) as DiagnosticBag;
  try {
    runStatements(s, block.body, { scope, prefix: `${name}.`, terminals, chain: [...ctx.chain, block.name], later: laterOf(block.body) });
  } finally {
    s.bag = outerBag;
  }
  if (failed) block.failed = true;
  block.expanded = true;
}

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
  if (st.tolerance) bag.error('tol-in-block', 'a block takes no tolerance', st.tolerance.keywordSpan, 'put the tolerance on a top-level `let` (`let c = 2.2 pF tol 5%`) and give the parameter to the block where it is used');
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
    if (a.tolerance) {
      bag.error('tol-in-block', 'a tolerance (`tol`) cannot be given inside a block', a.tolerance.keywordSpan, 'put the tolerance on a top-level `let` (`let c = 2.2 pF tol 5%`) and give the parameter to the block where the block is used (`c=c`)');
      ok = false;
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
