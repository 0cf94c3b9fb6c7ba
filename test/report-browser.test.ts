// Browser tests of the HTML report: headless Chromium (Debian's /usr/bin/chromium, driven by
// playwright-core) opens the report of circuits/bandpass-2g4.sbx, with one deliberately failing spec
// added, from a file:// URL, and checks what a person would see: no console errors, no network
// request at all, drawn plots and Smith chart, the readout at a known frequency equal to the
// solver's S-parameters, the failing spec marked in the table and on the plot, trace toggles, the
// admittance grid toggle, the print layout, and a 20,001-point sweep.
//
// Expected numbers are recomputed here from the raw S values with their textbook definitions:
// |S| in dB = 20·log10|S|, phase = atan2(Im, Re), Z = Z0·(1 + Γ)/(1 − Γ) (all common practice).
//
// The suite is skipped only when /usr/bin/chromium does not exist (CI installs it).
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { evaluateSpecs } from '../src/check/evaluate.js';
import { loadNetlist } from '../src/load.js';
import type { NetworkData } from '../src/network/types.js';
import { renderReport } from '../src/report/index.js';
import { solveSweep } from '../src/solve/sweep.js';

// The page as the callbacks given to page.evaluate see it. This test project compiles without the
// DOM library, so browser objects are typed loosely here; the callbacks run in the page.
type Dom = any;
interface ReportApi {
  readoutAt(hz: number): string;
  smithReadoutAt(entry: string, hz: number): string;
  isTraceVisible(view: string, entry: string): boolean;
  failRegions(kind: string): { spec: string; left: number; width: number }[];
  plots: Record<string, Dom>;
  data: { entries: { label: string; color: string; re: number[]; im: number[] }[]; plots: Record<string, number[]>; smithFrame: { cx: number; cy: number; radius: number } };
}
interface Win {
  scatterboxReport: ReportApi;
  document: Dom;
  getComputedStyle(e: Dom): { display: string };
}

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
if (!haveChromium) console.log(`report-browser tests skipped: ${CHROMIUM} does not exist (install Debian's chromium package)`);

const root = join(import.meta.dirname, '..');
const netlist = join(root, 'circuits', 'bandpass-2g4.sbx');
const TIGHT = 'spec tight measure=il(2,1) max=0.5 dB over=2.40 GHz, 2.48 GHz';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run', '--disable-sync'];

function sAt(n: NetworkData, k: number, i: number, j: number): [number, number] {
  const o = 2 * ((k * n.ports + i - 1) * n.ports + j - 1);
  return [n.values[o]!, n.values[o + 1]!];
}
function nearestIndex(f: Float64Array, x: number): number {
  let best = 0;
  for (let k = 1; k < f.length; k++) if (Math.abs(f[k]! - x) < Math.abs(f[best]! - x)) best = k;
  return best;
}
/** A number as the report prints it: true minus sign, maybe a unit after it. */
function num(text: string): number {
  const m = /[−-]?\d+(\.\d+)?/.exec(text.replace(/\u2212/g, '-'));
  if (!m) throw new Error(`no number in ${JSON.stringify(text)}`);
  return Number(m[0]);
}

interface Opened {
  page: Page;
  errors: string[];
  requests: string[];
  url: string;
}

