/**
 * The parameters pass: `let` definitions (with `--set` overrides) evaluated once with units
 * into their scope, design variables (`vary`) checked against their ranges, and — where a value
 * depends on a variable — its compiled form, the node of the parameter graph (src/params/).
 * The walk (passes/walk.ts) calls `defineParameters` for each `let` line, in netlist order.
 *
 * @module
 */
import { joinSpans, type Expr, type KeyArg, type RangeClause, type Statement } from '../../ast/ast.js';
import { DiagnosticBag } from '../../diagnostics/diagnostic.js';
import { didYouMean } from '../../diagnostics/suggest.js';
import { SERIES_NAMES, isSeriesName, seriesValuesIn } from '../../design/series.js';
import { compileExpr, dependsOnVariables, NotCompilable, variableNode, type Compiled } from '../../params/compile.js';
import type { Unfollowed } from '../circuit.js';
import type { ParameterValue, Variable } from '../circuit.js';
import { describeQuantity, evaluate, type EvalScope, type Quantity } from '../evaluate.js';
import { firstReport, spanKey, type Context, type ElabState, type Override } from '../state.js';
import { finiteOrReport, sameDimension, showQuantity, siOf } from '../values.js';
import { misplacedTolerance, parameterTolerance, toleranceAllowedHere } from './tolerances.js';

/** What an expression evaluated at `ctx` sees: the scope's parameters, with their uses recorded. */
export function evalScope(s: ElabState, ctx: Context): EvalScope {
  return {
    lookup: (n) => ctx.scope.find(n)?.value,
    names: () => ctx.scope.names(),
    used: (n) => {
      const p = ctx.scope.find(n);
      if (p) s.usedKeys.add(p.key);
    },
    explainMissing: (n) => {
      const later = ctx.later.get(n);
      if (!later || ctx.scope.find(n)) return undefined;
      s.usedEarly.add(spanKey(later));
      return `\`${n}\` is defined later, at line ${later.line}; a parameter can only use those defined before it`;
    },
  };
}

/**
 * The expression as a function of the design variables, when it depends on any (only then is
 * anything compiled: a netlist without variables pays nothing). Where plain numbers cannot
 * follow it, it is recorded as not followed.
 */
export function follow(s: ElabState, e: Expr, ctx: Context, what: string): Compiled | undefined {
  if (s.variables.length === 0 && s.randomInputs.length === 0) return undefined;
  try {
    return compileExpr(e, {
      node: (n) => ctx.scope.find(n)?.node,
      constant: (x) => evaluate(x, evalScope(s, ctx), new DiagnosticBag()),
    });
  } catch (err) {
    if (!(err instanceof NotCompilable)) throw err;
    // a design variable among its names, or only random inputs (placeholder indices below 0)?
    const onVariables = dependsOnVariables(e, { node: (n) => { const c = ctx.scope.find(n)?.node; return c && c.deps.some((d) => d >= 0) ? c : undefined; }, constant: () => undefined });
    unfollowedBy(s, onVariables, { what, span: e.span, reason: err.message });
    return undefined;
  }
}

/**
 * Records a number re-evaluation cannot follow: with the design variables' (Circuit.unfollowed)
 * when it depends on one, else with the random inputs' (Circuit.randomUnfollowed), so that the
 * design tools see the same circuit as without tolerances.
 */
export function unfollowedBy(s: ElabState, onVariables: boolean, u: Unfollowed): void {
  (onVariables ? s.unfollowed : s.randomUnfollowed).push(u);
}

