import type { CstNode, IToken, IRecognitionException, TokenType } from 'chevrotain';
import { MAX_EXPRESSION_DEPTH } from '../limits.js';
import { stringBodyEnd } from './scan.js';
import { CstParser, EOF } from './chevrotain.js';
import {
  allTokens,
  At,
  Caret,
  Comma,
  Cut,
  Equals,
  Identifier,
  Lot,
  LParen,
  Minus,
  Newline,
  Normal,
  NumberLit,
  OpenString,
  Percent,
  Plus,
  RParen,
  Series,
  Slash,
  Star,
  Step,
  StringLit,
  To,
  Tol,
  Vary,
  netlistLexer,
} from './lexer.js';

/**
 * The pure grammar of the netlist language (no semantics: those live in the AST visitor).
 *
 *   statement   := Identifier [label] [tolerance] argument*
 *   label       := Identifier (not followed by '=') | NumberLit
 *   argument    := Identifier '=' (StringLit | valueList [At expression] [range] [tolerance]) | StringLit
 *   range       := 'vary' expression 'to' expression ['series' Identifier | 'step' expression]
 *   tolerance   := 'tol' ['normal'] expression ['%'] ['cut' expression] ['lot' Identifier]
 *   valueList   := expression (',' expression)*
 *   expression  := term (('+' | '-') term)*
 *   term        := factor (('*' | '/') factor)*
 *   factor      := ('-' | '+') factor | power
 *   power       := primary ['^' factor]
 *   primary     := NumberLit [unit] | Identifier '(' [expression (',' expression)*] ')' | Identifier | '(' expression ')'
 *   unit        := Identifier (not followed by '=' or '(', and not one of vary, to, series, step)
 *
 * `vary`, `to`, `series` and `step` are tokens of their own in the category of names, so they stay
 * usable as names everywhere else; so are `tol`, `normal`, `cut` and `lot`. (`normal` right after
 * `tol` is always the distribution's word: a parameter named `normal` is written `(normal)` there.)
 *
 * A file is a sequence of lines; each non-empty line is one statement (a trailing backslash continues a line).
 */
export class NetlistParser extends CstParser {
  constructor() {
    super(allTokens, { maxLookahead: 3, recoveryEnabled: false });
    this.performSelfAnalysis();
  }

  /** One line of the file: exactly one statement and nothing after it. */
  public line = this.RULE('line', () => {
    this.SUBRULE(this.statement);
    this.CONSUME(EOF);
  });

  public statement = this.RULE('statement', () => {
    this.CONSUME(Identifier, { LABEL: 'keyword' });
    this.OPTION({
      GATE: () => this.LA(2).tokenType !== Equals,
      DEF: () => {
        this.OR([
          { ALT: () => this.CONSUME2(Identifier, { LABEL: 'label' }) },
          { ALT: () => this.CONSUME(NumberLit, { LABEL: 'label' }) },
        ]);
      },
    });
    // a statement's own tolerance (only `lot caps tol normal 3%` takes one: the elaborator says so)
    this.OPTION2(() => this.SUBRULE(this.tolerance));
    this.MANY(() => this.SUBRULE(this.argument));
  });

  public argument = this.RULE('argument', () => {
    this.OR([
      {
        ALT: () => {
          this.CONSUME(Identifier, { LABEL: 'key' });
          this.CONSUME(Equals);
          this.OR2([
            { ALT: () => this.CONSUME2(StringLit, { LABEL: 'keyText' }) },
            {
              ALT: () => {
                this.SUBRULE(this.valueList);
                this.OPTION(() => {
                  this.CONSUME(At);
                  this.SUBRULE(this.expression, { LABEL: 'atValue' });
                });
                this.OPTION2(() => this.SUBRULE(this.range));
                this.OPTION3(() => this.SUBRULE(this.tolerance));
              },
            },
          ]);
        },
      },
      { ALT: () => this.CONSUME(StringLit, { LABEL: 'text' }) },
    ]);
  });

