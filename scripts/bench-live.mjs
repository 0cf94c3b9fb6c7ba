// The `live` figure of the benchmark: from a slider move to the redrawn page, for every demo with
// design variables (circuits/*.sbx with `vary`). A live server (dist/) on the demo, headless
// Chromium (Debian's /usr/bin/chromium through playwright-core) on its page; each slider is
// moved through its positions (a real `input` event per position, one after another as a drag
// gives them) and the page's own measure is read: from the input event to the first frame after
// the new result is drawn (`scatterboxLive.latencies`). Beside it, the server's share: new values,
// solve, specs and the result's JSON, in-process. Called by scripts/bench.mjs:
//
//   import { benchLive } from './bench-live.mjs';
//   const rows = await benchLive();   // [{ demo, moves, median, p90, max, server }] in ms
//
// Run alone: `npm run build && node scripts/bench-live.mjs`. Never a test: nothing here asserts a time.
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const CHROMIUM = '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run', '--disable-sync'];
const circuits = fileURLToPath(new URL('../circuits/', import.meta.url));

/** The demos with design variables. */
function demos() {
  return readdirSync(circuits)
    .filter((f) => f.endsWith('.sbx') && /\bvary\b/.test(readFileSync(join(circuits, f), 'utf8')))
    .sort()
    .map((f) => join(circuits, f));
}

const quantile = (a, q) => {
  const s = [...a].sort((x, y) => x - y);
  return s.length === 0 ? NaN : s[Math.min(s.length - 1, Math.floor(q * s.length))];
};

/** The server's share of a move: setValues, solve, specs, the result and its JSON (median of `runs`). */
async function serverShare(file, runs = 60) {
  const { LiveSession } = await import(new URL('../dist/src/live/session.js', import.meta.url).href);
  const s = new LiveSession(file);
  s.load();
  const v = s.variables;
  const times = [];
  for (let i = 0; i < runs + 10; i++) {
    const t = (i % 11) / 10;
    const values = v.map((x) => x.lower + (x.upper - x.lower) * t);
    const t0 = performance.now();
    s.setValues(values);
    JSON.stringify(s.result());
    if (i >= 10) times.push(performance.now() - t0);
  }
  return quantile(times, 0.5);
}

/**
 * Moves every slider of every demo through its positions (`passes` times, after one unmeasured
 * pass) and returns per demo the page's latencies (median, 90th percentile, max, ms), the count of
 * results drawn, and the server's share (median, ms). Without Chromium, only the server's share.
 */
export async function benchLive({ passes = 2 } = {}) {
  const { startLive } = await import(new URL('../dist/src/live/server.js', import.meta.url).href);
  const rows = [];
  const haveBrowser = existsSync(CHROMIUM);
  const { chromium } = haveBrowser ? await import('playwright-core') : {};
  const dir = mkdtempSync(join(tmpdir(), 'sbx-bench-live-'));
  const context = haveBrowser ? await chromium.launchPersistentContext(join(dir, 'profile'), { executablePath: CHROMIUM, args: ARGS, viewport: { width: 1280, height: 900 } }) : undefined;
  try {
    for (const file of demos()) {
      const server = await serverShare(file);
      if (!context) {
        rows.push({ demo: file.slice(circuits.length), server });
        continue;
      }
      const live = await startLive({ netlist: file, watch: false });
      const page = await context.newPage();
      try {
        await page.goto(live.url);
        await page.waitForSelector('html[data-live-ready="true"]');
        const sliders = page.locator('[data-testid="slider"]');
        const n = await sliders.count();
        const move = async () => {
          for (let s = 0; s < n; s++) {
            const max = Number(await sliders.nth(s).getAttribute('max'));
            const stride = Math.max(1, Math.round(max / 40));
            for (let p = 0; p <= max; p += stride) await sliders.nth(s).fill(String(p));
            await page.waitForFunction(() => window.scatterboxLive.idle());
          }
        };
        await move(); // warm-up, unmeasured
        await page.evaluate(() => window.scatterboxLive.latencies.splice(0));
        for (let q = 0; q < passes; q++) await move();
        await page.waitForTimeout(100);
        const lat = await page.evaluate(() => window.scatterboxLive.latencies.slice());
        rows.push({ demo: file.slice(circuits.length), moves: lat.length, median: quantile(lat, 0.5), p90: quantile(lat, 0.9), max: Math.max(...lat), server });
      } finally {
        await page.close();
        await live.close();
      }
    }
  } finally {
    await context?.close();
    rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

/** One line per demo, for the bench's output. */
export function formatLive(rows) {
  return rows.map((r) =>
    r.median === undefined
      ? `live page of ${r.demo}: server share of a slider move ${r.server.toFixed(1)} ms (no Chromium at ${CHROMIUM}: the page was not measured)`
      : `live page of ${r.demo}: slider move to redrawn page median ${r.median.toFixed(1)} ms, 90 % ${r.p90.toFixed(1)} ms, max ${r.max.toFixed(1)} ms over ${r.moves} redraws (target ≤ 50 ms${r.median <= 50 ? ', met by the median' : ', NOT met by the median'}); the server's share ${r.server.toFixed(1)} ms`,
  );
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  for (const line of formatLive(await benchLive())) console.log(line);
}
