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
 *   "modes": ["D1", …, "C1", …],      // only for mixed-mode data: the label of each row/column
 *   "pairs": [[p, n], …],            // only for mixed-mode data: single-ended (positive, negative) ports of each pair
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
 * Mixed-mode data (see the README, "Mixed-mode and T-parameter conventions") has rows and columns
 * in the order of "modes" and references 2·Z0 (differential) and Z0/2 (common) in that order.
 * Keys always appear in the order above. Numbers are JSON.stringify text (the shortest text that
 * reads back as the same double; -0 becomes 0); with `digits`, the data values (not frequencies or
 * references) are first rounded to that many significant digits, as in the CSV writer. Every
 * number is checked to be finite before any text is made, so the output is always valid JSON. Layout: two-space indent, one frequency point of
 * `data` per line, "\n" line ends, a final newline. The same network always gives the same bytes.
 */
import { MAX_NETWORK_VALUES, MAX_PORTS, MAX_REFERENCE_OHMS, MIN_REFERENCE_OHMS } from '../limits.js';
import { isMixedMode, modeLabels, type MixedModeData, type PortPair } from '../network/mixed-mode.js';
import type { NetworkData, ParameterKind } from '../network/types.js';
import { checkDigits, checkNetworkData, formatShortest } from './touchstone.js';

export const JSON_SCHEMA_ID = 'scatterbox.network/1';

export interface JsonWriteOptions {
  /** Significant digits 1..17 of the data values; default: shortest round-trip text. */
  digits?: number;
}

/** Formats network data as JSON (schema in the module comment). */
export function formatJson(net: NetworkData, opts: JsonWriteOptions = {}): string {
  const digits = opts.digits === undefined ? undefined : checkDigits(opts.digits, 17);
  checkNetworkData(net, 'JSON');
  const num = (x: number): string => formatShortest(x);
  const val = (x: number): string => formatShortest(x, digits);
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
        entries.push(`[${val(net.values[at]!)}, ${val(net.values[at + 1]!)}]`);
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
  ];
  if (isMixedMode(net)) {
    lines.push(`  "modes": [${net.modes.map((m) => JSON.stringify(m)).join(', ')}],`);
    lines.push(`  "pairs": [${net.pairs.map(([p, q]) => `[${p}, ${q}]`).join(', ')}],`);
  }
  lines.push(
    `  "references_ohm": [${refs}],`,
    `  "frequency_hz": [${freqs}],`,
    nf === 0 ? '  "data": []' : `  "data": [\n${points.join(',\n')}\n  ]`,
    '}',
  );
  return lines.join('\n') + '\n';
}

/**
 * A JSON network file that does not follow the schema. `line` and `column` (1-based) point into
 * the text when the place is known (a syntax error, the key of the field at fault, or the number
 * that overflows).
 */
export class JsonNetworkError extends Error {
  constructor(message: string, readonly line: number, readonly column: number) {
    super(message);
    this.name = 'JsonNetworkError';
  }
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/** Line and column (1-based) of character `offset` of `text`. */
function placeOf(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) {
      line++;
      start = i + 1;
    }
  }
  return { line, column: offset - start + 1 };
}

/** Where the key `"name":` of the top-level object stands (an unescaped quoted key followed by a colon). */
function keyPlace(text: string, name: string): { line?: number; column?: number } {
  const re = new RegExp(`(^|[^\\\\])"${name}"\\s*:`);
  const m = re.exec(text);
  if (!m) return {};
  return placeOf(text, m.index + m[1]!.length);
}

/**
 * The first number literal of `text` that overflows to ±Infinity, with its place and the path of
 * the field that holds it (`frequency_hz[3]`, `data[0][1][0][1]`). JSON.parse reads such a literal
 * (e.g. 1e400) as Infinity without complaint; JSON has no other way to give a non-finite number.
 */
function findOverflow(text: string): { literal: string; path: string; line: number; column: number } | undefined {
  type Frame = { array: boolean; index: number; key: string };
  const stack: Frame[] = [];
  let lastString = '';
  const path = (): string => {
    let out = '';
    for (const f of stack) {
      if (f.array) out += `[${f.index}]`;
      else if (f.key !== '') out += out === '' ? f.key : `.${f.key}`;
    }
    return out;
  };
  const numberRe = /-?\d+(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c === '"') {
      let j = i + 1;
      while (j < text.length && text[j] !== '"') j += text[j] === '\\' ? 2 : 1;
      lastString = text.slice(i + 1, j);
      i = j;
    } else if (c === '{') stack.push({ array: false, index: 0, key: '' });
    else if (c === '[') stack.push({ array: true, index: 0, key: '' });
    else if (c === '}' || c === ']') stack.pop();
    else if (c === ':') {
      const top = stack[stack.length - 1];
      if (top) top.key = lastString;
    } else if (c === ',') {
      const top = stack[stack.length - 1];
      if (top?.array) top.index++;
    } else if (c === '-' || (c >= '0' && c <= '9')) {
      numberRe.lastIndex = i;
      const m = numberRe.exec(text);
      if (m) {
        if (!Number.isFinite(Number(m[0]))) return { literal: m[0], path: path(), ...placeOf(text, i) };
        i += m[0].length - 1;
      }
    }
  }
  return undefined;
}

