import { readFileSync, statSync } from 'node:fs';
import { MAX_FILE_BYTES } from '../limits.js';

/**
 * An input file that cannot be read, with the reason in plain words (`message`), the path as
 * given, and a code: `ENOENT` (missing), `EISDIR` (a folder), `ENOTREG` (a pipe, device or
 * socket: never opened, so reading cannot block), `EFBIG` (over MAX_FILE_BYTES), or the system's
 * code for other failures (`EACCES`…). Shaped like Node's own errors (`code`, `path`).
 */
export class InputFileError extends Error {
  constructor(
    readonly path: string,
    readonly code: string,
    reason: string,
  ) {
    super(reason);
    this.name = 'InputFileError';
  }
}

function reasonOf(code: string | undefined, fallback: string): string {
  switch (code) {
    case 'ENOENT':
      return 'no such file';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'ENOTDIR':
      return 'a part of the path is not a folder';
    case 'ELOOP':
      return 'too many symbolic links';
    default:
      return fallback;
  }
}

/**
 * Reads an input file (netlist, included file, data file) as UTF-8 text. Only regular files are
 * read, and at most MAX_FILE_BYTES of them: the file is looked at (stat, following symbolic links)
 * before it is opened, so a FIFO or a device (`/dev/zero`) is refused without ever being opened.
 * Throws {@link InputFileError}.
 */
export function readInputText(path: string): string {
  let size: number;
  try {
    const st = statSync(path);
    if (st.isDirectory()) throw new InputFileError(path, 'EISDIR', 'is a folder, not a file');
    if (!st.isFile()) throw new InputFileError(path, 'ENOTREG', 'is not a regular file (a pipe, device or socket); only regular files are read');
    size = st.size;
  } catch (e) {
    if (e instanceof InputFileError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputFileError(path, code ?? 'EIO', reasonOf(code, (e as Error).message));
  }
  if (size > MAX_FILE_BYTES) {
    throw new InputFileError(path, 'EFBIG', `is ${size} bytes, larger than ${MAX_FILE_BYTES} bytes (the limit of file size)`);
  }
  let buf: Buffer;
  try {
    buf = readFileSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputFileError(path, code ?? 'EIO', reasonOf(code, (e as Error).message));
  }
  // a file that grew between the look and the read
  if (buf.length > MAX_FILE_BYTES) throw new InputFileError(path, 'EFBIG', `is larger than ${MAX_FILE_BYTES} bytes (the limit of file size)`);
  return buf.toString('utf8');
}
