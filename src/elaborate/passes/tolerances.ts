/**
 * The tolerances pass: `tol …` after a `let` value or an element's number, and the lots
 * (`lot caps tol normal 3%`) that parts share a draw from. Each tolerance is checked where it
 * stands (its amount, its unit against the value's, its `cut`), its lot once the whole netlist is
 * read; the circuit gets them as plain data (Circuit.tolerances, Circuit.lots) for a later stage
 * to draw from. Nothing is drawn here.
 *
 * A toleranced `let` parameter that is not a design variable becomes a random input
 * (Circuit.randomInputs): a node of the compiled parameter graph like a variable's, so that the
 * element numbers computed from it follow a drawn value. Random inputs take the indices after the
 * variables' (V + j, with V variables), given at the end, when V is known: until then a random
 * input's index is the placeholder −(j + 1). Circuit.variables stays the design variables only,
 * so fit, vary and sensitivity see what they saw before; their value vectors have V entries,
 * and a random input's node reads its nominal value when the vector is that short.
 *
 * @module
 */
import type { Statement, ToleranceClause } from '../../ast/ast.js';
import type { SourceSpan } from '../../diagnostics/diagnostic.js';
import { didYouMean } from '../../diagnostics/suggest.js';
import type { ElementInstance } from '../../elements/types.js';
import type { Compiled } from '../../params/compile.js';
import type { Lot, RandomInput, Tolerance, ToleranceDistribution, YieldPlan } from '../circuit.js';
import { keyArgs, numberArg } from '../args.js';
import { MAX_YIELD_SAMPLES } from '../../limits.js';
import { describeQuantity, evaluate, toSI, type Quantity } from '../evaluate.js';
import { firstReport, type Context, type ElabState } from '../state.js';
import { finiteOrReport, showQuantity, siOf } from '../values.js';
import { evalScope } from './parameters.js';

/** How a tolerance is written, for the hints. */
export const TOLERANCE_FORMS = '`tol 5%`, `tol 0.1 pF`, `tol normal 2%` or `tol normal 2% cut 3`, then optionally `lot NAME`';

/** A tolerance read so far: its element (resolved to an index at the end) or its parameter. */
export interface PendingTolerance {
  target: { kind: 'parameter'; name: string; variable?: number; input: number } | { kind: 'element'; el: ElementInstance; key: string };
  distribution: ToleranceDistribution;
  lot?: { name: string; span: SourceSpan };
  nominal: number;
  unit: string | null;
  span: SourceSpan;
}

/** A random input before its index is known: its slot is filled in at the end. */
export interface PendingInput {
  name: string;
  value: number;
  unit: string | null;
  span: SourceSpan;
  slot: { index: number };
}

/** A plain number (a dimensionless quantity), or undefined. */
function plainNumber(q: Quantity): number | undefined {
  if (typeof q === 'number') return q;
  if (!q.dimensions.every((d) => d === 0)) return undefined;
  return siOf(q).value;
}

/**
 * Reads a tolerance's amount and `cut` (reported where wrong): the distribution in SI units of
 * the value. `unit` is the value's SI unit (null for a plain number); `valueQ`, when known, the
 * value itself with its unit (a `let`), for the unit check and its message.
 */
