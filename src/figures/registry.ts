/**
 * Named figures: short text names such as `db(S21)`, `rl(1)` or `k`, each a function from a network to
 * one number per frequency point, and the parser for those names.
 *
 * Name syntax (ports are 1-based; figure names ignore case, as does the `S`):
 *   name                      a whole-network figure, e.g. `k`, `passivity`
 *   name(p)                   a figure of port p, e.g. `rl(1)`, `vswr(2)`; `rl(S11)` is accepted too
 *   name(Sij) | name(S(i,j)) | name(i,j)
 *                             a figure of entry (i, j) = (to, from), e.g. `db(S21)`, `gd(S(12,3))`;
 *                             the short form Sij needs single-digit ports
 * The canonical spelling of a parsed name is lower case with Sij (S(i,j) beyond port 9), or the plain
 * port number for port figures and `il(i,j)` for insertion loss.
 *
 * The table of figures is {@link FIGURES}; definitions and sources are in entry.ts, twoport.ts and
 * nport.ts.
 *
 * @module
 */

import type { Diagnostic } from '../diagnostics/diagnostic.js';
import { didYouMean } from '../diagnostics/suggest.js';
import type { NetworkData } from '../network/types.js';
import {
  groupDelay,
  inputReactance,
  inputResistance,
  insertionLoss,
  magnitudeDb,
  phaseDeg,
  returnLoss,
  unwrappedPhaseDeg,
  vswr,
} from './entry.js';
import { passivityMargin, reciprocityError } from './nport.js';
import { deltaMagnitude, maxGainDb, muFactor, muPrimeFactor, rollettK } from './twoport.js';

/** What a figure takes in parentheses. */
export type FigureArguments = 'none' | 'port' | 'entry';

/** One entry of the figure table. */
export interface FigureSpec {
  /** Lower-case name as written before the parentheses. */
  readonly name: string;
  readonly args: FigureArguments;
  /** Unit of the values: 'dB', 'deg', 's', 'ohm', or '' for a pure number. */
  readonly unit: string;
  /** One-line description for help output. */
  readonly summary: string;
  /** An example of the full name. */
  readonly example: string;
  /** Only defined for two-ports. */
  readonly twoPortOnly: boolean;
  /** For 'entry' figures: the two ports must differ. */
  readonly distinctPorts: boolean;
  /** Computes the figure; `ports` holds 0, 1 or 2 port numbers (1-based) according to `args`. */
  readonly compute: (net: NetworkData, ports: readonly number[], out?: Float64Array) => Float64Array;
}

/** A figure computed over a network: one number per frequency point. */
export type FigureFunction = (net: NetworkData, out?: Float64Array) => Float64Array;

type SpecInput = Omit<FigureSpec, 'twoPortOnly' | 'distinctPorts'> & {
  twoPortOnly?: boolean;
  distinctPorts?: boolean;
};

function spec(x: SpecInput): FigureSpec {
  return { ...x, twoPortOnly: x.twoPortOnly ?? false, distinctPorts: x.distinctPorts ?? false };
}

