/**
 * The counter-based generator of yield runs (src/yield/random.ts).
 *
 * Sources:
 * - [KAT] Known-answer vectors of Philox4x32-10 published with the Random123 library
 *   (kat_vectors) of Salmon, Moraes, Dror & Shaw, "Parallel random numbers: as easy as 1, 2, 3",
 *   SC 2011. The three vectors below are (from memory); they are reproduced exactly, and the
 *   implementation is additionally checked against [BIG].
 * - [BIG] An independent, straightforward BigInt implementation of the Philox4x32 round written in
 *   this file from the paper's definition: (c0, c1, c2, c3) → (hi(M1·c2) ⊕ c1 ⊕ k0, lo(M1·c2),
 *   hi(M0·c0) ⊕ c3 ⊕ k1, lo(M0·c0)), key bumped by (0x9E3779B9, 0xBB67AE85) between the ten
 *   rounds; the 64-bit products are exact BigInt products.
 * - [CHI] Critical values of the χ² distribution, df = 99: upper 0.1 % point 148.230 (NIST/SEMATECH
 *   e-Handbook of Statistical Methods, 1.3.6.7.4, "Critical values of the chi-square
 *   distribution" (from memory)); lower 0.1 % point 61.137. Both agree with
 *   scipy.stats.chi2.ppf (148.2304, 61.1365), computed while writing this test, and the upper one
 *   is cross-checked below with the Wilson–Hilferty approximation (Wilson & Hilferty 1931).
 *   Every χ² test here uses fixed seeds, so it is deterministic: it either always passes or
 *   always fails.
 * - [PHI] The standard normal distribution function for binning normal draws is taken from
 *   mathjs's erf (a general-purpose library): Φ(x) = (1 + erf(x/√2))/2.
 * - [TRUNC] Variance of a standard normal truncated symmetrically at ±k:
 *   1 − 2kφ(k)/(2Φ(k) − 1) (Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions,
 *   vol. 1, ch. 13 (from memory); it follows from ∫ z²φ = −zφ + ∫ φ — common practice).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { erf } from 'mathjs';
import { Worker } from 'node:worker_threads';
import { fileURLToPath } from 'node:url';
import { existsSync } from 'node:fs';
import {
  fillNormal, fillUniform, mulHigh32, normalAt, normalFromUniform, normalTruncation, philoxBlock,
  truncatedNormalAt, truncatedNormalFromUniform, uniformAt,
} from '../src/yield/random.js';

// ---------------------------------------------------------------------------------------------
// [BIG] reference

const MASK = 0xffffffffn;
function refPhilox(ctr: readonly number[], key: readonly number[]): number[] {
  const M0 = 0xd2511f53n;
  const M1 = 0xcd9e8d57n;
  let c = ctr.map((v) => BigInt(v >>> 0));
  let k = key.map((v) => BigInt(v >>> 0));
  for (let r = 0; r < 10; r++) {
    if (r > 0) k = [(k[0]! + 0x9e3779b9n) & MASK, (k[1]! + 0xbb67ae85n) & MASK];
    const p0 = M0 * c[0]!;
    const p1 = M1 * c[2]!;
    c = [
      ((p1 >> 32n) ^ c[1]! ^ k[0]!) & MASK,
      p1 & MASK,
      ((p0 >> 32n) ^ c[3]! ^ k[1]!) & MASK,
      p0 & MASK,
    ];
  }
  return c.map((v) => Number(v));
}

/** [BIG] the documented layout: key = seed halves, counter = (d/2 halves, k halves), res53. */
function refUniform(seed: number, k: number, d: number): number {
  const b = Math.floor(d / 2);
  const w = refPhilox([b % 2 ** 32, Math.floor(b / 2 ** 32), k % 2 ** 32, Math.floor(k / 2 ** 32)],
    [seed % 2 ** 32, Math.floor(seed / 2 ** 32)]);
  const [a, c] = d % 2 === 0 ? [w[0]!, w[1]!] : [w[2]!, w[3]!];
  // 27 bits of a and 26 bits of c, as an exact BigInt, then divided by 2^53.
  const n = (BigInt(a) >> 5n) * (1n << 26n) + (BigInt(c) >> 6n);
  return Number(n) / 2 ** 53;
}

