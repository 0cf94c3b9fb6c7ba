// Makes docs/live.png: the live page of circuits/bandpass-2g4.sbx in headless Chromium, with
// the middle resonator's capacitor moved off its design value (a spec fails) and the marker at
// 2.44 GHz, cut below the charts. Run from the repository root:
//   npm run build && node scripts/live-screenshot.mjs [netlist] [out.png]
// Needs /usr/bin/chromium (Debian's chromium package). The netlist is only read (no write-back).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative, resolve } from 'node:path';
import { chromium } from 'playwright-core';
import { startLive } from '../dist/src/live/server.js';

const netlist = relative(process.cwd(), resolve(process.argv[2] ?? 'circuits/bandpass-2g4.sbx'));
const out = resolve(process.argv[3] ?? 'docs/live.png');
const dir = mkdtempSync(join(tmpdir(), 'sbx-live-shot-'));
const live = await startLive({ netlist, watch: false });
const context = await chromium.launchPersistentContext(join(dir, 'profile'), {
  executablePath: '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run', '--disable-sync'],
  viewport: { width: 1280, height: 900 },
  deviceScaleFactor: 1,
});
try {
  const page = await context.newPage();
  await page.goto(live.url);
  await page.waitForSelector('html[data-live-ready="true"]');
  const c2 = page.locator('[data-testid="slider"][data-name="c2"]');
  if ((await c2.count()) === 1) {
    await c2.fill('520');
    await page.waitForFunction(() => window.scatterboxLive.idle() && window.scatterboxLive.results > 0);
  }
  await page.evaluate(() => window.scatterboxReport.readoutAt(2.44e9));
  const bottom = await page.evaluate(() => {
    const r = document.querySelector('.charts').getBoundingClientRect();
    return Math.ceil(r.bottom + window.scrollY + 16);
  });
  await page.screenshot({ path: out, fullPage: true, clip: { x: 0, y: 0, width: 1280, height: bottom } });
  console.log(`wrote ${out} (1280 × ${bottom})`);
} finally {
  await context.close();
  await live.close();
  rmSync(dir, { recursive: true, force: true });
}
