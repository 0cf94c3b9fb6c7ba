/**
 * Shards of a yield run: one slice of the samples computed on its own (`yield --shard I/N`),
 * written as a partial file, and the partials merged (`merge`) into the result a single run gives.
 *
 * Shard I of N (1 ≤ I ≤ N) takes samples ⌊(I − 1)·n/N⌋ … ⌊I·n/N⌋ − 1. Sample k's draws depend
 * only on (seed, k) (src/yield/sampler.ts), and the summary only on the per-sample results in
 * sample order (src/yield/run.ts summarizeYield), so the merged shards give the same bytes as one
 * run. A partial carries a digest of the netlist (every source file, the --set and --sweep
 * options): partials of different designs are never merged.
 *
 * @module
 */
import { createHash } from 'node:crypto';
import type { SampleSet } from './run.js';
import { MAX_YIELD_SAMPLES } from '../limits.js';

export const PARTIAL_SCHEMA = 'scatterbox.yield-part/1';

/** What a partial file says about its run. */
export interface PartialMeta {
  netlist: string;
  digest: string;
  /** Samples of the whole run. */
  total: number;
  /** This shard, 1-based, of `shards`. */
  shard: number;
  shards: number;
}

/** A partial file or a set of them that cannot be read or merged. */
export class PartialError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'PartialError';
  }
}

/** `I/N` of `--shard`: 1 ≤ I ≤ N. */
export function parseShard(text: string): { shard: number; shards: number } {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const shard = m ? Number(m[1]) : NaN;
  const shards = m ? Number(m[2]) : NaN;
  if (!m || !Number.isSafeInteger(shard) || !Number.isSafeInteger(shards) || shards < 1 || shard < 1 || shard > shards || shards > MAX_YIELD_SAMPLES) {
    throw new PartialError(`--shard takes I/N with 1 ≤ I ≤ N (e.g. 2/4), not \`${text.length > 40 ? `${text.slice(0, 40)}…` : text}\``);
  }
  return { shard, shards };
}

/** The samples of shard I of N of a run of `total`: [first, count]. */
export function shardRange(total: number, shard: number, shards: number): [number, number] {
  const a = Math.floor(((shard - 1) * total) / shards);
  const b = Math.floor((shard * total) / shards);
  return [a, b - a];
}

/** A digest of the design a run evaluates: its source files (by name) and the options that change it. */
export function designDigest(sources: ReadonlyMap<string, string>, options: { set?: string[]; sweep?: string }): string {
  const h = createHash('sha256');
  for (const name of [...sources.keys()].sort()) h.update(`${name}\u0000${sources.get(name)}\u0000`);
  h.update(JSON.stringify({ set: options.set ?? [], sweep: options.sweep ?? null }));
  return h.digest('hex');
}

/** A partial file's text. */
export function formatPartial(set: SampleSet, meta: PartialMeta): string {
  const nS = set.specs.length;
  const nT = set.tolerances.length;
  const doc = {
    schema: PARTIAL_SCHEMA,
    ...meta,
    seed: set.seed,
    first: set.first,
    count: set.count,
    specs: set.specs,
    tolerances: set.tolerances,
    samples: Array.from({ length: set.count }, (_, i) => ({
      margins: Array.from(set.margins.subarray(i * nS, (i + 1) * nS), (m) => (Number.isFinite(m) ? m : null)),
      draws: Array.from(set.draws.subarray(i * nT, (i + 1) * nT)),
      ...(set.errors[i] ? { error: set.errors[i] } : {}),
    })),
  };
  return JSON.stringify(doc) + '\n';
}

const isObject = (x: unknown): x is Record<string, unknown> => typeof x === 'object' && x !== null && !Array.isArray(x);

