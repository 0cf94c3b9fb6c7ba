#!/usr/bin/env node
// `npm run fuzz`: a seeded fuzz run of the compiled library (dist/) on mutated and generated
// netlists and network-data files (engine: test/fuzz/engine.mjs), in child processes with a
// watchdog. Prints counts, writes every failing input to fuzz-out/ grouped by class, and exits
// non-zero on any crash, hang or non-finite output.
//
//   npm run fuzz                                  # 20,000 netlists and 5,000 data files, seed 1
//   npm run fuzz -- --seed 7 --netlists 2000 --data 500
//   node scripts/fuzz.mjs --replay fuzz-out/crash/003-…/netlist-17.case.json
//
// Options: --seed N (1), --netlists N (20000), --data N (5000), --workers N (2), --timeout ms
// (2000, per input), --scale 0..1 (1: sizes of large items up to 10,000 nested parentheses or a
// 1,000,000-character string), --out DIR (fuzz-out), --save N (inputs saved per class, 100),
// --minimize N (delta-debugging runs per class, 120; 0 turns it off), --replay FILE.
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { dataCase, describeCase, failureClass, makeDictionary, makeRng, netlistCase, randomSpec } from '../test/fuzz/engine.mjs';
import { minimizeText } from '../test/fuzz/minimize.mjs';
import { FuzzPool, loadCorpus } from '../test/fuzz/pool.mjs';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const LIB = join(ROOT, 'dist/src/index.js');

function parseArgs(argv) {
  const o = { seed: 1, netlists: 20000, data: 5000, workers: 2, timeout: 2000, scale: 1, out: 'fuzz-out', save: 100, minimize: 120, replay: undefined };
  for (let i = 0; i < argv.length; i++) {
    const m = /^--([a-z]+)(?:=(.*))?$/.exec(argv[i]);
    if (!m || !(m[1] in o)) throw new Error(`unknown option ${argv[i]} (see the comment at the top of scripts/fuzz.mjs)`);
    const v = m[2] ?? argv[++i];
    if (v === undefined) throw new Error(`--${m[1]} needs a value`);
    if (m[1] === 'out' || m[1] === 'replay') o[m[1]] = v;
    else {
      const n = Number(v);
      if (!Number.isFinite(n) || n < 0) throw new Error(`--${m[1]} takes a non-negative number, got ${v}`);
      o[m[1]] = n;
    }
  }
  return o;
}

const opts = parseArgs(process.argv.slice(2));
if (!existsSync(LIB)) {
  console.error(`fuzz: ${LIB} is missing; build first (npm run build), or run npm run fuzz`);
  process.exit(2);
}
const lib = await import(LIB);
const corpus = loadCorpus(join(ROOT, 'circuits'));
const dict = makeDictionary(lib.ELEMENTS);
const pool = new FuzzPool({ libPath: LIB, workers: opts.workers, timeoutMs: opts.timeout });

const build = (kind, spec, scale) => (kind === 'netlist' ? netlistCase(spec, corpus, dict, scale) : dataCase(spec, corpus, dict, scale));

if (opts.replay) {
  const rec = JSON.parse(readFileSync(opts.replay, 'utf8'));
  const c = rec.case ?? build(rec.kind, rec.spec, rec.scale);
  const o = await pool.run(c);
  console.log(describeCase(c));
  console.log(`\n${o.status} (${o.ms} ms): ${o.reason}`);
  if (o.stack) console.log(o.stack);
  await pool.close();
  process.exit(o.status === 'crash' || o.status === 'hang' || o.status === 'nonfinite' ? 1 : 0);
}

const FAIL = new Set(['crash', 'hang', 'nonfinite']);
const counts = { inputs: 0, ok: 0, located: 0, documented: 0, crash: 0, hang: 0, nonfinite: 0 };
const byKind = { netlist: { ...counts }, data: { ...counts } };
/** @type {Map<string, { status: string, count: number, dir: string, first: any, reasons: string[] }>} */
const classes = new Map();
const documented = new Map();
const out = resolve(opts.out);
rmSync(out, { recursive: true, force: true });
mkdirSync(out, { recursive: true });

