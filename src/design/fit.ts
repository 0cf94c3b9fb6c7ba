/**
 * Fitting a design to its specs: the design variables are moved within their ranges until every
 * spec passes (with a chosen margin beyond pass), by minimising a smooth penalty of the spec
 * violations; then each variable that declares a series or a step is snapped to its allowed
 * values and the specs are checked again.
 *
 * ```ts
 * const model = DesignModel.load('circuits/bandpass-2g4.sbx');
 * const r = fit(model, { margin: 0.5 });     // 0.5 dB beyond pass on dB specs (see specScale)
 * r.snapped;                                 // the values, SI units; the model is left at them
 * r.pass;                                    // every spec passes at the snapped values
 * ```
 *
 * **The penalty.** For spec s with worst margin m_s (≥ 0 passes, in the spec's unit), a target
 * margin T_s and a scale σ_s (see {@link specScale}: 1 dB for dB specs), the violation in scale
 * units is t_s = (T_s − m_s)/σ_s + 2δ (δ = {@link HINGE}: the fit aims a little beyond the target,
 * so that it meets the target in finitely many steps) — counted in return loss for a VSWR and in
 * ratio for other plain figures (see `violation`) — and the penalty is P = Σ_s h(t_s)², with h
 * the smoothed hinge h(t) = 0 for t ≤ 0, t²/(2δ) for 0 < t < δ, t − δ/2 for δ ≤ t ≤ C, and
 * C − δ/2 + C·ln(t/C) beyond C = {@link COMPRESS} (a far-off spec weighs less than its square).
 * P is zero where every spec has its margin with room to spare, and continuously differentiable
 * in the margins (h is C¹).
 *
 * **The gradient method** is a Levenberg–Marquardt iteration on the residuals h(t_s) (the
 * Gauss–Newton model of P, damped; Marquardt 1963), with the derivatives of the worst margins
 * from {@link DesignModel.marginGradient}, in normalised coordinates (see {@link toUnit}) where the
 * bounds are the unit box: a variable at a bound whose step would leave the box is held there
 * for that step, each step is clipped to the box, and no variable moves more than a trust
 * radius ({@link TRUST_RADIUS}) at a time. A worst margin is a minimum over frequencies, not
 * differentiable where its worst point moves: a step that does not lower P is refused and the
 * damping raised and the radius halved (a shorter, steeper step), so the method copes with the
 * kinks. It stops ("stalls") when the damping grows past any use or P stops falling
 * ({@link PROGRESS_WINDOW}).
 *
 * **The derivative-free fallback** is the Nelder–Mead simplex (Nelder & Mead 1965; the usual
 * coefficients 1, 2, ½, ½) on P in the unit box, every trial point clipped to the box. `auto` runs
 * the gradient method, then the simplex from its best point when it stalls short of the target,
 * then the gradient method again from the simplex's best point.
 *
 * **Several starts.** Start 1 is the model's current values; the others are uniform in the unit
 * box from the mulberry32 generator (see {@link mulberry32}) seeded with `seed`: deterministic.
 *
 * **Snapping.** A variable with a series takes the series values in its range (IEC 60063, via
 * seriesValuesIn), one with a step the values lower + k·step up to upper. Each takes the allowed
 * value just below and just above its fitted value; with at most {@link EXHAUSTIVE_SNAP} such
 * variables every combination is tried, otherwise a greedy pass from the nearest values tries
 * the other neighbour of each variable in turn, while that helps. The best combination is the one
 * where every spec passes, then the smallest penalty. When the specs then miss their targets, the
 * variables without a series or step are fitted again with the snapped ones held. Those the fit
 * moved are finally rounded to 4 (else 6) significant digits where every spec keeps its target
 * margin ({@link TIDY_DIGITS}), so that the values read well when written back.
 *
 * @module
 */
import type { Variable } from '../elaborate/circuit.js';
import type { SpecDefinition, SpecResult } from '../check/types.js';
import { DiagnosticBag, InputError } from '../diagnostics/diagnostic.js';
import { evaluateQuantity } from '../load.js';
import type { DesignModel } from './model.js';
import { seriesValuesIn } from './series.js';
import { SingularSystemError } from '../solve/sweep.js';
import { netlistValue } from './write-back.js';

/** Which method moves the variables: `auto` the gradient method, then the simplex when it stalls. */
export type FitMethod = 'auto' | 'gradient' | 'simplex';

export interface FitOptions {
  /** `gradient`, `simplex` or `auto` (default). */
  method?: FitMethod;
  /**
   * Target margin beyond pass for every spec, in units of its scale ({@link specScale}): dB on
   * dB specs (default 0).
   */
  margin?: number;
  /** Target margins per spec, in the spec's own unit (SI: seconds for a delay), overriding `margin`; by spec name. */
  specMargins?: ReadonlyMap<string, number>;
  /** Number of starts (default 1: the current values only). */
  starts?: number;
  /** Seed of the random starts (default 1). */
  seed?: number;
  /** Largest number of evaluations (a spec check or a spec check with derivatives counts one; default 1000). */
  maxEvals?: number;
  /** Snap variables with a series or a step to their allowed values (default true). */
  snap?: boolean;
  /** Called after each evaluation. */
  onProgress?: (p: FitProgress) => void;
}