/** Reads a partial file (`file` names it in messages). */
export function parsePartial(text: string, file: string): { set: SampleSet; meta: PartialMeta } {
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch {
    throw new PartialError(`${file}: not a partial yield file (not JSON)`);
  }
  const bad = (what: string) => new PartialError(`${file}: not a partial yield file of this version (${what})`);
  if (!isObject(doc) || doc.schema !== PARTIAL_SCHEMA) throw bad(`its schema is not ${PARTIAL_SCHEMA}`);
  const int = (k: string, min: number) => {
    const v = doc[k];
    if (typeof v !== 'number' || !Number.isSafeInteger(v) || v < min) throw bad(`\`${k}\` is not a whole number from ${min}`);
    return v;
  };
  const str = (k: string) => {
    const v = doc[k];
    if (typeof v !== 'string') throw bad(`\`${k}\` is not text`);
    return v;
  };
  const meta: PartialMeta = { netlist: str('netlist'), digest: str('digest'), total: int('total', 1), shard: int('shard', 1), shards: int('shards', 1) };
  const seed = int('seed', 0);
  const first = int('first', 0);
  const count = int('count', 0);
  if (meta.shard > meta.shards || meta.total > MAX_YIELD_SAMPLES) throw bad('its shard numbers do not fit');
  const [f, c] = shardRange(meta.total, meta.shard, meta.shards);
  if (f !== first || c !== count) throw bad(`shard ${meta.shard} of ${meta.shards} holds samples ${f}… but the file says ${first}…`);
  const specs = doc.specs;
  const tolerances = doc.tolerances;
  if (!Array.isArray(specs) || !specs.every((s) => isObject(s) && typeof s.name === 'string' && typeof s.figure === 'string' && typeof s.unit === 'string' && typeof s.scale === 'number')) throw bad('its specs');
  if (!Array.isArray(tolerances) || !tolerances.every((t) => isObject(t) && typeof t.name === 'string' && (t.lot === undefined || typeof t.lot === 'string'))) throw bad('its tolerances');
  const samples = doc.samples;
  if (!Array.isArray(samples) || samples.length !== count) throw bad('its samples');
  const nS = specs.length;
  const nT = tolerances.length;
  const margins = new Float64Array(count * nS);
  const draws = new Float64Array(count * nT);
  const errors: (string | null)[] = [];
  samples.forEach((s: unknown, i) => {
    if (!isObject(s) || !Array.isArray(s.margins) || s.margins.length !== nS || !Array.isArray(s.draws) || s.draws.length !== nT) throw bad(`sample ${first + i}`);
    s.margins.forEach((m: unknown, q) => {
      if (m !== null && typeof m !== 'number') throw bad(`sample ${first + i}`);
      margins[i * nS + q] = m === null ? -Infinity : m;
    });
    s.draws.forEach((d: unknown, q) => {
      if (typeof d !== 'number') throw bad(`sample ${first + i}`);
      draws[i * nT + q] = d;
    });
    if (s.error !== undefined && typeof s.error !== 'string') throw bad(`sample ${first + i}`);
    errors.push((s.error as string | undefined) ?? null);
  });
  return { set: { seed, first, count, specs: specs as SampleSet['specs'], tolerances: tolerances as SampleSet['tolerances'], margins, draws, errors }, meta };
}

/** Merges the partials of one run (any order) into the set a single run gives; every shard exactly once. */
export function mergePartials(parts: readonly { set: SampleSet; meta: PartialMeta; file: string }[]): { set: SampleSet; meta: PartialMeta } {
  if (parts.length === 0) throw new PartialError('no partial files to merge');
  const a = parts[0]!;
  const same = (x: unknown, y: unknown) => JSON.stringify(x) === JSON.stringify(y);
  const byShard = new Map<number, (typeof parts)[number]>();
  for (const p of parts) {
    const m = p.meta;
    if (m.digest !== a.meta.digest) throw new PartialError(`${p.file} is a run of another design than ${a.file} (the netlist, its files or the --set/--sweep options differ)`);
    if (p.set.seed !== a.set.seed || m.total !== a.meta.total || m.shards !== a.meta.shards) throw new PartialError(`${p.file} is not of the same run as ${a.file} (seed, samples or shard count differ)`);
    if (!same(p.set.specs, a.set.specs) || !same(p.set.tolerances, a.set.tolerances)) throw new PartialError(`${p.file} has other specs or tolerances than ${a.file}`);
    const dup = byShard.get(m.shard);
    if (dup) throw new PartialError(`shard ${m.shard} of ${m.shards} is given twice (${dup.file} and ${p.file})`);
    byShard.set(m.shard, p);
  }
  const missing: number[] = [];
  for (let i = 1; i <= a.meta.shards; i++) if (!byShard.has(i)) missing.push(i);
  if (missing.length > 0) throw new PartialError(`shard${missing.length === 1 ? '' : 's'} ${missing.slice(0, 10).join(', ')}${missing.length > 10 ? ' …' : ''} of ${a.meta.shards} ${missing.length === 1 ? 'is' : 'are'} missing`);
  const nS = a.set.specs.length;
  const nT = a.set.tolerances.length;
  const total = a.meta.total;
  const margins = new Float64Array(total * nS);
  const draws = new Float64Array(total * nT);
  const errors: (string | null)[] = [];
  for (let i = 1; i <= a.meta.shards; i++) {
    const p = byShard.get(i)!;
    margins.set(p.set.margins, p.set.first * nS);
    draws.set(p.set.draws, p.set.first * nT);
    errors.push(...p.set.errors);
  }
  return { set: { ...a.set, first: 0, count: total, margins, draws, errors }, meta: { ...a.meta, shard: 1, shards: 1 } };
}
