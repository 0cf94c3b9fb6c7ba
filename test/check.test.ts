// Tests of `scatterbox check` (specs, JUnit and JSON reports, golden files), `scatterbox diff` and
// batch `solve`, run through the compiled CLI as a user or a CI job would run them, plus the spec
// evaluation itself (evaluateSpecs, limitAt) on hand-made network data.
//
// Expected values never come from the code under test: margins are recomputed here from the solved
// S-parameters with the textbook definitions of each figure (written out below), or from closed
// forms (the Π pad), or worked out by hand (the sloped-limit cases).
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { evaluateSpecs, limitAt } from '../src/check/evaluate.js';
import type { SpecDefinition } from '../src/check/types.js';
import { parseJson } from '../src/io/json.js';
import { parseTouchstone } from '../src/io/touchstone.js';
import { loadNetlist } from '../src/load.js';
import type { NetworkData } from '../src/network/types.js';
import { solveSweep } from '../src/solve/sweep.js';

// Every test here starts the CLI as a process (Node, then the netlist library) several times; on a
// busy machine one start can take seconds, so the limits are generous.
vi.setConfig({ testTimeout: 240_000, hookTimeout: 240_000 });

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const circuits = join(root, 'circuits');

function run(args: string[], cwd = root) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

let dir: string;
let n = 0;
/** A fresh empty folder inside this run's temporary folder. */
function fresh(name: string): string {
  const d = join(dir, `${++n}-${name}`);
  mkdirSync(d);
  return d;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-check-'));
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npx tsc -p . (npm test runs it before vitest)');
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// --- independent figures, from the raw S values -----------------------------------------------------

/** S_ij (1-based) at frequency index k, as [re, im]; layout per src/network/types.ts. */
function s(net: NetworkData, k: number, i: number, j: number): [number, number] {
  const o = 2 * ((k * net.ports + (i - 1)) * net.ports + (j - 1));
  return [net.values[o]!, net.values[o + 1]!];
}

/**
 * One figure over the sweep, from its definition (only the figures the demos use):
 * - il(i,j) = −20·log10|Sij|, rl(i) = −20·log10|Sii|: insertion and return loss (common practice);
 * - vswr(i) = (1 + |Sii|)/(1 − |Sii|) (common practice);
 * - zin_re(i) = Re{Zref·(1 + Sii)/(1 − Sii)}, the impedance behind a reflection coefficient
 *   Γ = (Z − Zref)/(Z + Zref) solved for Z (common practice);
 * - gd(Sij) = −dφ/dω as a central difference, −Δφ/(2π·Δf) over the two neighbours (one-sided at the
 *   ends of the sweep), with Δφ = arg(S(k+1)·conj S(k−1)) so that no unwrapping is needed while the
 *   phase moves less than 180° over two steps (common practice for numerical differentiation).
 */
function figure(net: NetworkData, name: string): Float64Array {
  const nf = net.frequencies.length;
  const out = new Float64Array(nf);
  let m: RegExpExecArray | null;
  if ((m = /^il\((\d),(\d)\)$/.exec(name))) {
    for (let k = 0; k < nf; k++) out[k] = -20 * Math.log10(Math.hypot(...s(net, k, +m[1]!, +m[2]!)));
  } else if ((m = /^rl\((\d)\)$/.exec(name))) {
    for (let k = 0; k < nf; k++) out[k] = -20 * Math.log10(Math.hypot(...s(net, k, +m[1]!, +m[1]!)));
  } else if ((m = /^vswr\((\d)\)$/.exec(name))) {
    for (let k = 0; k < nf; k++) {
      const g = Math.hypot(...s(net, k, +m[1]!, +m[1]!));
      out[k] = (1 + g) / (1 - g);
    }
  } else if ((m = /^zin_re\((\d)\)$/.exec(name))) {
    const p = +m[1]!;
    const z0 = net.references[p - 1]!;
    for (let k = 0; k < nf; k++) {
      const [a, b] = s(net, k, p, p);
      // (1 + Γ)/(1 − Γ) = (1 + Γ)(1 − conj Γ)/|1 − Γ|², real part (1 − |Γ|²)/|1 − Γ|²
      out[k] = (z0 * (1 - a * a - b * b)) / ((1 - a) * (1 - a) + b * b);
    }
  } else if ((m = /^gd\(S(\d)(\d)\)$/.exec(name))) {
    const [i, j] = [+m[1]!, +m[2]!];
    const f = net.frequencies;
    for (let k = 0; k < nf; k++) {
      const lo = Math.max(0, k - 1);
      const hi = Math.min(nf - 1, k + 1);
      const [ar, ai] = s(net, hi, i, j);
      const [br, bi] = s(net, lo, i, j);
      const dphi = Math.atan2(ai * br - ar * bi, ar * br + ai * bi);
      out[k] = -dphi / (2 * Math.PI * (f[hi]! - f[lo]!));
    }
  } else throw new Error(`no independent definition of ${name} in this test`);
  return out;
}

/** A spec as written in a demo: [name, figure, bound, limit at f1, limit at f2, f1, f2]. */
type Row = [string, string, 'max' | 'min', number, number, number, number];

interface Worst {
  points: number;
  margin: number;
  frequency: number;
  value: number;
  limit: number;
  /** Margin at every in-band frequency, for looking up the reported frequency. */
  byFrequency: Map<number, number>;
}

/**
 * The worst margin of a spec, worked out here: the limit is the straight line from (f1, L1) to
 * (f2, L2) (flat when L1 = L2 or the band is open-ended), margin = limit − value for max and
 * value − limit for min, at every sweep point in [f1, f2] (edges included, to a relative 1e-9).
 */
function worstOf(net: NetworkData, row: Row): Worst {
  const [, fig, bound, l1, l2, f1, f2] = row;
  const v = figure(net, fig);
  const w: Worst = { points: 0, margin: Infinity, frequency: NaN, value: NaN, limit: NaN, byFrequency: new Map() };
  net.frequencies.forEach((f, k) => {
    if (f < f1 * (1 - 1e-9) || f > f2 * (1 + 1e-9)) return;
    w.points++;
    const lim = l1 === l2 || !Number.isFinite(f2) ? l1 : l1 + ((l2 - l1) * (f - f1)) / (f2 - f1);
    const margin = bound === 'max' ? lim - v[k]! : v[k]! - lim;
    w.byFrequency.set(f, margin);
    if (margin < w.margin) Object.assign(w, { margin, frequency: f, value: v[k]!, limit: lim });
  });
  return w;
}

/** True when no other in-band point comes within `tol` of the worst margin (so its frequency is unambiguous). */
function uniqueWorst(w: Worst, tol: number): boolean {
  let close = 0;
  for (const m of w.byFrequency.values()) if (m - w.margin <= tol) close++;
  return close === 1;
}

// The specs each demo states (circuits/*.sbx), in file order. Bands in Hz, limits in the figure's unit.
const G = 1e9;
const M = 1e6;
const ISM24: [number, number] = [2.4 * G, 2.4835 * G];
const DEMO_SPECS: Record<string, Row[]> = {
  'balun-lattice-2g45.sbx': [
    ['band_loss', 'il(2,1)', 'max', 0.3, 0.3, ...ISM24],
    ['antenna_match', 'rl(1)', 'min', 30, 30, ...ISM24],
    ['radio_vswr', 'vswr(2)', 'max', 1.1, 1.1, ...ISM24],
    ['wide_match_se', 'rl(1)', 'min', 20, 20, 2 * G, 3 * G],
    ['wide_match_bal', 'rl(2)', 'min', 20, 20, 2 * G, 3 * G],
  ],
  'bandpass-2g4.sbx': [
    ['passband_loss', 'il(2,1)', 'max', 3.5, 3.5, ...ISM24],
    ['antenna_match', 'rl(1)', 'min', 25, 25, ...ISM24],
    ['amplifier_vswr', 'vswr(2)', 'max', 1.2, 1.2, ...ISM24],
    ['passband_delay', 'gd(S21)', 'max', 2.5e-9, 2.5e-9, ...ISM24],
    ['cellular_rejection', 'il(2,1)', 'min', 40, 40, 0, 1.9 * G],
    ['upper_skirt', 'il(2,1)', 'min', 8, 20, 2.7 * G, 3 * G],
    ['band5_rejection', 'il(2,1)', 'min', 40, 40, 5.15 * G, 5.85 * G],
  ],
  'diff-termination-100.sbx': [
    ['low_frequency_match', 'rl(1)', 'min', 40, 40, 0, 100 * M],
    ['match_to_2ghz', 'rl(1)', 'min', 15, 15, 0, 2 * G],
    ['rolloff_mask', 'rl(1)', 'min', 14, 10, 2 * G, 3 * G],
    ['resistive_load', 'zin_re(1)', 'min', 95, 95, 0, 1 * G],
  ],
  'harmonic-lowpass-433.sbx': [
    ['carrier_loss', 'il(2,1)', 'max', 0.6, 0.6, 433.05 * M, 434.79 * M],
    ['carrier_match', 'rl(1)', 'min', 15, 15, 433.05 * M, 434.79 * M],
    ['ripple_band_match', 'rl(1)', 'min', 14, 14, 0, 600 * M],
    ['harmonic_skirt', 'il(2,1)', 'min', 15, 35, 860 * M, 1.3 * G],
    ['upper_harmonics', 'il(2,1)', 'min', 35, 35, 1.3 * G, Infinity],
  ],
  'match-50-75-915.sbx': [
    ['channel_match', 'rl(1)', 'min', 35, 35, 902 * M, 928 * M],
    ['feed_vswr', 'vswr(2)', 'max', 1.1, 1.1, 902 * M, 928 * M],
    ['channel_loss', 'il(2,1)', 'max', 0.15, 0.15, 902 * M, 928 * M],
    ['usable_band', 'rl(1)', 'min', 15, 15, 700 * M, 1.2 * G],
  ],
  'pad-10db-pi.sbx': [
    ['loss_upper', 'il(2,1)', 'max', 10.3, 10.3, 1 * M, 10 * G],
    ['loss_lower', 'il(2,1)', 'min', 9.7, 9.7, 1 * M, 10 * G],
    ['input_vswr', 'vswr(1)', 'max', 1.1, 1.1, 1 * M, 10 * G],
    ['output_vswr', 'vswr(2)', 'max', 1.1, 1.1, 1 * M, 10 * G],
  ],
};
const DEMOS = Object.keys(DEMO_SPECS);

/** Solves a netlist text with the library (the solver is checked against closed forms elsewhere). */
function solveText(text: string, file: string, set: string[] = []): NetworkData {
  return solveSweep(loadNetlist(text, file, { set }).circuit);
}

interface JsonSpec {
  name: string;
  figure: string;
  bound: string;
  limit: [number, number];
  unit: string;
  band_hz: [number | string, number | string];
  pass: boolean;
  points: number;
  worst_margin: number | string;
  worst_frequency_hz: number | null;
  worst_value: number | null;
  worst_limit: number | null;
  line: number;
}

/** Tolerance on a margin, value or limit: 1e-9 of the limit's size (rounding only; the definitions are the same). */
const tolFor = (row: Row) => 1e-9 * Math.max(Math.abs(row[3]), Math.abs(row[4]));

/**
 * Checks every spec of a JSON report against the independent worst margins of `net`: names in
 * order, pass/fail, point count, worst margin, value and limit, and the frequency (exactly where the
 * worst point is unambiguous; otherwise the reported point must be one that is as bad).
 */
function expectReportMatches(specs: JsonSpec[], rows: Row[], net: NetworkData) {
  expect(specs.map((x) => x.name)).toEqual(rows.map((r) => r[0]));
  rows.forEach((row, idx) => {
    const got = specs[idx]!;
    const want = worstOf(net, row);
    const tol = tolFor(row);
    expect(got.points, row[0]).toBe(want.points);
    expect(want.points, `${row[0]} has sweep points in its band`).toBeGreaterThan(0);
    expect(got.pass, row[0]).toBe(want.margin >= 0);
    expect(Math.abs((got.worst_margin as number) - want.margin), row[0]).toBeLessThanOrEqual(tol);
    expect(Math.abs(got.worst_limit! - want.limit), row[0]).toBeLessThanOrEqual(tol);
    expect(Math.abs(got.worst_value! - want.value), row[0]).toBeLessThanOrEqual(tol);
    const atReported = want.byFrequency.get(got.worst_frequency_hz!);
    expect(atReported, `${row[0]}: reported frequency is an in-band sweep point`).toBeDefined();
    expect(Math.abs(atReported! - want.margin), row[0]).toBeLessThanOrEqual(tol);
    if (uniqueWorst(want, tol)) expect(got.worst_frequency_hz, row[0]).toBe(want.frequency);
  });
}

// --- a tiny well-formedness check of XML, without a DOM -----------------------------------------------

/**
 * Checks that `xml` is well-formed in the ways a JUnit consumer relies on: one declaration, tags
 * properly nested and closed, attribute values quoted without a raw `<`, and no raw `<` or a stray
 * `&` in text (only the five predefined entities). Returns the element names in document order.
 */
function checkXml(xml: string): string[] {
  expect(xml.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n')).toBe(true);
  const body = xml.slice(xml.indexOf('?>') + 2);
  const stack: string[] = [];
  const names: string[] = [];
  const entity = /&(?!(amp|lt|gt|quot|apos);)/;
  for (const tok of body.match(/<[^>]*>|[^<]+/g) ?? []) {
    if (!tok.startsWith('<')) {
      expect(entity.test(tok), `stray & in text ${JSON.stringify(tok)}`).toBe(false);
      if (stack.length === 0) expect(tok.trim()).toBe('');
      continue;
    }
    const m = /^<(\/?)([A-Za-z_][\w.-]*)((?:\s+[A-Za-z_][\w.-]*="[^"<]*")*)\s*(\/?)>$/.exec(tok);
    expect(m, `malformed tag ${tok}`).not.toBeNull();
    const [, close, name, attrs, self] = m!;
    for (const a of attrs!.match(/"[^"]*"/g) ?? []) expect(entity.test(a), `stray & in ${a}`).toBe(false);
    if (close) expect(stack.pop(), `</${name}> closes the open element`).toBe(name);
    else {
      names.push(name!);
      if (!self) stack.push(name!);
    }
  }
  expect(stack).toEqual([]);
  return names;
}

/** The attributes of one tag text, `<name a="1" b="2">` → { a: '1', b: '2' }. */
function attrs(tag: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const m of tag.matchAll(/([A-Za-z_][\w.-]*)="([^"]*)"/g)) out[m[1]!] = m[2]!;
  return out;
}

/** `<testcase …>` elements of a JUnit file: name and, if failed, the failure message. */
function testcases(xml: string): { name: string; classname: string; failure?: string }[] {
  const out: { name: string; classname: string; failure?: string }[] = [];
  const re = /<testcase\b([^>]*?)(\/>|>([\s\S]*?)<\/testcase>)/g;
  for (const m of xml.matchAll(re)) {
    const a = attrs(m[1]!);
    const f = m[3] !== undefined ? /<failure\b([^>]*)>/.exec(m[3]) : null;
    out.push({ name: a.name!, classname: a.classname!, ...(f ? { failure: attrs(f[1]!).message! } : {}) });
  }
  return out;
}

/** A frequency as the reports write it (six significant digits, MHz or GHz; the documented display). */
const hertz = (f: number) => (f >= 1e9 ? `${Number((f / 1e9).toPrecision(6))} GHz` : `${Number((f / 1e6).toPrecision(6))} MHz`);

const unescapeXml = (t: string) => t.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&apos;/g, "'").replace(/&amp;/g, '&');

// --- every demo meets its own specs ------------------------------------------------------------------

interface DemoRun {
  code: number | null;
  out: string;
  err: string;
  json: string;
  xml: string;
}
const demoRuns = new Map<string, DemoRun>();
/** `scatterbox check circuits/<demo> --json … --junit …`, run once per demo and shared by the tests below. */
function checkDemo(demo: string): DemoRun {
  let r = demoRuns.get(demo);
  if (!r) {
    const out = fresh(basename(demo, '.sbx'));
    const res = run(['check', join(circuits, demo), '--json', join(out, 'r.json'), '--junit', join(out, 'r.xml')]);
    const read = (f: string) => (existsSync(join(out, f)) ? readFileSync(join(out, f), 'utf8') : '');
    r = { ...res, json: read('r.json'), xml: read('r.xml') };
    demoRuns.set(demo, r);
  }
  return r;
}

describe('the demos meet their specs', () => {
  it('every demo in circuits/ passes `scatterbox check` (exit 0), with a JUnit file of no failures', () => {
    const files = readdirSync(circuits).filter((f) => f.endsWith('.sbx')).sort();
    expect(files).toEqual(expect.arrayContaining(DEMOS));
    for (const demo of files) {
      const r = checkDemo(demo);
      expect(r.code, `${demo}: ${r.err}`).toBe(0);
      expect(r.out, demo).toMatch(/all \d+ checks pass/);
      expect(attrs(/<testsuites\b[^>]*>/.exec(r.xml)![0]).failures, demo).toBe('0');
    }
  });

  for (const demo of DEMOS) {
    it(`${demo}: its specs are the ones written, each passes, and every margin is the one worked out from the solved S`, () => {
      const file = join(circuits, demo);
      const r = checkDemo(demo);
      expect(r.err).toBe('');
      expect(r.code).toBe(0);
      const rows = DEMO_SPECS[demo]!;
      expect(rows.length).toBeGreaterThanOrEqual(4);
      expect(r.out).toContain(`all ${rows.length} checks pass`);
      const report = JSON.parse(r.json) as { pass: boolean; specs: JsonSpec[] };
      expect(report.pass).toBe(true);
      // what the file says, as elaborated: figure, bound, limits and band
      rows.forEach((row, i) => {
        const got = report.specs[i]!;
        expect([got.figure, got.bound], row[0]).toEqual([row[1], row[2]]);
        expect(got.limit[0]).toBeCloseTo(row[3], 12);
        expect(got.limit[1]).toBeCloseTo(row[4], 12);
        expect(got.band_hz[0] as number).toBeCloseTo(row[5], 0);
        if (Number.isFinite(row[6])) expect(got.band_hz[1] as number).toBeCloseTo(row[6], 0);
        else expect(got.band_hz[1]).toBe('inf');
      });
      const net = solveText(readFileSync(file, 'utf8'), file);
      expectReportMatches(report.specs, rows, net);
      // every spec passes with room to spare (a margin of exactly 0 would pass, but is no design)
      for (const x of report.specs) expect(x.worst_margin as number, x.name).toBeGreaterThan(0);
      checkXml(r.xml);
      const cases = testcases(r.xml);
      expect(cases.map((c) => c.name)).toEqual(rows.map((x) => x[0]));
      expect(cases.every((c) => c.failure === undefined && c.classname === file)).toBe(true);
    });
  }
});

// --- a broken part makes a spec fail, by the right margin at the right frequency -----------------------

/**
 * The Π pad in closed form: shunt admittance y at both ends, series resistance z. Cascading the
 * ABCD matrices [1 0; y 1]·[1 z; 0 1]·[1 0; y 1] gives A = D = 1 + z·y, B = z, C = 2y + z·y², and
 * with equal references Z0, S21 = 2/(A + B/Z0 + C·Z0 + D), S11 = (A + B/Z0 − C·Z0 − D)/(same)
 * (the ABCD-to-S conversion, e.g. Pozar, Microwave Engineering, table 4.2 (from memory)).
 */
function piPad(rshunt: number, rseries: number, z0 = 50) {
  const y = 1 / rshunt;
  const a = 1 + rseries * y;
  const b = rseries;
  const c = 2 * y + rseries * y * y;
  const den = a + b / z0 + c * z0 + a;
  return { s21: 2 / den, s11: (a + b / z0 - c * z0 - a) / den };
}

// The demo's own design equations, the matched Π pad of voltage ratio k (common practice):
// rshunt = z0·(k + 1)/(k − 1), rseries = z0·(k² − 1)/(2k), k = 10^(10/20).
const K10 = 10 ** (10 / 20);
const RSHUNT = (50 * (K10 + 1)) / (K10 - 1);
const RSERIES = (50 * (K10 * K10 - 1)) / (2 * K10);

describe('a wrong part fails a spec', () => {
  it('the closed form of the pad is right for the nominal parts: 10 dB, no reflection', () => {
    const p = piPad(RSHUNT, RSERIES);
    expect(-20 * Math.log10(p.s21)).toBeCloseTo(10, 12);
    expect(Math.abs(p.s11)).toBeLessThan(1e-15);
  });

  it('pad with an 82 ohm series arm (--set rseries): loss_upper fails by the closed-form margin, exit 1, JUnit shows it', () => {
    const out = fresh('pad82');
    const file = join(circuits, 'pad-10db-pi.sbx');
    const r = run(['check', file, '--set', 'rseries=82 ohm', '--json', join(out, 'r.json'), '--junit', join(out, 'r.xml')]);
    expect(r.code).toBe(1);
    expect(r.out).toContain('1 check failed');
    const p = piPad(RSHUNT, 82);
    const il = -20 * Math.log10(p.s21); // 10.66 dB
    const vswr = (1 + Math.abs(p.s11)) / (1 - Math.abs(p.s11)); // 1.05, symmetric: both ports alike
    const report = JSON.parse(readFileSync(join(out, 'r.json'), 'utf8')) as { pass: boolean; specs: JsonSpec[] };
    expect(report.pass).toBe(false);
    const by = Object.fromEntries(report.specs.map((x) => [x.name, x]));
    expect(by.loss_upper!.pass).toBe(false);
    expect(by.loss_upper!.worst_margin as number).toBeCloseTo(10.3 - il, 9);
    expect(by.loss_upper!.worst_value!).toBeCloseTo(il, 9);
    expect(by.loss_upper!.worst_limit!).toBeCloseTo(10.3, 12);
    expect(by.loss_lower!.pass).toBe(true);
    expect(by.loss_lower!.worst_margin as number).toBeCloseTo(il - 9.7, 9);
    expect(by.input_vswr!.worst_margin as number).toBeCloseTo(1.1 - vswr, 9);
    expect(by.output_vswr!.worst_margin as number).toBeCloseTo(1.1 - vswr, 9);
    // resistors only: the same value at every point, so any point of the band is the worst one
    expect(by.loss_upper!.points).toBe(41); // log sweep 1 MHz–10 GHz, 10 per decade: 4·10 + 1 points
    expect(by.loss_upper!.worst_frequency_hz!).toBeGreaterThanOrEqual(1e6);
    expect(by.loss_upper!.worst_frequency_hz!).toBeLessThanOrEqual(1e10 * (1 + 1e-12));

    // The JUnit file: well-formed, counts right, the failing case named after the spec.
    const xml = readFileSync(join(out, 'r.xml'), 'utf8');
    const names = checkXml(xml);
    expect(names.filter((x) => x === 'testsuites')).toHaveLength(1);
    expect(names.filter((x) => x === 'testsuite')).toHaveLength(1);
    expect(names.filter((x) => x === 'failure')).toHaveLength(1);
    expect(attrs(/<testsuites\b[^>]*>/.exec(xml)![0])).toMatchObject({ tests: '4', failures: '1', errors: '0' });
    expect(attrs(/<testsuite\b[^>]*>/.exec(xml)![0])).toMatchObject({ name: file, tests: '4', failures: '1', errors: '0' });
    const cases = testcases(xml);
    expect(cases.map((c) => c.name)).toEqual(['loss_upper', 'loss_lower', 'input_vswr', 'output_vswr']);
    expect(cases.filter((c) => c.failure).map((c) => c.name)).toEqual(['loss_upper']);
    const msg = unescapeXml(cases[0]!.failure!);
    expect(msg).toContain('loss_upper fails');
    expect(msg).toContain(`worst margin ${(10.3 - il).toFixed(2)} dB`); // −0.36 dB
  });

  it('band-pass with the middle resonator capacitor off by 7 % (edited copy): the band-edge specs fail where the solved S says', () => {
    const out = fresh('bandpass-c2');
    const text = readFileSync(join(circuits, 'bandpass-2g4.sbx'), 'utf8');
    const line = 'capacitor c2  a=r2 b=ground value=c2   tol 2% lot caps  q=qc at f0';
    expect(text).toContain(line);
    const edited = text.replace(line, 'capacitor c2  a=r2 b=ground value=2.5 pF tol 2% lot caps  q=qc at f0'); // nominal 2.34 pF
    const file = join(out, 'bandpass-c2.sbx');
    writeFileSync(file, edited);
    const r = run(['check', file, '--quiet', '--json', join(out, 'r.json'), '--junit', join(out, 'r.xml')]);
    expect(r.code).toBe(1);
    const report = JSON.parse(readFileSync(join(out, 'r.json'), 'utf8')) as { pass: boolean; specs: JsonSpec[] };
    const rows = DEMO_SPECS['bandpass-2g4.sbx']!;
    const net = solveText(edited, file);
    expectReportMatches(report.specs, rows, net);
    const failing = rows.filter((row) => worstOf(net, row).margin < 0).map((row) => row[0]);
    expect(failing).toContain('passband_loss');
    expect(report.specs.filter((x) => !x.pass).map((x) => x.name)).toEqual(failing);
    // the worst point of the pass band is unambiguous here, and the table and JUnit say where it is
    const w = worstOf(net, rows[0]!);
    expect(uniqueWorst(w, 1e-6)).toBe(true);
    const ghz = hertz(w.frequency);
    expect(r.out).toMatch(new RegExp(`passband_loss .*FAIL +${w.margin.toFixed(2)} dB +${ghz.replace('.', '\\.')}`));
    const cases = testcases(readFileSync(join(out, 'r.xml'), 'utf8'));
    expect(cases.filter((c) => c.failure).map((c) => c.name)).toEqual(failing);
    expect(unescapeXml(cases[0]!.failure!)).toBe(`passband_loss fails: worst margin ${w.margin.toFixed(2)} dB at ${ghz}`);
  });

  it('low-pass with a 15 nH first inductor (--set l2): the sloped skirt fails at the point the line predicts', () => {
    const out = fresh('lowpass-l2');
    const file = join(circuits, 'harmonic-lowpass-433.sbx');
    const r = run(['check', file, '--quiet', '--set', 'l2=15 nH', '--json', join(out, 'r.json')]);
    expect(r.code).toBe(1);
    const report = JSON.parse(readFileSync(join(out, 'r.json'), 'utf8')) as { specs: JsonSpec[] };
    const rows = DEMO_SPECS['harmonic-lowpass-433.sbx']!;
    const net = solveText(readFileSync(file, 'utf8'), file, ['l2=15 nH']);
    expectReportMatches(report.specs, rows, net);
    const skirt = report.specs.find((x) => x.name === 'harmonic_skirt')!;
    expect(skirt.pass).toBe(false);
    expect(uniqueWorst(worstOf(net, rows[3]!), 1e-6)).toBe(true);
  });

  it('a spec with no sweep point in its band fails (and says so), exit 1', () => {
    const out = fresh('nopoints');
    const file = join(circuits, 'bandpass-2g4.sbx');
    const r = run(['check', file, '--sweep', 'list freqs=100 MHz, 2.44 GHz', '--json', join(out, 'r.json'), '--junit', join(out, 'r.xml')]);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/upper_skirt .*FAIL +no points in band/);
    const report = JSON.parse(readFileSync(join(out, 'r.json'), 'utf8')) as { specs: JsonSpec[] };
    const skirt = report.specs.find((x) => x.name === 'upper_skirt')!;
    expect(skirt).toMatchObject({ pass: false, points: 0, worst_margin: '-inf', worst_frequency_hz: null });
    // the pass band holds the one point 2.44 GHz, which is checked as usual
    expect(report.specs.find((x) => x.name === 'passband_loss')!.points).toBe(1);
    const cases = testcases(readFileSync(join(out, 'r.xml'), 'utf8'));
    expect(cases.find((c) => c.name === 'upper_skirt')!.failure).toBe('no sweep point lies in the band of upper_skirt');
    expect(cases.find((c) => c.name === 'band5_rejection')!.failure).toBe('no sweep point lies in the band of band5_rejection');
  });
});

// --- the JSON report ---------------------------------------------------------------------------------

describe('check --json', () => {
  it('has the documented fields, units per figure, open bands as "inf", and each spec\'s line', () => {
    const file = join(circuits, 'harmonic-lowpass-433.sbx');
    const report = JSON.parse(checkDemo('harmonic-lowpass-433.sbx').json) as Record<string, unknown> & { specs: JsonSpec[] };
    expect(Object.keys(report)).toEqual(['schema', 'netlist', 'pass', 'specs', 'golden']);
    expect(report).toMatchObject({ schema: 'scatterbox.check/1', netlist: file, pass: true, golden: null });
    const keys = ['name', 'figure', 'bound', 'limit', 'unit', 'band_hz', 'pass', 'points', 'worst_margin', 'worst_frequency_hz', 'worst_value', 'worst_limit', 'line'];
    for (const x of report.specs) expect(Object.keys(x)).toEqual(keys);
    expect(report.specs.map((x) => x.unit)).toEqual(['dB', 'dB', 'dB', 'dB', 'dB']);
    const upper = report.specs.find((x) => x.name === 'upper_harmonics')!;
    expect(upper.band_hz).toEqual([1.3e9, 'inf']);
    const lines = readFileSync(file, 'utf8').split('\n');
    for (const x of report.specs) expect(lines[x.line - 1]).toMatch(new RegExp(`^spec ${x.name} `));
    // units of the other figures: seconds for gd, plain numbers for vswr, ohms for zin_re
    const units = Object.fromEntries((JSON.parse(checkDemo('bandpass-2g4.sbx').json) as { specs: JsonSpec[] }).specs.map((x) => [x.figure, x.unit]));
    expect(units).toMatchObject({ 'gd(S21)': 's', 'vswr(2)': '', 'il(2,1)': 'dB', 'rl(1)': 'dB' });
    const dts = (JSON.parse(checkDemo('diff-termination-100.sbx').json) as { specs: JsonSpec[] }).specs;
    expect(dts.find((x) => x.figure === 'zin_re(1)')!.unit).toBe('ohm');
    expect(dts[0]!.band_hz).toEqual([0, 1e8]); // below=100 MHz is 0 Hz … 100 MHz
  });
});

// --- golden files ------------------------------------------------------------------------------------

/** Worst dB difference of each entry between two networks, with its frequency (floor −100 dB). */
function worstDb(a: NetworkData, b: NetworkData) {
  const out: { i: number; j: number; db: number; f: number }[] = [];
  const floor = 10 ** (-100 / 20);
  for (let i = 1; i <= a.ports; i++) {
    for (let j = 1; j <= a.ports; j++) {
      let worst = { i, j, db: 0, f: NaN };
      a.frequencies.forEach((f, k) => {
        const ma = Math.hypot(...s(a, k, i, j));
        const mb = Math.hypot(...s(b, k, i, j));
        if (ma < floor && mb < floor) return;
        const d = Math.abs(20 * Math.log10(ma / mb));
        if (d > worst.db || Number.isNaN(worst.f)) worst = { i, j, db: d, f };
      });
      out.push(worst);
    }
  }
  return out;
}

describe('check --against a golden file', () => {
  const demo = join(circuits, 'match-50-75-915.sbx');
  // One golden file for the tests below: written by --update over a stale file, next to the file
  // `solve -o` writes for the same netlist.
  let gdir: string;
  let golden: string;
  let update: ReturnType<typeof run>;
  beforeAll(() => {
    gdir = fresh('golden');
    golden = join(gdir, 'match.s2p');
    writeFileSync(golden, 'stale content that must be replaced\n');
    update = run(['check', demo, '--against', golden, '--update']);
    const listing = readdirSync(gdir);
    expect(run(['solve', demo, '-o', join(gdir, 'solved.s2p')]).code).toBe(0);
    expect(listing).toEqual(['match.s2p']); // the temporary file of the atomic write is gone
  });

  it('a missing golden file is an input error (exit 3) and is not created; the reports carry the error', () => {
    const out = fresh('golden-missing');
    const missing = join(out, 'match.s2p');
    const r = run(['check', demo, '--against', missing, '--junit', join(out, 'r.xml'), '--json', join(out, 'r.json')]);
    expect(r.code).toBe(3);
    expect(r.err).toContain(`the golden file ${missing} does not exist`);
    expect(r.err).toContain('--update');
    // the golden file is never created; the JUnit and JSON reports say the run stopped on an input error
    expect(readdirSync(out).sort()).toEqual(['r.json', 'r.xml']);
    expect(readFileSync(join(out, 'r.xml'), 'utf8')).toMatch(/<error type="input" message="error: the golden file [^"]* does not exist/);
    expect(JSON.parse(readFileSync(join(out, 'r.json'), 'utf8')).pass).toBe(false);
  });

  it('--update without --against is an input error (exit 3) and writes nothing', () => {
    const out = fresh('golden-noagainst');
    const r = run(['check', demo, '--update'], out);
    expect(r.code).toBe(3);
    expect(readdirSync(out)).toEqual([]);
  });

  it('--update writes the golden file: the solve, byte for byte what solve -o writes but for the comment naming the command', () => {
    expect(update.code).toBe(0);
    expect(update.err).toContain(`updated ${golden}`);
    const a = readFileSync(golden, 'utf8').split('\n');
    const b = readFileSync(join(gdir, 'solved.s2p'), 'utf8').split('\n');
    expect(a.length).toBe(b.length);
    const differing = a.map((x, i) => [x, b[i]!] as const).filter(([x, y]) => x !== y);
    expect(differing).toEqual([['! scatterbox check match-50-75-915.sbx --update', '! scatterbox solve match-50-75-915.sbx']]);
    // and it holds the solve: the library's numbers, to the digits written
    const net = solveText(readFileSync(demo, 'utf8'), demo);
    const read = parseTouchstone(readFileSync(golden, 'utf8'), { fileName: golden });
    // frequencies are written in GHz with the writer's digits: equal to a relative 1e-12
    expect(read.frequencies.length).toBe(net.frequencies.length);
    read.frequencies.forEach((f, k) => expect(Math.abs(f - net.frequencies[k]!)).toBeLessThanOrEqual(1e-12 * f));
    expect(Array.from(read.references)).toEqual([50, 75]);
    for (let x = 0; x < net.values.length; x++) expect(read.values[x]).toBeCloseTo(net.values[x]!, 9);
  });

  it('a check --against the file just written passes (exit 0), in the table, the JSON and the JUnit file', () => {
    const out = fresh('golden-pass');
    const c = run(['check', demo, '--against', golden, '--json', join(out, 'r.json'), '--junit', join(out, 'r.xml')]);
    expect(c.code).toBe(0);
    expect(c.out).toContain('all 8 checks pass'); // 4 specs + 4 entries
    const report = JSON.parse(readFileSync(join(out, 'r.json'), 'utf8')) as { pass: boolean; golden: { file: string; pass: boolean; entries: { pass: boolean }[] } };
    expect(report.pass).toBe(true);
    expect(report.golden.file).toBe(golden);
    expect(report.golden.pass).toBe(true);
    expect(report.golden.entries.map((e) => e.pass)).toEqual([true, true, true, true]);
    const xml = readFileSync(join(out, 'r.xml'), 'utf8');
    checkXml(xml);
    expect(attrs(/<testsuites\b[^>]*>/.exec(xml)![0])).toMatchObject({ tests: '8', failures: '0' });
    expect(testcases(xml).filter((t) => t.classname === `golden ${golden}`).map((t) => t.name)).toEqual(['S11', 'S12', 'S21', 'S22']);
  });

  it('a perturbed part (--set lser) fails --against, naming the worst entry and frequency', () => {
    const out = fresh('golden-perturbed');
    const set = 'lser=6.5 nH'; // nominal 6.15 nH
    const r = run(['check', demo, '--set', set, '--against', golden, '--json', join(out, 'r.json'), '--junit', join(out, 'r.xml')]);
    expect(r.code).toBe(1);
    const expected = worstDb(solveText(readFileSync(demo, 'utf8'), demo, [set]), parseTouchstone(readFileSync(golden, 'utf8'), { fileName: golden }));
    const report = JSON.parse(readFileSync(join(out, 'r.json'), 'utf8')) as {
      pass: boolean;
      golden: { pass: boolean; entries: { i: number; j: number; pass: boolean; db: number; db_frequency_hz: number; deg: number }[] };
    };
    expect(report.pass).toBe(false);
    expect(report.golden.pass).toBe(false);
    for (const e of expected) {
      const got = report.golden.entries.find((x) => x.i === e.i && x.j === e.j)!;
      expect(got.db).toBeCloseTo(e.db, 9);
      expect(got.db_frequency_hz).toBe(e.f);
      expect(got.pass).toBe(got.db <= 0.01 && got.deg <= 0.1); // default tolerances 0.01 dB, 0.1°
    }
    const worst = expected.reduce((p, q) => (q.db > p.db ? q : p));
    expect(worst.db).toBeGreaterThan(0.01);
    const name = `S${worst.i}${worst.j}`;
    const at = hertz(worst.f);
    expect(r.out).toMatch(new RegExp(`${name} +${worst.db.toFixed(4)} dB +${at.replace('.', '\\.')} .*FAIL`));
    const xml = readFileSync(join(out, 'r.xml'), 'utf8');
    checkXml(xml);
    const tc = testcases(xml).find((t) => t.classname === `golden ${golden}` && t.name === name)!;
    expect(unescapeXml(tc.failure!)).toContain(`Δ|S| ${worst.db.toFixed(4)} dB at ${at}`);
  });
});

