// Tests of the HTML report and the static SVG plots (src/report), in Node: the offline guarantee
// (no remote URL anywhere the browser would fetch it, a Content-Security-Policy that forbids
// fetching), the embedded data against the solver's S-parameters, the spec table against the spec
// results and an independent closed-form check, the Smith chart grid against the conformal map
// Γ = (z − 1)/(z + 1) evaluated with mathjs, the SVG axes against the data range, and determinism.
//
// Expected values never come from the code under test: |S| in dB, phase, group delay and impedance
// are recomputed here from the raw S values with their textbook definitions (cited beside each).
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as math from 'mathjs';
import { beforeAll, describe, expect, it } from 'vitest';
import { evaluateSpecs } from '../src/check/evaluate.js';
import { formatFrequency, formatMargin } from '../src/check/format.js';
import type { SpecResult } from '../src/check/types.js';
import type { Circuit } from '../src/elaborate/circuit.js';
import { readNetworkFile } from '../src/io/read.js';
import { formatTouchstone } from '../src/io/touchstone.js';
import { loadNetlist, loadNetlistFile } from '../src/load.js';
import { convertNetwork } from '../src/network/convert.js';
import type { NetworkData } from '../src/network/types.js';
import {
  conductanceCircle,
  gammaToImpedance,
  reactanceCircle,
  reactanceRimPoint,
  renderPlotSvg,
  renderReport,
  resistanceCircle,
  susceptanceCircle,
} from '../src/report/index.js';
import { solveSweep } from '../src/solve/sweep.js';

const root = join(import.meta.dirname, '..');
const netlist = join(root, 'circuits', 'bandpass-2g4.sbx');
/** A spec the band-pass cannot meet: its centre loss is near 2.9 dB (see the netlist's comment). */
const TIGHT = 'spec tight measure=il(2,1) max=0.5 dB over=2.40 GHz, 2.48 GHz';

let circuit: Circuit;
let net: NetworkData;
let specs: SpecResult[];
let failCircuit: Circuit;
let failSpecs: SpecResult[];
let html: string;

beforeAll(() => {
  circuit = loadNetlistFile(netlist).circuit;
  net = solveSweep(circuit);
  specs = evaluateSpecs(circuit.specs, net);
  failCircuit = loadNetlist(`${readFileSync(netlist, 'utf8')}\n${TIGHT}\n`, netlist).circuit;
  failSpecs = evaluateSpecs(failCircuit.specs, net);
  html = renderReport({ source: 'circuits/bandpass-2g4.sbx', net, circuit: failCircuit, specs: failSpecs });
});

// --- helpers: textbook definitions, written out here ----------------------------------------------

/** S_ij (1-based) at point k as [re, im], from the layout documented in src/network/types.ts. */
function sAt(n: NetworkData, k: number, i: number, j: number): [number, number] {
  const o = 2 * ((k * n.ports + i - 1) * n.ports + j - 1);
  return [n.values[o]!, n.values[o + 1]!];
}
/** 20·log10|S| (common practice). */
function dbOf([re, im]: [number, number]): number {
  return 20 * Math.log10(Math.hypot(re, im));
}
/** Phase in degrees, atan2 (common practice). */
function degOf([re, im]: [number, number]): number {
  return (Math.atan2(im, re) * 180) / Math.PI;
}
function nearestIndex(f: Float64Array, x: number): number {
  let best = 0;
  for (let k = 1; k < f.length; k++) if (Math.abs(f[k]! - x) < Math.abs(f[best]! - x)) best = k;
  return best;
}
/** The JSON data block of a report. */
function dataOf(page: string): {
  f: number[];
  entries: { label: string; display: string; i: number; j: number; re: number[]; im: number[]; db: (number | null)[]; deg: number[]; gd: number[] | null }[];
  plots: Record<string, number[]>;
  fails: { spec: string; plot: string; intervals: [number, number][] }[];
  limits: { spec: string; plot: string; points: [number, number][] }[];
} {
  const m = /<script type="application\/json" id="sbx-data">([\s\S]*?)<\/script>/.exec(page);
  expect(m).not.toBeNull();
  return JSON.parse(m![1]!);
}
/** Every attribute value of every tag, as [name, value]. */
function attributes(markup: string): [string, string][] {
  const out: [string, string][] = [];
  const noScripts = markup.replace(/<script\b[^>]*>[\s\S]*?<\/script>/gi, '<script>').replace(/<style\b[^>]*>[\s\S]*?<\/style>/gi, '<style>');
  for (const tag of noScripts.matchAll(/<[A-Za-z][^>]*>/g)) {
    for (const a of tag[0].matchAll(/([A-Za-z_:][-A-Za-z0-9_:.]*)\s*=\s*("([^"]*)"|'([^']*)'|([^\s>]+))/g)) {
      out.push([a[1]!.toLowerCase(), a[3] ?? a[4] ?? a[5] ?? '']);
    }
  }
  return out;
}