export interface FitProgress {
  evaluations: number;
  /** The start being run, from 1. */
  start: number;
  phase: 'gradient' | 'simplex' | 'snap';
  /** The lowest penalty so far in this start. */
  penalty: number;
  /** Specs failing at the best point so far (margin < 0). */
  failing: number;
}

/** Why the search ended. */
export type FitStop = 'target' | 'max-evals' | 'stalled' | 'no-variables';

export interface FitResult {
  variables: readonly Variable[];
  /** The values before the fit (SI units, order of the variables). */
  start: Float64Array;
  /** The values the search ended at, before snapping. */
  fitted: Float64Array;
  /** The values after snapping (equal to `fitted` for variables without a series or step). */
  snapped: Float64Array;
  /** Spec results at the start, at the fitted and at the snapped values. */
  before: SpecResult[];
  atFitted: SpecResult[];
  after: SpecResult[];
  /** The target margin of each spec (spec units, order of the specs). */
  targets: Float64Array;
  /** Every spec passes at the snapped values (margin ≥ 0). */
  pass: boolean;
  /** Every spec with sweep points in its band has its target margin at the snapped values. */
  targetMet: boolean;
  stop: FitStop;
  /** Penalty at the fitted and at the snapped values. */
  penaltyFitted: number;
  penaltyAfter: number;
  /** Evaluations in all (spec checks, with or without derivatives), and how many had derivatives. */
  evaluations: number;
  gradients: number;
  /** Accepted steps of the gradient method and iterations of the simplex, over all starts. */
  iterations: number;
  /** The method that found the result (`gradient` or `simplex`) and the start it came from (from 1). */
  method: 'gradient' | 'simplex' | 'none';
  bestStart: number;
}

/**
 * The first trust radius of the gradient method: no variable moves more than this (in unit
 * coordinates, a fraction of its range) in one step; the radius doubles after a step that it
 * limited and halves after a refused step. Far from a solution the local model of the worst
 * margins holds only nearby: without it a first step would leap to a corner of the box.
 */
export const TRUST_RADIUS = 0.1;

/**
 * A search that gains less than 1 % of its penalty over 10 steps (the simplex: 10·(n + 1)
 * iterations) stops as stalled, leaving the budget to the fallback or the next start.
 */
export const PROGRESS_WINDOW: readonly [steps: number, gain: number] = [10, 0.01];

/** Width of the smoothed hinge, in scale units (0.01 dB on a dB spec). */
export const HINGE = 0.01;
/** Largest number of snapped variables for which every combination of neighbours is tried. */
export const EXHAUSTIVE_SNAP = 6;
/** A violation larger than this (scale units) counts as this, so that an infinite margin still compares. */
const MAX_VIOLATION = 1e6;

/**
 * The scale of a spec: the margin that weighs as much as 1 dB on a dB spec. dB: 1 dB; degrees:
 * 1°; a delay (s): a tenth of the limit; a plain number (VSWR, K…) or a resistance: 2 % of the
 * limit, at least 0.02 (a VSWR of 1.2 against 1.176 — near a return loss of 21 dB against 22 dB,
 * common practice for weighing the two alike).
 */
export function specScale(spec: SpecDefinition): number {
  const lim = Math.max(Math.abs(spec.limit[0]), Math.abs(spec.limit[1]));
  switch (spec.unit) {
    case 'dB':
    case 'deg':
      return 1;
    case 's':
      return lim > 0 && Number.isFinite(lim) ? 0.1 * lim : 1e-10;
    default:
      return 0.02 * (Number.isFinite(lim) ? Math.max(1, lim) : 1);
  }
}

/**
 * mulberry32: a 32-bit generator by Tommy Ettinger (public domain, 2017), uniform numbers in
 * [0, 1). The same seed gives the same sequence on every platform (integer arithmetic only).
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A variable's range is a log scale when it is positive and spans a decade or more. */
export function isLogScale(v: Variable): boolean {
  return v.lower > 0 && v.upper / v.lower >= 10;
}

/** A value in [0, 1] for x in [lower, upper]: log(x/lower)/log(upper/lower) on a log scale, else linear. */
export function toUnit(v: Variable, x: number): number {
  if (v.upper === v.lower) return 0;
  const u = isLogScale(v) ? Math.log(x / v.lower) / Math.log(v.upper / v.lower) : (x - v.lower) / (v.upper - v.lower);
  return Math.min(1, Math.max(0, u));
}