/** Where the document starts: its first character that is not white space (JSON's four). */
function documentStart(text: string): { line: number; column: number } {
  const m = /[^ \t\n\r]/.exec(text);
  return placeOf(text, m ? m.index : text.length);
}

function fail(text: string, message: string, key?: string): never {
  const found = key === undefined ? {} : keyPlace(text, key);
  const at = found.line !== undefined && found.column !== undefined ? { line: found.line, column: found.column } : documentStart(text);
  throw new JsonNetworkError(`JSON network: ${message}`, at.line, at.column);
}

/**
 * The offset of the first syntax error of a JSON text (RFC 8259), found by a loop with an explicit
 * stack (no recursion, whatever the nesting), or -1 when the text is valid JSON. The engine's own
 * messages do not always give a position; this does, so every syntax error points into the file.
 */
export function jsonSyntaxErrorAt(text: string): number {
  const n = text.length;
  const stack: number[] = []; // 0: in an array, 1: in an object
  let i = 0;
  const ws = () => {
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 32 || c === 9 || c === 10 || c === 13) i++;
      else break;
    }
  };
  const string = (): boolean => {
    i++; // the opening quote
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 34) {
        i++;
        return true;
      }
      if (c < 32) return false;
      if (c === 92) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) return false;
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else return false;
      } else i++;
    }
    return false;
  };
  const numberRe = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
  for (;;) {
    // a value is expected here
    ws();
    if (i >= n) return n;
    const c = text[i]!;
    if (c === '{' || c === '[') {
      i++;
      ws();
      const close = c === '{' ? '}' : ']';
      if (text[i] === close) {
        i++;
      } else {
        stack.push(c === '{' ? 1 : 0);
        if (c === '{') {
          if (text[i] !== '"' || !string()) return Math.min(i, n);
          ws();
          if (text[i] !== ':') return Math.min(i, n);
          i++;
        }
        continue;
      }
    } else if (c === '"') {
      if (!string()) return Math.min(i, n);
    } else if (c === '-' || (c >= '0' && c <= '9')) {
      numberRe.lastIndex = i;
      const m = numberRe.exec(text);
      if (!m) return i;
      i += m[0].length;
    } else if (text.startsWith('true', i)) i += 4;
    else if (text.startsWith('false', i)) i += 5;
    else if (text.startsWith('null', i)) i += 4;
    else return i;
    // after a value: close containers, or a comma and the next value
    for (;;) {
      ws();
      if (stack.length === 0) return i < n ? i : -1;
      const inObject = stack[stack.length - 1] === 1;
      if (i >= n) return n;
      if (text[i] === (inObject ? '}' : ']')) {
        stack.pop();
        i++;
        continue;
      }
      if (text[i] !== ',') return i;
      i++;
      if (inObject) {
        ws();
        if (text[i] !== '"' || !string()) return Math.min(i, n);
        ws();
        if (text[i] !== ':') return Math.min(i, n);
        i++;
      }
      break;
    }
  }
}

function numberArray(text: string, x: unknown, where: string, key: string, length?: number): number[] {
  if (!Array.isArray(x)) fail(text, `${where} must be an array`, key);
  if (length !== undefined && x.length !== length) {
    fail(text, `${where} must have ${length} entries, has ${x.length}`, key);
  }
  x.forEach((v, i) => {
    if (typeof v === 'number' && !Number.isFinite(v)) {
      const o = findOverflow(text);
      if (o) throw new JsonNetworkError(`JSON network: ${o.path || where} is ${o.literal}, beyond the range of double-precision numbers (about 1.8e308)`, o.line, o.column);
    }
    if (typeof v !== 'number' || !Number.isFinite(v)) fail(text, `${where}[${i}] must be a finite number`, key);
  });
  return x as number[];
}

/**
 * Reads JSON of schema `scatterbox.network/1` back into network data (mixed-mode data, with
 * "modes" and "pairs", as {@link MixedModeData}). Throws {@link JsonNetworkError} naming the
 * offending field, with its place in the text where it can be found.
 */
