/**
 * The elements pass: an element statement checked against its type's schema (terminals, number
 * and text properties, `at` frequencies, the type's own checks) and added to the circuit; the
 * numbers that follow design variables become pending bindings, turned into the circuit's
 * bindings (element index, property, compiled value) by `elementBindings` at the end. The walk
 * (passes/walk.ts) calls `defineElement` for each element line, in netlist order.
 *
 * @module
 */
import { dirname, isAbsolute, join } from 'node:path';
import type { KeyArg, Statement } from '../../ast/ast.js';
import { didYouMean } from '../../diagnostics/suggest.js';
import { GROUND, GROUND_NAME, type ElementInstance, type ElementType, type TerminalSpec } from '../../elements/types.js';
import type { NetworkData } from '../../network/types.js';
import { atArg, keyArgs, numberArg } from '../args.js';
import type { ValueBinding } from '../circuit.js';
import { nodeArg, useNode } from '../nodes.js';
import { DataFileError, ReportedError, type Context, type ElabState } from '../state.js';
import { signOk } from '../values.js';
import { elementTolerance, toleranceAllowedHere } from './tolerances.js';

/** Shared by the elements with no `at` frequencies or no text properties (most of them). */
const NONE_AT: Record<string, number> = Object.freeze({}) as Record<string, number>;
const NONE_TEXT: Record<string, string> = Object.freeze({}) as Record<string, string>;

/** What defineElement needs of an element type, worked out once per type. */
interface TypeFacts {
  what: string;
  textKeys: readonly string[];
  /** Every key the type takes (for types whose terminals do not depend on their data). */
  allowed: string[];
}
const typeFactsCache = new Map<ElementType, TypeFacts>();
function typeFacts(type: ElementType): TypeFacts {
  let f = typeFactsCache.get(type);
  if (!f) {
    const textKeys = (type.textProperties ?? []).map((p) => p.key);
    f = { what: `\`${type.keyword}\``, textKeys, allowed: [...type.terminals.map((t) => t.key), ...type.properties.map((p) => p.key), ...textKeys] };
    typeFactsCache.set(type, f);
  }
  return f;
}

/** The full name of an element or instance (with the instance path), or undefined if taken (reported). */
export function claimName(s: ElabState, label: NonNullable<Statement['label']>, ctx: Context): string | undefined {
  const name = ctx.prefix + label.text;
  const prev = s.elementNames.get(name);
  if (prev) {
    s.bag.error('duplicate-name', `an element named \`${name}\` exists already (line ${prev.line})`, label.span);
    return undefined;
  }
  s.elementNames.set(name, label.span);
  return name;
}

/** Reads a data file for the statement `st`; a failure becomes an error at its `file=` (and in the file). */
function readNetworkFor(s: ElabState, st: Statement, path: string): NetworkData {
  const read = s.options.readNetwork;
  if (!read) throw new DataFileError('network-data files cannot be read here (no reader was given)');
  const full = isAbsolute(path) ? path : join(dirname(st.span.file), path);
  try {
    return read(full);
  } catch (e) {
    const fileArg = st.args.find((a) => a.kind === 'key' && a.key === 'file');
    const at = fileArg && fileArg.kind === 'key' ? (fileArg.text?.span ?? fileArg.span) : st.span;
    if (e instanceof DataFileError && e.place) {
      s.bag.error('bad-data-file', e.message, e.place);
      s.bag.error('bad-data-file', `the network-data file ${JSON.stringify(path)} is malformed (see above)`, at);
    } else {
      const code = (e as NodeJS.ErrnoException).code;
      s.bag.error('bad-data-file', `cannot read ${JSON.stringify(path)}: ${code === 'ENOENT' ? 'no such file' : (e as Error).message}`, at, code === 'ENOENT' && !isAbsolute(path) ? `the path is relative to ${dirname(st.span.file) || '.'}` : undefined);
    }
    throw new ReportedError();
  }
}

