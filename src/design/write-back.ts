/**
 * Writing new variable values into netlist text: only the value of each variable's `let` line
 * changes (the text between `=` and `vary`); comments, spacing, line ends, the `vary` clause and
 * every other line stay byte for byte.
 *
 * ```ts
 * const texts = editVariableValues(sources, variables, values);   // Map file → new text
 * ```
 *
 * Values are written in engineering notation with a unit prefix when that text reads back to the
 * same double (`6.8 nH`, `1.52 pF`), else as the shortest decimal in SI units (`1.234e-9 H`);
 * {@link valueText} checks each text with the netlist's own reader of quantities.
 *
 * @module
 */
import type { Variable } from '../elaborate/circuit.js';
import { InputError } from '../diagnostics/diagnostic.js';
import { evaluateQuantity, loadNetlist } from '../load.js';
import { readInputText } from '../io/source-file.js';

/** Prefixes of engineering notation, by power of 1000. */
const PREFIXES: Record<number, string> = { [-5]: 'f', [-4]: 'p', [-3]: 'n', [-2]: 'u', [-1]: 'm', 0: '', 1: 'k', 2: 'M', 3: 'G', 4: 'T' };

/** Why a value could not be written back. */
export class WriteBackError extends Error {
  constructor(
    message: string,
    readonly help?: string,
  ) {
    super(message);
    this.name = 'WriteBackError';
  }
}

function readsBack(text: string, unit: string | null, x: number): boolean {
  try {
    return evaluateQuantity(text, unit, 'value') === x;
  } catch {
    return false;
  }
}

/**
 * The text of a value in a netlist, in `unit` (the variable's SI unit, or null for a plain
 * number): the fewest significant digits, with an engineering prefix (`6.8 nH`, `2.2 kohm`) when
 * such a text reads back to exactly x, else the shortest round-trip decimal (`1.234e-9 H`).
 */
export function valueText(x: number, unit: string | null): string {
  if (!Number.isFinite(x)) throw new RangeError(`a value to write must be finite, not ${x}`);
  const plain = `${String(x)}${unit ? ` ${unit}` : ''}`;
  if (x === 0) return `0${unit ? ` ${unit}` : ''}`;
  const shortest = String(x).replace(/^-/, '').replace(/e.*$/, '').replace('.', '').replace(/^0+/, '').length;
  if (unit) {
    const p = Math.floor(Math.log10(Math.abs(x)) / 3 + 1e-12);
    for (const power of [p, p + 1, p - 1]) {
      const prefix = PREFIXES[power];
      if (prefix === undefined) continue;
      const m = x / 10 ** (3 * power);
      if (Math.abs(m) < 0.999 || Math.abs(m) >= 1000) continue;
      for (let digits = 1; digits <= Math.max(shortest, 1); digits++) {
        const mantissa = Number(m.toPrecision(digits));
        const text = `${String(mantissa)} ${prefix}${unit}`;
        if (!/e/.test(String(mantissa)) && readsBack(text, unit, x)) return text;
      }
    }
  } else if (Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 && readsBack(String(x), null, x)) return String(x);
  return plain;
}

/**
 * The value a netlist holds when x is written short: a series or step value such as 6.8e-9 H is
 * written `6.8 nH`, which the netlist reads as 6.8 × 10⁻⁹ in its own arithmetic — a double that
 * may differ from 6.8e-9 in the last bit. This returns that double, for a text of at most six
 * significant digits with an engineering prefix that reads back within four units in the last
 * place of x; otherwise x itself.
 */
export function netlistValue(x: number, unit: string | null): number {
  if (!Number.isFinite(x) || x === 0) return x;
  const p = unit ? Math.floor(Math.log10(Math.abs(x)) / 3 + 1e-12) : 0;
  const prefix = PREFIXES[p];
  if (prefix === undefined) return x;
  const m = x / 10 ** (3 * p);
  const ulp = Math.abs(x) * Number.EPSILON;
  for (let digits = 1; digits <= 6; digits++) {
    const mantissa = Number(m.toPrecision(digits));
    if (/e/.test(String(mantissa))) continue;
    try {
      const y = evaluateQuantity(`${String(mantissa)}${unit ? ` ${prefix}${unit}` : ''}`, unit, 'value');
      if (Math.abs(y - x) <= 4 * ulp) return y;
    } catch {
      // not a value the netlist reads: keep looking
    }
  }
  return x;
}