/**
 * Centre and midpoint of an SVG elliptical arc with rx = ry = r and no rotation, from its endpoints
 * and flags: the endpoint-to-centre conversion of the SVG 1.1 specification, appendix F.6.5
 * (W3C Recommendation, 2011).
 */
function svgArc(x1: number, y1: number, x2: number, y2: number, r: number, largeArc: number, sweep: number) {
  const xp = (x1 - x2) / 2;
  const yp = (y1 - y2) / 2;
  const radicand = Math.max(0, (r * r - xp * xp - yp * yp) / (xp * xp + yp * yp));
  const sign = largeArc !== sweep ? 1 : -1;
  const cxp = sign * Math.sqrt(radicand) * yp;
  const cyp = -sign * Math.sqrt(radicand) * xp;
  const cx = cxp + (x1 + x2) / 2;
  const cy = cyp + (y1 + y2) / 2;
  const ang = (ux: number, uy: number, vx: number, vy: number) => Math.atan2(ux * vy - uy * vx, ux * vx + uy * vy);
  const t1 = ang(1, 0, (xp - cxp) / r, (yp - cyp) / r);
  let dt = ang((xp - cxp) / r, (yp - cyp) / r, (-xp - cxp) / r, (-yp - cyp) / r);
  if (sweep === 0 && dt > 0) dt -= 2 * Math.PI;
  if (sweep === 1 && dt < 0) dt += 2 * Math.PI;
  const tm = t1 + dt / 2;
  return { cx, cy, mid: [cx + r * Math.cos(tm), cy + r * Math.sin(tm)] as [number, number] };
}

// --- the HTML report ------------------------------------------------------------------------------

