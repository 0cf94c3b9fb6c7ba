/**
 * Safety of outputs: an output never replaces an input of the same run, two outputs of one run
 * never land on the same file, the kind of the target (regular file, symbolic link, pipe, device,
 * folder) decides how it is written, and a failed write says in plain words what went wrong
 * with the path the user gave (never the temporary file's name or a bare error code).
 *
 * Everything here is synchronous and touches only file metadata; nothing is written.
 */
import * as fs from 'node:fs';
import { basename, dirname, extname, resolve } from 'node:path';

/** A problem with the requested output itself (unknown extension, wrong port count for `.sNp`, an unwritable target…). */
export class OutputError extends Error {
  constructor(message: string, readonly help?: string) {
    super(message);
    this.name = 'OutputError';
  }
}

/**
 * A write that the file system refused, or a target that cannot be written. `path` is the path as
 * the caller gave it; `code` the system's error code when there was one (e.g. `ENOSPC`).
 */
export class WriteError extends OutputError {
  constructor(message: string, readonly path: string, readonly code?: string, help?: string) {
    super(message, help);
    this.name = 'WriteError';
  }
}

function folderOf(path: string): string {
  return dirname(path) || '.';
}

/** The first line of a system error's message, without its `CODE: ` prefix and the `, syscall 'path'` tail naming internal files. */
function plainSystemMessage(err: Error): string {
  const first = (err.message ?? String(err)).split('\n')[0]!;
  return first.replace(/^[A-Z][A-Z0-9_]*: /, '').replace(/, \w+ '.*$/, '');
}

/**
 * Turns an error raised while writing `path` into a {@link WriteError} whose message names `path`
 * and the cause in plain words. Errors that already are {@link OutputError}s pass unchanged; so
 * does anything that is not a system error (a failing producer of the data keeps its own error).
 * Used by every writer of this module and of `atomic.ts`.
 */
export function explainWriteError(err: unknown, path: string): unknown {
  if (err instanceof OutputError) return err;
  const e = err as NodeJS.ErrnoException;
  if (!(e instanceof Error) || typeof e.code !== 'string') return err;
  const folder = folderOf(path);
  const say = (message: string, help?: string) => new WriteError(message, path, e.code, help);
  switch (e.code) {
    case 'ENOENT':
      if (!isFolder(folder)) return say(`cannot write ${path}: the folder ${folder} does not exist`, 'create the folder first, or write to an existing one');
      return say(`cannot write ${path}: a file vanished during the write (another program removed it)`, 'run again');
    case 'ENOTDIR': {
      const blocker = notAFolder(folder);
      return say(`cannot write ${path}: ${blocker ?? 'a part of the path before the file name'} is not a folder`);
    }
    case 'EACCES':
    case 'EPERM':
      return say(`cannot write ${path}: permission denied`, `this user may not create or replace files in the folder ${folder}`);
    case 'EROFS':
      return say(`cannot write ${path}: the file system is read-only`, 'write to a folder on a writable disk');
    case 'ENOSPC':
      return say(`cannot write ${path}: the disk is full`, 'free some space, or write to another disk');
    case 'EDQUOT':
      return say(`cannot write ${path}: the disk quota of this user is used up`, 'free some space, or write to another disk');
    case 'EISDIR':
      return say(`cannot write ${path}: it is a folder`, 'give a file name (inside that folder, for example)');
    case 'ENAMETOOLONG':
      return say(`cannot write ${path}: the file name is too long for the file system`);
    case 'ELOOP':
      return say(`cannot write ${path}: too many symbolic links (a link pointing to itself?)`);
    case 'EMFILE':
    case 'ENFILE':
      return say(`cannot write ${path}: too many files are open`);
    case 'EPIPE':
      return say(`cannot write ${path}: the program reading it stopped reading`);
    case 'ENXIO':
      return say(`cannot write ${path}: no program is reading from this pipe`, 'start the reader first');
    case 'EBUSY':
    case 'ETXTBSY':
      return say(`cannot write ${path}: the file is busy (in use by another program)`);
    case 'EIO':
      return say(`cannot write ${path}: input/output error of the disk or device${e.message && !/^EIO\b/.test(e.message) ? ` (${plainSystemMessage(e)})` : ''}`);
    default:
      return say(`cannot write ${path}: ${plainSystemMessage(e)}`);
  }
}

/** The deepest existing ancestor of `folder` (itself included) when that is not a folder. */
function notAFolder(folder: string): string | undefined {
  for (let f = folder; ; ) {
    try {
      return fs.statSync(f).isDirectory() ? undefined : f;
    } catch {
      const up = dirname(f);
      if (up === f) return undefined;
      f = up;
    }
  }
}

function isFolder(path: string): boolean {
  try {
    return fs.statSync(path).isDirectory();
  } catch {
    return false;
  }
}

/**
 * How a target is written: `file` — atomically, a temporary file in the folder of `path` renamed
 * over `path` (for a symbolic link, `path` is the file the link points to, so the link stays);
 * `stream` — written through, in place (a character device such as /dev/null, a pipe, or the
 * standard output/error of this process), never replaced by a regular file.
 */
export type WriteTarget = { kind: 'file'; path: string } | { kind: 'stream'; path: string; pipe: boolean; fd?: number };

/**
 * The descriptor of this process that a path names (`/dev/stdout` 1, `/dev/stderr` 2, `/dev/fd/N`
 * and `/proc/self/fd/N` N), if it does: such a target is written to that descriptor itself, as it
 * is (a terminal, a pipe, a socket, or a file opened by the shell, appended to with `>>`).
 */
function descriptorOf(path: string): number | undefined {
  const m = /^\/(?:dev\/(stdout|stderr|fd\/(\d+))|proc\/(self|\d+)\/fd\/(\d+))$/.exec(resolve(path));
  if (!m) return undefined;
  if (m[1] === 'stdout') return 1;
  if (m[1] === 'stderr') return 2;
  if (m[2] !== undefined) return Number(m[2]);
  if (m[3] !== 'self' && Number(m[3]) !== process.pid) return undefined;
  return Number(m[4]);
}

/**
 * Decides how `path` is written (see {@link WriteTarget}), or throws a {@link WriteError}:
 * a folder, a missing folder, a symbolic link to nothing, a block device or a socket.
 */
export function resolveWriteTarget(path: string): WriteTarget {
  const fd = descriptorOf(path);
  if (fd !== undefined) {
    try {
      fs.fstatSync(fd);
    } catch {
      throw new WriteError(`cannot write ${path}: this process has no such output open`, path, 'EBADF');
    }
    return { kind: 'stream', path, pipe: false, fd };
  }
  let st: fs.Stats;
  try {
    st = fs.lstatSync(path);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') {
      const folder = folderOf(path);
      let fst: fs.Stats;
      try {
        fst = fs.statSync(folder);
      } catch (e) {
        throw explainWriteError(e, path);
      }
      if (!fst.isDirectory()) throw new WriteError(`cannot write ${path}: ${folder} is not a folder`, path, 'ENOTDIR');
      return { kind: 'file', path };
    }
    throw explainWriteError(err, path);
  }
  if (st.isSymbolicLink()) {
    let target: fs.Stats;
    try {
      target = fs.statSync(path);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') {
        let to = '';
        try {
          to = fs.readlinkSync(path);
        } catch {
          // keep the message without the link's text
        }
        throw new WriteError(`cannot write ${path}: it is a symbolic link to ${to ? `${to}, which does not exist` : 'nothing'}`, path, 'ENOENT', 'remove the link, or let it point to an existing file');
      }
      throw explainWriteError(err, path);
    }
    if (!target.isFile()) return kindOf(path, target);
    let real: string;
    try {
      real = fs.realpathSync(path);
    } catch (err) {
      throw explainWriteError(err, path);
    }
    return { kind: 'file', path: real };
  }
  return kindOf(path, st);
}

