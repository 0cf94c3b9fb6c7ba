/** A place in a source file: 1-based line and column, with a length for the caret underline. */
export interface SourceSpan {
  file: string;
  line: number;
  column: number;
  /** Number of characters to underline (at least 1). */
  length: number;
}

export type Severity = 'error' | 'warning';

/** One finding about an input: where, what, and (where one exists) what to do about it. */
export interface Diagnostic {
  severity: Severity;
  /** A stable identifier of the finding's class, e.g. `unknown-keyword`. */
  code: string;
  message: string;
  span?: SourceSpan;
  /** A suggestion shown as `help:`, e.g. "did you mean `inductor`?". */
  help?: string;
}

/** Thrown by the library when an input has errors; carries every diagnostic found, not just the first. */
export class InputError extends Error {
  readonly diagnostics: Diagnostic[];
  /** The texts the diagnostics point into, for {@link formatDiagnostics}. */
  readonly sources?: SourceMap;
  constructor(diagnostics: Diagnostic[], sources?: SourceMap) {
    const errors = diagnostics.filter((d) => d.severity === 'error');
    const first = errors[0] ?? diagnostics[0];
    super(
      sources
        ? formatDiagnostics(diagnostics, sources)
        : `${errors.length} error(s)${first ? `: ${first.message}` : ''}`,
    );
    this.name = 'InputError';
    this.diagnostics = diagnostics;
    this.sources = sources;
  }
}

/** Source texts by file name, so that diagnostics can quote the offending line. */
export type SourceMap = ReadonlyMap<string, string>;

/** Collects diagnostics in the order they are found. */
export class DiagnosticBag {
  readonly items: Diagnostic[] = [];
  private readonly seen = new Set<string>();
  private errors = 0;
  error(code: string, message: string, span?: SourceSpan, help?: string): void {
    this.add({ severity: 'error', code, message, span, help });
  }
  warning(code: string, message: string, span?: SourceSpan, help?: string): void {
    this.add({ severity: 'warning', code, message, span, help });
  }
  get hasErrors(): boolean {
    return this.errors > 0;
  }
  /** Makes every warning an error, with the same code, message and place (strict loading). */
  warningsAsErrors(): void {
    for (let i = 0; i < this.items.length; i++) {
      if (this.items[i]!.severity !== 'warning') continue;
      this.items[i] = { ...this.items[i]!, severity: 'error' };
      this.errors++;
    }
  }
  /** Adds a diagnostic unless the very same one is there already (a block used twice repeats its findings). */
  add(d: Diagnostic): void {
    const key = `${d.severity}\u0000${d.code}\u0000${d.message}\u0000${d.span?.file}\u0000${d.span?.line}\u0000${d.span?.column}`;
    if (this.seen.has(key)) return;
    this.seen.add(key);
    this.items.push(d);
    if (d.severity === 'error') this.errors++;
  }
}

/**
 * The lines of a source text, split once and kept for every diagnostic that quotes it. Lines
 * break where the grammar breaks them: at `\r\n`, `\n` or a lone `\r`.
 */
class SourceLines {
  private readonly starts: number[] = [0];
  constructor(readonly text: string) {
    const breaks = /\r\n?|\n/g;
    for (let m = breaks.exec(text); m; m = breaks.exec(text)) this.starts.push(m.index + m[0].length);
  }
  /** Line `n` (1-based) without its line break, or undefined past the end. */
  line(n: number): string | undefined {
    if (!(n >= 1 && n <= this.starts.length)) return undefined;
    const from = this.starts[n - 1]!;
    let to = n < this.starts.length ? this.starts[n]! : this.text.length;
    if (to > from && this.text.charCodeAt(to - 1) === 10) to--;
    if (to > from && this.text.charCodeAt(to - 1) === 13 && n < this.starts.length) to--;
    return this.text.slice(from, to);
  }
}

/** Split sources, per source map and file: a run's diagnostics split each file once, not once each. */
const splitSources = new WeakMap<SourceMap, Map<string, SourceLines>>();

function sourceLines(sources: SourceMap, file: string): SourceLines | undefined {
  const text = sources.get(file);
  if (typeof text !== 'string') return undefined;
  let files = splitSources.get(sources);
  if (!files) splitSources.set(sources, (files = new Map()));
  let lines = files.get(file);
  if (!lines || lines.text !== text) files.set(file, (lines = new SourceLines(text)));
  return lines;
}

/** Longest source line shown whole; a longer one is shown as a window around the caret. */
const SHOWN_WIDTH = 120;
/** Longest message or help shown whole (they quote user text, which may be long). */
const MESSAGE_WIDTH = 400;

function clipText(s: string): string {
  return s.length > MESSAGE_WIDTH ? `${s.slice(0, MESSAGE_WIDTH - 1)}…` : s;
}

/**
 * Renders one diagnostic in the form
 *
 *     file.sbx:3:11: error: unknown element keyword `inducter`
 *        3 | inducter l1 a=in b=out value=10 nH
 *          | ^^^^^^^^
 *       help: did you mean `inductor`?
 */
export function formatDiagnostic(d: Diagnostic, sources?: SourceMap): string {
  const out: string[] = [];
  const where = d.span ? `${d.span.file}:${d.span.line}:${d.span.column}: ` : '';
  out.push(`${where}${d.severity}: ${clipText(d.message)}`);
  const src = d.span && sources ? sourceLines(sources, d.span.file)?.line(d.span.line) : undefined;
  if (d.span && src !== undefined) {
    const num = String(d.span.line);
    const pad = ' '.repeat(num.length);
    let shown = src;
    let column = Math.max(1, d.span.column);
    if (shown.length > SHOWN_WIDTH) {
      // a window of the line around the caret, with … where it is cut
      const start = Math.max(0, Math.min(column - 1 - 40, shown.length - (SHOWN_WIDTH - 20)));
      const end = Math.min(shown.length, start + SHOWN_WIDTH - 20);
      shown = `${start > 0 ? '…' : ''}${shown.slice(start, end)}${end < shown.length ? '…' : ''}`;
      column = column - start + (start > 0 ? 1 : 0);
    }
    shown = shown.replace(/\t/g, ' ');
    const width = Math.max(1, Math.min(d.span.length, Math.max(1, shown.length - column + 1)));
    out.push(` ${num} | ${shown}`);
    out.push(` ${pad} | ${' '.repeat(column - 1)}${'^'.repeat(width)}`);
  }
  if (d.help) out.push(`  help: ${clipText(d.help)}`);
  return out.join('\n');
}

/** Renders diagnostics, errors and warnings in source order, separated by blank lines. */
export function formatDiagnostics(ds: readonly Diagnostic[], sources?: SourceMap): string {
  const out: string[] = [];
  for (const d of sortDiagnostics(ds)) out.push(formatDiagnostic(d, sources));
  return out.join('\n\n');
}

/** Orders diagnostics by file, line and column (stable for equal places). */
export function sortDiagnostics(ds: readonly Diagnostic[]): Diagnostic[] {
  return ds
    .map((d, i) => ({ d, i }))
    .sort((x, y) => {
      const a = x.d.span;
      const b = y.d.span;
      if (!a || !b) return a ? -1 : b ? 1 : x.i - y.i;
      if (a.file !== b.file) return a.file < b.file ? -1 : 1;
      return a.line - b.line || a.column - b.column || x.i - y.i;
    })
    .map((x) => x.d);
}
