/**
 * Families of a design: the values of one or two design variables a `vary` run steps through,
 * read from the `--over` option, and the members (every combination) they give.
 *
 * The forms of `--over` (our own):
 *
 * | form                          | values                                                        |
 * |-------------------------------|---------------------------------------------------------------|
 * | `NAME=FROM..TO:COUNT`         | COUNT values evenly spaced from FROM to TO, both included     |
 * | `NAME=FROM..TO:COUNT:log`     | COUNT values in an even ratio: FROM·(TO/FROM)^(k/(COUNT−1))   |
 * | `NAME=V1,V2,…`                | the values listed, in that order (one value is a family of one)|
 *
 * Every value is a number with units as in a netlist (`1.5 pF`, `1.5pF`, `2.2e-12`; a value
 * without a unit is taken in the variable's SI unit), read with the netlist's own rules
 * (`evaluateQuantity`). COUNT is a whole number from 2 to {@link MAX_FAMILY_MEMBERS}. NAME must
 * be a design variable of the netlist (`let NAME = … vary LOW to HIGH`), and every value must lie
 * inside its range. Bad text gives an {@link InputError} whose diagnostics point into the option's
 * text (the option's name stands for the file name), every problem of the option at once.
 *
 * @module
 */

import { DiagnosticBag, InputError, type Diagnostic } from '../diagnostics/diagnostic.js';
import { didYouMean } from '../diagnostics/suggest.js';
import type { Variable } from '../elaborate/circuit.js';
import { MAX_FAMILY_MEMBERS } from '../limits.js';
import { evaluateQuantity } from '../load.js';
import type { NetworkData } from '../network/types.js';
import type { SpecResult } from '../check/types.js';

/** The spacing of an `--over` option. */
export type OverSpacing = 'linear' | 'log' | 'list';

/** One `--over` option, read. */
export interface OverAxis {
  /** The variable's name. */
  name: string;
  /** Its index in the variables given to {@link parseOver}. */
  index: number;
  /** The variable's SI unit (null: a plain number). */
  unit: string | null;
  spacing: OverSpacing;
  /** The values, SI units, in the order they are taken. */
  values: number[];
}

/** One member of a family: its place and the values of the varied variables. */
export interface FamilyMember {
  /** 0-based, in the order the members are evaluated (the last axis runs fastest). */
  index: number;
  /** The value of each axis' variable, in the order of the axes (SI units). */
  values: number[];
  /** `cshunt = 1.5 pF`, or `cshunt = 1.5 pF, lser = 6.2 nH` for two axes. */
  label: string;
}

/**
 * Reads one `--over` text against the netlist's design variables. `what` names the option in
 * messages and stands for the file name of the diagnostics (`--over`). Throws {@link InputError}.
 */
