import type { CstNode, IToken, IRecognitionException } from 'chevrotain';
import { parseLines, type ParsedLine } from '../parse/parser.js';
import { RANGE_WORDS } from '../parse/lexer.js';
import { MAX_EXPRESSION_DEPTH } from '../limits.js';
import { DiagnosticBag, type Diagnostic, type SourceSpan } from '../diagnostics/diagnostic.js';
import { joinSpans, unquote, type Arg, type Expr, type NetlistAst, type NetlistItems, type PendingLine, type RangeClause, type Statement, type ToleranceClause, type StatementItem } from './ast.js';
import { BLANK, internKeyword, readSimpleLine, statementOf } from './fast.js';

type Children = Record<string, (CstNode | IToken)[] | undefined>;

function tokSpan(file: string, t: IToken): SourceSpan {
  return { file, line: t.startLine ?? 1, column: t.startColumn ?? 1, length: Math.max(1, t.image.length) };
}

/** Shared for absent children, so that reading a CST allocates nothing for what is not there. */
const NONE: readonly never[] = Object.freeze([]);

function nodes(c: Children, key: string): readonly CstNode[] {
  return (c[key] ?? NONE) as readonly CstNode[];
}
function toks(c: Children, key: string): readonly IToken[] {
  return (c[key] ?? NONE) as readonly IToken[];
}

/** Turns the concrete syntax tree into the plain AST; the grammar stays free of semantics. */
class AstBuilder {
  constructor(private readonly file: string) {}

  statement(node: CstNode): Statement {
    const c = node.children as Children;
    const kw = toks(c, 'keyword')[0]!;
    const labelTok = toks(c, 'label')[0];
    const args = nodes(c, 'argument').map((a) => this.argument(a));
    const keywordSpan = tokSpan(this.file, kw);
    let span = keywordSpan;
    const tolNode = nodes(c, 'tolerance')[0];
    const tolerance = tolNode ? this.tolerance(tolNode) : undefined;
    if (tolerance) span = joinSpans(span, tolerance.span);
    const last = args[args.length - 1];
    if (last) span = joinSpans(span, last.span);
    const st: Statement = {
      keyword: kw.image,
      keywordSpan,
      label: labelTok
        ? { text: labelTok.image, isNumber: labelTok.tokenType.name === 'NumberLit', span: tokSpan(this.file, labelTok) }
        : undefined,
      args,
      span,
    };
    if (tolerance) st.tolerance = tolerance;
    return st;
  }

  argument(node: CstNode): Arg {
    const c = node.children as Children;
    const text = toks(c, 'text')[0];
    if (text) {
      return { kind: 'text', value: unquote(text.image), span: tokSpan(this.file, text) };
    }
    const key = toks(c, 'key')[0]!;
    const keyText = toks(c, 'keyText')[0];
    if (keyText) {
      const keySpan = tokSpan(this.file, key);
      const textSpan = tokSpan(this.file, keyText);
      return { kind: 'key', key: key.image, keySpan, values: [], text: { value: unquote(keyText.image), span: textSpan }, span: joinSpans(keySpan, textSpan) };
    }
    const list = nodes(c, 'valueList')[0]!;
    const values = nodes(list.children as Children, 'items').map((e) => this.expression(e));
    const atNode = nodes(c, 'atValue')[0];
    const at = atNode ? this.expression(atNode) : undefined;
    const keySpan = tokSpan(this.file, key);
    const rangeNode = nodes(c, 'range')[0];
    const tolNode = nodes(c, 'tolerance')[0];
    const range = rangeNode ? this.range(rangeNode) : undefined;
    const tolerance = tolNode ? this.tolerance(tolNode) : undefined;
    if (range || tolerance) {
      const arg: Arg = { kind: 'key', key: key.image, keySpan, values, at, span: joinSpans(keySpan, (tolerance ?? range)!.span) };
      if (range) arg.range = range;
      if (tolerance) arg.tolerance = tolerance;
      return arg;
    }
    const lastExpr = at ?? values[values.length - 1]!;
    return { kind: 'key', key: key.image, keySpan, values, at, span: joinSpans(keySpan, lastExpr.span) };
  }