// --- diff ---------------------------------------------------------------------------------------------

describe('scatterbox diff', () => {
  it('a file against itself is within tolerance (exit 0); the pad against an 82 ohm series arm differs by the closed form (exit 1)', () => {
    const out = fresh('diff');
    const a = join(out, 'pad.s2p');
    const b = join(out, 'pad82.s2p');
    const pad = join(circuits, 'pad-10db-pi.sbx');
    expect(run(['solve', pad, '-o', a]).code).toBe(0);
    expect(run(['solve', pad, '--set', 'rseries=82 ohm', '-o', b]).code).toBe(0);
    const same = run(['diff', a, a]);
    expect(same.code).toBe(0);
    expect(same.out).toContain('within tolerance');
    const d = run(['diff', a, b]);
    expect(d.code).toBe(1);
    expect(d.out).toContain('the files differ beyond the tolerance');
    // |S21| changes from 1/k (10 dB) to the closed form of the Π network with z = 82 ohm
    const delta = -20 * Math.log10(piPad(RSHUNT, 82).s21) - 10;
    expect(d.out).toMatch(new RegExp(`S21 +${delta.toFixed(4)} dB .*FAIL`));
    expect(run(['diff', a, join(out, 'missing.s2p')]).code).toBe(3);
  });
});

// --- determinism and batch solve ----------------------------------------------------------------------