  /** A design variable's range on a `let`: `vary LOW to HIGH [series E24 | step S]`. */
  public range = this.RULE('range', () => {
    this.CONSUME(Vary);
    this.SUBRULE(this.expression, { LABEL: 'lower' });
    this.CONSUME(To);
    this.SUBRULE2(this.expression, { LABEL: 'upper' });
    this.OPTION(() => {
      this.OR([
        {
          ALT: () => {
            this.CONSUME(Series);
            this.CONSUME(Identifier, { LABEL: 'seriesName' });
          },
        },
        {
          ALT: () => {
            this.CONSUME(Step);
            this.SUBRULE3(this.expression, { LABEL: 'step' });
          },
        },
      ]);
    });
  });

  /**
   * A tolerance after a value: `tol [normal] AMOUNT [%] [cut K] [lot NAME]` — uniform within
   * ±AMOUNT, or normal with σ = AMOUNT; `%` makes it relative to the value.
   */
  public tolerance = this.RULE('tolerance', () => {
    this.CONSUME(Tol);
    this.OPTION({
      GATE: () => this.LA(1).tokenType === Normal,
      DEF: () => this.CONSUME(Normal),
    });
    this.SUBRULE(this.expression, { LABEL: 'amount' });
    this.OPTION2(() => this.CONSUME(Percent));
    this.OPTION3(() => {
      this.CONSUME(Cut);
      this.SUBRULE2(this.expression, { LABEL: 'cut' });
    });
    this.OPTION4(() => {
      this.CONSUME(Lot);
      this.CONSUME(Identifier, { LABEL: 'lotName' });
    });
  });

  public valueList = this.RULE('valueList', () => {
    this.SUBRULE(this.expression, { LABEL: 'items' });
    this.MANY(() => {
      this.CONSUME(Comma);
      this.SUBRULE2(this.expression, { LABEL: 'items' });
    });
  });

  public expression = this.RULE('expression', () => {
    this.SUBRULE(this.term, { LABEL: 'operands' });
    this.MANY(() => {
      this.OR([
        { ALT: () => this.CONSUME(Plus, { LABEL: 'operators' }) },
        { ALT: () => this.CONSUME(Minus, { LABEL: 'operators' }) },
      ]);
      this.SUBRULE2(this.term, { LABEL: 'operands' });
    });
  });

  public term = this.RULE('term', () => {
    this.SUBRULE(this.factor, { LABEL: 'operands' });
    this.MANY(() => {
      this.OR([
        { ALT: () => this.CONSUME(Star, { LABEL: 'operators' }) },
        { ALT: () => this.CONSUME(Slash, { LABEL: 'operators' }) },
      ]);
      this.SUBRULE2(this.factor, { LABEL: 'operands' });
    });
  });

  public factor = this.RULE('factor', () => {
    this.OR([
      {
        ALT: () => {
          this.OR2([
            { ALT: () => this.CONSUME(Minus, { LABEL: 'sign' }) },
            { ALT: () => this.CONSUME(Plus, { LABEL: 'sign' }) },
          ]);
          this.SUBRULE(this.factor, { LABEL: 'operand' });
        },
      },
      { ALT: () => this.SUBRULE(this.power) },
    ]);
  });

  public power = this.RULE('power', () => {
    this.SUBRULE(this.primary, { LABEL: 'base' });
    this.OPTION(() => {
      this.CONSUME(Caret);
      this.SUBRULE(this.factor, { LABEL: 'exponent' });
    });
  });

  public primary = this.RULE('primary', () => {
    this.OR([
      {
        ALT: () => {
          this.CONSUME(NumberLit, { LABEL: 'number' });
          this.OPTION({
            GATE: () => this.LA(2).tokenType !== Equals && this.LA(2).tokenType !== LParen && !isRangeWord(this.LA(1).tokenType),
            DEF: () => this.CONSUME(Identifier, { LABEL: 'unit' }),
          });
        },
      },
      {
        GATE: () => this.LA(2).tokenType === LParen,
        ALT: () => {
          this.CONSUME2(Identifier, { LABEL: 'callee' });
          this.CONSUME(LParen);
          this.OPTION2(() => {
            this.SUBRULE(this.expression, { LABEL: 'args' });
            this.MANY(() => {
              this.CONSUME(Comma);
              this.SUBRULE2(this.expression, { LABEL: 'args' });
            });
          });
          this.CONSUME(RParen);
        },
      },
      { ALT: () => this.CONSUME3(Identifier, { LABEL: 'name' }) },
      {
        ALT: () => {
          this.CONSUME2(LParen);
          this.SUBRULE3(this.expression, { LABEL: 'inner' });
          this.CONSUME2(RParen);
        },
      },
    ]);
  });
}