/** Where a variable's value text sits in its file: [start, end) offsets. */
export function valueRange(text: string, v: Variable): [number, number] {
  const lines = lineStarts(text);
  const file = v.span.file;
  if (v.span.line < 1 || v.span.line > lines.length) throw new WriteBackError(`${file}:${v.span.line}: the line of \`${v.name}\` is not in the file`);
  const at = lines[v.span.line - 1]! + v.span.column - 1;
  if (text.slice(at, at + v.name.length) !== v.name) throw new WriteBackError(`${file}:${v.span.line}:${v.span.column}: \`${v.name}\` is not where the netlist put it (the file changed since it was read?)`);
  let i = at + v.name.length;
  i = skipBlank(text, i);
  if (text[i] !== '=') throw new WriteBackError(`${file}:${v.span.line}: no \`=\` after \`${v.name}\``);
  i = skipBlank(text, i + 1);
  const start = i;
  let end = -1;
  // scan to the word `vary` on the same line: a comment, a line break or a continuation first is refused
  for (let k = i; k < text.length; k++) {
    const c = text[k]!;
    if (c === '\n' || c === '\r' || c === '#' || c === '\\') break;
    if (c === 'v' && text.startsWith('vary', k) && !isWord(text[k - 1]) && !isWord(text[k + 4])) {
      end = k;
      break;
    }
  }
  if (end < 0) {
    throw new WriteBackError(`${file}:${v.span.line}: the value of \`${v.name}\` and its \`vary\` are not on one line`, 'write `let NAME = VALUE vary LOW to HIGH` on one line to have it written back');
  }
  while (end > start && (text[end - 1] === ' ' || text[end - 1] === '\t')) end--;
  if (end === start) throw new WriteBackError(`${file}:${v.span.line}: \`${v.name}\` has no value before \`vary\``);
  return [start, end];
}

function isWord(c: string | undefined): boolean {
  return c !== undefined && /[A-Za-z0-9_]/.test(c);
}

function skipBlank(text: string, i: number): number {
  while (text[i] === ' ' || text[i] === '\t') i++;
  return i;
}

/** Offsets where the lines start, at the grammar's line breaks (`\r\n`, `\n`, a lone `\r`). */
function lineStarts(text: string): number[] {
  const starts = [0];
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '\r') {
      if (text[i + 1] === '\n') i++;
      starts.push(i + 1);
    } else if (c === '\n') starts.push(i + 1);
  }
  return starts;
}

/**
 * The texts with new values for the variables (SI units, in the order of `variables`), one entry
 * per file that changes; `sources` holds the texts the variables were read from (by file name).
 * Only variables whose value differs from `variable.value` are written. The result is checked:
 * loading the edited netlist (`file`, with its edited includes) gives exactly the new values, or
 * WriteBackError is thrown.
 */
export function editVariableValues(
  file: string,
  sources: ReadonlyMap<string, string>,
  variables: readonly Variable[],
  values: ArrayLike<number>,
  readFile?: (path: string) => string,
): Map<string, string> {
  const edits = new Map<string, { range: [number, number]; text: string }[]>();
  variables.forEach((v, i) => {
    const x = values[i]!;
    if (x === v.value) return;
    const src = sources.get(v.span.file);
    if (src === undefined) throw new WriteBackError(`the text of ${v.span.file}, where \`${v.name}\` is defined, is not at hand`);
    const list = edits.get(v.span.file) ?? [];
    list.push({ range: valueRange(src, v), text: valueText(x, v.unit) });
    edits.set(v.span.file, list);
  });
  const out = new Map<string, string>();
  for (const [f, list] of edits) {
    let text = sources.get(f)!;
    list.sort((a, b) => b.range[0] - a.range[0]);
    for (const e of list) text = text.slice(0, e.range[0]) + e.text + text.slice(e.range[1]);
    out.set(f, text);
  }
  // check: the edited netlist loads with exactly the new values
  const main = out.get(file) ?? sources.get(file);
  if (main === undefined) throw new WriteBackError(`the text of ${file} is not at hand`);
  let reloaded: Variable[];
  try {
    reloaded = loadNetlist(main, file, { readFile: (p) => out.get(p) ?? sources.get(p) ?? (readFile ?? readInputText)(p) }).circuit.variables;
  } catch (e) {
    if (e instanceof InputError) throw new WriteBackError(`the netlist with the new values does not load:\n${e.message}`);
    throw e;
  }
  variables.forEach((v, i) => {
    const r = reloaded.find((w) => w.name === v.name);
    if (!r || r.value !== values[i]) throw new WriteBackError(`\`${v.name}\` reads back as ${r?.value} instead of ${values[i]} after the edit`, 'please report this netlist');
  });
  return out;
}
