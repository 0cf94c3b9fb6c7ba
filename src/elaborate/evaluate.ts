import { createRequire } from 'node:module';
import type { MathJsInstance, Unit } from 'mathjs';
import { joinSpans, type Expr } from '../ast/ast.js';
import type { DiagnosticBag, SourceSpan } from '../diagnostics/diagnostic.js';
import { didYouMean } from '../diagnostics/suggest.js';

// mathjs from the single-file build its package exports (`mathjs/lib/browser/math.js`): the same
// version of the same library in one file, which loads in about a tenth of the time of its module
// tree (measured on the reference machine: about 115 ms against 1 s, most of it resolving and
// reading the tree's many small files), which a command-line run would otherwise pay every time.
const { all, create } = createRequire(import.meta.url)('mathjs/lib/browser/math.js') as typeof import('mathjs');

/** The one mathjs instance: used at elaboration only, never in the per-frequency loop. */
export const math: MathJsInstance = create(all, {});
// Decibels, for the limits of specs on dB figures: a dimension of its own, so that `1 dB` cannot
// be mistaken for a plain number or any other quantity.
math.createUnit('dB');

/** A value while parameters are evaluated: a plain number or a mathjs quantity with a unit. */
export type Quantity = number | Unit;

interface Fn {
  arity: [number, number];
  fn: (...a: Quantity[]) => Quantity;
  /** What its arguments may be, for the message when mathjs refuses them. */
  takes: string;
}

// Looked up by names users write: a Map, so that `constructor` or `__proto__` is no function.
const FUNCTIONS = new Map<string, Fn>(Object.entries({
  sqrt: { arity: [1, 1], fn: (x) => math.sqrt(x as never) as Quantity, takes: 'any quantity' },
  exp: { arity: [1, 1], fn: (x) => math.exp(x as never) as Quantity, takes: 'a plain number' },
  ln: { arity: [1, 1], fn: (x) => math.log(x as never) as Quantity, takes: 'a plain number' },
  log10: { arity: [1, 1], fn: (x) => math.log10(x as never) as Quantity, takes: 'a plain number' },
  sin: { arity: [1, 1], fn: (x) => math.sin(x as never) as Quantity, takes: 'a plain number or an angle' },
  cos: { arity: [1, 1], fn: (x) => math.cos(x as never) as Quantity, takes: 'a plain number or an angle' },
  tan: { arity: [1, 1], fn: (x) => math.tan(x as never) as Quantity, takes: 'a plain number or an angle' },
  atan: { arity: [1, 1], fn: (x) => math.atan(x as never) as Quantity, takes: 'a plain number' },
  abs: { arity: [1, 1], fn: (x) => math.abs(x as never) as Quantity, takes: 'any quantity' },
  min: { arity: [1, 64], fn: (...x) => math.min(...(x as never[])) as Quantity, takes: 'quantities of one kind' },
  max: { arity: [1, 64], fn: (...x) => math.max(...(x as never[])) as Quantity, takes: 'quantities of one kind' },
  round: { arity: [1, 1], fn: (x) => math.round(x as never) as Quantity, takes: 'a plain number' },
} satisfies Record<string, Fn>));

const CONSTANTS = new Map<string, number>([
  ['pi', Math.PI],
  ['e', Math.E],
]);

/** Units commonly written in netlists, for "did you mean" hints on a misspelled unit. */
const COMMON_UNITS = [
  'Hz', 'kHz', 'MHz', 'GHz', 'THz',
  'ohm', 'mohm', 'kohm', 'Mohm',
  'S', 'mS', 'uS', 'nS',
  'F', 'mF', 'uF', 'nF', 'pF', 'fF',
  'H', 'mH', 'uH', 'nH', 'pH',
  's', 'ms', 'us', 'ns', 'ps', 'fs',
  'm', 'cm', 'mm', 'um', 'mil', 'in',
  'deg', 'rad', 'dB',
];