/** Every named figure, in help order. */
export const FIGURES: readonly FigureSpec[] = [
  spec({
    name: 'db',
    args: 'entry',
    unit: 'dB',
    summary: '|Sij| in dB, 20·log10|Sij|',
    example: 'db(S21)',
    compute: (net, p, out) => magnitudeDb(net, p[0]!, p[1]!, out),
  }),
  spec({
    name: 'rl',
    args: 'port',
    unit: 'dB',
    summary: 'return loss at port i, −20·log10|Sii|',
    example: 'rl(1)',
    compute: (net, p, out) => returnLoss(net, p[0]!, out),
  }),
  spec({
    name: 'il',
    args: 'entry',
    unit: 'dB',
    summary: 'insertion loss from port j to port i, −20·log10|Sij|',
    example: 'il(2,1)',
    distinctPorts: true,
    compute: (net, p, out) => insertionLoss(net, p[0]!, p[1]!, out),
  }),
  spec({
    name: 'vswr',
    args: 'port',
    unit: '',
    summary: 'VSWR at port i, (1 + |Sii|)/(1 − |Sii|)',
    example: 'vswr(1)',
    compute: (net, p, out) => vswr(net, p[0]!, out),
  }),
  spec({
    name: 'phase',
    args: 'entry',
    unit: 'deg',
    summary: 'phase of Sij in (−180, 180]',
    example: 'phase(S21)',
    compute: (net, p, out) => phaseDeg(net, p[0]!, p[1]!, out),
  }),
  spec({
    name: 'uphase',
    args: 'entry',
    unit: 'deg',
    summary: 'phase of Sij unwrapped over the sweep',
    example: 'uphase(S21)',
    compute: (net, p, out) => unwrappedPhaseDeg(net, p[0]!, p[1]!, out),
  }),
  spec({
    name: 'gd',
    args: 'entry',
    unit: 's',
    summary: 'group delay of Sij, −dφ/dω',
    example: 'gd(S21)',
    compute: (net, p, out) => groupDelay(net, p[0]!, p[1]!, out),
  }),
  spec({
    name: 'zin_re',
    args: 'port',
    unit: 'ohm',
    summary: 'input resistance at port i, other ports in their references',
    example: 'zin_re(1)',
    compute: (net, p, out) => inputResistance(net, p[0]!, out),
  }),
  spec({
    name: 'zin_im',
    args: 'port',
    unit: 'ohm',
    summary: 'input reactance at port i, other ports in their references',
    example: 'zin_im(1)',
    compute: (net, p, out) => inputReactance(net, p[0]!, out),
  }),
  spec({
    name: 'k',
    args: 'none',
    unit: '',
    summary: 'Rollett stability factor K',
    example: 'k',
    twoPortOnly: true,
    compute: (net, _p, out) => rollettK(net, out),
  }),
  spec({
    name: 'delta',
    args: 'none',
    unit: '',
    summary: '|Δ| = |S11·S22 − S12·S21|',
    example: 'delta',
    twoPortOnly: true,
    compute: (net, _p, out) => deltaMagnitude(net, out),
  }),
  spec({
    name: 'mu_load',
    args: 'none',
    unit: '',
    summary: 'Edwards–Sinsky μ (load plane): distance from the chart centre to the nearest unstable load; > 1 means unconditionally stable',
    example: 'mu_load',
    twoPortOnly: true,
    compute: (net, _p, out) => muFactor(net, out),
  }),
  spec({
    name: 'mu_source',
    args: 'none',
    unit: '',
    summary: 'Edwards–Sinsky μ′ (source plane): distance from the chart centre to the nearest unstable source; > 1 means unconditionally stable',
    example: 'mu_source',
    twoPortOnly: true,
    compute: (net, _p, out) => muPrimeFactor(net, out),
  }),
  spec({
    name: 'mag',
    args: 'none',
    unit: 'dB',
    summary: 'maximum available gain where K > 1 and |Δ| < 1, else maximum stable gain |S21/S12|',
    example: 'mag',
    twoPortOnly: true,
    compute: (net, _p, out) => maxGainDb(net, out),
  }),
  spec({
    name: 'passivity',
    args: 'none',
    unit: '',
    summary: 'passivity margin 1 − λmax(SᴴS), ≥ 0 when passive',
    example: 'passivity',
    compute: (net, _p, out) => passivityMargin(net, out),
  }),
  spec({
    name: 'reciprocity',
    args: 'none',
    unit: '',
    summary: 'reciprocity error max|Sij − Sji|',
    example: 'reciprocity',
    compute: (net, _p, out) => reciprocityError(net, out),
  }),
];

const BY_NAME: ReadonlyMap<string, FigureSpec> = new Map(FIGURES.map((f) => [f.name, f]));

/**
 * Names that were removed, and the figure that now computes the same thing: the stability factors
 * are named after what they measure (the load or the source plane of Edwards & Sinsky, 1992).
 * The old names do not parse; they get an error pointing at the new name.
 */
const RENAMED: ReadonlyMap<string, string> = new Map([
  ['mu', 'mu_load'],
  ['mu2', 'mu_source'],
]);

/** The table entry for a figure name (case ignored), or undefined. */
export function figureSpec(name: string): FigureSpec | undefined {
  return BY_NAME.get(name.toLowerCase());
}

/** Classes of {@link FigureError}. */
export type FigureErrorCode =
  | 'figure-syntax'
  | 'unknown-figure'
  | 'figure-arguments'
  | 'port-out-of-range'
  | 'needs-two-port';

/** A figure name that cannot be parsed, or cannot be computed for the network at hand. */
export class FigureError extends Error {
  readonly code: FigureErrorCode;
  /** The figure name as given. */
  readonly figure: string;
  /** What is wrong, without the help text. */
  readonly detail: string;
  /** A suggestion such as "did you mean `vswr`?". */
  readonly help: string | undefined;
  constructor(code: FigureErrorCode, figure: string, detail: string, help?: string) {
    super(help === undefined ? detail : `${detail} (${help})`);
    this.name = 'FigureError';
    this.code = code;
    this.figure = figure;
    this.detail = detail;
    this.help = help;
  }
  /** The same finding as a {@link Diagnostic} (no source span), for diagnostic output. */
  toDiagnostic(): Diagnostic {
    const d: Diagnostic = { severity: 'error', code: this.code, message: this.detail };
    if (this.help !== undefined) d.help = this.help;
    return d;
  }
}