describe('solve output', () => {
  // A copy of the demos this file knows, so that the batch sees a fixed set of netlists.
  let src: string;
  const batches: Record<string, string[]> = {};
  const ext = (d: string) => `.s${loadNetlist(readFileSync(join(circuits, d), 'utf8'), d).circuit.ports.length}p`;
  beforeAll(() => {
    src = fresh('batch-src');
    for (const d of DEMOS) copyFileSync(join(circuits, d), join(src, d));
  });
  /** Runs `solve <src> --out-dir <new folder> [--format f]` and returns the folder. */
  function batch(format?: string): string {
    const out = fresh(`batch-${format ?? 'sNp'}`);
    const r = run(['solve', src, '--out-dir', out, '--quiet', ...(format ? ['--format', format] : [])]);
    expect(r.code, r.err).toBe(0);
    (batches[format ?? 'touchstone'] ??= []).push(out);
    return out;
  }

  it('batch solve of a folder writes one file per netlist, named after it, with the extension of its port count (or format)', () => {
    const out = batch();
    const want = DEMOS.map((d) => basename(d, '.sbx') + ext(d)).sort();
    expect(want).toContain('diff-termination-100.s1p'); // the one one-port demo
    expect(readdirSync(out).sort()).toEqual(want);
    for (const f of want) {
      const net = parseTouchstone(readFileSync(join(out, f), 'utf8'), { fileName: f });
      expect(net.ports).toBe(Number(/\.s(\d+)p$/.exec(f)![1]));
    }
    // a file of the batch is the file `solve -o` writes for the same netlist
    const single = join(fresh('single'), 'bandpass-2g4.s2p');
    expect(run(['solve', join(circuits, 'bandpass-2g4.sbx'), '-o', single]).code).toBe(0);
    expect(readFileSync(join(out, 'bandpass-2g4.s2p')).equals(readFileSync(single))).toBe(true);
    for (const format of ['csv', 'json']) {
      expect(readdirSync(batch(format)).sort()).toEqual(DEMOS.map((d) => `${basename(d, '.sbx')}.${format}`).sort());
    }
  });

  it('is byte-identical from run to run (Touchstone, CSV, JSON)', () => {
    for (const format of ['touchstone', 'csv', 'json']) {
      const first = batches[format]?.[0] ?? batch(format === 'touchstone' ? undefined : format);
      const second = batch(format === 'touchstone' ? undefined : format);
      const files = readdirSync(first).sort();
      expect(files).toHaveLength(DEMOS.length);
      expect(readdirSync(second).sort()).toEqual(files);
      for (const f of files) {
        const a = readFileSync(join(first, f));
        expect(a.length, f).toBeGreaterThan(500);
        expect(a.equals(readFileSync(join(second, f))), `${format} ${f}`).toBe(true);
      }
    }
    // the JSON holds the data of the Touchstone file (same points, same values to its digits)
    const j = parseJson(readFileSync(join(batches.json![0]!, 'match-50-75-915.json'), 'utf8'));
    const t = parseTouchstone(readFileSync(join(batches.touchstone![0]!, 'match-50-75-915.s2p'), 'utf8'), { fileName: 'm.s2p' });
    expect(j.frequencies.length).toBe(t.frequencies.length);
    for (let x = 0; x < t.values.length; x++) expect(j.values[x]).toBeCloseTo(t.values[x]!, 9);
  });

  it('batch solve of a folder with one broken netlist writes the others and exits 1', () => {
    const bad = fresh('batch-bad');
    copyFileSync(join(circuits, 'pad-10db-pi.sbx'), join(bad, 'pad.sbx'));
    writeFileSync(join(bad, 'broken.sbx'), 'port 1 plus=a\nresistor r1 a=a b=ground value=zz\nsweep list freqs=1 MHz\n');
    const out = fresh('batch-bad-out');
    const r = run(['solve', bad, '--out-dir', out]);
    expect(r.code).toBe(1);
    expect(readdirSync(out)).toEqual(['pad.s2p']);
    expect(r.err).toContain('1 of 2 netlists failed');
  });
});

