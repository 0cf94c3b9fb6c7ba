import { extname } from 'node:path';
import { InputError, type Diagnostic } from '../diagnostics/diagnostic.js';
import type { NetworkData } from '../network/types.js';
import { JsonNetworkError, parseJson } from './json.js';
import { readInputText } from './source-file.js';
import { parseTouchstone, TouchstoneError } from './touchstone.js';

/**
 * Reads network data from a Touchstone (.sNp) or scatterbox JSON (.json) file. Only regular files
 * of at most MAX_FILE_BYTES are read (throws InputFileError otherwise, see io/source-file.ts).
 * Warnings of the file (e.g. noise parameters read but not used) go to `onWarning`, with their
 * place in the file.
 */
export function readNetworkFile(path: string, onWarning?: (message: string, line: number, column: number) => void): NetworkData {
  const text = readInputText(path);
  if (extname(path).toLowerCase() === '.json') return parseJson(text);
  return parseTouchstone(text, { fileName: path, onWarning });
}

/** Network data of a file with its warnings, as {@link loadNetworkFile} returns them. */
export interface LoadedNetworkFile {
  net: NetworkData;
  /** Located warnings of the file (render them with formatDiagnostics and `sources`). */
  warnings: Diagnostic[];
  /** The file's text by its name, for formatDiagnostics. */
  sources: Map<string, string>;
}

/**
 * Reads a network-data file as the commands that take one (`convert`, `diff`, `report`, `plot`,
 * `check --against`) need it: a malformed file throws an {@link InputError} whose diagnostic
 * points into the file (rendered like netlist errors, with the line and a caret), and the
 * file's warnings come back as located diagnostics. Errors reading the file itself (no such
 * file…) are thrown as they are.
 */
export function loadNetworkFile(path: string): LoadedNetworkFile {
  const text = readInputText(path);
  const sources = new Map([[path, text]]);
  const warnings: Diagnostic[] = [];
  const onWarning = (message: string, line: number, column: number) =>
    warnings.push({ severity: 'warning', code: 'data-file', message, span: { file: path, line, column, length: 1 } });
  try {
    const net = extname(path).toLowerCase() === '.json' ? parseJson(text) : parseTouchstone(text, { fileName: path, onWarning });
    return { net, warnings, sources };
  } catch (e) {
    if (e instanceof TouchstoneError) {
      throw new InputError([{ severity: 'error', code: 'bad-data-file', message: e.message, span: { file: path, line: e.line, column: e.column, length: 1 } }], sources);
    }
    if (e instanceof JsonNetworkError) {
      throw new InputError([{ severity: 'error', code: 'bad-data-file', message: e.message, span: { file: path, line: e.line, column: e.column, length: 1 } }], sources);
    }
    throw e;
  }
}
