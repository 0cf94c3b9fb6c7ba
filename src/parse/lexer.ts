import type { TokenType } from 'chevrotain';
import { createToken, Lexer } from './chevrotain.js';
import { stringBodyEnd } from './scan.js';

// Token vocabulary of the netlist language. Statements are line-based: a newline ends one,
// a backslash at the end of a line continues it. `#` starts a comment that runs to the end of the line.

export const WhiteSpace = createToken({ name: 'WhiteSpace', pattern: /[ \t]+/, group: Lexer.SKIPPED });
export const Continuation = createToken({
  name: 'Continuation',
  // a backslash before any line break the grammar knows: `\n`, `\r\n` or a lone `\r`
  pattern: /\\[ \t]*(?:#[^\n\r]*)?(?:\r\n?|\n)/,
  group: Lexer.SKIPPED,
  line_breaks: true,
});
export const Comment = createToken({ name: 'Comment', pattern: /#[^\n\r]*/, group: Lexer.SKIPPED });
export const Newline = createToken({ name: 'Newline', pattern: /\r?\n|\r/, line_breaks: true });
/** `"…"`: a quoted string closed on its line. */
function matchString(text: string, offset: number): [string] | null {
  if (text.charCodeAt(offset) !== 34) return null;
  const end = stringBodyEnd(text, offset);
  return end < text.length && text.charCodeAt(end) === 34 ? [text.slice(offset, end + 1)] : null;
}

/** `"…`: a quoted string the line ends inside of. */
function matchOpenString(text: string, offset: number): [string] | null {
  if (text.charCodeAt(offset) !== 34) return null;
  return [text.slice(offset, stringBodyEnd(text, offset))];
}

export const StringLit = createToken({ name: 'StringLit', pattern: matchString, start_chars_hint: ['"'], line_breaks: false });
/** A quoted string that the line ends inside of; the visitor reports it. */
export const OpenString = createToken({ name: 'OpenString', pattern: matchOpenString, start_chars_hint: ['"'], line_breaks: false });
export const NumberLit = createToken({
  name: 'NumberLit',
  pattern: /(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/,
});
export const Identifier = createToken({
  name: 'Identifier',
  pattern: /[A-Za-z_\u00B5\u03BC\u03A9\u2126][A-Za-z0-9_\u00B5\u03BC\u03A9\u2126]*/,
});
/** `at` introduces the frequency a loss figure is given at (`q=40 at 433 MHz`). */
export const At = createToken({ name: 'At', pattern: /at\b/, longer_alt: Identifier });
/**
 * The words of a design variable's range (`let c = 3.3 pF vary 1 pF to 10 pF series E24`). Each is
 * also a name (category Identifier): `step=10 MHz` or `let to = 2` read as before.
 */
export const Vary = createToken({ name: 'Vary', pattern: /vary\b/, longer_alt: Identifier, categories: [Identifier] });
export const To = createToken({ name: 'To', pattern: /to\b/, longer_alt: Identifier, categories: [Identifier] });
export const Series = createToken({ name: 'Series', pattern: /series\b/, longer_alt: Identifier, categories: [Identifier] });
export const Step = createToken({ name: 'Step', pattern: /step\b/, longer_alt: Identifier, categories: [Identifier] });
/**
 * The words of a tolerance (`value=2.2 pF tol 5% lot caps`, `tol normal 2% cut 3`, and the
 * statement `lot caps tol normal 3%`). Names too, like the range words.
 */
export const Tol = createToken({ name: 'Tol', pattern: /tol\b/, longer_alt: Identifier, categories: [Identifier] });
export const Normal = createToken({ name: 'Normal', pattern: /normal\b/, longer_alt: Identifier, categories: [Identifier] });
export const Cut = createToken({ name: 'Cut', pattern: /cut\b/, longer_alt: Identifier, categories: [Identifier] });
export const Lot = createToken({ name: 'Lot', pattern: /lot\b/, longer_alt: Identifier, categories: [Identifier] });
/** `%` after a tolerance's amount: a relative tolerance (`tol 5%`). */
export const Percent = createToken({ name: 'Percent', pattern: /%/ });
/** Words that end a value instead of being read as its unit. */
export const RANGE_WORDS: readonly string[] = ['vary', 'to', 'series', 'step'];
/** The tolerance words: they end a value too, and are never a unit. */
export const TOLERANCE_WORDS: readonly string[] = ['tol', 'normal', 'cut', 'lot'];
export const Equals = createToken({ name: 'Equals', pattern: /=/ });
export const Comma = createToken({ name: 'Comma', pattern: /,/ });
export const LParen = createToken({ name: 'LParen', pattern: /\(/ });
export const RParen = createToken({ name: 'RParen', pattern: /\)/ });
export const Plus = createToken({ name: 'Plus', pattern: /\+/ });
export const Minus = createToken({ name: 'Minus', pattern: /-/ });
export const Star = createToken({ name: 'Star', pattern: /\*/ });
export const Slash = createToken({ name: 'Slash', pattern: /\// });
export const Caret = createToken({ name: 'Caret', pattern: /\^/ });

export const allTokens: TokenType[] = [
  WhiteSpace,
  Continuation,
  Comment,
  Newline,
  StringLit,
  OpenString,
  NumberLit,
  At,
  Vary,
  To,
  Series,
  Step,
  Tol,
  Normal,
  Cut,
  Lot,
  Identifier,
  Equals,
  Percent,
  Comma,
  LParen,
  RParen,
  Plus,
  Minus,
  Star,
  Slash,
  Caret,
];

export const netlistLexer = new Lexer(allTokens, { positionTracking: 'onlyStart', ensureOptimizations: true });
