/**
 * Fuzz tests (issue 14, "Tests"): random and mutated netlists, Touchstone and JSON network files
 * go through the library in-process (loadNetlist with the demo's included and data files served
 * from memory, solve, the writers; parseTouchstone / parseJson, the writers and the conversions
 * of `convert`). Every outcome must be
 *  - a result whose every number is finite (the NetworkData arrays, and every number in the
 *    written Touchstone, CSV and JSON), the written Touchstone reading back; or
 *  - an InputError whose every diagnostic lies inside the input (file one of the inputs, line
 *    within 1..lines, column within 1..length+1; lines cut at `\n`, `\r\n` or a lone `\r`, as
 *    grammar/README.md §1 says), a TouchstoneError placed the same way, or one of the library's
 *    documented error classes (see test/fuzz/engine.mjs, `judgeError`).
 * Anything else is a failure: a TypeError, a stack overflow, an unlocated diagnostic, a message
 * naming an internal function, a non-finite number, a case that does not end (watchdog).
 *
 * Sources: the oracle is the contract stated in issue 14 and in the README's error rules (common
 * practice for fuzzing: a crash oracle plus an output-validity oracle). Inputs are drawn by
 * fast-check with fixed seeds as small records of integers (`CaseSpec`) that test/fuzz/engine.mjs
 * turns into texts, so fast-check shrinks them to few mutations; a failure prints the shrunk input
 * text (JSON-escaped) and the reason. The cases run in child processes on the compiled library
 * (dist/, built by `npm test` first) so that a watchdog can stop an endless loop: 30 s, generous,
 * not a timing assertion. `npm run fuzz` is the long run of the same engine (scripts/fuzz.mjs).
 */
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as lib from '../src/index.js';
import {
  dataCase,
  describeCase,
  failureClass,
  makeDictionary,
  mutate,
  netlistCase,
  randomSpec,
  makeRng,
  runCase,
  type CaseSpec,
  type FuzzCase,
} from './fuzz/engine.mjs';
import { FuzzPool, loadCorpus, type PoolOutcome } from './fuzz/pool.mjs';

const ROOT = resolve(fileURLToPath(new URL('..', import.meta.url)));
const DIST = join(ROOT, 'dist/src/index.js');
const corpus = loadCorpus(join(ROOT, 'circuits'));
const dict = makeDictionary(lib.ELEMENTS);
/** Sizes of large items in the suite: up to 300 nested parentheses, 300-term sums, 30,000-character strings. */
const SCALE = 0.6;
const WATCHDOG_MS = 30_000;

const specArb: fc.Arbitrary<CaseSpec> = fc.record({
  family: fc.nat(),
  seed: fc.nat(),
  ops: fc.array(fc.tuple(fc.nat({ max: 31 }), fc.nat(), fc.nat(), fc.nat()), { maxLength: 6 }),
  set: fc.nat({ max: 15 }),
  sweep: fc.nat({ max: 15 }),
});

const FAILING = new Set(['crash', 'hang', 'nonfinite']);

function verdict(c: FuzzCase, o: PoolOutcome): void {
  if (!FAILING.has(o.status)) return;
  throw new Error(`${failureClass(o.status, o.reason)}\n\n${describeCase(c, 3000)}\n\n${o.reason}\n${o.stack ?? ''}`);
}

