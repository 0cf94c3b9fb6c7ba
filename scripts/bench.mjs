#!/usr/bin/env node
// scatterbox benchmark: builds its own workloads, solves them, prints one table.
// Not a test: it measures this machine. Run with `npm run bench` (which builds first).
//
// Each workload runs in a child process of its own so that its peak memory (maxRSS) is its own
// (the smaller ones in three, whose medians are taken). Times are medians of several runs, in
// microseconds per frequency point (the whole sweep's wall time divided by its points: stamping,
// factoring and solving every port).
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, cpus, tmpdir, totalmem } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = fileURLToPath(import.meta.url);
const lib = new URL('../dist/src/index.js', import.meta.url).href;
const parallelLib = new URL('../dist/src/solve/parallel.js', import.meta.url).href;
const sweepLib = new URL('../dist/src/solve/sweep.js', import.meta.url).href;
// Parallel runs reuse one pool (as a long-running caller would); the first WARM_RUNS runs of each
// workload are not counted for either mode, so both are measured in their steady state. On a
// fresh pool the two-thread sweeps settle slowly (measured, 20,001 points of the 100-section
// ladder: 200, 120, 120, 98, 83, 88, 69, 69, 61, 70, then 55–60 ms), one thread after one run.
const WARM_RUNS = 10;

function ladder(n, sweep) {
  const l = ['let l = 12 nH', 'let c = 4.7 pF'];
  for (let k = 0; k < n; k++) {
    l.push(`inductor l${k} a=n${k} b=n${k + 1} value=l q=40 at 500 MHz`);
    l.push(`capacitor c${k} a=n${k + 1} b=ground value=c esr=0.1 ohm`);
  }
  l.push('port 1 plus=n0', `port 2 plus=n${n}`, sweep);
  return l.join('\n') + '\n';
}

function mesh(side, sweep) {
  const l = [];
  const id = (i, j) => `m${i}_${j}`;
  for (let i = 0; i < side; i++) {
    for (let j = 0; j < side; j++) {
      if (i + 1 < side) l.push(`resistor rv${i}_${j} a=${id(i, j)} b=${id(i + 1, j)} value=10 ohm`);
      if (j + 1 < side) l.push(`resistor rh${i}_${j} a=${id(i, j)} b=${id(i, j + 1)} value=10 ohm`);
      l.push(`capacitor c${i}_${j} a=${id(i, j)} b=ground value=1 pF`);
    }
  }
  l.push(`port 1 plus=${id(0, 0)}`, `port 2 plus=${id(side - 1, side - 1)}`, sweep);
  return l.join('\n') + '\n';
}

/** A 16-port around a data block: the block's file is made first from 8 coupled line pairs. */
async function dataBlock(dir, sweep) {
  const { loadNetlist, solve, formatTouchstone } = await import(lib);
  const l = [];
  for (let k = 0; k < 8; k++) {
    l.push(`coupled_lines k${k} a1=a${k} b1=b${k} a2=a${k + 8} b2=b${k + 8} z0e=${60 + k} ohm z0o=${40 + k / 2} ohm theta=${60 + 10 * k} deg at 2 GHz`);
    l.push(`resistor x${k} a=b${k} b=a${(k + 1) % 8} value=${200 + 10 * k} ohm`);
  }
  const ports = [];
  for (let k = 0; k < 8; k++) ports.push(`a${k}`, `b${k + 8}`);
  ports.forEach((p, i) => l.push(`port ${i + 1} plus=${p}`));
  l.push('sweep linear start=100 MHz stop=4 GHz points=391');
  const net = solve(loadNetlist(l.join('\n') + '\n', 'gen.sbx').circuit);
  writeFileSync(join(dir, 'block16.s16p'), formatTouchstone(net, { digits: 17 }));
  const c = ['datafile d file="block16.s16p" ' + Array.from({ length: 16 }, (_, i) => `p${i + 1}=t${i}`).join(' ')];
  for (let i = 0; i < 16; i++) {
    c.push(`inductor li${i} a=t${i} b=u${i} value=${1 + i / 10} nH`, `capacitor ci${i} a=u${i} b=ground value=0.5 pF`, `port ${i + 1} plus=u${i}`);
  }
  c.push(sweep);
  return c.join('\n') + '\n';
}