/** Writes unit names as mathjs reads them: Ω (omega or the ohm sign) → ohm, µ/μ (micro) → u. */
export function normaliseUnit(u: string): string {
  return u.replace(/[\u03A9\u2126]/g, 'ohm').replace(/^[\u00B5\u03BC]/, 'u');
}

function isUnit(x: unknown): x is Unit {
  return typeof x === 'object' && x !== null && (x as { type?: string }).type === 'Unit';
}

/** mathjs's own Unit check, so that only genuine units are accepted. */
export function unitOf(text: string): Unit | undefined {
  if (text.length > 64 || notUnits.has(text)) return undefined; // no unit is written that long
  try {
    return math.unit(1, normaliseUnit(text));
  } catch {
    if (notUnits.size > 10_000) notUnits.clear();
    notUnits.add(text);
    return undefined;
  }
}

/** Names found not to be units (mathjs throws to say so, which is slow when a file repeats one). */
const notUnits = new Set<string>();

export interface EvalScope {
  /** Parameter values by name; null for a parameter whose own definition failed (already reported). */
  lookup(name: string): Quantity | null | undefined;
  /** Names that can be suggested for a misspelling. */
  names(): Iterable<string>;
  /** Called for each name referenced (for unused-parameter warnings). */
  used?(name: string): void;
  /** Explains a name that is not (yet) defined, e.g. "defined later, at line 7". */
  explainMissing?(name: string): string | undefined;
}

/** SI prefixes a unit may start with, as written (µ and μ both for micro). */
const PREFIXES = new Set(['f', 'p', 'n', 'u', '\u00B5', '\u03BC', 'm', 'k', 'M', 'G', 'T']);

const likeUnits = new Map<string, string[]>();

/** The units of COMMON_UNITS with the dimension of `unit`, e.g. 'F' → F, mF, uF, nF, pF, fF. */
function unitsLike(unit: string): string[] {
  let like = likeUnits.get(unit);
  if (like === undefined) {
    const want = unitOf(unit);
    like = want ? COMMON_UNITS.filter((c) => unitOf(c)?.equalBase(want)) : [];
    likeUnits.set(unit, like);
  }
  return like;
}

/**
 * The hint for an unknown unit `written`: within the dimension `expected` when it is known (a
 * capacitance: `1p` → `pF`), else among the common units.
 */
function unknownUnitHelp(written: string, expected: string | null | undefined): string | undefined {
  if (expected) {
    const like = unitsLike(expected);
    if (like.length > 0) {
      // a prefix on its own: the prefix with the expected unit (`1p` for a capacitance → `pF`)
      if (PREFIXES.has(written) && unitOf(written + expected)?.equalBase(unitOf(expected)!)) return `did you mean \`${written}${expected}\`?`;
      return didYouMean(written, like) ?? `${describeUnit(expected)} is written in ${like.map((u) => `\`${u}\``).join(', ')}`;
    }
  }
  if (PREFIXES.has(written)) return `\`${written}\` is a prefix: write it with its unit, e.g. \`${written}F\`, \`${written}H\` or \`${written}s\``;
  return didYouMean(written, COMMON_UNITS);
}

/** A user's text quoted in a message, shortened when long (a message is one line, not a file). */
function quoted(text: string): string {
  return `\`${text.length > 40 ? `${text.slice(0, 32)}…` : text}\``;
}

/**
 * Evaluates an expression with mathjs arithmetic, units carried through. Reports problems into
 * `bag` at the offending sub-expression and returns undefined on error. `expected` is the unit
 * the value is to have (null: a plain number), when the caller knows it: it narrows the hints
 * for a misspelled unit to units of that dimension.
 *
 * The recursion is as deep as the expression nests, which the grammar keeps within
 * MAX_EXPRESSION_DEPTH (src/limits.ts); runs of `+ -` or `* /` are one node each, however long.
 */
