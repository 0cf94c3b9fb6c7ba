// Issue 14, item 4: never overwrite an input or lose a result. End-to-end through the compiled CLI
// (dist/, built by `npm test` before vitest) as a user would run it, and through the library.
// Expectations are about file-system behaviour that is common practice on POSIX systems: rename(2)
// replaces a directory entry (a symbolic link is replaced, not followed), open(2) without O_CREAT
// never makes a regular file of a device or pipe, a FIFO opened with O_NONBLOCK for writing fails
// with ENXIO when nobody reads it (POSIX.1-2008 open(), from memory), /dev/full fails every write
// with ENOSPC (Linux null(4)/full(4) manual page, from memory).
import { spawn, spawnSync } from 'node:child_process';
import {
  chmodSync, existsSync, linkSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, readlinkSync, rmSync, statSync, symlinkSync, writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeFileAtomic, writeFileAtomicSync } from '../src/io/atomic.js';
import { checkBatchNames, checkDistinctOutputs, checkOutputs, checkOutputTarget, OutputError, resolveWriteTarget, WriteError } from '../src/io/guard.js';
import { writeNetwork } from '../src/io/output.js';
import { parseTouchstone } from '../src/io/touchstone.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');

/** The compiled CLI in a process of its own (for another user, the standard output as a pipe…). */
function spawnRun(args: string[], cwd: string, extra: { uid?: number; gid?: number } = {}) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd, encoding: 'utf8', ...extra });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

/** The CLI's `main` in this process, run from `cwd` (the many refusal cases; a process each would be slow on a busy machine). */
async function run(args: string[], cwd: string) {
  const { main } = await import('../bin/cli.js');
  let out = '';
  let err = '';
  const back = process.cwd();
  process.chdir(cwd);
  try {
    const code = await main(args, { out: (t) => (out += t), err: (t) => (err += t) });
    return { code, out, err };
  } finally {
    process.chdir(back);
  }
}

// A series 50 ohm resistor between two 50 ohm ports: S11 = 1/3, S21 = 2/3 (closed form of a series
// impedance, common practice).
const SERIES = `title "series resistor"
let rs = 50 ohm
resistor r1 a=p1 b=p2 value=rs
port 1 plus=p1
port 2 plus=p2
sweep list freqs=1 MHz, 10 MHz
`;