/** The value at u ∈ [0, 1], kept within [lower, upper]. */
export function fromUnit(v: Variable, u: number): number {
  const x = isLogScale(v) ? v.lower * Math.exp(u * Math.log(v.upper / v.lower)) : v.lower + u * (v.upper - v.lower);
  return u <= 0 ? v.lower : u >= 1 ? v.upper : Math.min(v.upper, Math.max(v.lower, x));
}

/** dx/du at x. */
function unitSlope(v: Variable, x: number): number {
  return isLogScale(v) ? x * Math.log(v.upper / v.lower) : v.upper - v.lower;
}

/** Violations beyond this many scale units grow logarithmically in the residual (a robust loss: one spec far off does not drown the others). */
export const COMPRESS = 10;

/** The smoothed hinge h(t) and its slope (continuously differentiable). */
function hinge(t: number): [number, number] {
  if (t <= 0) return [0, 0];
  if (t < HINGE) return [(t * t) / (2 * HINGE), t / HINGE];
  if (t <= COMPRESS) return [t - HINGE / 2, 1];
  return [COMPRESS - HINGE / 2 + COMPRESS * Math.log(t / COMPRESS), COMPRESS / t];
}

/** Relative change of a plain-number or resistance figure that weighs as 1 dB (see {@link violation}). */
const LOG_SCALE = 0.02;

/**
 * The violation of a spec in scale units (t_s of the module notes) and its slope dt/dm with
 * respect to the worst margin m. Linear, (T − m)/σ, except where the figure's own scale is not
 * linear: a VSWR limit counts in return loss (dB), RL(V) = −20·log10((V − 1)/(V + 1)) (common
 * practice: the two describe the same reflection), so a VSWR of 50 weighs about as much as a
 * return loss 20 dB short; another plain-number figure (K, μ…) whose value and limit are
 * positive counts in ratio, ln(value/limit)/0.02 (2 % weighs as 1 dB). Capped at MAX_VIOLATION.
 */
function violation(r: SpecResult, target: number, scale: number): [t: number, slope: number] {
  if (r.points === 0) return [-Infinity, 0]; // nothing the variables can change
  const m = r.worstMargin;
  const spec = r.spec;
  const v = r.worstValue;
  let t: number;
  let slope: number;
  const lim = spec.bound === 'max' ? r.worstLimit - target : r.worstLimit + target;
  if (spec.unit === '' && Number.isFinite(m) && Number.isFinite(v) && lim > 0 && v > 0) {
    if (spec.bound === 'max' && /^vswr\b/i.test(spec.figure) && lim > 1) {
      const rl = (x: number) => -20 * Math.log10((x - 1) / (x + 1));
      if (v <= 1) return [-MAX_VIOLATION, 0];
      t = rl(lim) - rl(v) + 2 * HINGE;
      slope = -40 / Math.LN10 / (v * v - 1); // dRL/dV, and dV/dm = −1
    } else {
      t = (spec.bound === 'max' ? Math.log(v / lim) : Math.log(lim / v)) / LOG_SCALE + 2 * HINGE;
      slope = -1 / (v * LOG_SCALE);
    }
  } else {
    t = (target - m) / scale + 2 * HINGE;
    slope = -1 / scale;
  }
  if (Number.isNaN(t) || t > MAX_VIOLATION) return [MAX_VIOLATION, 0];
  if (t < -MAX_VIOLATION) return [-MAX_VIOLATION, 0];
  return [t, slope];
}

/** The penalty of a set of spec results (see the module notes). */
export function penaltyOf(results: readonly SpecResult[], targets: ArrayLike<number>, scales: ArrayLike<number>): number {
  let p = 0;
  results.forEach((r, s) => {
    const h = hinge(violation(r, targets[s]!, scales[s]!)[0])[0];
    p += h * h;
  });
  return p;
}

/** Every spec has its target margin — a spec with no sweep point in its band aside: no value of the variables changes it (it fails all the same). */
function meets(results: readonly SpecResult[], targets: ArrayLike<number>): boolean {
  return results.every((r, s) => r.points === 0 || r.worstMargin >= targets[s]!);
}

/**
 * Target margins from `--margin` texts: `X` (a number, optionally `X dB`) is X scale units for
 * every spec ({@link specScale}); `NAME=VALUE` is the margin of spec NAME in its own unit (a unit
 * may be written: `passband_delay=0.1 ns`). Several may be given; a later one wins. Errors are
 * located in the texts (file `--margin`, one line each) and thrown together as one InputError.
 */