/** A parsed figure name, bound to its ports. */
export interface ParsedFigure {
  /** The text as given. */
  readonly text: string;
  /** Canonical spelling, e.g. `db(S21)`. */
  readonly canonical: string;
  readonly spec: FigureSpec;
  /** 1-based port numbers: none, [port], or [to, from]. */
  readonly ports: readonly number[];
  /** Computes the figure; throws {@link FigureError} if the ports do not fit `net`. */
  readonly evaluate: FigureFunction;
}

/** Options for {@link parseFigure}. */
export interface ParseFigureOptions {
  /** If given, ports are checked against this port count (and two-port figures against 2) at once. */
  ports?: number;
}

const NAME = /^[A-Za-z_][A-Za-z0-9_]*/;

/**
 * Parses a figure name such as `db(S21)`, `rl(1)`, `il(2,1)` or `mu_load`. Throws {@link FigureError}
 * with code 'figure-syntax', 'unknown-figure' (with a did-you-mean where one is close),
 * 'figure-arguments', and, when `options.ports` is given, 'port-out-of-range' or 'needs-two-port'.
 */
export function parseFigure(text: string, options: ParseFigureOptions = {}): ParsedFigure {
  const src = text.trim();
  const head = NAME.exec(src);
  if (!head) {
    throw new FigureError(
      'figure-syntax',
      text,
      src === '' ? 'empty figure name' : `a figure name starts with a letter, got \`${src}\``,
      `for example ${FIGURES.slice(0, 4).map((f) => `\`${f.example}\``).join(', ')}`,
    );
  }
  const word = head[0];
  let rest = src.slice(word.length).trimStart();
  let inner: string | undefined;
  if (rest !== '') {
    if (rest[0] !== '(') {
      throw new FigureError('figure-syntax', text, `unexpected \`${rest}\` after \`${word}\``);
    }
    const close = rest.indexOf(')');
    if (close < 0) throw new FigureError('figure-syntax', text, `missing \`)\` in \`${src}\``);
    inner = rest.slice(1, close);
    // S(i,j) inside the parentheses has its own closing parenthesis
    if (/^\s*[sS]\s*\(/.test(inner)) {
      const second = rest.indexOf(')', close + 1);
      if (second < 0) throw new FigureError('figure-syntax', text, `missing \`)\` in \`${src}\``);
      inner = rest.slice(1, second);
      rest = rest.slice(second + 1);
    } else {
      rest = rest.slice(close + 1);
    }
    if (rest.trim() !== '') {
      const done = src.slice(0, src.length - rest.length);
      throw new FigureError('figure-syntax', text, `unexpected \`${rest.trim()}\` after \`${done}\``);
    }
  }
  const name = word.toLowerCase();
  const f = BY_NAME.get(name);
  if (!f) throw unknownFigure(text, word, inner);

  let ports: number[];
  if (f.args === 'none') {
    if (inner !== undefined) {
      throw new FigureError('figure-arguments', text, `\`${f.name}\` takes no arguments`, `write \`${f.example}\``);
    }
    ports = [];
  } else {
    if (inner === undefined || inner.trim() === '') {
      throw new FigureError(
        'figure-arguments',
        text,
        `\`${f.name}\` needs ${f.args === 'port' ? 'a port number' : 'an entry'}`,
        `for example \`${f.example}\``,
      );
    }
    const got = readPorts(inner.trim(), text);
    if (f.args === 'port') {
      if (got.length === 2 && got[0] !== got[1]) {
        throw new FigureError(
          'figure-arguments',
          text,
          `\`${f.name}\` is a figure of one port, \`${inner.trim()}\` is a transmission entry`,
          `for example \`${f.example}\``,
        );
      }
      ports = [got[0]!];
    } else {
      if (got.length !== 2) {
        throw new FigureError(
          'figure-arguments',
          text,
          `\`${f.name}\` needs an entry (to, from), got one port`,
          `for example \`${f.example}\``,
        );
      }
      if (f.distinctPorts && got[0] === got[1]) {
        throw new FigureError(
          'figure-arguments',
          text,
          `\`${f.name}\` needs two different ports`,
          f.name === 'il' ? `for the reflection at port ${got[0]} use \`rl(${got[0]})\`` : undefined,
        );
      }
      ports = got;
    }
  }
  for (const p of ports) {
    if (p < 1) {
      const why = `port ${p} in \`${src}\` is out of range`;
      throw new FigureError('port-out-of-range', text, why, 'ports are numbered from 1');
    }
  }
  const canonical = canonicalName(f, ports);
  if (options.ports !== undefined) checkFits(f, ports, options.ports, text);
  const evaluate: FigureFunction = (net, out) => {
    checkFits(f, ports, net.ports, text);
    return f.compute(net, ports, out);
  };
  return { text, canonical, spec: f, ports, evaluate };
}

