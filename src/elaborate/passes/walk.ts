/**
 * The walk: the statements of the top level, or of a block instance's body, in netlist order,
 * each handed to the pass whose job it is — `let` to the parameters pass, elements to the
 * elements pass, `port` to the ports pass, block instances to the blocks pass (which walks
 * their bodies); `sweep` and `spec` statements are kept for their passes, which run once the
 * walk is done. One walk in order, not one per pass: a parameter is visible only after its
 * definition, and diagnostics come in the order of the lines.
 *
 * @module
 */
import type { StatementItem } from '../../ast/ast.js';
import { statementOf } from '../../ast/fast.js';
import { didYouMean } from '../../diagnostics/suggest.js';
import { ELEMENTS } from '../../elements/registry.js';
import { MAX_EXPANDED_ELEMENTS } from '../../limits.js';
import { firstReport, ReportedError, STATEMENT_KEYWORDS, type Context, type ElabState } from '../state.js';
import { instantiate } from './blocks.js';
import { defineElement } from './elements.js';
import { defineParameters } from './parameters.js';
import { definePort } from './ports.js';
import { defineLot, defineYield, misplacedTolerance } from './tolerances.js';

/** Statements that only make sense at the top level of a netlist, not inside a block. */
const TOP_LEVEL_ONLY = new Set(['title', 'port', 'sweep', 'spec', 'include', 'block', 'lot', 'yield']);

function knownKeywords(s: ElabState): string[] {
  return [...STATEMENT_KEYWORDS.filter((k) => k !== 'end'), ...ELEMENTS.keys(), ...s.blocks.keys()];
}

export function runStatements(s: ElabState, statements: (StatementItem | undefined)[], ctx: Context): void {
  const release = s.options.consume && ctx === s.topContext;
  for (let i = 0; i < statements.length; i++) {
    const st = statementOf(statements[i]!);
    // a consumed top-level statement is let go once read (what it made keeps only its spans)
    if (release) statements[i] = undefined;
    if (ctx.terminals && TOP_LEVEL_ONLY.has(st.keyword)) {
      s.bag.error('not-in-block', `\`${st.keyword}\` cannot be used inside a block`, st.keywordSpan, st.keyword === 'block' ? 'define blocks at the top level and use them inside others' : 'put it at the top level of the netlist');
      continue;
    }
    if (st.keyword !== 'let') {
      for (const a of st.args) {
        if (a.kind === 'key' && a.range && firstReport(s, a.range.keywordSpan)) s.bag.error('vary-not-let', '`vary` belongs on a `let` line: only a parameter can be a design variable', a.range.keywordSpan, 'write `let name = value vary LOW to HIGH` and use the name here');
      }
    }
    if (st.tolerance && st.keyword !== 'lot') misplacedTolerance(s, st.tolerance, `\`${st.keyword}\``);
    if (st.keyword !== 'let' && st.keyword !== 'lot' && !ELEMENTS.has(st.keyword)) {
      // a port, the sweep, a spec, a block instance: their values take no tolerance
      for (const a of st.args) if (a.kind === 'key' && a.tolerance) misplacedTolerance(s, a.tolerance, s.blocks.has(st.keyword) ? `a parameter of a block instance (\`${a.key}\`)` : `\`${a.key}\` of \`${st.keyword}\``);
    }
    switch (st.keyword) {
      case 'lot':
        defineLot(s, st, ctx);
        break;
      case 'yield':
        defineYield(s, st, ctx);
        break;
      case 'title': {
        const text = st.args.find((a) => a.kind === 'text');
        if (st.label || !text || st.args.length !== 1) {
          s.bag.error('bad-title', 'a title is one quoted string', st.keywordSpan, 'write `title "433 MHz harmonic filter"`');
        } else if (s.title !== undefined) {
          s.bag.error('duplicate-title', 'the netlist has a title already', st.keywordSpan);
        } else s.title = (text as { value: string }).value;
        break;
      }
      case 'let':
        defineParameters(s, st, ctx);
        break;
      case 'port':
        if (ctx === s.topContext) s.sawPort = true;
        definePort(s, st, ctx);
        break;
      case 'sweep':
        s.sweepStatements.push(st);
        break;
      case 'spec':
        s.specStatements.push(st);
        break;
      case 'include':
        s.bag.error('bad-include', '`include` is resolved when the file is read; this one was not', st.keywordSpan, 'load netlists with loadNetlist or loadNetlistFile');
        break;
      default: {
        const type = ELEMENTS.get(st.keyword);
        if (type) {
          if (ctx === s.topContext && ++s.expanded === MAX_EXPANDED_ELEMENTS + 1) {
            s.bag.error('too-many-elements', `the netlist has more than ${MAX_EXPANDED_ELEMENTS} elements (the limit of elements after blocks are expanded)`, st.keywordSpan);
          }
          if (s.expanded > MAX_EXPANDED_ELEMENTS) break;
          try {
            defineElement(s, st, type, ctx);
          } catch (e) {
            if (!(e instanceof ReportedError)) throw e;
          }
          break;
        }
        const block = s.blocks.get(st.keyword);
        if (block) {
          instantiate(s, st, block, ctx);
          break;
        }
        s.bag.error('unknown-keyword', `unknown statement \`${st.keyword}\``, st.keywordSpan, didYouMean(st.keyword, knownKeywords(s)) ?? `a statement starts with one of: ${knownKeywords(s).join(', ')}`);
      }
    }
  }
}