function slug(s) {
  return s.replace(/^[a-z]+: /, '').replace(/[^A-Za-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 60) || 'x';
}

/** Hangs have no message: they are grouped by what the input started from. */
const classOf = (c, o) => (o.status === 'hang' ? `hang: ${c.kind} from ${c.origin ?? '?'}` : failureClass(o.status, o.reason));

function save(kind, i, spec, c, o) {
  const cls = classOf(c, o);
  let entry = classes.get(cls);
  if (!entry) {
    const dir = join(out, o.status, `${String(classes.size + 1).padStart(3, '0')}-${slug(cls)}`);
    mkdirSync(dir, { recursive: true });
    entry = { status: o.status, count: 0, dir, first: { kind, i, spec, c, o }, reasons: [], hangs: [] };
    classes.set(cls, entry);
  }
  entry.count++;
  if (o.status === 'hang' && entry.hangs.length < 3) entry.hangs.push(c);
  if (entry.count > opts.save) return;
  const base = `${kind}-${i}`;
  const ext = kind === 'netlist' ? '.sbx' : c.name.replace(/^.*?(\.[^./]*)?$/, '$1') || '.txt';
  writeFileSync(join(entry.dir, base + ext), kind === 'netlist' ? c.files[c.main] : c.text);
  if (kind === 'netlist' && c.changed) {
    for (const f of c.changed.slice(0, 20)) {
      const p = join(entry.dir, `${base}.files`, f);
      mkdirSync(dirname(p), { recursive: true });
      writeFileSync(p, c.files[f]);
    }
  }
  writeFileSync(join(entry.dir, `${base}.case.json`), JSON.stringify({ kind, spec, scale: opts.scale, seed: opts.seed, outcome: o }, null, 1));
  const line = `${base}${ext}\t${o.ms} ms\t${o.reason.split('\n')[0]}\n`;
  writeFileSync(join(entry.dir, 'reasons.tsv'), line, { flag: 'a' });
}

function record(kind, i, spec, c, o) {
  counts.inputs++;
  byKind[kind].inputs++;
  counts[o.status]++;
  byKind[kind][o.status]++;
  if (FAIL.has(o.status)) save(kind, i, spec, c, o);
  else if (o.status === 'documented') {
    const cls = failureClass(o.status, o.reason).replace(/\(.*$/, '');
    documented.set(cls, (documented.get(cls) ?? 0) + 1);
  }
}

const t0 = Date.now();
const total = opts.netlists + opts.data;
async function runAll() {
  const rngN = makeRng(opts.seed);
  const rngD = makeRng(opts.seed ^ 0x5bd1e995);
  const jobs = [];
  for (let i = 0; i < opts.netlists; i++) jobs.push(['netlist', i, rngN]);
  for (let i = 0; i < opts.data; i++) jobs.push(['data', i, rngD]);
  // Interleave the two kinds deterministically; specs are drawn in order per kind, so a case
  // depends only on the seed and its index.
  const specs = { netlist: [], data: [] };
  let next = 0;
  const inFlight = new Set();
  const order = jobs.map((j, k) => ({ j, key: j[0] === 'netlist' ? j[1] / Math.max(1, opts.netlists) : j[1] / Math.max(1, opts.data), k })).sort((a, b) => a.key - b.key || a.k - b.k);
  for (const j of jobs) specs[j[0]].push(randomSpec(j[2]));
  while (next < order.length || inFlight.size) {
    while (next < order.length && inFlight.size < opts.workers * 2) {
      const [kind, i] = order[next++].j;
      const spec = specs[kind][i];
      const c = build(kind, spec, opts.scale);
      const p = pool.run(c).then((o) => {
        record(kind, i, spec, c, o);
        inFlight.delete(p);
        if (counts.inputs % 1000 === 0) progress();
      });
      inFlight.add(p);
    }
    await Promise.race(inFlight);
  }
}

function progress() {
  const s = ((Date.now() - t0) / 1000).toFixed(0);
  process.stderr.write(`fuzz: ${counts.inputs}/${total} inputs, ${s} s: ${counts.crash} crashes, ${counts.hang} hangs, ${counts.nonfinite} non-finite\n`);
}

await runAll();

// Shrink the first input of each failing class (delta debugging on its main text) while it keeps
// failing in the same class.
const minimal = new Map();
if (opts.minimize > 0) {
  for (const [cls, e] of classes) {
    const { kind, spec, c } = e.first;
    const budget = e.status === 'hang' ? Math.min(30, opts.minimize) : opts.minimize;
    const withText = (t) => (kind === 'netlist' ? { ...c, files: { ...c.files, [c.main]: t } } : { ...c, text: t });
    const still = async (t) => {
      const o = await pool.run(withText(t));
      return classOf(c, o) === cls;
    };
    const text = kind === 'netlist' ? c.files[c.main] : c.text;
    // a text of megabytes is not shrunk (each step would copy it, and this process would run out of memory)
    if (text.length > 1_000_000) continue;
    const small = await minimizeText(text, still, budget);
    const mc = withText(small);
    const o = await pool.run(mc);
    minimal.set(cls, { c: mc, o });
    writeFileSync(join(e.dir, 'minimal.txt'), `${cls}\n\n${describeCase(mc)}\n\n${o.status} (${o.ms} ms): ${o.reason}\n${o.stack ?? ''}\n`);
    writeFileSync(join(e.dir, 'minimal.case.json'), JSON.stringify({ kind, case: mc, spec, outcome: o }, null, 1));
  }
}
await pool.close();

// On a busy machine a slow case can pass the watchdog: run up to three inputs of each hang class
// again with a watchdog 15 times as long, and report how long they take.
const confirm = new Map();
const hangClasses = [...classes.entries()].filter(([, e]) => e.status === 'hang');
if (hangClasses.length) {
  const long = new FuzzPool({ libPath: LIB, workers: opts.workers, timeoutMs: opts.timeout * 15 });
  for (const [cls, e] of hangClasses) {
    const results = await Promise.all(e.hangs.map((c) => long.run(c)));
    confirm.set(cls, results.map((o) => (o.status === 'hang' ? `> ${opts.timeout * 15} ms` : `${o.ms} ms (${o.status})`)).join(', '));
  }
  await long.close();
}

// Report
const secs = ((Date.now() - t0) / 1000).toFixed(0);
const lines = [];
lines.push(`fuzz: seed ${opts.seed}, ${opts.netlists} netlists, ${opts.data} data files, scale ${opts.scale}, ${opts.workers} workers, watchdog ${opts.timeout} ms, ${secs} s`);
lines.push('');
lines.push('| | inputs | ok | located errors | documented errors | crashes | hangs | non-finite |');
lines.push('|---|---|---|---|---|---|---|---|');
for (const [name, c] of [['netlists', byKind.netlist], ['data files', byKind.data], ['total', counts]]) {
  lines.push(`| ${name} | ${c.inputs} | ${c.ok} | ${c.located} | ${c.documented} | ${c.crash} | ${c.hang} | ${c.nonfinite} |`);
}
lines.push('');
const sorted = [...classes.entries()].sort((a, b) => b[1].count - a[1].count);
if (sorted.length) {
  lines.push(`failing classes (${sorted.length}), inputs saved in ${opts.out}/:`);
  for (const [cls, e] of sorted) {
    lines.push(`  ${String(e.count).padStart(6)}  ${cls}   [${e.dir.slice(out.length + 1)}]`);
    if (confirm.has(cls)) lines.push(`          run again with a ${opts.timeout * 15} ms watchdog: ${confirm.get(cls)}`);
  }
}
if (documented.size) {
  lines.push('');
  lines.push('documented errors without a location (not failures):');
  for (const [cls, n] of [...documented.entries()].sort((a, b) => b[1] - a[1]).slice(0, 25)) lines.push(`  ${String(n).padStart(6)}  ${cls}`);
}
const report = lines.join('\n');
console.log(report);
let md = `# Fuzz run\n\n${report}\n`;
for (const [cls, e] of sorted) {
  const m = minimal.get(cls);
  const show = m ?? { c: e.first.c, o: e.first.o };
  md += `\n## ${cls} (${e.count})\n\n\`\`\`\n${describeCase(show.c, 1500)}\n\`\`\`\n\n\`\`\`\n${show.o.status}: ${show.o.reason}\n${show.o.stack ?? ''}\n\`\`\`\n`;
}
writeFileSync(join(out, 'summary.md'), md);
process.exit(counts.crash + counts.hang + counts.nonfinite > 0 ? 1 : 0);