function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** Child process: one workload, prints JSON {usPerPoint, usPerPointAll, rssMB, extra}. */
async function one(kind, size) {
  const { loadNetlist, solve } = await import(lib);
  const { solveSweepParallel, closeSweepPool } = await import(parallelLib);
  const { SweepRunner } = await import(sweepLib);
  const dir = mkdtempSync(join(tmpdir(), 'sbx-bench-'));
  // sweeps long enough that the one-off work (plan, ordering, first factorisation) counts little;
  // the 1,000- and 10,000-section ladders share one sweep, so that their ratio is per point alone
  const points = kind === 'ladder' ? (size >= 100000 ? 101 : size >= 1000 ? 4001 : 20001) : 2001;
  const sweep = kind === 'data16' ? `sweep linear start=100 MHz stop=4 GHz points=${points}` : `sweep linear start=1 MHz stop=3 GHz points=${points}`;
  let text;
  if (kind === 'ladder' || kind === 'mathjs') text = ladder(size, sweep);
  else if (kind === 'mesh') text = mesh(size, sweep);
  else if (kind === 'data16') text = await dataBlock(dir, sweep);
  else if (kind === 'design') return designEvaluation();
  else if (kind === 'yield') return yieldRun();
  else if (kind === 'elaborate') {
    // parse and elaborate a netlist of `size` elements
    const big = ladder(size / 2, 'sweep list freqs=1 GHz');
    const times = [];
    for (let r = 0; r < 3; r++) {
      const t0 = performance.now();
      loadNetlist(big, 'big.sbx');
      times.push(performance.now() - t0);
    }
    return { ms: median(times), rssMB: process.resourceUsage().maxRSS / 1024 };
  }
  const file = join(dir, 'w.sbx');
  writeFileSync(file, text);
  const { circuit } = loadNetlist(text, file);
  if (kind === 'mathjs') return mathjsBaseline(circuit, size);
  const reps = size >= 100000 ? 1 : 7;
  const times = [];
  const timesAll = [];
  // the 10,000-section process also sweeps the 1,000-section ladder right after each of its own
  // sweeps: the ratio of the two, pair by pair, is taken on the same host in the same seconds
  const small = kind === 'ladder' && size === 10000 ? loadNetlist(ladder(1000, sweep), 'small.sbx').circuit : undefined;
  const timesSmall = [];
  if (size < 100000) {
    for (let w = 0; w < WARM_RUNS; w++) {
      solve(circuit);
      if (small) solve(small);
      await solveSweepParallel(circuit, { jobs: availableParallelism() });
    }
  }
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    solve(circuit);
    times.push(performance.now() - t0);
    if (small) {
      const t2 = performance.now();
      solve(small);
      timesSmall.push(performance.now() - t2);
    }
    if (size < 100000) {
      const t1 = performance.now();
      await solveSweepParallel(circuit, { jobs: availableParallelism() });
      timesAll.push(performance.now() - t1);
    }
  }
  await closeSweepPool();
  // the one-off part alone: plan, ordering and the reference factorisation (not for the largest
  // ladder, whose peak memory is that of one sweep)
  const setups = [];
  for (let r = 0; r < (size >= 100000 ? 0 : 5); r++) {
    const t0 = performance.now();
    new SweepRunner(circuit, {});
    setups.push(performance.now() - t0);
  }
  const single = (median(times) * 1000) / points;
  // the speed-up of each alternating pair of runs, then their median: the host's speed drifts
  // from second to second, and a pair sees nearly the same host
  const all = timesAll.length ? { usPerPoint: (median(timesAll) * 1000) / points, speedup: median(times.map((t, r) => t / timesAll[r])), points } : undefined;
  const sizeRatio = small ? median(times.map((t, r) => t / timesSmall[r])) : undefined;
  return { usPerPoint: single, all, sizeRatio, setupMs: setups.length ? median(setups) : undefined, rssMB: process.resourceUsage().maxRSS / 1024, unknowns: circuit.nodeNames.length };
}