/** Shorthand: parses `name` and computes it over `net` (see {@link parseFigure}). */
export function computeFigure(net: NetworkData, name: string, out?: Float64Array): Float64Array {
  return parseFigure(name, { ports: net.ports }).evaluate(net, out);
}

/** Reads `Sij`, `S(i,j)`, `i,j` or `i`; returns one or two port numbers. */
function readPorts(arg: string, text: string): number[] {
  let m = /^[sS]\s*\(\s*(\d+)\s*,\s*(\d+)\s*\)$/.exec(arg);
  if (m) return [Number(m[1]), Number(m[2])];
  m = /^(\d+)\s*,\s*(\d+)$/.exec(arg);
  if (m) return [Number(m[1]), Number(m[2])];
  m = /^[sS](\d+)$/.exec(arg);
  if (m) {
    const digits = m[1]!;
    if (digits.length === 2) return [Number(digits[0]), Number(digits[1])];
    throw new FigureError(
      'figure-arguments',
      text,
      digits.length < 2 ? `\`${arg}\` names one port, an entry needs two` : `\`${arg}\` is ambiguous`,
      digits.length < 2
        ? `write S${digits}${digits} for a reflection or S(i,j)`
        : `write S(i,j), e.g. S(${digits[0]},${digits.slice(1)}) or S(${digits.slice(0, -1)},${digits.slice(-1)})`,
    );
  }
  m = /^(\d+)$/.exec(arg);
  if (m) return [Number(m[1])];
  throw new FigureError(
    'figure-arguments',
    text,
    `cannot read \`${arg}\` as a port or an entry`,
    'write a port number such as 1, or an entry such as S21, S(2,1) or 2,1',
  );
}

function unknownFigure(text: string, word: string, inner: string | undefined): FigureError {
  const names = FIGURES.map((f) => f.name);
  const renamed = RENAMED.get(word.toLowerCase());
  if (renamed !== undefined) {
    const what = renamed === 'mu_load' ? 'the load-side stability factor μ' : 'the source-side stability factor μ′';
    return new FigureError(
      'unknown-figure',
      text,
      `unknown figure \`${word}\`: ${what} is now called \`${renamed}\``,
      `did you mean \`${renamed}\`?`,
    );
  }
  // `rl1`, `vswr2`: a known figure with its port glued on
  const glued = /^([A-Za-z_]+?)(\d+)$/.exec(word);
  if (glued && inner === undefined) {
    const f = BY_NAME.get(glued[1]!.toLowerCase());
    if (f && f.args !== 'none') {
      const digits = glued[2]!;
      const arg = f.args === 'port' ? digits : `S${digits}`;
      const help = `did you mean \`${f.name}(${arg})\`?`;
      return new FigureError('unknown-figure', text, `unknown figure \`${word}\``, help);
    }
  }
  // a bare entry: `S21`
  if (/^[sS]\d+$/.test(word) && inner === undefined) {
    return new FigureError(
      'unknown-figure',
      text,
      `\`${word}\` is an entry, not a figure`,
      `put a figure around it, e.g. \`db(${word.toUpperCase()})\` or \`phase(${word.toUpperCase()})\``,
    );
  }
  const help = didYouMean(word.toLowerCase(), names);
  return new FigureError(
    'unknown-figure',
    text,
    `unknown figure \`${word}\``,
    help ?? `known figures: ${names.join(', ')}`,
  );
}

function checkFits(f: FigureSpec, ports: readonly number[], count: number, text: string): void {
  if (f.twoPortOnly && count !== 2) {
    throw new FigureError(
      'needs-two-port',
      text,
      `\`${f.name}\` is defined for two-ports only, the network has ${count} port${count === 1 ? '' : 's'}`,
    );
  }
  for (const p of ports) {
    if (p > count) {
      throw new FigureError(
        'port-out-of-range',
        text,
        `port ${p} in \`${text.trim()}\` is out of range, the network has ${count} port${count === 1 ? '' : 's'}`,
      );
    }
  }
}

function canonicalName(f: FigureSpec, ports: readonly number[]): string {
  if (f.args === 'none') return f.name;
  if (f.args === 'port') return `${f.name}(${ports[0]})`;
  const [i, j] = [ports[0]!, ports[1]!];
  if (f.name === 'il') return `il(${i},${j})`;
  return i <= 9 && j <= 9 ? `${f.name}(S${i}${j})` : `${f.name}(S(${i},${j}))`;
}
