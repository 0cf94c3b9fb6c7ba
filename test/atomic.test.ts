/**
 * Atomic writes. The method (temp file in the same directory, fsync, rename over the target) is
 * common practice on POSIX file systems, where rename(2) replaces the target atomically
 * (POSIX.1-2008, rename(), from memory). Faults are injected by wrapping node:fs and
 * node:fs/promises so that one step fails after the temporary file exists.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import * as realFs from 'node:fs';
import { mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync, mkdirSync, chmodSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

type Step = '' | 'write' | 'sync' | 'rename';
const inject = vi.hoisted(() => ({ step: '' as '' | 'write' | 'sync' | 'rename' }));

vi.mock('node:fs/promises', async (importOriginal) => {
  const real = await importOriginal<typeof import('node:fs/promises')>();
  const fail = (): never => {
    throw Object.assign(new Error('injected fault'), { code: 'EIO' });
  };
  return {
    ...real,
    open: async (...args: Parameters<typeof real.open>) => {
      const h = await real.open(...args);
      if (inject.step === 'write' || inject.step === 'sync') {
        const step = inject.step;
        return new Proxy(h, {
          get(target, prop) {
            if (step === 'write' && prop === 'writeFile') {
              // write half of the data, then fail: a partial temp file exists at this point
              return async (data: Uint8Array) => {
                await target.write(data.subarray(0, data.length >> 1));
                fail();
              };
            }
            if (step === 'sync' && prop === 'sync') return async () => fail();
            const v = Reflect.get(target, prop, target) as unknown;
            return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(target) : v;
          },
        });
      }
      return h;
    },
    rename: async (...args: Parameters<typeof real.rename>) => {
      if (inject.step === 'rename') fail();
      return real.rename(...args);
    },
  };
});

vi.mock('node:fs', async (importOriginal) => {
  const real = await importOriginal<typeof import('node:fs')>();
  const fail = (): never => {
    throw Object.assign(new Error('injected fault'), { code: 'EIO' });
  };
  return {
    ...real,
    writeSync: (...args: Parameters<typeof real.writeSync>) => {
      if (inject.step === 'write') {
        const [fd, buf] = args as unknown as [number, Uint8Array];
        real.writeSync(fd, buf, 0, buf.length >> 1);
        fail();
      }
      return (real.writeSync as (...a: unknown[]) => number)(...args);
    },
    fsyncSync: (fd: number) => {
      if (inject.step === 'sync') fail();
      return real.fsyncSync(fd);
    },
    renameSync: (a: realFs.PathLike, b: realFs.PathLike) => {
      if (inject.step === 'rename') fail();
      return real.renameSync(a, b);
    },
  };
});

// imported after the mocks are declared (vi.mock is hoisted anyway)
const { writeFileAtomic, writeFileAtomicSync } = await import('../src/io/atomic.js');
const { formatTouchstone } = await import('../src/io/touchstone.js');

let dir = '';
beforeEach(() => {
  inject.step = '';
  dir = mkdtempSync(join(tmpdir(), 'sbx-atomic-'));
});
afterEach(() => {
  inject.step = '';
  rmSync(dir, { recursive: true, force: true });
});

const list = (): string[] => readdirSync(dir).sort();

type Writer = (path: string, data: string | Uint8Array) => Promise<void>;
const writers: Array<[string, Writer]> = [
  ['async', writeFileAtomic],
  ['sync', async (p, d) => writeFileAtomicSync(p, d)],
];

for (const [name, write] of writers) {
  describe(`writeFileAtomic (${name})`, () => {
    it('creates a new file with the exact bytes and leaves no temp file', async () => {
      const p = join(dir, 'out.s2p');
      await write(p, 'hello\nworld\n');
      expect(readFileSync(p, 'utf8')).toBe('hello\nworld\n');
      const bytes = Uint8Array.from([0, 1, 2, 255]);
      await write(join(dir, 'b.bin'), bytes);
      expect(Array.from(readFileSync(join(dir, 'b.bin')))).toEqual([0, 1, 2, 255]);
      expect(list()).toEqual(['b.bin', 'out.s2p']);
    });

    it('replaces an existing file and keeps its permission bits', async () => {
      const p = join(dir, 'out.csv');
      writeFileSync(p, 'old');
      chmodSync(p, 0o640);
      await write(p, 'new content');
      expect(readFileSync(p, 'utf8')).toBe('new content');
      expect(statSync(p).mode & 0o777).toBe(0o640);
      expect(list()).toEqual(['out.csv']);
    });

    it('target directory missing: rejects, creates nothing', async () => {
      const p = join(dir, 'no-such-dir', 'out.s2p');
      await expect(write(p, 'x')).rejects.toMatchObject({ code: 'ENOENT' });
      expect(list()).toEqual([]);
    });

    it('rename impossible (target is a non-empty directory): rejects, directory intact, no temp file', async () => {
      const p = join(dir, 'taken');
      mkdirSync(p);
      writeFileSync(join(p, 'inside'), 'keep');
      await expect(write(p, 'x')).rejects.toThrow();
      expect(readFileSync(join(p, 'inside'), 'utf8')).toBe('keep');
      expect(list()).toEqual(['taken']);
    });

    it('a symbolic link target: the file it points to is replaced in its folder, the link stays', async () => {
      mkdirSync(join(dir, 'real'));
      writeFileSync(join(dir, 'real', 'f.txt'), 'old');
      realFs.symlinkSync(join('real', 'f.txt'), join(dir, 'link.txt'));
      await write(join(dir, 'link.txt'), 'new');
      expect(realFs.lstatSync(join(dir, 'link.txt')).isSymbolicLink()).toBe(true);
      expect(readFileSync(join(dir, 'real', 'f.txt'), 'utf8')).toBe('new');
      expect(readdirSync(join(dir, 'real'))).toEqual(['f.txt']);
    });

    it('a character device (/dev/null) is written in place and stays a device', async () => {
      await write('/dev/null', 'discarded');
      expect(statSync('/dev/null').isCharacterDevice()).toBe(true);
    });

    it('an empty folder as target: refused with a plain message (not replaced by the file)', async () => {
      const p = join(dir, 'empty');
      mkdirSync(p);
      await expect(write(p, 'x')).rejects.toThrow(`cannot write ${p}: it is a folder`);
      expect(statSync(p).isDirectory()).toBe(true);
      expect(list()).toEqual(['empty']);
    });

    for (const step of ['write', 'sync', 'rename'] as Step[]) {
      it(`fault during ${step}: old file intact, no temp file left`, async () => {
        const p = join(dir, 'out.s2p');
        writeFileSync(p, 'old content');
        inject.step = step;
        await expect(write(p, 'new content that must not appear')).rejects.toThrow(/injected fault/);
        inject.step = '';
        expect(readFileSync(p, 'utf8')).toBe('old content');
        expect(list()).toEqual(['out.s2p']);
      });
    }

    it('data generator throwing (Touchstone 1.1 with unequal references): old file intact', async () => {
      const p = join(dir, 'out.s2p');
      writeFileSync(p, 'old content');
      const net = {
        parameter: 'S' as const, ports: 2, frequencies: Float64Array.from([1e9]),
        references: Float64Array.from([50, 75]), values: new Float64Array(8),
      };
      await expect(async () => write(p, formatTouchstone(net, { version: '1.1' }))).rejects.toThrow(/2\.0/);
      expect(readFileSync(p, 'utf8')).toBe('old content');
      expect(list()).toEqual(['out.s2p']);
    });
  });
}

it('concurrent async writers: the result is one complete payload, no temp files', async () => {
  const p = join(dir, 'race.json');
  const payloads = Array.from({ length: 20 }, (_, i) => `payload ${i} `.repeat(2000));
  await Promise.all(payloads.map((d) => writeFileAtomic(p, d)));
  expect(payloads).toContain(readFileSync(p, 'utf8'));
  expect(list()).toEqual(['race.json']);
});

describe('streamed writes', () => {
  it('pieces are written in turn: the file is their concatenation, no temp file left', () => {
    const p = join(dir, 'pieces.txt');
    const parts = ['header\n', new TextEncoder().encode('bytes ü\n'), ...Array.from({ length: 300 }, (_, i) => `row ${i}\n`)];
    writeFileAtomicSync(p, parts);
    expect(readFileSync(p, 'utf8')).toBe(parts.map((x) => (typeof x === 'string' ? x : new TextDecoder().decode(x))).join(''));
    expect(list()).toEqual(['pieces.txt']);
  });

  it('a piece that fails to come (the sequence throws half-way): old file intact, no temp file', () => {
    const p = join(dir, 'out.s2p');
    writeFileSync(p, 'old content');
    function* failing(): Generator<string> {
      yield 'first half\n';
      throw new Error('the producer failed');
    }
    expect(() => writeFileAtomicSync(p, failing())).toThrow(/the producer failed/);
    expect(readFileSync(p, 'utf8')).toBe('old content');
    expect(list()).toEqual(['out.s2p']);
  });

  it('writeNetwork streams a long 4-port Touchstone and CSV to the same bytes as rendering them whole', async () => {
    const { renderNetwork, writeNetwork } = await import('../src/io/output.js');
    const nf = 1500; // several pieces of 512 lines (a 4-port point takes 4 lines)
    const values = new Float64Array(2 * 16 * nf);
    for (let i = 0; i < values.length; i++) values[i] = Math.sin(i * 0.37) * 0.9;
    const net = { parameter: 'S' as const, ports: 4, frequencies: Float64Array.from({ length: nf }, (_, k) => 1e6 * (k + 1)), references: Float64Array.from([50, 50, 50, 50]), values };
    for (const name of ['long.s4p', 'long.csv']) {
      const p = join(dir, name);
      writeNetwork(net, p);
      expect(readFileSync(p, 'utf8')).toBe(renderNetwork(net, {}, p));
    }
    expect(readFileSync(join(dir, 'long.s4p'), 'utf8')).toBe(formatTouchstone(net));
  });
});