export function evaluate(e: Expr, scope: EvalScope, bag: DiagnosticBag, expected?: string | null): Quantity | undefined {
  switch (e.kind) {
    case 'number': {
      if (!Number.isFinite(e.value)) {
        bag.error('bad-number', `${quoted(e.text)} is not a finite number`, e.span);
        return undefined;
      }
      if (e.unit === undefined) return e.value;
      const name = normaliseUnit(e.unit);
      const u = unitOf(name);
      if (!u) {
        let help: string | undefined;
        if (scope.lookup(e.unit) !== undefined) {
          scope.used?.(e.unit);
          help = `to multiply by the parameter, write \`${e.text.length > 40 ? 'number' : e.text}*${e.unit.length > 40 ? 'name' : e.unit}\``;
        } else help = e.unit.length > 40 ? undefined : unknownUnitHelp(e.unit, expected);
        bag.error('unknown-unit', `unknown unit ${quoted(e.unit)}`, e.unitSpan ?? e.span, help);
        return undefined;
      }
      if (name === 'mHz') {
        bag.warning('millihertz', '`mHz` is millihertz (SI prefixes are case-sensitive)', e.unitSpan ?? e.span, 'for megahertz write `MHz`');
      }
      return finite(() => math.unit(e.value, name), e.span, bag);
    }
    case 'name': {
      const v = scope.lookup(e.name);
      if (v !== undefined) {
        scope.used?.(e.name);
        return v === null ? undefined : v;
      }
      const constant = CONSTANTS.get(e.name);
      if (constant !== undefined) return constant;
      const why = scope.explainMissing?.(e.name);
      const help = why ?? didYouMean(e.name, [...scope.names(), ...CONSTANTS.keys()]);
      bag.error('unknown-parameter', `unknown parameter ${quoted(e.name)}`, e.span, help);
      return undefined;
    }
    case 'call': {
      const f = FUNCTIONS.get(e.callee);
      if (!f) {
        bag.error('unknown-function', `unknown function ${quoted(e.callee)}`, e.span, didYouMean(e.callee, FUNCTIONS.keys()) ?? `the functions are: ${[...FUNCTIONS.keys()].join(', ')}`);
        return undefined;
      }
      const args = e.args.map((a) => evaluate(a, scope, bag));
      if (args.some((a) => a === undefined)) return undefined;
      if (args.length < f.arity[0] || args.length > f.arity[1]) {
        bag.error('bad-call', `\`${e.callee}\` takes ${f.arity[0] === f.arity[1] ? f.arity[0] : `${f.arity[0]} to ${f.arity[1]}`} argument(s), got ${args.length}`, e.span);
        return undefined;
      }
      const q = args as Quantity[];
      return guard(() => f.fn(...q), e.span, bag, () => ({
        message: `\`${e.callee}\` cannot take ${describeAll(q)}`,
        help: `\`${e.callee}\` takes ${f.takes}`,
      }));
    }
    case 'unary': {
      const x = evaluate(e.operand, scope, bag, expected);
      if (x === undefined) return undefined;
      return e.op === '-' ? guard(() => math.unaryMinus(x as never) as Quantity, e.span, bag, () => ({ message: `cannot negate ${describeQuantity(x)}` })) : x;
    }
    case 'chain': {
      // `0.5 dB/m`, `3 V*s`: a unit right after a number may be divided or multiplied by a further
      // unit name, when no parameter has that name (only at the start of a chain, as in a left fold)
      const additive = e.ops[0] === '+' || e.ops[0] === '-';
      let acc: Quantity | undefined;
      let from = 1;
      const compound = !additive ? compoundUnit(e.operands[0]!, e.ops[0]!, e.operands[1]!, scope) : undefined;
      if (compound !== undefined) {
        acc = compound;
        from = 2;
      } else acc = evaluate(e.operands[0]!, scope, bag, additive ? expected : undefined);
      // every operand is evaluated (so that each one's problems are reported) before the fold
      const values: (Quantity | undefined)[] = [];
      let failed = acc === undefined;
      for (let i = from; i < e.operands.length; i++) {
        const v = evaluate(e.operands[i]!, scope, bag, additive ? expected : undefined);
        if (v === undefined) failed = true;
        values.push(v);
      }
      if (failed) return undefined;
      let span = e.operands[0]!.span;
      for (let i = from; i < e.operands.length; i++) {
        const right = e.operands[i]!;
        span = joinSpans(span, right.span);
        acc = operate(e.ops[i - 1]!, acc!, values[i - from]!, span, bag);
        if (acc === undefined) return undefined;
      }
      return acc;
    }
    case 'binary': {
      const compound = e.op !== '^' ? compoundUnit(e.left, e.op, e.right, scope) : undefined;
      if (compound !== undefined) return compound;
      const additive = e.op === '+' || e.op === '-';
      const l = evaluate(e.left, scope, bag, additive ? expected : undefined);
      const r = evaluate(e.right, scope, bag, additive ? expected : undefined);
      if (l === undefined || r === undefined) return undefined;
      return operate(e.op, l, r, e.span, bag);
    }
  }
}

