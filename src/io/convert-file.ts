import { extname } from 'node:path';
import { toTwoPort, type TwoPortData, type TwoPortRepresentation } from '../network/algebra.js';
import { convertNetwork, renormalizeNetwork } from '../network/convert.js';
import { isMixedMode, mixedMode, modeLabels, type PortPair } from '../network/mixed-mode.js';
import type { NetworkData, ParameterKind } from '../network/types.js';
import { OutputError, renderNetwork, type OutputOptions } from './output.js';
import { formatFrequency } from '../format/frequency.js';
import { csvRow } from './csv.js';
import { checkDigits, encodeComplex, formatShortest, formatTouchstoneHybrid, type ComplexFormat } from './touchstone.js';

/** What `scatterbox convert` can turn network data into. */
export type ConvertTarget = ParameterKind | TwoPortRepresentation;

export interface ConvertOptions extends OutputOptions {
  /** The representation to write (default S). ABCD, T and H are for two-ports and go to CSV or JSON. */
  to?: ConvertTarget;
  /** New real reference impedances (one for all ports, or one per port), applied to S first. */
  renormalize?: number[];
  /** Single-ended port pairs (1-based) to turn into mixed-mode S: [[p, n], …]. */
  pairs?: PortPair[];
}

/** Reads `"1,3;2,4"` as port pairs [[1,3],[2,4]]. */
export function parsePairs(text: string): PortPair[] {
  const pairs = text.split(/[;\s]+/).filter(Boolean).map((p) => {
    const m = /^(\d+),(\d+)$/.exec(p);
    if (!m) throw new OutputError(`port pairs are written p,n;p,n — got ${JSON.stringify(p)}`, 'e.g. --mixed-mode "1,3;2,4"');
    return [Number(m[1]), Number(m[2])] as const;
  });
  if (pairs.length === 0) throw new OutputError('--mixed-mode needs at least one pair', 'e.g. --mixed-mode "1,3;2,4"');
  return pairs;
}

/** Reads `75` or `50,75` as reference impedances in ohms. */
export function parseReferences(text: string, ports: number): Float64Array {
  const v = text.split(',').map((x) => Number(x.trim()));
  if (v.some((x) => !(x > 0) || !Number.isFinite(x))) throw new OutputError(`reference impedances are positive numbers in ohms, got ${JSON.stringify(text)}`);
  if (v.length === 1) return new Float64Array(ports).fill(v[0]!);
  if (v.length !== ports) throw new OutputError(`${v.length} references given for ${ports} ports`, 'give one for all ports or one per port');
  return Float64Array.from(v);
}

const ENTRY_NAMES: Record<TwoPortRepresentation, [string, string, string, string]> = {
  ABCD: ['A', 'B', 'C', 'D'],
  T: ['T11', 'T12', 'T21', 'T22'],
  H: ['H11', 'H12', 'H21', 'H22'],
};

const MATRIX_NAMES: Record<TwoPortRepresentation, string> = {
  ABCD: 'chain matrix (ABCD)',
  T: 'transfer matrix (T)',
  H: 'hybrid matrix (H)',
};

/**
 * Checks, before any text is made, that every entry of `d` is finite and stays finite in
 * `format` (a magnitude can overflow where its parts do not). Throws {@link OutputError} naming
 * the entry and the frequency otherwise.
 */
function checkTwoPortFinite(d: TwoPortData, format: ComplexFormat): void {
  const pair = new Float64Array(2);
  for (let x = 0; x < d.values.length; x += 2) {
    encodeComplex(format, d.values[x]!, d.values[x + 1]!, pair);
    if (!Number.isFinite(pair[0]!) || !Number.isFinite(pair[1]!)) {
      const k = Math.floor(x / 8);
      const e = (x % 8) / 2;
      throw new OutputError(
        `the ${MATRIX_NAMES[d.representation]} cannot be written at ${formatFrequency(d.frequencies[k]!)}: ${ENTRY_NAMES[d.representation][e]} is beyond the range of double-precision numbers (about 1.8e308)${format === 'RI' ? '' : ` in ${format}`}`,
        format === 'RI' ? undefined : 'write RI (--data ri), whose parts may still be in range',
      );
    }
  }
}

/** Writer options of the two-port CSV and JSON. */
export interface TwoPortWriteOptions {
  /** Significant digits 1..17 of the matrix entries (not the frequencies); default: shortest round-trip text. */
  digits?: number;
}

/**
 * CSV of two-port data in a chain, transfer or hybrid representation: `freq_hz`, then two
 * columns per entry in row order (A, B, C, D; or T11, T12, T21, T22; or H11 … H22) with the
 * suffixes of the network CSV (`_re`/`_im`, `_mag`/`_deg`, `_db`/`_deg`). B is in ohms, C in
 * siemens; H11 in ohms, H22 in siemens. Numbers as in the network CSV (shortest round-trip text,
 * or rounded to `digits` significant digits); every number is checked finite before any text is made.
 */
