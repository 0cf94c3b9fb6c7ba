/**
 * Touchstone writer and reader (versions 1.1 and 2.0).
 *
 * What this module relies on from the standard. The source is the Touchstone File Format
 * Specification, IBIS Open Forum: version 1.1 (2002) and version 2.0 (2009). Every point below is
 * recalled, not looked up in the text while writing, so all of it is "(from memory)":
 *
 * - `!` starts a comment that runs to the end of the line, anywhere on a line. Keywords, option-line
 *   fields and values are case-insensitive. Blank lines are allowed.
 * - Option line `# <unit> <parameter> <format> R <n>`; fields may be left out and the defaults are
 *   GHz, S, MA, R 50. Units Hz, kHz, MHz, GHz; parameters S, Y, Z, H, G; formats DB, MA, RI.
 *   Only the first option line counts; later ones are ignored (1.1 text). We read the fields in any
 *   order, each at most once.
 * - Formats: RI = real and imaginary part; MA = magnitude and angle in degrees;
 *   DB = 20·log10(magnitude) and angle in degrees.
 * - Data order per frequency point: the frequency, then complex pairs. 1-port: N11.
 *   2-port: N11 N21 N12 N22, all on one line. 3 ports and more: the matrix row by row (N11 N12 …),
 *   each matrix row starting on a new line and at most four complex pairs per line, so rows of a
 *   5-port and larger continue on further lines. A 3-port therefore has three lines per frequency
 *   point, one per matrix row, each with three pairs (the first line also carries the frequency).
 * - Version 1.1 has one real reference resistance for all ports (R on the option line); Z and Y
 *   data are normalised to it (z = Z/R, y = Y·R). S data are referred to it.
 * - Version 1.1, 2-ports only: noise parameters may follow the network data, five numbers a line
 *   (frequency, NFmin in dB, |Γopt|, angle of Γopt in degrees, Rn normalised); the noise block
 *   starts where the frequency is not above the last network frequency.
 * - Version 2.0: `[Version] 2.0` is the first non-comment line; then the option line;
 *   `[Number of Ports]`; `[Two-Port Data Order]` 12_21 or 21_12, required for 2-ports;
 *   `[Number of Frequencies]` (required); `[Number of Noise Frequencies]` (required when there is
 *   noise data); `[Reference]` with one value per port, which overrides the option-line R and may
 *   continue on the following lines; `[Matrix Format]` Full (default), Lower or Upper (Lower: row i
 *   holds N_i1..N_ii; Upper: row i holds N_ii..N_iN; the other triangle is the mirror image);
 *   `[Mixed-Mode Order]`; `[Begin Information]` … `[End Information]`; `[Network Data]`;
 *   `[Noise Data]`; `[End]` (required, last).
 * - Version 2.0: Z and Y (and H, G) data are NOT normalised: Z is written in ohms and Y in
 *   siemens. We implement that (from memory; this is the one point most worth checking against
 *   the text of the 2.0 specification).
 * - `12_21` means N11 N12 N21 N22 (row-major); `21_12` means N11 N21 N12 N22 (the 1.1 order).
 *
 * Our own choices (not from the standard):
 * - The reader accepts any split of one frequency point over lines, but each point must start on
 *   a new line and no line may hold numbers of two points; the count must be exact.
 * - We do not read H or G data, mixed-mode files with single-ended entries (`S5` in
 *   [Mixed-Mode Order]), or 2.0 versions other than "2.0".
 * - Mixed mode (2.0 `[Mixed-Mode Order]`, from memory): each entry names a row of the matrix,
 *   `Dx,y` the differential and `Cx,y` the common mode of single-ended ports x (positive) and y;
 *   `[Reference]` keeps giving single-ended port references Z0, and the mode references are
 *   2·Z0 and Z0/2. We write our row order [D1, …, DN, C1, …, CN] and read any order into it.
 * - Limits (src/limits.ts): at most MAX_PORTS ports and MAX_NETWORK_VALUES complex values, checked
 *   before anything is allocated; references within [MIN_REFERENCE_OHMS, MAX_REFERENCE_OHMS]. Every
 *   number must stay finite once decoded (frequency × unit, 10^(dB/20), × R of version 1.1 Z):
 *   otherwise an error at that number. Frequencies are >= 0 and strictly increasing.
 * - Noise parameters are read, checked and kept (`NetworkData.noise`), and `onWarning` is told
 *   that they are not used yet, at the first line of the noise block.
 * - The writers check every number they would write (after MA/DB encoding and the 1.1
 *   normalisation) before the first piece, and throw a plain Error rather than write NaN or
 *   Infinity.
 * - The writer always writes [Matrix Format] Full and, for 2-ports, [Two-Port Data Order] 21_12
 *   so that the N11 N21 N12 N22 data order is the same in both versions.
 * - Data values are written in exponent form with `digits` significant digits (two-digit exponent
 *   at least); frequencies (in the chosen unit) and references as the shortest text that reads
 *   back as the same double, whatever `digits` is. A leading space stands in for the sign of
 *   non-negative values so columns line up. Negative zero is written as zero.
 * - An exact zero magnitude has no dB value; we write 20·log10 of the smallest positive double
 *   (about -6466.1 dB), which reads back as zero or the smallest subnormal.
 * - Output is made only of ECMAScript-specified conversions (toExponential, toPrecision, String)
 *   and Math functions, with "\n" line ends: no locale, no clock, so the same bytes every run.
 */
import { OutputError } from './guard.js';
import { MAX_NETWORK_VALUES, MAX_PORTS, MAX_REFERENCE_OHMS, MIN_REFERENCE_OHMS } from '../limits.js';
import { isMixedMode, modeLabels, PAIR_REFERENCE_TOLERANCE, touchstoneModeOrder, type MixedModeData, type PortPair } from '../network/mixed-mode.js';
import type { NetworkData, NoiseParameters, ParameterKind } from '../network/types.js';

/** Touchstone versions we read and write. */
export type TouchstoneVersion = '1.1' | '2.0';
/** How a complex number is written: real/imaginary, magnitude/degrees, or dB/degrees. */
export type ComplexFormat = 'RI' | 'MA' | 'DB';
/** Frequency units of the option line. */
export type FrequencyUnit = 'Hz' | 'kHz' | 'MHz' | 'GHz';

export interface TouchstoneWriteOptions {
  /** Default '1.1'. Version 1.1 needs all port references equal. */
  version?: TouchstoneVersion;
  /** Default 'RI'. */
  format?: ComplexFormat;
  /** Default 'GHz'. */
  frequencyUnit?: FrequencyUnit;
  /** Significant digits of data values, 1..17. Default 15. */
  digits?: number;
  /** Lines written as `!` comments at the top, after the network's title and comments. */
  comments?: string[];
}

export interface TouchstoneReadOptions {
  /** Used in error messages and, for version 1.1, to find the port count from `.sNp`. */
  fileName?: string;
  /** Port count; needed for version 1.1 when the file name gives none. */
  ports?: number;
  /**
   * Called for each warning of the file (line and column 1-based), e.g. noise parameters that are
   * read but not used yet. Without it warnings are dropped.
   */
  onWarning?: (message: string, line: number, column: number) => void;
}