export function parseOver(text: string, variables: readonly Variable[], what = '--over'): OverAxis {
  const bag = new DiagnosticBag();
  const sources = new Map([[what, text]]);
  const span = (from: number, length: number) => ({ file: what, line: 1, column: Math.max(1, Math.min(from + 1, text.length)), length: Math.max(1, length) });
  const fail = (message: string, from: number, length: number, help?: string): never => {
    bag.error('bad-over', message, span(from, length), help);
    throw new InputError(bag.items, sources);
  };
  const forms = 'write NAME=FROM..TO:COUNT (even steps), NAME=FROM..TO:COUNT:log (even ratio) or NAME=V1,V2,… (a list)';
  if (/[\r\n]/.test(text)) fail(`${what} is one line of text`, Math.max(0, text.search(/[\r\n]/)), 1, forms);
  const eq = text.indexOf('=');
  if (eq < 0) fail(`${what} needs NAME=VALUES, but has no \`=\``, 0, text.length, forms);
  const rawName = text.slice(0, eq);
  const name = rawName.trim();
  const nameAt = rawName.length - rawName.trimStart().length;
  if (name === '') fail(`${what} names no variable before \`=\``, eq, 1, forms);
  const index = variables.findIndex((v) => v.name === name);
  if (index < 0) {
    const names = variables.map((v) => v.name);
    const hint = didYouMean(name, names);
    fail(
      `\`${name}\` is not a design variable of the netlist`,
      nameAt,
      name.length,
      hint ?? (names.length > 0 ? `the design variables are ${names.join(', ')}` : 'declare one in the netlist: let NAME = VALUE vary LOW to HIGH'),
    );
  }
  const v = variables[index]!;
  const body = text.slice(eq + 1);
  const bodyAt = eq + 1;
  if (body.trim() === '') fail(`${what} gives no values after \`${name}=\``, eq, 1, forms);

  // one value: its SI number, or a diagnostic located in the option's text
  const value = (from: number, piece: string): number | undefined => {
    const item = piece.trim();
    const at = from + (piece.length - piece.trimStart().length);
    if (item === '') {
      bag.error('bad-over', `${what} has an empty value`, span(from, Math.max(1, piece.length)), forms);
      return undefined;
    }
    try {
      return evaluateQuantity(item, v.unit, `${name} value`);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      for (const d of e.diagnostics) bag.add(moved(d, what, at, text.length));
      return undefined;
    }
  };

  const dots = body.indexOf('..');
  let spacing: OverSpacing;
  let values: number[] = [];
  const places: [number, number][] = []; // where each value was written (for range errors)
  if (dots < 0) {
    spacing = 'list';
    let start = 0;
    for (const piece of body.split(',')) {
      const x = value(bodyAt + start, piece);
      if (x !== undefined) {
        values.push(x);
        places.push([bodyAt + start + (piece.length - piece.trimStart().length), Math.max(1, piece.trim().length)]);
      }
      start += piece.length + 1;
    }
    if (!bag.hasErrors && values.length > MAX_FAMILY_MEMBERS) fail(`${what} lists ${values.length} values, more than the limit of ${MAX_FAMILY_MEMBERS}`, bodyAt, body.length);
  } else {
    const fromText = body.slice(0, dots);
    const rest = body.slice(dots + 2);
    const restAt = bodyAt + dots + 2;
    const parts = rest.split(':');
    if (parts.length < 2) fail(`${what} gives a range FROM..TO but no :COUNT`, restAt, rest.length, forms);
    if (parts.length > 3) {
      const extra = restAt + parts.slice(0, 3).join(':').length;
      fail(`${what} has too many \`:\` parts`, extra, rest.length - (extra - restAt), forms);
    }
    const [toText, countText, modeText] = parts as [string, string, string | undefined];
    spacing = 'linear';
    if (modeText !== undefined) {
      const mode = modeText.trim();
      const modeAt = restAt + toText.length + 1 + countText.length + 1;
      if (mode === 'log') spacing = 'log';
      else if (mode !== 'lin') bag.error('bad-over', `\`${mode || modeText}\` is no spacing: the spacings are lin (even steps, the default) and log (even ratio)`, span(modeAt, Math.max(1, modeText.length)), forms);
    }
    const from = value(bodyAt, fromText);
    const fromPlace: [number, number] = [bodyAt + (fromText.length - fromText.trimStart().length), Math.max(1, fromText.trim().length)];
    const to = value(restAt, toText);
    const toPlace: [number, number] = [restAt + (toText.length - toText.trimStart().length), Math.max(1, toText.trim().length)];
    const countAt = restAt + toText.length + 1;
    const c = countText.trim();
    let count = NaN;
    if (!/^\d{1,9}$/.test(c)) bag.error('bad-over', `COUNT must be a whole number of values, got \`${c}\``, span(countAt, Math.max(1, countText.length)), `e.g. ${name}=FROM..TO:5`);
    else {
      count = Number(c);
      if (count < 2) bag.error('bad-over', `COUNT must be at least 2 for a range (both ends are taken), got ${count}`, span(countAt, Math.max(1, countText.length)), `for a single value write ${name}=VALUE`);
      else if (count > MAX_FAMILY_MEMBERS) bag.error('bad-over', `COUNT ${count} is more than the limit of ${MAX_FAMILY_MEMBERS} members`, span(countAt, Math.max(1, countText.length)));
    }
    if (from !== undefined && to !== undefined && spacing === 'log' && !(from * to > 0)) {
      bag.error('bad-over', `a log range needs both ends of the same sign and not zero, got ${formatValue(from, v.unit)} and ${formatValue(to, v.unit)}`, span(bodyAt, body.length), 'use even steps (leave out :log)');
    }
    if (bag.hasErrors) throw new InputError(bag.items, sources);
    values = spacedValues(from!, to!, count, spacing as 'linear' | 'log');
    for (const x of values) places.push(x === from ? fromPlace : x === to ? toPlace : [bodyAt, body.length]);
  }
  if (bag.hasErrors) throw new InputError(bag.items, sources);
  // inside the variable's range
  const range = `${formatValue(v.lower, v.unit)} to ${formatValue(v.upper, v.unit)}`;
  const reported = new Set<string>();
  values.forEach((x, k) => {
    if (x >= v.lower && x <= v.upper) return;
    const [at, length] = places[k]!;
    const key = `${at}:${length}`;
    if (reported.has(key)) return;
    reported.add(key);
    bag.error('out-of-range', `${name} = ${formatValue(x, v.unit)} lies outside its range ${range}`, span(at, length), `pick values within ${range}, or widen the range in the netlist (vary LOW to HIGH)`);
  });
  if (bag.hasErrors) throw new InputError(bag.items, sources);
  return { name, index, unit: v.unit, spacing, values };
}