let dir: string;
beforeAll(() => {
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
  dir = mkdtempSync(join(tmpdir(), 'sbx-outsafe-'));
  chmodSync(dir, 0o755); // readable by the unprivileged user of the permission test
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A fresh folder with the series netlist in it, and a Touchstone file of it (`data.s2p`). */
function folder(name: string): string {
  const d = join(dir, name);
  mkdirSync(d, { recursive: true });
  writeFileSync(join(d, 'x.sbx'), SERIES);
  return d;
}

const snapshot = (d: string) => Object.fromEntries(readdirSync(d).sort().map((n) => [n, lstatSync(join(d, n)).isFile() ? readFileSync(join(d, n), 'utf8') : 'not a file']));

describe('an output equal to an input is refused before anything is written', () => {
  it('solve x.sbx -o x.sbx, also through ./ and a symbolic link; the netlist is unchanged', async () => {
    const d = folder('solve-self');
    symlinkSync('x.sbx', join(d, 'alias.sbx'));
    const before = snapshot(d);
    for (const out of ['x.sbx', './x.sbx', join(d, 'x.sbx'), 'alias.sbx']) {
      const r = await run(['solve', 'x.sbx', '-o', out, '--format', 'touchstone'], d);
      expect(r.code, out).toBe(1);
      expect(r.err).toMatch(new RegExp(`the output ${out.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')} is an input of this run`));
      expect(r.err).not.toMatch(/\.tmp|E[A-Z]{3,}/);
    }
    expect(snapshot(d)).toEqual(before);
    expect(lstatSync(join(d, 'alias.sbx')).isSymbolicLink()).toBe(true);
  });

  it('a hard link to the netlist is the same file (same device and inode)', async () => {
    const d = folder('solve-hard');
    linkSync(join(d, 'x.sbx'), join(d, 'twin.csv'));
    const r = await run(['solve', 'x.sbx', '-o', 'twin.csv'], d);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/the output twin\.csv is an input of this run \(x\.sbx\)/);
    expect(readFileSync(join(d, 'twin.csv'), 'utf8')).toBe(SERIES);
  });

  it('an included file and a data file of the netlist are inputs too', async () => {
    const d = folder('solve-include');
    writeFileSync(join(d, 'part.sbx'), 'let rs = 50 ohm\n');
    expect((await run(['solve', 'x.sbx', '-o', 'dev.s2p'], d)).code).toBe(0);
    const dev = readFileSync(join(d, 'dev.s2p'), 'utf8');
    writeFileSync(join(d, 'top.sbx'), `title "top"
include "part.sbx"
resistor r1 a=p1 b=p2 value=rs
datafile d1 file="dev.s2p" p1=p2 p2=p3
port 1 plus=p1
port 2 plus=p3
sweep list freqs=1 MHz, 10 MHz
`);
    const ok = await run(['solve', 'top.sbx', '-o', 'top.s2p'], d);
    expect(ok.err).toBe('');
    expect(ok.code).toBe(0);
    for (const out of ['part.sbx', 'dev.s2p']) {
      const r = await run(['solve', 'top.sbx', '-o', out, '--format', 'touchstone'], d);
      expect(r.code, out).toBe(1);
      expect(r.err).toMatch(new RegExp(`the output ${out.replace('.', '\\.')} is an input of this run`));
    }
    expect(readFileSync(join(d, 'part.sbx'), 'utf8')).toBe('let rs = 50 ohm\n');
    expect(readFileSync(join(d, 'dev.s2p'), 'utf8')).toBe(dev);
  });

  it('report, plot and convert of a data file onto itself', async () => {
    const d = folder('data-self');
    expect((await run(['solve', 'x.sbx', '-o', 'a.s2p'], d)).code).toBe(0);
    const a = readFileSync(join(d, 'a.s2p'), 'utf8');
    const cases = [
      ['report', 'a.s2p', '-o', 'a.s2p'],
      ['convert', 'a.s2p', '-o', 'a.s2p'],
      ['convert', 'a.s2p', '-o', './a.s2p', '--to', 'Z'],
      ['report', 'x.sbx', '-o', 'x.sbx'],
    ];
    for (const args of cases) {
      const r = await run(args, d);
      expect(r.code, args.join(' ')).toBe(1);
      expect(r.err).toMatch(/is an input of this run/);
    }
    // plot: the output must end in .svg, so the input is a link named .svg to the netlist
    symlinkSync('x.sbx', join(d, 'x.svg'));
    const p = await run(['plot', 'x.svg', '-o', 'x.svg'], d);
    expect(p.err).toMatch(/the output x\.svg is an input of this run/);
    expect(p.code).toBe(1);
    expect(readFileSync(join(d, 'a.s2p'), 'utf8')).toBe(a);
    expect(readFileSync(join(d, 'x.sbx'), 'utf8')).toBe(SERIES);
  });

  it('check --junit / --json onto the netlist or the golden file; two reports onto one file', async () => {
    const d = folder('check-self');
    expect((await run(['solve', 'x.sbx', '-o', 'golden.s2p'], d)).code).toBe(0);
    const golden = readFileSync(join(d, 'golden.s2p'), 'utf8');
    const cases = [
      ['check', 'x.sbx', '--junit', 'x.sbx'],
      ['check', 'x.sbx', '--json', 'x.sbx'],
      ['check', 'x.sbx', '--against', 'golden.s2p', '--junit', 'golden.s2p'],
      ['check', 'x.sbx', '--against', 'x.sbx', '--update'],
    ];
    for (const args of cases) {
      const r = await run(args, d);
      expect(r.code, args.join(' ')).toBe(3);
      expect(r.err).toMatch(/is an input of this run/);
    }
    const two = await run(['check', 'x.sbx', '--junit', 'r.xml', '--json', './r.xml'], d);
    expect(two.code).toBe(3);
    expect(two.err).toMatch(/two outputs of this run go to the same file: r\.xml and \.\/r\.xml/);
    expect(existsSync(join(d, 'r.xml'))).toBe(false);
    expect(readFileSync(join(d, 'x.sbx'), 'utf8')).toBe(SERIES);
    expect(readFileSync(join(d, 'golden.s2p'), 'utf8')).toBe(golden);
  });

  it('the one exception: check --against golden --update rewrites the golden file', async () => {
    const d = folder('check-update');
    writeFileSync(join(d, 'golden.s2p'), 'stale\n');
    const r = await run(['check', 'x.sbx', '--against', 'golden.s2p', '--update'], d);
    expect(r.err).toMatch(/updated golden\.s2p/);
    const net = parseTouchstone(readFileSync(join(d, 'golden.s2p'), 'utf8'), { fileName: 'golden.s2p' });
    expect(net.values[0]).toBeCloseTo(1 / 3, 14); // S11 of the series resistor, closed form above
  });
});

describe('batch solve into one folder', () => {
  it('a/x.sbx and b/x.sbx (and B/X.sbx) would write the same file: refused before any solve, naming both', async () => {
    const d = folder('batch');
    mkdirSync(join(d, 'a'));
    mkdirSync(join(d, 'b'));
    writeFileSync(join(d, 'a', 'x.sbx'), SERIES);
    writeFileSync(join(d, 'b', 'x.sbx'), SERIES.replace('50 ohm', '100 ohm'));
    writeFileSync(join(d, 'b', 'Y.sbx'), SERIES);
    writeFileSync(join(d, 'a', 'y.sbx'), SERIES);
    const r = await run(['solve', 'a/x.sbx', 'b/x.sbx', '--out-dir', 'od'], d);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/a\/x\.sbx and b\/x\.sbx would both be written to x\.\* in the output folder/);
    expect(existsSync(join(d, 'od'))).toBe(false);
    const c = await run(['solve', 'a/y.sbx', 'b/Y.sbx', '--out-dir', 'od'], d);
    expect(c.code).toBe(1);
    expect(c.err).toMatch(/a\/y\.sbx and b\/Y\.sbx would both be written/);
    const ok = await run(['solve', 'a/x.sbx', 'a/y.sbx', '--out-dir', 'od'], d);
    expect(ok.code).toBe(0);
    expect(readdirSync(join(d, 'od')).sort()).toEqual(['x.s2p', 'y.s2p']);
  });

  it('a batch output onto one of the batch netlists is refused (that netlist fails, the others are written)', async () => {
    const d = folder('batch-self');
    mkdirSync(join(d, 'n'));
    writeFileSync(join(d, 'n', 'p.sbx'), SERIES);
    writeFileSync(join(d, 'n', 'q.sbx'), SERIES);
    symlinkSync('q.sbx', join(d, 'n', 'p.s2p')); // p's output would go through this link onto q.sbx
    const r = await run(['solve', 'n/p.sbx', 'n/q.sbx', '--out-dir', 'n'], d);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/the output n\/p\.s2p is an input of this run \(n\/q\.sbx\)/);
    expect(readFileSync(join(d, 'n', 'q.sbx'), 'utf8')).toBe(SERIES);
    expect(existsSync(join(d, 'n', 'q.s2p'))).toBe(true);
  });

  it('a batch output onto a data file an earlier netlist of the batch read is refused', async () => {
    const d = folder('batch-data');
    mkdirSync(join(d, 'n'));
    expect((await run(['solve', 'x.sbx', '-o', join('n', 'dev.s2p')], d)).code).toBe(0);
    const dev = readFileSync(join(d, 'n', 'dev.s2p'), 'utf8');
    writeFileSync(join(d, 'n', 'b.sbx'), SERIES.replace('resistor r1 a=p1 b=p2 value=rs', 'datafile d1 file="dev.s2p" p1=p1 p2=p2'));
    writeFileSync(join(d, 'n', 'dev.sbx'), SERIES.replace('50 ohm', '10 ohm'));
    const r = await run(['solve', 'n/b.sbx', 'n/dev.sbx', '--out-dir', 'n'], d);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/the output n\/dev\.s2p is an input of this run/);
    expect(readFileSync(join(d, 'n', 'dev.s2p'), 'utf8')).toBe(dev);
    expect(existsSync(join(d, 'n', 'b.s2p'))).toBe(true);
  });

  it('--out-dir onto a file: a plain error naming it, before anything is solved', async () => {
    const d = folder('batch-file');
    writeFileSync(join(d, 'od'), 'a file');
    for (const outDir of ['od', 'od/sub']) {
      const r = await run(['solve', 'x.sbx', '--out-dir', outDir], d);
      expect(r.code).toBe(1);
      expect(r.err).toMatch(new RegExp(`cannot create the folder ${outDir.replace('/', '\\/')}: od is not a folder`));
      expect(r.err).not.toMatch(/EEXIST|ENOTDIR|mkdir/);
    }
    expect(readFileSync(join(d, 'od'), 'utf8')).toBe('a file');
  });

  it('checkBatchNames (library): names compared without letter case; distinct names pass', async () => {
    expect(() => checkBatchNames(['a/x.sbx', 'b/y.sbx', 'c/x2.sbx'])).not.toThrow();
    expect(() => checkBatchNames(['a/f.sbx', 'b/F.SBX'])).toThrow(OutputError);
  });
});