export function parseMargins(texts: readonly string[], specs: readonly SpecDefinition[]): { margin: number; specMargins: Map<string, number> } {
  const bag = new DiagnosticBag();
  const sources = new Map<string, string>();
  let margin = 0;
  const specMargins = new Map<string, number>();
  const file = '--margin';
  sources.set(file, texts.join('\n'));
  texts.forEach((text, i) => {
    const span = { file, line: i + 1, column: 1, length: Math.max(1, text.length) };
    if (/[\r\n]/.test(text)) {
      bag.error('bad-margin', '`--margin` takes one value per option', span, 'e.g. `--margin 1` (dB) or `--margin passband_loss=0.5dB`');
      return;
    }
    const named = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=(.*)$/.exec(text);
    const valueText = named ? named[2]! : text;
    const at = named ? text.indexOf('=') + 1 : 0;
    let spec: SpecDefinition | undefined;
    if (named) {
      spec = specs.find((s) => s.name === named[1]);
      if (!spec) {
        const col = text.indexOf(named[1]!) + 1;
        bag.error('unknown-spec', `\`${named[1]}\` is not a spec of the netlist`, { ...span, column: col, length: named[1]!.length }, specs.length ? `the specs are ${specs.map((s) => s.name).join(', ')}` : 'the netlist has no specs');
        return;
      }
    }
    if (valueText.trim() === '') {
      bag.error('bad-margin', named ? `no margin given for \`${named[1]}\`` : '`--margin` is empty', span, 'e.g. `--margin 1` (dB) or `--margin passband_loss=0.5dB`');
      return;
    }
    const unit = spec ? (spec.unit === '' ? null : spec.unit) : 'dB';
    try {
      const x = evaluateQuantity(valueText, unit, file);
      if (!(x >= 0) || !Number.isFinite(x)) {
        bag.error('bad-margin', `a margin is a number 0 or above, not ${x}`, { ...span, column: at + 1, length: Math.max(1, valueText.length) });
      } else if (spec) specMargins.set(spec.name, x);
      else margin = x;
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      for (const d of e.diagnostics) {
        bag.add({ ...d, span: d.span ? { file, line: i + 1, column: d.span.column + at, length: Math.min(d.span.length, Math.max(1, text.length - (d.span.column + at) + 1)) } : span });
      }
    }
  });
  if (bag.hasErrors) throw new InputError(bag.items, sources);
  return { margin, specMargins };
}

/** The model, its evaluation count and the budget, shared by the methods. */
class Evaluator {
  evaluations = 0;
  gradients = 0;
  iterations = 0;
  readonly nv: number;
  /** Indices of the variables that can move (lower < upper; after snapping, those without a series or step). */
  free: number[];
  readonly scales: Float64Array;
  constructor(
    readonly model: DesignModel,
    readonly targets: Float64Array,
    readonly specs: readonly SpecDefinition[],
    readonly maxEvals: number,
    readonly progress: (phase: FitProgress['phase'], penalty: number, failing: number) => void,
  ) {
    this.nv = model.variables.length;
    this.free = model.variables.flatMap((v, i) => (v.upper > v.lower ? [i] : []));
    this.scales = Float64Array.from(specs, specScale);
  }
  get exhausted(): boolean {
    return this.evaluations >= this.maxEvals;
  }
  values(u: Float64Array, base: Float64Array): Float64Array {
    const x = Float64Array.from(base);
    this.free.forEach((i, k) => (x[i] = fromUnit(this.model.variables[i]!, u[k]!)));
    return x;
  }
  /**
   * The spec results at x. Where the network cannot be solved there (a singular system) or a
   * value is not allowed (a part value of 0 at a range reaching 0), every spec fails without end,
   * so that no step goes there. The start itself is checked before, so a netlist error is not hidden.
   */
  check(x: Float64Array): SpecResult[] {
    this.model.setValues(x);
    this.evaluations++;
    try {
      return this.model.checkSpecs();
    } catch (e) {
      if (!(e instanceof SingularSystemError || e instanceof InputError)) throw e;
      return this.specs.map((spec) => ({ spec, pass: false, points: 1, worstMargin: -Infinity, worstFrequency: NaN, worstValue: NaN, worstLimit: NaN }));
    }
  }
  penalty(results: readonly SpecResult[]): number {
    return penaltyOf(results, this.targets, this.scales);
  }
  /** The violations t_s at x and their derivatives in unit coordinates (rows: specs, columns: free variables). */
  linearise(x: Float64Array): { results: SpecResult[]; t: Float64Array; D: Float64Array } {
    this.model.setValues(x);
    this.evaluations++;
    this.gradients++;
    const { results, gradient } = this.model.marginGradient();
    const ns = results.length;
    const nf = this.free.length;
    const t = new Float64Array(ns);
    const D = new Float64Array(ns * nf);
    for (let s = 0; s < ns; s++) {
      const [ts, slope] = violation(results[s]!, this.targets[s]!, this.scales[s]!);
      t[s] = ts;
      if (slope === 0 || !Number.isFinite(results[s]!.worstMargin)) continue;
      for (let k = 0; k < nf; k++) {
        const i = this.free[k]!;
        const g = gradient[s * this.nv + i]!;
        D[s * nf + k] = Number.isFinite(g) ? slope * g * unitSlope(this.model.variables[i]!, x[i]!) : 0;
      }
    }
    return { results, t, D };
  }
}

