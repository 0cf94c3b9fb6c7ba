// Makes docs/report.png: the report of circuits/bandpass-2g4.sbx in headless Chromium, with the
// marker at 2.44 GHz, cut below the charts. Run from the repository root:
//   npm run build && node scripts/report-screenshot.mjs [netlist] [out.png]
// Needs /usr/bin/chromium (Debian's chromium package). Also leaves the HTML next to the PNG's
// temporary folder for a look: the path is printed.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import { evaluateSpecs } from '../dist/src/check/evaluate.js';
import { loadNetlistFile } from '../dist/src/load.js';
import { renderReport } from '../dist/src/report/index.js';
import { solveSweep } from '../dist/src/solve/sweep.js';

const netlist = process.argv[2] ?? 'circuits/bandpass-2g4.sbx';
const out = resolve(process.argv[3] ?? 'docs/report.png');
const { circuit } = loadNetlistFile(netlist);
const net = solveSweep(circuit);
const html = renderReport({ source: relative(process.cwd(), resolve(netlist)), net, circuit, specs: evaluateSpecs(circuit.specs, net) });
const dir = mkdtempSync(join(tmpdir(), 'sbx-shot-'));
const file = join(dir, 'report.html');
writeFileSync(file, html);

const context = await chromium.launchPersistentContext(join(dir, 'profile'), {
  executablePath: '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run', '--disable-sync'],
  viewport: { width: 1280, height: 900 },
  deviceScaleFactor: 1,
});
try {
  const page = await context.newPage();
  await page.goto(pathToFileURL(file).href);
  await page.waitForSelector('html[data-ready="true"]');
  await page.evaluate(() => window.scatterboxReport.readoutAt(2.44e9));
  const bottom = await page.evaluate(() => {
    const r = document.querySelector('.charts').getBoundingClientRect();
    return Math.ceil(r.bottom + window.scrollY + 16);
  });
  await page.screenshot({ path: out, fullPage: true, clip: { x: 0, y: 0, width: 1280, height: bottom } });
  console.log(`wrote ${out} (1280 × ${bottom}); report at ${file}`);
} finally {
  await context.close();
}