describe('symbolic link, device, pipe and folder targets', () => {
  it('a link to a file: written through, the link stays a link, the file it points to gets the data', async () => {
    const d = folder('link');
    mkdirSync(join(d, 'real'));
    writeFileSync(join(d, 'real', 'r.s2p'), 'old\n');
    symlinkSync(join('real', 'r.s2p'), join(d, 'l.s2p'));
    const r = await run(['solve', 'x.sbx', '-o', 'l.s2p'], d);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(lstatSync(join(d, 'l.s2p')).isSymbolicLink()).toBe(true);
    expect(readlinkSync(join(d, 'l.s2p'))).toBe(join('real', 'r.s2p'));
    const net = parseTouchstone(readFileSync(join(d, 'real', 'r.s2p'), 'utf8'), { fileName: 'r.s2p' });
    expect(net.values[2]).toBeCloseTo(2 / 3, 14); // S21 of the series resistor
    expect(readdirSync(join(d, 'real'))).toEqual(['r.s2p']); // the temporary file was in the target's folder and is gone
  });

  it('a link to nothing, a folder, a missing folder: plain errors naming the path, nothing created', async () => {
    const d = folder('bad-targets');
    symlinkSync('nowhere/n.s2p', join(d, 'dangling.s2p'));
    mkdirSync(join(d, 'sub.s2p'));
    const before = snapshot(d);
    const cases: Array<[string, RegExp]> = [
      ['dangling.s2p', /cannot write dangling\.s2p: it is a symbolic link to nowhere\/n\.s2p, which does not exist/],
      ['sub.s2p', /cannot write sub\.s2p: it is a folder/],
      ['missing/out.s2p', /cannot write missing\/out\.s2p: the folder missing does not exist/],
      ['x.sbx/out.s2p', /cannot write x\.sbx\/out\.s2p: x\.sbx is not a folder/],
    ];
    for (const [out, message] of cases) {
      const r = await run(['solve', 'x.sbx', '-o', out], d);
      expect(r.code, out).toBe(1);
      expect(r.err).toMatch(message);
      expect(r.err).not.toMatch(/\.tmp\b|ENOENT|EISDIR|ENOTDIR/);
    }
    expect(snapshot(d)).toEqual(before);
    expect(existsSync(join(d, 'nowhere'))).toBe(false);
  });

  it('-o /dev/null: written through (the device stays a device); /dev/full: "the disk is full"', async () => {
    const d = folder('devices');
    const r = await run(['solve', 'x.sbx', '-o', '/dev/null', '--format', 'csv'], d);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(statSync('/dev/null').isCharacterDevice()).toBe(true);
    if (existsSync('/dev/full')) {
      const f = await run(['solve', 'x.sbx', '-o', '/dev/full', '--format', 'csv'], d);
      expect(f.code).toBe(1);
      expect(f.err).toMatch(/cannot write \/dev\/full: the disk is full/);
      expect(f.err).not.toMatch(/ENOSPC/);
    }
  });

  it('-o /dev/stdout writes to the standard output, even when it is a pipe', async () => {
    const d = folder('stdout');
    const r = spawnRun(['solve', 'x.sbx', '-o', '/dev/stdout', '--format', 'csv'], d);
    expect(r.code).toBe(0);
    expect(r.out.split('\n')[0]).toBe('freq_hz,S11_re,S11_im,S12_re,S12_im,S21_re,S21_im,S22_re,S22_im');
    expect(r.out.trim().split('\n')).toHaveLength(3);
  });

  it('a named pipe: refused when nobody reads it (no wait), written through when a reader is there; it stays a pipe', async () => {
    const d = folder('fifo');
    const fifo = join(d, 'p.csv');
    if (spawnSync('mkfifo', [fifo]).status !== 0) return; // no mkfifo on this system
    const r = await run(['solve', 'x.sbx', '-o', 'p.csv'], d);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/cannot write p\.csv: no program is reading from this pipe/);
    // 5,000 points: about 700 KB of CSV, far more than a pipe holds (64 KiB on Linux, pipe(7), from
    // memory), so the writer has to wait for the reader to make room
    writeFileSync(join(d, 'long.sbx'), SERIES.replace('sweep list freqs=1 MHz, 10 MHz', 'sweep linear start=1 MHz stop=1 GHz points=5000'));
    // a reader: `cat` of the pipe, started first; it opens the pipe and waits for the writer
    const reader = spawn('cat', [fifo], { stdio: ['ignore', 'pipe', 'inherit'] });
    let got = '';
    reader.stdout.on('data', (b: Buffer) => (got += b.toString()));
    const done = new Promise<void>((res) => reader.on('close', () => res()));
    // the writer retries until the reader has the pipe open (its refusals change nothing)
    let code: number | null = 1;
    for (let i = 0; i < 200 && code !== 0; i++) {
      await new Promise((res) => setTimeout(res, 10));
      code = await new Promise<number | null>((res) => spawn(process.execPath, [cli, 'solve', 'long.sbx', '-o', 'p.csv'], { cwd: d, stdio: 'ignore' }).on('close', res));
    }
    expect(code).toBe(0);
    await done;
    const lines = got.trim().split('\n');
    expect(lines[0]).toBe('freq_hz,S11_re,S11_im,S12_re,S12_im,S21_re,S21_im,S22_re,S22_im');
    expect(lines).toHaveLength(5001);
    expect(lines[5000]!.split(',')[0]).toBe('1000000000');
    expect(lstatSync(fifo).isFIFO()).toBe(true);
  });

  it('resolveWriteTarget (library): the kind of each target', async () => {
    const d = folder('kinds');
    writeFileSync(join(d, 'f.txt'), 'x');
    symlinkSync('f.txt', join(d, 'l.txt'));
    expect(resolveWriteTarget(join(d, 'f.txt'))).toEqual({ kind: 'file', path: join(d, 'f.txt') });
    expect(resolveWriteTarget(join(d, 'new.txt'))).toEqual({ kind: 'file', path: join(d, 'new.txt') });
    expect(resolveWriteTarget(join(d, 'l.txt'))).toEqual({ kind: 'file', path: join(d, 'f.txt') });
    expect(resolveWriteTarget('/dev/null')).toEqual({ kind: 'stream', path: '/dev/null', pipe: false });
    expect(() => resolveWriteTarget(d)).toThrow(WriteError);
  });
});