export function parseJson(text: string): NetworkData {
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    const msg = (e as Error).message;
    const found = jsonSyntaxErrorAt(text);
    const pos = /position (\d+)/.exec(msg);
    const at = placeOf(text, found >= 0 ? found : pos ? Number(pos[1]) : 0);
    const what =
      found >= text.length || (found < 0 && !pos)
        ? 'not valid JSON: the text ends before the document does'
        : `not valid JSON: unexpected ${JSON.stringify(text[found >= 0 ? found : Number(pos![1])] ?? '')} here`;
    throw new JsonNetworkError(`JSON network: ${what}`, at.line, at.column);
  }
  if (!isObject(doc)) fail(text, 'the top level must be an object');
  if (doc['schema'] !== JSON_SCHEMA_ID) {
    fail(text, `"schema" must be "${JSON_SCHEMA_ID}", got ${JSON.stringify(doc['schema'])}`, 'schema');
  }
  const parameter = doc['parameter'];
  if (parameter !== 'S' && parameter !== 'Z' && parameter !== 'Y') {
    fail(text, `"parameter" must be "S", "Z" or "Y", got ${JSON.stringify(parameter)}`, 'parameter');
  }
  const ports = doc['ports'];
  if (typeof ports !== 'number' || !Number.isInteger(ports) || ports < 1) {
    fail(text, `"ports" must be a positive integer, got ${JSON.stringify(ports)}`, 'ports');
  }
  if (ports > MAX_PORTS) fail(text, `"ports" is ${ports}, above the limit of ${MAX_PORTS} ports a data file may have`, 'ports');
  const refs = numberArray(text, doc['references_ohm'], 'references_ohm', 'references_ohm', ports);
  refs.forEach((r, p) => {
    if (!(r >= MIN_REFERENCE_OHMS && r <= MAX_REFERENCE_OHMS)) {
      fail(text, `references_ohm[${p}] is ${r} ohm, outside the range a data file may give, ${MIN_REFERENCE_OHMS} to ${MAX_REFERENCE_OHMS} ohm`, 'references_ohm');
    }
  });
  const freqs = numberArray(text, doc['frequency_hz'], 'frequency_hz', 'frequency_hz');
  if (freqs.length === 0) fail(text, 'frequency_hz is empty: network data needs at least one frequency point', 'frequency_hz');
  freqs.forEach((f, k) => {
    if (f < 0) fail(text, `frequency_hz[${k}] is ${f}: frequencies must not be negative`, 'frequency_hz');
    if (k > 0 && !(f > freqs[k - 1]!)) fail(text, `frequency_hz[${k}] (${f} Hz) is not above frequency_hz[${k - 1}] (${freqs[k - 1]} Hz): frequencies must increase`, 'frequency_hz');
  });
  if (freqs.length * ports * ports > MAX_NETWORK_VALUES) {
    fail(text, `${freqs.length} frequency points of a ${ports}-port are ${freqs.length * ports * ports} complex values, above the limit of ${MAX_NETWORK_VALUES} a data file may have`, 'frequency_hz');
  }
  const data = doc['data'];
  if (!Array.isArray(data) || data.length !== freqs.length) {
    fail(text, `"data" must be an array with one entry per frequency (${freqs.length})`, 'data');
  }
  const values = new Float64Array(2 * ports * ports * freqs.length);
  data.forEach((point: unknown, k) => {
    if (!Array.isArray(point) || point.length !== ports) fail(text, `data[${k}] must hold ${ports} rows`, 'data');
    point.forEach((row: unknown, i) => {
      if (!Array.isArray(row) || row.length !== ports) fail(text, `data[${k}][${i}] must hold ${ports} entries`, 'data');
      row.forEach((entry: unknown, j) => {
        const [re, im] = numberArray(text, entry, `data[${k}][${i}][${j}]`, 'data', 2) as [number, number];
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
    if (typeof title !== 'string') fail(text, '"title" must be a string or null', 'title');
    net.title = title;
  }
  const comments = doc['comments'];
  if (comments !== undefined) {
    if (!Array.isArray(comments) || comments.some((c) => typeof c !== 'string')) {
      fail(text, '"comments" must be an array of strings', 'comments');
    }
    if (comments.length > 0) net.comments = comments as string[];
  }
  if (doc['modes'] !== undefined || doc['pairs'] !== undefined) return withModes(text, net, doc['modes'], doc['pairs']);
  return net;
}

/** Checks the "modes" and "pairs" of mixed-mode JSON and attaches them to `net`. */
function withModes(text: string, net: NetworkData, modes: unknown, pairs: unknown): MixedModeData {
  const n = net.ports;
  if (n % 2 !== 0) fail(text, `"modes" and "pairs" are for mixed-mode data, which has an even number of ports, not ${n}`, 'modes');
  if (!Array.isArray(pairs) || pairs.length !== n / 2) fail(text, `"pairs" must list ${n / 2} pairs [positive, negative]`, 'pairs');
  const seen = new Set<number>();
  const list: PortPair[] = pairs.map((p: unknown, k) => {
    if (!Array.isArray(p) || p.length !== 2 || p.some((x) => !Number.isInteger(x) || x < 1 || x > n || seen.has(x as number))) {
      fail(text, `pairs[${k}] must be [positive, negative], two different ports from 1 to ${n} not used by another pair`, 'pairs');
    }
    seen.add(p[0] as number);
    seen.add(p[1] as number);
    return [p[0] as number, p[1] as number] as const;
  });
  const want = modeLabels(n / 2);
  if (!Array.isArray(modes) || modes.length !== n || modes.some((m, i) => m !== want[i])) {
    fail(text, `"modes" must be ${JSON.stringify(want)} (differential modes first, then common modes)`, 'modes');
  }
  return Object.assign(net, { parameter: net.parameter as 'S', pairs: list, modes: want });
}
