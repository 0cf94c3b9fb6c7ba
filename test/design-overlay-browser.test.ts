// The overlay page in a browser (issue 15, item 6): headless Chromium (Debian's /usr/bin/chromium,
// driven by playwright-core) opens a report of two inputs on different sweeps and checks that it
// draws without errors or requests, that each trace carries its input's colour and its entry's
// dash, and that the readout shows every input at its own nearest point.
//
// The data are closed forms (common practice): a series resistor R = 50 ohm between 50 ohm ports
// has S11 = R/(R + 2·Z0) = 1/3; a one-port load R has Γ = (R − Z0)/(R + Z0), 1/3 for 100 ohm and
// 0.6 for 200 ohm.
//
// The suite is skipped only when /usr/bin/chromium does not exist (CI installs it).
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { renderReport } from '../src/report/index.js';
import { DASHES, PALETTE } from '../src/report/style.js';
import { network } from './report-fixtures.js';

type Dom = any;
interface Win {
  scatterboxReport: { readoutAt(hz: number): string; plots: Record<string, Dom>; data: { plots: Record<string, number[]>; entries: { label: string }[] } };
  document: Dom;
}

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run', '--disable-sync'];

describe.skipIf(!haveChromium)('overlay report in a browser', () => {
  let dir: string;
  let context: BrowserContext;
  let page: Page;
  const errors: string[] = [];
  const requests: string[] = [];
  let url = '';

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'sbx-overlay-browser-'));
    const third = 1 / 3;
    const pad = network([1e9, 2e9, 3e9], () => [
      [[third, 0], [2 * third, 0]],
      [[2 * third, 0], [third, 0]],
    ]);
    const ant = network([1.5e9, 2.5e9], (k) => [[[k === 0 ? 1 / 3 : 0.6, 0]]]);
    const file = join(dir, 'overlay.html');
    writeFileSync(file, renderReport({ datasets: [{ label: 'pad', network: pad }, { label: 'antenna', network: ant }] }));
    context = await chromium.launchPersistentContext(join(dir, 'profile'), { executablePath: CHROMIUM, args: ARGS, viewport: { width: 1280, height: 900 } });
    page = await context.newPage();
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('request', (r) => requests.push(r.url()));
    url = pathToFileURL(file).href;
    await page.goto(url);
    await page.waitForSelector('html[data-ready="true"]', { timeout: 20_000 });
  }, 60_000);

  afterAll(async () => {
    await context?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('opens without console errors and asks for nothing but the file', async () => {
    await page.waitForTimeout(300);
    expect(errors).toEqual([]);
    expect(requests.filter((u) => u !== url && !u.startsWith('data:'))).toEqual([]);
  });

  it('each plot has a series per trace, in its input colour and its entry dash', async () => {
    const series = await page.evaluate(() => {
      const api = (globalThis as unknown as Win).scatterboxReport;
      return api.plots.db!.series.slice(1).map((s: Dom) => ({ label: s.label, stroke: s._stroke, dash: s.dash ?? null }));
    });
    expect(series).toEqual([
      { label: 'pad · S11 = S22', stroke: PALETTE[0], dash: null },
      { label: 'pad · S21 = S12', stroke: PALETTE[0], dash: DASHES[1]!.split(' ').map(Number) },
      { label: 'antenna · S11', stroke: PALETTE[1], dash: null },
    ]);
  });

  it('the readout shows every input at its own nearest point, and says where when it moved', async () => {
    // the page's axis holds 1, 1.5, 2, 2.5, 3 GHz; at 2.5 GHz the pad has no point (nearest: 2 GHz)
    const text = await page.evaluate(() => (globalThis as unknown as Win).scatterboxReport.readoutAt(2.5e9));
    expect(text).toContain('2.5 GHz');
    const field = (entry: string, name: string) => page.locator(`[data-testid="readout"] [data-entry="${entry}"] [data-field="${name}"]`).textContent();
    const db = async (entry: string) => Number((await field(entry, 'db'))!.replace(/\u2212/g, '-').replace(' dB', ''));
    // 20·log10(1/3) = −9.542 dB and 20·log10(0.6) = −4.437 dB, three decimals on screen
    expect(Math.abs((await db('pad · S11')) - 20 * Math.log10(1 / 3))).toBeLessThanOrEqual(0.0005 + 1e-9);
    expect(await field('pad · S11', 'at')).toBe('(at 2 GHz)');
    expect(Math.abs((await db('antenna · S11')) - 20 * Math.log10(0.6))).toBeLessThanOrEqual(0.0005 + 1e-9);
    expect(await page.locator('[data-testid="readout"] [data-entry="antenna · S11"] [data-field="at"]').count()).toBe(0);
    // the marker on the Smith chart: a dot per shown reflection, each at its input's point
    const dots = await page.evaluate(() => (globalThis as unknown as Win).document.querySelectorAll('[data-part="smith-dots"] circle.smith-marker').length);
    expect(dots).toBe(2);
  });
});
