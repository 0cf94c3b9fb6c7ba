// Browser tests of the live page (`scatterbox live`): a live server on a copy of
// circuits/match-50-75-915.sbx in a temporary folder, and headless Chromium (Debian's
// /usr/bin/chromium, driven by playwright-core, as test/report-browser.test.ts does) on its page.
// Checked as a person would: the page loads with a slider per design variable; a slider move
// changes the plotted data and the spec table; saving the file on disk (by rename, as many
// editors do) updates the page; a syntax error shows the located diagnostic above the last
// result; the write-back button changes exactly the value text; reset.
//
// The plotted values are checked against a closed form of the L section, worked out here by hand:
// series inductor L with Rs = 2π·f0·L/QL, shunt capacitor C with ESR = 1/(2π·f0·C·QC) (the loss
// models the element docs state), Zin = Zs + Zp ∥ 75 Ω, Γ = (Zin − 50)/(Zin + 50) (Pozar,
// Microwave Engineering, 4th ed., eq. 2.35), |S11| in dB = 20·log10|Γ|, return loss −20·log10|Γ|
// (common practice). Tolerance 1e-6 dB (the page rounds dB to 9 decimals).
//
// The slider-to-redraw time is measured and printed, never asserted (no timed tests); the
// bench (scripts/bench-live.mjs) reports it.
import { existsSync, mkdtempSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startLive, type LiveServer } from '../src/live/server.js';

type Dom = any;

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
if (!haveChromium) console.log(`live-browser tests skipped: ${CHROMIUM} does not exist (install Debian's chromium package)`);
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run', '--disable-sync'];
const root = join(import.meta.dirname, '..');
const DEMO = readFileSync(join(root, 'circuits', 'match-50-75-915.sbx'), 'utf8');

/** Γ at port 1 of the L section (see the header), as [re, im]. */
function gamma(f: number, L: number, C: number, QL: number, QC: number): [number, number] {
  const w = 2 * Math.PI * f;
  const w0 = 2 * Math.PI * 915e6;
  const rs = (w0 * L) / QL;
  const esr = 1 / (w0 * C * QC);
  // Zp ∥ 75: Zp·75/(Zp + 75)
  const [pr, pi] = [esr, -1 / (w * C)];
  const [nr, ni] = [pr * 75, pi * 75];
  const [dr, di] = [pr + 75, pi];
  const dd = dr * dr + di * di;
  const [qr, qi] = [(nr * dr + ni * di) / dd, (ni * dr - nr * di) / dd];
  const [zr, zi] = [rs + qr, w * L + qi];
  const [ar, ai] = [zr - 50, zi];
  const [br, bi] = [zr + 50, zi];
  const bb = br * br + bi * bi;
  return [(ar * br + ai * bi) / bb, (ai * br - ar * bi) / bb];
}
const s11Db = (f: number, L: number, C: number, QL = 50, QC = 400) => 20 * Math.log10(Math.hypot(...gamma(f, L, C, QL, QC)));

interface PageState {
  f: number[];
  db11: number[];
  margin: number;
  values: number[];
  results: number;
  verdict: string;
}