/** A `let` line: each `name = value` into the scope of `ctx` (a `--set` override replaces a top-level value). */
export function defineParameters(s: ElabState, st: Statement, ctx: Context): void {
  if (st.label) {
    s.bag.error('bad-let', 'write a parameter as `let name = value`', st.label.span);
    return;
  }
  if (st.args.length === 0) s.bag.error('bad-let', '`let` needs `name = value`', st.keywordSpan);
  for (const a of st.args) {
    if (a.kind !== 'key') {
      s.bag.error('bad-let', 'write a parameter as `let name = value`', a.span);
      continue;
    }
    if (a.at) {
      s.bag.error('bad-let', '`at` does not belong in a parameter definition', a.at.span);
      continue;
    }
    if (a.values.length !== 1) {
      s.bag.error('bad-let', 'a parameter takes one value', a.span);
      continue;
    }
    const prev = ctx.scope.entries.get(a.key);
    if (prev) {
      s.bag.error('duplicate-parameter', `parameter \`${a.key}\` is defined twice (first at line ${prev.span.line})`, a.keySpan);
      continue;
    }
    const o = ctx.terminals ? undefined : s.overrides.get(a.key);
    let value = finiteOrReport(evaluate(o ? o.expr : a.values[0]!, evalScope(s, ctx), s.bag), o ? o.expr.span : a.values[0]!.span, s.bag, a.key);
    if (o && value !== undefined) {
      // the override must be the same kind of quantity as the netlist's own value
      const own = evaluate(a.values[0]!, evalScope(s, ctx), new DiagnosticBag());
      if (own !== undefined && !sameDimension(own, value)) {
        s.bag.error('wrong-unit', `\`--set ${a.key}\`: the netlist's \`${a.key}\` is ${describeQuantity(own)}, but this is ${describeQuantity(value)}`, o.expr.span, `line ${a.keySpan.line} of ${a.keySpan.file} defines it`);
        value = undefined;
      }
    }
    const before = s.variables.length;
    if (a.range) {
      if (ctx.terminals) {
        if (firstReport(s, a.range.keywordSpan)) {
          s.bag.error('vary-in-block', 'a design variable (`vary`) cannot be declared inside a block', a.range.keywordSpan, 'declare it at the top level and pass it to the block as a parameter');
        }
      } else if (value !== undefined) {
        defineVariable(s, a, a.range, ctx, value, o);
      }
    }
    const key = spanKey(a.keySpan);
    let node: Compiled | undefined;
    const isVariable = s.variables.length > before;
    if (isVariable) node = variableNode(before);
    if (a.tolerance && toleranceAllowedHere(s, a.tolerance, ctx) && value !== undefined && (isVariable || !a.range)) {
      // a toleranced parameter that is not a variable is a random input: a node of its own
      const own = parameterTolerance(s, a.tolerance, ctx, a.key, value, isVariable ? before : undefined);
      if (own) node = own;
    }
    if (!node && value !== undefined) node = follow(s, o ? o.expr : a.values[0]!, ctx, `parameter \`${a.key}\``);
    ctx.scope.entries.set(a.key, { value: value ?? null, span: a.keySpan, key, ...(node ? { node } : {}) });
    if (!s.definitions.has(key)) s.definitions.set(key, { name: a.key, span: a.keySpan, failed: value === undefined, what: 'parameter' });
    if (o) s.usedKeys.add(key);
  }
}

/**
 * Checks a design variable's range against its value and records it: the bounds (and a step)
 * are evaluated once, with units, like the value.
 */
function defineVariable(s: ElabState, a: KeyArg, r: RangeClause, ctx: Context, value: Quantity, o: Override | undefined): void {
  const bag = s.bag;
  const scope = evalScope(s, ctx);
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
  // the netlist's own value lies in its range, or, where `--set` gives the value, the override
  // (the netlist's own value is then not used: with other parameters set it may move anywhere)
  const inside = (x: number) => x >= lo - 1e-12 * Math.abs(lo) && x <= hi + 1e-12 * Math.abs(hi);
  if (!o && !inside(v.value)) {
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
  s.variables.push(variable);
}

/** The netlist's own parameters that have a value, in SI units, for the circuit. */
export function parameterValues(s: ElabState): ParameterValue[] {
  const parameters: ParameterValue[] = [];
  for (const [name, p] of s.globals.entries) {
    if (p.value === null) continue;
    parameters.push({ name, ...siOf(p.value), span: p.span });
  }
  return parameters;
}