interface Point {
  u: Float64Array;
  x: Float64Array;
  results: SpecResult[];
  penalty: number;
}

/** Cholesky solve of a small symmetric positive definite system (in place on a copy); null when not positive definite. */
function choleskySolve(A: Float64Array, b: Float64Array, n: number): Float64Array | null {
  const L = Float64Array.from(A);
  for (let j = 0; j < n; j++) {
    let d = L[j * n + j]!;
    for (let k = 0; k < j; k++) d -= L[j * n + k]! ** 2;
    if (!(d > 0)) return null;
    d = Math.sqrt(d);
    L[j * n + j] = d;
    for (let i = j + 1; i < n; i++) {
      let s = L[i * n + j]!;
      for (let k = 0; k < j; k++) s -= L[i * n + k]! * L[j * n + k]!;
      L[i * n + j] = s / d;
    }
  }
  const y = Float64Array.from(b);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < i; k++) y[i]! -= L[i * n + k]! * y[k]!;
    y[i] = y[i]! / L[i * n + i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    for (let k = i + 1; k < n; k++) y[i]! -= L[k * n + i]! * y[k]!;
    y[i] = y[i]! / L[i * n + i]!;
  }
  return y;
}

/** Levenberg–Marquardt in the unit box from `start`; returns the best point and whether it stalled. */
function gradientSearch(ev: Evaluator, start: Point, base: Float64Array): { best: Point; stalled: boolean } {
  const nf = ev.free.length;
  let best = start;
  let lambda = 1e-3;
  let radius = TRUST_RADIUS;
  let slow = 0;
  const history: number[] = [best.penalty];
  while (!ev.exhausted) {
    if (meets(best.results, ev.targets)) return { best, stalled: false };
    let lin: ReturnType<Evaluator['linearise']>;
    try {
      lin = ev.linearise(best.x);
    } catch (e) {
      if (e instanceof SingularSystemError || e instanceof InputError) return { best, stalled: true }; // no derivatives here: the simplex may go on
      throw e;
    }
    const { t, D, results } = lin;
    best = { ...best, results };
    // the rows of the Gauss–Newton model: each spec's residual h(t_s) and its derivatives
    const rows = results.map((_, k) => {
      const [h, dh] = hinge(t[k]!);
      return { h, row: D.subarray(k * nf, (k + 1) * nf).map((x) => dh * x) };
    });
    const g = new Float64Array(nf);
    const A = new Float64Array(nf * nf);
    for (const { h, row } of rows) {
      for (let a = 0; a < nf; a++) {
        const ja = row[a]!;
        if (ja === 0) continue;
        g[a] += ja * h;
        for (let b = 0; b < nf; b++) A[a * nf + b] += ja * row[b]!;
      }
    }
    // variables held at a bound the descent direction points out of
    const moving: number[] = [];
    for (let a = 0; a < nf; a++) {
      const u = best.u[a]!;
      if ((u <= 0 && g[a]! > 0) || (u >= 1 && g[a]! < 0)) continue;
      moving.push(a);
    }
    const m = moving.length;
    let gmax = 0;
    for (const a of moving) gmax = Math.max(gmax, Math.abs(g[a]!));
    if (m === 0 || gmax <= 1e-300) return { best, stalled: true };
    let diagMax = 0;
    for (const a of moving) diagMax = Math.max(diagMax, A[a * nf + a]!);
    let accepted = false;
    while (!ev.exhausted) {
      const M = new Float64Array(m * m);
      const rhs = new Float64Array(m);
      moving.forEach((a, i) => {
        rhs[i] = -g[a]!;
        moving.forEach((b, j) => (M[i * m + j] = A[a * nf + b]!));
        M[i * m + i] += lambda * Math.max(A[a * nf + a]!, 1e-9 * diagMax, 1e-300);
      });
      const d = choleskySolve(M, rhs, m);
      let capped = false;
      if (d) {
        // within the trust radius (largest move of one variable, in unit coordinates)
        let longest = 0;
        for (let i = 0; i < m; i++) longest = Math.max(longest, Math.abs(d[i]!));
        capped = longest > radius;
        const shrink = capped ? radius / longest : 1;
        const u = Float64Array.from(best.u);
        moving.forEach((a, i) => (u[a] = Math.min(1, Math.max(0, u[a]! + shrink * d[i]!))));
        let step = 0;
        for (let a = 0; a < nf; a++) step = Math.max(step, Math.abs(u[a]! - best.u[a]!));
        if (step < 1e-15) return { best, stalled: true };
        const x = ev.values(u, base);
        const results = ev.check(x);
        const p = ev.penalty(results);
        ev.progress('gradient', Math.min(p, best.penalty), results.filter((q) => q.worstMargin < 0).length);
        if (p < best.penalty || (p === best.penalty && meets(results, ev.targets))) {
          slow = p > best.penalty * (1 - 1e-6) ? slow + 1 : 0;
          best = { u, x, results, penalty: p };
          lambda = Math.max(lambda / 3, 1e-9);
          if (capped) radius = Math.min(1, 2 * radius);
          accepted = true;
          ev.iterations++;
          break;
        }
      }
      // a refused step: a shorter one, more damped and within half the radius
      lambda *= 4;
      radius = Math.max(radius / 2, 1e-12);
      if (lambda > 1e10) return { best, stalled: true };
    }
    if (!accepted) break;
    if (slow >= 4) return { best, stalled: !meets(best.results, ev.targets) };
    // crawling: less than PROGRESS_WINDOW[1] gained over the last PROGRESS_WINDOW[0] steps (a
    // narrow curved valley with kinks, where the steps stay short): give the budget to another method or start
    history.push(best.penalty);
    const [steps, gain] = PROGRESS_WINDOW;
    if (history.length > steps && best.penalty > history[history.length - 1 - steps]! * (1 - gain)) return { best, stalled: !meets(best.results, ev.targets) };
  }
  return { best, stalled: false };
}