/**
 * COUNT values from `from` to `to` (both included): even steps, from + (to − from)·k/(COUNT − 1),
 * or an even ratio, from·(to/from)^(k/(COUNT − 1)) (common practice for a log sweep). The ends
 * are exactly `from` and `to`.
 */
export function spacedValues(from: number, to: number, count: number, spacing: 'linear' | 'log'): number[] {
  const out: number[] = [];
  for (let k = 0; k < count; k++) {
    if (k === 0) out.push(from);
    else if (k === count - 1) out.push(to);
    else if (spacing === 'log') out.push(from * Math.pow(to / from, k / (count - 1)));
    else out.push(from + ((to - from) * k) / (count - 1));
  }
  return out;
}

/**
 * The members of a family: every combination of the axes' values (the last axis runs fastest),
 * each labelled `name = value unit`. More than {@link MAX_FAMILY_MEMBERS} members in all is an
 * error naming the limit (located in the last option's text when `texts` are given).
 */
export function familyMembers(axes: readonly OverAxis[], texts?: readonly { what: string; text: string }[]): FamilyMember[] {
  if (axes.length === 0) return [];
  const names = new Set<string>();
  for (const [q, a] of axes.entries()) {
    if (names.has(a.name)) {
      const t = texts?.[q];
      throw new InputError(
        [{ severity: 'error', code: 'bad-over', message: `${a.name} is varied twice`, span: t ? { file: t.what, line: 1, column: 1, length: Math.max(1, t.text.length) } : undefined, help: 'give each variable one --over' }],
        t ? new Map([[t.what, t.text]]) : undefined,
      );
    }
    names.add(a.name);
  }
  const total = axes.reduce((n, a) => n * a.values.length, 1);
  if (total > MAX_FAMILY_MEMBERS) {
    const t = texts?.[texts.length - 1];
    throw new InputError(
      [
        {
          severity: 'error',
          code: 'bad-over',
          message: `the family has ${axes.map((a) => a.values.length).join(' × ')} = ${total} members, more than the limit of ${MAX_FAMILY_MEMBERS}`,
          span: t ? { file: t.what, line: 1, column: 1, length: Math.max(1, t.text.length) } : undefined,
          help: 'take fewer values',
        },
      ],
      t ? new Map([[t.what, t.text]]) : undefined,
    );
  }
  const out: FamilyMember[] = [];
  const pick = new Array<number>(axes.length).fill(0);
  for (let index = 0; index < total; index++) {
    let r = index;
    for (let q = axes.length - 1; q >= 0; q--) {
      pick[q] = r % axes[q]!.values.length;
      r = Math.floor(r / axes[q]!.values.length);
    }
    const values = axes.map((a, q) => a.values[pick[q]!]!);
    out.push({ index, values, label: axes.map((a, q) => `${a.name} = ${formatValue(values[q]!, a.unit)}`).join(', ') });
  }
  return out;
}