/**
 * One evaluation of a design after a variable change (DesignModel: the parameter graph and the
 * re-stamped plan) against a plain solve of the same frequencies (solveSweep of the elaborated
 * circuit, plan included), on the band-pass demo: the whole sweep, and the points the specs look
 * at. Alternated, the ratio of each pair, median of the pairs.
 */
async function designEvaluation() {
  const { DesignModel, loadNetlist, solve, evaluateSpecs, specPoints: specPointsOf } = await import(lib);
  const demo = fileURLToPath(new URL('../circuits/bandpass-2g4.sbx', import.meta.url));
  let text = readFileSync(demo, 'utf8');
  // the demo's variables (older copies of it had none: then the resonator inductance is one)
  if (!/\bvary\b/.test(text)) text = text.replace(/^let lres = 1\.5 nH/m, 'let lres = 1.5 nH vary 1 nH to 2 nH');
  const model = DesignModel.fromText(text, demo);
  const { circuit } = loadNetlist(text, demo);
  const x0 = model.values;
  const moved = Float64Array.from(x0);
  let flip = 0;
  const step = () => {
    moved.set(x0);
    moved[flip % moved.length] = x0[flip % moved.length] * (flip % 2 ? 1.01 : 0.99);
    flip++;
    model.setValues(moved);
  };
  const pairs = { sweep: [], specs: [] };
  const time = (f, n) => {
    const t0 = performance.now();
    for (let i = 0; i < n; i++) f();
    return (performance.now() - t0) / n;
  };
  // the spec points, as the model takes them (inside the bands, and their neighbours)
  const f = circuit.frequencies;
  const specPoints = specPointsOf(circuit);
  for (let w = 0; w < 200; w++) {
    step();
    model.solve();
    step();
    model.checkSpecs();
    solve(circuit);
    evaluateSpecs(circuit.specs, solve(circuit, { frequencies: specPoints }));
  }
  for (let r = 0; r < 15; r++) {
    const ev = time(() => {
      step();
      model.solve();
    }, 50);
    const plain = time(() => solve(circuit), 50);
    pairs.sweep.push(ev / plain);
    const evs = time(() => {
      step();
      model.checkSpecs();
    }, 50);
    const plains = time(() => evaluateSpecs(circuit.specs, solve(circuit, { frequencies: specPoints })), 50);
    pairs.specs.push(evs / plains);
  }
  let fit;
  try {
    const { benchFit } = await import(new URL('./bench-fit.mjs', import.meta.url).href);
    fit = await benchFit();
  } catch (e) {
    fit = { error: String(e?.message ?? e) };
  }
  return { sweepRatio: median(pairs.sweep), specRatio: median(pairs.specs), points: f.length, specPoints: specPoints.length, variables: model.variables.length, fit };
}

/**
 * Yield on the band-pass demo (its tolerances): 10,000 samples in one process (after 500
 * unmeasured), the cost of a sample against a plain solve of the spec frequencies (alternated,
 * median of the pairs' ratios), and a sharded run: 4 shards of 40,000 samples as separate
 * processes started together, then the merge, against one process doing all of them.
 */
