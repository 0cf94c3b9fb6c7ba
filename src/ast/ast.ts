import type { SourceSpan } from '../diagnostics/diagnostic.js';

/** Expressions as written: numbers with optional units, names, calls and arithmetic. */
export type Expr =
  | { kind: 'number'; value: number; text: string; unit?: string; unitSpan?: SourceSpan; span: SourceSpan }
  | { kind: 'name'; name: string; span: SourceSpan }
  | { kind: 'call'; callee: string; args: Expr[]; span: SourceSpan }
  | { kind: 'unary'; op: '-' | '+'; operand: Expr; span: SourceSpan }
  | { kind: 'binary'; op: '+' | '-' | '*' | '/' | '^'; left: Expr; right: Expr; span: SourceSpan }
  /**
   * Operands joined left to right by operators of one precedence level: `a + b - c` (`+`, `-`) or
   * `a * b / c` (`*`, `/`), meaning `((a + b) - c)`. One node for the whole run, so that a sum of
   * ten thousand terms is not a tree ten thousand levels deep. (The grammar writes `^` as `binary`.)
   */
  | { kind: 'chain'; operands: Expr[]; ops: ('+' | '-' | '*' | '/')[]; span: SourceSpan };

/** A design variable's range: `vary LOW to HIGH [series E24 | step S]` after a `let` value. */
export interface RangeClause {
  lower: Expr;
  upper: Expr;
  /** `series E24`: the series name as written. */
  series?: { name: string; span: SourceSpan };
  step?: Expr;
  /** The `vary` word. */
  keywordSpan: SourceSpan;
  /** From `vary` to the end of the clause. */
  span: SourceSpan;
}

/**
 * A tolerance after a value, `tol [normal] AMOUNT [%] [cut K] [lot NAME]`, or a lot's own
 * (`lot caps tol normal 3%`).
 */
export interface ToleranceClause {
  /** `normal`: AMOUNT is a standard deviation; otherwise the half-width of a uniform spread. */
  normal: boolean;
  amount: Expr;
  /** `%` after the amount: relative to the value. */
  percent: boolean;
  /** `cut K`: a normal spread truncated at K standard deviations. */
  cut?: Expr;
  /** `lot NAME`: the part comes from that lot (shares its draw). */
  lot?: { name: string; span: SourceSpan };
  /** The `tol` word. */
  keywordSpan: SourceSpan;
  /** From `tol` to the end of the clause. */
  span: SourceSpan;
}

/** `key=value[, value…] [at expr] [range] [tolerance]`, or `key="text"` (then `values` is empty and `text` is set). */
export interface KeyArg {
  kind: 'key';
  key: string;
  keySpan: SourceSpan;
  values: Expr[];
  at?: Expr;
  /** `vary … to …`: the value is a design variable (only on `let`). */
  range?: RangeClause;
  /** `tol …`: the value's tolerance. */
  tolerance?: ToleranceClause;
  /** The quoted text of `key="text"`. */
  text?: { value: string; span: SourceSpan };
  span: SourceSpan;
}

/** A quoted string argument (used by `title`). */
export interface TextArg {
  kind: 'text';
  value: string;
  span: SourceSpan;
}

export type Arg = KeyArg | TextArg;

/** One statement: a leading keyword, an optional label (a name or a number) and arguments. */
export interface Statement {
  keyword: string;
  keywordSpan: SourceSpan;
  label?: { text: string; isNumber: boolean; span: SourceSpan };
  /** A tolerance of the statement's own, after the label (only `lot` takes one). */
  tolerance?: ToleranceClause;
  args: Arg[];
  span: SourceSpan;
}

export interface NetlistAst {
  file: string;
  statements: Statement[];
  /** Leading words of the lines that failed to parse (so that "no sweep" is not said of a broken one). */
  failedKeywords: string[];
}

/**
 * A plain line (one the fast path of ast/fast.ts reads) whose statement is built only when it is
 * used: a large netlist then never holds the AST of all its lines at once, and each statement's
 * objects are collected young, right after elaboration has read them.
 */
export interface PendingLine {
  /** The statement's keyword (known without reading the rest). */
  keyword: string;
  /** The line's text. */
  pending: string;
  line: number;
  file: string;
}

/** A statement, or a plain line to be read into one when it is used. */
export type StatementItem = Statement | PendingLine;

/** The netlist as the elaborator reads it: statements and pending plain lines, in line order. */
export interface NetlistItems {
  file: string;
  items: StatementItem[];
  failedKeywords: string[];
}

/** The text of a quoted string token: the quotes dropped, backslash escapes resolved (`\n`, `\t`, or the character itself). */
export function unquote(s: string): string {
  return s.slice(1, -1).replace(/\\(.)/g, (_, ch: string) => (ch === 'n' ? '\n' : ch === 't' ? '\t' : ch));
}

/** Span covering `a` through `b` when both lie on one line; otherwise `a`. */
export function joinSpans(a: SourceSpan, b: SourceSpan): SourceSpan {
  if (a.file !== b.file || a.line !== b.line) return a;
  const end = Math.max(a.column + a.length, b.column + b.length);
  return { file: a.file, line: a.line, column: a.column, length: end - a.column };
}

/** If the expression is a bare name (a node reference, say), its text. */
export function asName(e: Expr | undefined): string | undefined {
  return e && e.kind === 'name' ? e.name : undefined;
}