/** A reader error with its place in the file (line and column are 1-based). */
export class TouchstoneError extends Error {
  readonly file: string;
  readonly line: number;
  readonly column: number;
  /** The text of the line the error points at, when known (for the caret display). */
  readonly lineText: string | undefined;
  constructor(file: string, line: number, column: number, message: string, lineText?: string) {
    super(message);
    this.name = 'TouchstoneError';
    this.file = file;
    this.line = line;
    this.column = column;
    this.lineText = lineText;
  }
  /** `file:line:column: error: message`, then the line and a caret under the column when the line is known. */
  describe(): string {
    const head = `${this.file}:${this.line}:${this.column}: error: ${this.message}`;
    if (this.lineText === undefined) return head;
    const text = this.lineText.length > 200 ? this.lineText.slice(0, 200) + ' …' : this.lineText;
    const num = String(this.line);
    const gutter = ' '.repeat(num.length);
    const caretAt = Math.min(Math.max(this.column - 1, 0), text.length);
    const pad = text.slice(0, caretAt).replace(/[^\t]/g, ' ');
    return `${head}\n ${num} | ${text}\n ${gutter} | ${pad}^`;
  }
}

export const DEFAULT_DIGITS = 15;

/** dB value written for an exact zero magnitude: 20·log10 of the smallest positive double. */
export const DB_OF_ZERO = 20 * Math.log10(Number.MIN_VALUE);

const UNIT_SCALE: Record<FrequencyUnit, number> = { Hz: 1, kHz: 1e3, MHz: 1e6, GHz: 1e9 };
const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;

/** File extension for an N-port Touchstone file: `.s2p` for 2 ports. */
export function touchstoneExtension(ports: number): string {
  if (!Number.isInteger(ports) || ports < 1) {
    throw new RangeError(`port count must be a positive integer, got ${ports}`);
  }
  return `.s${ports}p`;
}

// ---------------------------------------------------------------------------------------------
// Shared helpers (also used by the CSV and JSON writers)

/**
 * Converts (re, im) to the two numbers of `format`, written into out[0], out[1].
 * Angles in degrees in (-180, 180]; a zero magnitude in dB becomes {@link DB_OF_ZERO}.
 */
export function encodeComplex(format: ComplexFormat, re: number, im: number, out: Float64Array): void {
  if (format === 'RI') {
    out[0] = re;
    out[1] = im;
    return;
  }
  const mag = Math.hypot(re, im);
  out[0] = format === 'MA' ? mag : mag === 0 ? DB_OF_ZERO : 20 * Math.log10(mag);
  out[1] = Math.atan2(im, re) * DEG;
}

/** Inverse of {@link encodeComplex}: the two numbers of `format` to (re, im) in out[0], out[1]. */
export function decodeComplex(format: ComplexFormat, a: number, b: number, out: Float64Array): void {
  if (format === 'RI') {
    out[0] = a;
    out[1] = b;
    return;
  }
  const mag = format === 'MA' ? a : Math.pow(10, a / 20);
  const th = b * RAD;
  out[0] = mag * Math.cos(th);
  out[1] = mag * Math.sin(th);
}

/**
 * Checks that a NetworkData is well formed: positive integer port count, array lengths that
 * match, finite values, positive finite references, finite non-negative strictly increasing
 * frequencies. Throws an Error naming `what` (the writer) otherwise.
 */
export function checkNetworkData(net: NetworkData, what: string): void {
  const n = net.ports;
  if (!Number.isInteger(n) || n < 1) throw new Error(`${what}: port count must be a positive integer, got ${n}`);
  if (net.parameter !== 'S' && net.parameter !== 'Z' && net.parameter !== 'Y') {
    throw new Error(`${what}: parameter must be S, Z or Y, got ${String(net.parameter)}`);
  }
  if (net.references.length !== n) {
    throw new Error(`${what}: ${net.references.length} reference impedances for ${n} ports`);
  }
  for (let p = 0; p < n; p++) {
    const r = net.references[p]!;
    if (!(Number.isFinite(r) && r > 0)) throw new Error(`${what}: reference of port ${p + 1} must be positive, got ${r}`);
  }
  const nf = net.frequencies.length;
  if (net.values.length !== 2 * n * n * nf) {
    throw new Error(`${what}: ${net.values.length} values, expected ${2 * n * n * nf} (2·${n}²·${nf})`);
  }
  for (let k = 0; k < nf; k++) {
    const f = net.frequencies[k]!;
    if (!(Number.isFinite(f) && f >= 0)) throw new Error(`${what}: frequency ${k + 1} must be finite and >= 0, got ${f}`);
    if (k > 0 && !(f > net.frequencies[k - 1]!)) {
      throw new Error(`${what}: frequencies must increase; point ${k + 1} (${f} Hz) is not above point ${k} (${net.frequencies[k - 1]} Hz)`);
    }
  }
  for (let x = 0; x < net.values.length; x++) {
    if (!Number.isFinite(net.values[x]!)) {
      const pair = x >> 1;
      const k = Math.floor(pair / (n * n));
      const i = Math.floor((pair % (n * n)) / n);
      const j = pair % n;
      throw new Error(`${what}: value of ${net.parameter}(${i + 1},${j + 1}) at point ${k + 1} is not finite`);
    }
  }
}

/** The dB value of the largest double (20·log10 of 1.7976931348623157e308, IEEE 754 binary64). */
const MAX_DB = 20 * Math.log10(Number.MAX_VALUE);

/**
 * Checks, before anything is written, that every value of `net` times `norm` gives two finite
 * numbers in `format` (a magnitude can overflow where real and imaginary parts do not). Throws a
 * an OutputError naming the entry and the frequency otherwise.
 */
export function checkEncodedFinite(net: NetworkData, format: ComplexFormat, norm: number, what: string, digits = 17): void {
  const n = net.ports;
  const pair = new Float64Array(2);
  for (let x = 0; x < net.values.length; x += 2) {
    encodeComplex(format, net.values[x]! * norm, net.values[x + 1]! * norm, pair);
    // a dB value rounded to `digits` digits may stand for a magnitude past the largest double
    // (1.7976931348623157e308 is 6165.09431… dB): a reader could not decode it
    const overDb = format === 'DB' && pair[0]! * (1 + 0.5 * 10 ** (1 - digits)) >= MAX_DB;
    if (!Number.isFinite(pair[0]!) || !Number.isFinite(pair[1]!) || overDb) {
      const q = x >> 1;
      const k = Math.floor(q / (n * n));
      const i = Math.floor((q % (n * n)) / n);
      const j = q % n;
      const scaled = norm !== 1 ? ' after the normalisation to the reference of version 1.1' : '';
      throw new OutputError(
        `${what}: ${net.parameter}(${i + 1},${j + 1}) at ${net.frequencies[k]} Hz is beyond the range of double-precision numbers in ${format}${scaled}; nothing was written` +
          (format === 'RI' ? '' : ' (RI may still hold it)'),
      );
    }
  }
}

