// Issue 14, item 4: a run killed in the middle of a write leaves the target as it was and only its
// own temporary file behind; the next write into that folder removes such leftovers — only files
// named exactly as the writer names its temporaries, owned by this user, whose writing process no
// longer exists and that were left unchanged for TEMP_ORPHAN_AGE_MS (or unchanged for
// TEMP_STALE_AGE_MS, whatever their process). Another program's files stay, however alike.
// SIGKILL cannot be caught, so the killed writer gets no chance to clean up (POSIX signal.h,
// from memory). Ages are set with utimes instead of waiting: no test here measures time.
import { spawn, spawnSync } from 'node:child_process';
import { chmodSync, chownSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sweepTempFiles, TEMP_ORPHAN_AGE_MS, TEMP_STALE_AGE_MS, writeFileAtomicSync } from '../src/io/atomic.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');

let dir: string;
beforeAll(() => {
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
  dir = mkdtempSync(join(tmpdir(), 'sbx-kill-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The id of a process that has exited (a fresh node run, waited for). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', '0']);
  return r.pid!;
}

/** Sets a file's modification time `ms` into the past. */
function age(path: string, ms: number): void {
  const t = (Date.now() - ms) / 1000;
  utimesSync(path, t, t);
}

const HEX = 'a1b2c3d4e5f6';

describe('sweepTempFiles', () => {
  it('removes only our pattern, our user, a dead writer left for the orphan age, or anything left for the stale age', () => {
    const d = mkdtempSync(join(dir, 'sweep-'));
    const dead = deadPid();
    const live = process.ppid; // the parent of this test process: alive while we run
    const files: Record<string, { pid?: number; ageMs: number; gone: boolean }> = {
      [`.out.csv.${dead}.${HEX}.tmp`]: { ageMs: 2 * TEMP_ORPHAN_AGE_MS, gone: true },
      [`.fresh.csv.${dead}.${HEX}.tmp`]: { ageMs: 0, gone: false }, // dead writer, but just written
      [`.live.csv.${live}.${HEX}.tmp`]: { ageMs: 2 * TEMP_ORPHAN_AGE_MS, gone: false }, // its writer runs
      [`.stale.csv.${live}.${HEX}.tmp`]: { ageMs: 2 * TEMP_STALE_AGE_MS, gone: true }, // unchanged for hours
      // alike, but not our pattern: all left, however old
      [`.out.csv.${dead}.tmp`]: { ageMs: 2 * TEMP_STALE_AGE_MS, gone: false },
      [`out.csv.${dead}.${HEX}.tmp`]: { ageMs: 2 * TEMP_STALE_AGE_MS, gone: false },
      [`.out.csv.${dead}.${HEX.toUpperCase()}.tmp`]: { ageMs: 2 * TEMP_STALE_AGE_MS, gone: false },
      [`.out.csv.${dead}.${HEX}0.tmp`]: { ageMs: 2 * TEMP_STALE_AGE_MS, gone: false },
      [`.out.csv.${dead}.${HEX}.tmp.keep`]: { ageMs: 2 * TEMP_STALE_AGE_MS, gone: false },
      [`.out.csv.${dead}.${HEX}.TMP`]: { ageMs: 2 * TEMP_STALE_AGE_MS, gone: false },
      'notes.tmp': { ageMs: 2 * TEMP_STALE_AGE_MS, gone: false },
    };
    for (const [name, f] of Object.entries(files)) {
      writeFileSync(join(d, name), 'x');
      age(join(d, name), f.ageMs);
    }
    // a link with our pattern (not a regular file) and, as root, a file of another user: left
    symlinkSync('notes.tmp', join(d, `.link.csv.${dead}.${HEX}.tmp`));
    const other = `.other.csv.${dead}.${HEX}.tmp`;
    const asRoot = process.getuid?.() === 0;
    if (asRoot) {
      writeFileSync(join(d, other), 'x');
      chownSync(join(d, other), 65534, 65534);
      age(join(d, other), 2 * TEMP_STALE_AGE_MS);
    }
    const removed = sweepTempFiles(d);
    const expectedGone = Object.entries(files).filter(([, f]) => f.gone).map(([n]) => n).sort();
    expect(removed.sort()).toEqual(expectedGone);
    const left = readdirSync(d).sort();
    const expectedLeft = [...Object.keys(files).filter((n) => !files[n]!.gone), `.link.csv.${dead}.${HEX}.tmp`, ...(asRoot ? [other] : [])].sort();
    expect(left).toEqual(expectedLeft);
  });

  it('every atomic write sweeps the folder of its target (library users get it too)', () => {
    const d = mkdtempSync(join(dir, 'sweep-write-'));
    const left = join(d, `.big.csv.${deadPid()}.${HEX}.tmp`);
    writeFileSync(left, 'partial');
    age(left, 2 * TEMP_ORPHAN_AGE_MS);
    writeFileAtomicSync(join(d, 'small.txt'), 'x');
    expect(readdirSync(d)).toEqual(['small.txt']);
  });
});

// 300,000 points of a two-port to CSV: about 45 MB streamed into the temporary file, long enough to
// catch the writer mid-write on any machine (the test waits for the file, it does not time it).
const BIG = `title "long sweep"
let rs = 50 ohm
resistor r1 a=p1 b=p2 value=rs
capacitor c1 a=p2 b=ground value=1 pF
port 1 plus=p1
port 2 plus=p2
sweep linear start=1 MHz stop=3 GHz points=300000
`;

const SMALL = BIG.replace('points=300000', 'points=3');

describe('kill during a large write (compiled CLI)', () => {
  it('SIGKILL mid-write: target untouched, the temporary file stays; the next write to the folder sweeps it, and nothing else', async () => {
    const d = mkdtempSync(join(dir, 'kill-'));
    chmodSync(d, 0o755);
    writeFileSync(join(d, 'big.sbx'), BIG);
    writeFileSync(join(d, 'small.sbx'), SMALL);
    writeFileSync(join(d, 'out.csv'), 'old content\n');
    const child = spawn(process.execPath, [cli, 'solve', 'big.sbx', '-o', 'out.csv', '-j', '1', '-q'], { cwd: d, stdio: 'ignore' });
    const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((res) => child.on('exit', (code, signal) => res({ code, signal })));
    let finished = false;
    void exited.then(() => (finished = true));
    const pattern = new RegExp(`^\\.out\\.csv\\.${child.pid}\\.[0-9a-f]{12}\\.tmp$`);
    let temp: string | undefined;
    while (!finished && temp === undefined) {
      const hit = readdirSync(d).find((n) => pattern.test(n));
      if (hit !== undefined && statSync(join(d, hit), { throwIfNoEntry: false })?.size) temp = hit;
      else await new Promise((res) => setTimeout(res, 2));
    }
    expect(temp, 'the writer finished before its temporary file was seen').toBeDefined();
    child.kill('SIGKILL');
    expect((await exited).signal).toBe('SIGKILL');
    expect(readFileSync(join(d, 'out.csv'), 'utf8')).toBe('old content\n');
    expect(existsSync(join(d, temp!))).toBe(true);
    expect(statSync(join(d, temp!)).size).toBeGreaterThan(0);

    // files of other programs with similar names, old enough to be swept if they were ours
    const alike = [`.out.csv.${child.pid}.tmp`, `out.csv.${child.pid}.${HEX}.tmp`, `.out.csv.${child.pid}.${HEX.toUpperCase()}.tmp`, 'out.csv.tmp'];
    for (const n of alike) {
      writeFileSync(join(d, n), 'theirs');
      age(join(d, n), 2 * TEMP_STALE_AGE_MS);
    }
    const run = () => spawnSync(process.execPath, [cli, 'solve', 'small.sbx', '-o', 'small.s2p', '-q'], { cwd: d, encoding: 'utf8' });
    // just killed: not yet left for the orphan age, so it stays
    expect(run().status).toBe(0);
    expect(existsSync(join(d, temp!))).toBe(true);
    // left unchanged for longer than the orphan age, its writer gone: swept by the next write
    age(join(d, temp!), TEMP_ORPHAN_AGE_MS + 5000);
    const r = run();
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(readdirSync(d).sort()).toEqual([...alike, 'big.sbx', 'out.csv', 'small.s2p', 'small.sbx'].sort());
    for (const n of alike) expect(readFileSync(join(d, n), 'utf8')).toBe('theirs');
    expect(readFileSync(join(d, 'out.csv'), 'utf8')).toBe('old content\n');
  });
});
