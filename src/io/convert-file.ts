import { extname } from 'node:path';
import { toTwoPort, type TwoPortData, type TwoPortRepresentation } from '../network/algebra.js';
import { convertNetwork, renormalizeNetwork } from '../network/convert.js';
import { mixedMode, modeLabels, type PortPair } from '../network/mixed-mode.js';
import type { NetworkData, ParameterKind } from '../network/types.js';
import { OutputError, renderNetwork, type OutputOptions } from './output.js';
import { encodeComplex, formatShortest, formatTouchstoneHybrid, type ComplexFormat } from './touchstone.js';

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

/**
 * CSV of two-port data in a chain, transfer or hybrid representation: `freq_hz`, then two
 * columns per entry in row order (A, B, C, D; or T11, T12, T21, T22; or H11 … H22) with the
 * suffixes of the network CSV (`_re`/`_im`, `_mag`/`_deg`, `_db`/`_deg`). B is in ohms, C in
 * siemens; H11 in ohms, H22 in siemens.
 */
export function formatTwoPortCsv(d: TwoPortData, format: ComplexFormat = 'RI'): string {
  const suffix = format === 'RI' ? ['re', 'im'] : format === 'MA' ? ['mag', 'deg'] : ['db', 'deg'];
  const head = ['freq_hz', ...ENTRY_NAMES[d.representation].flatMap((n) => [`${n}_${suffix[0]}`, `${n}_${suffix[1]}`])];
  const lines = [head.join(',')];
  const pair = new Float64Array(2);
  for (let k = 0; k < d.frequencies.length; k++) {
    const row = [formatShortest(d.frequencies[k]!)];
    for (let e = 0; e < 4; e++) {
      encodeComplex(format, d.values[8 * k + 2 * e]!, d.values[8 * k + 2 * e + 1]!, pair);
      row.push(formatShortest(pair[0]!), formatShortest(pair[1]!));
    }
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}

/** JSON of two-port data (`scatterbox.twoport/1`): the representation, frequencies and `data[k]` as [[a, b], [c, d]] of [re, im]. */
export function formatTwoPortJson(d: TwoPortData): string {
  const rows: string[] = [];
  for (let k = 0; k < d.frequencies.length; k++) {
    const e = (i: number) => `[${d.values[8 * k + 2 * i]},${d.values[8 * k + 2 * i + 1]}]`;
    rows.push(`    [[${e(0)}, ${e(1)}], [${e(2)}, ${e(3)}]]`);
  }
  const refs = d.references ? `[${Array.from(d.references).join(', ')}]` : 'null';
  return `{\n  "schema": "scatterbox.twoport/1",\n  "representation": "${d.representation}",\n  "references_ohm": ${refs},\n  "frequency_hz": [${Array.from(d.frequencies).join(', ')}],\n  "data": [\n${rows.join(',\n')}\n  ]\n}\n`;
}

/**
 * Converts network data: optional renormalisation, optional mixed-mode transform, then the
 * requested representation; returns the text of the output file (format from `path` unless given).
 */
export function convertData(net: NetworkData, options: ConvertOptions, path?: string): string {
  let s = net.parameter === 'S' ? net : convertNetwork(net, 'S');
  if (options.renormalize) s = renormalizeNetwork(s, parseReferences(options.renormalize.join(','), s.ports));
  let comments = [...(options.comments ?? [])];
  if (options.pairs) {
    const mm = mixedMode(s, options.pairs);
    comments.push(`mixed-mode S, ports in the order ${modeLabels(options.pairs.length).join(' ')} (differential then common mode)`);
    s = mm;
  }
  const to = options.to ?? 'S';
  if (to === 'ABCD' || to === 'T' || to === 'H') {
    if (s.ports !== 2) throw new OutputError(`${to} is a two-port representation, but the data has ${s.ports} ports`);
    const d = toTwoPort(s, to);
    const ext = path ? extname(path).toLowerCase() : '';
    const format = options.format ?? (ext === '.json' ? 'json' : ext === '.csv' || !path ? 'csv' : /^\.s2p$/.test(ext) ? 'touchstone' : undefined);
    if (format === 'json') return formatTwoPortJson(d);
    if (format === 'csv') return formatTwoPortCsv(d, options.data ?? 'RI');
    if (to === 'H') {
      const sameRefs = s.references[0] === s.references[1];
      return formatTouchstoneHybrid(
        { frequencies: d.frequencies, values: d.values, references: s.references, comments },
        { version: options.version ?? (sameRefs ? '1.1' : '2.0'), format: options.data ?? 'RI', frequencyUnit: options.frequencyUnit ?? 'GHz', digits: options.digits },
      );
    }
    throw new OutputError(`Touchstone files hold S, Z, Y or (for two-ports) H; write ${to} as .csv or .json`);
  }
  comments = comments.length ? comments : [];
  return renderNetwork(s, { ...options, parameter: to, comments }, path);
}
