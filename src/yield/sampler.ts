/**
 * Draws of a yield run: the values of every toleranced number for sample k of a seed.
 *
 * Draw numbering (so that sample k is the same whatever the order, thread or shard it is computed
 * in: src/yield/random.ts): the lots first, in the order the netlist declares them (draw d = 0 …
 * L − 1), then the tolerances in netlist order (d = L + t). Every draw is one uniform u of
 * (seed, k, d); a normal spread takes z = Φ⁻¹(u) (truncated at ±cut·σ where given), a uniform one
 * 2u − 1.
 *
 * A part's value, with n its nominal value (the elaborated one; for a design variable its current
 * value), its own spread δ and its lot's relative draw λ (0 without a lot):
 *   relative spread  x = n·(1 + δ)·(1 + λ),   absolute spread  x = (n + δ)·(1 + λ),
 * δ = ±tol·(2u − 1) for a uniform tolerance, σ·z for a normal one (relative: a fraction of n).
 * It is written as x = n·mult + add, which is how the design model takes it.
 *
 * @module
 */
import type { Circuit, Tolerance, ToleranceDistribution } from '../elaborate/circuit.js';
import { normalFromUniform, normalTruncation, truncatedNormalFromUniform, uniformAt, type NormalTruncation } from './random.js';

/** What the sampler prepares once per circuit. */
export interface SamplerPlan {
  seed: number;
  /** Per lot: its distribution (relative) and truncation. */
  lots: { name: string; distribution: ToleranceDistribution; truncation?: NormalTruncation }[];
  /** Per tolerance: its lot's index (−1: none) and truncation. */
  tolerances: { tolerance: Tolerance; lot: number; truncation?: NormalTruncation }[];
}

/** One sample's draws: per tolerance x = n·mult + add, and the standard draw behind its own spread. */
export interface SampleDraws {
  mult: Float64Array;
  add: Float64Array;
  /** Per tolerance: its own standard draw (2u − 1 or z), for correlating parts with margins. */
  unit: Float64Array;
}

export function samplerPlan(circuit: Circuit, seed: number): SamplerPlan {
  if (!Number.isSafeInteger(seed) || seed < 0) throw new RangeError(`a seed is a whole number from 0 to 2^53 − 1, not ${seed}`);
  const truncationOf = (d: ToleranceDistribution) => (d.kind === 'normal' && d.cut !== undefined ? normalTruncation(d.cut) : undefined);
  const lots = circuit.lots.map((l) => ({ name: l.name, distribution: l.distribution, truncation: truncationOf(l.distribution) }));
  const index = new Map(lots.map((l, i) => [l.name, i]));
  const tolerances = circuit.tolerances.map((t) => ({ tolerance: t, lot: t.lot !== undefined ? (index.get(t.lot) ?? -1) : -1, truncation: truncationOf(t.distribution) }));
  return { seed, lots, tolerances };
}

/** Scratch for {@link drawSample}, sized for the plan. */
export function sampleDraws(plan: SamplerPlan): SampleDraws {
  const n = plan.tolerances.length;
  return { mult: new Float64Array(n), add: new Float64Array(n), unit: new Float64Array(n) };
}

/** The standard draw of a distribution from u: 2u − 1 for uniform, z (truncated where cut) for normal. */
function standard(d: ToleranceDistribution, u: number, t: NormalTruncation | undefined): number {
  if (d.kind === 'uniform') return 2 * u - 1;
  return t ? truncatedNormalFromUniform(u, t) : normalFromUniform(u);
}

/** The spread δ of a distribution for standard draw s: relative (a fraction) or absolute (SI). */
function spread(d: ToleranceDistribution, s: number): { relative: number; absolute: number } {
  if (d.kind === 'uniform') return { relative: (d.relative ?? 0) * s, absolute: (d.absolute ?? 0) * s };
  return { relative: (d.relativeSigma ?? 0) * s, absolute: (d.sigma ?? 0) * s };
}

/** Fills `out` with the draws of sample k (see the module comment). */
export function drawSample(plan: SamplerPlan, k: number, out: SampleDraws, lotScratch: Float64Array = new Float64Array(plan.lots.length)): void {
  const L = plan.lots.length;
  for (let l = 0; l < L; l++) {
    const lot = plan.lots[l]!;
    lotScratch[l] = spread(lot.distribution, standard(lot.distribution, uniformAt(plan.seed, k, l), lot.truncation)).relative;
  }
  for (let t = 0; t < plan.tolerances.length; t++) {
    const p = plan.tolerances[t]!;
    const d = p.tolerance.distribution;
    const s = standard(d, uniformAt(plan.seed, k, L + t), p.truncation);
    const own = spread(d, s);
    const lot = p.lot >= 0 ? 1 + lotScratch[p.lot]! : 1;
    out.unit[t] = s;
    out.mult[t] = (1 + own.relative) * lot;
    out.add[t] = own.absolute * lot;
  }
}
