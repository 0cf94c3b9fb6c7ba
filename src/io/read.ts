import { extname } from 'node:path';
import type { NetworkData } from '../network/types.js';
import { parseJson } from './json.js';
import { readInputText } from './source-file.js';
import { parseTouchstone } from './touchstone.js';

/**
 * Reads network data from a Touchstone (.sNp) or scatterbox JSON (.json) file. Only regular files
 * of at most MAX_FILE_BYTES are read (throws InputFileError otherwise, see io/source-file.ts).
 */
export function readNetworkFile(path: string): NetworkData {
  const text = readInputText(path);
  if (extname(path).toLowerCase() === '.json') return parseJson(text);
  return parseTouchstone(text, { fileName: path });
}