async function yieldRun() {
  const { DesignModel, solve, evaluateSpecs, specPoints: specPointsOf } = await import(lib);
  const { runYield } = await import(new URL('../dist/src/yield/run.js', import.meta.url).href);
  const demo = fileURLToPath(new URL('../circuits/bandpass-2g4.sbx', import.meta.url));
  const model = DesignModel.load(demo);
  const c = model.circuit;
  runYield(model, { samples: 500, seed: 1 });
  const t0 = performance.now();
  runYield(model, { samples: 10000, seed: 2 });
  const tenThousand = (performance.now() - t0) / 1000;
  const specPoints = specPointsOf(c);
  const ratios = [];
  for (let r = 0; r < 11; r++) {
    let t = performance.now();
    runYield(model, { samples: 200, seed: 3 + r });
    const sample = (performance.now() - t) / 200;
    t = performance.now();
    for (let i = 0; i < 200; i++) evaluateSpecs(c.specs, solve(c, { frequencies: specPoints }));
    ratios.push(sample / ((performance.now() - t) / 200));
  }
  // sharded: separate processes, as a batch engine would start them; every process on one thread
  // (the shards are the parallelism here), the one-process run too
  const dir = mkdtempSync(join(tmpdir(), 'sbx-bench-yield-'));
  const bin = fileURLToPath(new URL('../bin/scatterbox.js', import.meta.url));
  const N = 4;
  const samples = 100000;
  const { spawn } = await import('node:child_process');
  const runAll = (argsList) =>
    Promise.all(argsList.map((args) => new Promise((res, rej) => spawn(process.execPath, [bin, ...args], { stdio: 'ignore' }).on('exit', (code) => (code === 0 ? res() : rej(new Error(`exit ${code}`)))))));
  const base = ['yield', demo, '--samples', String(samples), '--seed', '5'];
  const timed = (args) => {
    const t = performance.now();
    const out = execFileSync(process.execPath, [bin, ...args], { encoding: 'utf8' });
    return { s: (performance.now() - t) / 1000, out };
  };
  const oneRun = timed([...base, '--jobs', '1', '-q']);
  const threaded = timed([...base, '--jobs', '2', '-q']);
  const t1 = performance.now();
  await runAll(Array.from({ length: N }, (_, i) => [...base, '--jobs', '1', '--shard', `${i + 1}/${N}`, '-o', join(dir, `p${i + 1}.json`), '-q']));
  const merged = execFileSync(process.execPath, [bin, 'merge', ...Array.from({ length: N }, (_, i) => join(dir, `p${i + 1}.json`)), '-q'], { encoding: 'utf8' });
  const sharded = (performance.now() - t1) / 1000;
  rmSync(dir, { recursive: true, force: true });
  const same = merged === oneRun.out && threaded.out === oneRun.out;
  return { tenThousand, sampleRatio: median(ratios), one: oneRun.s, sharded, speedup: oneRun.s / sharded, threaded: threaded.s, threadSpeedup: oneRun.s / threaded.s, same, samples, shards: N };
}

/** The plain dense baseline: each point assembled as a mathjs complex matrix and solved with lusolve. */
async function mathjsBaseline(circuit) {
  const { buildPlan, stampAt } = await import(new URL('../dist/src/plan/plan.js', import.meta.url).href);
  const { create, all } = await import('mathjs');
  const math = create(all, {});
  const plan = buildPlan(circuit);
  const n = plan.size;
  const vals = new Float64Array(2 * plan.slotRow.length);
  const points = 21;
  const t0 = performance.now();
  for (let k = 0; k < points; k++) {
    const w = 2 * Math.PI * (1e6 + (k * 3e9) / points);
    stampAt(plan, w, vals);
    const rows = Array.from({ length: n }, () => Array.from({ length: n }, () => math.complex(0, 0)));
    for (let s = 0; s < plan.slotRow.length; s++) {
      const r = plan.slotRow[s];
      const c = plan.slotCol[s];
      rows[r][c] = math.add(rows[r][c], math.complex(vals[2 * s], vals[2 * s + 1]));
    }
    const A = math.matrix(rows);
    for (let j = 0; j < plan.portPlus.length; j++) {
      const b = Array.from({ length: n }, (_, i) => (i === plan.portPlus[j] ? 2 / Math.sqrt(plan.portReference[j]) : 0));
      math.lusolve(A, b);
    }
  }
  return { usPerPoint: ((performance.now() - t0) * 1000) / points, rssMB: process.resourceUsage().maxRSS / 1024 };
}

/**
 * What two threads give on this machine at all, for two kinds of plain arithmetic loop: one bound
 * by the latency of a dependent chain, one by the throughput of independent multiply-adds (as a
 * sparse solve is). On one worker, then on two at once; medians of several rounds. Where the two
 * cores share their execution units (hyperthreads, a shared host), the second kind gains less.
 */
