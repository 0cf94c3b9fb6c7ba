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
 * permission bits are copied to the new file. A target that is a symbolic link is replaced by a
 * regular file (the link is not followed).
 */
import * as fs from 'node:fs';
import * as fsp from 'node:fs/promises';
import { randomBytes } from 'node:crypto';
import { basename, dirname, join } from 'node:path';

function tempPathFor(path: string): string {
  return join(dirname(path), `.${basename(path)}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
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

/** Writes `data` (strings as UTF-8) to `path` atomically; see the module comment. */
export async function writeFileAtomic(path: string, data: string | Uint8Array): Promise<void> {
  const bytes = toBytes(data);
  const tmp = tempPathFor(path);
  const mode = await existingMode(path);
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
    await fsp.rename(tmp, path);
    created = false;
  } catch (err) {
    if (handle !== undefined) await handle.close().catch(() => undefined);
    if (created) await fsp.unlink(tmp).catch(() => undefined);
    throw err;
  }
  await syncDirectory(dirname(path));
}

/**
 * Synchronous twin of {@link writeFileAtomic}; `data` may also be a sequence of pieces (written one
 * after another; if producing one throws, the temporary file is removed and the target is untouched).
 */
export function writeFileAtomicSync(path: string, data: AtomicData): void {
  const tmp = tempPathFor(path);
  const mode = existingModeSync(path);
  let fd: number | undefined;
  let created = false;
  try {
    fd = fs.openSync(tmp, 'wx', 0o666);
    created = true;
    if (mode !== undefined) fs.fchmodSync(fd, mode);
    for (const piece of pieces(data)) {
      const bytes = toBytes(piece);
      let off = 0;
      while (off < bytes.length) off += fs.writeSync(fd, bytes, off, bytes.length - off);
    }
    fs.fsyncSync(fd);
    const f = fd;
    fd = undefined;
    fs.closeSync(f);
    fs.renameSync(tmp, path);
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
    throw err;
  }
  syncDirectorySync(dirname(path));
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
