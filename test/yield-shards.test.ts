// Shards of a yield run (issue 16, item 4): N shards computed as separate processes and merged
// give exactly the bytes of one run; the slices cover every sample once; partial files that do
// not belong together, or are damaged, are refused plainly.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PartialError, mergePartials, parsePartial, parseShard, shardRange } from '../src/yield/partial.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const DEMO = 'circuits/bandpass-2g4.sbx';
let dir: string;

function run(args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

beforeAll(() => {
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
  dir = mkdtempSync(join(tmpdir(), 'sbx-shards-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('shards and merge', () => {
  it('N shards as separate processes, merged in any order, give the bytes of one run (JSON and printout)', () => {
    // 90 envelope samples: shards 1 and 2 hold them (75 and 15), shards 3 and 4 none
    const outputs = (name: string) => ['--json', join(dir, `${name}.json`), '--junit', join(dir, `${name}.xml`), '--csv', join(dir, `${name}.csv`), '--report', join(dir, `${name}.html`), '--plot', join(dir, `${name}.svg`), '--min-yield', '0.05'];
    const single = run(['yield', DEMO, '--samples', '301', '--seed', '12', '--envelopes', '90', '--jobs', '1', ...outputs('single')]);
    expect(single.code).toBe(0);
    const N = 4;
    for (let i = 1; i <= N; i++) {
      const r = run(['yield', DEMO, '--samples', '301', '--seed', '12', '--envelopes', '90', '--shard', `${i}/${N}`, '-o', join(dir, `p${i}.json`)]);
      expect(r.code).toBe(0);
    }
    const merged = run(['merge', join(dir, 'p3.json'), join(dir, 'p1.json'), join(dir, 'p4.json'), join(dir, 'p2.json'), ...outputs('merged')]);
    expect(merged.code).toBe(0);
    expect(merged.out).toBe(single.out);
    for (const ext of ['json', 'xml', 'csv', 'html', 'svg']) expect(readFileSync(join(dir, `merged.${ext}`)), ext).toEqual(readFileSync(join(dir, `single.${ext}`)));
    expect(readFileSync(join(dir, 'single.html'), 'utf8')).toContain('data-testid="envelope-plot"');
  });

  it('refuses a missing shard, a shard given twice and a partial of another design', () => {
    const base = ['yield', DEMO, '--samples', '40', '--seed', '3'];
    for (const i of [1, 2]) expect(run([...base, '--shard', `${i}/2`, '-o', join(dir, `q${i}.json`)]).code).toBe(0);
    expect(run([...base, '--set', 'lres=1.6nH', '--shard', '2/2', '-o', join(dir, 'other.json')]).code).toBe(0);
    const missing = run(['merge', join(dir, 'q1.json')]);
    expect(missing.code).toBe(1);
    expect(missing.err).toContain('shard 2 of 2 is missing');
    const twice = run(['merge', join(dir, 'q1.json'), join(dir, 'q1.json'), join(dir, 'q2.json')]);
    expect(twice.err).toContain('shard 1 of 2 is given twice');
    const other = run(['merge', join(dir, 'q1.json'), join(dir, 'other.json')]);
    expect(other.err).toContain('is a run of another design');
    const noOut = run([...base, '--shard', '1/2']);
    expect(noOut.code).toBe(1);
    expect(noOut.err).toContain('give it with -o FILE');
  });

  it('the slices of N shards cover samples 0 … n − 1 exactly once, in order (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 10_000_000 }), fc.integer({ min: 1, max: 64 }), (n, N) => {
        let next = 0;
        for (let i = 1; i <= N; i++) {
          const [first, count] = shardRange(n, i, N);
          expect(first).toBe(next);
          expect(count).toBeGreaterThanOrEqual(0);
          next = first + count;
        }
        expect(next).toBe(n);
      }),
      { numRuns: 300, seed: 4 },
    );
  });

  it('reads --shard I/N and refuses the rest plainly (fast-check)', () => {
    expect(parseShard('3/8')).toEqual({ shard: 3, shards: 8 });
    expect(parseShard(' 1 / 1 ')).toEqual({ shard: 1, shards: 1 });
    for (const bad of ['0/4', '5/4', '1/0', 'a/b', '2', '-1/4', '1.5/4', '']) expect(() => parseShard(bad)).toThrow(PartialError);
    fc.assert(
      fc.property(fc.string(), (t) => {
        try {
          const r = parseShard(t);
          expect(r.shard).toBeGreaterThanOrEqual(1);
          expect(r.shard).toBeLessThanOrEqual(r.shards);
        } catch (e) {
          expect(e).toBeInstanceOf(PartialError);
        }
      }),
      { numRuns: 500, seed: 5 },
    );
  });

  it('damaged partial files give a plain error, never a crash (fast-check on the file text)', () => {
    const file = join(dir, 'fz.json');
    expect(run(['yield', DEMO, '--samples', '6', '--seed', '1', '--shard', '1/2', '-o', file]).code).toBe(0);
    const text = readFileSync(file, 'utf8');
    const good = parsePartial(text, 'fz.json');
    expect(good.set.count).toBe(3);
    fc.assert(
      fc.property(fc.integer({ min: 0, max: text.length - 1 }), fc.integer({ min: 0, max: 40 }), fc.string({ maxLength: 12 }), (at, cut, insert) => {
        const damaged = text.slice(0, at) + insert + text.slice(Math.min(text.length, at + cut));
        try {
          const p = parsePartial(damaged, 'fz.json');
          // whatever still reads merges with its own shape, or is refused plainly
          try {
            mergePartials([{ ...p, file: 'fz.json' }]);
          } catch (e) {
            expect(e).toBeInstanceOf(PartialError);
          }
        } catch (e) {
          expect(e).toBeInstanceOf(PartialError);
        }
      }),
      { numRuns: 400, seed: 6 },
    );
    writeFileSync(join(dir, 'notjson.json'), '{ "schema": ');
    const r = run(['merge', join(dir, 'notjson.json')]);
    expect(r.code).toBe(1);
    expect(r.err).toContain('not a partial yield file');
  });
});