// Run as root, the test below runs the CLI as the unprivileged user `nobody`; where the checkout
// lies in a folder that user may not enter (a private temporary folder), it cannot, and the
// mapping of EACCES is then covered only by test/hardening-output-faults.test.ts.
const nobodyCannotRun =
  process.getuid?.() === 0 &&
  spawnSync(process.execPath, ['-e', `require('fs').accessSync(${JSON.stringify(cli)}, require('fs').constants.R_OK)`], { uid: 65534, gid: 65534 }).status !== 0;

describe('unwritable targets: plain messages naming the user\'s path', () => {
  it.skipIf(nobodyCannotRun)('permission denied (a folder this user may not write in), from the CLI', async () => {
    const d = folder('perm');
    const locked = join(d, 'locked');
    mkdirSync(locked);
    writeFileSync(join(locked, 'old.s2p'), 'old\n');
    chmodSync(d, 0o755);
    chmodSync(join(d, 'x.sbx'), 0o644);
    // As root, permissions are not enforced for root itself: run the CLI as the unprivileged user
    // `nobody` (uid 65534, common practice on Linux) against a root-owned 0755 folder; otherwise
    // make the folder read-only for ourselves.
    const asRoot = process.getuid?.() === 0;
    if (!asRoot) chmodSync(locked, 0o555);
    try {
      const r = spawnRun(['solve', join(d, 'x.sbx'), '-o', join(locked, 'old.s2p')], d, asRoot ? { uid: 65534, gid: 65534 } : {});
      expect(r.code).toBe(1);
      expect(r.err).toMatch(new RegExp(`cannot write ${join(locked, 'old.s2p').replace(/[.\\/]/g, '\\$&')}: permission denied`));
      expect(r.err).not.toMatch(/EACCES|\.tmp\b/);
      expect(readFileSync(join(locked, 'old.s2p'), 'utf8')).toBe('old\n');
      expect(readdirSync(locked)).toEqual(['old.s2p']);
    } finally {
      chmodSync(locked, 0o755);
    }
  });

  it('the library writers throw WriteError with the cause and the path, never the temporary name', async () => {
    const d = folder('lib-errors');
    const missing = join(d, 'no', 'f.txt');
    for (const write of [(p: string) => writeFileAtomicSync(p, 'x'), (p: string) => writeFileAtomic(p, 'x')]) {
      const e = await Promise.resolve().then(() => write(missing)).then(() => undefined, (x: unknown) => x);
      expect(e).toBeInstanceOf(WriteError);
      expect((e as WriteError).message).toBe(`cannot write ${missing}: the folder ${join(d, 'no')} does not exist`);
      expect((e as WriteError).code).toBe('ENOENT');
      expect((e as WriteError).path).toBe(missing);
    }
    const net = { parameter: 'S' as const, ports: 1, frequencies: Float64Array.from([1e9]), references: Float64Array.from([50]), values: new Float64Array(2) };
    expect(() => writeNetwork(net, d + '/sub.s1p/')).toThrow(/cannot write/);
  });
});