/** `0.5 dB/m`: a number with a unit, `*` or `/`, and a unit name that no parameter has. */
function compoundUnit(left: Expr, op: string, right: Expr, scope: EvalScope): Quantity | undefined {
  if ((op !== '/' && op !== '*') || left.kind !== 'number' || left.unit === undefined || right.kind !== 'name' || !Number.isFinite(left.value)) return undefined;
  if (scope.lookup(right.name) !== undefined || scope.explainMissing?.(right.name) !== undefined) return undefined;
  if (!unitOf(left.unit) || !unitOf(right.name)) return undefined;
  try {
    return math.unit(left.value, `${normaliseUnit(left.unit)}${op}${normaliseUnit(right.name)}`);
  } catch {
    return undefined;
  }
}

const OPERATION = new Map([
  ['+', 'add'],
  ['-', 'subtract'],
  ['*', 'multiply'],
  ['/', 'divide'],
  ['^', 'raise'],
]);

/** One arithmetic step, `l op r`, with a located, plain message when it cannot be done. */
function operate(op: '+' | '-' | '*' | '/' | '^', l: Quantity, r: Quantity, span: SourceSpan, bag: DiagnosticBag): Quantity | undefined {
  if (op === '^' && isUnit(r)) {
    bag.error('bad-expression', `cannot raise ${describeQuantity(l)} and ${describeQuantity(r)}: an exponent must be a plain number`, span);
    return undefined;
  }
  return guard(
    () => {
      switch (op) {
        case '+':
          return math.add(l as never, r as never) as Quantity;
        case '-':
          return math.subtract(l as never, r as never) as Quantity;
        case '*':
          return math.multiply(l as never, r as never) as unknown as Quantity;
        case '/':
          return math.divide(l as never, r as never) as Quantity;
        case '^':
          return math.pow(l as never, r as never) as unknown as Quantity;
      }
    },
    span,
    bag,
    () => ({
      message: `cannot ${OPERATION.get(op)} ${describeQuantity(l)} and ${describeQuantity(r)}${op === '+' || op === '-' ? ': their units do not match' : ''}`,
    }),
  );
}