/** Checks a significant-digit count (1..17) and returns it, or the default. */
export function checkDigits(digits: number | undefined, fallback: number): number {
  if (digits === undefined) return fallback;
  if (!Number.isInteger(digits) || digits < 1 || digits > 17) {
    throw new RangeError(`digits must be an integer from 1 to 17, got ${digits}`);
  }
  return digits;
}

/** Shortest text that reads back as `x` rounded to `digits` significant digits. */
export function formatShortest(x: number, digits?: number): string {
  let v = digits === undefined ? x : Number(x.toPrecision(digits));
  if (!Number.isFinite(v)) v = x; // rounded up past the largest double (1.7976931348623157e308 to 2 digits): keep it exact
  return v === 0 ? '0' : String(v);
}

/** Exponent form with `digits` significant digits and an exponent of at least two digits. */
function formatExp(x: number, digits: number): string {
  const v = x === 0 ? 0 : x; // -0 → 0
  let s = v.toExponential(digits - 1);
  if (!Number.isFinite(Number(s))) {
    // rounded up past the largest double: cut the exact 17-digit form instead (toward zero, so finite)
    const full = v.toExponential(16);
    const e = full.indexOf('e');
    s = full.slice(0, digits === 1 ? (v < 0 ? 2 : 1) : (v < 0 ? 2 : 1) + digits) + full.slice(e);
  }
  const e = s.indexOf('e');
  const exp = s.slice(e + 2);
  return `${s.slice(0, e)}e${s[e + 1]}${exp.length < 2 ? '0' + exp : exp}`;
}

// ---------------------------------------------------------------------------------------------
// Writer

/** Single-ended port references of mixed-mode data: Z0 of pair k = (its differential reference)/2 for both its ports. */
function singleEndedReferences(net: MixedModeData): Float64Array {
  const out = new Float64Array(net.ports);
  net.pairs.forEach(([p, q], k) => {
    out[p - 1] = net.references[k]! / 2;
    out[q - 1] = net.references[k]! / 2;
  });
  return out;
}

/** Pair order of one frequency point: [i0, j0, i1, j1, …], 0-based. */
function pairOrder(n: number): number[] {
  if (n === 2) return [0, 0, 1, 0, 0, 1, 1, 1]; // N11 N21 N12 N22
  const order: number[] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) order.push(i, j);
  return order;
}

function commentLines(lines: readonly string[]): string[] {
  const out: string[] = [];
  for (const text of lines) {
    for (const l of text.split(/\r\n|\r|\n/)) out.push(l === '' ? '!' : `! ${l}`);
  }
  return out;
}

/**
 * Formats network data as a Touchstone file (see the module comment for the layout).
 * Throws an Error when the data are malformed or, for version 1.1, when the ports do not share
 * one reference impedance.
 */
export function formatTouchstone(net: NetworkData, opts: TouchstoneWriteOptions = {}): string {
  return Array.from(touchstoneChunks(net, opts)).join('');
}

/** Lines a piece of {@link inPieces} holds at most. */
const PIECE_LINES = 512;

/**
 * Text lines (each without its line break) as pieces of at most {@link PIECE_LINES} lines, every
 * line ended by "\n", after a first piece `head` — the form the streaming writers hand out.
 */
export function* inPieces(head: string, lines: Iterable<string>): Generator<string> {
  yield head;
  const block: string[] = [];
  for (const line of lines) {
    block.push(line);
    if (block.length >= PIECE_LINES) {
      yield block.join('\n') + '\n';
      block.length = 0;
    }
  }
  if (block.length > 0) yield block.join('\n') + '\n';
}

/**
 * The text of {@link formatTouchstone} in pieces, for writing a large file without holding all
 * of it: every check is made here, before the first piece (which holds the header), so a
 * consumer that has started writing meets no error of the data's.
 */
export function touchstoneChunks(net: NetworkData, opts: TouchstoneWriteOptions = {}): Iterable<string> {
  const version = opts.version ?? '1.1';
  const format = opts.format ?? 'RI';
  const unit = opts.frequencyUnit ?? 'GHz';
  const digits = checkDigits(opts.digits, DEFAULT_DIGITS);
  if (version !== '1.1' && version !== '2.0') throw new Error(`Touchstone: unknown version ${String(version)}`);
  if (format !== 'RI' && format !== 'MA' && format !== 'DB') throw new Error(`Touchstone: unknown format ${String(format)}`);
  const scale = UNIT_SCALE[unit];
  if (scale === undefined) throw new Error(`Touchstone: unknown frequency unit ${String(unit)}`);
  checkNetworkData(net, 'Touchstone');
  const n = net.ports;
  const nf = net.frequencies.length;
  if (nf === 0) throw new OutputError('Touchstone: no frequency points to write');
  const mixed = isMixedMode(net);
  if (mixed && version !== '2.0') {
    throw new OutputError('Touchstone: mixed-mode data are written as version 2.0, whose [Mixed-Mode Order] says which row is which mode; version 1.1 cannot say it');
  }
  // Mixed-mode files give the single-ended references in [Reference]; the mode references are
  // 2·Z0 (differential) and Z0/2 (common) of them (Touchstone 2.0, [Mixed-Mode Order]; from memory).
  const fileRefs = mixed ? singleEndedReferences(net) : net.references;
  const r0 = fileRefs[0]!;
  if (version === '1.1') {
    for (let p = 1; p < n; p++) {
      if (net.references[p] !== r0) {
        throw new Error(
          `Touchstone 1.1 needs one reference impedance for all ports, but port 1 has ${r0} ohm and port ${p + 1} has ${net.references[p]} ohm; write version 2.0 instead`,
        );
      }
    }
  }
  // Version 1.1 normalises Z and Y to R (z = Z/R, y = Y·R); version 2.0 writes them as they are.
  let norm = 1;
  if (version === '1.1') {
    if (net.parameter === 'Z') norm = 1 / r0;
    else if (net.parameter === 'Y') norm = r0;
  }
  checkEncodedFinite(net, format, norm, 'Touchstone', digits);

  const lines: string[] = [];
  const header: string[] = [];
  if (net.title !== undefined && net.title !== '') header.push(net.title);
  if (net.comments) header.push(...net.comments);
  if (opts.comments) header.push(...opts.comments);
  lines.push(...commentLines(header));
  const optionLine = `# ${unit} ${net.parameter} ${format} R ${formatShortest(r0)}`;
  if (version === '2.0') {
    lines.push('[Version] 2.0');
    lines.push(optionLine);
    lines.push(`[Number of Ports] ${n}`);
    if (n === 2) lines.push('[Two-Port Data Order] 21_12');
    lines.push(`[Number of Frequencies] ${nf}`);
    const refs: string[] = [];
    for (let p = 0; p < n; p++) refs.push(formatShortest(fileRefs[p]!));
    lines.push(`[Reference] ${refs.join(' ')}`);
    lines.push('[Matrix Format] Full');
    if (mixed) lines.push(`[Mixed-Mode Order] ${touchstoneModeOrder(net.pairs)}`);
    lines.push('[Network Data]');
  } else {
    lines.push(optionLine);
  }

  let lastScaled = -Infinity;
  for (let k = 0; k < nf; k++) {
    const scaled = net.frequencies[k]! / scale;
    if (!(scaled > lastScaled)) {
      throw new OutputError(`Touchstone: frequencies ${net.frequencies[k - 1]} Hz and ${net.frequencies[k]} Hz are equal in ${unit}`, 'choose a smaller frequency unit, e.g. --freq-unit Hz');
    }
    lastScaled = scaled;
  }
  return inPieces(lines.join('\n') + '\n', points());

  function* points(): Generator<string> {
    const order = pairOrder(n);
    const pair = new Float64Array(2);
    const num = (x: number): string => {
      const s = formatExp(x, digits);
      return s[0] === '-' ? s : ' ' + s;
    };
    // Pairs per output line: 1- and 2-ports put the whole point on one line; 3 ports and more put
    // each matrix row on its own line(s), at most four pairs a line.
    const rowLen = n <= 2 ? n * n : n;
    for (let k = 0; k < nf; k++) {
      // Frequencies are always written in full (shortest round-trip text), whatever `digits` is,
      // so that close points never merge.
      const freqText = formatShortest(net.frequencies[k]! / scale);
      const indent = ' '.repeat(freqText.length);
      let line = freqText;
      for (let q = 0; q < n * n; q++) {
        const i = order[2 * q]!;
        const j = order[2 * q + 1]!;
        const at = 2 * ((k * n + i) * n + j);
        encodeComplex(format, net.values[at]! * norm, net.values[at + 1]! * norm, pair);
        const posInRow = q % rowLen;
        if (q > 0 && (posInRow === 0 || (n > 2 && posInRow % 4 === 0))) {
          yield line;
          line = indent;
        }
        line += ' ' + num(pair[0]!) + ' ' + num(pair[1]!);
      }
      yield line;
    }
    if (version === '2.0') yield '[End]';
  }
}

