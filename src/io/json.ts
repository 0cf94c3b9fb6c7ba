/**
 * JSON form of network data, schema `scatterbox.network/1` (our own).
 *
 * ```text
 * {
 *   "schema": "scatterbox.network/1",
 *   "title": string | null,          // null when the network has no title
 *   "comments": string[],            // may be empty
 *   "parameter": "S" | "Z" | "Y",
 *   "ports": N,                      // integer >= 1
 *   "references_ohm": [r1, …, rN],   // per-port real reference impedances, ohms, > 0
 *   "frequency_hz": [f1, …, fK],     // Hz, strictly increasing, >= 0
 *   "data": [                        // K entries, one per frequency
 *     [                              //   N rows i = 1..N
 *       [ [re, im], …, [re, im] ]    //     N entries j = 1..N: parameter (i, j)
 *     ], …
 *   ]
 * }
 * ```
 *
 * Values: S unitless, Z in ohms, Y in siemens, all as real and imaginary parts (not normalised).
 * Keys always appear in the order above. Numbers are JSON.stringify text (the shortest text that
 * reads back as the same double; -0 becomes 0). Layout: two-space indent, one frequency point of
 * `data` per line, "\n" line ends, a final newline. The same network always gives the same bytes.
 */
import type { NetworkData, ParameterKind } from '../network/types.js';
import { checkNetworkData } from './touchstone.js';

export const JSON_SCHEMA_ID = 'scatterbox.network/1';

const num = (x: number): string => JSON.stringify(x);

/** Formats network data as JSON (schema in the module comment). */
export function formatJson(net: NetworkData): string {
  checkNetworkData(net, 'JSON');
  const n = net.ports;
  const nf = net.frequencies.length;
  const refs = Array.from(net.references, num).join(', ');
  const freqs = Array.from(net.frequencies, num).join(', ');
  const points: string[] = [];
  for (let k = 0; k < nf; k++) {
    const rows: string[] = [];
    for (let i = 0; i < n; i++) {
      const entries: string[] = [];
      for (let j = 0; j < n; j++) {
        const at = 2 * ((k * n + i) * n + j);
        entries.push(`[${num(net.values[at]!)}, ${num(net.values[at + 1]!)}]`);
      }
      rows.push(`[${entries.join(', ')}]`);
    }
    points.push(`    [${rows.join(', ')}]`);
  }
  const comments = net.comments ?? [];
  const lines = [
    '{',
    `  "schema": ${JSON.stringify(JSON_SCHEMA_ID)},`,
    `  "title": ${net.title === undefined ? 'null' : JSON.stringify(net.title)},`,
    `  "comments": [${comments.map((c) => JSON.stringify(c)).join(', ')}],`,
    `  "parameter": ${JSON.stringify(net.parameter)},`,
    `  "ports": ${n},`,
    `  "references_ohm": [${refs}],`,
    `  "frequency_hz": [${freqs}],`,
    nf === 0 ? '  "data": []' : `  "data": [\n${points.join(',\n')}\n  ]`,
    '}',
  ];
  return lines.join('\n') + '\n';
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

function numberArray(x: unknown, where: string, length?: number): number[] {
  if (!Array.isArray(x)) throw new Error(`JSON network: ${where} must be an array`);
  if (length !== undefined && x.length !== length) {
    throw new Error(`JSON network: ${where} must have ${length} entries, has ${x.length}`);
  }
  x.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new Error(`JSON network: ${where}[${i}] must be a finite number`);
  });
  return x as number[];
}

/**
 * Reads JSON of schema `scatterbox.network/1` back into network data. Throws an Error naming
 * the offending field when the text does not follow the schema.
 */
export function parseJson(text: string): NetworkData {
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    throw new Error(`JSON network: not valid JSON (${(e as Error).message})`);
  }
  if (!isObject(doc)) throw new Error('JSON network: top level must be an object');
  if (doc['schema'] !== JSON_SCHEMA_ID) {
    throw new Error(`JSON network: "schema" must be "${JSON_SCHEMA_ID}", got ${JSON.stringify(doc['schema'])}`);
  }
  const parameter = doc['parameter'];
  if (parameter !== 'S' && parameter !== 'Z' && parameter !== 'Y') {
    throw new Error(`JSON network: "parameter" must be "S", "Z" or "Y", got ${JSON.stringify(parameter)}`);
  }
  const ports = doc['ports'];
  if (typeof ports !== 'number' || !Number.isInteger(ports) || ports < 1) {
    throw new Error(`JSON network: "ports" must be a positive integer, got ${JSON.stringify(ports)}`);
  }
  const refs = numberArray(doc['references_ohm'], 'references_ohm', ports);
  const freqs = numberArray(doc['frequency_hz'], 'frequency_hz');
  const data = doc['data'];
  if (!Array.isArray(data) || data.length !== freqs.length) {
    throw new Error(`JSON network: "data" must be an array with one entry per frequency (${freqs.length})`);
  }
  const values = new Float64Array(2 * ports * ports * freqs.length);
  data.forEach((point: unknown, k) => {
    if (!Array.isArray(point) || point.length !== ports) throw new Error(`JSON network: data[${k}] must hold ${ports} rows`);
    point.forEach((row: unknown, i) => {
      if (!Array.isArray(row) || row.length !== ports) throw new Error(`JSON network: data[${k}][${i}] must hold ${ports} entries`);
      row.forEach((entry: unknown, j) => {
        const [re, im] = numberArray(entry, `data[${k}][${i}][${j}]`, 2) as [number, number];
        const at = 2 * ((k * ports + i) * ports + j);
        values[at] = re;
        values[at + 1] = im;
      });
    });
  });
  const net: NetworkData = {
    parameter: parameter as ParameterKind,
    ports,
    frequencies: Float64Array.from(freqs),
    references: Float64Array.from(refs),
    values,
  };
  const title = doc['title'];
  if (title !== undefined && title !== null) {
    if (typeof title !== 'string') throw new Error('JSON network: "title" must be a string or null');
    net.title = title;
  }
  const comments = doc['comments'];
  if (comments !== undefined) {
    if (!Array.isArray(comments) || comments.some((c) => typeof c !== 'string')) {
      throw new Error('JSON network: "comments" must be an array of strings');
    }
    if (comments.length > 0) net.comments = comments as string[];
  }
  checkNetworkData(net, 'JSON network');
  return net;
}
