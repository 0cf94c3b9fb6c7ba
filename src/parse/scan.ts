// Scanning helpers shared by the lexer and the AST fast path (no dependencies: the fast path
// loads without the grammar library).

/**
 * Where the body of a quoted string starting at `start` (a `"`) stops: at its closing `"`, at a
 * line break, at a backslash before a line break, or at the end of the text. The same as the
 * pattern `"(?:[^"\\\n\r]|\\.)*` (a backslash escapes any character but a line terminator), but
 * as a plain loop: a regular expression with an alternation inside a repetition keeps a
 * backtracking entry per character and overflows on a string of a few million characters.
 */
export function stringBodyEnd(text: string, start: number): number {
  let i = start + 1;
  const n = text.length;
  while (i < n) {
    const c = text.charCodeAt(i);
    if (c === 34 || c === 10 || c === 13) return i; // '"', line feed, carriage return
    if (c === 92) {
      // '\': escapes the next character, unless that is a line terminator (or there is none)
      if (i + 1 >= n) return i;
      const d = text.charCodeAt(i + 1);
      if (d === 10 || d === 13 || d === 0x2028 || d === 0x2029) return i;
      i += 2;
      continue;
    }
    i++;
  }
  return i;
}