function kindOf(path: string, st: fs.Stats): WriteTarget {
  if (st.isFile()) return { kind: 'file', path };
  if (st.isDirectory()) throw new WriteError(`cannot write ${path}: it is a folder`, path, 'EISDIR', 'give a file name (inside that folder, for example)');
  if (st.isCharacterDevice()) return { kind: 'stream', path, pipe: false };
  if (st.isFIFO()) return { kind: 'stream', path, pipe: true };
  const what = st.isBlockDevice() ? 'a block device (a disk)' : st.isSocket() ? 'a socket' : 'not a regular file';
  throw new WriteError(`cannot write ${path}: it is ${what}`, path, undefined, 'outputs go to regular files, pipes and character devices such as /dev/null');
}

/** Device and inode of an existing file (links followed), or undefined. */
function identity(path: string): { dev: number; ino: number } | undefined {
  try {
    const st = fs.statSync(path);
    return { dev: st.dev, ino: st.ino };
  } catch {
    return undefined;
  }
}

/** The absolute path with the links of its folder resolved (the folder may be missing: then plainly absolute). */
function canonical(path: string): string {
  const abs = resolve(path);
  try {
    return resolve(fs.realpathSync(dirname(abs)), basename(abs));
  } catch {
    return abs;
  }
}

function sameFile(a: string, b: string): boolean {
  const ia = identity(a);
  const ib = identity(b);
  if (ia && ib) return ia.dev === ib.dev && ia.ino === ib.ino;
  if (ia || ib) return false;
  return canonical(a) === canonical(b);
}

