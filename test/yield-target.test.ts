// The `yield` statement (issue 16, "a demo carries tolerances and a yield target"): read with its
// errors located, taken by `scatterbox yield` as its defaults, carried through shards to merge.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { loadNetlist } from '../src/load.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const DEMO = 'circuits/harmonic-lowpass-433.sbx';
let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-yield-target-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function run(args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

const BASE = ['resistor r1 a=in b=out value=50 ohm tol 5%', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 MHz', 'spec loss measure=il(2,1) max=3.6 dB over=1 MHz, 1 MHz'];

function errorsOf(lines: string[]) {
  try {
    loadNetlist(lines.join('\n'), 'y.sbx');
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error').map((d) => ({ line: d.span!.line, column: d.span!.column, message: d.message, help: d.help }))
        .sort((a, b) => a.line - b.line || a.column - b.column);
    throw e;
  }
  return [];
}

describe('the yield statement', () => {
  it('gives the target, samples and seed to the circuit; every key optional', () => {
    const c = loadNetlist([...BASE, 'let n = 500', 'yield min=0.9 samples=4*n seed=3'].join('\n'), 'y.sbx').circuit;
    expect(c.yieldPlan).toMatchObject({ min: 0.9, samples: 2000, seed: 3 });
    expect(loadNetlist([...BASE, 'yield samples=10'].join('\n'), 'y.sbx').circuit.yieldPlan).toMatchObject({ samples: 10 });
    expect(loadNetlist(BASE.join('\n'), 'y.sbx').circuit.yieldPlan).toBeUndefined();
  });

  it('reports every bad argument at its place, all in one run', () => {
    const errs = errorsOf([...BASE, 'yield min=95 samples=0.5 seed=-1 foo=2', 'yield min=0.5']);
    expect(errs).toEqual([
      { line: 6, column: 11, message: 'the yield target is a fraction from 0 to 1, not 95', help: 'did you mean `min=0.95` (95 %)?' },
      { line: 6, column: 22, message: expect.stringMatching(/^`samples` is a whole number from 1 to \d+ \(the limit of samples\), not 0\.5$/), help: undefined },
      { line: 6, column: 31, message: '`seed` is a whole number from 0 to 2^53 − 1, not -1', help: undefined },
      { line: 6, column: 34, message: '`yield` has no argument `foo`', help: 'its arguments are: min, samples, seed' },
      { line: 7, column: 1, message: 'the netlist has a `yield` statement already (line 6)', help: undefined },
    ]);
    expect(errorsOf([...BASE, 'yield sed=2'])[0]).toMatchObject({ message: '`yield` has no argument `sed`', help: 'did you mean `seed`?' });
    expect(errorsOf([...BASE, 'yield min=1 nH'])[0]!.message).toMatch(/^`min` must be a plain number/);
    expect(errorsOf([...BASE, 'block b terminals=a', 'yield min=0.5', 'resistor r a=a b=ground value=1 ohm', 'end b', 'b x1 a=in'])[0]!.message).toMatch(/`yield` cannot be used inside a block/);
  });

  it('any argument text gives a result or located errors, never an internal error (fast-check)', () => {
    const word = fc.constantFrom('min', 'samples', 'seed', '=', '0.5', '99', '1e3', '-1', '%', 'pF', ' ', ',', '(', ')', '2^60', 'x', 'tol 5%');
    fc.assert(
      fc.property(fc.array(word, { maxLength: 10 }), (ws) => {
        try {
          loadNetlist([...BASE, `yield ${ws.join(' ')}`].join('\n'), 'y.sbx');
        } catch (e) {
          expect(e).toBeInstanceOf(InputError);
          for (const d of (e as InputError).diagnostics) expect(d.span!.line).toBeGreaterThan(0);
        }
      }),
      { numRuns: 300, seed: 16 },
    );
  });
});

describe('scatterbox yield with the netlist\'s target', () => {
  it('the demo meets its own target with its own samples and seed; options override each', () => {
    const own = run(['yield', DEMO, '-q']);
    expect(own.code).toBe(0);
    expect(own.out).toMatch(/^yield of circuits\/harmonic-lowpass-433\.sbx: 2000 samples from 0 \(seed 7\), 7 tolerances/);
    expect(own.out).toMatch(/meets the target of 99\.0 %\n$/);
    const strict = run(['yield', DEMO, '--min-yield', '0.9999', '-q']);
    expect(strict.code).toBe(1);
    expect(strict.out).toMatch(/is below the target of 99\.99 %|is below the target of 100\.0 %/);
    const few = run(['yield', DEMO, '--samples', '50', '--seed', '2', '-q']);
    expect(few.out).toMatch(/50 samples from 0 \(seed 2\)/);
  });

  it('shards carry the target to the merge', () => {
    for (const i of [1, 2]) expect(run(['yield', DEMO, '--samples', '60', '--shard', `${i}/2`, '-o', join(dir, `t${i}.json`), '-q']).code).toBe(0);
    const merged = run(['merge', join(dir, 't1.json'), join(dir, 't2.json'), '-q']);
    const single = run(['yield', DEMO, '--samples', '60', '-q']);
    expect(merged.out).toBe(single.out);
    expect(merged.out).toMatch(/the target of 99\.0 %/);
  });
});