  tolerance(node: CstNode): ToleranceClause {
    const c = node.children as Children;
    const keywordSpan = tokSpan(this.file, toks(c, 'Tol')[0]!);
    const amount = this.expression(nodes(c, 'amount')[0]!);
    const pct = toks(c, 'Percent')[0];
    const cutNode = nodes(c, 'cut')[0];
    const lotTok = toks(c, 'lotName')[0];
    const t: ToleranceClause = { normal: toks(c, 'Normal').length > 0, amount, percent: pct !== undefined, keywordSpan, span: joinSpans(keywordSpan, amount.span) };
    if (pct) t.span = joinSpans(keywordSpan, tokSpan(this.file, pct));
    if (cutNode) {
      t.cut = this.expression(cutNode);
      t.span = joinSpans(keywordSpan, t.cut.span);
    }
    if (lotTok) {
      t.lot = { name: lotTok.image, span: tokSpan(this.file, lotTok) };
      t.span = joinSpans(keywordSpan, t.lot.span);
    }
    return t;
  }

  range(node: CstNode): RangeClause {
    const c = node.children as Children;
    const keywordSpan = tokSpan(this.file, toks(c, 'Vary')[0]!);
    const lower = this.expression(nodes(c, 'lower')[0]!);
    const upper = this.expression(nodes(c, 'upper')[0]!);
    const seriesTok = toks(c, 'seriesName')[0];
    const stepNode = nodes(c, 'step')[0];
    const range: RangeClause = { lower, upper, keywordSpan, span: joinSpans(keywordSpan, upper.span) };
    if (seriesTok) {
      range.series = { name: seriesTok.image, span: tokSpan(this.file, seriesTok) };
      range.span = joinSpans(keywordSpan, range.series.span);
    } else if (stepNode) {
      range.step = this.expression(stepNode);
      range.span = joinSpans(keywordSpan, range.step.span);
    }
    return range;
  }

  expression(node: CstNode): Expr {
    const c = node.children as Children;
    const operands = nodes(c, 'operands');
    const ops = toks(c, 'operators');
    // most values are a single term: no arrays for them
    if (ops.length === 0) return this.term(operands[0]!);
    return this.chain(operands.map((t) => this.term(t)), ops);
  }

  term(node: CstNode): Expr {
    const c = node.children as Children;
    const operands = nodes(c, 'operands');
    const ops = toks(c, 'operators');
    if (ops.length === 0) return this.factor(operands[0]!);
    return this.chain(operands.map((f) => this.factor(f)), ops);
  }

  private chain(operands: Expr[], ops: readonly IToken[]): Expr {
    // the span a left fold of the operands would have: from the first to the last on its line
    let span = operands[0]!.span;
    for (let i = 1; i < operands.length; i++) span = joinSpans(span, operands[i]!.span);
    return { kind: 'chain', operands, ops: ops.map((o) => o.image as '+' | '-' | '*' | '/'), span };
  }

  factor(node: CstNode): Expr {
    const c = node.children as Children;
    const sign = toks(c, 'sign')[0];
    if (sign) {
      const operand = this.factor(nodes(c, 'operand')[0]!);
      return { kind: 'unary', op: sign.image as '-' | '+', operand, span: joinSpans(tokSpan(this.file, sign), operand.span) };
    }
    return this.power(nodes(c, 'power')[0]!);
  }

  power(node: CstNode): Expr {
    const c = node.children as Children;
    const base = this.primary(nodes(c, 'base')[0]!);
    const exp = nodes(c, 'exponent')[0];
    if (!exp) return base;
    const right = this.factor(exp);
    return { kind: 'binary', op: '^', left: base, right, span: joinSpans(base.span, right.span) };
  }

  primary(node: CstNode): Expr {
    const c = node.children as Children;
    const num = toks(c, 'number')[0];
    if (num) {
      const unit = toks(c, 'unit')[0];
      const span = tokSpan(this.file, num);
      const unitSpan = unit ? tokSpan(this.file, unit) : undefined;
      return {
        kind: 'number',
        value: Number(num.image),
        text: num.image,
        unit: unit?.image,
        unitSpan,
        span: unitSpan ? joinSpans(span, unitSpan) : span,
      };
    }
    const callee = toks(c, 'callee')[0];
    if (callee) {
      const args = nodes(c, 'args').map((a) => this.expression(a));
      const rp = toks(c, 'RParen')[0];
      const span = tokSpan(this.file, callee);
      return { kind: 'call', callee: callee.image, args, span: rp ? joinSpans(span, tokSpan(this.file, rp)) : span };
    }
    const name = toks(c, 'name')[0];
    if (name) return { kind: 'name', name: name.image, span: tokSpan(this.file, name) };
    return this.expression(nodes(c, 'inner')[0]!);
  }
}


