/**
 * The fast path of the AST stage: most lines of a large netlist are plain statements (a keyword,
 * a name, `key=value` arguments whose values are numbers with units, names or quoted strings,
 * lists of those and `at` frequencies). Such a line is read here straight into its AST, with the
 * grammar's own token patterns and precedence, and without building a CST. Every other line —
 * one with an operator, a parenthesis, a backslash, anything unexpected, or a shape this reader
 * does not know — is left to the grammar (parse/parser.ts) and its visitor, which stay the
 * definition of the language: on the lines this reader takes, both give the same AST (checked in
 * test/fast-path.test.ts over every demo netlist and over random lines).
 *
 * @module
 */
import type { SourceSpan } from '../diagnostics/diagnostic.js';
import { stringBodyEnd } from '../parse/scan.js';
import { joinSpans, unquote, type Arg, type Expr, type Statement, type StatementItem } from './ast.js';

// the grammar's token patterns (parse/lexer.ts), sticky
const NUMBER = /(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/y;
const IDENT = /[A-Za-z_\u00B5\u03BC\u03A9\u2126][A-Za-z0-9_\u00B5\u03BC\u03A9\u2126]*/y;

const T_IDENT = 0;
const T_NUMBER = 1;
const T_STRING = 2;
const T_EQUALS = 3;
const T_COMMA = 4;
const T_AT = 5;

/** What {@link readSimpleLine} found. */
export const BLANK = 0;

/** Token scratch, reused line after line (the reader is not re-entrant). */
const kinds: number[] = [];
const starts: number[] = [];
const images: string[] = [];

/**
 * Tokenises one physical line (no line break in it) with the grammar's patterns. Returns the
 * token count, or −1 when the line holds anything the fast path leaves to the grammar.
 */
function tokenize(line: string): number {
  let n = 0;
  let i = 0;
  const len = line.length;
  while (i < len) {
    const ch = line.charCodeAt(i);
    if (ch === 32 || ch === 9) {
      i++;
      continue;
    }
    if (ch === 35) break; // '#': a comment to the end of the line
    let kind: number;
    let end: number;
    if (ch === 61) {
      kind = T_EQUALS;
      end = i + 1;
    } else if (ch === 44) {
      kind = T_COMMA;
      end = i + 1;
    } else if (ch === 34) {
      const close = stringBodyEnd(line, i);
      if (close >= len || line.charCodeAt(close) !== 34) return -1; // a string left open: the grammar reports it
      kind = T_STRING;
      end = close + 1;
    } else if ((ch >= 48 && ch <= 57) || ch === 46) {
      NUMBER.lastIndex = i;
      if (!NUMBER.test(line)) return -1;
      kind = T_NUMBER;
      end = NUMBER.lastIndex;
    } else {
      IDENT.lastIndex = i;
      if (!IDENT.test(line)) return -1; // operators, parentheses, backslashes, stray characters
      end = IDENT.lastIndex;
      // `at` is its own token unless it begins a longer name (the grammar's longer alternative)
      kind = end - i === 2 && ch === 97 && line.charCodeAt(i + 1) === 116 ? T_AT : T_IDENT;
    }
    kinds[n] = kind;
    starts[n] = i;
    // punctuation needs no text of its own
    images[n] = kind === T_EQUALS ? '=' : kind === T_COMMA ? ',' : line.slice(i, end);
    n++;
    i = end;
  }
  // sentinels, so that looking one or two tokens past the end needs no bounds test
  kinds[n] = -1;
  kinds[n + 1] = -1;
  return n;
}

/**
 * `vary`, `to`, `series`, `step` (the grammar's range words) and `tol`, `normal`, `cut`, `lot`
 * (its tolerance words) end a value: never a unit. A line that goes on with one of them after a
 * value is not plain: the grammar reads it.
 */
function isRangeWord(w: string): boolean {
  return w === 'vary' || w === 'to' || w === 'series' || w === 'step' || w === 'tol' || w === 'normal' || w === 'cut' || w === 'lot';
}

function span(file: string, lineNo: number, t: number): SourceSpan {
  return { file, line: lineNo, column: starts[t]! + 1, length: Math.max(1, images[t]!.length) };
}

/** The value read last by {@link readValue}. */
let value: Expr | undefined;

/**
 * Reads one value at token t: a number with an optional unit, or a name. Returns the token after
 * it, or −1 when it is not that simple. (A function of its own, not a closure over the line's
 * state: the reader's position then stays in a register.)
 */
function readValue(t: number, n: number, file: string, lineNo: number): number {
  const kind = kinds[t];
  if (kind === T_NUMBER) {
    const text = images[t]!;
    const at0 = t;
    t++;
    // a unit is a name right after the number that is not a key (`=`) or a call (`(`, never here)
    if (t < n && kinds[t] === T_IDENT && kinds[t + 1] !== T_EQUALS && !isRangeWord(images[t]!)) {
      const unitSpan = span(file, lineNo, t);
      // the span from the number to the end of its unit (joinSpans of the two, without the first)
      const column = starts[at0]! + 1;
      const end = Math.max(column + Math.max(1, text.length), unitSpan.column + unitSpan.length);
      value = { kind: 'number', value: Number(text), text, unit: images[t]!, unitSpan, span: { file, line: lineNo, column, length: end - column } };
      return t + 1;
    }
    value = { kind: 'number', value: Number(text), text, unit: undefined, unitSpan: undefined, span: span(file, lineNo, at0) };
    return t;
  }
  if (kind === T_IDENT) {
    value = { kind: 'name', name: images[t]!, span: span(file, lineNo, t) };
    return t + 1;
  }
  return -1;
}

/**
 * Reads one physical line. Returns its statement, {@link BLANK} for a line with no statement (empty
 * or a comment), or undefined when the line is for the grammar to read.
 */
export function readSimpleLine(line: string, lineNo: number, file: string): Statement | typeof BLANK | undefined {
  const n = tokenize(line);
  if (n < 0) return undefined;
  if (n === 0) return BLANK;
  if (kinds[0] !== T_IDENT) return undefined;
  const keywordSpan = span(file, lineNo, 0);
  let t = 1;
  let label: Statement['label'];
  if (t < n && (kinds[t] === T_IDENT || kinds[t] === T_NUMBER) && kinds[t + 1] !== T_EQUALS) {
    label = { text: images[t]!, isNumber: kinds[t] === T_NUMBER, span: span(file, lineNo, t) };
    t++;
  }
  const args: Arg[] = [];
  while (t < n) {
    if (kinds[t] === T_STRING) {
      args.push({ kind: 'text', value: unquote(images[t]!), span: span(file, lineNo, t) });
      t++;
      continue;
    }
    if (kinds[t] !== T_IDENT || kinds[t + 1] !== T_EQUALS) return undefined;
    const keyTok = t;
    const keySpan = span(file, lineNo, t);
    t += 2;
    if (t >= n) return undefined;
    if (kinds[t] === T_STRING) {
      const textSpan = span(file, lineNo, t);
      args.push({ kind: 'key', key: images[keyTok]!, keySpan, values: [], text: { value: unquote(images[t]!), span: textSpan }, span: joinSpans(keySpan, textSpan) });
      t++;
      continue;
    }
    t = readValue(t, n, file, lineNo);
    if (t < 0) return undefined;
    const values: Expr[] = [value!];
    while (t < n && kinds[t] === T_COMMA) {
      t++;
      if (t >= n) return undefined;
      t = readValue(t, n, file, lineNo);
      if (t < 0) return undefined;
      values.push(value!);
    }
    let at: Expr | undefined;
    if (t < n && kinds[t] === T_AT) {
      t++;
      if (t >= n) return undefined;
      t = readValue(t, n, file, lineNo);
      if (t < 0) return undefined;
      at = value!;
    }
    // what follows a value must start the next argument (or end the line)
    if (t < n && kinds[t] !== T_STRING && !(kinds[t] === T_IDENT && kinds[t + 1] === T_EQUALS)) return undefined;
    const lastExpr = at ?? values[values.length - 1]!;
    args.push({ kind: 'key', key: images[keyTok]!, keySpan, values, at, span: joinSpans(keySpan, lastExpr.span) });
  }
  value = undefined;
  let stSpan = keywordSpan;
  const last = args[args.length - 1];
  if (last) stSpan = joinSpans(stSpan, last.span);
  return { keyword: images[0]!, keywordSpan, label, args, span: stSpan };
}

/** The statement of an item: a pending line is read now (it was found plain when parsed). */
export function statementOf(item: StatementItem): Statement {
  if (!('pending' in item)) return item;
  const st = readSimpleLine(item.pending, item.line, item.file);
  if (st === undefined || st === BLANK) throw new Error(`internal: line ${item.line} of ${item.file} no longer reads as a plain statement`);
  return st;
}

const keywords = new Map<string, string>();
/** One string per distinct keyword, so that pending lines share theirs. */
export function internKeyword(k: string): string {
  let s = keywords.get(k);
  if (s === undefined) {
    if (keywords.size > 1000) keywords.clear();
    keywords.set(k, k);
    s = k;
  }
  return s;
}
