/**
 * Parameter expressions compiled to plain-number functions of the design variables.
 *
 * Elaboration evaluates every expression once with units (src/elaborate/evaluate.ts), which
 * checks its dimensions. An expression that depends on a design variable is then also compiled
 * here into a closure over plain numbers in SI units: in a coherent unit system the SI value of
 * a sum, product, quotient, power or square root is that operation on the SI values, so once the
 * units have been checked the numbers alone can be recomputed for new variable values — with no
 * parse, no unit library and no allocation. Subexpressions that depend on no variable are folded
 * to their SI value at compile time.
 *
 * @module
 */
import type { Expr } from '../ast/ast.js';
import type { Quantity } from '../elaborate/evaluate.js';

/** A value as a function of the variables: `fn(x)` with x the variables' SI values. */
export interface Compiled {
  fn: (x: Float64Array) => number;
  /** Indices of the variables it depends on (ascending, without repeats). */
  deps: number[];
}

/** What a name in an expression stands for while compiling. */
export interface CompileScope {
  /** The compiled form of a parameter that depends on variables, else undefined. */
  node(name: string): Compiled | undefined;
  /** The value of an expression that depends on no variable (evaluated with units, as elaboration does). */
  constant(e: Expr): Quantity | undefined;
}

/** An expression whose numbers cannot follow the variables (a unit with an offset, such as degrees Celsius). */
export class NotCompilable extends Error {}

/** The SI value of a quantity: mathjs keeps a unit's value in SI base units. */
export function siValue(q: Quantity): number {
  if (typeof q === 'number') return q;
  const u = q as unknown as { value: number; units: { unit: { offset: number } }[] };
  if (u.units.some((x) => x.unit.offset !== 0)) throw new NotCompilable('a unit with an offset');
  return u.value;
}

/** Whether the expression mentions a name that depends on variables. */
export function dependsOnVariables(e: Expr, scope: CompileScope): boolean {
  switch (e.kind) {
    case 'number':
      return false;
    case 'name':
      return scope.node(e.name) !== undefined;
    case 'call':
      return e.args.some((a) => dependsOnVariables(a, scope));
    case 'unary':
      return dependsOnVariables(e.operand, scope);
    case 'binary':
      return dependsOnVariables(e.left, scope) || dependsOnVariables(e.right, scope);
    case 'chain':
      for (const o of e.operands) if (dependsOnVariables(o, scope)) return true;
      return false;
  }
}

const mergeDeps = (...lists: number[][]): number[] => [...new Set(lists.flat())].sort((a, b) => a - b);

const constantOf = (v: number): Compiled => ({ fn: () => v, deps: [] });

/** mathjs rounds halves away from zero. */
const roundHalfAway = (x: number): number => (x < 0 ? -Math.round(-x) : Math.round(x));

const FUNCTIONS = new Map<string, (...a: number[]) => number>([
  ['sqrt', Math.sqrt],
  ['exp', Math.exp],
  ['ln', Math.log],
  ['log10', Math.log10],
  ['sin', Math.sin],
  ['cos', Math.cos],
  ['tan', Math.tan],
  ['atan', Math.atan],
  ['abs', Math.abs],
  ['round', roundHalfAway],
]);

/**
 * Compiles an expression that elaboration has already evaluated without error. Undefined when it
 * depends on no variable; throws {@link NotCompilable} where plain SI numbers cannot follow it.
 */
export function compileExpr(e: Expr, scope: CompileScope): Compiled | undefined {
  if (!dependsOnVariables(e, scope)) return undefined;
  return build(e, scope);
}

function build(e: Expr, scope: CompileScope): Compiled {
  if (!dependsOnVariables(e, scope)) {
    const q = scope.constant(e);
    if (q === undefined) throw new NotCompilable('a part of the expression has no value');
    return constantOf(siValue(q));
  }
  switch (e.kind) {
    case 'number':
      throw new NotCompilable('unreachable');
    case 'name':
      return scope.node(e.name)!;
    case 'unary': {
      const x = build(e.operand, scope);
      if (e.op === '+') return x;
      const f = x.fn;
      return { fn: (v) => -f(v), deps: x.deps };
    }
    case 'call': {
      const args = e.args.map((a) => build(a, scope));
      const deps = mergeDeps(...args.map((a) => a.deps));
      const fs = args.map((a) => a.fn);
      if (e.callee === 'min' || e.callee === 'max') {
        const pick = e.callee === 'min' ? Math.min : Math.max;
        return {
          fn: (v) => {
            let r = fs[0]!(v);
            for (let i = 1; i < fs.length; i++) r = pick(r, fs[i]!(v));
            return r;
          },
          deps,
        };
      }
      const g = FUNCTIONS.get(e.callee);
      if (!g || fs.length !== 1) throw new NotCompilable(`function ${e.callee}`);
      const a0 = fs[0]!;
      return { fn: (v) => g(a0(v)), deps };
    }
    case 'binary': {
      const l = build(e.left, scope);
      const r = build(e.right, scope);
      return { fn: binary(e.op, l.fn, r.fn), deps: mergeDeps(l.deps, r.deps) };
    }
    case 'chain': {
      // a compound unit at the start (`0.5 dB/m * len`) depends on no variable: folded as a pair
      let acc: Compiled;
      let from = 1;
      const head: Expr = { kind: 'binary', op: e.ops[0]!, left: e.operands[0]!, right: e.operands[1]!, span: e.span };
      if (!dependsOnVariables(e.operands[0]!, scope) && !dependsOnVariables(e.operands[1]!, scope) && (e.ops[0] === '*' || e.ops[0] === '/')) {
        acc = build(head, scope);
        from = 2;
      } else acc = build(e.operands[0]!, scope);
      for (let i = from; i < e.operands.length; i++) {
        const r = build(e.operands[i]!, scope);
        acc = { fn: binary(e.ops[i - 1]!, acc.fn, r.fn), deps: mergeDeps(acc.deps, r.deps) };
      }
      return acc;
    }
  }
}

function binary(op: '+' | '-' | '*' | '/' | '^', l: (v: Float64Array) => number, r: (v: Float64Array) => number): (v: Float64Array) => number {
  switch (op) {
    case '+':
      return (v) => l(v) + r(v);
    case '-':
      return (v) => l(v) - r(v);
    case '*':
      return (v) => l(v) * r(v);
    case '/':
      return (v) => l(v) / r(v);
    case '^':
      return (v) => l(v) ** r(v);
  }
}

/** The compiled form of design variable number i: its own value. */
export function variableNode(i: number): Compiled {
  return { fn: (v) => v[i]!, deps: [i] };
}
