import { readFileSync } from 'node:fs';
import { extname } from 'node:path';
import type { NetworkData } from '../network/types.js';
import { parseJson } from './json.js';
import { parseTouchstone } from './touchstone.js';

/**
 * Reads network data from a Touchstone (.sNp) or scatterbox JSON (.json) file. Warnings of the
 * file (e.g. noise parameters read but not used) go to `onWarning`, with their place in the file.
 */
export function readNetworkFile(path: string, onWarning?: (message: string, line: number, column: number) => void): NetworkData {
  const text = readFileSync(path, 'utf8');
  if (extname(path).toLowerCase() === '.json') return parseJson(text);
  return parseTouchstone(text, { fileName: path, onWarning });
}