describe.skipIf(!haveChromium)('report in a browser', () => {
  let dir: string;
  let context: BrowserContext;
  let net: NetworkData;
  let main: Opened;

  async function open(file: string): Promise<Opened> {
    const page = await context.newPage();
    const errors: string[] = [];
    const requests: string[] = [];
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('request', (r) => requests.push(r.url()));
    const url = pathToFileURL(file).href;
    await page.goto(url);
    await page.waitForSelector('html[data-ready="true"]', { timeout: 20_000 });
    return { page, errors, requests, url };
  }

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'sbx-report-browser-'));
    const { circuit } = loadNetlist(`${readFileSync(netlist, 'utf8')}\n${TIGHT}\n`, netlist);
    net = solveSweep(circuit);
    const file = join(dir, 'report.html');
    writeFileSync(file, renderReport({ source: 'circuits/bandpass-2g4.sbx', net, circuit, specs: evaluateSpecs(circuit.specs, net) }));
    context = await chromium.launchPersistentContext(join(dir, 'profile'), {
      executablePath: CHROMIUM,
      args: ARGS,
      viewport: { width: 1280, height: 900 },
    });
    main = await open(file);
  }, 60_000);

  afterAll(async () => {
    await context?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('opens without console errors and makes no network request (only the file itself)', async () => {
    // a little time for anything late (fonts, icons) to be asked for
    await main.page.waitForTimeout(300);
    expect(main.errors).toEqual([]);
    const foreign = main.requests.filter((u) => u !== main.url && !u.startsWith('data:'));
    expect(foreign).toEqual([]);
    expect(main.requests).toContain(main.url);
  });

  it('draws every plot: each trace colour appears on its canvas', async () => {
    const counts = await main.page.evaluate(() => {
      const api = (globalThis as unknown as Win).scatterboxReport;
      const out: Record<string, number[]> = {};
      for (const kind of ['db', 'phase', 'gd']) {
        const u = api.plots[kind]!;
        const c = u.ctx.canvas;
        const img = u.ctx.getImageData(0, 0, c.width, c.height).data;
        out[kind] = api.data.plots[kind]!.map((k) => {
          const hex = api.data.entries[k]!.color;
          const rgb = [1, 3, 5].map((p) => parseInt(hex.slice(p, p + 2), 16));
          let n = 0;
          for (let q = 0; q < img.length; q += 4) {
            if (img[q + 3]! > 200 && Math.abs(img[q]! - rgb[0]!) + Math.abs(img[q + 1]! - rgb[1]!) + Math.abs(img[q + 2]! - rgb[2]!) < 40) n++;
          }
          return n;
        });
      }
      return out;
    });
    for (const kind of ['db', 'phase', 'gd']) {
      expect(counts[kind]!.length).toBeGreaterThan(0);
      // a trace across ~1000 px of plot width paints well over 300 pixels of its colour
      for (const n of counts[kind]!) expect(n).toBeGreaterThan(300);
    }
  });

  it('draws the Smith chart: grid and one long trace per reflection, with a box on screen', async () => {
    const info = await main.page.evaluate(() => {
      const svg = (globalThis as unknown as Win).document.querySelector('[data-testid="smith"]');
      const traces = [...svg.querySelectorAll('.smith-trace path')].map((p) => {
        const b = (p as Dom).getBBox();
        return { length: (p as Dom).getTotalLength(), w: b.width, h: b.height };
      });
      const r = svg.getBoundingClientRect();
      return { traces, grid: svg.querySelectorAll('[data-part="impedance-grid"] circle, [data-part="impedance-grid"] path').length, w: r.width, h: r.height };
    });
    expect(info.grid).toBe(15); // 5 r circles, 10 x arcs
    expect(info.traces.length).toBe(1); // S11 = S22 of this symmetric filter
    for (const t of info.traces) {
      expect(t.length).toBeGreaterThan(500);
      expect(t.w).toBeGreaterThan(100);
      expect(t.h).toBeGreaterThan(100);
    }
    expect(info.w).toBeGreaterThan(300);
  });

  it('the readout at 2.44 GHz shows the solver\'s |S| in dB, angle, delay and Z', async () => {
    const text = await main.page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.readoutAt(2.44e9));
    expect(text).toContain('2.44 GHz');
    const k = nearestIndex(net.frequencies, 2.44e9);
    expect(net.frequencies[k]).toBe(2.44e9);
    const field = async (entry: string, name: string) => main.page.locator(`[data-testid="readout"] [data-entry="${entry}"] [data-field="${name}"]`).textContent();
    const s21 = sAt(net, k, 2, 1);
    const s11 = sAt(net, k, 1, 1);
    // three decimals of dB and two of degrees on screen: within half a unit of the last digit
    expect(Math.abs(num((await field('S21', 'db'))!) - 20 * Math.log10(Math.hypot(...s21)))).toBeLessThanOrEqual(0.0005 + 1e-9);
    expect(Math.abs(num((await field('S21', 'deg'))!) - (Math.atan2(s21[1], s21[0]) * 180) / Math.PI)).toBeLessThanOrEqual(0.005 + 1e-9);
    expect(Math.abs(num((await field('S11', 'db'))!) - 20 * Math.log10(Math.hypot(...s11)))).toBeLessThanOrEqual(0.0005 + 1e-9);
    // Z = Z0 (1 + Γ)/(1 − Γ), Z0 = 50 Ω; two decimals of ohms
    const d = (1 - s11[0]) ** 2 + s11[1] ** 2;
    const R = (50 * (1 - s11[0] ** 2 - s11[1] ** 2)) / d;
    const X = (50 * 2 * s11[1]) / d;
    const z = (await field('S11', 'z'))!.replace(/\u2212/g, '-');
    const m = /Z (-?[\d.]+) ([+-]) j([\d.]+) Ω/.exec(z)!;
    expect(Math.abs(Number(m[1]) - R)).toBeLessThanOrEqual(0.005 + 1e-9);
    expect(Math.abs((m[2] === '-' ? -1 : 1) * Number(m[3]) - X)).toBeLessThanOrEqual(0.005 + 1e-9);
    // the delay field is there for the transmission
    expect(await field('S21', 'gd')).toMatch(/^τ [\d.]+ ns$/);
  });

  it('hovering a plot with the mouse moves the readout to the frequency under the cursor', async () => {
    const { page } = main;
    await page.locator('[data-testid="plot-db"]').scrollIntoViewIfNeeded();
    const box = await page.evaluate(() => {
      const u = (globalThis as unknown as Win).scatterboxReport.plots.db!;
      const r = u.over.getBoundingClientRect();
      return { x: r.left + u.valToPos(3.5e9, 'x'), y: r.top + r.height / 2 };
    });
    await page.mouse.move(box.x, box.y);
    const f = Number(await page.locator('[data-testid="readout"]').getAttribute('data-frequency'));
    // within one sweep step (10 MHz) of where the mouse is
    expect(Math.abs(f - 3.5e9)).toBeLessThanOrEqual(10e6);
    expect(await page.locator('[data-testid="readout"]').getAttribute('data-mode')).toBe('cursor');
    await page.mouse.move(1, 1);
  });

  it('the Smith chart readout shows f, Γ and Z of S11, also when hovered with the mouse', async () => {
    const { page } = main;
    const text = await page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.smithReadoutAt('S11', 2.44e9));
    const k = nearestIndex(net.frequencies, 2.44e9);
    const s11 = sAt(net, k, 1, 1);
    const m = /2\.44 GHz · Γ = ([\d.]+) ∠([−\d.]+)° · Z = ([−\d.]+) ([+−]) j([\d.]+) Ω/.exec(text)!;
    expect(m).not.toBeNull();
    expect(Math.abs(Number(m[1]) - Math.hypot(...s11))).toBeLessThanOrEqual(0.00005 + 1e-12);
    expect(Math.abs(num(m[2]!) - (Math.atan2(s11[1], s11[0]) * 180) / Math.PI)).toBeLessThanOrEqual(0.005 + 1e-9);
    // move the mouse onto the trace where it starts (1 GHz) and read the hover
    await page.locator('[data-testid="smith"]').scrollIntoViewIfNeeded();
    const at = await page.evaluate(() => {
      const svg = (globalThis as unknown as Win).document.querySelector('[data-testid="smith"]');
      const api = (globalThis as unknown as Win).scatterboxReport;
      const e = api.data.entries.find((x) => x.label === 'S11')!;
      const fr = api.data.smithFrame;
      const p = svg.createSVGPoint();
      p.x = fr.cx + fr.radius * e.re[0]!;
      p.y = fr.cy - fr.radius * e.im[0]!;
      const s = p.matrixTransform(svg.getScreenCTM()!);
      return { x: s.x, y: s.y };
    });
    await page.mouse.move(at.x, at.y);
    const hover = await page.locator('[data-testid="smith-readout"]').textContent();
    expect(hover).toMatch(/^S11 = S22 · 1 GHz · Γ = /);
    expect(await page.locator('[data-testid="readout"]').getAttribute('data-mode')).toBe('smith');
    await page.mouse.move(1, 1);
  });

  it('marks the failing spec: a fail row, and a shaded interval over 2.40–2.48 GHz on the magnitude plot', async () => {
    const { page } = main;
    const row = page.locator('[data-testid="spec-row"][data-spec="tight"]');
    expect(await row.getAttribute('data-status')).toBe('fail');
    expect(await row.locator('.chip').textContent()).toBe('FAIL');
    expect(await page.locator('[data-testid="spec-row"][data-status="fail"]').count()).toBe(1);
    const regions = await page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.failRegions('db'));
    expect(regions.map((r) => r.spec)).toEqual(['tight']);
    const want = await page.evaluate(() => {
      const u = (globalThis as unknown as Win).scatterboxReport.plots.db!;
      return { a: u.valToPos(2.4e9, 'x'), b: u.valToPos(2.48e9, 'x'), step: u.valToPos(2.41e9, 'x') - u.valToPos(2.4e9, 'x') };
    });
    // from 2.40 GHz to within half a sweep step of 2.48 GHz (the last failing point is 2.48 GHz)
    expect(Math.abs(regions[0]!.left - want.a)).toBeLessThanOrEqual(1);
    expect(Math.abs(regions[0]!.left + regions[0]!.width - want.b)).toBeLessThanOrEqual(want.step / 2 + 1);
    // the shaded element is really on screen, over the plot
    const box = await page.locator('[data-testid="plot-db"] [data-testid="fail-region"]').boundingBox();
    expect(box!.width).toBeGreaterThan(5);
    expect(box!.height).toBeGreaterThan(100);
  });

  it('toggles traces from the plot legend (everywhere) and from the Smith chart buttons', async () => {
    const { page } = main;
    const visible = (view: string, entry: string) => page.evaluate(([v, e]) => (globalThis as unknown as Win).scatterboxReport.isTraceVisible(v!, e!), [view, entry]);
    // pixels in the colour of S21 (= S12) on the magnitude plot
    const orange = () =>
      page.evaluate(() => {
        const api = (globalThis as unknown as Win).scatterboxReport;
        const u = api.plots.db!;
        const hex = api.data.entries.find((e) => e.label === 'S21')!.color;
        const rgb = [1, 3, 5].map((p) => parseInt(hex.slice(p, p + 2), 16));
        const c = u.ctx.canvas;
        const img = u.ctx.getImageData(0, 0, c.width, c.height).data;
        let n = 0;
        for (let q = 0; q < img.length; q += 4) if (img[q + 3]! > 200 && Math.abs(img[q]! - rgb[0]!) + Math.abs(img[q + 1]! - rgb[1]!) + Math.abs(img[q + 2]! - rgb[2]!) < 40) n++;
        return n;
      });
    expect(await visible('db', 'S21')).toBe(true);
    const before = await orange();
    const item = page.locator('[data-testid="plot-db"] .u-legend .u-series', { hasText: 'S21 = S12' });
    await item.click();
    expect(await visible('db', 'S21')).toBe(false);
    expect(await visible('phase', 'S21')).toBe(false);
    expect(await visible('gd', 'S21')).toBe(false);
    expect(await orange()).toBeLessThan(before / 10);
    await item.click();
    expect(await visible('db', 'S21')).toBe(true);
    expect(await visible('gd', 'S21')).toBe(true);

    const btn = page.locator('[data-testid="smith-toggle"][data-entry="S11"]');
    await btn.click();
    expect(await btn.getAttribute('aria-pressed')).toBe('false');
    expect(await visible('smith', 'S11')).toBe(false);
    expect(await page.locator('[data-testid="smith"] .smith-trace[data-entry="S11"]').isVisible()).toBe(false);
    expect(await visible('db', 'S11')).toBe(false);
    await btn.click();
    expect(await visible('smith', 'S11')).toBe(true);
    expect(await visible('db', 'S11')).toBe(true);
  });

  it('shows the admittance grid on demand', async () => {
    const { page } = main;
    const grid = page.locator('[data-testid="smith"] [data-part="admittance-grid"]');
    expect(await grid.isVisible()).toBe(false);
    await page.locator('[data-testid="toggle-admittance"]').check();
    expect(await grid.isVisible()).toBe(true);
    expect(await page.locator('[data-testid="smith"]').getAttribute('data-admittance')).toBe('shown');
    await page.locator('[data-testid="toggle-admittance"]').uncheck();
    expect(await grid.isVisible()).toBe(false);
  });

  it('prints without the hover UI, plots stacked, and makes a PDF', async () => {
    const { page } = main;
    await page.emulateMedia({ media: 'print' });
    const look = await page.evaluate(() => {
      const d = (sel: string) => (globalThis as unknown as Win).getComputedStyle((globalThis as unknown as Win).document.querySelector(sel)).display;
      return { readout: d('[data-testid="readout"]'), toolbar: d('.toolbar'), charts: d('.charts'), controls: d('.smith-controls') };
    });
    expect(look).toEqual({ readout: 'none', toolbar: 'none', charts: 'block', controls: 'none' });
    const pdf = await page.pdf({ format: 'A4' });
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(20_000);
    await page.emulateMedia({ media: 'screen' });
    expect(main.errors).toEqual([]);
  });

  it('stays quick with 20,001 points: ready, drawn and read out', async () => {
    const { circuit } = loadNetlist(readFileSync(netlist, 'utf8'), netlist);
    const freqs = new Float64Array(20001);
    for (let k = 0; k < freqs.length; k++) freqs[k] = 1e9 + k * 0.25e6;
    const big = solveSweep(circuit, { frequencies: freqs });
    const file = join(dir, 'big.html');
    writeFileSync(file, renderReport({ source: 'big', net: big, circuit }));
    const t0 = Date.now();
    const o = await open(file);
    const ms = Date.now() - t0;
    expect(ms).toBeLessThan(15_000);
    expect(o.errors).toEqual([]);
    expect(o.requests.filter((u) => u !== o.url && !u.startsWith('data:'))).toEqual([]);
    const text = await o.page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.readoutAt(2.44e9));
    expect(text).toContain('2.44 GHz');
    const k = nearestIndex(freqs, 2.44e9);
    const s21 = sAt(big, k, 2, 1);
    const db = await o.page.locator('[data-testid="readout"] [data-entry="S21"] [data-field="db"]').textContent();
    expect(Math.abs(num(db!) - 20 * Math.log10(Math.hypot(...s21)))).toBeLessThanOrEqual(0.0005 + 1e-9);
    // a mouse sweep across the magnitude plot: 50 moves, each one updating the readout
    await o.page.locator('[data-testid="plot-db"]').scrollIntoViewIfNeeded();
    const r = (await o.page.locator('[data-testid="plot-db"] .u-over').boundingBox())!;
    const t1 = Date.now();
    for (let q = 0; q < 50; q++) await o.page.mouse.move(r.x + (r.width * (q + 0.5)) / 50, r.y + r.height / 2);
    expect(Date.now() - t1).toBeLessThan(10_000);
    expect(await o.page.locator('[data-testid="readout"]').getAttribute('data-mode')).toBe('cursor');
    await o.page.close();
  });
});
