import { extname } from 'node:path';
import { convertNetwork } from '../network/convert.js';
import type { NetworkData, ParameterKind } from '../network/types.js';
import { writeFileAtomicSync } from './atomic.js';
import { OutputError } from './guard.js';

export { OutputError } from './guard.js';
import { csvChunks } from './csv.js';
import { formatJson } from './json.js';
import { touchstoneChunks, touchstoneExtension, type ComplexFormat, type FrequencyUnit, type TouchstoneVersion } from './touchstone.js';

export type OutputFormat = 'touchstone' | 'csv' | 'json';

export interface OutputOptions {
  /** File format; default: from the file's extension (.sNp → Touchstone, .csv, .json). */
  format?: OutputFormat;
  /** Which parameters to write (default S). Z and Y are converted from S and fail where they do not exist. */
  parameter?: ParameterKind;
  /** Touchstone version; default 1.1 when every port has the same reference, else 2.0. */
  version?: TouchstoneVersion;
  /** Complex number format (default RI). */
  data?: ComplexFormat;
  /** Frequency unit of Touchstone files (default GHz). */
  frequencyUnit?: FrequencyUnit;
  /** Significant digits (default: the writer's own). */
  digits?: number;
  /** Comment lines for Touchstone files. */
  comments?: string[];
}

/** The output format a file name implies, if any. */
export function formatFromPath(path: string): OutputFormat | undefined {
  const ext = extname(path).toLowerCase();
  if (/^\.s\d+p$/.test(ext)) return 'touchstone';
  if (ext === '.csv') return 'csv';
  if (ext === '.json') return 'json';
  return undefined;
}

/** Renders network data in the chosen format (the file name, if given, decides the default format). */
export function renderNetwork(net: NetworkData, options: OutputOptions = {}, path?: string): string {
  return Array.from(renderNetworkChunks(net, options, path)).join('');
}

/**
 * The text of {@link renderNetwork} in pieces (Touchstone and CSV a few hundred points at a time),
 * for writing a large file without holding all of it. Every check and conversion is made before
 * the first piece is handed out.
 */
export function renderNetworkChunks(net: NetworkData, options: OutputOptions = {}, path?: string): Iterable<string> {
  const format = options.format ?? (path ? formatFromPath(path) : undefined);
  if (!format) {
    throw new OutputError(
      `cannot tell the output format from the file name ${JSON.stringify(path ?? '')}`,
      'use an extension .s2p (Touchstone, .sNp for N ports), .csv or .json, or give --format',
    );
  }
  if (net.referenceReactances?.some((x) => x !== 0)) {
    throw new OutputError('the ports have complex reference impedances, which network-data files cannot carry', 'give the ports real references (leave out `ref_x`), or renormalise the data to real references first (in the library: fromComplexReferences)');
  }
  const data = options.parameter && options.parameter !== net.parameter ? convertNetwork(net, options.parameter) : net;
  switch (format) {
    case 'touchstone': {
      if (path) {
        const ext = extname(path).toLowerCase();
        const want = touchstoneExtension(net.ports);
        if (/^\.s\d+p$/.test(ext) && ext !== want) {
          throw new OutputError(`the file name ends in ${ext} but the network has ${net.ports} port(s)`, `name the file with ${want}`);
        }
      }
      const sameRefs = data.references.every((r) => r === data.references[0]);
      const version = options.version ?? (sameRefs ? '1.1' : '2.0');
      if (version === '1.1' && !sameRefs) {
        throw new OutputError('Touchstone 1.1 has one reference impedance for all ports, but the ports differ', 'write version 2.0 (--touchstone 2.0), which has per-port references');
      }
      return touchstoneChunks(data, {
        version,
        format: options.data ?? 'RI',
        frequencyUnit: options.frequencyUnit ?? 'GHz',
        digits: options.digits,
        comments: options.comments,
      });
    }
    case 'csv':
      return csvChunks(data, { format: options.data ?? 'RI', digits: options.digits });
    case 'json':
      return [formatJson(data, { digits: options.digits })];
  }
}

/**
 * Writes network data to `path` atomically (a temporary file renamed over the target), so a
 * failed run never leaves a partial file and never clobbers an existing one. Every check and
 * conversion happens before the file is touched; the text then streams into the temporary file a
 * few hundred points at a time, so a long many-port sweep is never held as one string. The kind of
 * target (link, device, pipe, folder), the sweep of temporary files left by killed runs and the
 * plain messages of failed writes are those of {@link writeFileAtomicSync}. To refuse an output that
 * is one of the run's inputs, call `checkOutputTarget` (io/guard.ts) first.
 */
export function writeNetwork(net: NetworkData, path: string, options: OutputOptions = {}): void {
  writeFileAtomicSync(path, renderNetworkChunks(net, options, path));
}