const block = (c: number[], k: number[]): number[] => {
  const out = new Uint32Array(4);
  philoxBlock(c[0]!, c[1]!, c[2]!, c[3]!, k[0]!, k[1]!, out);
  return Array.from(out);
};

describe('Philox4x32-10', () => {
  // [KAT] Random123 kat_vectors, philox4x32 with 10 rounds (from memory); exact match required.
  const kat: Array<[number[], number[], number[]]> = [
    [[0, 0, 0, 0], [0, 0], [0x6627e8d5, 0xe169c58d, 0xbc57ac4c, 0x9b00dbd8]],
    [[0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff], [0xffffffff, 0xffffffff],
      [0x408f276d, 0x41c83b0e, 0xa20bc7c6, 0x6d5451fd]],
    [[0x243f6a88, 0x85a308d3, 0x13198a2e, 0x03707344], [0xa4093822, 0x299f31d0],
      [0xd16cfe09, 0x94fdcceb, 0x5001e420, 0x24126ea1]],
  ];
  it.each(kat.map((v, i) => [i, ...v] as const))('known-answer vector %i [KAT]', (_i, ctr, key, want) => {
    expect(block(ctr, key)).toEqual(want);
    expect(refPhilox(ctr, key)).toEqual(want); // the reference itself reproduces them [BIG]
  });

  it('the 32×32-bit high word equals the exact BigInt product on edge and random operands [BIG]', () => {
    const edge = [0, 1, 2, 0xffff, 0x10000, 0x7fffffff, 0x80000000, 0xfffffffe, 0xffffffff, 0xd2511f53, 0xcd9e8d57];
    for (const a of edge) {
      for (const b of edge) {
        expect(mulHigh32(a, b)).toBe(Number((BigInt(a) * BigInt(b)) >> 32n));
      }
    }
    fc.assert(fc.property(fc.nat({ max: 0xffffffff }), fc.nat({ max: 0xffffffff }), (a, b) =>
      mulHigh32(a, b) === Number((BigInt(a) * BigInt(b)) >> 32n)), { numRuns: 5000, seed: 16 });
  });

  it('equals the BigInt reference for arbitrary counters and keys [BIG]', () => {
    const u32 = fc.nat({ max: 0xffffffff });
    fc.assert(fc.property(fc.array(u32, { minLength: 6, maxLength: 6 }), (w) => {
      const ctr = w.slice(0, 4);
      const key = w.slice(4);
      expect(block(ctr, key)).toEqual(refPhilox(ctr, key));
    }), { numRuns: 2000, seed: 1616 });
  });
});