/** Nelder–Mead on the penalty in the unit box, from `start`. */
function simplexSearch(ev: Evaluator, start: Point, base: Float64Array, size = 0.1): Point {
  const n = ev.free.length;
  const at = (u: Float64Array): Point => {
    const c = u.map((x) => Math.min(1, Math.max(0, x)));
    const x = ev.values(c, base);
    const results = ev.check(x);
    const p = { u: c, x, results, penalty: ev.penalty(results) };
    ev.progress('simplex', Math.min(p.penalty, best.penalty), results.filter((q) => q.worstMargin < 0).length);
    if (p.penalty < best.penalty) best = p;
    return p;
  };
  let best = start;
  const simplex: Point[] = [start];
  for (let k = 0; k < n && !ev.exhausted; k++) {
    const u = Float64Array.from(start.u);
    u[k] = u[k]! + size <= 1 ? u[k]! + size : u[k]! - size;
    simplex.push(at(u));
  }
  if (simplex.length < n + 1) return best;
  const history: number[] = [];
  while (!ev.exhausted && !meets(best.results, ev.targets)) {
    simplex.sort((a, b) => a.penalty - b.penalty);
    // crawling, as for the gradient method, counted in iterations of n + 1 (one per vertex)
    history.push(best.penalty);
    const window = PROGRESS_WINDOW[0] * (n + 1);
    if (history.length > window && best.penalty > history[history.length - 1 - window]! * (1 - PROGRESS_WINDOW[1])) break;
    let spread = 0;
    for (let k = 1; k <= n; k++) for (let a = 0; a < n; a++) spread = Math.max(spread, Math.abs(simplex[k]!.u[a]! - simplex[0]!.u[a]!));
    if (spread < 1e-10) break;
    ev.iterations++;
    const worst = simplex[n]!;
    const centroid = new Float64Array(n);
    for (let k = 0; k < n; k++) for (let a = 0; a < n; a++) centroid[a] += simplex[k]!.u[a]! / n;
    const along = (c: number) => centroid.map((x, a) => x + c * (x - worst.u[a]!));
    const reflected = at(along(1));
    if (reflected.penalty < simplex[0]!.penalty) {
      const expanded = ev.exhausted ? reflected : at(along(2));
      simplex[n] = expanded.penalty < reflected.penalty ? expanded : reflected;
    } else if (reflected.penalty < simplex[n - 1]!.penalty) {
      simplex[n] = reflected;
    } else {
      const inside = reflected.penalty < worst.penalty;
      const contracted = ev.exhausted ? reflected : at(along(inside ? 0.5 : -0.5));
      if (contracted.penalty < Math.min(worst.penalty, reflected.penalty)) simplex[n] = contracted;
      else {
        for (let k = 1; k <= n && !ev.exhausted; k++) {
          simplex[k] = at(simplex[k]!.u.map((x, a) => simplex[0]!.u[a]! + 0.5 * (x - simplex[0]!.u[a]!)));
        }
      }
    }
  }
  return best;
}