// ---------------------------------------------------------------------------------------------
// Reader

interface Token {
  text: string;
  /** 1-based column. */
  col: number;
}

// one way only to match each digit (no backtracking that grows with the length of a bad token)
const NUMBER_RE = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A token as a message quotes it: a long one is cut (a 100,000-digit token is not repeated). */
function cut(text: string): string {
  return text.length > 40 ? `${text.slice(0, 32)}…` : text;
}

const KNOWN_KEYWORDS = new Set([
  'version',
  'number of ports',
  'two-port data order',
  'number of frequencies',
  'number of noise frequencies',
  'reference',
  'matrix format',
  'mixed-mode order',
  'begin information',
  'end information',
  'network data',
  'noise data',
  'end',
]);

/** Keywords allowed after [Network Data]. */
const AFTER_DATA_KEYWORDS = new Set(['noise data', 'end', 'begin information', 'end information']);

function tokenize(text: string, offset: number): Token[] {
  const out: Token[] = [];
  const re = /\S+/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(text)) !== null) out.push({ text: m[0], col: offset + m.index + 1 });
  return out;
}

type MatrixFormat = 'full' | 'lower' | 'upper';

/** A copy of `a` with room for at least `need` elements (capacity doubled). */
function grow(a: Float64Array, need: number): Float64Array<ArrayBuffer> {
  const out = new Float64Array(Math.max(need, 2 * a.length));
  out.set(a);
  return out;
}

class Reader {
  private readonly file: string;
  private readonly lines: string[];
  private readonly opts: TouchstoneReadOptions;
  private version: TouchstoneVersion = '1.1';
  private lineNo = 0; // 1-based number of the line being read

  // option line
  private optionSeen = false;
  private scale = 1e9;
  private parameter: ParameterKind = 'S';
  private format: ComplexFormat = 'MA';
  private optionR = 50;

  // version 2.0 keywords, with the line each was seen on
  private seen = new Map<string, number>();
  private ports = 0;
  private twoPortOrder: '12_21' | '21_12' = '21_12';
  private declaredFreqs = 0;
  private declaredNoise = -1;
  private refs: number[] | undefined;
  private refsPending = false;
  private matrixFormat: MatrixFormat = 'full';
  /** Mixed-mode files: the pairs, and the row in our order of each row of the file. */
  private modePairs: PortPair[] | undefined;
  private modePerm: number[] | undefined;

  // network data
  private section: 'header' | 'network' | 'noise' | 'info' | 'after-end' = 'header';
  private order: number[] = [];
  private perPoint = 0;
  private point: number[] = [];
  private pointLine = 0;
  private pointCol = 0;
  /** Line and column of each number of `point`: [line0, col0, line1, col1, …]. */
  private pointAt: number[] = [];
  // Typed arrays that grow by doubling: a plain array of numbers aborts the whole process (a fatal
  // V8 error, not an exception) above about 1.3e8 elements, well below MAX_NETWORK_VALUES complex values.
  private freqs = new Float64Array(16);
  private nFreqs = 0;
  private vals = new Float64Array(64);
  private nVals = 0;
  private lastNoiseFreq = -Infinity;
  private noiseCount = 0;
  private noiseLine = 0;
  /** Noise points as read: [f (Hz), NFmin dB, |Γopt|, ∠Γopt deg, Rn normalised] each. */
  private readonly noise: number[] = [];
  private readonly comments: string[] = [];

  constructor(text: string, opts: TouchstoneReadOptions) {
    this.opts = opts;
    this.file = opts.fileName ?? '<input>';
    this.lines = (text.charCodeAt(0) === 0xfeff ? text.slice(1) : text).split(/\r\n|\r|\n/);
    if (this.lines.length > 1 && this.lines[this.lines.length - 1] === '') this.lines.pop();
  }

  private fail(line: number, col: number, msg: string): never {
    throw new TouchstoneError(this.file, line, col, msg, this.lines[line - 1]);
  }

  private warn(line: number, col: number, msg: string): void {
    this.opts.onWarning?.(msg, line, col);
  }

  read(): NetworkData {
    let first = true;
    for (let li = 0; li < this.lines.length; li++) {
      this.lineNo = li + 1;
      const raw = this.lines[li]!;
      const bang = raw.indexOf('!');
      const content = bang >= 0 ? raw.slice(0, bang) : raw;
      if (bang >= 0) {
        const c = raw.slice(bang + 1);
        this.comments.push((c.startsWith(' ') ? c.slice(1) : c).trimEnd());
      }
      const trimmed = content.trim();
      if (trimmed === '') continue;
      const lead = content.length - content.trimStart().length;
      if (this.section === 'after-end') continue; // anything after [End] is not read
      if (this.section === 'info' && !trimmed.startsWith('[')) continue; // information block: skipped
      if (first) {
        first = false;
        if (trimmed.startsWith('[') && this.keywordName(content, lead) === 'version') this.version = '2.0';
      }
      if (trimmed.startsWith('[')) {
        this.keyword(content, lead);
      } else if (trimmed.startsWith('#')) {
        this.optionLine(content, lead);
      } else if (this.refsPending) {
        this.referenceValues(tokenize(content, 0));
      } else {
        this.dataLine(tokenize(content, 0));
      }
    }
    return this.finish();
  }

  private keywordName(content: string, lead: number): string {
    const close = content.indexOf(']', lead);
    if (close < 0) this.fail(this.lineNo, lead + 1, 'keyword has no closing "]"');
    return content.slice(lead + 1, close).trim().replace(/\s+/g, ' ').toLowerCase();
  }