describe('draws keyed by (seed, sample, draw)', () => {
  it('uniformAt follows the documented layout and 53-bit construction exactly [BIG]', () => {
    const cases: Array<[number, number, number]> = [
      [0, 0, 0], [0, 0, 1], [1, 0, 0], [12345, 678, 9], [2 ** 32 + 5, 2 ** 32 + 7, 2 ** 33 + 3],
      [Number.MAX_SAFE_INTEGER, Number.MAX_SAFE_INTEGER, Number.MAX_SAFE_INTEGER - 1],
    ];
    for (const [s, k, d] of cases) expect(uniformAt(s, k, d)).toBe(refUniform(s, k, d));
    fc.assert(fc.property(fc.nat(), fc.nat(), fc.nat({ max: 100000 }), (s, k, d) => {
      expect(uniformAt(s, k, d)).toBe(refUniform(s, k, d));
    }), { numRuns: 500, seed: 7 });
  });

  it('gives the same numbers in any order of calls, and fill* equals the single-draw functions', () => {
    const triples: Array<[number, number, number]> = [];
    for (let s = 0; s < 3; s++) for (let k = 0; k < 20; k++) for (let d = 0; d < 7; d++) triples.push([s * 977, k, d]);
    const forward = triples.map(([s, k, d]) => uniformAt(s, k, d));
    // A fixed permutation (multiplicative stride modulo a prime larger than the list).
    const n = triples.length; // 420
    const order = Array.from({ length: n }, (_, i) => (i * 263) % n);
    expect(new Set(order).size).toBe(n);
    const shuffled = new Array<number>(n);
    for (const i of order) shuffled[i] = uniformAt(...triples[i]!);
    expect(shuffled).toEqual(forward);

    // Fill from even and odd starting draws, partial counts, offsets.
    for (const d0 of [0, 1, 2, 5]) {
      for (const count of [1, 2, 3, 8]) {
        const out = new Float64Array(count + 2).fill(-1);
        fillUniform(31, 4, d0, out, 1, count);
        expect(out[0]).toBe(-1);
        expect(out[count + 1]).toBe(-1);
        for (let i = 0; i < count; i++) expect(out[1 + i]).toBe(uniformAt(31, 4, d0 + i));
        fillNormal(31, 4, d0, out, 1, count);
        for (let i = 0; i < count; i++) expect(out[1 + i]).toBe(normalAt(31, 4, d0 + i));
      }
    }
  });

  it('sample k gets the same draws whether the samples run in one pass or in interleaved shards', () => {
    const samples = 200;
    const draws = 5;
    const single = new Float64Array(samples * draws);
    for (let k = 0; k < samples; k++) fillUniform(99, k, 0, single, k * draws, draws);
    for (const shards of [2, 3, 7]) {
      const merged = new Float64Array(samples * draws);
      for (let shard = shards - 1; shard >= 0; shard--) {
        for (let k = shard; k < samples; k += shards) fillUniform(99, k, 0, merged, k * draws, draws);
      }
      expect(Buffer.from(merged.buffer).equals(Buffer.from(single.buffer))).toBe(true);
    }
  });

  it('a worker thread computes the same bytes as the main thread (no hidden shared state)', async () => {
    const dist = fileURLToPath(new URL('../dist/src/yield/random.js', import.meta.url));
    expect(existsSync(dist), 'build first: npx tsc -p tsconfig.json').toBe(true);
    const code = `
      const { parentPort } = require('node:worker_threads');
      import(${JSON.stringify('file://' + dist)}).then((r) => {
        const out = new Float64Array(64);
        for (let k = 0; k < 8; k++) r.fillUniform(5, 1000 + k, 3, out, k * 8, 8);
        parentPort.postMessage(out);
      });`;
    const fromWorker = await new Promise<Float64Array>((resolve, reject) => {
      const w = new Worker(code, { eval: true });
      w.once('message', (m: Float64Array) => { resolve(m); void w.terminate(); });
      w.once('error', reject);
    });
    const here = new Float64Array(64);
    for (let k = 0; k < 8; k++) fillUniform(5, 1000 + k, 3, here, k * 8, 8);
    expect(Array.from(fromWorker)).toEqual(Array.from(here));
  });

  it('different seeds, samples and draws give different numbers', () => {
    const seen = new Set<number>();
    for (let s = 0; s < 4; s++) for (let k = 0; k < 50; k++) for (let d = 0; d < 10; d++) seen.add(uniformAt(s, k, d));
    // 2000 draws of 53 bits: a repeat would have probability about 2e-10.
    expect(seen.size).toBe(2000);
  });

  it('uniform draws are multiples of 2^-53 in [0, 1)', () => {
    const out = new Float64Array(10000);
    fillUniform(3, 0, 0, out);
    for (const u of out) {
      expect(u >= 0 && u < 1).toBe(true);
      expect(Number.isInteger(u * 2 ** 53)).toBe(true);
    }
  });

  it('rejects seeds, samples and draws that are not whole numbers in [0, 2^53) with a plain message', () => {
    expect(() => uniformAt(-1, 0, 0)).toThrow(/^the seed must be a whole number from 0 to 9007199254740991, not -1$/);
    expect(() => uniformAt(1.5, 0, 0)).toThrow(RangeError);
    expect(() => uniformAt(0, 2 ** 53, 0)).toThrow(/the sample index/);
    expect(() => uniformAt(0, 0, NaN)).toThrow(/the draw index/);
    expect(() => fillUniform(0, 0, 0, new Float64Array(2), 1, 2)).toThrow(/the output holds 2 values/);
    expect(() => fillUniform(0, 0, 0, new Float64Array(2), 3)).toThrow(/the output holds 2 values/);
    expect(() => fillUniform(0, 0, 2 ** 53 - 2, new Float64Array(3))).toThrow(/the last draw index/);
    const end = new Float64Array(2);
    fillUniform(0, 0, 2 ** 53 - 2, end); // the last two draw indices are usable
    expect(end[1]).toBe(uniformAt(0, 0, 2 ** 53 - 1));
  });
});