export function readDistribution(s: ElabState, t: ToleranceClause, ctx: Context, unit: string | null, what: string, relativeOnly = false): ToleranceDistribution | undefined {
  const bag = s.bag;
  const scope = evalScope(s, ctx);
  const amountQ = finiteOrReport(evaluate(t.amount, scope, bag), t.amount.span, bag, 'the tolerance');
  const cutQ = t.cut ? finiteOrReport(evaluate(t.cut, scope, bag), t.cut.span, bag, '`cut`') : undefined;
  if (amountQ === undefined || (t.cut && cutQ === undefined)) return undefined;
  let ok = true;
  let cut: number | undefined;
  if (t.cut && cutQ !== undefined) {
    const k = plainNumber(cutQ);
    if (!t.normal) {
      bag.error('bad-tolerance', '`cut` belongs to a normal tolerance: a uniform one ends at its amount already', t.cut.span, 'write `tol normal 2% cut 3`, or leave `cut` out');
      ok = false;
    } else if (k === undefined) {
      bag.error('bad-tolerance', `\`cut\` is a number of standard deviations, not ${describeQuantity(cutQ)}`, t.cut.span, 'write e.g. `cut 3` (the spread ends at 3σ)');
      ok = false;
    } else if (!(k > 0)) {
      bag.error('bad-tolerance', `\`cut\` must be above zero, not ${showQuantity(cutQ)}`, t.cut.span, 'write e.g. `cut 3` (the spread ends at 3σ)');
      ok = false;
    } else cut = k;
  }
  let relative: number | undefined;
  let absolute: number | undefined;
  if (t.percent) {
    const p = plainNumber(amountQ);
    if (p === undefined) {
      bag.error('bad-tolerance', `a tolerance in % is a plain number, not ${describeQuantity(amountQ)}`, t.amount.span, `write e.g. \`tol 5%\`; an absolute tolerance is written without %: ${TOLERANCE_FORMS}`);
      return undefined;
    }
    if (t.normal && !(p > 0)) {
      bag.error('bad-tolerance', `the standard deviation must be above zero, not ${p}%`, t.amount.span);
      return undefined;
    }
    if (!t.normal && !(p >= 0 && p < 100)) {
      bag.error('bad-tolerance', `a uniform tolerance in % must be at least 0% and below 100%, not ${p}%`, t.amount.span, 'at ±100% or more the part could reach zero or change its sign');
      return undefined;
    }
    relative = p / 100;
  } else {
    if (relativeOnly) {
      bag.error('bad-tolerance', `${what} is relative: give it in %`, t.amount.span, 'write e.g. `lot caps tol normal 3%`: the parts of a lot may have different values and units');
      return undefined;
    }
    const r = toSI(amountQ, unit);
    if ('error' in r || (unit !== null && typeof amountQ === 'number')) {
      const is = typeof amountQ === 'number' ? 'a plain number' : describeQuantity(amountQ);
      bag.error('wrong-unit', unit === null ? `${what} is a plain number, so its tolerance is too (or in %), but this is ${is}` : `the tolerance of ${what} must be in ${unit}, like the value, but it is ${is}`, t.amount.span, unit === null ? 'write e.g. `tol 0.1` or `tol 5%`' : `give the unit, e.g. \`tol 0.1 ${unit}\`, or a percentage, \`tol 5%\``);
      return undefined;
    }
    const x = r.value;
    if (t.normal && !(x > 0)) {
      bag.error('bad-tolerance', `the standard deviation must be above zero, not ${showQuantity(amountQ)}`, t.amount.span);
      return undefined;
    }
    if (!t.normal && !(x >= 0)) {
      bag.error('bad-tolerance', `a tolerance must be zero or more, not ${showQuantity(amountQ)}`, t.amount.span, 'a tolerance is a half-width: `tol 0.1 pF` means ±0.1 pF');
      return undefined;
    }
    absolute = x;
  }
  if (!ok) return undefined;
  if (t.normal) {
    const d: ToleranceDistribution = { kind: 'normal' };
    if (relative !== undefined) d.relativeSigma = relative;
    else d.sigma = absolute;
    if (cut !== undefined) d.cut = cut;
    return d;
  }
  return relative !== undefined ? { kind: 'uniform', relative } : { kind: 'uniform', absolute };
}

/** Whether tolerances may stand here: the top level only (reported once per line otherwise). */
export function toleranceAllowedHere(s: ElabState, t: ToleranceClause, ctx: Context): boolean {
  if (!ctx.terminals) return true;
  if (firstReport(s, t.keywordSpan)) {
    s.bag.error('tol-in-block', 'a tolerance (`tol`) cannot be given inside a block', t.keywordSpan, 'give the part value to the block as a parameter and put the tolerance on a top-level `let`: `let c = 2.2 pF tol 5%`, then `c=c` where the block is used');
  }
  return false;
}