describe('renderReport: offline', () => {
  it('has no http(s) or protocol-relative URL in any src, href or other fetching attribute', () => {
    const attrs = attributes(html);
    expect(attrs.length).toBeGreaterThan(50); // the parser found the markup (fails if the regex broke)
    const fetching = new Set(['src', 'href', 'xlink:href', 'srcset', 'poster', 'action', 'formaction', 'data', 'background', 'cite', 'manifest', 'ping']);
    const remote = attrs.filter(([name, value]) => fetching.has(name) && /^\s*(https?:|\/\/|ftp:|ws:|wss:)/i.test(value));
    expect(remote).toEqual([]);
    // the only link is the empty data: icon, which keeps browsers from asking for /favicon.ico
    expect([...html.matchAll(/<link\b[^>]*>/g)].map((m) => m[0])).toEqual(['<link rel="icon" href="data:,">']);
    // no script or stylesheet loaded from elsewhere, no CSS import or remote url()
    expect(html).not.toMatch(/<script\b[^>]*\bsrc\s*=/i);
    expect(html).not.toMatch(/@import/i);
    expect(html).not.toMatch(/url\(\s*['"]?\s*(https?:|\/\/)/i);
  });

  it('forbids every fetch with a Content-Security-Policy (only inline code and data: images)', () => {
    const m = /<meta http-equiv="Content-Security-Policy" content="([^"]*)">/.exec(html);
    expect(m).not.toBeNull();
    const policy = m![1]!;
    expect(policy).toMatch(/default-src 'none'/);
    expect(policy).toMatch(/connect-src 'none'/);
    expect(policy).toMatch(/font-src 'none'/);
    expect(policy).not.toMatch(/https?:|\*/);
  });

  it('inlines uPlot 1.6.32 from node_modules and the report script', () => {
    const uplot = readFileSync(join(root, 'node_modules', 'uplot', 'dist', 'uPlot.iife.min.js'), 'utf8');
    const css = readFileSync(join(root, 'node_modules', 'uplot', 'dist', 'uPlot.min.css'), 'utf8');
    expect(html).toContain(uplot.slice(0, 2000));
    expect(html).toContain(css);
    expect(html).toContain('uPlot 1.6.32');
    expect(html).toContain('window.scatterboxReport');
    // three scripts: the data block, uPlot, ours
    expect([...html.matchAll(/<script\b/g)].length).toBe(3);
  });

  it('keeps text from the input from ending or opening elements (escaped title, source and data)', () => {
    const evil = '</script><script>alert(1)</script><b>';
    const page = renderReport({ source: evil, title: evil, net });
    expect([...page.matchAll(/<script\b/g)].length).toBe(3);
    expect(page).not.toContain('<b>');
    expect(dataOf(page).f.length).toBe(net.frequencies.length);
  });
});

describe('renderReport: content', () => {
  it('embeds the sweep and every entry as solved (re/im to 12 digits, dB to 9)', () => {
    const data = dataOf(html);
    expect(data.f).toEqual(Array.from(net.frequencies));
    const s21 = data.entries.find((e) => e.label === 'S21')!;
    const s11 = data.entries.find((e) => e.label === 'S11')!;
    expect(s21).toBeDefined();
    expect(s11).toBeDefined();
    for (const [e, i, j] of [[s21, 2, 1], [s11, 1, 1]] as const) {
      for (let k = 0; k < net.frequencies.length; k++) {
        const [re, im] = sAt(net, k, i, j);
        // rounding to 12 significant digits: relative error ≤ 5e-12
        expect(Math.abs(e.re[k]! - re)).toBeLessThanOrEqual(1e-11 * Math.abs(re) + 1e-300);
        expect(Math.abs(e.im[k]! - im)).toBeLessThanOrEqual(1e-11 * Math.abs(im) + 1e-300);
        // 20·log10|S| (common practice), 9 digits: within 1e-6 dB here (values below 1000 dB)
        expect(Math.abs(e.db[k]! - dbOf([re, im]))).toBeLessThan(1e-6);
        // phase by atan2 (common practice); 9 digits: within 1e-6 degrees
        expect(Math.abs(e.deg[k]! - degOf([re, im]))).toBeLessThan(1e-6);
      }
    }
  });

  it('embeds group delay −Δφ/Δω of S21 (central differences of the phase, common practice)', () => {
    const data = dataOf(html);
    const gd = data.entries.find((e) => e.label === 'S21')!.gd!;
    expect(gd).not.toBeNull();
    const f = net.frequencies;
    for (let k = 1; k < f.length - 1; k++) {
      // phase step to each neighbour, brought into (−π, π] (the sweep is fine enough for that)
      const ph = (q: number) => Math.atan2(sAt(net, q, 2, 1)[1], sAt(net, q, 2, 1)[0]);
      let d = ph(k + 1) - ph(k - 1);
      d -= 2 * Math.PI * Math.round(d / (2 * Math.PI));
      const tau = -d / (2 * Math.PI * (f[k + 1]! - f[k - 1]!));
      expect(Math.abs(gd[k]! - tau)).toBeLessThanOrEqual(1e-8 * Math.abs(tau) + 1e-18);
    }
  });

  it('merges equal entries of this reciprocal, symmetric filter into S11 = S22 and S21 = S12', () => {
    const data = dataOf(html);
    const labels = data.entries.map((e) => e.display);
    expect(labels).toContain('S11 = S22');
    expect(labels).toContain('S21 = S12');
    // and the merge is right: S12 equals S21 and S22 equals S11 at every point (1e-12 relative)
    for (let k = 0; k < net.frequencies.length; k++) {
      const a = sAt(net, k, 2, 1);
      const b = sAt(net, k, 1, 2);
      expect(Math.hypot(a[0] - b[0], a[1] - b[1])).toBeLessThanOrEqual(1e-9 * Math.hypot(...a) + 1e-15);
    }
  });

  it('shows the title, the source, the ports with their references and the sweep', () => {
    expect(html).toContain(`<h1 data-testid="title">${circuit.title}</h1>`);
    expect(html).toContain('<code data-testid="source">circuits/bandpass-2g4.sbx</code>');
    const ports = [...html.matchAll(/<tr data-testid="port-row" data-port="(\d+)" data-reference="([^"]+)"><td>\d+<\/td><td>([^<]+)/g)];
    expect(ports.map((m) => [Number(m[1]), Number(m[2]), m[3]!.trim()])).toEqual([
      [1, 50, 'in'],
      [2, 50, 'out'],
    ]);
    const sweep = /data-testid="sweep" data-start="([^"]+)" data-stop="([^"]+)" data-points="(\d+)"/.exec(html)!;
    expect(Number(sweep[1])).toBe(1e9);
    expect(Number(sweep[2])).toBe(6e9);
    expect(Number(sweep[3])).toBe(net.frequencies.length);
    // the netlist sweeps 1–6 GHz in 10 MHz steps (501 points) plus a list of 4, of which only
    // 2.4835 GHz is off that grid
    expect(net.frequencies.length).toBe(502);
  });

  it('lists every spec with the status and worst margin of its result', () => {
    const rows = [...html.matchAll(/<tr class="spec-row" data-testid="spec-row" data-spec="([^"]+)" data-status="(pass|fail)"[^>]*>([\s\S]*?)<\/tr>/g)];
    expect(rows.map((r) => r[1])).toEqual(failSpecs.map((r) => r.spec.name));
    for (const [k, r] of failSpecs.entries()) {
      const row = rows[k]!;
      expect(row[2]).toBe(r.pass ? 'pass' : 'fail');
      expect(row[3]).toContain(`<span class="chip ${r.pass ? 'pass' : 'fail'}">${r.pass ? 'PASS' : 'FAIL'}</span>`);
      expect(row[3]).toContain(formatMargin(r.worstMargin, r.spec.unit).replace('-', '−'));
      expect(row[3]).toContain(formatFrequency(r.worstFrequency));
    }
    expect(html).toContain('data-testid="verdict" data-status="fail">1 of 8 specs fail');
  });

  it('marks the tight spec failing, as an independent closed-form check confirms', () => {
    // insertion loss −20·log10|S21| (common practice) at the sweep points inside 2.40–2.48 GHz
    let worst = Infinity;
    for (let k = 0; k < net.frequencies.length; k++) {
      const f = net.frequencies[k]!;
      if (f < 2.4e9 || f > 2.48e9) continue;
      worst = Math.min(worst, 0.5 - -dbOf(sAt(net, k, 2, 1)));
    }
    expect(worst).toBeLessThan(0); // the loss is about 2.9 dB, far above 0.5 dB
    expect(html).toMatch(/data-spec="tight" data-status="fail"/);
    expect(html).toMatch(/data-spec="passband_loss" data-status="pass"/);
    // the failing interval on the magnitude plot covers the band where it fails (all of it here),
    // widened by half a sweep step at most and clipped to the band
    const fail = dataOf(html).fails.find((x) => x.spec === 'tight')!;
    expect(fail.plot).toBe('db');
    expect(fail.intervals.length).toBe(1);
    const [a, b] = fail.intervals[0]!;
    expect(a).toBeCloseTo(2.4e9, -6);
    expect(b).toBeLessThanOrEqual(2.48e9);
    expect(b).toBeGreaterThanOrEqual(2.475e9);
  });

  it('draws spec limits on the plot of their figure, in that plot\'s quantity', () => {
    const limits = dataOf(html).limits;
    const byName = new Map(limits.map((l) => [l.spec, l]));
    // il(2,1) ≤ 3.5 dB means |S21| ≥ −3.5 dB: drawn at −3.5 on the magnitude plot
    expect(byName.get('passband_loss')!.plot).toBe('db');
    expect(byName.get('passband_loss')!.points).toEqual([[2.4e9, -3.5], [2.4835e9, -3.5]]);
    // vswr(2) ≤ 1.2 means |S22| ≤ (1.2 − 1)/(1.2 + 1) (common practice), in dB 20·log10(0.2/2.2)
    const v = byName.get('amplifier_vswr')!.points;
    expect(v[0]![1]).toBeCloseTo(20 * Math.log10(0.2 / 2.2), 12);
    // the sloped skirt: −8 dB at 2.7 GHz to −20 dB at 3 GHz
    expect(byName.get('upper_skirt')!.points).toEqual([[2.7e9, -8], [3e9, -20]]);
    // gd on the delay plot, in seconds
    expect(byName.get('passband_delay')!.plot).toBe('gd');
    expect(byName.get('passband_delay')!.points[0]![1]).toBeCloseTo(2.5e-9, 20);
    // `below=1.90 GHz` starts at the sweep's first point
    expect(byName.get('cellular_rejection')!.points[0]).toEqual([1e9, -40]);
  });

  it('tabulates |S| in dB and the angle at the chosen frequencies (nearest sweep point)', () => {
    const page = renderReport({ source: 'x', net, tableFrequencies: [2.44e9, 2.4431e9, 5e9] });
    const rows = [...page.matchAll(/<tr data-testid="freq-row" data-frequency="([^"]+)" data-asked="([^"]+)">([\s\S]*?)<\/tr>/g)];
    expect(rows.map((r) => [Number(r[1]), Number(r[2])])).toEqual([
      [2.44e9, 2.44e9],
      [2.44e9, 2.4431e9],
      [5e9, 5e9],
    ]);
    expect(rows[1]![3]).toContain('(asked 2.4431 GHz)');
    const k = nearestIndex(net.frequencies, 2.44e9);
    const cell = new RegExp('data-entry="S21" data-db="([^"]+)" data-deg="([^"]+)">([^<]+)</td><td class="num">([^<]+)</td>').exec(rows[0]![3]!)!;
    const s21 = sAt(net, k, 2, 1);
    expect(Number(cell[1])).toBeCloseTo(dbOf(s21), 10);
    expect(Number(cell[2])).toBeCloseTo(degOf(s21), 10);
    expect(Number(cell[3]!.replace('−', '-'))).toBeCloseTo(dbOf(s21), 3);
    expect(Number(cell[4]!.replace('−', '-'))).toBeCloseTo(degOf(s21), 2);
  });

  it('reads a Touchstone file of the same network (no circuit) and says there are no specs', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sbx-report-'));
    const file = join(dir, 'bandpass.s2p');
    writeFileSync(file, formatTouchstone(net, { format: 'RI', frequencyUnit: 'Hz' }));
    const back = readNetworkFile(file);
    const page = renderReport({ source: file, net: back });
    expect(page).toContain('data-testid="no-specs"');
    expect(page).toContain('data-testid="verdict" data-status="none"');
    const s21 = dataOf(page).entries.find((e) => e.label === 'S21')!;
    const k = nearestIndex(net.frequencies, 2.44e9);
    // Touchstone RI keeps at least 9 significant digits: within 1e-8 of |S| ≤ 1
    expect(Math.abs(s21.re[k]! - sAt(net, k, 2, 1)[0])).toBeLessThan(1e-8);
  });

  it('shows Z data as S for the same references (back-conversion within 1e-9)', () => {
    const z = convertNetwork(net, 'Z');
    const page = renderReport({ source: 'z.json', net: z });
    const s11 = dataOf(page).entries.find((e) => e.label === 'S11')!;
    for (const k of [0, 150, 300, 501]) {
      const [re, im] = sAt(net, k, 1, 1);
      expect(Math.abs(s11.re[k]! - re)).toBeLessThan(1e-9);
      expect(Math.abs(s11.im[k]! - im)).toBeLessThan(1e-9);
    }
    expect(page).toContain('Z-parameters, shown as S for the port references');
  });

  it('handles 20,001 points (a 0.25 MHz grid) in well under 10 s', () => {
    const freqs = new Float64Array(20001);
    for (let k = 0; k < freqs.length; k++) freqs[k] = 1e9 + k * 0.25e6;
    const big = solveSweep(circuit, { frequencies: freqs });
    const t0 = performance.now();
    const page = renderReport({ source: 'big', net: big, circuit });
    const ms = performance.now() - t0;
    expect(dataOf(page).f.length).toBe(20001);
    expect(ms).toBeLessThan(10_000);
  });

  it('is deterministic: the same input gives the same bytes, also from a copy of the data', () => {
    const again = renderReport({ source: 'circuits/bandpass-2g4.sbx', net, circuit: failCircuit, specs: failSpecs });
    expect(again).toBe(html);
    const copy: NetworkData = { ...net, frequencies: net.frequencies.slice(), values: net.values.slice(), references: net.references.slice() };
    const third = renderReport({ source: 'circuits/bandpass-2g4.sbx', net: copy, circuit: failCircuit, specs: evaluateSpecs(failCircuit.specs, copy) });
    expect(third).toBe(html);
  });
});