describe.skipIf(!haveChromium)('live page in a browser', () => {
  let dir: string;
  let file: string;
  let live: LiveServer;
  let context: BrowserContext;
  let page: Page;
  const errors: string[] = [];
  const requests: string[] = [];

  async function state(): Promise<PageState> {
    return page.evaluate(() => {
      const w = globalThis as Dom;
      const api = w.scatterboxReport;
      const k = api.data.entries.findIndex((e: Dom) => e.label === 'S11');
      const s = api.data.plots.db.indexOf(k);
      const row = w.document.querySelector('[data-testid="spec-row"][data-spec="channel_match"]');
      return {
        f: Array.from(api.plots.db.data[0] as number[]),
        db11: Array.from(api.plots.db.data[s + 1] as number[]),
        margin: Number(row.getAttribute('data-margin')),
        values: w.scatterboxLive.values(),
        results: w.scatterboxLive.results,
        verdict: w.document.querySelector('[data-testid="verdict"]').textContent,
      };
    });
  }
  async function resultsAfter(n: number): Promise<void> {
    await page.waitForFunction((m) => Number((globalThis as Dom).document.documentElement.getAttribute('data-live-results')) > m, n, { timeout: 15_000 });
  }
  /** Worst return loss margin of channel_match (min 35 dB over 902–928 MHz) by the closed form, at the page's points. */
  function closedMargin(f: number[], L: number, C: number, QL = 50): number {
    let worst = Infinity;
    for (const x of f) if (x >= 902e6 * (1 - 1e-12) && x <= 928e6 * (1 + 1e-12)) worst = Math.min(worst, -s11Db(x, L, C, QL) - 35);
    return worst;
  }
  /** Saves a new text the way editors that save by rename do: a new file moved over the old one. */
  function saveByRename(text: string): void {
    const tmp = `${file}.tmp~`;
    writeFileSync(tmp, text);
    renameSync(tmp, file);
  }

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'sbx-live-browser-'));
    file = join(dir, 'match.sbx');
    writeFileSync(file, DEMO);
    live = await startLive({ netlist: file });
    context = await chromium.launchPersistentContext(join(dir, 'profile'), { executablePath: CHROMIUM, args: ARGS, viewport: { width: 1280, height: 900 } });
    page = await context.newPage();
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('request', (r) => requests.push(r.url()));
    await page.goto(live.url);
    await page.waitForSelector('html[data-ready="true"][data-live-ready="true"]', { timeout: 20_000 });
  }, 60_000);

  afterAll(async () => {
    await context?.close();
    await live?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('loads the report page with a slider and a number field per variable, and talks only to its server', async () => {
    expect(await page.locator('[data-testid="live-var"]').count()).toBe(2);
    expect(await page.locator('[data-testid="slider"][data-name="lser"]').getAttribute('max')).toBe(String(seriesCount(3e-9, 12e-9) - 1));
    expect(await page.locator('[data-testid="live-var"][data-name="cshunt"]').getAttribute('data-scale')).toBe('series');
    // the report's own parts are there: Smith chart, plots, spec table, table of values
    for (const id of ['smith', 'plot-db', 'plot-phase', 'plot-gd', 'specs', 'freq-table']) expect(await page.locator(`[data-testid="${id}"]`).count()).toBe(1);
    expect(await page.locator('[data-testid="diagnostics"]').isHidden()).toBe(true);
    // the page's S11 at the netlist's values against the closed form (values as the page holds them)
    const s = await state();
    const [L, C] = s.values;
    s.f.forEach((f, k) => expect(Math.abs(s.db11[k]! - s11Db(f, L!, C!))).toBeLessThan(1e-6));
    expect(errors).toEqual([]);
    const origin = new URL(live.url).origin;
    expect(requests.filter((u) => !u.startsWith(origin) && !u.startsWith('data:'))).toEqual([]);
  });

  it('a slider move changes the plotted data and the spec table (closed form of the L section)', async () => {
    const before = await state();
    // E24 from 3 nH: 3.0 3.3 3.6 3.9 4.3 4.7 — position 5 is 4.7 nH, far off the match (6.15 nH)
    await page.locator('[data-testid="slider"][data-name="lser"]').fill('5');
    await resultsAfter(before.results);
    const after = await state();
    expect(after.values[0]).toBeCloseTo(4.7e-9, 20); // within 1e-20 H: 4.7 nH as the netlist reads it
    expect(after.values[1]).toBe(before.values[1]);
    expect(after.db11).not.toEqual(before.db11);
    after.f.forEach((f, k) => expect(Math.abs(after.db11[k]! - s11Db(f, after.values[0]!, after.values[1]!))).toBeLessThan(1e-6));
    expect(Math.abs(after.margin - closedMargin(after.f, after.values[0]!, after.values[1]!))).toBeLessThan(1e-6);
    expect(after.margin).not.toBe(before.margin);
    // 4.7 nH mismatches the section: the return loss spec fails, and the page says so
    expect(after.margin).toBeLessThan(0);
    expect(await page.locator('[data-testid="spec-row"][data-spec="channel_match"]').getAttribute('data-status')).toBe('fail');
    expect(after.verdict).toMatch(/specs fail/);
    // the number field follows the slider (nH)
    expect(Number(await page.locator('[data-testid="value-field"][data-name="lser"]').inputValue())).toBeCloseTo(4.7, 9);
  });

  it('redraws while dragging: moves through the slider each give a result (time printed, not asserted)', async () => {
    const slider = page.locator('[data-testid="slider"][data-name="cshunt"]');
    const max = Number(await slider.getAttribute('max'));
    const start = (await state()).results;
    for (let p = 0; p <= max; p++) await slider.fill(String(p));
    await page.waitForFunction(() => (globalThis as Dom).scatterboxLive.idle(), null, { timeout: 15_000 });
    const s = await state();
    expect(s.results).toBeGreaterThan(start);
    // the last value drawn is the end of the range, 4.7 pF
    expect(s.values[1]).toBeCloseTo(4.7e-12, 22);
    s.f.forEach((f, k) => expect(Math.abs(s.db11[k]! - s11Db(f, s.values[0]!, s.values[1]!))).toBeLessThan(1e-6));
    const lat: number[] = await page.evaluate(() => (globalThis as Dom).scatterboxLive.latencies.slice());
    const sorted = [...lat].sort((a, b) => a - b);
    console.log(`live slider → redrawn page: ${lat.length} moves, median ${sorted[Math.floor(sorted.length / 2)]?.toFixed(1)} ms, max ${sorted[sorted.length - 1]?.toFixed(1)} ms (measured, not asserted)`);
  });

  it('the number field takes a value in its unit (pF), and the page follows it', async () => {
    const before = await state();
    await page.locator('[data-testid="value-field"][data-name="cshunt"]').fill('2.2');
    await page.locator('[data-testid="value-field"][data-name="cshunt"]').press('Enter');
    await resultsAfter(before.results);
    const s = await state();
    expect(s.values[1]).toBeCloseTo(2.2e-12, 24);
    s.f.forEach((f, k) => expect(Math.abs(s.db11[k]! - s11Db(f, s.values[0]!, s.values[1]!))).toBeLessThan(1e-6));
    // a value beyond the range is held at its bound (4.7 pF)
    await page.locator('[data-testid="value-field"][data-name="cshunt"]').fill('99');
    await page.locator('[data-testid="value-field"][data-name="cshunt"]').press('Enter');
    await resultsAfter(s.results);
    expect((await state()).values[1]).toBeCloseTo(4.7e-12, 24);
  });

  it('reset brings back the netlist\'s values', async () => {
    const before = await state();
    await page.locator('[data-testid="reset"]').click();
    await resultsAfter(before.results);
    const s = await state();
    expect(s.values).toEqual(Array.from(live.session.variables, (v) => v.value));
    expect(s.margin).toBeGreaterThan(0);
  });

  it('saving the file on disk (by rename) updates the page', async () => {
    const before = await state();
    saveByRename(DEMO.replace('value=lser   q=50  at f0', 'value=lser   q=20  at f0'));
    await resultsAfter(before.results);
    const s = await state();
    expect(s.db11).not.toEqual(before.db11);
    s.f.forEach((f, k) => expect(Math.abs(s.db11[k]! - s11Db(f, s.values[0]!, s.values[1]!, 20))).toBeLessThan(1e-6));
    expect(await page.locator('[data-testid="live-status"]').textContent()).toMatch(/updated from a change of/);
  });

  it('a syntax error shows the located diagnostic above the last result, which stays', async () => {
    const before = await state();
    const bad = DEMO.replace('value=lser   q=50  at f0', 'value=lser   q=20  at f0').replace('port 2 plus=feed  ref=rhi', 'port 2 plus=feed  ref=rhi )');
    saveByRename(bad);
    await page.waitForSelector('[data-testid="diagnostics"]:not([hidden])', { timeout: 15_000 });
    const text = (await page.locator('[data-testid="diagnostics"]').textContent())!;
    const line = bad.split('\n').findIndex((l) => l.includes('ref=rhi )')) + 1;
    // file:line:column, the line itself and a caret under the place
    expect(text).toContain(`match.sbx:${line}:`);
    expect(text).toContain('port 2 plus=feed  ref=rhi )');
    expect(text).toMatch(/\^/);
    // the diagnostics sit above the result (the live section comes before the plots)
    const order = await page.evaluate(() => {
      const d = (globalThis as Dom).document;
      const a = d.querySelector('[data-testid="diagnostics"]').getBoundingClientRect().top;
      const b = d.querySelector('[data-testid="response"]').getBoundingClientRect().top;
      return a < b;
    });
    expect(order).toBe(true);
    const s = await state();
    expect(s.db11).toEqual(before.db11);
    expect(s.verdict).toBe(before.verdict);
    // fixed again: the banner goes and the page follows the file
    saveByRename(DEMO);
    await page.waitForSelector('[data-testid="diagnostics"][hidden]', { state: 'attached', timeout: 15_000 });
    const fixed = await state();
    fixed.f.forEach((f, k) => expect(Math.abs(fixed.db11[k]! - s11Db(f, fixed.values[0]!, fixed.values[1]!, 50))).toBeLessThan(1e-6));
  });

  it('write-back changes exactly the value text of the moved variable, and nothing else', async () => {
    const original = readFileSync(file, 'utf8');
    const before = await state();
    await page.locator('[data-testid="slider"][data-name="cshunt"]').fill('6'); // E24 from 0.5 pF: 0.51 0.56 0.62 0.68 0.75 0.82 0.91 → 0.91 pF
    await resultsAfter(before.results);
    const moved = await state();
    expect(moved.values[1]).toBeCloseTo(0.91e-12, 24);
    await page.locator('[data-testid="write-back"]').click();
    await page.waitForFunction(() => /wrote the values/.test((globalThis as Dom).document.querySelector('[data-testid="live-status"]').textContent), null, { timeout: 15_000 });
    const written = readFileSync(file, 'utf8');
    const a = original.split('\n');
    const b = written.split('\n');
    expect(b.length).toBe(a.length);
    const changed = a.flatMap((l, i) => (l === b[i] ? [] : [i]));
    expect(changed.length).toBe(1);
    const i = changed[0]!;
    // `let cshunt = 1/(w0*xp) vary …  # comment`: only the text between `= ` and ` vary` differs
    expect(a[i]).toContain('let cshunt = 1/(w0*xp) vary 0.5 pF to 4.7 pF series E24');
    expect(b[i]).toBe(a[i]!.replace('1/(w0*xp)', '910 fF'));
    // the page follows the written file: same values, no error
    await resultsAfter(moved.results);
    const s = await state();
    expect(s.values[1]).toBe(moved.values[1]);
    expect(await page.locator('[data-testid="diagnostics"]').isHidden()).toBe(true);
    expect(errors).toEqual([]);
  });
});

/** The count of E24 values from lo to hi (IEC 60063's E24 table, by decade). */
function seriesCount(lo: number, hi: number): number {
  const e24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1];
  let n = 0;
  for (let d = -15; d <= 0; d++) for (const m of e24) {
    const v = m * 10 ** d;
    if (v >= lo * (1 - 1e-9) && v <= hi * (1 + 1e-9)) n++;
  }
  return n;
}