/** A tolerance on a `let` parameter (a design variable when `variable` is its index). */
export function parameterTolerance(s: ElabState, t: ToleranceClause, ctx: Context, name: string, value: Quantity, variable: number | undefined): Compiled | undefined {
  const v = siOf(value);
  const unit = v.unit === '' ? null : v.unit;
  const distribution = readDistribution(s, t, ctx, unit, `\`${name}\``);
  if (!distribution) return undefined;
  let input: number;
  let node: Compiled | undefined;
  if (variable !== undefined) input = variable;
  else {
    const j = s.randomInputs.length;
    const slot = { index: -1 };
    const nominal = v.value;
    s.randomInputs.push({ name, value: nominal, unit, span: t.keywordSpan, slot });
    input = -(j + 1);
    // a value vector of the design variables alone (V entries) leaves the nominal value
    node = { fn: (x) => (slot.index < x.length ? x[slot.index]! : nominal), deps: [input] };
  }
  const target: PendingTolerance['target'] = { kind: 'parameter', name, input };
  if (variable !== undefined) target.variable = variable;
  push(s, { target, distribution, nominal: v.value, unit, span: t.span }, t);
  return node;
}

/** A tolerance on number `key` of an element (in SI `unit`). */
export function elementTolerance(s: ElabState, t: ToleranceClause, ctx: Context, el: ElementInstance, key: string, unit: string | null, nominal: number): void {
  const distribution = readDistribution(s, t, ctx, unit, `\`${key}\``);
  if (!distribution) return;
  push(s, { target: { kind: 'element', el, key }, distribution, nominal, unit, span: t.span }, t);
}

function push(s: ElabState, p: PendingTolerance, t: ToleranceClause): void {
  if (t.lot) p.lot = t.lot;
  s.pendingTolerances.push(p);
}

/** `lot NAME tol [normal] X% [cut K]`: the spread the parts of a lot share. */
export function defineLot(s: ElabState, st: Statement, ctx: Context): void {
  const example = 'write e.g. `lot caps tol normal 3%`, and `tol 1% lot caps` on each part from it';
  if (!st.label || st.label.isNumber) {
    s.bag.error('bad-lot', 'a lot needs a name after `lot`', st.label?.span ?? st.keywordSpan, example);
    return;
  }
  for (const a of st.args) s.bag.error('bad-lot', 'a lot takes only its tolerance', a.span, example);
  const t = st.tolerance;
  if (!t) {
    s.bag.error('bad-lot', `lot \`${st.label.text}\` needs its tolerance`, st.label.span, example);
    return;
  }
  if (t.lot) {
    s.bag.error('bad-lot', 'a lot cannot come from another lot', t.lot.span, example);
    return;
  }
  const prev = s.lots.get(st.label.text);
  if (prev) {
    s.bag.error('duplicate-lot', `lot \`${st.label.text}\` is declared twice (first at line ${prev.span.line})`, st.label.span);
    return;
  }
  const distribution = readDistribution(s, t, ctx, null, "a lot's tolerance", true);
  if (!distribution) {
    // known all the same, so that its parts draw no "unknown lot" error too
    s.lots.set(st.label.text, { name: st.label.text, distribution: { kind: 'uniform', relative: 0 }, span: st.label.span, failed: true });
    return;
  }
  s.lots.set(st.label.text, { name: st.label.text, distribution, span: st.label.span });
}

/**
 * `yield min=0.95 samples=2000 seed=7`: the yield the design must reach (a fraction from 0 to 1)
 * and the run that shows it; each argument optional, the statement at most once.
 */