// --- the Smith chart grid -------------------------------------------------------------------------

describe('Smith chart grid', () => {
  const gammaOfZ = (z: math.Complex): math.Complex => math.divide(math.subtract(z, 1), math.add(z, 1)) as math.Complex;
  const dist = (g: math.Complex, cx: number, cy: number) => Math.hypot(g.re - cx, g.im - cy);

  it('constant-r circles: centre (r/(1+r), 0), radius 1/(1+r), through Γ(r + jx) for every x (mathjs)', () => {
    for (const r of [0, 0.2, 0.5, 1, 2, 5, 13.7]) {
      const c = resistanceCircle(r);
      expect(c.cx).toBeCloseTo(r / (1 + r), 15);
      expect(c.cy).toBe(0);
      expect(c.r).toBeCloseTo(1 / (1 + r), 15);
      for (const x of [-50, -3, -1, -0.2, 0, 0.4, 1, 7, 1e3]) {
        expect(dist(gammaOfZ(math.complex(r, x)), c.cx, c.cy)).toBeCloseTo(c.r, 12);
      }
    }
  });

  it('constant-x circles: centre (1, 1/x), radius 1/|x|, through Γ(r + jx) for every r ≥ 0; rim point Γ(jx)', () => {
    for (const x of [-5, -1, -0.2, 0.2, 0.5, 1, 2, 5]) {
      const c = reactanceCircle(x);
      expect(c.cx).toBe(1);
      expect(c.cy).toBeCloseTo(1 / x, 15);
      expect(c.r).toBeCloseTo(1 / Math.abs(x), 15);
      for (const r of [0, 0.1, 1, 4, 100]) {
        const g = gammaOfZ(math.complex(r, x));
        expect(dist(g, c.cx, c.cy)).toBeCloseTo(c.r, 12);
        expect(math.abs(g) as unknown as number).toBeLessThanOrEqual(1 + 1e-12);
      }
      const rim = gammaOfZ(math.complex(0, x));
      const [ex, ey] = reactanceRimPoint(x);
      expect(ex).toBeCloseTo(rim.re, 14);
      expect(ey).toBeCloseTo(rim.im, 14);
    }
  });

  it('admittance circles: Γ of z = 1/(g + jb) lies on the g circle and on the b circle (mathjs)', () => {
    for (const g of [0.2, 1, 3]) {
      for (const b of [-2, -0.5, 0.5, 2]) {
        const z = math.divide(1, math.complex(g, b)) as math.Complex;
        const G = gammaOfZ(z);
        const cg = conductanceCircle(g);
        const cb = susceptanceCircle(b);
        expect(dist(G, cg.cx, cg.cy)).toBeCloseTo(cg.r, 12);
        expect(dist(G, cb.cx, cb.cy)).toBeCloseTo(cb.r, 12);
      }
    }
  });

  it('Z from Γ is Z0·(1 + Γ)/(1 − Γ) (mathjs), and Γ = 1 is an open', () => {
    for (const [re, im] of [[0, 0], [0.3, -0.4], [-0.9, 0.1], [0.5, 0.5]] as const) {
      const want = math.multiply(50, math.divide(math.add(1, math.complex(re, im)), math.subtract(1, math.complex(re, im)))) as math.Complex;
      const [r, x] = gammaToImpedance(re, im, 50);
      expect(r).toBeCloseTo(want.re, 10);
      expect(x).toBeCloseTo(want.im, 10);
    }
    expect(gammaToImpedance(1, 0, 50)[0]).toBe(Infinity);
  });

  it('the report draws those circles at the chart\'s scale (centre 220, 220; rim radius 186 px)', () => {
    const smith = /<svg data-testid="smith"[\s\S]*?<\/svg>/.exec(html)![0];
    const grid = /<g data-part="impedance-grid"[^>]*>([\s\S]*?)<\/g>/.exec(smith)![1]!;
    const circles = [...grid.matchAll(/<circle cx="([^"]+)" cy="([^"]+)" r="([^"]+)" data-r="([^"]+)"\/>/g)];
    expect(circles.length).toBe(5);
    for (const c of circles) {
      const r = Number(c[4]);
      // the circle in pixels: centre 220 + 186·r/(1+r), radius 186/(1+r); two decimals in the file
      expect(Math.abs(Number(c[1]) - (220 + (186 * r) / (1 + r)))).toBeLessThanOrEqual(0.005);
      expect(Number(c[2])).toBe(220);
      expect(Math.abs(Number(c[3]) - 186 / (1 + r))).toBeLessThanOrEqual(0.005);
    }
    const arcs = [...grid.matchAll(/<path d="M([\d.]+) ([\d.]+)A([\d.]+) [\d.]+ 0 0 ([01]) ([\d.]+) ([\d.]+)" data-x="([^"]+)"\/>/g)];
    expect(arcs.length).toBe(10);
    for (const a of arcs) {
      const x = Number(a[7]);
      const rim = gammaOfZ(math.complex(0, x));
      expect(Number(a[1])).toBe(406); // from Γ = 1
      expect(Math.abs(Number(a[3]) - 186 / Math.abs(x))).toBeLessThanOrEqual(0.005);
      expect(Math.abs(Number(a[5]) - (220 + 186 * rim.re))).toBeLessThanOrEqual(0.005);
      expect(Math.abs(Number(a[6]) - (220 - 186 * rim.im))).toBeLessThanOrEqual(0.005);
      // the arc the flags select: its centre is the x circle's, (1, 1/x) in Γ, and it runs inside the rim
      const arc = svgArc(Number(a[1]), Number(a[2]), Number(a[5]), Number(a[6]), Number(a[3]), 0, Number(a[4]));
      expect(Math.hypot(arc.cx - 406, arc.cy - (220 - 186 / x))).toBeLessThan(0.05);
      expect(Math.hypot(arc.mid[0] - 220, arc.mid[1] - 220)).toBeLessThan(186);
    }
    // the admittance grid is there, hidden until asked for, and is the point reflection of the other
    expect(smith).toMatch(/<g data-part="admittance-grid"[^>]*transform="rotate\(180 220.00 220.00\)" display="none">/);
  });

  it('the S11 trace passes through Γ of the solved S11 at every point (to the pixel rounding)', () => {
    const smith = /<svg data-testid="smith"[\s\S]*?<\/svg>/.exec(html)![0];
    const d = /<g data-entry="S11" class="smith-trace"><path d="([^"]+)"/.exec(smith)![1]!;
    const pts = [...d.matchAll(/[ML]([-\d.]+) ([-\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
    const want = new Set<string>();
    for (let k = 0; k < net.frequencies.length; k++) {
      const [re, im] = sAt(net, k, 1, 1);
      want.add(`${(220 + 186 * re).toFixed(2)} ${(220 - 186 * im).toFixed(2)}`);
    }
    expect(pts.length).toBeGreaterThan(100);
    for (const [x, y] of pts) expect(want.has(`${x!.toFixed(2)} ${y!.toFixed(2)}`)).toBe(true);
  });
});

// --- static SVG plots -----------------------------------------------------------------------------

describe('renderPlotSvg', () => {
  function axes(svg: string) {
    const num = (name: string) => Number(new RegExp(`data-${name}="([^"]+)"`).exec(svg)![1]);
    return { xMin: num('x-min'), xMax: num('x-max'), yMin: num('y-min'), yMax: num('y-max') };
  }
  function plotRect(svg: string) {
    const m = /<clipPath id="[^"]+"><rect x="([\d.]+)" y="([\d.]+)" width="([\d.]+)" height="([\d.]+)"\/>/.exec(svg)!;
    return { x: Number(m[1]), y: Number(m[2]), w: Number(m[3]), h: Number(m[4]) };
  }
  function pathPoints(d: string): [number, number][] {
    return [...d.matchAll(/[ML](-?[\d.]+) (-?[\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
  }

  it('the dB axis covers every |Sij| in dB and every limit, the frequency axis the sweep', () => {
    const svg = renderPlotSvg(net, { kind: 'db', specs: failSpecs });
    const a = axes(svg);
    let lo = Infinity;
    let hi = -Infinity;
    for (let k = 0; k < net.frequencies.length; k++) {
      for (const [i, j] of [[1, 1], [2, 1], [1, 2], [2, 2]] as const) {
        const v = dbOf(sAt(net, k, i, j));
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
    }
    expect(a.yMin).toBeLessThanOrEqual(lo);
    expect(a.yMax).toBeGreaterThanOrEqual(hi);
    expect(a.yMax).toBeGreaterThanOrEqual(-0.5); // the tight limit, −0.5 dB
    expect(a.xMin).toBe(net.frequencies[0]);
    expect(a.xMax).toBe(net.frequencies[net.frequencies.length - 1]);
    // and not absurdly wider: at most one tick step (20 dB here) beyond the data on either side
    expect(lo - a.yMin).toBeLessThan(20 + 1e-9);
    // tick labels: GHz, 1.0 … 6.0, evenly spaced, inside the axis
    const xt = /<g font-size="11" fill="[^"]+" data-part="ticks">([\s\S]*?)<\/g>/.exec(svg)![1]!;
    const labels = [...xt.matchAll(/text-anchor="middle">([^<]+)</g)].map((m) => Number(m[1]));
    expect(labels).toEqual([1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5, 6]);
    expect(svg).toContain('Frequency (GHz)');
  });

  it('every drawn point of every trace lies inside the plot area', () => {
    for (const kind of ['db', 'phase', 'gd'] as const) {
      const svg = renderPlotSvg(net, { kind, specs: failSpecs });
      const r = plotRect(svg);
      const traces = [...svg.matchAll(/<path d="([^"]+)" fill="none" stroke="[^"]+" stroke-width="1.7" stroke-linejoin="round" data-entry="[^"]+"\/>/g)];
      expect(traces.length).toBeGreaterThan(0);
      for (const t of traces) {
        const pts = pathPoints(t[1]!);
        expect(pts.length).toBeGreaterThan(50);
        for (const [x, y] of pts) {
          expect(x).toBeGreaterThanOrEqual(r.x - 0.01);
          expect(x).toBeLessThanOrEqual(r.x + r.w + 0.01);
          expect(y).toBeGreaterThanOrEqual(r.y - 0.01);
          expect(y).toBeLessThanOrEqual(r.y + r.h + 0.01);
        }
      }
    }
  });

  it('the delay axis is in ns and covers −Δφ/Δω of S21', () => {
    const svg = renderPlotSvg(net, { kind: 'gd', specs });
    const a = axes(svg);
    expect(svg).toContain('data-y-unit="ns" data-y-scale="1e-9"');
    expect(svg).toContain('Group delay (ns)');
    const f = net.frequencies;
    let lo = Infinity;
    let hi = -Infinity;
    for (let k = 1; k < f.length - 1; k++) {
      const ph = (q: number) => Math.atan2(sAt(net, q, 2, 1)[1], sAt(net, q, 2, 1)[0]);
      let d = ph(k + 1) - ph(k - 1);
      d -= 2 * Math.PI * Math.round(d / (2 * Math.PI));
      const tau = -d / (2 * Math.PI * (f[k + 1]! - f[k - 1]!)) / 1e-9;
      lo = Math.min(lo, tau);
      hi = Math.max(hi, tau);
    }
    expect(a.yMin).toBeLessThanOrEqual(lo);
    expect(a.yMax).toBeGreaterThanOrEqual(hi);
    expect(a.yMax).toBeGreaterThanOrEqual(2.5); // the passband_delay limit
  });

  it('the phase axis spans −180° to 180° and the line breaks at wraps', () => {
    const svg = renderPlotSvg(net, { kind: 'phase' });
    const a = axes(svg);
    expect([a.yMin, a.yMax]).toEqual([-180, 180]);
    // S21 wraps at least once over 1–6 GHz (it turns through about 270° across the passband)
    const d = /data-entry="S21"/.test(svg) ? /<path d="([^"]+)"[^>]*data-entry="S21"\/>/.exec(svg)![1]! : '';
    expect((d.match(/M/g) ?? []).length).toBeGreaterThan(1);
  });

  it('draws spec limits (dashed), shades failing intervals and has a legend', () => {
    const svg = renderPlotSvg(net, { kind: 'db', specs: failSpecs });
    expect(svg).toMatch(/data-limit="tight"/);
    expect(svg).toMatch(/data-limit="upper_skirt"/);
    expect(svg).toMatch(/<rect [^>]*data-fail="tight"\/>/);
    expect(svg).toMatch(/data-worst="tight"/);
    expect(svg).toContain('>S21 = S12</text>');
    expect(svg).toContain('>spec limit</text>');
    expect(svg).toContain('>failing</text>');
    // the sloped limit is drawn sloped: from −8 dB at 2.7 GHz to −20 dB at 3 GHz
    const d = /<path d="([^"]+)" [^>]*data-limit="upper_skirt"\/>/.exec(svg)![1]!;
    const [p, q] = pathPoints(d);
    expect(q![1]).toBeGreaterThan(p![1]); // lower on screen at 3 GHz
  });

  it('thins long sweeps per pixel column but keeps the extremes', () => {
    const freqs = new Float64Array(20001);
    for (let k = 0; k < freqs.length; k++) freqs[k] = 1e9 + k * 0.25e6;
    const big = solveSweep(circuit, { frequencies: freqs });
    const svg = renderPlotSvg(big, { kind: 'db', entries: [[1, 1]] });
    const d = /<path d="([^"]+)"[^>]*data-entry="S11"\/>/.exec(svg)![1]!;
    const pts = pathPoints(d);
    expect(pts.length).toBeLessThan(4 * 760);
    // the deepest point of S11 on screen equals that of the full data (to the 0.01 px rounding)
    let lo = Infinity;
    for (let k = 0; k < freqs.length; k++) lo = Math.min(lo, dbOf(sAt(big, k, 1, 1)));
    const a = axes(svg);
    const r = plotRect(svg);
    const yDeep = r.y + (1 - (lo - a.yMin) / (a.yMax - a.yMin)) * r.h;
    expect(Math.max(...pts.map((p) => p[1]))).toBeCloseTo(yDeep, 1);
  });

  it('the Smith chart kind draws the grid, the reflections and a legend, without script', () => {
    const svg = renderPlotSvg(net, { kind: 'smith' });
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg).not.toMatch(/<script/i);
    expect([...svg.matchAll(/data-r="/g)].length).toBe(5);
    expect([...svg.matchAll(/data-x="/g)].length).toBe(10);
    expect(svg).toContain('>S11 = S22</text>');
    expect(svg).toContain('Z0 = 50 Ω');
  });

  it('is deterministic and has no script', () => {
    for (const kind of ['db', 'phase', 'gd', 'smith'] as const) {
      const a = renderPlotSvg(net, { kind, specs: failSpecs });
      const b = renderPlotSvg({ ...net, values: net.values.slice() }, { kind, specs: failSpecs });
      expect(b).toBe(a);
      expect(a).not.toMatch(/<script/i);
    }
  });

  it('rejects an unknown kind and a size with no room', () => {
    expect(() => renderPlotSvg(net, { kind: 'bogus' as 'db' })).toThrow(/unknown plot kind/);
    expect(() => renderPlotSvg(net, { kind: 'db', width: 60, height: 60 })).toThrow(/no room/);
  });
});