// --- sloped limits, on hand-made data ------------------------------------------------------------------

/**
 * A two-port with real S21 = S12 = 10^(−L/20) (an insertion loss of L dB) and S11 = S22 = 0 at each
 * frequency; NaN in `loss` gives an S21 that is not a number.
 */
function lossNetwork(freqs: number[], loss: number[]): NetworkData {
  const values = new Float64Array(8 * freqs.length);
  loss.forEach((l, k) => {
    const m = 10 ** (-l / 20);
    values[2 * (k * 4 + 1)] = m; // S12
    values[2 * (k * 4 + 2)] = m; // S21
  });
  return { parameter: 'S', ports: 2, frequencies: Float64Array.from(freqs), references: Float64Array.from([50, 50]), values };
}

function spec(bound: 'max' | 'min', limit: [number, number], band: [number, number], figure = 'il(2,1)'): SpecDefinition {
  return { name: 'hand', figure, bound, limit, band, unit: 'dB', span: { file: 'hand', line: 1, column: 1, length: 1 } };
}

describe('sloped limits (evaluateSpecs, limitAt)', () => {
  // Loss at 1, 2, 3, 4, 5 GHz. Worked by hand; the loss goes through 10^(−L/20) and back, so the
  // values agree with L to rounding (tolerance 1e-9 dB).
  const net = lossNetwork([1e9, 2e9, 3e9, 4e9, 5e9], [10, 22, 27, 33, 41]);

  it('limitAt is the straight line between the band edges, flat for one limit or an open band', () => {
    const rising = spec('min', [20, 40], [2e9, 4e9]);
    expect(limitAt(rising, 2e9)).toBe(20);
    expect(limitAt(rising, 2.5e9)).toBeCloseTo(25, 12); // 20 + 20·(0.5/2)
    expect(limitAt(rising, 3e9)).toBeCloseTo(30, 12);
    expect(limitAt(rising, 4e9)).toBeCloseTo(40, 12);
    const falling = spec('min', [14, 10], [2e9, 3e9]);
    expect(limitAt(falling, 2.25e9)).toBeCloseTo(13, 12); // 14 − 4·0.25
    expect(limitAt(spec('max', [3, 3], [1e9, 5e9]), 4.2e9)).toBe(3);
    expect(limitAt(spec('min', [35, 35], [1.3e9, Infinity]), 9e9)).toBe(35);
  });

  it('a rising min limit: margins 2, −3, −7 dB at 2, 3, 4 GHz → worst −7 dB at the upper edge', () => {
    const [r] = evaluateSpecs([spec('min', [20, 40], [2e9, 4e9])], net);
    expect(r!.points).toBe(3); // both edges count, 1 and 5 GHz do not
    expect(r!.pass).toBe(false);
    expect(r!.worstMargin).toBeCloseTo(-7, 9); // 33 − 40
    expect(r!.worstFrequency).toBe(4e9);
    expect(r!.worstValue).toBeCloseTo(33, 9);
    expect(r!.worstLimit).toBeCloseTo(40, 12);
  });

  it('a rising max limit: limits 12, 20, 28, 36, 44 dB → margins 2, −2, 1, 3, 3 → worst −2 dB at 2 GHz (inside the band)', () => {
    const [r] = evaluateSpecs([spec('max', [12, 44], [1e9, 5e9])], net);
    expect(r!.points).toBe(5);
    expect(r!.worstMargin).toBeCloseTo(-2, 9); // 20 − 22
    expect(r!.worstFrequency).toBe(2e9);
    expect(r!.worstLimit).toBeCloseTo(20, 12);
    expect(r!.pass).toBe(false);
  });

  it('a falling min limit: 25 → 5 dB over 1–5 GHz fails by 15 dB at 1 GHz; 8 → 5 dB passes by 2 dB', () => {
    // limits 25, 20, 15, 10, 5 against 10, 22, 27, 33, 41: margins −15, 2, 12, 23, 36
    const [bad] = evaluateSpecs([spec('min', [25, 5], [1e9, 5e9])], net);
    expect(bad!.worstMargin).toBeCloseTo(-15, 9);
    expect(bad!.worstFrequency).toBe(1e9);
    // limits 8, 7.25, 6.5, 5.75, 5 against the same: margins 2, 14.75, 20.5, 27.25, 36
    const [good] = evaluateSpecs([spec('min', [8, 5], [1e9, 5e9])], net);
    expect(good!.pass).toBe(true);
    expect(good!.worstMargin).toBeCloseTo(2, 9);
    expect(good!.worstFrequency).toBe(1e9);
  });

  it('a value exactly on the limit passes (margin 0 ≥ 0); a band between sweep points has no points and fails', () => {
    // |S21| = 0.1 at 1, 2, 3 GHz: −20·log10(0.1) = 20 dB, exactly in IEEE arithmetic (checked here)
    const exact = lossNetwork([1e9, 2e9, 3e9], [0, 0, 0]);
    for (let k = 0; k < 3; k++) exact.values[2 * (k * 4 + 2)] = 0.1;
    expect(-20 * Math.log10(0.1)).toBe(20);
    const [flat] = evaluateSpecs([spec('min', [20, 20], [1e9, 3e9])], exact);
    expect(flat!.worstMargin).toBe(0);
    expect(flat!.pass).toBe(true);
    // sloped max 10 → 30 dB: limits 10, 20, 30 against 20 everywhere, margins −10, 0, 10
    const [line] = evaluateSpecs([spec('max', [10, 30], [1e9, 3e9])], exact);
    expect(line!.worstMargin).toBe(-10);
    expect(line!.worstFrequency).toBe(1e9);
    const [none] = evaluateSpecs([spec('min', [20, 40], [3.2e9, 3.8e9])], net);
    expect(none!.points).toBe(0);
    expect(none!.pass).toBe(false);
    expect(none!.worstMargin).toBe(-Infinity);
  });

  it('a figure that is not a number at a point fails there', () => {
    const bad = lossNetwork([1e9, 2e9, 3e9], [10, NaN, 10]);
    const [r] = evaluateSpecs([spec('max', [20, 20], [1e9, 3e9])], bad);
    expect(r!.pass).toBe(false);
    expect(r!.worstMargin).toBe(-Infinity);
    expect(r!.worstFrequency).toBe(2e9);
  });

  it('open bands: above=f runs to the end of the sweep, below=f from 0 Hz', () => {
    const [above] = evaluateSpecs([spec('min', [30, 30], [3e9, Infinity])], net);
    expect(above!.points).toBe(3); // 3, 4, 5 GHz: margins −3, 3, 11
    expect(above!.worstMargin).toBeCloseTo(-3, 9);
    expect(above!.worstFrequency).toBe(3e9);
    const [below] = evaluateSpecs([spec('max', [25, 25], [0, 2e9])], net);
    expect(below!.points).toBe(2); // 1, 2 GHz: margins 15, 3
    expect(below!.worstMargin).toBeCloseTo(3, 9);
    expect(below!.worstFrequency).toBe(2e9);
  });
});