/** The allowed values of a variable next to x (below and above; one when x is allowed), or null without series or step. */
export function neighbours(v: Variable, x: number): number[] | null {
  let below: number | undefined;
  let above: number | undefined;
  const slack = 1e-9 * Math.max(Math.abs(v.lower), Math.abs(v.upper));
  if (v.series) {
    // seriesValuesIn keeps a value a rounding away outside a bound written in other units
    for (const a of seriesValuesIn(v.lower, v.upper, v.series)) {
      if (a <= x) below = a;
      if (a >= x && above === undefined) above = a;
    }
  } else if (v.step !== undefined && v.step > 0) {
    const k = Math.floor((x - v.lower) / v.step + 1e-9);
    const lo = v.lower + k * v.step;
    const hi = v.lower + (k + 1) * v.step;
    if (lo <= v.upper + slack) below = lo;
    if (hi <= v.upper + slack) above = hi;
  } else return null;
  // as the netlist holds the value when it is written short (`6.8 nH`), kept in range
  const out = [...new Set([below, above].filter((a): a is number => a !== undefined).map((a) => Math.min(v.upper, Math.max(v.lower, netlistValue(a, v.unit)))))];
  // a value already allowed stays
  if (out.includes(x)) return [x];
  // nearest first
  out.sort((a, b) => Math.abs(a - x) - Math.abs(b - x));
  return out.length > 0 ? out : null;
}

/** Ranks a snapped combination: every spec passing first, then the smallest penalty. */
function better(a: { results: SpecResult[]; penalty: number }, b: { results: SpecResult[]; penalty: number }): boolean {
  const pa = a.results.every((r) => r.pass);
  const pb = b.results.every((r) => r.pass);
  if (pa !== pb) return pa;
  return a.penalty < b.penalty;
}

function snapValues(ev: Evaluator, fitted: Point): { x: Float64Array; results: SpecResult[]; penalty: number } {
  const vars = ev.model.variables;
  const choices: { i: number; values: number[] }[] = [];
  vars.forEach((v, i) => {
    const n = neighbours(v, fitted.x[i]!);
    if (n) choices.push({ i, values: n });
  });
  if (choices.length === 0) return fitted;
  const evalAt = (pick: number[]) => {
    const x = Float64Array.from(fitted.x);
    choices.forEach((c, k) => (x[c.i] = c.values[Math.min(pick[k]!, c.values.length - 1)]!));
    const results = ev.check(x);
    const penalty = ev.penalty(results);
    ev.progress('snap', penalty, results.filter((q) => q.worstMargin < 0).length);
    return { x, results, penalty };
  };
  if (choices.length <= EXHAUSTIVE_SNAP) {
    let best: ReturnType<typeof evalAt> | undefined;
    const total = choices.reduce((n, c) => n * c.values.length, 1);
    for (let code = 0; code < total; code++) {
      let rest = code;
      const pick = choices.map((c) => {
        const p = rest % c.values.length;
        rest = Math.floor(rest / c.values.length);
        return p;
      });
      const cand = evalAt(pick);
      if (!best || better(cand, best)) best = cand;
    }
    return best!;
  }
  const pick = choices.map(() => 0);
  let best = evalAt(pick);
  for (let round = 0; round < 3; round++) {
    let improved = false;
    for (let k = 0; k < choices.length; k++) {
      if (choices[k]!.values.length < 2) continue;
      pick[k] = 1 - pick[k]!;
      const cand = evalAt(pick);
      if (better(cand, best)) {
        best = cand;
        improved = true;
      } else pick[k] = 1 - pick[k]!;
    }
    if (!improved) break;
  }
  return best;
}

/**
 * After snapping, when the specs miss their targets and some variables have neither series nor
 * step, the gradient method moves those again with the snapped ones held.
 */
function refit(ev: Evaluator, point: { x: Float64Array; results: SpecResult[]; penalty: number }): { x: Float64Array; results: SpecResult[]; penalty: number } {
  const vars = ev.model.variables;
  const loose = ev.free.filter((i) => !vars[i]!.series && vars[i]!.step === undefined);
  if (meets(point.results, ev.targets) || loose.length === 0 || loose.length === ev.free.length || ev.exhausted) return point;
  const all = ev.free;
  ev.free = loose;
  try {
    const u = Float64Array.from(loose, (i) => toUnit(vars[i]!, point.x[i]!));
    const found = gradientSearch(ev, { u, x: point.x, results: point.results, penalty: point.penalty }, point.x).best;
    return found.penalty < point.penalty ? found : point;
  } finally {
    ev.free = all;
  }
}

/** Significant digits tried, in turn, for the values of variables without a series or step. */
export const TIDY_DIGITS = [4, 6];

/**
 * Rounds the variables without a series or step to a few significant digits (as the netlist
 * reads the short text: `1.532 nH`), where every spec keeps its target margin (or, when the
 * target was not met, where the penalty does not grow): values that read well when written back.
 */