/** Character devices and pipes are written through, so two outputs on them, or an output on one, do not clash with anything. */
function isStreamNode(path: string): boolean {
  try {
    const st = fs.statSync(path);
    return st.isCharacterDevice() || st.isFIFO();
  } catch {
    return false;
  }
}

/**
 * Refuses an output that is the same file as one of `inputs` (the netlist, its included files and
 * data files, a data file read, a golden file compared against): compared as the file system sees
 * them — an existing file by device and inode (so symbolic links, hard links and the letter case
 * of a case-insensitive file system are seen through), a missing one by its absolute path with
 * the links of its folder resolved. Inputs that are not files (such as `--set`) are skipped.
 * A device or pipe target (e.g. /dev/null) is never an input's clash.
 */
export function checkOutputTarget(path: string, inputs: Iterable<string>): void {
  if (isStreamNode(path)) return;
  const out = identity(path);
  if (!out) return; // a file that does not exist yet cannot be an input that was read
  for (const input of inputs) {
    const id = identity(input);
    if (id && id.dev === out.dev && id.ino === out.ino) {
      const same = resolve(input) === resolve(path) ? '' : ` (${input})`;
      throw new OutputError(`the output ${path} is an input of this run${same}; it would be overwritten`, 'write the output to another file: inputs are never replaced');
    }
  }
}

/**
 * Refuses two outputs of one run on the same file (e.g. `--junit r.xml --json r.xml`), compared as
 * in {@link checkOutputTarget}; `undefined` entries (options not given) are skipped.
 */
export function checkDistinctOutputs(outputs: Iterable<string | undefined>): void {
  const seen: string[] = [];
  for (const p of outputs) {
    if (p === undefined) continue;
    if (!isStreamNode(p)) {
      const clash = seen.find((q) => sameFile(p, q));
      if (clash !== undefined) throw new OutputError(`two outputs of this run go to the same file: ${clash} and ${p}`, 'give each output its own file');
    }
    seen.push(p);
  }
}

/**
 * For a batch writing one file per netlist into one folder (named after the netlist, extension
 * replaced): refuses two netlists whose files would have the same name, naming both. Names are
 * compared without regard to letter case, so that a batch that works on one system works on all
 * (on a case-insensitive file system `X.s2p` and `x.s2p` are one file).
 */
export function checkBatchNames(netlists: readonly string[]): void {
  const byName = new Map<string, string>();
  for (const file of netlists) {
    const key = basename(file, extname(file)).toLowerCase();
    const first = byName.get(key);
    if (first !== undefined) {
      throw new OutputError(
        `${first} and ${file} would both be written to ${basename(file, extname(file))}.* in the output folder`,
        'rename one of them, or write them into different folders in separate runs',
      );
    }
    byName.set(key, file);
  }
}

/**
 * The checks of a run's outputs before anything is written: no two of `outputs` on one file
 * ({@link checkDistinctOutputs}), none of them an input ({@link checkOutputTarget}), and each a
 * target that can be written (a folder that exists, not a folder itself, not a link to nothing…:
 * {@link resolveWriteTarget}), so that a run fails before its work rather than after it.
 */
export function checkOutputs(outputs: Iterable<string | undefined>, inputs: Iterable<string>): void {
  const outs = [...outputs].filter((p): p is string => p !== undefined);
  const ins = [...inputs];
  checkDistinctOutputs(outs);
  for (const out of outs) {
    checkOutputTarget(out, ins);
    resolveWriteTarget(out);
  }
}

/**
 * Creates the folder `path` (and its parents) if it does not exist, for an output folder such as
 * `--out-dir`; failures are {@link WriteError}s naming `path` in plain words (a file in the way,
 * permission denied, a read-only file system…).
 */
export function ensureFolder(path: string): void {
  try {
    fs.mkdirSync(path, { recursive: true });
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'EEXIST' || code === 'ENOTDIR') {
      const blocker = notAFolder(path);
      throw new WriteError(`cannot create the folder ${path}: ${blocker ?? 'a part of the path'} is not a folder`, path, code);
    }
    const e = explainWriteError(err, path);
    if (e instanceof WriteError) throw new WriteError(e.message.replace(`cannot write ${path}`, `cannot create the folder ${path}`), path, e.code, e.help);
    throw e;
  }
}