  private keyword(content: string, lead: number): void {
    const name = this.keywordName(content, lead);
    const close = content.indexOf(']', lead);
    const args = tokenize(content.slice(close + 1), close + 1);
    const line = this.lineNo;
    const col = lead + 1;
    const shown = content.slice(lead, close + 1);

    if (this.section === 'info') {
      if (name === 'end information') {
        this.section = 'header';
        this.noArgs(args, shown);
      }
      return; // everything inside the information block is skipped
    }
    if (this.version === '1.1') {
      if (name === 'version') this.fail(line, col, '[Version] must be the first line that is not a comment or blank');
      this.fail(line, col, KNOWN_KEYWORDS.has(name)
        ? `keyword ${shown} belongs to Touchstone 2.0, but the file does not start with [Version] 2.0`
        : `unknown keyword ${shown}`);
    }
    if (!KNOWN_KEYWORDS.has(name)) this.fail(line, col, `unknown keyword ${shown}`);
    if (this.refsPending) {
      this.fail(this.seen.get('reference')!, 1, `[Reference] needs ${this.ports} values, found ${this.refs!.length}`);
    }
    if (this.seen.has(name) && name !== 'end information') {
      this.fail(line, col, `${shown} appears twice (first at line ${this.seen.get(name)})`);
    }
    if (this.section === 'network') this.endNetwork(line);
    if (this.section === 'noise') this.endNoise(line);
    if (name !== 'version' && !this.seen.has('version')) {
      this.fail(line, col, '[Version] must be the first line that is not a comment or blank');
    }
    if (this.seen.has('network data') && !AFTER_DATA_KEYWORDS.has(name)) {
      this.fail(line, col, `${shown} must come before [Network Data]`);
    }
    this.seen.set(name, line);
    const needPorts = (): void => {
      if (!this.seen.has('number of ports')) this.fail(line, col, `${shown} must come after [Number of Ports]`);
    };

    switch (name) {
      case 'version': {
        const v = this.oneArg(args, shown);
        if (v.text !== '2.0') this.fail(line, v.col, `unsupported Touchstone version "${v.text}"; this reader knows 1.1 and 2.0`);
        return;
      }
      case 'number of ports': {
        if (!this.optionSeen) this.fail(line, col, 'the option line (# …) must come before [Number of Ports]');
        const a = this.oneArg(args, shown);
        this.ports = this.positiveInt(a, shown);
        if (this.ports > MAX_PORTS) {
          this.fail(line, a.col, `${shown} ${a.text} is above the limit of ${MAX_PORTS} ports a data file may have`);
        }
        if (this.opts.ports !== undefined && this.opts.ports !== this.ports) {
          this.fail(line, args[0]!.col, `file has ${this.ports} ports, but ${this.opts.ports} were expected`);
        }
        return;
      }
      case 'two-port data order': {
        needPorts();
        const a = this.oneArg(args, shown);
        if (this.ports !== 2) this.fail(line, col, `[Two-Port Data Order] is only for 2-port files, this one has ${this.ports} ports`);
        if (a.text === '12_21' || a.text === '21_12') this.twoPortOrder = a.text;
        else this.fail(line, a.col, `[Two-Port Data Order] must be 12_21 or 21_12, got "${a.text}"`);
        return;
      }
      case 'number of frequencies': {
        needPorts();
        const a = this.oneArg(args, shown);
        this.declaredFreqs = this.positiveInt(a, shown);
        this.checkSize(this.declaredFreqs, line, a.col);
        return;
      }
      case 'number of noise frequencies':
        needPorts();
        this.declaredNoise = this.positiveInt(this.oneArg(args, shown), shown);
        return;
      case 'reference':
        needPorts();
        this.refs = [];
        this.refsPending = true;
        this.referenceValues(args);
        return;
      case 'matrix format': {
        const a = this.oneArg(args, shown);
        const v = a.text.toLowerCase();
        if (v === 'full' || v === 'lower' || v === 'upper') this.matrixFormat = v;
        else this.fail(line, a.col, `[Matrix Format] must be Full, Lower or Upper, got "${a.text}"`);
        return;
      }
      case 'mixed-mode order':
        needPorts();
        return this.mixedModeOrder(args, line, col);
      case 'begin information':
        this.noArgs(args, shown);
        this.section = 'info';
        return;
      case 'end information':
        return this.fail(line, col, '[End Information] without [Begin Information]');
      case 'network data':
        this.noArgs(args, shown);
        needPorts();
        if (!this.optionSeen) this.fail(line, col, 'missing option line (# …) before [Network Data]');
        if (!this.seen.has('number of frequencies')) this.fail(line, col, '[Number of Frequencies] is required before [Network Data]');
        if (this.ports === 2 && !this.seen.has('two-port data order')) {
          this.fail(line, col, '[Two-Port Data Order] is required in 2-port files');
        }
        this.startNetwork();
        return;
      case 'noise data':
        this.noArgs(args, shown);
        if (!this.seen.has('network data')) this.fail(line, col, '[Noise Data] must come after [Network Data]');
        if (this.ports !== 2) this.fail(line, col, 'noise data are only defined for 2-port files');
        if (this.declaredNoise < 0) this.fail(line, col, '[Number of Noise Frequencies] is required before [Noise Data]');
        this.startNoise(line, col);
        return;
      case 'end':
        this.noArgs(args, shown);
        if (!this.seen.has('network data')) this.fail(line, col, '[End] before [Network Data]');
        this.section = 'after-end';
        return;
    }
  }

  /**
   * Reads `[Mixed-Mode Order] D1,3 D2,4 C1,3 C2,4` (any order of the entries): every pair must
   * appear once as D and once as C, and every port in one pair. Single-ended entries (`S5`) are
   * not read. The rows are then stored in our order [D1, …, DN, C1, …, CN] (pairs numbered in the
   * order of their D entries).
   */
  private mixedModeOrder(args: Token[], line: number, col: number): void {
    const n = this.ports;
    if (args.length !== n) this.fail(line, col, `[Mixed-Mode Order] needs ${n} entries, one per row of the ${n}-port matrix, found ${args.length}`);
    const entries: { mode: 'D' | 'C'; p: number; q: number; t: Token }[] = [];
    for (const t of args) {
      const m = /^([DdCcSs])(\d+)(?:,(\d+))?$/.exec(t.text);
      if (!m) this.fail(line, t.col, `"${cut(t.text)}" is not a mixed-mode entry: write D or C and two port numbers, e.g. D1,3`);
      if (m[1]!.toUpperCase() === 'S') this.fail(line, t.col, `single-ended entries ("${cut(t.text)}") in [Mixed-Mode Order] are not supported; every port must belong to a pair`);
      if (m[3] === undefined) this.fail(line, t.col, `"${cut(t.text)}" needs two port numbers, e.g. ${m[1]}1,3`);
      const p = Number(m[2]);
      const q = Number(m[3]);
      for (const x of [p, q]) if (x < 1 || x > n) this.fail(line, t.col, `"${cut(t.text)}" names port ${x}; the ports are 1 to ${n}`);
      if (p === q) this.fail(line, t.col, `"${cut(t.text)}" pairs a port with itself`);
      entries.push({ mode: m[1]!.toUpperCase() as 'D' | 'C', p, q, t });
    }
    const pairs: PortPair[] = [];
    const owner = new Map<number, number>();
    for (const e of entries) {
      if (e.mode !== 'D') continue;
      for (const x of [e.p, e.q]) if (owner.has(x)) this.fail(line, e.t.col, `port ${x} belongs to more than one differential entry`);
      owner.set(e.p, pairs.length);
      owner.set(e.q, pairs.length);
      pairs.push([e.p, e.q]);
    }
    if (2 * pairs.length !== n) this.fail(line, col, `[Mixed-Mode Order] needs ${n / 2} D entries and ${n / 2} C entries for ${n} ports`);
    const perm: number[] = [];
    const seenC = new Set<number>();
    for (const e of entries) {
      const k = owner.get(e.p)!;
      if (e.mode === 'D') perm.push(k);
      else {
        const [p, q] = pairs[k]!;
        if (!(e.p === p && e.q === q) || seenC.has(k)) this.fail(line, e.t.col, `"${e.t.text}" must be the common mode of a differential entry, written with its ports in the same order (C${p},${q})`);
        seenC.add(k);
        perm.push(pairs.length + k);
      }
    }
    this.modePairs = pairs;
    this.modePerm = perm;
  }

