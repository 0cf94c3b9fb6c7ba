/**
 * Atomic file replacement: the target either keeps its old content or gets the complete new
 * content, never a part of it.
 *
 * Method (common practice on POSIX file systems): write the data to a temporary file in the same
 * directory as the target (so the rename stays on one file system), fsync it, then rename it over
 * the target, then fsync the directory (best effort, so that the rename itself is durable).
 * On any failure the temporary file is removed and the error is rethrown; the target is untouched.
 *
 * The temporary name is `.<base>.<pid>.<12 hex digits>.tmp`, created with O_EXCL so that a file of
 * another writer is never opened, and never removed on failure. When the target already exists its
 * permission bits are copied to the new file.
 *
 * The target decides how it is written (`resolveWriteTarget` in guard.ts): a regular file or a
 * missing one as above; a symbolic link to a regular file is written through, the file it points
 * to being replaced in its own folder (the link stays a link); a character device (/dev/null), a
 * pipe, or /dev/stdout and its kin are written in place, never replaced by a regular file (a pipe
 * that nobody reads is refused instead of waiting for a reader); a folder, a missing folder, a link
 * to nothing, a block device or a socket are refused. Failures become `WriteError`s naming the
 * caller's path and the cause in plain words.
 *
 * Before a write the target's folder is swept of temporary files that killed runs left behind
 * ({@link sweepTempFiles}; at most once a minute per folder in one process).
 */
import * as fs from 'node:fs';
import * as fsp from 'node:fs/promises';
import { randomBytes } from 'node:crypto';
import { basename, dirname, join, resolve } from 'node:path';
import { explainWriteError, resolveWriteTarget, type WriteTarget } from './guard.js';

