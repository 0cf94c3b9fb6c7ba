// Issue 14 (hardening), the report in a browser (headless Chromium at /usr/bin/chromium, driven by
// playwright-core, as in report-browser.test.ts):
// - the magnitude plot's y axis is not stretched down to numerical zeros (|S| = 1e-20 is −400 dB):
//   it reaches at most 120 dB below the largest value shown (common practice), plus one grid step;
// - the impedance readout of a port with a complex reference R + jX is the load's own impedance,
//   Z = (Zr* + Γ·Zr)/(1 − Γ) for power waves (K. Kurokawa, IEEE Trans. MTT 13(2), 1965), checked
//   against the closed form of a series R–L load;
// - mixed-mode data shows its mode labels in the readout.
//
// The suite is skipped only when /usr/bin/chromium does not exist (CI installs it).
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadNetlist } from '../src/load.js';
import { renderReport } from '../src/report/index.js';
import { network, twoThroughLines } from './report-fixtures.js';
import { solveSweep } from '../src/solve/sweep.js';

// browser objects are typed loosely: this test project compiles without the DOM library
type Dom = any;
interface Win {
  scatterboxReport: { readoutAt(hz: number): string; smithReadoutAt(entry: string, hz: number): string; plots: Record<string, Dom> };
}

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run', '--disable-sync'];

describe.skipIf(!haveChromium)('hardening: the report in a browser', () => {
  let dir: string;
  let context: BrowserContext;

  async function open(name: string, html: string): Promise<{ page: Page; errors: string[] }> {
    const file = join(dir, name);
    writeFileSync(file, html);
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    await page.goto(pathToFileURL(file).href);
    await page.waitForSelector('html[data-ready="true"]', { timeout: 20_000 });
    return { page, errors };
  }

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'sbx-hardening-browser-'));
    context = await chromium.launchPersistentContext(join(dir, 'profile'), { executablePath: CHROMIUM, args: ARGS, viewport: { width: 1280, height: 900 } });
  }, 60_000);

  afterAll(async () => {
    await context?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('the magnitude axis stops 120 dB below the largest value, not at −400 dB (the reproducer)', async () => {
    // S11 about −6 dB, S22 −100 dB, S21 = S12 = 1e-20 (−400 dB): numerical zeros
    const freqs = Array.from({ length: 21 }, (_, k) => 1e9 + k * 1e8);
    const net = network(freqs, (k) => [
      [
        [0.5, 0.001 * k],
        [1e-20, 0],
      ],
      [
        [1e-20, 0],
        [1e-5, 0],
      ],
    ]);
    const { page, errors } = await open('zeros.html', renderReport({ source: 'zeros', net }));
    const y = await page.evaluate(() => {
      const u = (globalThis as unknown as Win).scatterboxReport.plots.db!;
      return { min: u.scales.y.min as number, max: u.scales.y.max as number };
    });
    const top = 20 * Math.log10(Math.hypot(0.5, 0.02)); // the largest |S| in dB (at the last point)
    expect(y.max).toBeGreaterThanOrEqual(top);
    // the floor rounded down to whole grid steps: at most one step (20 dB for a 120 dB span) lower
    expect(y.min).toBeGreaterThanOrEqual(top - 120 - 20);
    expect(y.min).toBeLessThanOrEqual(-100); // S22 at −100 dB is on the axis
    expect(errors).toEqual([]);
    await page.close();
  });

  it('the Z readout of a port with a complex reference is the load impedance R + jωL (closed form)', async () => {
    // ZL = 30 Ω + jωL, L = 40 Ω at 1 GHz; the port's reference 50 + j20 Ω
    const L = 40 / (2 * Math.PI * 1e9);
    const text = [`resistor r a=in b=m value=30 ohm`, `inductor l a=m b=ground value=${L}`, 'port 1 plus=in ref=50 ohm ref_x=20 ohm', 'sweep linear start=0.5 GHz stop=1.5 GHz points=11'].join('\n') + '\n';
    const net = solveSweep(loadNetlist(text, 'one.sbx').circuit);
    const { page, errors } = await open('complex.html', renderReport({ source: 'one.sbx', net }));
    await page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.readoutAt(1e9));
    const z = (await page.locator('[data-testid="readout"] [data-entry="S11"] [data-field="z"]').textContent())!.replace(/\u2212/g, '-');
    const m = /Z (-?[\d.]+) ([+-]) j([\d.]+) Ω/.exec(z)!;
    expect(m).not.toBeNull();
    // two decimals of ohms on screen: within half a unit of the last digit
    expect(Math.abs(Number(m[1]) - 30)).toBeLessThanOrEqual(0.005 + 1e-9);
    expect(Math.abs((m[2] === '-' ? -1 : 1) * Number(m[3]) - 40)).toBeLessThanOrEqual(0.005 + 1e-9);
    const smith = await page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.smithReadoutAt('S11', 1e9));
    expect(smith.replace(/\u2212/g, '-')).toMatch(/Z = 30\.00 \+ j40\.00 Ω/);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('mixed-mode data reads out by mode (Sdd11, Scd21 …)', async () => {
    const { mm } = twoThroughLines();
    const { page, errors } = await open('mm.html', renderReport({ source: 'mm', net: mm, entries: [[1, 1], [2, 1], [3, 2]] }));
    await page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.readoutAt(1e9));
    const names = await page.locator('[data-testid="readout"] .ro-item').evaluateAll((els: Dom[]) => els.map((e) => e.getAttribute('data-entry')));
    expect(names).toEqual(expect.arrayContaining(['Sdd11', 'Sdd21', 'Scd12']));
    expect(names.some((x: string) => /^S\d/.test(x))).toBe(false);
    expect(errors).toEqual([]);
    await page.close();
  });
});