  private oneArg(args: Token[], shown: string): Token {
    if (args.length === 0) this.fail(this.lineNo, 1, `${shown} needs a value`);
    if (args.length > 1) this.fail(this.lineNo, args[1]!.col, `${shown} takes one value, found ${args.length}`);
    return args[0]!;
  }

  private noArgs(args: Token[], shown: string): void {
    if (args.length > 0) this.fail(this.lineNo, args[0]!.col, `${shown} takes no value, found "${args[0]!.text}"`);
  }

  /** Fails when `points` frequency points of this file's port count pass {@link MAX_NETWORK_VALUES}. */
  private checkSize(points: number, line: number, col: number): void {
    const n = this.ports;
    if (points * n * n > MAX_NETWORK_VALUES) {
      this.fail(line, col, `${points} frequency points of a ${n}-port are ${points * n * n} complex values, above the limit of ${MAX_NETWORK_VALUES} a data file may have`);
    }
  }

  /** Fails unless `v` (from token `t`) lies in the documented range of reference impedances. */
  private checkReference(v: number, t: Token, what: string): void {
    if (!(v > 0)) this.fail(this.lineNo, t.col, `${what} must be positive, got ${cut(t.text)}`);
    if (v < MIN_REFERENCE_OHMS || v > MAX_REFERENCE_OHMS) {
      this.fail(this.lineNo, t.col, `${what} ${cut(t.text)} ohm is outside the range a data file may give, ${MIN_REFERENCE_OHMS} to ${MAX_REFERENCE_OHMS} ohm`);
    }
  }

  private positiveInt(t: Token, shown: string): number {
    if (!/^\+?\d+$/.test(t.text) || Number(t.text) < 1) {
      this.fail(this.lineNo, t.col, `${shown} needs a positive whole number, got "${cut(t.text)}"`);
    }
    return Number(t.text);
  }

  private number(t: Token): number {
    if (!NUMBER_RE.test(t.text)) this.fail(this.lineNo, t.col, `"${cut(t.text)}" is not a number`);
    const v = Number(t.text);
    if (!Number.isFinite(v)) this.fail(this.lineNo, t.col, `"${cut(t.text)}" is out of range`);
    return v;
  }

  private referenceValues(tokens: Token[]): void {
    const refs = this.refs!;
    for (const t of tokens) {
      if (refs.length === this.ports) {
        this.fail(this.lineNo, t.col, `[Reference] needs ${this.ports} values; "${cut(t.text)}" is one too many`);
      }
      const v = this.number(t);
      this.checkReference(v, t, 'reference impedance');
      refs.push(v);
    }
    if (refs.length === this.ports) this.refsPending = false;
  }

  private optionLine(content: string, lead: number): void {
    if (this.optionSeen) return; // only the first option line counts (1.1 text, from memory)
    this.optionSeen = true;
    const tokens = tokenize(content.slice(lead + 1), lead + 1);
    const got = new Set<string>();
    const once = (what: string, t: Token): void => {
      if (got.has(what)) this.fail(this.lineNo, t.col, `option line gives the ${what} twice ("${cut(t.text)}")`);
      got.add(what);
    };
    for (let q = 0; q < tokens.length; q++) {
      const t = tokens[q]!;
      const u = t.text.toUpperCase();
      switch (u) {
        case 'HZ': case 'KHZ': case 'MHZ': case 'GHZ':
          once('frequency unit', t);
          this.scale = u === 'HZ' ? 1 : u === 'KHZ' ? 1e3 : u === 'MHZ' ? 1e6 : 1e9;
          break;
        case 'S': case 'Y': case 'Z':
          once('parameter', t);
          this.parameter = u;
          break;
        case 'H': case 'G':
          return this.fail(this.lineNo, t.col, `${u}-parameter files are not supported (only S, Y and Z)`);
        case 'RI': case 'MA': case 'DB':
          once('format', t);
          this.format = u as ComplexFormat;
          break;
        case 'R': {
          once('reference', t);
          const v = tokens[q + 1];
          if (v === undefined) this.fail(this.lineNo, t.col, 'option-line R needs a resistance after it');
          const r = this.number(v);
          this.checkReference(r, v, 'option-line R');
          this.optionR = r;
          q++;
          break;
        }
        default:
          this.fail(this.lineNo, t.col, `unknown option-line field "${cut(t.text)}"`);
      }
    }
  }

