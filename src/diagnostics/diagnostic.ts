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
  error(code: string, message: string, span?: SourceSpan, help?: string): void {
    this.add({ severity: 'error', code, message, span, help });
  }
  warning(code: string, message: string, span?: SourceSpan, help?: string): void {
    this.add({ severity: 'warning', code, message, span, help });
  }
  get hasErrors(): boolean {
    return this.items.some((d) => d.severity === 'error');
  }
  /** Adds a diagnostic unless the very same one is there already (a block used twice repeats its findings). */
  add(d: Diagnostic): void {
    const key = `${d.severity}\u0000${d.code}\u0000${d.message}\u0000${d.span?.file}\u0000${d.span?.line}\u0000${d.span?.column}`;
    if (this.seen.has(key)) return;
    this.seen.add(key);
    this.items.push(d);
  }
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
  out.push(`${where}${d.severity}: ${d.message}`);
  const text = d.span && sources?.get(d.span.file);
  if (d.span && text !== undefined && text !== null) {
    const lines = text.split(/\r?\n/);
    const src = lines[d.span.line - 1];
    if (src !== undefined) {
      const num = String(d.span.line);
      const pad = ' '.repeat(num.length);
      const shown = src.replace(/\t/g, ' ');
      const width = Math.max(1, Math.min(d.span.length, Math.max(1, shown.length - d.span.column + 1)));
      out.push(` ${num} | ${shown}`);
      out.push(` ${pad} | ${' '.repeat(Math.max(0, d.span.column - 1))}${'^'.repeat(width)}`);
    }
  }
  if (d.help) out.push(`  help: ${d.help}`);
  return out.join('\n');
}

/** Renders diagnostics, errors and warnings in source order, separated by blank lines. */
export function formatDiagnostics(ds: readonly Diagnostic[], sources?: SourceMap): string {
  return sortDiagnostics(ds)
    .map((d) => formatDiagnostic(d, sources))
    .join('\n\n');
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