const TOKEN_WORDS = new Map(Object.entries({
  Identifier: 'a name',
  NumberLit: 'a number',
  StringLit: 'a quoted string',
  Equals: '`=`',
  Comma: '`,`',
  LParen: '`(`',
  RParen: '`)`',
  At: '`at`',
  Vary: '`vary`',
  To: '`to`',
  Series: '`series`',
  Step: '`step`',
  Tol: '`tol`',
  Normal: '`normal`',
  Cut: '`cut`',
  Lot: '`lot`',
  Percent: '`%`',
  Plus: '`+`',
  Minus: '`-`',
  Star: '`*`',
  Slash: '`/`',
  Caret: '`^`',
  OpenString: 'a quoted string',
  Newline: 'the end of the line',
  EOF: 'the end of the line',
}));

/** The words of a range after `vary`. */
const RANGE_AFTER = new Set(['To', 'Series', 'Step']);

/** Tokens that are names (the range words are names too). */
const NAME_TOKENS = new Set(['Identifier', 'Vary', 'To', 'Series', 'Step', 'Tol', 'Normal', 'Cut', 'Lot']);

/** The words inside a tolerance after `tol`. */
const TOLERANCE_AFTER = new Set(['Normal', 'Cut', 'Lot', 'Percent']);
const TOLERANCE_HELP = 'a tolerance follows a value: `tol 5%`, `tol 0.1 pF`, `tol normal 2%`, `tol normal 2% cut 3`, then optionally `lot NAME`';

function describe(t: IToken): string {
  if (t.tokenType.name === 'EOF') return 'the end of the line';
  return `\`${image(t)}\``;
}

/** A token's text for a message, shortened when long. */
function image(t: IToken | undefined): string {
  const s = t?.image ?? '';
  return s.length > 40 ? `${s.slice(0, 32)}…` : s;
}

/** A plain message (and a hint) for a grammar error, instead of the parser generator's token lists. */
function explain(e: IRecognitionException, line: IToken[]): { message: string; help?: string; at: IToken; pastEnd?: boolean } {
  const atEnd = e.token.tokenType.name === 'EOF';
  const at = atEnd ? line[line.length - 1]! : e.token;
  const found = describe(e.token);
  const idx = line.indexOf(e.token);
  const prev = line[idx - 1];
  const prev2 = line[idx - 2];
  const isName = (t: IToken | undefined) => t !== undefined && NAME_TOKENS.has(t.tokenType.name);
  const isEq = (t: IToken | undefined) => t?.tokenType.name === 'Equals';
  // `key= next=…`: the value of `key` is missing, and `next` was taken for it
  if (isEq(e.token) && isName(prev) && isEq(prev2)) {
    return { message: `\`${image(line[idx - 3])}=\` has no value`, help: `give a value after \`${image(line[idx - 3])}=\``, at: prev! };
  }
  // `resistor r1 r2 a=in`: a second name where an argument should be
  if (isEq(line[idx + 1]) && isName(e.token) && isName(prev) && idx >= 2) {
    return { message: `unexpected \`${image(prev)}\`: expected \`key=value\``, help: 'a statement has one name after its keyword; every argument after it is written `key=value`', at: prev! };
  }
  // `let x = 3 to 5`: a range word where a range does not begin (it was read as a key)
  if (prev && RANGE_AFTER.has(prev.tokenType.name) && /Expecting token of type --> Equals <--/.test(e.message)) {
    return { message: `unexpected \`${image(prev)}\``, help: 'a design variable is written `let name = value vary LOW to HIGH`, then optionally `series E24` or `step S`', at: prev };
  }
  // `cut`, `lot`, `normal` or `%` out of place: read as a key, or left over
  if (prev && TOLERANCE_AFTER.has(prev.tokenType.name) && /Expecting token of type --> Equals <--/.test(e.message)) {
    return { message: `unexpected \`${image(prev)}\``, help: TOLERANCE_HELP, at: prev };
  }
  if ((e.name === 'NotAllInputParsedException' || /EOF/.test(e.message)) && TOLERANCE_AFTER.has(e.token.tokenType.name)) {
    return { message: `unexpected ${found}`, help: TOLERANCE_HELP, at };
  }
  if (prev?.tokenType.name === 'Tol' && !atEnd && e.name === 'NoViableAltException') {
    return { message: `unexpected ${found}: expected the tolerance's amount`, help: TOLERANCE_HELP, at };
  }
  if (e.name === 'NotAllInputParsedException' || /EOF/.test(e.message)) {
    if (e.token.tokenType.name === 'Equals' && prev) {
      return { message: `unexpected ${found} after \`${image(prev)}\``, help: 'arguments are written `key=value`; a statement starts with a keyword and an optional name, e.g. `resistor r1 a=in b=out value=50 ohm`', at };
    }
    if (RANGE_WORDS.includes(e.token.tokenType.name.toLowerCase()) && e.token.tokenType.name !== 'Identifier') {
      return { message: `unexpected ${found}`, help: 'a design variable is written `let name = value vary LOW to HIGH`, then optionally `series E24` or `step S`', at };
    }
    if (e.token.tokenType.name === 'NumberLit' || e.token.tokenType.name === 'Identifier') {
      return { message: `unexpected ${found}: expected \`key=value\``, help: 'every argument after the statement name is written `key=value`', at };
    }
    return { message: `unexpected ${found}`, at };
  }
  const m = /Expecting token of type --> (\w+) <--/.exec(e.message);
  const want = (m && TOKEN_WORDS.get(m[1]!)) ?? 'a value';
  if (atEnd) {
    return { message: `the line ends where ${want} was expected`, help: prev?.image === '=' ? 'give a value after `=`' : undefined, at, pastEnd: true };
  }
  if (/one of these possible Token sequences/.test(e.message) || e.name === 'NoViableAltException') {
    return { message: `unexpected ${found}: expected a value (a number, a name or a parenthesised expression)`, at };
  }
  return { message: `unexpected ${found}: expected ${want}`, at };
}

