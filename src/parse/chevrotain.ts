/**
 * The grammar library, loaded from the single-file build its package ships beside its module
 * tree: the same code in one file, which a command-line run loads in a tenth of the time (measured
 * on the reference machine: about 40 ms against 300–500 ms, most of it resolving and reading the
 * tree's many small files). Where that file is missing (another layout of the package), the
 * package's own entry point is loaded instead.
 */
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';

type Chevrotain = typeof import('chevrotain');

async function load(): Promise<{ lib: Chevrotain; from: 'single file' | 'entry point' }> {
  try {
    const entry = createRequire(import.meta.url).resolve('chevrotain');
    const single = join(dirname(entry), '..', 'chevrotain.mjs');
    if (existsSync(single)) return { lib: (await import(pathToFileURL(single).href)) as Chevrotain, from: 'single file' };
  } catch {
    // fall through to the package's entry point
  }
  return { lib: await import('chevrotain'), from: 'entry point' };
}

const loaded = await load();
/** Which of the two the grammar library was loaded from, and its version (for tests). */
export const grammarLibrary = { from: loaded.from, version: loaded.lib.VERSION };
export const { createToken, Lexer, CstParser, EOF } = loaded.lib;