function describeAll(xs: Quantity[]): string {
  const names = xs.map(describeQuantity);
  return names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** A mathjs unit's value when it is a real number (a complex one is not), else undefined. */
function unitValue(u: Unit): number | undefined {
  const v = (u as unknown as { value: unknown }).value;
  return typeof v === 'number' ? v : undefined;
}

/** Builds a value, refusing what is not finite (`1e300 ohm * 1e300 ohm`). */
function finite(fn: () => Quantity, span: SourceSpan, bag: DiagnosticBag): Quantity | undefined {
  return guard(fn, span, bag, () => ({ message: 'this value cannot be evaluated' }));
}

/**
 * Runs one mathjs operation. Its own messages name its internal functions and types, so they are
 * never shown: a failure gets the plain message `what` gives instead, located at `span`.
 */
function guard(fn: () => Quantity, span: SourceSpan, bag: DiagnosticBag, what: () => { message: string; help?: string }): Quantity | undefined {
  let v: Quantity;
  try {
    v = fn();
  } catch {
    const { message, help } = what();
    bag.error('bad-expression', message, span, help);
    return undefined;
  }
  if (typeof v === 'number') {
    if (Number.isFinite(v)) return v;
    bag.error('bad-number', 'the result is not a finite number', span);
    return undefined;
  }
  if (!isUnit(v)) {
    bag.error('bad-number', 'the result is not a real number', span, 'complex results are not allowed in parameters');
    return undefined;
  }
  const value = unitValue(v);
  if (value === undefined) {
    bag.error('bad-number', 'the result is not a real number', span, 'complex results are not allowed in parameters');
    return undefined;
  }
  if (!Number.isFinite(value)) {
    bag.error('bad-number', 'the result is not a finite number', span);
    return undefined;
  }
  return v;
}

const QUANTITY_NAMES: [string, string][] = [
  ['ohm', 'a resistance (ohm)'],
  ['S', 'a conductance (S)'],
  ['F', 'a capacitance (F)'],
  ['H', 'an inductance (H)'],
  ['Hz', 'a frequency (Hz)'],
  ['s', 'a time (s)'],
  ['m', 'a length (m)'],
  ['rad', 'an angle (rad)'],
  ['W', 'a power (W)'],
  ['V', 'a voltage (V)'],
  ['A', 'a current (A)'],
];

/** Names the physical quantity of a value, e.g. "an inductance (H)", for messages. */
export function describeQuantity(x: Quantity): string {
  if (typeof x === 'number') return 'a plain number';
  for (const [u, name] of QUANTITY_NAMES) if (x.equalBase(math.unit(1, u))) return name;
  return `a quantity in ${x.formatUnits()}`;
}

/** What a unit's dimension is called: 'F' → 'capacitance (F)'. */
export function describeUnit(unit: string | null): string {
  if (unit === null) return 'a plain number';
  return describeQuantity(math.unit(1, unit));
}

/**
 * Converts a value to a plain number in SI units of `unit` (null: a dimensionless number).
 * A bare number means the SI base unit. On a wrong dimension, says what the value is instead.
 */
export function toSI(x: Quantity, unit: string | null): { value: number } | { error: string } {
  if (typeof x === 'number') return { value: x };
  const dimensionless = x.dimensions.every((d) => d === 0);
  if (unit === null) {
    if (dimensionless) return { value: (x as unknown as { value: number }).value };
    return { error: `it is ${describeQuantity(x)}` };
  }
  const want = math.unit(1, unit);
  if (!x.equalBase(want)) return { error: `it is ${describeQuantity(x)}` };
  return { value: x.toNumber(unit) };
}

/** Conversion factors of plain `number unit` literals, by unit and target: elaboration's fast path. */
const literalFactors = new Map<string, { factor: number } | { error: string }>();

/**
 * The SI value of a literal such as `4.7 pF` for a quantity in `unit`, without building a mathjs
 * value for each one: the factor of each unit is found once with mathjs and kept. Undefined when
 * the literal needs the general path (an unknown unit, a warning to give).
 */
export function literalToSI(value: number, unitName: string | undefined, unit: string | null): { value: number } | { error: string } | undefined {
  if (unitName === undefined) return { value };
  const name = normaliseUnit(unitName);
  if (name === 'mHz') return undefined;
  const key = `${name}\u0000${unit ?? ''}`;
  let f = literalFactors.get(key);
  if (!f) {
    const u = unitOf(name);
    if (!u) return undefined;
    const r = toSI(u, unit);
    f = 'error' in r ? r : { factor: r.value };
    literalFactors.set(key, f);
  }
  return 'error' in f ? f : { value: value * f.factor };
}

/** toSI of parameter values, kept per value object: a parameter used by many elements converts once. */
const convertedValues = new WeakMap<object, Map<string, { value: number } | { error: string }>>();

export function toSICached(x: Quantity, unit: string | null): { value: number } | { error: string } {
  if (typeof x === 'number') return { value: x };
  let m = convertedValues.get(x);
  if (!m) convertedValues.set(x, (m = new Map()));
  const key = unit ?? '';
  let r = m.get(key);
  if (!r) m.set(key, (r = toSI(x, unit)));
  return r;
}
