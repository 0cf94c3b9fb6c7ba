import { createRequire } from 'node:module';
import type { MathJsInstance, Unit } from 'mathjs';
import type { Expr } from '../ast/ast.js';
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

const FUNCTIONS: Record<string, { arity: [number, number]; fn: (...a: Quantity[]) => Quantity }> = {
  sqrt: { arity: [1, 1], fn: (x) => math.sqrt(x as never) as Quantity },
  exp: { arity: [1, 1], fn: (x) => math.exp(x as never) as Quantity },
  ln: { arity: [1, 1], fn: (x) => math.log(x as never) as Quantity },
  log10: { arity: [1, 1], fn: (x) => math.log10(x as never) as Quantity },
  sin: { arity: [1, 1], fn: (x) => math.sin(x as never) as Quantity },
  cos: { arity: [1, 1], fn: (x) => math.cos(x as never) as Quantity },
  tan: { arity: [1, 1], fn: (x) => math.tan(x as never) as Quantity },
  atan: { arity: [1, 1], fn: (x) => math.atan(x as never) as Quantity },
  abs: { arity: [1, 1], fn: (x) => math.abs(x as never) as Quantity },
  min: { arity: [1, 64], fn: (...x) => math.min(...(x as never[])) as Quantity },
  max: { arity: [1, 64], fn: (...x) => math.max(...(x as never[])) as Quantity },
  round: { arity: [1, 1], fn: (x) => math.round(x as never) as Quantity },
};

const CONSTANTS: Record<string, number> = { pi: Math.PI, e: Math.E };

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
  try {
    return math.unit(1, normaliseUnit(text));
  } catch {
    return undefined;
  }
}

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

/**
 * Evaluates an expression with mathjs arithmetic, units carried through. Reports problems into
 * `bag` at the offending sub-expression and returns undefined on error.
 */
export function evaluate(e: Expr, scope: EvalScope, bag: DiagnosticBag): Quantity | undefined {
  switch (e.kind) {
    case 'number': {
      if (!Number.isFinite(e.value)) {
        bag.error('bad-number', `\`${e.text}\` is not a finite number`, e.span);
        return undefined;
      }
      if (e.unit === undefined) return e.value;
      const name = normaliseUnit(e.unit);
      const u = unitOf(name);
      if (!u) {
        let help: string | undefined;
        if (scope.lookup(e.unit) !== undefined) {
          scope.used?.(e.unit);
          help = `to multiply by the parameter, write \`${e.text}*${e.unit}\``;
        } else help = didYouMean(e.unit, COMMON_UNITS);
        bag.error('unknown-unit', `unknown unit \`${e.unit}\``, e.unitSpan ?? e.span, help);
        return undefined;
      }
      if (name === 'mHz') {
        bag.warning('millihertz', '`mHz` is millihertz (SI prefixes are case-sensitive)', e.unitSpan ?? e.span, 'for megahertz write `MHz`');
      }
      return math.unit(e.value, name);
    }
    case 'name': {
      const v = scope.lookup(e.name);
      if (v !== undefined) {
        scope.used?.(e.name);
        return v === null ? undefined : v;
      }
      if (e.name in CONSTANTS) return CONSTANTS[e.name]!;
      const why = scope.explainMissing?.(e.name);
      const help = why ?? didYouMean(e.name, [...scope.names(), ...Object.keys(CONSTANTS)]);
      bag.error('unknown-parameter', `unknown parameter \`${e.name}\``, e.span, help);
      return undefined;
    }
    case 'call': {
      const f = FUNCTIONS[e.callee];
      if (!f) {
        bag.error('unknown-function', `unknown function \`${e.callee}\``, e.span, didYouMean(e.callee, Object.keys(FUNCTIONS)));
        return undefined;
      }
      const args = e.args.map((a) => evaluate(a, scope, bag));
      if (args.some((a) => a === undefined)) return undefined;
      if (args.length < f.arity[0] || args.length > f.arity[1]) {
        bag.error('bad-call', `\`${e.callee}\` takes ${f.arity[0] === f.arity[1] ? f.arity[0] : `${f.arity[0]} or more`} argument(s), got ${args.length}`, e.span);
        return undefined;
      }
      return guard(() => f.fn(...(args as Quantity[])), e.span, bag, `\`${e.callee}\``);
    }
    case 'unary': {
      const x = evaluate(e.operand, scope, bag);
      if (x === undefined) return undefined;
      return e.op === '-' ? (math.unaryMinus(x as never) as Quantity) : x;
    }
    case 'binary': {
      // `0.5 dB/m`, `3 V*s`: a unit right after a number may be divided or multiplied by a further
      // unit name, when no parameter has that name.
      if ((e.op === '/' || e.op === '*') && e.left.kind === 'number' && e.left.unit !== undefined && e.right.kind === 'name' && scope.lookup(e.right.name) === undefined && scope.explainMissing?.(e.right.name) === undefined) {
        const compound = `${normaliseUnit(e.left.unit)}${e.op}${normaliseUnit(e.right.name)}`;
        if (unitOf(e.left.unit) && unitOf(e.right.name)) return math.unit(e.left.value, compound);
      }
      const l = evaluate(e.left, scope, bag);
      const r = evaluate(e.right, scope, bag);
      if (l === undefined || r === undefined) return undefined;
      const opName = { '+': 'add', '-': 'subtract', '*': 'multiply', '/': 'divide', '^': 'raise' }[e.op];
      return guard(
        () => {
          switch (e.op) {
            case '+':
              return math.add(l as never, r as never) as Quantity;
            case '-':
              return math.subtract(l as never, r as never) as Quantity;
            case '*':
              return math.multiply(l as never, r as never) as unknown as Quantity;
            case '/':
              return math.divide(l as never, r as never) as Quantity;
            case '^':
              if (isUnit(r)) throw new Error('an exponent must be a plain number');
              return math.pow(l as never, r as never) as unknown as Quantity;
          }
        },
        e.span,
        bag,
        `cannot ${opName} ${describeQuantity(l)} and ${describeQuantity(r)}`,
      );
    }
  }
}

function guard(fn: () => Quantity, span: SourceSpan, bag: DiagnosticBag, what: string): Quantity | undefined {
  try {
    const v = fn();
    if (typeof v === 'number' && !Number.isFinite(v)) {
      bag.error('bad-number', `the result is not a finite number`, span);
      return undefined;
    }
    if (typeof v !== 'number' && !isUnit(v)) {
      bag.error('bad-number', `the result is not a real number`, span, 'complex results are not allowed in parameters');
      return undefined;
    }
    return v;
  } catch (err) {
    const m = (err as Error).message;
    bag.error('bad-expression', /match|dimension/i.test(m) ? `${what}: their units do not match` : `${what}: ${m}`, span);
    return undefined;
  }
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