/** Words that end a value: the range words and the tolerance words are never a unit. */
function isRangeWord(t: TokenType): boolean {
  return t === Vary || t === To || t === Series || t === Step || t === Tol || t === Normal || t === Cut || t === Lot;
}

/** Characters that can start a token or a line break: the rest can never be read. */
function canStart(c: number): boolean {
  return (
    (c >= 48 && c <= 57) || // 0-9
    (c >= 65 && c <= 90) || // A-Z
    (c >= 97 && c <= 122) || // a-z
    c === 95 || // _
    c === 32 || c === 9 || c === 10 || c === 13 || // space, tab, line breaks
    c === 92 || c === 35 || c === 34 || c === 46 || // \ # " .
    c === 61 || c === 44 || c === 40 || c === 41 || // = , ( )
    c === 43 || c === 45 || c === 42 || c === 47 || c === 94 || c === 37 || // + - * / ^ %
    c === 0xb5 || c === 0x3bc || c === 0x3a9 || c === 0x2126 // µ μ Ω Ω
  );
}

const unexpectedMessages = new Map<number, string>();

function unexpected(text: string, offset: number): string {
  const c = text.codePointAt(offset) ?? 32;
  let m = unexpectedMessages.get(c);
  if (m === undefined) {
    m = `unexpected character ${JSON.stringify(String.fromCodePoint(c))}`;
    if (unexpectedMessages.size < 1000) unexpectedMessages.set(c, m);
  }
  return m;
}

/**
 * Finds runs of characters that no token can start, outside quoted strings and comments, and
 * blanks them (same length, so positions stay). The lexer's own recovery from such a character
 * tries every token pattern at every following offset: on a line of millions of stray
 * characters it took seconds. Each run is one error, as the lexer would report it.
 */
function strayCharacters(text: string): { text: string; errors: LexError[] } {
  const errors: LexError[] = [];
  const pieces: string[] = [];
  let kept = 0; // text before this offset is in `pieces` (only once a run is found)
  let line = 1;
  let lineStart = 0;
  const n = text.length;
  let i = 0;
  while (i < n) {
    const c = text.charCodeAt(i);
    if (c === 10 || c === 13) {
      i += c === 13 && text.charCodeAt(i + 1) === 10 ? 2 : 1;
      line++;
      lineStart = i;
    } else if (c === 34) {
      i = stringBodyEnd(text, i);
      if (text.charCodeAt(i) === 34) i++;
    } else if (c === 35) {
      while (i < n && text.charCodeAt(i) !== 10 && text.charCodeAt(i) !== 13) i++;
    } else if (canStart(c)) {
      i++;
    } else {
      const from = i;
      while (i < n && !canStart(text.charCodeAt(i))) i++;
      errors.push({ line, column: from - lineStart + 1, length: i - from, message: unexpected(text, from) });
      pieces.push(text.slice(kept, from), i - from === 1 ? ' ' : ' '.repeat(i - from));
      kept = i;
    }
  }
  if (errors.length === 0) return { text, errors };
  pieces.push(text.slice(kept));
  return { text: pieces.join(''), errors };
}

/** One parser instance serves every parse (chevrotain parsers are reusable by resetting their input). */
export const parser = new NetlistParser();

export interface LexError {
  line: number;
  column: number;
  length: number;
  message: string;
}

export interface ParsedLine {
  cst: CstNode | undefined;
  tokens: IToken[];
  errors: IRecognitionException[];
  /** A quoted string left open at the end of the line (the line is then not parsed). */
  openString?: IToken;
  /**
   * The token at which the line's expressions nest deeper than MAX_EXPRESSION_DEPTH (the line is
   * then not parsed: the grammar descends once per level, and the stack is finite).
   */
  tooDeep?: IToken;
}

/**
 * The first token at which an expression of the line nests more than `limit` levels deep, or
 * undefined. A level is an open parenthesis (a function call's included), a sign in front of an
 * operand (`--x`) or a power (`^`, right-associative: `a^b^c` is `a^(b^c)`); a sign or a power
 * stays open until the operand it applies to ends (at `+`, `-`, `*`, `/`, `,`, `)` or the end of
 * the value). One pass, no recursion: this is how a line is kept from the grammar's recursive
 * descent when it would go too deep.
 */
