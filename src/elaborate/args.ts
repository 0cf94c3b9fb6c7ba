/**
 * Reading a statement's arguments, shared by the passes: the `key=value` arguments against the
 * keys a statement takes, and number arguments (and `at` frequencies) in SI units.
 *
 * @module
 */
import type { KeyArg, Statement } from '../ast/ast.js';
import type { SourceSpan } from '../diagnostics/diagnostic.js';
import { closest } from '../diagnostics/suggest.js';
import type { Compiled } from '../params/compile.js';
import { evaluate, literalToSI, toSICached } from './evaluate.js';
import { evalScope, follow, unfollowedBy } from './passes/parameters.js';
import type { Context, ElabState } from './state.js';
import { article, unitHelp } from './values.js';

/**
 * The statement's `key=value` arguments by key; unknown, repeated and misplaced ones are
 * reported (a misspelt key is remembered in `s.suggestedKeys`, so that no "missing" error
 * follows for the key it was taken to mean).
 */
export function keyArgs(s: ElabState, st: Statement, allowed: string[], what: string, textKeys: readonly string[] = []): Map<string, KeyArg> {
  const m = new Map<string, KeyArg>();
  if (s.suggestedKeys.size > 0) s.suggestedKeys = new Set<string>();
  for (const a of st.args) {
    if (a.kind !== 'key') {
      s.bag.error('unexpected-text', `a quoted string is not an argument of ${what}`, a.span);
      continue;
    }
    if (a.text && allowed.includes(a.key) && !textKeys.includes(a.key)) {
      s.bag.error('unexpected-text', `\`${a.key}\` takes a value, not a quoted string`, a.text.span);
      continue;
    }
    if (!allowed.includes(a.key)) {
      const given = new Set(st.args.map((x) => (x.kind === 'key' ? x.key : '')));
      const near = closest(a.key, allowed.filter((k) => !given.has(k)));
      if (near) s.suggestedKeys.add(near);
      s.bag.error('unknown-argument', `${what} has no argument \`${a.key}\``, a.keySpan, near ? `did you mean \`${near}\`?` : `its arguments are: ${allowed.join(', ')}`);
      continue;
    }
    if (m.has(a.key)) {
      s.bag.error('duplicate-argument', `\`${a.key}\` is given twice`, a.keySpan);
      continue;
    }
    m.set(a.key, a);
  }
  return m;
}

/**
 * A number argument in SI units of `unit`. Where it depends on a design variable, its compiled
 * form goes to `onFollow` (an element's number), or, without one, it is recorded as not followed.
 */
export function numberArg(s: ElabState, a: KeyArg, unit: string | null, quantity: string, ctx: Context, onFollow?: (c: Compiled, span: SourceSpan) => void): number | undefined {
  if (a.values.length !== 1) {
    s.bag.error('bad-value', `\`${a.key}\` takes one value`, a.span);
    return undefined;
  }
  const e = a.values[0]!;
  let r: { value: number } | { error: string } | undefined;
  if (e.kind === 'number' && Number.isFinite(e.value)) r = literalToSI(e.value, e.unit, unit);
  if (!r) {
    const q = evaluate(e, evalScope(s, ctx), s.bag, unit);
    if (q === undefined) return undefined;
    r = toSICached(q, unit);
    if (!('error' in r) && (s.variables.length > 0 || s.randomInputs.length > 0)) {
      const c = follow(s, e, ctx, `\`${a.key}\``);
      if (c && onFollow) onFollow(c, e.span);
      else if (c) unfollowedBy(s, c.deps.some((d) => d >= 0), { what: `\`${a.key}\``, span: e.span, reason: 'only the numbers of elements follow the variables' });
    }
  }
  if ('error' in r) {
    s.bag.error('wrong-unit', `\`${a.key}\` must be ${unit === null ? 'a plain number' : article(quantity) + ` (${unit})`}, but ${r.error}`, a.values[0]!.span, unitHelp(unit));
    return undefined;
  }
  if (!Number.isFinite(r.value)) {
    s.bag.error('bad-value', `\`${a.key}\` is not finite`, a.values[0]!.span);
    return undefined;
  }
  return r.value;
}

/** The frequency after `at` in SI units (undefined without one, or reported). */
export function atArg(s: ElabState, a: KeyArg, ctx: Context, onFollow?: (c: Compiled, span: SourceSpan) => void): number | undefined {
  if (!a.at) return undefined;
  const e = a.at;
  // plain literals (`at 433 MHz`) through the cached unit factors, like numberArg
  let r = e.kind === 'number' && Number.isFinite(e.value) ? literalToSI(e.value, e.unit, 'Hz') : undefined;
  if (!r) {
    const q = evaluate(e, evalScope(s, ctx), s.bag, 'Hz');
    if (q === undefined) return undefined;
    r = toSICached(q, 'Hz');
    if (!('error' in r) && (s.variables.length > 0 || s.randomInputs.length > 0)) {
      const c = follow(s, e, ctx, `the frequency after \`at\``);
      if (c) onFollow?.(c, e.span);
    }
  }
  if ('error' in r) {
    s.bag.error('wrong-unit', `the value after \`at\` must be a frequency (Hz), but ${r.error}`, a.at.span, unitHelp('Hz'));
    return undefined;
  }
  if (!Number.isFinite(r.value) || r.value < 0) {
    s.bag.error('bad-value', `the frequency after \`at\` must be a finite frequency of 0 Hz or more`, a.at.span);
    return undefined;
  }
  return r.value;
}
