import type { Arg, NetlistAst, NetlistItems } from '../ast/ast.js';
import type { DiagnosticBag } from '../diagnostics/diagnostic.js';
import type { Circuit } from './circuit.js';
import { checksPass } from './passes/checks.js';
import { defineBlocks } from './passes/blocks.js';
import { elementBindings } from './passes/elements.js';
import { parameterValues } from './passes/parameters.js';
import { numberPorts } from './passes/ports.js';
import { specsPass } from './passes/specs.js';
import { sweepPass } from './passes/sweep.js';
import { finishTolerances } from './passes/tolerances.js';
import { runStatements } from './passes/walk.js';
import { createState, type ElaborateOptions } from './state.js';

export { DataFileError, STATEMENT_KEYWORDS, type ElaborateOptions, type Override } from './state.js';

/**
 * Elaborates a parsed netlist: evaluates parameters (units carried through), checks every
 * statement against its schema, resolves nodes and builds the sweep. Errors and warnings go into
 * `bag`; the returned circuit is only meaningful when the bag has no errors.
 *
 * The work is a row of passes over one shared state (src/elaborate/state.ts), each in its own
 * file under src/elaborate/passes/:
 * - blocks: block definitions taken out of the netlist and measured;
 * - the walk of the top-level statements in netlist order, which hands each statement to its
 *   pass: parameters (`let`, design variables, the parameter graph's nodes), elements (and the
 *   bindings of their numbers to the variables), ports, and block instances (expanded by the
 *   blocks pass, their bodies walked in turn);
 * - tolerances: lots resolved, tolerances and random inputs given their element and input
 *   indices (passes/tolerances.ts);
 * - sweep: the frequencies, and the elements checked over them;
 * - ports: numbered 1..N without gaps;
 * - specs, once the port count is known;
 * - checks: unknown overrides, connections, unused names, floating node groups.
 */
export function elaborate(ast: NetlistAst | NetlistItems, bag: DiagnosticBag, options: ElaborateOptions = {}): Circuit {
  const s = createState(ast, bag, options);
  defineBlocks(s, ast);
  runStatements(s, s.top, s.topContext);
  // lots resolved and indices filled in once every statement is read (random inputs after the variables)
  const { tolerances, lots, randomInputs } = finishTolerances(s, s.elements, s.pendingBindings);
  sweepPass(s);
  numberPorts(s);
  specsPass(s);
  checksPass(s);
  return {
    file: s.file,
    title: s.title,
    nodeNames: s.nodeNames,
    elements: s.elements,
    ports: s.portList,
    specs: s.specs,
    localReferences: s.localReferences,
    frequencies: s.frequencies,
    parameters: parameterValues(s),
    variables: s.variables,
    bindings: elementBindings(s),
    unfollowed: s.unfollowed,
    tolerances,
    lots,
    ...(s.yieldPlan ? { yieldPlan: s.yieldPlan } : {}),
    randomInputs,
    randomUnfollowed: s.randomUnfollowed,
    warnings: bag.items.filter((d) => d.severity === 'warning'),
  };
}

export type { Arg };