export function tooDeepAt(tokens: readonly IToken[], limit: number = MAX_EXPRESSION_DEPTH): IToken | undefined {
  const outer: number[] = []; // signs and powers open at the enclosing parenthesis levels
  let open = 0; // signs and powers open at this level
  let depth = 0; // parentheses + every open sign and power
  let operandNext = true; // a `+` or `-` here is a sign, not an operator
  for (const t of tokens) {
    const type = t.tokenType;
    if (type === LParen) {
      outer.push(open);
      open = 0;
      depth++;
      operandNext = true;
    } else if (type === RParen) {
      depth -= open + (outer.length > 0 ? 1 : 0);
      open = outer.pop() ?? 0;
      operandNext = false;
      continue;
    } else if ((type === Minus || type === Plus) && operandNext) {
      open++;
      depth++;
    } else if (type === Caret) {
      open++;
      depth++;
      operandNext = true;
    } else if (type === Plus || type === Minus || type === Star || type === Slash || type === Comma || type === Equals || type === At) {
      depth -= open;
      open = 0;
      operandNext = true;
      continue;
    } else {
      operandNext = false;
      continue;
    }
    if (depth > limit) return t;
  }
  return undefined;
}

export interface CstFile {
  lines: ParsedLine[];
  lexErrors: LexError[];
}

/**
 * Tokenises a whole file, then parses it statement by statement, so that a mistake on one line
 * does not hide mistakes on the others.
 */
export function parseToCst(text: string): CstFile {
  const lines: ParsedLine[] = [];
  const lexErrors = parseLines(text, (line) => lines.push(line));
  return { lines, lexErrors };
}

/**
 * Like {@link parseToCst}, but hands each parsed line to `onLine` as soon as it is parsed, so a
 * caller that turns lines into something smaller (the AST) never holds the whole file's CST.
 * Returns the lexical errors.
 */
export function parseLines(text: string, onLine: (line: ParsedLine) => void): LexError[] {
  const stray = strayCharacters(text);
  const lexed = netlistLexer.tokenize(stray.text);
  const lexErrors: LexError[] = lexed.errors.map((e) => ({
    line: e.line ?? 1,
    column: e.column ?? 1,
    length: e.length,
    message: unexpected(text, e.offset),
  }));
  if (stray.errors.length > 0) {
    for (const e of stray.errors) lexErrors.push(e);
    lexErrors.sort((a, b) => a.line - b.line || a.column - b.column);
  }
  let current: IToken[] = [];
  const flush = () => {
    if (current.length === 0) return;
    const open = current.find((t) => t.tokenType === OpenString);
    if (open) {
      onLine({ cst: undefined, tokens: current, errors: [], openString: open });
      current = [];
      return;
    }
    const deep = tooDeepAt(current);
    if (deep) {
      onLine({ cst: undefined, tokens: current, errors: [], tooDeep: deep });
      current = [];
      return;
    }
    parser.input = current;
    // the grammar reports a mistake by throwing an exception it catches itself: no stack trace
    // is wanted from it, and capturing one made a file of many bad lines several times slower
    const traces = Error.stackTraceLimit;
    Error.stackTraceLimit = 0;
    let cst: CstNode;
    try {
      cst = parser.line();
    } catch (e) {
      // the depth check above keeps the descent within the stack; should a line still exhaust it
      // (a caller already deep in its own stack), the line is reported as too deep, not thrown
      if (!(e instanceof RangeError)) throw e;
      onLine({ cst: undefined, tokens: current, errors: [], tooDeep: current[0] });
      current = [];
      return;
    } finally {
      Error.stackTraceLimit = traces;
    }
    const errors = parser.errors.slice();
    onLine({ cst: errors.length ? undefined : cst, tokens: current, errors });
    current = [];
  };
  // the token vector is emptied as lines are parsed, so that a large file's tokens can be
  // collected line by line instead of all living until the end
  const tokens = lexed.tokens;
  for (let i = 0; i < tokens.length; i++) {
    const tok = tokens[i]!;
    (tokens as (IToken | undefined)[])[i] = undefined;
    if (tok.tokenType === Newline) flush();
    else current.push(tok);
  }
  tokens.length = 0;
  flush();
  return lexErrors;
}