  private startNetwork(): void {
    const n = this.ports;
    const order: number[] = [];
    if (this.matrixFormat === 'full') {
      if (n === 2 && this.twoPortOrder === '21_12') order.push(0, 0, 1, 0, 0, 1, 1, 1);
      else for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) order.push(i, j);
    } else if (this.matrixFormat === 'lower') {
      for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) order.push(i, j);
    } else {
      for (let i = 0; i < n; i++) for (let j = i; j < n; j++) order.push(i, j);
    }
    this.order = order;
    this.perPoint = 1 + order.length;
    this.section = 'network';
  }

  private dataLine(tokens: Token[]): void {
    const line = this.lineNo;
    if (this.section === 'noise') return this.noiseLineData(tokens);
    if (this.section !== 'network') {
      if (this.version === '2.0') this.fail(line, tokens[0]!.col, 'data outside [Network Data] or [Noise Data]');
      if (!this.optionSeen) this.fail(line, tokens[0]!.col, 'missing option line (# …) before the data');
      this.ports = this.portsFor11(line, tokens[0]!.col);
      this.startNetwork();
    }
    const nums: number[] = [];
    for (const t of tokens) nums.push(this.number(t));

    if (this.point.length === 0) {
      const f = nums[0]! * this.scale;
      const last = this.nFreqs > 0 ? this.freqs[this.nFreqs - 1]! : -Infinity;
      if (!(f > last)) {
        if (this.version === '1.1' && this.ports === 2 && this.nFreqs > 0) {
          this.startNoise(line, tokens[0]!.col);
          return this.noiseLineData(tokens);
        }
        this.checkFrequency(f, tokens[0]!);
        this.fail(line, tokens[0]!.col, `frequencies must increase: ${tokens[0]!.text} is not above the previous frequency`);
      }
      if (this.version === '2.0' && this.nFreqs === this.declaredFreqs) {
        this.fail(line, tokens[0]!.col, `more frequency points than [Number of Frequencies] ${this.declaredFreqs}`);
      }
      this.checkFrequency(f, tokens[0]!);
      this.checkSize(this.nFreqs + 1, line, tokens[0]!.col);
      this.pointLine = line;
      this.pointCol = tokens[0]!.col;
    }
    const need = this.perPoint - this.point.length;
    if (nums.length > need) {
      if (this.point.length === 0) {
        this.fail(line, tokens[need]!.col, `too many numbers: a frequency point of this ${this.ports}-port file has ${this.perPoint} (frequency + ${this.order.length / 2} complex pairs), this line has ${nums.length}`);
      }
      this.fail(this.pointLine, this.pointCol, `wrong count of numbers: the frequency point starting here needs ${this.perPoint}, it has ${this.point.length} before line ${line}, and line ${line} brings ${nums.length} more`);
    }
    for (let q = 0; q < nums.length; q++) {
      this.point.push(nums[q]!);
      this.pointAt.push(line, tokens[q]!.col);
    }
    if (this.point.length === this.perPoint) this.storePoint();
  }

  /** Fails unless the frequency `f` (Hz, from token `t`) is finite and not negative. */
  private checkFrequency(f: number, t: Token): void {
    if (!Number.isFinite(f)) {
      this.fail(this.lineNo, t.col, `frequency ${cut(t.text)} ${this.unitName()} is beyond the range of double-precision numbers (about 1.8e308 Hz)`);
    }
    if (f < 0) this.fail(this.lineNo, t.col, `frequencies must not be negative, got ${cut(t.text)}`);
  }

  private unitName(): string {
    return this.scale === 1 ? 'Hz' : this.scale === 1e3 ? 'kHz' : this.scale === 1e6 ? 'MHz' : 'GHz';
  }

  private portsFor11(line: number, col: number): number {
    if (this.opts.ports !== undefined) {
      if (!Number.isInteger(this.opts.ports) || this.opts.ports < 1) {
        this.fail(line, col, `port count must be a positive integer, got ${this.opts.ports}`);
      }
      if (this.opts.ports > MAX_PORTS) this.fail(line, col, `${this.opts.ports} ports is above the limit of ${MAX_PORTS} a data file may have`);
      return this.opts.ports;
    }
    const m = /\.s(\d+)p$/i.exec(this.opts.fileName ?? '');
    if (m && Number(m[1]) > MAX_PORTS) {
      this.fail(line, col, `the file name says ${m[1]} ports (.s${m[1]}p), above the limit of ${MAX_PORTS} a data file may have`);
    }
    if (m && Number(m[1]) >= 1) return Number(m[1]);
    this.fail(line, col, 'unknown port count: a version 1.1 file needs a name ending in .sNp (e.g. .s2p) or the ports option');
  }

  private readonly pair = new Float64Array(2);

  private storePoint(): void {
    const n = this.ports;
    const p = this.point;
    if (this.nFreqs === this.freqs.length) this.freqs = grow(this.freqs, this.nFreqs + 1);
    this.freqs[this.nFreqs++] = p[0]! * this.scale;
    const base = this.nVals;
    if (base + 2 * n * n > this.vals.length) this.vals = grow(this.vals, base + 2 * n * n);
    this.vals.fill(0, base, base + 2 * n * n);
    this.nVals += 2 * n * n;
    const order = this.order;
    // Version 1.1 Z and Y are normalised to R (z = Z/R, y = Y·R; from memory); version 2.0 are not.
    const norm = this.version === '1.1' && this.parameter !== 'S' ? (this.parameter === 'Z' ? this.optionR : 1 / this.optionR) : 1;
    for (let q = 0; q < order.length / 2; q++) {
      decodeComplex(this.format, p[1 + 2 * q]!, p[2 + 2 * q]!, this.pair);
      this.pair[0] = this.pair[0]! * norm;
      this.pair[1] = this.pair[1]! * norm;
      if (!Number.isFinite(this.pair[0]!) || !Number.isFinite(this.pair[1]!)) this.overflow(q, norm);
      const perm = this.modePerm;
      const i = perm ? perm[order[2 * q]!]! : order[2 * q]!;
      const j = perm ? perm[order[2 * q + 1]!]! : order[2 * q + 1]!;
      this.vals[base + 2 * (i * n + j)] = this.pair[0]!;
      this.vals[base + 2 * (i * n + j) + 1] = this.pair[1]!;
      if (i !== j && this.matrixFormat !== 'full') {
        this.vals[base + 2 * (j * n + i)] = this.pair[0]!;
        this.vals[base + 2 * (j * n + i) + 1] = this.pair[1]!;
      }
    }
    this.point = [];
    this.pointAt = [];
  }

  /** Fails at the pair `q` of the current point, whose decoded value is not finite. */
  private overflow(q: number, norm: number): never {
    const line = this.pointAt[2 + 4 * q]!;
    const col = this.pointAt[3 + 4 * q]!;
    const text = (l: number, c: number): string => /^\S*/.exec(this.lines[l - 1]!.slice(c - 1))![0];
    const a = text(line, col);
    const b = text(this.pointAt[4 + 4 * q]!, this.pointAt[5 + 4 * q]!);
    const i = this.order[2 * q]! + 1;
    const j = this.order[2 * q + 1]! + 1;
    const what = `${this.parameter}${i}${j > 9 || i > 9 ? ',' : ''}${j}`;
    const range = 'beyond the range of double-precision numbers (about 1.8e308)';
    if (norm !== 1) {
      this.fail(line, col, `${what} = ${a} ${b} (${this.format}) times the reference normalisation ${this.parameter === 'Z' ? `R = ${this.optionR} ohm` : `1/R = ${1 / this.optionR} S`} is ${range}`);
    }
    if (this.format === 'DB') this.fail(line, col, `${what}: ${a} dB is a magnitude of 10^${this.point[1 + 2 * q]! / 20}, ${range}`);
    this.fail(line, col, `${what}: ${a} ${b} (${this.format}) is ${range}`);
  }

  private endNetwork(line: number): void {
    if (this.point.length > 0) {
      this.fail(this.pointLine, this.pointCol, `wrong count of numbers: the frequency point starting here has ${this.point.length}, needs ${this.perPoint} (frequency + ${this.order.length / 2} complex pairs)`);
    }
    if (this.version === '2.0' && this.nFreqs !== this.declaredFreqs) {
      this.fail(line, 1, `[Number of Frequencies] (line ${this.seen.get('number of frequencies')}) says ${this.declaredFreqs}, but [Network Data] has ${this.nFreqs}`);
    }
    this.section = 'header';
  }

  /** Starts the noise section at (line, col) and warns that its data are not used yet. */
  private startNoise(line: number, col: number): void {
    this.section = 'noise';
    this.noiseLine = line;
    this.warn(line, col, 'noise parameters start here; they are read and checked but not used yet (only the network data are)');
  }

  private noiseLineData(tokens: Token[]): void {
    const line = this.lineNo;
    const nums: number[] = [];
    for (const t of tokens) nums.push(this.number(t));
    if (tokens.length !== 5) {
      const why = this.version === '1.1' && this.noiseCount === 0
        ? ' (a frequency not above the previous one starts the noise data of a 2-port file)'
        : '';
      this.fail(line, tokens[tokens.length > 5 ? 5 : 0]!.col,
        `a noise data line has 5 numbers (frequency, NFmin dB, |Γopt|, angle Γopt, Rn), this one has ${tokens.length}${why}`);
    }
    const f = nums[0]! * this.scale;
    this.checkFrequency(f, tokens[0]!);
    if (!(f > this.lastNoiseFreq)) this.fail(line, tokens[0]!.col, `noise frequencies must increase: ${tokens[0]!.text} is not above the previous one`);
    if (this.noise.length / 5 >= MAX_NETWORK_VALUES) this.fail(line, tokens[0]!.col, `more than ${MAX_NETWORK_VALUES} noise points`);
    this.noise.push(f, nums[1]!, nums[2]!, nums[3]!, nums[4]!);
    if (this.version === '2.0' && this.noiseCount === this.declaredNoise) {
      this.fail(line, tokens[0]!.col, `more noise points than [Number of Noise Frequencies] ${this.declaredNoise}`);
    }
    this.lastNoiseFreq = f;
    this.noiseCount++;
  }

  private endNoise(line: number): void {
    if (this.version === '2.0' && this.noiseCount !== this.declaredNoise) {
      this.fail(line, 1, `[Number of Noise Frequencies] says ${this.declaredNoise}, but [Noise Data] (line ${this.noiseLine}) has ${this.noiseCount}`);
    }
    this.section = 'header';
  }

  /** Turns the single-ended references of a mixed-mode file into mode references (2·Z0, Z0/2) and labels the modes. */
  private toModes(net: NetworkData, pairs: PortPair[]): void {
    const count = pairs.length;
    const refs = new Float64Array(net.ports);
    pairs.forEach(([p, q], k) => {
      const zp = net.references[p - 1]!;
      const zq = net.references[q - 1]!;
      if (Math.abs(zp - zq) > PAIR_REFERENCE_TOLERANCE * Math.max(zp, zq)) {
        this.fail(this.seen.get('reference') ?? this.seen.get('mixed-mode order')!, 1, `ports ${p} and ${q} form a pair but have different references (${zp} and ${zq} ohm); mixed-mode waves need equal references within a pair`);
      }
      refs[k] = 2 * zp;
      refs[count + k] = zp / 2;
    });
    net.references = refs;
    Object.assign(net, { pairs, modes: modeLabels(count) });
  }

  private finish(): NetworkData {
    const eof = Math.max(this.lines.length, 1);
    if (this.refsPending) {
      this.fail(this.seen.get('reference')!, 1, `[Reference] needs ${this.ports} values, found ${this.refs!.length}`);
    }
    if (this.section === 'info') this.fail(eof, 1, '[Begin Information] without [End Information]');
    if (this.version === '2.0') {
      if (this.section !== 'after-end') {
        if (this.section === 'network') this.endNetwork(eof);
        if (this.section === 'noise') this.endNoise(eof);
        if (!this.seen.has('network data')) this.fail(eof, 1, 'no [Network Data] in the file');
        this.fail(eof, 1, 'missing [End] at the end of the file');
      }
    } else {
      if (!this.optionSeen) this.fail(eof, 1, 'missing option line (# …)');
      if (this.point.length > 0) this.endNetwork(eof);
      if (this.nFreqs === 0) this.fail(eof, 1, 'no network data in the file');
    }
    const n = this.ports;
    const refs = new Float64Array(n);
    for (let p = 0; p < n; p++) refs[p] = this.refs ? this.refs[p]! : this.optionR;
    const values = this.vals.slice(0, this.nVals); // already denormalised in storePoint
    const net: NetworkData = {
      parameter: this.parameter,
      ports: n,
      frequencies: this.freqs.slice(0, this.nFreqs),
      references: refs,
      values,
    };
    if (this.comments.length > 0) net.comments = this.comments;
    if (this.modePairs) this.toModes(net, this.modePairs);
    if (this.noise.length > 0) {
      const m = this.noise.length / 5;
      const column = (c: number): Float64Array => {
        const out = new Float64Array(m);
        for (let k = 0; k < m; k++) out[k] = this.noise[5 * k + c]!;
        return out;
      };
      const noise: NoiseParameters = {
        frequencies: column(0),
        nfMinDb: column(1),
        gammaOptMagnitude: column(2),
        gammaOptAngleDeg: column(3),
        rnNormalised: column(4),
      };
      net.noise = noise;
    }
    return net;
  }
}