// ---------------------------------------------------------------------------------------------
// χ² goodness of fit

const CHI2_99_UPPER_0001 = 148.230; // [CHI]
const CHI2_99_LOWER_0001 = 61.137; // [CHI]

function chiSquare(counts: ArrayLike<number>, expected: number): number {
  let x2 = 0;
  for (let i = 0; i < counts.length; i++) x2 += (counts[i]! - expected) ** 2 / expected;
  return x2;
}

function expectFits(x2: number): void {
  expect(x2).toBeGreaterThan(CHI2_99_LOWER_0001);
  expect(x2).toBeLessThan(CHI2_99_UPPER_0001);
}

const Phi = (x: number): number => 0.5 * (1 + (erf(x / Math.SQRT2) as number)); // [PHI]

describe('χ² goodness of fit (df = 99, α = 0.001 in each tail, 100 000 draws, fixed seeds)', () => {
  it('the table value agrees with the Wilson–Hilferty approximation [CHI]', () => {
    const df = 99;
    const z = 3.090232306167813; // Φ⁻¹(0.999) (common practice, normal tables)
    const wh = df * (1 - 2 / (9 * df) + z * Math.sqrt(2 / (9 * df))) ** 3;
    expect(Math.abs(wh - CHI2_99_UPPER_0001)).toBeLessThan(0.2); // W–H is within ~0.05 % here
  });

  it('uniform draws along the draw index of one sample, and across samples at one draw index', () => {
    const n = 100_000;
    const alongD = new Float64Array(n);
    fillUniform(2026, 17, 0, alongD);
    const acrossK = new Float64Array(n);
    for (let k = 0; k < n; k++) acrossK[k] = uniformAt(2026, k, 3);
    for (const sample of [alongD, acrossK]) {
      const counts = new Float64Array(100);
      for (const u of sample) counts[Math.floor(u * 100)]!++;
      expectFits(chiSquare(counts, n / 100));
    }
  });

  it('the low-order bits of the 53 are uniform too (⌊u·2^53⌋ mod 100)', () => {
    const n = 100_000;
    const counts = new Float64Array(100);
    for (let k = 0; k < n; k++) counts[(uniformAt(7, k, 0) * 2 ** 53) % 100]!++;
    expectFits(chiSquare(counts, n / 100));
  });

  it('pairs are independent: consecutive draws of a sample, and one draw of neighbouring samples (10×10 cells)', () => {
    const n = 100_000;
    const same = new Float64Array(2);
    const cellsD = new Float64Array(100);
    const cellsK = new Float64Array(100);
    for (let k = 0; k < n; k++) {
      fillUniform(11, k, 1, same); // draws 1 and 2: across a block boundary
      cellsD[Math.floor(same[0]! * 10) * 10 + Math.floor(same[1]! * 10)]!++;
      const a = uniformAt(12, 2 * k, 0);
      const b = uniformAt(12, 2 * k + 1, 0);
      cellsK[Math.floor(a * 10) * 10 + Math.floor(b * 10)]!++;
    }
    expectFits(chiSquare(cellsD, n / 100));
    expectFits(chiSquare(cellsK, n / 100));
  });

  it('normal draws, binned into 100 equiprobable cells by Φ(z) [PHI]', () => {
    const n = 100_000;
    const z = new Float64Array(n);
    fillNormal(404, 0, 0, z);
    const counts = new Float64Array(100);
    let sum = 0;
    let sum2 = 0;
    for (const v of z) {
      counts[Math.min(99, Math.floor(Phi(v) * 100))]!++;
      sum += v;
      sum2 += v * v;
    }
    expectFits(chiSquare(counts, n / 100));
    // Mean 0 and variance 1 within 5 standard errors (1/√n and √(2/n)).
    expect(Math.abs(sum / n)).toBeLessThan(5 / Math.sqrt(n));
    expect(Math.abs(sum2 / n - (sum / n) ** 2 - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
  });
});

describe('normal and truncated normal transforms', () => {
  const last = 1 - 2 ** -53;

  it('are exactly symmetric, increasing and finite at both ends of the uniform range', () => {
    // The draws are multiples of 2^-53, so u and last − u are both exact.
    const grid = (x: number): number => Math.floor(x * 2 ** 53) / 2 ** 53;
    for (const u of [0, 2 ** -53, grid(1e-9), grid(0.1), 0.25, 0.5 - 2 ** -53, grid(0.3), uniformAt(1, 2, 3)]) {
      expect(normalFromUniform(u)).toBe(-normalFromUniform(last - u));
      const t = normalTruncation(2.5);
      expect(truncatedNormalFromUniform(u, t)).toBe(-truncatedNormalFromUniform(last - u, t));
    }
    expect(normalFromUniform(0)).toBeCloseTo(-8.29, 1); // Φ⁻¹(2^-54) ≈ −8.29 (common practice)
    expect(Number.isFinite(normalFromUniform(last))).toBe(true);
    let prev = -Infinity;
    for (let i = 0; i <= 1000; i++) {
      const z = normalFromUniform(Math.floor((i / 1000) * last * 2 ** 53) / 2 ** 53);
      expect(z).toBeGreaterThan(prev);
      prev = z;
    }
    // The value is the normal quantile of the cell midpoint: Φ(z) ≈ u + 2^-54 [PHI].
    for (const u of [0.01, 0.2, 0.5, 0.77, 0.975]) expect(Phi(normalFromUniform(u))).toBeCloseTo(u, 14);
  });

  it('the truncated normal never passes kσ, even at the ends of the uniform range', () => {
    for (const k of [0.5, 1, 2, 3, 6]) {
      const t = normalTruncation(k);
      expect(truncatedNormalFromUniform(0, t)).toBeGreaterThanOrEqual(-k);
      expect(truncatedNormalFromUniform(last, t)).toBeLessThanOrEqual(k);
      expect(truncatedNormalFromUniform(0, t)).toBeCloseTo(-k, 6);
      for (let d = 0; d < 20000; d++) expect(Math.abs(truncatedNormalAt(8, d, 0, t)) <= k).toBe(true);
    }
    expect(() => normalTruncation(0)).toThrow(/positive number of standard deviations, not 0/);
  });

  it.each([1, 2, 3])('the truncated normal at %sσ has the closed-form variance [TRUNC]', (k) => {
    const t = normalTruncation(k);
    const n = 100_000;
    let m1 = 0;
    let m2 = 0;
    let m4 = 0;
    const u = new Float64Array(n);
    fillUniform(77, 3, 0, u);
    for (const v of u) {
      const z = truncatedNormalFromUniform(v, t);
      m1 += z;
      m2 += z * z;
      m4 += z ** 4;
    }
    m1 /= n;
    m2 /= n;
    m4 /= n;
    const phi = Math.exp(-k * k / 2) / Math.sqrt(2 * Math.PI);
    const want = 1 - (2 * k * phi) / (2 * Phi(k) - 1);
    // Standard error of the second moment: √((m4 − m2²)/n); tolerance 5 of them.
    const se = Math.sqrt((m4 - m2 * m2) / n);
    expect(Math.abs(m2 - want)).toBeLessThan(5 * se);
    expect(Math.abs(m1)).toBeLessThan(5 * Math.sqrt(m2 / n));
    // And χ² against the truncated distribution function, 100 equiprobable cells [PHI].
    const counts = new Float64Array(100);
    const a = Phi(-k);
    for (const v of u) {
      const z = truncatedNormalFromUniform(v, t);
      counts[Math.min(99, Math.floor(((Phi(z) - a) / (1 - 2 * a)) * 100))]!++;
    }
    expectFits(chiSquare(counts, n / 100));
  });
});
