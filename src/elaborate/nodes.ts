/**
 * The node table of an elaboration: node names to indices (ground is {@link GROUND}), and how
 * often and by what each node is used (for the connection checks of passes/checks.ts).
 *
 * @module
 */
import type { KeyArg } from '../ast/ast.js';
import type { SourceSpan } from '../diagnostics/diagnostic.js';
import { GROUND, GROUND_NAME } from '../elements/types.js';
import type { Context, ElabState } from './state.js';

/** The index of node `name` (made on first use), its use counted. */
export function useNode(s: ElabState, name: string, span: SourceSpan, by: string, isPort: boolean): number {
  if (name === GROUND_NAME) return GROUND;
  let i = s.nodeIndex.get(name);
  if (i === undefined) {
    i = s.nodeNames.length;
    s.nodeIndex.set(name, i);
    s.nodeNames.push(name);
    s.nodeUses.push({ count: 0, first: span, by, elementUses: 0 });
  }
  countUse(s, i, by, isPort);
  return i;
}

export function countUse(s: ElabState, i: number, by: string, isPort: boolean): void {
  const u = s.nodeUses[i]!;
  u.count++;
  if (!isPort) u.elementUses++;
}

/** A node argument (`plus=in`): the node's index, a block terminal's outer node, or undefined (reported). */
export function nodeArg(s: ElabState, a: KeyArg, by: string, isPort: boolean, ctx: Context): number | undefined {
  const e = a.values[0]!;
  if (a.values.length !== 1 || e.kind !== 'name' || a.at) {
    const help = e.kind === 'number' && e.value === 0 ? `the reference node is called \`${GROUND_NAME}\`` : 'node names are plain names such as `in`, `mid` or `ground`';
    s.bag.error('bad-node', `\`${a.key}\` takes a node name`, e.span, help);
    return undefined;
  }
  if (/^(gnd|GND|Gnd|Ground|GROUND)$/.test(e.name)) {
    s.bag.warning('ground-alias', `node \`${e.name}\` is an ordinary node, not the reference`, e.span, `the reference node is called \`${GROUND_NAME}\``);
  }
  const terminal = ctx.terminals?.get(e.name);
  if (terminal !== undefined) {
    if (terminal !== GROUND) countUse(s, terminal, by, isPort);
    return terminal;
  }
  if (e.name === GROUND_NAME) return GROUND;
  return useNode(s, ctx.prefix + e.name, e.span, by, isPort);
}
