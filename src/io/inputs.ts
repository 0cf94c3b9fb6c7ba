import { readdirSync, statSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

/** No netlist matched what was asked for. */
export class InputsError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'InputsError';
  }
}

/** Whether `path` is a regular file (following symbolic links); never opens it. */
function isRegularFile(path: string): boolean {
  try {
    return statSync(path).isFile();
  } catch {
    return false;
  }
}

function globToRegExp(glob: string): RegExp {
  let re = '';
  for (const ch of glob) {
    if (ch === '*') re += '[^/]*';
    else if (ch === '?') re += '[^/]';
    else re += ch.replace(/[.+^${}()|[\]\\]/g, '\\$&');
  }
  return new RegExp(`^${re}$`);
}

/**
 * Expands the inputs of a batch run: a file stands for itself, a folder for the files with
 * `extension` in it (not recursive), and a pattern with `*` or `?` in its last part for the
 * matching files of its folder (for shells that pass patterns through). Folders and patterns
 * take only regular files (a FIFO or a folder named `x.sbx` is passed over); a file named
 * explicitly is kept, and refused when it is read (io/source-file.ts). The result is sorted
 * and free of duplicates, so a batch always runs in the same order.
 */
export function expandInputs(inputs: string[], extension = '.sbx'): string[] {
  const out = new Set<string>();
  for (const input of inputs) {
    if (/[*?]/.test(basename(input))) {
      const dir = dirname(input);
      const re = globToRegExp(basename(input));
      let names: string[];
      try {
        names = readdirSync(dir);
      } catch {
        throw new InputsError(`${dir}: no such folder`);
      }
      // only regular files: a folder, pipe or device that matches is passed over
      const hits = names.filter((n) => re.test(n) && isRegularFile(join(dir, n))).sort();
      if (hits.length === 0) throw new InputsError(`${input}: no file matches`);
      for (const n of hits) out.add(join(dir, n));
      continue;
    }
    let isDir = false;
    try {
      isDir = statSync(input).isDirectory();
    } catch {
      out.add(input); // reported when read, with the usual message
      continue;
    }
    if (isDir) {
      const hits = readdirSync(input).filter((n) => n.endsWith(extension) && isRegularFile(join(input, n))).sort();
      if (hits.length === 0) throw new InputsError(`${input}: no ${extension} file in this folder`);
      for (const n of hits) out.add(join(input, n));
    } else out.add(input);
  }
  return [...out].sort();
}
