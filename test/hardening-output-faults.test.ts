// Issue 14, item 4: failed writes name the user's path and the cause in plain words. Errors a test
// cannot provoke for real as root, or without a full or read-only disk (EROFS, ENOSPC, EDQUOT,
// EACCES…), are injected into node:fs / node:fs/promises at one step of the write, with the message
// shape Node gives them (`CODE: text, syscall 'path'`, Node.js fs documentation, from memory): the
// writers under test are the real ones and map the error with their own function
// (explainWriteError). The target keeps its old content and no temporary file is left
// (common practice of atomic replacement: temp file, fsync, rename; see atomic.ts).
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import * as realFs from 'node:fs';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

type Step = '' | 'open' | 'write' | 'rename';
const inject = vi.hoisted(() => ({ step: '' as '' | 'open' | 'write' | 'rename', code: 'EIO', text: 'i/o error' }));

function fault(syscall: string, path: string): Error {
  return Object.assign(new Error(`${inject.code}: ${inject.text}, ${syscall} '${path}'`), { code: inject.code, syscall, path });
}

vi.mock('node:fs', async (importOriginal) => {
  const real = await importOriginal<typeof import('node:fs')>();
  return {
    ...real,
    openSync: (...args: Parameters<typeof real.openSync>) => {
      if (inject.step === 'open' && String(args[0]).endsWith('.tmp')) throw fault('open', String(args[0]));
      return real.openSync(...args);
    },
    writeSync: (...args: Parameters<typeof real.writeSync>) => {
      if (inject.step === 'write') {
        const [fd, buf] = args as unknown as [number, Uint8Array];
        real.writeSync(fd, buf, 0, buf.length >> 1); // a partial temporary file exists now
        throw fault('write', '');
      }
      return (real.writeSync as (...a: unknown[]) => number)(...args);
    },
    renameSync: (a: realFs.PathLike, b: realFs.PathLike) => {
      if (inject.step === 'rename') throw fault('rename', String(a));
      return real.renameSync(a, b);
    },
  };
});

vi.mock('node:fs/promises', async (importOriginal) => {
  const real = await importOriginal<typeof import('node:fs/promises')>();
  return {
    ...real,
    open: async (...args: Parameters<typeof real.open>) => {
      if (inject.step === 'open' && String(args[0]).endsWith('.tmp')) throw fault('open', String(args[0]));
      return real.open(...args);
    },
    rename: async (a: realFs.PathLike, b: realFs.PathLike) => {
      if (inject.step === 'rename') throw fault('rename', String(a));
      return real.rename(a, b);
    },
  };
});

const { writeFileAtomic, writeFileAtomicSync } = await import('../src/io/atomic.js');
const { writeNetwork } = await import('../src/io/output.js');
const { WriteError } = await import('../src/io/guard.js');

let dir = '';
beforeEach(() => {
  inject.step = '';
  dir = mkdtempSync(join(tmpdir(), 'sbx-faults-'));
});
afterEach(() => {
  inject.step = '';
  rmSync(dir, { recursive: true, force: true });
});

const cases: Array<{ code: string; text: string; step: Step; says: RegExp }> = [
  { code: 'EACCES', text: 'permission denied', step: 'open', says: /: permission denied$/ },
  { code: 'EPERM', text: 'operation not permitted', step: 'rename', says: /: permission denied$/ },
  { code: 'EROFS', text: 'read-only file system', step: 'open', says: /: the file system is read-only$/ },
  { code: 'ENOSPC', text: 'no space left on device', step: 'write', says: /: the disk is full$/ },
  { code: 'EDQUOT', text: 'disk quota exceeded', step: 'write', says: /: the disk quota of this user is used up$/ },
  { code: 'EISDIR', text: 'illegal operation on a directory', step: 'rename', says: /: it is a folder$/ },
  { code: 'ENAMETOOLONG', text: 'name too long', step: 'open', says: /: the file name is too long for the file system$/ },
  { code: 'EMFILE', text: 'too many open files', step: 'open', says: /: too many files are open$/ },
  { code: 'EXDEV', text: 'cross-device link not permitted', step: 'rename', says: /: cross-device link not permitted$/ },
];

describe('plain messages of failed writes (sync writer, writeNetwork, async writer)', () => {
  for (const c of cases) {
    it(`${c.code} during ${c.step}: message names the path and the cause; old file intact; no temporary file`, async () => {
      const p = join(dir, 'out.s2p');
      writeFileSync(p, 'old content');
      const net = { parameter: 'S' as const, ports: 2, frequencies: Float64Array.from([1e9]), references: Float64Array.from([50, 50]), values: new Float64Array(8) };
      const writers: Array<[string, () => Promise<void> | void]> = [
        ['writeFileAtomicSync', () => writeFileAtomicSync(p, 'new content')],
        ['writeNetwork', () => writeNetwork(net, p)],
      ];
      // the async writer writes in one piece through a file handle: no `write` step to inject there
      if (c.step !== 'write') writers.push(['writeFileAtomic', () => writeFileAtomic(p, 'new content')]);
      for (const [name, write] of writers) {
        inject.code = c.code;
        inject.text = c.text;
        inject.step = c.step;
        const e = await Promise.resolve().then(write).then(() => undefined, (x: unknown) => x);
        inject.step = '';
        expect(e, name).toBeInstanceOf(WriteError);
        const msg = (e as Error).message;
        expect(msg.startsWith(`cannot write ${p}: `), msg).toBe(true);
        expect(msg).toMatch(c.says);
        expect(msg).not.toMatch(/\.tmp\b/);
        expect(msg).not.toContain(c.code);
        expect((e as InstanceType<typeof WriteError>).code).toBe(c.code);
        expect(readFileSync(p, 'utf8')).toBe('old content');
        expect(readdirSync(dir)).toEqual(['out.s2p']);
      }
    });
  }

  it('an error that is not a system error (a failing producer) passes unchanged', () => {
    const p = join(dir, 'out.txt');
    function* failing(): Generator<string> {
      yield 'x';
      throw new TypeError('the producer failed');
    }
    expect(() => writeFileAtomicSync(p, failing())).toThrow(TypeError);
    expect(readdirSync(dir)).toEqual([]);
  });
});
