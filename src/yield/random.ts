/**
 * Counter-based random numbers for yield runs: every number is a pure function of
 * (seed, sample k, draw index d), so sample k's draws are the same whatever the thread count,
 * the order in which samples are computed, or the way they are split into shards.
 *
 * Generator: Philox4x32-10 (Salmon, Moraes, Dror & Shaw, "Parallel random numbers: as easy as
 * 1, 2, 3", SC 2011), with 32-bit integer arithmetic: the low word of each 32×32-bit product by
 * Math.imul, the high word from 16-bit halves (every partial product and sum stays below 2^53, so
 * the double arithmetic is exact). It is checked against the published known-answer vectors and
 * an independent BigInt version of the round (test/yield-random.test.ts).
 *
 * Layout of one Philox block (four 32-bit words out):
 *   key     = (seed mod 2^32, ⌊seed / 2^32⌋)               — seed a whole number in [0, 2^53)
 *   counter = (b mod 2^32, ⌊b / 2^32⌋, k mod 2^32, ⌊k / 2^32⌋) — b = ⌊d / 2⌋, k in [0, 2^53)
 * Draw d takes the words (w0, w1) of its block when d is even and (w2, w3) when d is odd.
 *
 * Uniform u in [0, 1) with 53 random bits: u = ((w_a >>> 5)·2^26 + (w_b >>> 6)) / 2^53 — the top
 * 27 bits of the first word and the top 26 of the second (the construction of Matsumoto and
 * Nishimura's genrand_res53 for MT19937). u takes every multiple of 2^-53 in [0, 1), each
 * with probability 2^-53.
 *
 * Normal z from the same u by the inverse distribution function (Wichura's AS 241, see
 * stats.ts), made exactly symmetric and finite: u < 1/2 maps to q = u + 2^-54 and
 * z = Φ⁻¹(q) < 0; u ≥ 1/2 maps to q = (1 − u) − 2^-54 and z = −Φ⁻¹(q) > 0 (both q exact in
 * double). z is increasing in u, the pairs u and 1 − 2^-53 − u give z and −z, and |z| ≤ 8.3.
 *
 * Truncated normal at ±kσ by the inverse distribution function on the truncated range (no
 * rejection, so one draw always uses one uniform): with a = Φ(−k), q as above,
 * p = a + 2q·(1/2 − a) and z = ∓Φ⁻¹(p), clamped to [−k, k] against rounding.
 */

import { normalCdf, normalQuantile } from './stats.js';

// Philox4x32 constants (Salmon et al. 2011): the multipliers and the Weyl key increments
// (golden ratio and √3 − 1, in 32-bit fixed point).
const MUL0 = 0xd2511f53;
const MUL1 = 0xcd9e8d57;
const WEYL0 = 0x9e3779b9;
const WEYL1 = 0xbb67ae85;

/**
 * High 32 bits of the 64-bit product of two unsigned 32-bit integers. With a = aH·2^16 + aL and
 * b = bH·2^16 + bL: a·b = aH·bH·2^32 + (aH·bL + aL·bH)·2^16 + aL·bL; every partial product is
 * below 2^32 and the carry sum below 2^18, so each operation is exact in double arithmetic.
 */
export function mulHigh32(a: number, b: number): number {
  const aL = a & 0xffff;
  const aH = a >>> 16;
  const bL = b & 0xffff;
  const bH = b >>> 16;
  const ll = aL * bL;
  const hl = aH * bL;
  const lh = aL * bH;
  const carry = (ll >>> 16) + (hl & 0xffff) + (lh & 0xffff);
  return (aH * bH + (hl >>> 16) + (lh >>> 16) + (carry >>> 16)) >>> 0;
}

/**
 * One Philox4x32-10 block: ten rounds on the counter (c0, c1, c2, c3) under the key (k0, k1),
 * all unsigned 32-bit integers; the four output words go to out[offset..offset+3] as unsigned
 * 32-bit integers. Allocation-free.
 *
 * Round: (c0, c1, c2, c3) → (hi(M1·c2) ⊕ c1 ⊕ k0, lo(M1·c2), hi(M0·c0) ⊕ c3 ⊕ k1, lo(M0·c0));
 * between rounds the key is bumped by (W0, W1) modulo 2^32.
 */
export function philoxBlock(
  c0: number, c1: number, c2: number, c3: number,
  k0: number, k1: number,
  out: Uint32Array | Float64Array, offset = 0,
): void {
  let x0 = c0 >>> 0, x1 = c1 >>> 0, x2 = c2 >>> 0, x3 = c3 >>> 0;
  let y0 = k0 >>> 0, y1 = k1 >>> 0;
  for (let round = 0; round < 10; round++) {
    if (round > 0) {
      y0 = (y0 + WEYL0) >>> 0;
      y1 = (y1 + WEYL1) >>> 0;
    }
    const hi0 = mulHigh32(MUL0, x0);
    const lo0 = Math.imul(MUL0, x0) >>> 0;
    const hi1 = mulHigh32(MUL1, x2);
    const lo1 = Math.imul(MUL1, x2) >>> 0;
    const n0 = (hi1 ^ x1 ^ y0) >>> 0;
    const n2 = (hi0 ^ x3 ^ y1) >>> 0;
    x0 = n0;
    x1 = lo1;
    x2 = n2;
    x3 = lo0;
  }
  out[offset] = x0;
  out[offset + 1] = x1;
  out[offset + 2] = x2;
  out[offset + 3] = x3;
}

const TWO32 = 4294967296;
const TWO_M53 = 1 / 9007199254740992; // 2^-53
const TWO_M54 = TWO_M53 / 2;