function tidy(ev: Evaluator, point: { x: Float64Array; results: SpecResult[]; penalty: number }, start: Float64Array): { x: Float64Array; results: SpecResult[]; penalty: number } {
  const vars = ev.model.variables;
  // only values the fit changed: a value given in the netlist stays as written
  const loose = ev.free.filter((i) => !vars[i]!.series && vars[i]!.step === undefined && point.x[i] !== start[i]);
  if (loose.length === 0) return point;
  const met = meets(point.results, ev.targets);
  for (const digits of TIDY_DIGITS) {
    const x = Float64Array.from(point.x);
    for (const i of loose) {
      const v = vars[i]!;
      const r = point.x[i]! === 0 ? 0 : netlistValue(Number(point.x[i]!.toPrecision(digits)), v.unit);
      x[i] = Math.min(v.upper, Math.max(v.lower, r));
    }
    if (x.every((xi, i) => xi === point.x[i])) return point;
    if (ev.exhausted) return point;
    const results = ev.check(x);
    const penalty = ev.penalty(results);
    if (met ? meets(results, ev.targets) : penalty <= point.penalty && results.every((r, s) => r.pass || !point.results[s]!.pass)) return { x, results, penalty };
  }
  return point;
}

/**
 * Fits the model's variables to its specs (see the module notes). Starts from the model's
 * current values; leaves the model at the snapped values.
 */
export function fit(model: DesignModel, options: FitOptions = {}): FitResult {
  const method = options.method ?? 'auto';
  const starts = Math.max(1, Math.floor(options.starts ?? 1));
  const maxEvals = Math.max(1, Math.floor(options.maxEvals ?? 1000));
  const vars = model.variables;
  const start = model.values;
  const before = model.checkSpecs();
  const specs = before.map((r) => r.spec);
  const scales = Float64Array.from(specs, specScale);
  const targets = Float64Array.from(specs, (s, k) => options.specMargins?.get(s.name) ?? (options.margin ?? 0) * scales[k]!);
  let startNo = 1;
  const ev = new Evaluator(model, targets, specs, maxEvals, (phase, penalty, failing) => {
    options.onProgress?.({ evaluations: ev.evaluations, start: startNo, phase, penalty, failing });
  });
  ev.evaluations = 1;
  const base = Float64Array.from(start);
  const pointAt = (u: Float64Array, results?: SpecResult[]): Point => {
    const x = ev.values(u, base);
    const res = results ?? ev.check(x);
    return { u, x, results: res, penalty: ev.penalty(res) };
  };
  const u0 = Float64Array.from(ev.free, (i) => toUnit(vars[i]!, start[i]!));
  // the start point itself, exactly as given (its unit coordinates may not map back bit for bit)
  let best: Point = { u: u0, x: Float64Array.from(start), results: before, penalty: ev.penalty(before) };
  let bestMethod: FitResult['method'] = 'none';
  let bestStart = 1;
  let stop: FitStop = ev.free.length === 0 ? 'no-variables' : 'stalled';
  const random = mulberry32(options.seed ?? 1);
  for (let k = 0; k < starts && ev.free.length > 0; k++) {
    startNo = k + 1;
    let from: Point;
    if (k === 0) from = best;
    else {
      if (ev.exhausted) break;
      from = pointAt(Float64Array.from(ev.free, () => random()));
    }
    let found = from;
    let how: FitResult['method'] = 'none';
    if (method !== 'simplex') {
      const g = gradientSearch(ev, from, base);
      found = g.best;
      how = 'gradient';
      if (g.stalled && method === 'auto' && !ev.exhausted && !meets(found.results, targets)) {
        const s = simplexSearch(ev, found, base, 0.05);
        if (s.penalty < found.penalty) {
          found = s;
          how = 'simplex';
          // the simplex may have left the kink behind: polish with the gradient method
          if (!meets(found.results, targets) && !ev.exhausted) {
            const again = gradientSearch(ev, found, base).best;
            if (again.penalty < found.penalty) [found, how] = [again, 'gradient'];
          }
        }
      }
    } else {
      found = simplexSearch(ev, from, base);
      how = 'simplex';
    }
    if (found.x.every((x, i) => x === from.x[i])) how = 'none'; // no step was taken: the start values stand
    const foundMeets = meets(found.results, targets);
    const bestMeets = meets(best.results, targets);
    if (k === 0 || (foundMeets && !bestMeets) || (foundMeets === bestMeets && found.penalty < best.penalty)) {
      best = found;
      bestMethod = how;
      bestStart = k + 1;
    }
    if (meets(best.results, targets)) break;
  }
  if (meets(best.results, targets)) stop = ev.free.length === 0 ? 'no-variables' : 'target';
  else if (ev.exhausted) stop = 'max-evals';
  const snapped = options.snap === false ? best : tidy(ev, refit(ev, snapValues(ev, best)), start);
  model.setValues(snapped.x);
  const after = snapped.results;
  return {
    variables: vars,
    start,
    fitted: Float64Array.from(best.x),
    snapped: Float64Array.from(snapped.x),
    before,
    atFitted: best.results,
    after,
    targets,
    pass: after.every((r) => r.pass),
    targetMet: meets(after, targets),
    stop,
    penaltyFitted: best.penalty,
    penaltyAfter: snapped.penalty,
    evaluations: ev.evaluations,
    gradients: ev.gradients,
    iterations: ev.iterations,
    method: bestMethod,
    bestStart,
  };
}