export function defineElement(s: ElabState, st: Statement, type: ElementType, ctx: Context): void {
  const { what, textKeys, allowed: fixedAllowed } = typeFacts(type);
  if (!st.label || st.label.isNumber) {
    s.bag.error('missing-name', `${what} needs a name after the keyword`, st.label?.span ?? st.keywordSpan, `e.g. \`${type.example}\``);
    return;
  }
  const name = claimName(s, st.label, ctx);
  if (name === undefined) return;
  // Terminals may depend on the text properties (a data file's ports): allow any key that looks
  // like one until they are known.
  let terminals: readonly TerminalSpec[] = type.terminals;
  const el: ElementInstance = { type: type.keyword, name, nodes: [], nodeNames: [], props: {}, at: NONE_AT, span: st.span, text: NONE_TEXT };
  let ok = true;
  if (type.resolve) {
    // the text properties alone, read quietly: the full check of every key follows
    const pre = new Map<string, KeyArg>();
    for (const a of st.args) if (a.kind === 'key' && textKeys.includes(a.key) && !pre.has(a.key)) pre.set(a.key, a);
    s.suggestedKeys = new Set();
    if (!readText(pre)) return;
    const fail = (message: string, key?: string, help?: string) => s.bag.error('bad-element', message, (key && pre.get(key)?.span) || st.label!.span, help);
    const resolved = type.resolve(el, { readNetwork: (path) => readNetworkFor(s, st, path), fail });
    if (!resolved) return;
    terminals = resolved;
  }
  const allowed = type.resolve ? [...terminals.map((t) => t.key), ...type.properties.map((p) => p.key), ...textKeys] : fixedAllowed;
  const args = keyArgs(s, st, allowed, what, textKeys);
  if (!type.resolve && !readText(args)) return;

  function readText(found: Map<string, KeyArg>): boolean {
    for (const p of type.textProperties ?? []) {
      const a = found.get(p.key);
      if (!a) {
        if (p.required) {
          if (!s.suggestedKeys.has(p.key)) s.bag.error('missing-property', `${what} \`${name}\` needs \`${p.key}\` (${p.doc})`, st.label!.span, p.choices ? `one of: ${p.choices.join(', ')}` : `add \`${p.key}="…"\``);
          return false;
        }
        if (p.defaultValue !== undefined) (el.text === NONE_TEXT ? (el.text = {}) : el.text)[p.key] = p.defaultValue;
        continue;
      }
      const bare = a.values.length === 1 && a.values[0]!.kind === 'name' && !a.at ? (a.values[0] as { name: string }).name : undefined;
      if (!a.text && !p.choices && bare !== undefined) {
        // a file name (or other text) written without quotes
        s.bag.error('bad-value', `\`${p.key}\` takes a quoted string: ${p.key === 'file' ? 'file names are quoted' : 'text is quoted'}`, a.values[0]!.span, `write \`${p.key}="${bare}"\``);
        return false;
      }
      if (a.tolerance) {
        s.bag.error('tol-misplaced', `\`${p.key}\` is text: it has no tolerance`, a.tolerance.keywordSpan, 'a tolerance belongs after a number of the part, e.g. `value=2.2 pF tol 5%`');
        return false;
      }
      const word = a.text?.value ?? bare;
      if (word === undefined) {
        s.bag.error('bad-value', p.choices ? `\`${p.key}\` is one of: ${p.choices.join(', ')}` : `\`${p.key}\` takes a quoted string`, a.span, p.choices ? undefined : `write \`${p.key}="…"\``);
        return false;
      }
      if (p.choices && !p.choices.includes(word)) {
        s.bag.error('bad-value', `\`${p.key}\` is one of: ${p.choices.join(', ')}`, a.text?.span ?? a.values[0]!.span, didYouMean(word, p.choices));
        return false;
      }
      (el.text === NONE_TEXT ? (el.text = {}) : el.text)[p.key] = word;
    }
    return true;
  }
  for (const t of terminals) {
    const a = args.get(t.key);
    if (!a) {
      if (s.suggestedKeys.has(t.key)) {
        ok = false;
        continue;
      }
      if (t.defaultNode !== undefined) {
        el.nodes.push(t.defaultNode === GROUND_NAME ? GROUND : useNode(s, ctx.prefix + t.defaultNode, st.label.span, name, false));
        el.nodeNames.push(t.defaultNode);
        continue;
      }
      s.bag.error('missing-terminal', `${what} \`${name}\` needs terminal \`${t.key}\` (${t.doc})`, st.label.span, `add \`${t.key}=<node>\``);
      ok = false;
      continue;
    }
    if (a.tolerance) {
      s.bag.error('tol-misplaced', `\`${t.key}\` is a node: a node has no tolerance`, a.tolerance.keywordSpan, 'a tolerance belongs after a number of the part, e.g. `value=2.2 pF tol 5%`');
      ok = false;
    }
    const n = nodeArg(s, a, name, false, ctx);
    if (n === undefined) ok = false;
    el.nodes.push(n ?? GROUND);
    el.nodeNames.push((a.values[0] as { name?: string }).name ?? '?');
  }
  for (const p of type.properties) {
    const a = args.get(p.key);
    if (!a) {
      if (p.required && s.suggestedKeys.has(p.key)) ok = false;
      else if (p.required) {
        s.bag.error('missing-property', `${what} \`${name}\` needs \`${p.key}\` (${p.doc})`, st.label.span, `add \`${p.key}=<${p.quantity}>\``);
        ok = false;
      } else if (p.defaultValue !== undefined) el.props[p.key] = p.defaultValue;
      continue;
    }
    if (a.at && !p.takesAt) {
      s.bag.error('unexpected-at', `\`${p.key}\` does not take \`at\``, a.at.span);
      ok = false;
    }
    if (p.takesAt && !a.at) {
      s.bag.error('missing-at', `\`${p.key}\` needs the frequency it holds at`, a.span, `write e.g. \`${p.key}=40 at 433 MHz\``);
      ok = false;
    }
    const v = numberArg(s, a, p.unit, p.quantity, ctx, (value, span) => s.pendingBindings.push({ el, target: 'prop', key: p.key, value, span }));
    if (v === undefined) {
      ok = false;
      continue;
    }
    if (!signOk(p, v)) {
      s.bag.error('bad-value', `\`${p.key}\` must be ${p.sign === 'positive' ? 'above zero' : p.sign === 'nonnegative' ? 'zero or more' : 'other than zero'}`, a.values[0]!.span);
      ok = false;
    }
    el.props[p.key] = v;
    if (a.tolerance && toleranceAllowedHere(s, a.tolerance, ctx)) elementTolerance(s, a.tolerance, ctx, el, p.key, p.unit, v);
    if (p.takesAt && a.at) {
      const f = atArg(s, a, ctx, (value, span) => s.pendingBindings.push({ el, target: 'at', key: p.key, value, span }));
      if (f === undefined) ok = false;
      else (el.at === NONE_AT ? (el.at = {}) : el.at)[p.key] = f;
    }
  }
  if (!ok) return;
  // exact-length arrays (an array grown by push keeps room for 16): a large netlist keeps them all
  el.nodes = el.nodes.slice();
  el.nodeNames = el.nodeNames.slice();
  let valid = true;
  type.validate?.(el, (message, key, help) => {
    valid = false;
    s.bag.error('bad-element', message, (key && args.get(key)?.span) || st.label!.span, help);
  });
  if (!valid) return;
  if (el.nodes.length === 2 && el.nodes[0] === el.nodes[1]) {
    const node = el.nodes[0] === GROUND ? GROUND_NAME : s.nodeNames[el.nodes[0]!]!;
    s.bag.warning('shorted-element', `both terminals of \`${name}\` are on node \`${node}\`: it has no effect`, st.span);
  }
  s.elements.push(el);
}

/** The element numbers that follow the variables, by element index (elements that failed are left out). */
export function elementBindings(s: ElabState): ValueBinding[] {
  const bindings: ValueBinding[] = [];
  if (s.pendingBindings.length > 0) {
    const index = new Map(s.elements.map((e, i) => [e, i]));
    for (const b of s.pendingBindings) {
      const element = index.get(b.el);
      if (element !== undefined) bindings.push({ element, target: b.target, key: b.key, value: b.value, span: b.span });
    }
  }
  return bindings;
}