function checkIndex(value: number, what: string): void {
  if (!Number.isSafeInteger(value) || value < 0) {
    throw new RangeError(`${what} must be a whole number from 0 to ${Number.MAX_SAFE_INTEGER}, not ${value}`);
  }
}

// One block of scratch for the single-draw functions (module-level: no allocation per call).
const scratch = new Uint32Array(4);

function wordsToUniform(a: number, b: number): number {
  return ((a >>> 5) * 67108864 + (b >>> 6)) * TWO_M53;
}

/** The uniform draw d of sample k under `seed`, in [0, 1) with 53 random bits. */
export function uniformAt(seed: number, k: number, d: number): number {
  checkIndex(seed, 'the seed');
  checkIndex(k, 'the sample index');
  checkIndex(d, 'the draw index');
  const block = Math.floor(d / 2);
  philoxBlock(block >>> 0, Math.floor(block / TWO32), k >>> 0, Math.floor(k / TWO32),
    seed >>> 0, Math.floor(seed / TWO32), scratch);
  return (d & 1) === 0 ? wordsToUniform(scratch[0]!, scratch[1]!) : wordsToUniform(scratch[2]!, scratch[3]!);
}

/**
 * Writes the uniform draws d0, d0 + 1, …, d0 + count − 1 of sample k into
 * out[offset..offset+count). Each Philox block serves two draws. Allocation-free.
 */
export function fillUniform(
  seed: number, k: number, d0: number,
  out: Float64Array, offset = 0, count = out.length - offset,
): void {
  checkIndex(seed, 'the seed');
  checkIndex(k, 'the sample index');
  checkIndex(d0, 'the draw index');
  if (count > 0) checkIndex(d0 + (count - 1), 'the last draw index');
  if (!Number.isSafeInteger(offset) || !Number.isSafeInteger(count) || offset < 0 || count < 0 ||
    offset + count > out.length) {
    throw new RangeError(`the output holds ${out.length} values; ${count} from ${offset} do not fit`);
  }
  const s0 = seed >>> 0, s1 = Math.floor(seed / TWO32);
  const c2 = k >>> 0, c3 = Math.floor(k / TWO32);
  let i = 0;
  let d = d0;
  while (i < count) {
    const block = Math.floor(d / 2);
    philoxBlock(block >>> 0, Math.floor(block / TWO32), c2, c3, s0, s1, scratch);
    if ((d & 1) === 0) {
      out[offset + i] = wordsToUniform(scratch[0]!, scratch[1]!);
      i++;
      d++;
      if (i === count) break;
    }
    out[offset + i] = wordsToUniform(scratch[2]!, scratch[3]!);
    i++;
    d++;
  }
}

/**
 * A standard normal value from a uniform u in [0, 1) that is a multiple of 2^-53 (as the draws
 * above are), by the inverse distribution function, exactly symmetric: see the file comment.
 * Increasing in u; |z| ≤ 8.3. Allocation-free.
 */
export function normalFromUniform(u: number): number {
  if (u < 0.5) return normalQuantile(u + TWO_M54);
  return -normalQuantile(1 - u - TWO_M54);
}

/** A normal distribution truncated at ±k standard deviations, prepared once per tolerance. */
export interface NormalTruncation {
  /** The truncation point k (in standard deviations), > 0. */
  readonly k: number;
  /** Φ(−k). */
  readonly tail: number;
  /** 1/2 − Φ(−k): half the probability kept. */
  readonly halfKept: number;
}

/**
 * Prepares a truncation at ±k standard deviations (k > 0; Infinity means no truncation).
 * Throws a RangeError for k ≤ 0 or NaN.
 */
export function normalTruncation(k: number): NormalTruncation {
  if (!(k > 0)) throw new RangeError(`a normal distribution is truncated at a positive number of standard deviations, not ${k}`);
  const tail = normalCdf(-k);
  return { k, tail, halfKept: 0.5 - tail };
}

/**
 * A standard normal value truncated at ±t.k from a uniform u (multiple of 2^-53 in [0, 1)), by
 * the inverse distribution function on the kept range: never outside [−k, k], increasing in u,
 * exactly symmetric. Allocation-free.
 */
export function truncatedNormalFromUniform(u: number, t: NormalTruncation): number {
  let z: number;
  if (u < 0.5) {
    const q = u + TWO_M54;
    z = normalQuantile(t.tail + 2 * q * t.halfKept);
  } else {
    const q = 1 - u - TWO_M54;
    z = -normalQuantile(t.tail + 2 * q * t.halfKept);
  }
  return z < -t.k ? -t.k : z > t.k ? t.k : z;
}

/** The standard normal draw d of sample k under `seed` (normalFromUniform of uniformAt). */
export function normalAt(seed: number, k: number, d: number): number {
  return normalFromUniform(uniformAt(seed, k, d));
}

/** The truncated standard normal draw d of sample k under `seed`. */
export function truncatedNormalAt(seed: number, k: number, d: number, t: NormalTruncation): number {
  return truncatedNormalFromUniform(uniformAt(seed, k, d), t);
}

/**
 * Writes the standard normal draws d0 … d0 + count − 1 of sample k into out[offset..). The same
 * numbers as normalAt. Allocation-free.
 */
export function fillNormal(
  seed: number, k: number, d0: number,
  out: Float64Array, offset = 0, count = out.length - offset,
): void {
  fillUniform(seed, k, d0, out, offset, count);
  for (let i = offset; i < offset + count; i++) out[i] = normalFromUniform(out[i]!);
}