function tempPathFor(path: string): string {
  return join(dirname(path), `.${basename(path)}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
}

/** The names {@link tempPathFor} gives, and only those: `.<base>.<pid>.<12 lower-case hex digits>.tmp`. */
const TEMP_NAME = /^\.(.+)\.([1-9]\d{0,9})\.[0-9a-f]{12}\.tmp$/;

/** A temporary file whose writing process no longer exists is swept once it has been left unchanged this long (ms). */
export const TEMP_ORPHAN_AGE_MS = 60_000;
/**
 * A temporary file unchanged this long (ms) is swept whatever its process id says (the id may have
 * been reused, or belong to another machine sharing the folder); a write in progress changes its
 * file all the time, so it is never this old.
 */
export const TEMP_STALE_AGE_MS = 60 * 60_000;

function processExists(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code !== 'ESRCH'; // EPERM: it exists, owned by another user
  }
}

/**
 * When this process last swept each folder (ms): a folder is swept again only after
 * {@link TEMP_ORPHAN_AGE_MS}, so that a batch writing thousands of files into one folder does not
 * list it thousands of times (leftovers of killed runs are rare, and younger ones stay anyway).
 */
const lastSweep = new Map<string, number>();

/** {@link sweepTempFiles} of the folder of `target`, unless this process swept it within the orphan age. */
function sweepBeforeWrite(target: string): void {
  const folder = resolve(dirname(target));
  const now = Date.now();
  const last = lastSweep.get(folder);
  if (last !== undefined && now - last < TEMP_ORPHAN_AGE_MS) return;
  lastSweep.set(folder, now);
  sweepTempFiles(folder, now);
}

/**
 * Removes from `folder` the temporary files of this module that killed runs left behind: only
 * regular files named exactly as {@link tempPathFor} names them and owned by this user, and of those
 * only the ones whose writing process (the id in the name) no longer exists and that were left
 * unchanged for {@link TEMP_ORPHAN_AGE_MS}, or that were left unchanged for
 * {@link TEMP_STALE_AGE_MS}. Best effort: a file that cannot be examined or removed stays.
 * Returns the names removed.
 */
export function sweepTempFiles(folder: string, now: number = Date.now()): string[] {
  let names: string[];
  try {
    names = fs.readdirSync(folder);
  } catch {
    return [];
  }
  const removed: string[] = [];
  const uid = typeof process.getuid === 'function' ? process.getuid() : undefined;
  for (const name of names) {
    const m = TEMP_NAME.exec(name);
    if (!m) continue;
    const path = join(folder, name);
    try {
      const st = fs.lstatSync(path);
      if (!st.isFile() || (uid !== undefined && st.uid !== uid)) continue;
      const age = now - st.mtimeMs;
      if ((age >= TEMP_ORPHAN_AGE_MS && !processExists(Number(m[2]))) || age >= TEMP_STALE_AGE_MS) {
        fs.unlinkSync(path);
        removed.push(name);
      }
    } catch {
      // gone already, or not ours to remove
    }
  }
  return removed;
}

function toBytes(data: string | Uint8Array): Uint8Array {
  return typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
}

/** What can be written: text (as UTF-8), bytes, or a sequence of either, written in turn. */
export type AtomicData = string | Uint8Array | Iterable<string | Uint8Array>;

function pieces(data: AtomicData): Iterable<string | Uint8Array> {
  return typeof data === 'string' || data instanceof Uint8Array ? [data] : data;
}

/** Permission bits of an existing target, or undefined when there is none. */
async function existingMode(path: string): Promise<number | undefined> {
  try {
    return (await fsp.stat(path)).mode & 0o7777;
  } catch {
    return undefined;
  }
}

function existingModeSync(path: string): number | undefined {
  try {
    return fs.statSync(path).mode & 0o7777;
  } catch {
    return undefined;
  }
}

/**
 * Flags to open a device or pipe for writing in place: never created, never truncated (appended,
 * which a device ignores). A pipe is opened without blocking: with no program reading it the open
 * fails (ENXIO) instead of waiting for ever, and a full pipe is waited on in {@link writeAllSync}.
 */
function openStreamFlags(pipe: boolean): number {
  const c = fs.constants;
  return c.O_WRONLY | c.O_APPEND | (c.O_NOCTTY ?? 0) | (pipe ? c.O_NONBLOCK : 0);
}

const pause = new Int32Array(new SharedArrayBuffer(4));

function writeAllSync(fd: number, data: AtomicData): void {
  for (const piece of pieces(data)) {
    const bytes = toBytes(piece);
    let off = 0;
    while (off < bytes.length) {
      try {
        off += fs.writeSync(fd, bytes, off, bytes.length - off);
      } catch (e) {
        // a pipe (opened non-blocking) or a descriptor we did not open may be full: wait for room
        if ((e as NodeJS.ErrnoException).code !== 'EAGAIN') throw e;
        Atomics.wait(pause, 0, 0, 2);
      }
    }
  }
}

/** Writes to a device, a pipe or a descriptor of this process, in place (see the module comment). */
function writeStreamSync(target: Extract<WriteTarget, { kind: 'stream' }>, data: AtomicData): void {
  if (target.fd !== undefined) {
    writeAllSync(target.fd, data); // not ours to close
    return;
  }
  const fd = fs.openSync(target.path, openStreamFlags(target.pipe));
  try {
    writeAllSync(fd, data);
  } finally {
    fs.closeSync(fd);
  }
}

/** Writes `data` (strings as UTF-8) to `path` atomically; see the module comment. */
export async function writeFileAtomic(path: string, data: string | Uint8Array): Promise<void> {
  const target = resolveWriteTarget(path);
  const bytes = toBytes(data);
  if (target.kind === 'stream') {
    try {
      writeStreamSync(target, bytes); // in place, as the synchronous writer does
    } catch (err) {
      throw explainWriteError(err, path);
    }
    return;
  }
  const real = target.path;
  sweepBeforeWrite(real);
  const tmp = tempPathFor(real);
  const mode = await existingMode(real);
  let handle: fsp.FileHandle | undefined;
  let created = false;
  try {
    handle = await fsp.open(tmp, 'wx', 0o666);
    created = true;
    if (mode !== undefined) await handle.chmod(mode);
    await handle.writeFile(bytes);
    await handle.sync();
    const h = handle;
    handle = undefined;
    await h.close();
    await fsp.rename(tmp, real);
    created = false;
  } catch (err) {
    if (handle !== undefined) await handle.close().catch(() => undefined);
    if (created) await fsp.unlink(tmp).catch(() => undefined);
    throw explainWriteError(err, path);
  }
  await syncDirectory(dirname(real));
}

/**
 * Synchronous twin of {@link writeFileAtomic}; `data` may also be a sequence of pieces (written one
 * after another; if producing one throws, the temporary file is removed and the target is untouched).
 */
export function writeFileAtomicSync(path: string, data: AtomicData): void {
  const target = resolveWriteTarget(path);
  if (target.kind === 'stream') {
    try {
      writeStreamSync(target, data);
    } catch (err) {
      throw explainWriteError(err, path);
    }
    return;
  }
  const real = target.path;
  sweepBeforeWrite(real);
  const tmp = tempPathFor(real);
  const mode = existingModeSync(real);
  let fd: number | undefined;
  let created = false;
  try {
    fd = fs.openSync(tmp, 'wx', 0o666);
    created = true;
    if (mode !== undefined) fs.fchmodSync(fd, mode);
    writeAllSync(fd, data);
    fs.fsyncSync(fd);
    const f = fd;
    fd = undefined;
    fs.closeSync(f);
    fs.renameSync(tmp, real);
    created = false;
  } catch (err) {
    if (fd !== undefined) {
      try {
        fs.closeSync(fd);
      } catch {
        // already failing; keep the first error
      }
    }
    if (created) {
      try {
        fs.unlinkSync(tmp);
      } catch {
        // nothing more to do
      }
    }
    throw explainWriteError(err, path);
  }
  syncDirectorySync(dirname(real));
}

/** fsync of a directory, best effort: some platforms cannot open directories. */
async function syncDirectory(dir: string): Promise<void> {
  let h: fsp.FileHandle | undefined;
  try {
    h = await fsp.open(dir, 'r');
    await h.sync();
  } catch {
    // best effort only
  } finally {
    await h?.close().catch(() => undefined);
  }
}

function syncDirectorySync(dir: string): void {
  let fd: number | undefined;
  try {
    fd = fs.openSync(dir, 'r');
    fs.fsyncSync(fd);
  } catch {
    // best effort only
  } finally {
    if (fd !== undefined) {
      try {
        fs.closeSync(fd);
      } catch {
        // ignore
      }
    }
  }
}
