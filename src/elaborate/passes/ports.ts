/**
 * The ports pass: a `port` statement read into the port table (its terminals, its reference
 * impedance, within the limits), and, once every statement is in, the ports sorted and checked
 * to be numbered 1..N without gaps (`numberPorts`).
 *
 * @module
 */
import type { KeyArg, Statement } from '../../ast/ast.js';
import { GROUND, GROUND_NAME } from '../../elements/types.js';
import { MAX_NETWORK_VALUES, MAX_PORTS, MAX_REFERENCE_OHMS, MIN_REFERENCE_OHMS } from '../../limits.js';
import { keyArgs, numberArg } from '../args.js';
import { nodeArg } from '../nodes.js';
import type { Context, ElabState } from '../state.js';
import { sci } from '../values.js';

const DEFAULT_REFERENCE = 50;

export function definePort(s: ElabState, st: Statement, ctx: Context): void {
  if (!st.label || !st.label.isNumber || !/^\d+$/.test(st.label.text) || Number(st.label.text) < 1) {
    s.bag.error('bad-port', 'a port needs a number from 1 after `port`', st.label?.span ?? st.keywordSpan, 'e.g. `port 1 plus=in ref=50 ohm`');
    return;
  }
  const digits = st.label.text.replace(/^0+/, '');
  if (digits.length > String(MAX_PORTS).length || Number(digits) > MAX_PORTS) {
    s.bag.error('too-many-ports', `port ${st.label.text.length > 20 ? `${st.label.text.slice(0, 20)}…` : st.label.text}: ports are numbered from 1 to at most ${MAX_PORTS} (the limit of ports)`, st.label.span, 'ports are numbered 1, 2, 3… without gaps');
    return;
  }
  const number = Number(st.label.text);
  if (s.ports.has(number)) {
    s.bag.error('duplicate-port', `port ${number} is defined twice (first at line ${s.ports.get(number)!.span.line})`, st.label.span);
    return;
  }
  const args = keyArgs(s, st, ['plus', 'minus', 'ref', 'ref_x'], '`port`');
  const plusArg = args.get('plus');
  if (!plusArg) {
    if (s.suggestedKeys.has('plus')) return;
    s.bag.error('missing-terminal', `port ${number} needs \`plus=<node>\``, st.label.span, '`minus` defaults to ground');
    return;
  }
  const by = `port ${number}`;
  const plus = nodeArg(s, plusArg, by, true, ctx);
  const minusArg = args.get('minus');
  const minus = minusArg ? nodeArg(s, minusArg, by, true, ctx) : GROUND;
  const refArg = args.get('ref');
  const reference = refArg ? numberArg(s, refArg, 'ohm', 'resistance', ctx) : DEFAULT_REFERENCE;
  const xArg = args.get('ref_x');
  const reactance = xArg ? numberArg(s, xArg, 'ohm', 'reactance', ctx) : 0;
  if (reactance === undefined) return;
  if (plus === undefined || minus === undefined || reference === undefined) return;
  if (!(reference > 0)) {
    s.bag.error('bad-value', 'a reference impedance must be above 0 ohm', refArg!.values[0]!.span);
    return;
  }
  if (reference < MIN_REFERENCE_OHMS || reference > MAX_REFERENCE_OHMS) {
    s.bag.error('bad-value', `a reference resistance must lie from ${sci(MIN_REFERENCE_OHMS)} to ${sci(MAX_REFERENCE_OHMS)} ohm (got ${reference} ohm)`, refArg!.values[0]!.span, 'the limits keep the power-wave normalisation (√R, 1/√R) finite and accurate');
    return;
  }
  if (Math.abs(reactance) > MAX_REFERENCE_OHMS) {
    s.bag.error('bad-value', `a reference reactance must lie from −${sci(MAX_REFERENCE_OHMS)} to ${sci(MAX_REFERENCE_OHMS)} ohm (got ${reactance} ohm)`, xArg!.values[0]!.span);
    return;
  }
  if (plus === minus) {
    s.bag.error('bad-port', `port ${number} has both terminals on the same node`, st.span);
    return;
  }
  const name = (a: KeyArg | undefined) => (a ? (a.values[0] as { name: string }).name : GROUND_NAME);
  s.ports.set(number, { number, plus, minus, plusName: name(plusArg), minusName: name(minusArg), reference, ...(reactance !== 0 ? { reactance } : {}), span: st.span });
}

/** The ports sorted by number into `s.portList`; a netlist without ports, or with gaps in their numbers, is reported. */
export function numberPorts(s: ElabState): void {
  const portList = [...s.ports.values()].sort((a, b) => a.number - b.number);
  s.portList = portList;
  if (!s.sawPort && !s.failedKeywords.includes('port')) {
    s.bag.error('no-ports', 'the netlist has no `port`', { file: s.file, line: 1, column: 1, length: 1 }, 'add e.g. `port 1 plus=in`');
  }
  const missingPorts: number[] = [];
  const highest = portList.length ? portList[portList.length - 1]!.number : 0;
  for (let k = 1; k <= highest; k++) if (!s.ports.has(k)) missingPorts.push(k);
  if (missingPorts.length > 0) {
    const after = portList.find((p) => p.number > missingPorts[0]!)!;
    const shown = missingPorts.length > 12 ? `${missingPorts.slice(0, 10).join(', ')} … ${missingPorts[missingPorts.length - 1]} (${missingPorts.length} in all)` : missingPorts.join(', ');
    const list = missingPorts.length === 1 ? `port ${missingPorts[0]} is missing` : `ports ${shown} are missing`;
    s.bag.error('port-gap', `ports must be numbered from 1 without gaps; ${list}`, after.span);
  }
  // the result: points × ports² complex values, within MAX_NETWORK_VALUES
  const points = s.frequencies.length;
  const p = portList.length;
  if (points * p * p > MAX_NETWORK_VALUES) {
    const sweep = s.options.sweep && s.options.sweep.length > 0 ? s.options.sweep : s.sweepStatements;
    const at = sweep[0]?.keywordSpan ?? { file: s.file, line: 1, column: 1, length: 1 };
    s.bag.error('too-many-values', `${points} sweep points of a ${p}-port are ${points * p * p} complex values, above the limit of ${MAX_NETWORK_VALUES} in one result`, at, `take fewer points (at most ${Math.floor(MAX_NETWORK_VALUES / (p * p))} for ${p} ports)`);
  }
}