export interface ParseOptions {
  /** Read every line with the grammar, none by the fast path of ast/fast.ts (for tests). */
  grammarOnly?: boolean;
}

/**
 * Parses a netlist text to its AST, reporting every lexical and grammar error into `bag`.
 *
 * Plain lines are read by the fast path (ast/fast.ts); the rest of the text — with the plain lines
 * blanked, so that every position stays where it was — goes through the grammar, and the two sets
 * of statements are merged back in line order.
 */
export function parseNetlist(text: string, file: string, bag: DiagnosticBag, options: ParseOptions = {}): NetlistAst {
  if (options.grammarOnly) return parseWithGrammar(text, file, bag);
  const { items, failedKeywords } = parseNetlistItems(text, file, bag);
  return { file, statements: items.map(statementOf), failedKeywords };
}

/**
 * Parses a netlist as {@link parseNetlist} does, but leaves each plain line pending: its statement
 * is read when it is used ({@link statementOf}). Every problem of the text is found and reported
 * here all the same (a plain line has none).
 */
export function parseNetlistItems(text: string, file: string, bag: DiagnosticBag): NetlistItems {
  const fast: PendingLine[] = [];
  const rest: string[] = [];
  let left = 0; // lines left to the grammar
  let lineNo = 1;
  let continued = false; // the previous line ended in a backslash: this one belongs to it
  const breaks = /\r\n|\n|\r/g;
  const deepKeywords: string[] = [];
  let from = 0;
  for (;;) {
    const m = breaks.exec(text);
    const to = m ? m.index : text.length;
    const line = text.slice(from, to);
    // read once to know the line is plain (its objects die young); kept as text until used
    const read = continued ? undefined : readSimpleLine(line, lineNo, file);
    const deep = read === undefined && !continued && line.length > MAX_EXPRESSION_DEPTH ? parenthesesTooDeep(line) : -1;
    if (deep >= 0 && !line.includes('\\')) {
      // nested past the limit by its parentheses alone: reported here, without tokenising a line
      // that can be megabytes long only to refuse it
      bag.add({
        severity: 'error',
        code: 'too-deep',
        message: `this expression nests more than ${MAX_EXPRESSION_DEPTH} levels deep (parentheses, function calls, signs and powers)`,
        span: { file, line: lineNo, column: deep + 1, length: 1 },
        help: `${MAX_EXPRESSION_DEPTH} levels is the limit; give parts of the expression names with \`let\``,
      });
      const keyword = /^[ \t]*([A-Za-z_][A-Za-z0-9_]*)/.exec(line);
      if (keyword) deepKeywords.push(keyword[1]!);
      rest.push(' ');
    } else if (read === undefined) {
      rest.push(line);
      left++;
      continued = line.includes('\\');
    } else {
      // blanked to one space, not to nothing: a lone `\r` before it and a `\n` after it must not
      // join into one `\r\n` line break
      rest.push(line === '' ? '' : ' ');
      if (read !== BLANK) fast.push({ keyword: internKeyword(read.keyword), pending: line, line: lineNo, file });
    }
    rest.push(m ? m[0] : '');
    if (!m) break;
    from = to + m[0].length;
    lineNo++;
  }
  if (left === 0) return { file, items: fast, failedKeywords: deepKeywords };
  const slow = parseWithGrammar(rest.join(''), file, bag);
  slow.failedKeywords.push(...deepKeywords);
  if (fast.length === 0) return { file, items: slow.statements, failedKeywords: slow.failedKeywords };
  // merge by line (each list is in line order already)
  const items: StatementItem[] = [];
  let a = 0;
  let b = 0;
  while (a < fast.length || b < slow.statements.length) {
    const fa = fast[a];
    const sb = slow.statements[b];
    if (sb === undefined || (fa !== undefined && fa.line < sb.keywordSpan.line)) {
      items.push(fa!);
      a++;
    } else {
      items.push(sb);
      b++;
    }
  }
  return { file, items, failedKeywords: slow.failedKeywords };
}