async function calibrate() {
  const { Worker } = await import('node:worker_threads');
  const code = `const { parentPort } = require('node:worker_threads');
    parentPort.on('message', (kind) => { const n = 4096; const a = new Float64Array(n), b = new Float64Array(n), c = new Float64Array(n);
      for (let i = 0; i < n; i++) { a[i] = i; b[i] = 1 / (i + 1); }
      let s = 0; const t = performance.now();
      if (kind === 'latency') { for (let r = 0; r < 8000; r++) for (let i = 0; i < n; i++) { a[i] = a[i] * 0.999 + i; s += a[i]; } }
      else { for (let r = 0; r < 8000; r++) for (let i = 0; i < n; i++) c[i] = a[i] * b[i] + c[i] * 0.5 - b[i] * 0.25; s = c[7]; }
      parentPort.postMessage(s !== 12345 ? performance.now() - t : 0); });`;
  const w1 = new Worker(code, { eval: true });
  const w2 = new Worker(code, { eval: true });
  const run = (w, kind) => new Promise((r) => { w.once('message', r); w.postMessage(kind); });
  const out = {};
  for (const kind of ['latency', 'throughput']) {
    await run(w1, kind);
    await run(w2, kind);
    const ratios = [];
    for (let k = 0; k < 7; k++) {
      let t = performance.now();
      await run(w1, kind);
      const one = performance.now() - t;
      t = performance.now();
      await Promise.all([run(w1, kind), run(w2, kind)]);
      ratios.push((2 * one) / (performance.now() - t));
    }
    out[kind] = median(ratios);
  }
  await w1.terminate();
  await w2.terminate();
  return out;
}

const arg = process.argv.indexOf('--one');
if (arg > 0) {
  const res = await one(process.argv[arg + 1], Number(process.argv[arg + 2]));
  process.stdout.write(JSON.stringify(res));
  process.exit(0);
}

function child(kind, size) {
  const out = execFileSync(process.execPath, ['--max-old-space-size=4096', here, '--one', kind, String(size)], { encoding: 'utf8', maxBuffer: 1 << 24 });
  return JSON.parse(out);
}

