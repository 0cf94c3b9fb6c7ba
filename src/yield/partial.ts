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
import { endianness } from 'node:os';
import { envelopeRows, type EnvelopeRows, type SampleSet } from './run.js';
import { MAX_ENVELOPE_VALUES, MAX_PORTS, MAX_YIELD_SAMPLES } from '../limits.js';

export const PARTIAL_SCHEMA = 'scatterbox.yield-part/2';

/** What a partial file says about its run. */
export interface PartialMeta {
  netlist: string;
  digest: string;
  /** Samples of the whole run. */
  total: number;
  /** This shard, 1-based, of `shards`. */
  shard: number;
  shards: number;
  /** The yield target of the netlist's `yield min=`, if it has one. */
  min?: number;
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

/**
 * Numbers of a partial file: the bytes of IEEE 754 doubles, little-endian, in base64 (RFC 4648):
 * exact (every bit kept, −∞ and NaN included) and quick to write and read.
 */
export function encodeDoubles(a: Float64Array): string {
  if (endianness() === 'LE') return Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('base64');
  const b = Buffer.alloc(a.byteLength);
  for (let i = 0; i < a.length; i++) b.writeDoubleLE(a[i]!, 8 * i);
  return b.toString('base64');
}

const BASE64 = /^[A-Za-z0-9+/]*={0,2}$/;

/** The doubles of {@link encodeDoubles}: exactly `count` of them, or undefined. */
export function decodeDoubles(text: unknown, count: number): Float64Array | undefined {
  if (typeof text !== 'string' || text.length % 4 !== 0 || !BASE64.test(text)) return undefined;
  const b = Buffer.from(text, 'base64');
  if (b.length !== 8 * count) return undefined;
  const out = new Float64Array(count);
  if (endianness() === 'LE') new Uint8Array(out.buffer).set(b);
  else for (let i = 0; i < count; i++) out[i] = b.readDoubleLE(8 * i);
  return out;
}

/** A partial file's text: JSON, the per-sample numbers in {@link encodeDoubles} form. */
export function formatPartial(set: SampleSet, meta: PartialMeta): string {
  const errors: [number, string][] = [];
  set.errors.forEach((e, i) => {
    if (e) errors.push([i, e]);
  });
  const env = set.envelope;
  const doc = {
    schema: PARTIAL_SCHEMA,
    ...meta,
    seed: set.seed,
    first: set.first,
    count: set.count,
    specs: set.specs,
    tolerances: set.tolerances,
    errors,
    margins: encodeDoubles(set.margins),
    draws: encodeDoubles(set.draws),
    values: encodeDoubles(set.values),
    ...(env ? { envelope: { samples: env.samples, ports: env.ports, rows: env.rows, frequencies: encodeDoubles(env.frequencies), magnitudes: encodeDoubles(env.magnitudes) } } : {}),
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
  const intIn = (o: Record<string, unknown>, k: string, min: number, max = MAX_YIELD_SAMPLES) => {
    const v = o[k];
    if (typeof v !== 'number' || !Number.isSafeInteger(v) || v < min || v > max) throw bad(`\`${k}\` is not a whole number from ${min} to ${max}`);
    return v;
  };
  const int = (k: string, min: number) => intIn(doc, k, min, k === 'seed' ? Number.MAX_SAFE_INTEGER : MAX_YIELD_SAMPLES);
  const str = (k: string) => {
    const v = doc[k];
    if (typeof v !== 'string') throw bad(`\`${k}\` is not text`);
    return v;
  };
  const meta: PartialMeta = { netlist: str('netlist'), digest: str('digest'), total: int('total', 1), shard: int('shard', 1), shards: int('shards', 1) };
  const seed = int('seed', 0);
  const first = int('first', 0);
  const count = int('count', 0);
  if (doc.min !== undefined) {
    if (typeof doc.min !== 'number' || !(doc.min >= 0 && doc.min <= 1)) throw bad('`min` is not a fraction from 0 to 1');
    meta.min = doc.min;
  }
  if (meta.shard > meta.shards) throw bad('its shard numbers do not fit');
  const [f, c] = shardRange(meta.total, meta.shard, meta.shards);
  if (f !== first || c !== count) throw bad(`shard ${meta.shard} of ${meta.shards} holds samples ${f}… but the file says ${first}…`);
  const specs = doc.specs;
  const tolerances = doc.tolerances;
  if (!Array.isArray(specs) || !specs.every((s) => isObject(s) && typeof s.name === 'string' && typeof s.figure === 'string' && typeof s.unit === 'string' && typeof s.scale === 'number')) throw bad('its specs');
  if (!Array.isArray(tolerances) || !tolerances.every((t) => isObject(t) && typeof t.name === 'string' && (t.unit === null || typeof t.unit === 'string') && (t.lot === undefined || typeof t.lot === 'string'))) throw bad('its tolerances');
  const nS = specs.length;
  const nT = tolerances.length;
  if (count * Math.max(nS, nT, 1) > 16 * MAX_YIELD_SAMPLES) throw bad('its size');
  const margins = decodeDoubles(doc.margins, count * nS);
  const draws = decodeDoubles(doc.draws, count * nT);
  const values = decodeDoubles(doc.values, count * nT);
  if (!margins) throw bad('its margins');
  if (!draws) throw bad('its draws');
  if (!values) throw bad('its values');
  const errors: (string | null)[] = new Array<string | null>(count).fill(null);
  if (!Array.isArray(doc.errors)) throw bad('its errors');
  for (const e of doc.errors as unknown[]) {
    if (!Array.isArray(e) || e.length !== 2 || typeof e[0] !== 'number' || !Number.isSafeInteger(e[0]) || e[0] < 0 || e[0] >= count || typeof e[1] !== 'string') throw bad('its errors');
    errors[e[0]] = e[1];
  }
  let envelope: EnvelopeRows | undefined;
  if (doc.envelope !== undefined) {
    const env = doc.envelope;
    if (!isObject(env)) throw bad('its envelope');
    const samples = intIn(env, 'samples', 1);
    const ports = intIn(env, 'ports', 1, MAX_PORTS);
    const rows = intIn(env, 'rows', 0);
    if (rows !== envelopeRows(first, count, samples)) throw bad('its envelope rows');
    const fb = typeof env.frequencies === 'string' ? env.frequencies.length : 0;
    const points = Math.floor((fb / 4) * 3 / 8);
    const frequencies = decodeDoubles(env.frequencies, points);
    if (!frequencies || rows * points * ports * ports > MAX_ENVELOPE_VALUES) throw bad('its envelope frequencies');
    const magnitudes = decodeDoubles(env.magnitudes, rows * points * ports * ports);
    if (!magnitudes) throw bad('its envelope magnitudes');
    envelope = { samples, ports, rows, frequencies, magnitudes };
  }
  return { set: { seed, first, count, specs: specs as SampleSet['specs'], tolerances: tolerances as SampleSet['tolerances'], margins, draws, values, errors, ...(envelope ? { envelope } : {}) }, meta };
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
    if (p.set.seed !== a.set.seed || m.total !== a.meta.total || m.shards !== a.meta.shards || m.min !== a.meta.min) throw new PartialError(`${p.file} is not of the same run as ${a.file} (seed, samples or shard count differ)`);
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
  const env = a.set.envelope;
  for (const p of parts) {
    const e = p.set.envelope;
    if (!env !== !e || (env && e && (e.samples !== env.samples || e.ports !== env.ports || !same(Array.from(e.frequencies), Array.from(env.frequencies))))) {
      throw new PartialError(`${p.file} and ${a.file} differ in their envelopes (the number of envelope samples or the sweep)`);
    }
  }
  const margins = new Float64Array(total * nS);
  const draws = new Float64Array(total * nT);
  const values = new Float64Array(total * nT);
  const stride = env ? env.frequencies.length * env.ports * env.ports : 0;
  const envRows = env ? envelopeRows(0, total, env.samples) : 0;
  const magnitudes = new Float64Array(envRows * stride);
  const errors: (string | null)[] = [];
  for (let i = 1; i <= a.meta.shards; i++) {
    const p = byShard.get(i)!;
    margins.set(p.set.margins, p.set.first * nS);
    draws.set(p.set.draws, p.set.first * nT);
    values.set(p.set.values, p.set.first * nT);
    if (p.set.envelope && p.set.envelope.rows > 0) magnitudes.set(p.set.envelope.magnitudes, p.set.first * stride);
    errors.push(...p.set.errors);
  }
  const envelope = env ? { envelope: { samples: env.samples, ports: env.ports, frequencies: env.frequencies, rows: envRows, magnitudes } } : {};
  return { set: { ...a.set, first: 0, count: total, margins, draws, values, errors, ...envelope }, meta: { ...a.meta, shard: 1, shards: 1 } };
}