/**
 * The offset of the first `(` at which a line's parentheses alone nest deeper than
 * MAX_EXPRESSION_DEPTH (outside quoted strings and comments), or -1. Every open parenthesis is a
 * level of the expression depth that the grammar's own check counts, so such a line is too deep
 * for it too.
 */
function parenthesesTooDeep(line: string): number {
  let depth = 0;
  for (let i = 0; i < line.length; i++) {
    const c = line.charCodeAt(i);
    if (c === 40) {
      if (++depth > MAX_EXPRESSION_DEPTH) return i;
    } else if (c === 41) {
      if (depth > 0) depth--;
    } else if (c === 35) {
      return -1; // a comment to the end of the line
    } else if (c === 34) {
      const end = line.indexOf('"', i + 1);
      if (end < 0) return -1; // an open string: the grammar reports it
      i = end;
    }
  }
  return -1;
}

/** Parses with the grammar and its visitor alone. */
function parseWithGrammar(text: string, file: string, bag: DiagnosticBag): NetlistAst {
  const builder = new AstBuilder(file);
  const statements: Statement[] = [];
  const failedKeywords: string[] = [];
  // each line's CST becomes AST at once and is dropped: a large netlist never holds its whole CST
  const found: Diagnostic[] = [];
  const lexErrors = parseLines(text, (line: ParsedLine) => {
    if (line.openString) {
      found.push(syntax('this quoted string is not closed', tokSpan(file, line.openString), 'end it with `"` on the same line'));
      failedKeywords.push(line.tokens[0]!.image);
      return;
    }
    if (line.tooDeep) {
      found.push({
        severity: 'error',
        code: 'too-deep',
        message: `this expression nests more than ${MAX_EXPRESSION_DEPTH} levels deep (parentheses, function calls, signs and powers)`,
        span: tokSpan(file, line.tooDeep),
        help: `${MAX_EXPRESSION_DEPTH} levels is the limit; give parts of the expression names with \`let\``,
      });
      failedKeywords.push(line.tokens[0]!.image);
      return;
    }
    if (line.errors.length > 0) {
      const { message, help, at, pastEnd } = explain(line.errors[0]!, line.tokens);
      const span = tokSpan(file, at);
      if (pastEnd) {
        // point just past the last token
        span.column += at.image.length;
        span.length = 1;
      }
      found.push(syntax(message, span, help));
      failedKeywords.push(line.tokens[0]!.image);
      return;
    }
    const st = line.cst!.children.statement as CstNode[];
    statements.push(builder.statement(st[0]!));
  });
  // unexpected characters: the first few of each line (a line of a million stray characters
  // is one mistake, not a million)
  for (let i = 0; i < lexErrors.length; ) {
    let j = i;
    while (j < lexErrors.length && lexErrors[j]!.line === lexErrors[i]!.line) j++;
    for (let k = i; k < Math.min(j, i + MAX_LEX_ERRORS_PER_LINE); k++) {
      const e = lexErrors[k]!;
      found.push(syntax(e.message, { file, line: e.line, column: e.column, length: e.length }));
    }
    const more = j - i - MAX_LEX_ERRORS_PER_LINE;
    if (more > 0) {
      const e = lexErrors[i + MAX_LEX_ERRORS_PER_LINE]!;
      found.push(syntax(`${more} more unexpected character${more === 1 ? '' : 's'} on this line`, { file, line: e.line, column: e.column, length: e.length }));
    }
    i = j;
  }
  for (const d of found.length > 0 ? unquotedFileNames(found, text, file) : found) bag.add(d);
  return { file, statements, failedKeywords };
}