/**
 * Reads a Touchstone 1.1 or 2.0 file. Frequencies come back in Hz, Z in ohms, Y in siemens,
 * with `parameter` as in the file. Throws {@link TouchstoneError} with line and column on any
 * departure from the layout (see the module comment).
 */
export function parseTouchstone(text: string, opts: TouchstoneReadOptions = {}): NetworkData {
  return new Reader(text, opts).read();
}

/** Hybrid (H) parameters of a two-port over frequency, for {@link formatTouchstoneHybrid}. */
export interface HybridTwoPort {
  frequencies: Float64Array;
  /** H11, H12, H21, H22 per frequency, complex interleaved (8 numbers a point); H11 in ohms, H22 in siemens. */
  values: Float64Array;
  /** The reference written in the option line (and [Reference] in 2.0); H itself does not depend on it. */
  references: Float64Array;
  title?: string;
  comments?: string[];
}

/**
 * Touchstone file of two-port H-parameters, which both versions allow for two-ports (option line
 * parameter `H`; from memory of the standard). Version 1.1 normalises them to R: h11 = H11/R,
 * h12 = H12, h21 = H21, h22 = H22·R; version 2.0 writes them as they are. The layout is the
 * two-port one (N11 N21 N12 N22).
 *
 * Written through the Z path of {@link formatTouchstone}, whose normalisation divides every
 * entry by R: the entries are scaled beforehand so that the division leaves exactly the H
 * normalisation above, and the option line then names H.
 */
export function formatTouchstoneHybrid(h: HybridTwoPort, opts: TouchstoneWriteOptions = {}): string {
  const version = opts.version ?? '1.1';
  const r = h.references[0] ?? 50;
  const v = Float64Array.from(h.values);
  if (version === '1.1') {
    for (let k = 0; k < h.frequencies.length; k++) {
      for (const [e, s] of [
        [1, r],
        [2, r],
        [3, r * r],
      ] as const) {
        v[8 * k + 2 * e] *= s;
        v[8 * k + 2 * e + 1] *= s;
      }
    }
  }
  const text = formatTouchstone({ parameter: 'Z', ports: 2, frequencies: h.frequencies, references: h.references, values: v, title: h.title, comments: h.comments }, opts);
  return text.replace(/^(# \S+) Z /m, '$1 H ');
}