describe('fuzz: the oracle itself', () => {
  // A stand-in library whose entry points misbehave on purpose, so each verdict is seen to fire.
  const located = (text: string) =>
    new lib.InputError([{ severity: 'error', code: 'x', message: 'bad', span: { file: 'circuits/t.sbx', line: 2, column: text.split('\n')[1]!.length + 1, length: 1 } }]);
  const net = (v: number): lib.NetworkData => ({ parameter: 'S', ports: 1, frequencies: Float64Array.of(1e9), references: Float64Array.of(50), values: Float64Array.of(v, 0) });
  const netlist = (text: string): FuzzCase => ({ kind: 'netlist', main: 'circuits/t.sbx', files: { 'circuits/t.sbx': text } });

  it('passes a located error and a finite result, and fails each kind of crash', () => {
    const text = 'a\nbb\nc';
    expect(runCase({ ...lib, loadNetlist: () => { throw located(text); } }, netlist(text)).status).toBe('located');
    expect(runCase({ ...lib, loadNetlist: () => ({ circuit: {}, warnings: [] }), solve: () => net(0.5) }, netlist(text)).status).toBe('ok');
    // column one past the end of line 2 is inside; two past is not
    const outside = new lib.InputError([{ severity: 'error', code: 'x', message: 'bad', span: { file: 'circuits/t.sbx', line: 2, column: 4, length: 1 } }]);
    expect(runCase({ ...lib, loadNetlist: () => { throw outside; } }, netlist(text)).status).toBe('crash');
    // a lone CR ends a line (grammar/README.md §1): 'a\rb' has 2 lines
    const cr = new lib.InputError([{ severity: 'error', code: 'x', message: 'bad', span: { file: 'circuits/t.sbx', line: 2, column: 1, length: 1 } }]);
    expect(runCase({ ...lib, loadNetlist: () => { throw cr; } }, netlist('a\rb')).status).toBe('located');
    expect(runCase({ ...lib, loadNetlist: () => { throw cr; } }, netlist('a b')).status).toBe('crash');
    const unlocated = new lib.InputError([{ severity: 'error', code: 'x', message: 'bad' }]);
    expect(runCase({ ...lib, loadNetlist: () => { throw unlocated; } }, netlist(text)).status).toBe('crash');
    const internal = new lib.InputError([{ severity: 'error', code: 'x', message: 'kjEffectivePermittivity: eeff0 must lie in (1, 20)', span: { file: 'circuits/t.sbx', line: 1, column: 1, length: 1 } }]);
    expect(runCase({ ...lib, loadNetlist: () => { throw internal; } }, netlist(text)).reason).toMatch(/internal function/);
    expect(runCase({ ...lib, loadNetlist: () => { throw new TypeError("Cannot read properties of undefined (reading 'x')"); } }, netlist(text)).status).toBe('crash');
    expect(runCase({ ...lib, loadNetlist: () => ({ circuit: {}, warnings: [] }), solve: () => net(NaN) }, netlist(text)).status).toBe('nonfinite');
    // a writer that lets NaN through into the text
    const leaky = { ...lib, loadNetlist: () => ({ circuit: {}, warnings: [] }), solve: () => net(0.5), formatCsv: () => 'freq_hz,s11_mag,s11_deg\n1e9,NaN,0\n' };
    expect(runCase(leaky, netlist(text)).status).toBe('nonfinite');
  });

  it('places Touchstone reader errors inside the data file', () => {
    const bad: FuzzCase = { kind: 'data', name: 'circuits/x.s1p', text: '# GHz S RI R 50\n1 0.5 0\n2 x 0\n' };
    const o = runCase(lib, bad);
    expect(o.status).toBe('located');
    const far = { ...lib, parseTouchstone: () => { throw new lib.TouchstoneError('circuits/x.s1p', 9, 1, 'bad'); } };
    expect(runCase(far, bad).status).toBe('crash');
  });

  it('builds the same case from the same spec, and mutations do what they say', () => {
    const rng = makeRng(42);
    const spec = randomSpec(rng);
    expect(netlistCase(spec, corpus, dict)).toEqual(netlistCase(spec, corpus, dict));
    expect(dataCase(spec, corpus, dict)).toEqual(dataCase(spec, corpus, dict));
    expect(mutate('a\nb\nc\n', [0, 1, 0, 0], dict)).toBe('a\nc\n'); // delete line 2
    expect(mutate('a\nb\n', [2, 0, 1, 0], dict)).toBe('b\na\n'); // swap lines
    expect(mutate('x y z', [3, 1, 0, 0], dict)).toBe('x  z'); // delete a token
    expect(mutate('a\nb\r\nc', [14, 0, 0, 0], dict)).toBe('a\rb\rc'); // every break a lone CR
    expect(mutate('abc', [9, 2, 0, 0], dict)).toBe('ab'); // truncate
  });
});

describe('fuzz: the watchdog', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'sbx-fuzz-'));
    // A library whose loadNetlist never returns on the text "loop".
    writeFileSync(
      join(dir, 'lib.mjs'),
      'export class InputError extends Error {}\nexport class TouchstoneError extends Error {}\n' +
        'export function loadNetlist(text) { if (text === "loop") for (;;); throw new TypeError("boom"); }\n',
    );
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('reports an endless case as a hang and goes on with a fresh worker', async () => {
    const pool = new FuzzPool({ libPath: join(dir, 'lib.mjs'), workers: 1, timeoutMs: 1000 });
    try {
      const c = (t: string): FuzzCase => ({ kind: 'netlist', main: 'm.sbx', files: { 'm.sbx': t } });
      expect((await pool.run(c('loop'))).status).toBe('hang');
      const next = await pool.run(c('x'));
      expect(next.status).toBe('crash');
      expect(next.reason).toMatch(/TypeError: boom/);
    } finally {
      await pool.close();
    }
  });
});

describe('fuzz: library on generated and mutated inputs', () => {
  let pool: FuzzPool;
  beforeAll(() => {
    if (!existsSync(DIST)) throw new Error(`${DIST} is missing: the fuzz cases run on the compiled library; build first (npm test does)`);
    pool = new FuzzPool({ libPath: DIST, workers: 2, timeoutMs: WATCHDOG_MS });
  });
  afterAll(() => pool?.close());

  it('netlists: a finite result or located errors (300 cases, seed 1401)', async () => {
    await fc.assert(
      fc.asyncProperty(specArb, async (spec) => {
        const c = netlistCase(spec, corpus, dict, SCALE);
        verdict(c, await pool.run(c));
      }),
      { seed: 1401, numRuns: 300 },
    );
  }, 600_000);

  it('Touchstone and JSON data files: a finite result or located errors (300 cases, seed 1402)', async () => {
    await fc.assert(
      fc.asyncProperty(specArb, async (spec) => {
        const c = dataCase(spec, corpus, dict, SCALE);
        verdict(c, await pool.run(c));
      }),
      { seed: 1402, numRuns: 300 },
    );
  }, 600_000);
});