const MAX_LEX_ERRORS_PER_LINE = 10;

function syntax(message: string, span: SourceSpan, help?: string): Diagnostic {
  return { severity: 'error', code: 'syntax', message, span, help };
}

/**
 * `file=hemt.s2p`, `include parts/a.sbx`: a file name written without quotes breaks the line up
 * into names, operators and stray dots. The errors that fall inside such a value are replaced by
 * one that says file names are quoted.
 */
function unquotedFileNames(found: Diagnostic[], text: string, file: string): Diagnostic[] {
  const lines = new Set<number>();
  let lastLine = 0;
  for (const d of found) {
    if (d.code !== 'syntax' || !d.span) continue;
    lines.add(d.span.line);
    lastLine = Math.max(lastLine, d.span.line);
  }
  const hints = new Map<number, { from: number; to: number; diagnostic: Diagnostic }[]>();
  let lineNo = 1;
  const breaks = /\r\n?|\n/g;
  let from = 0;
  for (;;) {
    const m = breaks.exec(text);
    const to = m ? m.index : text.length;
    if (lines.has(lineNo)) {
      const line = text.slice(from, to);
      const here: { from: number; to: number; diagnostic: Diagnostic }[] = [];
      const looksLikeFile = (v: string) => /[A-Za-z_]/.test(v) && /[^./\\]\.[A-Za-z][A-Za-z0-9]*$/.test(v);
      const include = /^([ \t]*include[ \t]+)([^\s"#]+)/.exec(line);
      if (include && looksLikeFile(include[2]!)) {
        const col = include[1]!.length + 1;
        here.push({ from: col, to: col + include[2]!.length, diagnostic: fileHint(file, lineNo, col, include[2]!, `include "${include[2]}"`) });
      }
      const keyed = /(^|[ \t])([A-Za-z_][A-Za-z0-9_]*)[ \t]*=[ \t]*([^\s"=,()#]+)/g;
      for (let k = keyed.exec(line); k; k = keyed.exec(line)) {
        const value = k[3]!;
        if (!looksLikeFile(value)) continue;
        const col = k.index + k[0].length - value.length + 1;
        here.push({ from: col, to: col + value.length, diagnostic: fileHint(file, lineNo, col, value, `${k[2]}="${value}"`) });
      }
      if (here.length > 0) hints.set(lineNo, here);
    }
    if (!m || lineNo >= lastLine) break;
    from = to + m[0].length;
    lineNo++;
  }
  if (hints.size === 0) return found;
  const out: Diagnostic[] = [];
  const given = new Set<Diagnostic>();
  for (const d of found) {
    // an error at (or just past) an unquoted file name gives way to the hint about quotes
    const hint = d.code === 'syntax' && d.span ? hints.get(d.span.line)?.find((h) => d.span!.column >= h.from && d.span!.column <= h.to) : undefined;
    if (!hint) out.push(d);
    else if (!given.has(hint.diagnostic)) {
      given.add(hint.diagnostic);
      out.push(hint.diagnostic);
    }
  }
  return out;
}

function fileHint(file: string, line: number, column: number, name: string, quotedForm: string): Diagnostic {
  const short = (t: string) => (t.length > 60 ? `${t.slice(0, 52)}…` : t);
  return syntax(`\`${short(name)}\` looks like a file name: file names are written in quotes`, { file, line, column, length: name.length }, `write \`${short(quotedForm)}\``);
}