export function defineYield(s: ElabState, st: Statement, ctx: Context): void {
  const example = 'write e.g. `yield min=0.95 samples=2000 seed=7` (min a fraction: 0.95 for 95 %)';
  if (st.label) s.bag.error('bad-yield', '`yield` takes only `min=`, `samples=` and `seed=`', st.label.span, example);
  if (s.yieldPlan) {
    s.bag.error('duplicate-yield', `the netlist has a \`yield\` statement already (line ${s.yieldPlan.span.line})`, st.keywordSpan);
    return;
  }
  const args = keyArgs(s, st, ['min', 'samples', 'seed'], '`yield`');
  const plan: YieldPlan = { span: st.keywordSpan };
  const min = args.get('min');
  if (min) {
    const v = numberArg(s, min, null, 'plain number', ctx);
    if (v !== undefined && !(v >= 0 && v <= 1)) s.bag.error('bad-yield', `the yield target is a fraction from 0 to 1, not ${v}`, min.values[0]!.span, v > 1 && v <= 100 ? `did you mean \`min=${v / 100}\` (${v} %)?` : example);
    else if (v !== undefined) plan.min = v;
  }
  const samples = args.get('samples');
  if (samples) {
    const v = numberArg(s, samples, null, 'plain number', ctx);
    if (v !== undefined && !(Number.isSafeInteger(v) && v >= 1 && v <= MAX_YIELD_SAMPLES)) s.bag.error('bad-yield', `\`samples\` is a whole number from 1 to ${MAX_YIELD_SAMPLES} (the limit of samples), not ${v}`, samples.values[0]!.span);
    else if (v !== undefined) plan.samples = v;
  }
  const seed = args.get('seed');
  if (seed) {
    const v = numberArg(s, seed, null, 'plain number', ctx);
    if (v !== undefined && !(Number.isSafeInteger(v) && v >= 0)) s.bag.error('bad-yield', `\`seed\` is a whole number from 0 to 2^53 − 1, not ${v}`, seed.values[0]!.span);
    else if (v !== undefined) plan.seed = v;
  }
  s.yieldPlan = plan;
}

/**
 * At the end: lots resolved (an unknown one reported, with a suggestion), element indices and
 * random-input indices filled in. Returns the circuit's lists.
 */
export function finishTolerances(s: ElabState, elements: readonly ElementInstance[], bindings: readonly { value: Compiled }[]): { tolerances: Tolerance[]; lots: Lot[]; randomInputs: RandomInput[] } {
  const lots: Lot[] = [];
  for (const l of s.lots.values()) if (!l.failed) lots.push({ name: l.name, distribution: l.distribution, span: l.span });
  const V = s.variables.length;
  const inputs: RandomInput[] = s.randomInputs.map((r, j) => {
    r.slot.index = V + j;
    return { name: r.name, value: r.value, unit: r.unit, index: V + j, span: r.span };
  });
  if (inputs.length > 0) {
    // placeholders −(j + 1) in the compiled values' dependencies become V + j (each list once)
    const seen = new Set<number[]>();
    for (const b of bindings) {
      const deps = b.value.deps;
      if (seen.has(deps)) continue;
      seen.add(deps);
      for (let i = 0; i < deps.length; i++) if (deps[i]! < 0) deps[i] = V - deps[i]! - 1;
      deps.sort((a, c) => a - c);
    }
  }
  const tolerances: Tolerance[] = [];
  if (s.pendingTolerances.length === 0) return { tolerances, lots, randomInputs: inputs };
  const index = new Map(elements.map((e, i) => [e, i]));
  const names = [...s.lots.keys()];
  for (const p of s.pendingTolerances) {
    if (p.lot && !s.lots.has(p.lot.name)) {
      s.bag.error('unknown-lot', `unknown lot \`${p.lot.name}\``, p.lot.span, didYouMean(p.lot.name, names) ?? (names.length > 0 ? `the lots are ${names.join(', ')}` : `declare it with \`lot ${p.lot.name} tol normal 3%\``));
      continue;
    }
    let target: Tolerance['target'];
    if (p.target.kind === 'element') {
      const element = index.get(p.target.el);
      if (element === undefined) continue; // the element failed (reported)
      target = { kind: 'element', element, key: p.target.key };
    } else {
      const input = p.target.input < 0 ? V - p.target.input - 1 : p.target.input;
      target = { kind: 'parameter', name: p.target.name, input };
      if (p.target.variable !== undefined) target.variable = p.target.variable;
    }
    const tol: Tolerance = { target, distribution: p.distribution, nominal: p.nominal, unit: p.unit, span: p.span };
    if (p.lot) tol.lot = p.lot.name;
    tolerances.push(tol);
  }
  return { tolerances, lots, randomInputs: inputs };
}

/** A tolerance where none can stand: on a statement other than `let` and elements. */
export function misplacedTolerance(s: ElabState, t: ToleranceClause, what: string): void {
  if (firstReport(s, t.keywordSpan)) s.bag.error('tol-misplaced', `${what} takes no tolerance`, t.keywordSpan, `a tolerance belongs after a part's number (\`value=2.2 pF tol 5%\`) or a top-level \`let\` value (\`let c = 2.2 pF tol 5%\`): ${TOLERANCE_FORMS}`);
}