/** Processes per workload up to 10,000 sections (see the loop below). */
const CHILD_RUNS = 3;
const fmt = (x, d = 1) => (x === undefined ? '—' : x >= 100 ? x.toFixed(0) : x.toFixed(d));
const rows = [];
const results = {};
const workloads = [
  ['ladder N = 100', 'ladder', 100],
  ['ladder N = 1,000', 'ladder', 1000],
  ['ladder N = 10,000', 'ladder', 10000],
  ['RC mesh 30 × 30', 'mesh', 30],
  ['16-port data block', 'data16', 16],
  ['ladder N = 100,000 (101 points)', 'ladder', 100000],
];
// Timings on this host differ from one process to the next, and the host has slow spells of a
// minute or so, so the smaller workloads run in three processes each, taken in rounds (every
// workload once, then again), so that one slow spell does not take all three of one workload:
// each figure is the median of the three.
const runsOf = new Map(workloads.map(([label]) => [label, []]));
for (let round = 0; round < CHILD_RUNS; round++) {
  for (const [label, kind, size] of workloads) {
    const runs = size <= 10000 ? CHILD_RUNS : 1;
    if (round >= runs) continue;
    runsOf.get(label).push(child(kind, size));
    if (runsOf.get(label).length === runs) process.stderr.write(`${label}: done\n`);
  }
}
for (const [label, kind, size] of workloads) {
  const rs = runsOf.get(label);
  const mid = (f) => median(rs.map(f));
  const r = {
    usPerPoint: mid((x) => x.usPerPoint),
    all: rs[0].all ? { usPerPoint: mid((x) => x.all.usPerPoint), speedup: mid((x) => x.all.speedup) } : undefined,
    setupMs: rs[0].setupMs === undefined ? undefined : mid((x) => x.setupMs),
    rssMB: Math.max(...rs.map((x) => x.rssMB)),
  };
  results[`${kind}${size}`] = r;
  rows.push([label, fmt(r.usPerPoint), r.all ? fmt(r.all.usPerPoint) : '—', r.all ? `${r.all.speedup.toFixed(2)}×` : '—', fmt(r.setupMs), fmt(r.rssMB, 0)]);
}
const base = child('mathjs', 100);
const cal = await calibrate();
const el = child('elaborate', 100000);
const design = child('design', 0);
const yieldFigures = child('yield', 0);
// a whole command-line run on a small demo netlist, from process start to the written file: what
// a CI job pays per netlist (mostly loading the program and its libraries)
const cliRuns = [];
{
  const dir = mkdtempSync(join(tmpdir(), 'sbx-bench-cli-'));
  const bin = fileURLToPath(new URL('../bin/scatterbox.js', import.meta.url));
  const demo = fileURLToPath(new URL('../circuits/harmonic-lowpass-433.sbx', import.meta.url));
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    execFileSync(process.execPath, [bin, 'solve', demo, '-o', join(dir, 'out.s2p'), '--quiet']);
    cliRuns.push(performance.now() - t0);
  }
}
const cpu = cpus()[0]?.model ?? 'unknown CPU';
console.log(`scatterbox benchmark — Node ${process.version}, ${availableParallelism()} cores (${cpu}), ${(totalmem() / 2 ** 30).toFixed(0)} GiB`);
console.log('');
console.log('| workload | µs/point, 1 thread | µs/point, all cores | speed-up | set-up (ms) | peak memory (MB) |');
console.log('|---|---:|---:|---:|---:|---:|');
for (const r of rows) console.log(`| ${r.join(' | ')} |`);
console.log('');
const l100 = results.ladder100.usPerPoint;
console.log(`dense mathjs baseline, ladder N = 100: ${fmt(base.usPerPoint)} µs/point — ${(base.usPerPoint / l100).toFixed(0)}× slower than scatterbox`);
console.log(`parse and elaborate 100,000 elements: ${(el.ms / 1000).toFixed(2)} s (peak ${fmt(el.rssMB, 0)} MB)`);
console.log(`command line, one small demo netlist solved and written: ${(median(cliRuns) / 1000).toFixed(2)} s from process start (median of 5)`);
console.log(
  `design evaluation after a variable change (band-pass demo, ${design.variables} variables): ${design.sweepRatio.toFixed(2)}× a plain solve of its ${design.points} points, ${design.specRatio.toFixed(2)}× a plain solve of the ${design.specPoints} points its specs look at (target ≤ 1.2×; medians of 15 alternated pairs)`,
);
console.log(
  design.fit.error
    ? `fit of the band-pass demo: not measured (${design.fit.error})`
    : `fit of the band-pass demo from a 20 % detuned start: ${design.fit.seconds.toFixed(2)} s, ${design.fit.evaluations} evaluations, ${design.fit.pass ? 'every spec passes' : 'specs NOT all passing'} (target ≤ 1 s on one core)`,
);
console.log(
  `yield of the band-pass demo: 10,000 samples in ${yieldFigures.tenThousand.toFixed(2)} s (target ≤ 5 s); a sample costs ${yieldFigures.sampleRatio.toFixed(2)}× a plain solve of the spec frequencies (target ≤ 1.3×); ${yieldFigures.samples} samples in ${yieldFigures.shards} shards as separate processes (one thread each) plus the merge: ${yieldFigures.sharded.toFixed(2)} s against ${yieldFigures.one.toFixed(2)} s in one process on one thread, ${yieldFigures.speedup.toFixed(2)}× (target ≥ 1.7×); one process on 2 threads: ${yieldFigures.threaded.toFixed(2)} s, ${yieldFigures.threadSpeedup.toFixed(2)}×${yieldFigures.same ? '' : ' — RESULTS DIFFER'}`,
);
await import(new URL('./bench-live.mjs', import.meta.url).href).then(async ({ benchLive, formatLive }) => formatLive(await benchLive()).forEach((l) => console.log(l))).catch((e) => console.log(`live page: not measured (${e?.message ?? e})`));
console.log(`two threads of plain arithmetic on this machine: ${cal.latency.toFixed(2)}× one thread latency-bound, ${cal.throughput.toFixed(2)}× throughput-bound (medians of 7)`);
const pairRatio = median(runsOf.get('ladder N = 10,000').map((x) => x.sizeRatio));
console.log(
  `ladder cost N = 10,000 / N = 1,000: ${pairRatio.toFixed(1)}× for 10× the size (the two swept back to back in one process, median of the pairs; ` +
    `between the table's separate processes: ${(results.ladder10000.usPerPoint / results.ladder1000.usPerPoint).toFixed(1)}×)`,
);