export function formatTwoPortCsv(d: TwoPortData, format: ComplexFormat = 'RI', opts: TwoPortWriteOptions = {}): string {
  const digits = opts.digits === undefined ? undefined : checkDigits(opts.digits, 17);
  checkTwoPortFinite(d, format);
  const suffix = format === 'RI' ? ['re', 'im'] : format === 'MA' ? ['mag', 'deg'] : ['db', 'deg'];
  const head = ['freq_hz', ...ENTRY_NAMES[d.representation].flatMap((n) => [`${n}_${suffix[0]}`, `${n}_${suffix[1]}`])];
  const lines = [csvRow(head)];
  const pair = new Float64Array(2);
  for (let k = 0; k < d.frequencies.length; k++) {
    const row = [formatShortest(d.frequencies[k]!)];
    for (let e = 0; e < 4; e++) {
      encodeComplex(format, d.values[8 * k + 2 * e]!, d.values[8 * k + 2 * e + 1]!, pair);
      row.push(formatShortest(pair[0]!, digits), formatShortest(pair[1]!, digits));
    }
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}

/**
 * JSON of two-port data (`scatterbox.twoport/1`): "schema", "representation", "title" (string or
 * null), "comments" (strings), "references_ohm" (or null), "frequency_hz", and "data": per
 * frequency [[a, b], [c, d]] of [re, im]. Numbers as in the network JSON (shortest round-trip
 * text, entries rounded to `digits` significant digits when given); every number is checked
 * finite first, so the text is always valid JSON.
 */
export function formatTwoPortJson(d: TwoPortData, opts: TwoPortWriteOptions = {}): string {
  const digits = opts.digits === undefined ? undefined : checkDigits(opts.digits, 17);
  checkTwoPortFinite(d, 'RI');
  const num = (x: number) => formatShortest(x);
  const val = (x: number) => formatShortest(x, digits);
  const rows: string[] = [];
  for (let k = 0; k < d.frequencies.length; k++) {
    const e = (i: number) => `[${val(d.values[8 * k + 2 * i]!)}, ${val(d.values[8 * k + 2 * i + 1]!)}]`;
    rows.push(`    [[${e(0)}, ${e(1)}], [${e(2)}, ${e(3)}]]`);
  }
  const refs = d.references ? `[${Array.from(d.references, num).join(', ')}]` : 'null';
  const comments = (d.comments ?? []).map((c) => JSON.stringify(c)).join(', ');
  return [
    '{',
    '  "schema": "scatterbox.twoport/1",',
    `  "representation": "${d.representation}",`,
    `  "title": ${d.title === undefined ? 'null' : JSON.stringify(d.title)},`,
    `  "comments": [${comments}],`,
    `  "references_ohm": ${refs},`,
    `  "frequency_hz": [${Array.from(d.frequencies, num).join(', ')}],`,
    rows.length === 0 ? '  "data": []' : `  "data": [\n${rows.join(',\n')}\n  ]`,
    '}',
  ].join('\n') + '\n';
}

/**
 * Converts network data: optional renormalisation, optional mixed-mode transform, then the
 * requested representation; returns the text of the output file (format from `path` unless given).
 * The title and comments of the input are kept (Touchstone comments, JSON "title" and
 * "comments"; CSV has no place for them), followed by `options.comments`. A result that does not
 * exist or does not fit in double-precision numbers is an error naming the frequency and the
 * quantity; nothing non-finite is ever written.
 */
export function convertData(net: NetworkData, options: ConvertOptions, path?: string): string {
  let s = net.parameter === 'S' ? net : convertNetwork(net, 'S');
  if (options.renormalize) s = renormalizeNetwork(s, parseReferences(options.renormalize.join(','), s.ports));
  const comments = [...(s.comments ?? []), ...(options.comments ?? [])];
  if (options.pairs) {
    const mm = mixedMode(s, options.pairs);
    comments.push(`mixed-mode S, ports in the order ${modeLabels(options.pairs.length).join(' ')} (differential then common mode)`);
    s = mm;
  }
  const to = options.to ?? 'S';
  if (to === 'ABCD' || to === 'T' || to === 'H') {
    if (s.ports !== 2) throw new OutputError(`${to} is a two-port representation, but the data has ${s.ports} ports`);
    const d = toTwoPort(s, to);
    d.comments = comments;
    if (s.title !== undefined) d.title = s.title;
    const ext = path ? extname(path).toLowerCase() : '';
    const format = options.format ?? (ext === '.json' ? 'json' : ext === '.csv' || !path ? 'csv' : /^\.s2p$/.test(ext) ? 'touchstone' : undefined);
    if (format === 'json') return formatTwoPortJson(d, { digits: options.digits });
    if (format === 'csv') return formatTwoPortCsv(d, options.data ?? 'RI', { digits: options.digits });
    if (to === 'H') {
      const sameRefs = s.references[0] === s.references[1];
      return formatTouchstoneHybrid(
        { frequencies: d.frequencies, values: d.values, references: s.references, title: s.title, comments },
        { version: options.version ?? (sameRefs ? '1.1' : '2.0'), format: options.data ?? 'RI', frequencyUnit: options.frequencyUnit ?? 'GHz', digits: options.digits },
      );
    }
    throw new OutputError(`Touchstone files hold S, Z, Y or (for two-ports) H; write ${to} as .csv or .json`);
  }
  let out: NetworkData = s;
  if (to !== s.parameter) {
    out = convertNetwork(s, to);
    // mode labels and pairs stay with the converted data (mixed-mode Z and Y are as meaningful as S)
    if (isMixedMode(s)) out = Object.assign(out, { pairs: s.pairs, modes: s.modes });
  }
  out = { ...out, comments };
  return renderNetwork(out, { ...options, parameter: to, comments: [] }, path);
}