describe('library checks of outputs against inputs', () => {
  it('checkOutputTarget: a missing output, another file and a pseudo-input (--set) pass; the same file by any name does not', async () => {
    const d = folder('lib-check');
    writeFileSync(join(d, 'in.s2p'), 'x');
    symlinkSync('in.s2p', join(d, 'via.s2p'));
    expect(() => checkOutputTarget(join(d, 'new.s2p'), [join(d, 'in.s2p')])).not.toThrow();
    expect(() => checkOutputTarget(join(d, 'x.sbx'), [join(d, 'in.s2p'), '--set'])).not.toThrow();
    expect(() => checkOutputTarget(join(d, 'via.s2p'), [join(d, 'in.s2p')])).toThrow(/is an input of this run/);
    expect(() => checkOutputTarget(join(d, '.', 'in.s2p'), [join(d, 'x.sbx'), join(d, 'in.s2p')])).toThrow(/is an input of this run/);
    expect(() => checkOutputTarget('/dev/null', ['/dev/null'])).not.toThrow();
  });

  it('checkDistinctOutputs / checkOutputs: missing outputs compared by their resolved path', async () => {
    const d = folder('lib-distinct');
    symlinkSync('.', join(d, 'self'));
    expect(() => checkDistinctOutputs([join(d, 'a.xml'), undefined, join(d, 'b.xml')])).not.toThrow();
    expect(() => checkDistinctOutputs([join(d, 'a.xml'), join(d, 'self', 'a.xml')])).toThrow(/two outputs of this run go to the same file/);
    expect(() => checkDistinctOutputs(['/dev/null', '/dev/null'])).not.toThrow();
    expect(() => checkOutputs([join(d, 'a.xml')], [join(d, 'x.sbx')])).not.toThrow();
    expect(() => checkOutputs([join(d, 'nope', 'a.xml')], [])).toThrow(/the folder .* does not exist/);
  });
});