/** SI prefixes from tera to femto, largest first, with their factors (µ for micro). */
export const PREFIXES: readonly (readonly [number, string])[] = [
  [1e12, 'T'],
  [1e9, 'G'],
  [1e6, 'M'],
  [1e3, 'k'],
  [1, ''],
  [1e-3, 'm'],
  [1e-6, 'µ'],
  [1e-9, 'n'],
  [1e-12, 'p'],
  [1e-15, 'f'],
];

/** Units that take no SI prefix in a label. */
const UNPREFIXED = new Set(['dB', 'deg', 'rad']);

/**
 * A value in engineering notation with its unit, for people: `1.5 pF`, `6.2 nH`, `50 ohm`, `0.7`
 * (six significant digits, trailing zeros dropped; a plain number without prefix).
 */
export function formatValue(x: number, unit: string | null): string {
  if (!Number.isFinite(x)) return `${x}${unit ? ` ${unit}` : ''}`;
  if (unit === null || unit === '') return String(Number(x.toPrecision(6)));
  if (UNPREFIXED.has(unit) || x === 0) return `${Number(x.toPrecision(6))} ${unit}`;
  const a = Math.abs(x);
  let scale = 1;
  let prefix = '';
  if (a >= 1e-15 && a < 1e15) {
    for (const [s, p] of PREFIXES) {
      // the prefix whose mantissa, rounded to six digits, lies in [1, 1000)
      if (Number((a / s).toPrecision(6)) >= 1) {
        scale = s;
        prefix = p;
        break;
      }
    }
  }
  return `${Number((x / scale).toPrecision(6))} ${prefix}${unit}`;
}

/** A diagnostic of a value's own text, moved to where the value stands in the option's text. */
function moved(d: Diagnostic, what: string, offset: number, textLength: number): Diagnostic {
  if (!d.span) return d;
  const column = Math.max(1, Math.min(d.span.column + offset, Math.max(1, textLength)));
  return { ...d, span: { file: what, line: 1, column, length: Math.max(1, d.span.length) } };
}

/** What {@link evaluateFamily} needs of a design model (the public methods of `DesignModel`). */
export interface FamilyModel {
  readonly variables: readonly Variable[];
  setValues(values: Readonly<Record<string, number>>): void;
  solve(): NetworkData;
  checkSpecs(): SpecResult[];
}

/** One member evaluated: its network over the sweep and its spec results. */
export interface MemberResult extends FamilyMember {
  network: NetworkData;
  specs: SpecResult[];
}

/**
 * Evaluates every member on the same model: sets the axes' variables to the member's values,
 * solves the sweep and checks the specs. The model is left at the last member's values. An error
 * of a member (e.g. a singular system) is thrown as {@link FamilyMemberError}, naming the member.
 */
export function evaluateFamily(model: FamilyModel, axes: readonly OverAxis[], members: readonly FamilyMember[], onMember?: (done: number) => void): MemberResult[] {
  const out: MemberResult[] = [];
  for (const m of members) {
    const values: Record<string, number> = Object.create(null) as Record<string, number>;
    axes.forEach((a, q) => (values[a.name] = m.values[q]!));
    try {
      model.setValues(values);
      const network = model.solve();
      const specs = model.checkSpecs();
      out.push({ ...m, network, specs });
    } catch (e) {
      throw new FamilyMemberError(m, e);
    }
    onMember?.(out.length);
  }
  return out;
}

/** An error while evaluating one member of a family: `cause` is the error, `member` says which. */
export class FamilyMemberError extends Error {
  constructor(
    readonly member: FamilyMember,
    override readonly cause: unknown,
  ) {
    super(`at ${member.label} (member ${member.index + 1}): ${cause instanceof Error ? cause.message : String(cause)}`);
    this.name = 'FamilyMemberError';
  }
}
