// The `fit` figure of the benchmark: the band-pass demo (circuits/bandpass-2g4.sbx) with every
// design variable detuned by 20 % (each value × 1.2, kept within its range), fitted until every
// spec passes. One core (the fit runs in this thread; no worker pool). Called by scripts/bench.mjs:
//
//   import { benchFit } from './bench-fit.mjs';
//   const { seconds, evaluations, gradients, pass } = await benchFit();
//
// Run alone: `npm run build && node scripts/bench-fit.mjs`. Never a test: nothing here asserts a time.
import { fileURLToPath } from 'node:url';

const lib = new URL('../dist/src/index.js', import.meta.url).href;
const demo = fileURLToPath(new URL('../circuits/bandpass-2g4.sbx', import.meta.url));

/**
 * Times `fit` of the band-pass demo from a 20 % detuned start: the median of `runs` runs (after
 * `warmup` unmeasured ones), each on a fresh model. Returns the median time in seconds (model
 * loading excluded, the fit and its snapping included), the evaluations of that run (spec checks,
 * with or without derivatives) and of them those with derivatives, and whether every spec passed.
 */
export async function benchFit({ runs = 5, warmup = 1, detune = 1.2 } = {}) {
  const { DesignModel, fit } = await import(lib);
  const one = () => {
    const model = DesignModel.load(demo);
    const start = Array.from(model.values, (x, i) => {
      const v = model.variables[i];
      return Math.min(v.upper, Math.max(v.lower, x * detune));
    });
    model.setValues(start);
    const t0 = performance.now();
    const r = fit(model);
    const seconds = (performance.now() - t0) / 1000;
    return { seconds, evaluations: r.evaluations, gradients: r.gradients, pass: r.pass };
  };
  for (let i = 0; i < warmup; i++) one();
  const all = Array.from({ length: runs }, one).sort((a, b) => a.seconds - b.seconds);
  const median = all[Math.floor(all.length / 2)];
  return { seconds: median.seconds, evaluations: median.evaluations, gradients: median.gradients, pass: all.every((r) => r.pass) };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const r = await benchFit();
  console.log(`fit of the band-pass demo from a 20 % detuned start: ${(r.seconds * 1000).toFixed(0)} ms, ${r.evaluations} evaluations (${r.gradients} with derivatives), ${r.pass ? 'every spec passes' : 'a spec fails'}`);
}
