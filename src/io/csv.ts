/**
 * CSV writer for network data.
 *
 * Schema (one header row, then one row per frequency point, "\n" line ends, comma separated;
 * fields are quoted as RFC 4180 §2 says, see {@link csvField}, although the names below hold no
 * comma; RFC 4180 asks for CRLF line ends, we write "\n", which every CSV reader we know accepts):
 *
 * - column 1: `freq_hz`, the frequency in Hz;
 * - then, for every matrix entry (i, j) in row-major order (11, 12, …, 1N, 21, …, NN), two
 *   columns named `<P><i><j>_<a>` and `<P><i><j>_<b>`, where `<P>` is the parameter letter
 *   (S, Z or Y) and the suffixes are, by format:
 *   - `RI`: `_re`, `_im` (real and imaginary part; Z in ohms, Y in siemens),
 *   - `MA`: `_mag`, `_deg` (magnitude, angle in degrees in (-180, 180]),
 *   - `DB`: `_db`, `_deg` (20·log10 of the magnitude, angle in degrees);
 * - with 10 ports or more the indices are separated by an underscore in every column name
 *   (`S1_1_re`, …, `S10_2_re`) so that names stay unambiguous;
 * - mixed-mode data (rows and columns [D1, …, DN, C1, …, CN]) name the modes instead:
 *   `Sdd11`, `Sdd12`, `Sdc11`, …, `Scc22` (response mode and pair, then drive mode and pair:
 *   `Sdc21` is the differential response of pair 2 to a common-mode drive of pair 1), with an
 *   underscore between the pair numbers from 10 pairs up.
 *
 * Numbers are written as the shortest text that reads back as the same double (ECMAScript
 * Number-to-String); with `digits`, the data values (not `freq_hz`) are first rounded to that many
 * significant digits. Negative zero is written as 0. An exact zero magnitude in DB is written as
 * 20·log10 of the smallest positive double (about -6466.1). No locale, no clock: the same bytes
 * every run. Title and comments of the network are not written (CSV has no comment syntax).
 */
import { isMixedMode, modeEntryName } from '../network/mixed-mode.js';
import type { NetworkData } from '../network/types.js';
import { checkDigits, checkEncodedFinite, checkNetworkData, encodeComplex, formatShortest, inPieces, type ComplexFormat } from './touchstone.js';

/**
 * One CSV field as RFC 4180 §2 (rules 6 and 7) has it: a field holding a comma, a double quote,
 * a CR or an LF is enclosed in double quotes, and each double quote inside it is doubled.
 */
export function csvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** A CSV record: the fields quoted by {@link csvField} and joined by commas (no line break). */
export function csvRow(fields: readonly string[]): string {
  return fields.map(csvField).join(',');
}

export interface CsvWriteOptions {
  /** Default 'RI'. */
  format?: ComplexFormat;
  /** Significant digits 1..17; default: shortest round-trip text. */
  digits?: number;
}

const SUFFIX: Record<ComplexFormat, [string, string]> = {
  RI: ['re', 'im'],
  MA: ['mag', 'deg'],
  DB: ['db', 'deg'],
};

/**
 * Column names of the CSV for `ports` ports (see the module comment); with `mixedMode` the
 * entries are named by mode (`Sdd21_re`).
 */
export function csvHeader(parameter: string, ports: number, format: ComplexFormat = 'RI', mixedMode = false): string[] {
  const [a, b] = SUFFIX[format];
  const sep = ports >= 10 ? '_' : '';
  const cols = ['freq_hz'];
  for (let i = 1; i <= ports; i++) {
    for (let j = 1; j <= ports; j++) {
      const name = mixedMode ? `${parameter}${modeEntryName(ports / 2, i - 1, j - 1)}` : `${parameter}${i}${sep}${j}`;
      cols.push(`${name}_${a}`, `${name}_${b}`);
    }
  }
  return cols;
}

/** Formats network data as CSV (schema in the module comment). */
export function formatCsv(net: NetworkData, opts: CsvWriteOptions = {}): string {
  return Array.from(csvChunks(net, opts)).join('');
}

/**
 * The text of {@link formatCsv} in pieces (the header row first), for writing a large file
 * without holding all of it; every check is made before the first piece.
 */
export function csvChunks(net: NetworkData, opts: CsvWriteOptions = {}): Iterable<string> {
  const format = opts.format ?? 'RI';
  if (SUFFIX[format] === undefined) throw new Error(`CSV: unknown format ${String(format)}`);
  const digits = opts.digits === undefined ? undefined : checkDigits(opts.digits, 17);
  checkNetworkData(net, 'CSV');
  checkEncodedFinite(net, format, 1, 'CSV', digits);
  return inPieces(csvRow(csvHeader(net.parameter, net.ports, format, isMixedMode(net))) + '\n', rows());

  function* rows(): Generator<string> {
    const n = net.ports;
    const pair = new Float64Array(2);
    const row: string[] = [];
    for (let k = 0; k < net.frequencies.length; k++) {
      row.length = 0;
      row.push(formatShortest(net.frequencies[k]!)); // always in full, so close points never merge
      const base = 2 * k * n * n;
      for (let q = 0; q < n * n; q++) {
        encodeComplex(format, net.values[base + 2 * q]!, net.values[base + 2 * q + 1]!, pair);
        row.push(formatShortest(pair[0]!, digits), formatShortest(pair[1]!, digits));
      }
      yield row.join(',');
    }
  }
}
