import type { Circuit } from '../elaborate/circuit.js';
import { formatFrequency } from '../format/frequency.js';
import { NodeSets } from '../elaborate/islands.js';
import { ELEMENTS, joinedNodes, outsideRange } from '../elements/registry.js';
import { GROUND } from '../elements/types.js';
import { createLu, luFactor, luSolve, rcondEstimate, LU_OK } from '../network/complex.js';
import {
  analyse,
  createFactor,
  factor as sparseFactor,
  NEEDS_PIVOTING,
  OK as SPARSE_OK,
  reciprocalCondition,
  refactor as sparseRefactor,
  refactorPlaced as sparseRefactorPlaced,
  refactorPlacedTwo,
  refactorTwo,
  twinFactor,
  solve as sparseSolve,
  solveRange as sparseSolveRange,
  type SparsePattern,
  type SparseFactor,
  type SolveRange,
} from './sparse/index.js';
import { reflectionFromPortVoltage, Refiner } from './refine.js';
import { solveSymmetricPorts, symmetricPorts, symmetricPortsCost, type SymmetricPorts } from './sparse/symmetric.js';

/** v[2·(i·p + j)] = x[plus_i, j] − x[minus_i, j]: the voltage across port i for right-hand side j. */
function gatherPortVoltages(x: Float64Array, p: number, plus: Int32Array, minus: Int32Array, v: Float64Array): void {
  for (let i = 0; i < p; i++) {
    const pl = plus[i]!;
    const mi = minus[i]!;
    for (let j = 0; j < p; j++) {
      let vr = 0;
      let vi = 0;
      if (pl !== GROUND) {
        vr = x[2 * (pl * p + j)]!;
        vi = x[2 * (pl * p + j) + 1]!;
      }
      if (mi !== GROUND) {
        vr -= x[2 * (mi * p + j)]!;
        vi -= x[2 * (mi * p + j) + 1]!;
      }
      v[2 * (i * p + j)] = vr;
      v[2 * (i * p + j) + 1] = vi;
    }
  }
}
import type { NetworkData } from '../network/types.js';
import { buildPlan, lowestOf, stampAt, type AdmittanceBatch, type StampPlan } from '../plan/plan.js';

/** Reciprocal condition number below which a system counts as singular to working precision. */
export const SINGULAR_RCOND = 1e-15;
/** …and below which the sweep warns that results may have lost digits. */
export const WARN_RCOND = 1e-11;
/**
 * The sparse path estimates the condition number only where the pivots spread over more than
 * this ratio (smallest / largest |pivot|): the estimate costs several solves, the spread one pass.
 */
export const PIVOT_SPREAD_CHECK = 1e-9;

/**
 * A reflection S_ii is refined (solve/refine.ts) where its expected rounding error, about
 * REFINE_EPS times the condition hint (see LinearEngine.conditionHint), exceeds REFINE_TOL times
 * its own size: a nearly matched port, or an ill-conditioned system. Elsewhere the ordinary result
 * keeps at least about ten significant digits and no point pays for refinement.
 */
export const REFINE_TOL = 1e-10;
const REFINE_EPS = 4 * Number.EPSILON;
/**
 * …and every column of S (the drive at one port) where that error exceeds this in absolute terms:
 * an ill-conditioned system (a tiny series resistance beside the terminations, say) whose
 * transmissions would otherwise carry it.
 */
export const REFINE_ABS = 1e-10;
/** A refined reflection with fewer significant digits than this gives a warning. */
export const WARN_DIGITS = 12;
/**
 * …unless it is below this magnitude (−300 dB): such a reflection is zero for every practical
 * purpose (a matched line's S11 comes out near 1e-37 or exactly 0, and its relative digits mean
 * nothing).
 */
export const WARN_FLOOR = 1e-15;

/** The nodal system has no unique solution at some frequency (a floating node, say). */
export class SingularSystemError extends Error {
  constructor(
    message: string,
    /** Frequency in Hz where it happened. */
    readonly frequency: number,
    /** The nodes (or unknowns) to blame, by name. */
    readonly culprits: string[],
    readonly help?: string,
  ) {
    super(message);
    this.name = 'SingularSystemError';
  }
}

/**
 * A result at some frequency is not a finite number (an overflow the checks before the solve did
 * not catch): raised instead of writing NaN or Infinity. `culprits` names the elements or unknowns
 * whose values went out of range, where they could be found.
 */
export class NonFiniteResultError extends SingularSystemError {
  constructor(message: string, frequency: number, culprits: string[], help?: string) {
    super(message, frequency, culprits, help);
    this.name = 'NonFiniteResultError';
  }
}

/** The status {@link runPoints} leaves in `failStatus` for a point whose S values are not all finite. */
const NON_FINITE = -3;

/** Which linear solver the sweep uses. */
export type SolverChoice = 'auto' | 'dense' | 'sparse';

/**
 * Up to this many unknowns the dense LU is used. Measured with `npm run bench`-style sweeps on
 * this project's reference machine: the sparse LU is already faster from 3 unknowns up (ladders of
 * 3 to 33 nodes: 1.5× to 11×) and at a fill of 0.26 to 0.53 around a 16-port data block (3× to 5×).
 */
export const DENSE_MAX_UNKNOWNS = 2;
/** …and at or above this fill of the pattern (slots / n²), where sparse indexing buys nothing. */
export const DENSE_MIN_FILL = 0.75;

/** The solver `auto` picks for a plan: dense for small or dense systems, sparse otherwise. */
export function chooseSolver(plan: StampPlan, choice: SolverChoice = 'auto'): 'dense' | 'sparse' {
  if (choice !== 'auto') return choice;
  const n = plan.size;
  return n <= DENSE_MAX_UNKNOWNS || plan.slotRow.length / (n * n) >= DENSE_MIN_FILL ? 'dense' : 'sparse';
}

/**
 * How a sweep solves its points: a dense LU; the sparse LU with forward and backward sweeps; or the
 * sparse LU of a symmetric matrix with forward sweeps alone for the port voltages (a reciprocal
 * network whose reference factorisation kept its pivots on the diagonal).
 */
export type SolveMethod = 'dense' | 'sparse' | 'sparse-symmetric';

/** One factor-and-solve engine over the slot values of a plan; allocated once per sweep. */
interface LinearEngine {
  /** Which method solves the points (see {@link SweepRunner.method}). */
  readonly method: SolveMethod;
  /**
   * Stamps the plan at point k of `freqs` (into `vals`, or straight into the factor storage) and
   * factors; returns -1 on success, else the unknown to blame (or -2: ill-conditioned). (The
   * sweep and an index, not the angular frequency: a number passed to a call that is not inlined
   * is boxed, an allocation per point.)
   */
  stampFactor(freqs: Float64Array, k: number, vals: Float64Array): number;
  /**
   * Stamps and factors points k and k + 1 at once where the engine can (see
   * `refactorPlacedTwo`). True when both succeeded: {@link portVoltages} and {@link lastRcond}
   * then serve the first, and after {@link second} the second. False: nothing is kept; take the
   * two points one at a time (which also tells which failed and why). Results are the same to
   * the bit either way.
   */
  stampFactorTwo(freqs: Float64Array, k: number, vals: Float64Array): boolean;
  /** After a successful {@link stampFactorTwo}: turns to its second point. */
  second(): void;
  /** The condition estimate of the last factorisation, where it was computed (else NaN). */
  lastRcond: number;
  /**
   * Solves for the port voltages: `rhs` (n × p, nonzero only in the rows of port terminals) gives
   * `v[2·(i·p + j)]`, the voltage across port i for right-hand side j; `x` (n × p) is scratch.
   */
  portVoltages(rhs: Float64Array, x: Float64Array, v: Float64Array): void;
  /** For explaining a failure: a solve with the last (ill-conditioned) factors, or undefined. */
  nullDirection(): Float64Array | undefined;
  /** Solves A·x = b (one right-hand side, every unknown) with the factors of the current point. */
  solveOne(b: Float64Array, x: Float64Array): void;
  /**
   * A cheap lower guess of the current point's condition number: 1/{@link lastRcond} where that was
   * estimated, else the spread of the pivots (largest over smallest modulus; the sparse engine
   * estimates the condition only where the pivots spread wider than {@link PIVOT_SPREAD_CHECK}),
   * written to into[0] (a number returned from a call V8 does not inline would be boxed).
   */
  conditionHint(into: Float64Array): void;
  /** After the plan's frequency-independent values changed (src/plan/plan.ts restampElements): takes them up. */
  refresh(): void;
}

/** The dense engine (classes, not closures: one set of functions for every sweep, which the JIT keeps). */
class DenseEngine implements LinearEngine {
  readonly method = 'dense';
  lastRcond = NaN;
  private readonly n: number;
  private readonly pos: Int32Array;
  private readonly a: Float64Array;
  private readonly lu: ReturnType<typeof createLu>;
  constructor(private readonly plan: StampPlan) {
    const n = plan.size;
    this.n = n;
    const nSlots = plan.slotRow.length;
    this.pos = new Int32Array(nSlots);
    for (let s = 0; s < nSlots; s++) this.pos[s] = 2 * (plan.slotRow[s]! * n + plan.slotCol[s]!);
    this.a = new Float64Array(2 * n * n);
    this.lu = createLu(n);
  }
  stampFactor(freqs: Float64Array, k: number, vals: Float64Array): number {
    stampAt(this.plan, 2 * Math.PI * freqs[k]!, vals);
    const a = this.a;
    const pos = this.pos;
    a.fill(0);
    for (let s = 0; s < pos.length; s++) {
      const q = pos[s]!;
      a[q] += vals[2 * s]!;
      a[q + 1] += vals[2 * s + 1]!;
    }
    const status = luFactor(this.n, a, this.lu, 0);
    if (status !== LU_OK) return status;
    this.lastRcond = rcondEstimate(this.lu);
    return this.lastRcond < SINGULAR_RCOND ? -2 : -1;
  }
  stampFactorTwo(): boolean {
    return false;
  }
  second(): void {}
  portVoltages(rhs: Float64Array, x: Float64Array, v: Float64Array): void {
    const p = this.plan.portPlus.length;
    luSolve(this.lu, rhs, x, p);
    gatherPortVoltages(x, p, this.plan.portPlus, this.plan.portMinus, v);
  }
  nullDirection(): Float64Array | undefined {
    const n = this.n;
    if (this.lu.status !== LU_OK) return undefined;
    const b = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) b[2 * i] = 1 + i / n;
    return luSolve(this.lu, b, new Float64Array(2 * n), 1);
  }
  solveOne(b: Float64Array, x: Float64Array): void {
    luSolve(this.lu, b, x, 1);
  }
  conditionHint(into: Float64Array): void {
    into[0] = 1 / this.lastRcond;
  }
  refresh(): void {}
}

/** After a pair of points failed to factor together, the next this many points are taken one at a time. */
const PAIR_SKIP = 8;

/**
 * The sparse engine. Its pivot order is fixed once, by a pivoting factorisation at one reference
 * frequency; every point then refactors in that order, and a point where a pivot collapses gets a
 * fresh pivoting factorisation of its own (in a second factor, so the reference order stays).
 * Each point's result therefore depends only on its own values and the reference — not on which
 * points were solved before it — which keeps parallel sweeps bit-identical to one thread.
 */
class SparseEngine implements LinearEngine {
  readonly method: SolveMethod;
  lastRcond = NaN;
  private readonly n: number;
  private readonly ports: Int32Array;
  private readonly pattern: SparsePattern;
  private readonly main: SparseFactor;
  private scratch: SparseFactor | undefined;
  private used: SparseFactor;
  private readonly mainRange: SolveRange;
  private range: SolveRange;
  /**
   * Where every stamp is a kernel-batched admittance or frequency-independent (no per-element
   * stampers): the image of the constant part in the factor storage, and the batch retargeted
   * to add straight into it. The slot values are then only built where a fallback needs them.
   */
  private readonly direct: { image: Float64Array; batch: AdmittanceBatch | undefined; target: Int32Array } | undefined;
  /**
   * Where the matrix is symmetric (a reciprocal network) and the reference factorisation kept its
   * pivots on the diagonal: the port solve by forward sweeps alone, used with the main factor when
   * it is estimated cheaper than the forward and backward sweeps.
   */
  private readonly sym: SymmetricPorts | undefined;
  /**
   * For factoring two points at once: a twin of the main factor (its own values on the same
   * sequence), its symmetric port solve, its slot values, and its condition estimate. Undefined
   * where the reference factorisation failed or keeps no update list.
   */
  private readonly twin: SparseFactor | undefined;
  private readonly symB: SymmetricPorts | undefined;
  private readonly valsB: Float64Array;
  private lastRcondB = NaN;
  /** Points still to be taken alone after a pair failed (points that need pivoting tend to come in runs). */
  private pairSkip = 0;
  /** Angular frequencies of the point or pair being stamped (see {@link AdmittanceBatch.stamp}). */
  private readonly w = new Float64Array(2);
  constructor(
    private readonly plan: StampPlan,
    reference: Float64Array | undefined,
  ) {
    const n = plan.size;
    // Right-hand sides only in port rows, and only port voltages wanted: with the port unknowns
    // ordered last the solves touch only the last few steps, but the factors may fill more (on a
    // ladder, a dense row and column for the far port). The cheaper of the two orders is taken.
    const ports = Int32Array.from([...plan.portPlus, ...plan.portMinus].filter((u) => u >= 0));
    const nrhs = plan.portPlus.length;
    let pattern = analyse(n, plan.slotRow, plan.slotCol);
    if (ports.length > 0) {
      const held = analyse(n, plan.slotRow, plan.slotCol, { last: ports });
      if (pointCost(held, ports, nrhs) < pointCost(pattern, ports, nrhs)) pattern = held;
    }
    this.n = n;
    this.ports = ports;
    this.pattern = pattern;
    this.main = createFactor(pattern);
    this.used = this.main;
    if (reference) sparseFactor(this.main, reference);
    this.mainRange = sparseSolveRange(this.main, ports, ports);
    this.range = this.mainRange;
    const sym = plan.symmetric && reference && this.main.valid ? symmetricPorts(this.main, plan.portPlus, plan.portMinus) : undefined;
    if (sym && symmetricPortsCost(this.main, sym) <= solveCost(this.main, this.mainRange, nrhs)) this.sym = sym;
    this.method = this.sym ? 'sparse-symmetric' : 'sparse';
    this.twin = this.main.valid && this.main.useUpdateList ? twinFactor(this.main) : undefined;
    this.symB = this.sym && this.twin ? symmetricPorts(this.twin, plan.portPlus, plan.portMinus) : undefined;
    this.valsB = new Float64Array(this.twin ? 2 * plan.slotRow.length : 0);
    if (plan.stampers.length === 0) {
      const target = this.main.slotTarget;
      const image = new Float64Array(2 * this.main.entries);
      this.direct = { image, batch: plan.batch?.retargeted(target), target };
      this.refresh();
    }
  }
  refresh(): void {
    const direct = this.direct;
    if (!direct) return;
    const { image, target } = direct;
    const base = this.plan.baseValues;
    image.fill(0);
    for (let k = 0; k < target.length; k++) {
      image[target[k]!] += base[2 * k]!;
      image[target[k]! + 1] += base[2 * k + 1]!;
    }
  }
  stampFactor(freqs: Float64Array, k: number, vals: Float64Array): number {
    const w = this.w;
    w[0] = 2 * Math.PI * freqs[k]!;
    this.used = this.main;
    this.range = this.mainRange;
    this.lastRcond = NaN;
    const direct = this.direct;
    let status;
    if (direct) {
      const lu = this.main.lu;
      lu.set(direct.image);
      direct.batch?.stamp(w, lu);
      status = sparseRefactorPlaced(this.main);
      // the slot values, for a fallback or a condition estimate below
      if (status !== SPARSE_OK || this.main.pivotMin < PIVOT_SPREAD_CHECK * this.main.pivotMax) {
        stampAt(this.plan, w[0]!, vals);
        this.main.lastValues = vals;
      }
    } else {
      stampAt(this.plan, w[0]!, vals);
      status = sparseRefactor(this.main, vals);
    }
    if (status === NEEDS_PIVOTING) {
      const scratch = (this.scratch ??= createFactor(this.pattern));
      this.used = scratch;
      status = sparseFactor(scratch, vals);
      this.range = sparseSolveRange(scratch, this.ports, this.ports);
    }
    const used = this.used;
    if (status !== SPARSE_OK) return used.failColumn >= 0 ? used.failColumn : this.n;
    // the condition estimate only where the pivots spread wide
    if (used.pivotMin >= PIVOT_SPREAD_CHECK * used.pivotMax) return -1;
    this.lastRcond = reciprocalCondition(used);
    return this.lastRcond < SINGULAR_RCOND ? -2 : -1;
  }
  stampFactorTwo(freqs: Float64Array, k: number, vals: Float64Array): boolean {
    const twin = this.twin;
    if (!twin) return false;
    if (this.pairSkip > 0) {
      this.pairSkip--;
      return false;
    }
    const w = this.w;
    w[0] = 2 * Math.PI * freqs[k]!;
    w[1] = 2 * Math.PI * freqs[k + 1]!;
    const main = this.main;
    const plan = this.plan;
    const valsB = this.valsB;
    this.used = main;
    this.range = this.mainRange;
    this.lastRcond = NaN;
    this.lastRcondB = NaN;
    const direct = this.direct;
    let ok: boolean;
    if (direct) {
      main.lu.set(direct.image);
      twin.lu.set(direct.image);
      direct.batch?.stampTwo(w, main.lu, twin.lu);
      ok = refactorPlacedTwo(main, twin);
    } else {
      stampAt(plan, w[0]!, vals);
      stampAt(plan, w[1]!, valsB);
      ok = refactorTwo(main, twin, vals, valsB);
    }
    if (ok) {
      this.lastRcond = this.wideSpreadRcond(main, 0, vals);
      this.lastRcondB = this.wideSpreadRcond(twin, 1, valsB);
      // (NaN: not estimated)
      ok = !(this.lastRcond < SINGULAR_RCOND) && !(this.lastRcondB < SINGULAR_RCOND);
    }
    if (!ok) this.pairSkip = PAIR_SKIP;
    return ok;
  }
  /**
   * The condition estimate of the factorisation in `f` (at angular frequency `w[i]`) where its
   * pivots spread wide, else NaN; the slot values it needs are built first where the stamps went
   * straight into `f`.
   */
  private wideSpreadRcond(f: SparseFactor, i: number, vals: Float64Array): number {
    if (f.pivotMin >= PIVOT_SPREAD_CHECK * f.pivotMax) return NaN;
    if (this.direct) {
      stampAt(this.plan, this.w[i]!, vals);
      f.lastValues = vals;
    }
    return reciprocalCondition(f);
  }
  second(): void {
    this.used = this.twin!;
    this.lastRcond = this.lastRcondB;
  }
  portVoltages(rhs: Float64Array, x: Float64Array, v: Float64Array): void {
    const plan = this.plan;
    const p = plan.portPlus.length;
    const used = this.used;
    const sym = used === this.main ? this.sym : used === this.twin ? this.symB : undefined;
    if (sym) {
      solveSymmetricPorts(used, sym);
      // right-hand side j is drive_j·c_j: v_ij = (c_iᵀ·A⁻¹·c_j)·drive_j
      const g = sym.g;
      for (let j = 0; j < p; j++) {
        const pl = plan.portPlus[j]!;
        const mi = plan.portMinus[j]!;
        const sign = pl !== GROUND ? 1 : -1;
        const r = 2 * ((pl !== GROUND ? pl : mi) * p + j);
        const dr = mi === GROUND && pl === GROUND ? 0 : sign * rhs[r]!;
        const di = mi === GROUND && pl === GROUND ? 0 : sign * rhs[r + 1]!;
        for (let i = 0; i < p; i++) {
          const q = 2 * (i * p + j);
          const gr = g[q]!;
          const gi = g[q + 1]!;
          v[q] = gr * dr - gi * di;
          v[q + 1] = gr * di + gi * dr;
        }
      }
      return;
    }
    // right-hand sides only in port rows, and only port voltages wanted
    sparseSolve(this.used, rhs, x, p, this.range);
    gatherPortVoltages(x, p, plan.portPlus, plan.portMinus, v);
  }
  nullDirection(): Float64Array | undefined {
    const n = this.n;
    const b = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) b[2 * i] = 1 + i / n;
    const x = new Float64Array(2 * n);
    sparseSolve(this.used, b, x, 1);
    return x;
  }
  solveOne(b: Float64Array, x: Float64Array): void {
    sparseSolve(this.used, b, x, 1);
  }
  conditionHint(into: Float64Array): void {
    const r = this.lastRcond;
    const u = this.used;
    into[0] = r > 0 ? 1 / r : u.pivotMax / u.pivotMin;
  }
}

/** Estimated work of the forward and backward sweeps of a partial solve with `f` (units of {@link symmetricPortsCost}). */
function solveCost(f: SparseFactor, range: SolveRange, nrhs: number): number {
  const n = f.n;
  let u = 0;
  for (let j = range.lastStep; j < n; j++) u += f.diagPos[j]! - f.colPtr[j]!;
  return nrhs * (f.lRowPtr[n]! - f.lRowPtr[range.firstStep]! + u + (n - range.firstStep) + (n - range.lastStep));
}

/**
 * Estimated work of one frequency point with this pattern (diagonal pivots): the refactor's
 * updates, scalings and placements, and the partial solves for `nrhs` right-hand sides in the rows
 * `ports` that read only the `ports` unknowns. The weights are measured ratios on ladders and meshes
 * (a refactor step about 2.5× a solve step per right-hand side).
 */
export function pointCost(pattern: SparsePattern, ports: Int32Array, nrhs: number): number {
  const n = pattern.n;
  let first = n;
  for (const u of ports) first = Math.min(first, pattern.stepOf[u]!);
  let lRow = 0;
  for (let q = 0; q < pattern.lRow.length; q++) if (pattern.lRow[q]! >= first) lRow++;
  const uCol = pattern.uStart[n]! - pattern.uStart[first]!;
  const factor = pattern.updateCount + pattern.lNonzeros + pattern.uNonzeros + n;
  const solve = nrhs * (lRow + uCol + 2 * (n - first));
  return 2.5 * factor + solve;
}

export interface SweepOptions {
  /** The linear solver: `auto` (default) picks dense for small or dense systems, sparse otherwise. */
  solver?: SolverChoice;
  /**
   * The frequency (Hz) whose factorisation fixes the sparse solver's pivot order (default: the
   * first of the sweep). The shares of a parallel sweep all pass the whole sweep's first.
   */
  pivotFrequency?: number;
  /** Frequencies in Hz (default: the circuit's sweep). */
  frequencies?: Float64Array;
  /** A plan built earlier for the same circuit (its lowest frequency must not be above the sweep's). */
  plan?: StampPlan;
  /**
   * The lowest frequency (Hz) of the whole sweep, which fixes how elements are formulated
   * (default: the lowest of `frequencies`). The shares of a parallel sweep pass the whole sweep's.
   */
  lowestFrequency?: number;
  /** Called after each solved frequency point with the number done and the total. */
  onProgress?: (done: number, total: number) => void;
  /** Called once at the end of a sweep whose system came close to singular (see {@link WARN_RCOND}). */
  onWarning?: (message: string, frequency: number, rcond: number) => void;
}

/**
 * Solves the circuit's S-parameters over the sweep.
 *
 * Method: every port j is terminated in its reference Zj and driven, one at a time, by a Norton
 * source of 2/√Zj (the Thevenin source 2√Zj behind Zj), which makes the incident power wave
 * a_j = 1 and all others zero. Then the reflected waves are b_i = (v_i − Zi·i_i)/(2√Zi) =
 * v_i/√Zi − δij, so S_ij = v_i/√Zi − δij with v_i the voltage across port i. This equals
 * S = (Z̄+U)⁻¹(Z̄−U), Z̄ = G·Z·G, G = diag(1/√Zref), wherever Z exists, but needs neither Z nor Y:
 * only the terminated nodal system must be regular.
 *
 * The loop over frequencies allocates nothing: the matrix, factors and right-hand sides are
 * allocated once. Where a reflection is so small (or the system so ill-conditioned) that the
 * rounding of this solve would show in it, that port's column is refined in double-double
 * (solve/refine.ts; see {@link REFINE_TOL}); a warning says how many digits remain uncertain.
 * A point whose S values are not all finite raises {@link NonFiniteResultError} instead of being
 * written.
 */
export function solveSweep(circuit: Circuit, options: SweepOptions = {}): NetworkData {
  const runner = new SweepRunner(circuit, options);
  runner.run(0, runner.frequencies.length);
  return runner.finish();
}

/**
 * A sweep set up once (plan, ordering, reference factorisation, right-hand sides) whose points
 * can be solved in any order and in pieces — by {@link solveSweep} in one go, or chunk by chunk
 * by the threads of a parallel sweep, each writing its points into one shared output array. A
 * point's result depends only on its own values and the reference, never on which points were
 * solved before it by the same runner.
 */
export class SweepRunner {
  readonly frequencies: Float64Array;
  /** S values, 2·p·p per point (complex interleaved), in the layout of NetworkData.values. */
  readonly values: Float64Array;
  readonly plan: StampPlan;
  private readonly loop: PointLoop;
  private readonly engine: LinearEngine;
  private readonly circuit: Circuit;
  private readonly onWarning: SweepOptions['onWarning'];
  private readonly complexRefs: boolean;

  /** `into`: the output array to write (shared between threads), 2·p·p·points long. */
  constructor(circuit: Circuit, options: SweepOptions = {}, into?: Float64Array) {
    this.circuit = circuit;
    this.onWarning = options.onWarning;
    const freqs = options.frequencies ?? circuit.frequencies;
    const lowest = lowestOf(freqs);
    const plan = options.plan ?? buildPlan(circuit, { lowestFrequency: options.lowestFrequency ?? lowest });
    checkRanges(circuit, freqs);
    if (freqs.length > 0 && lowest < plan.lowestFrequency) {
      throw new RangeError(`the sweep reaches down to ${formatFrequency(lowest)}, below the ${formatFrequency(plan.lowestFrequency)} its stamp plan was built for`);
    }
    const n = plan.size;
    const p = plan.portPlus.length;
    const nSlots = plan.slotRow.length;
    const vals = new Float64Array(2 * nSlots);
    let engine: LinearEngine;
    if (chooseSolver(plan, options.solver) === 'dense') engine = new DenseEngine(plan);
    else {
      const f0 = options.pivotFrequency ?? freqs[0];
      let reference: Float64Array | undefined;
      if (f0 !== undefined) {
        reference = new Float64Array(2 * nSlots);
        stampAt(plan, 2 * Math.PI * f0, reference);
      }
      engine = new SparseEngine(plan, reference);
    }
    const rhs = new Float64Array(2 * n * p);
    const x = new Float64Array(2 * n * p);
    const sqrtRef = plan.portReference.map(Math.sqrt);
    // Power waves for Zref = R + jX (Kurokawa, 1965): a = (v + Zref·i)/(2√R), b = (v − Zref*·i)/(2√R).
    // The Norton drive 2√R/Zref across 1/Zref makes a_j = 1; then b_i = v_i·√R_i/Zref_i − δij·Zref_i*/Zref_i.
    const complexRefs = plan.portReactance.some((x) => x !== 0);
    const kr = new Float64Array(p); // √R/Zref
    const ki = new Float64Array(p);
    const dr = new Float64Array(p); // Zref*/Zref
    const di = new Float64Array(p);
    for (let i = 0; i < p; i++) {
      const r = plan.portReference[i]!;
      const x = plan.portReactance[i]!;
      // with t = X/R (scaled so that nothing overflows for large references):
      // √R/Zref = (1 − jt)/(√R·(1 + t²)), Zref*/Zref = (1 − t² − 2jt)/(1 + t²)
      const t = x / r;
      const q = 1 + t * t;
      kr[i] = 1 / (sqrtRef[i]! * q);
      ki[i] = -t / (sqrtRef[i]! * q);
      dr[i] = (1 - t * t) / q;
      di[i] = (-2 * t) / q;
    }
    const out = into ?? new Float64Array(2 * p * p * freqs.length);
    if (out.length < 2 * p * p * freqs.length) throw new RangeError('sweep: the output array is too short for the sweep');

    // Right-hand sides are the same at every frequency.
    for (let j = 0; j < p; j++) {
      // 2√R/Zref = 2R/(√R·Zref) = 2·conj(kr + j·ki)… written out: 2√R·(R − jX)/(R² + X²) = 2·(kr + j·ki)
      const driveR = 2 * kr[j]!;
      const driveI = 2 * ki[j]!;
      const pl = plan.portPlus[j]!;
      const mi = plan.portMinus[j]!;
      if (pl !== GROUND) {
        rhs[2 * (pl * p + j)] += driveR;
        rhs[2 * (pl * p + j) + 1] += driveI;
      }
      if (mi !== GROUND) {
        rhs[2 * (mi * p + j)] -= driveR;
        rhs[2 * (mi * p + j) + 1] -= driveI;
      }
    }

    this.loop = {
      engine,
      freqs,
      vals,
      rhs,
      x,
      v: new Float64Array(2 * p * p),
      out,
      p,
      invSqrtRef: Float64Array.from(sqrtRef, (r) => 1 / r),
      complexRefs,
      kr,
      ki,
      dr,
      di,
      onProgress: options.onProgress,
      worstRcond: WARN_RCOND,
      worstAt: NaN,
      failStatus: -1,
      plan,
      refiner: undefined,
      refinedAt: -1,
      solveOne: (b, x) => engine.solveOne(b, x),
      dd: new Float64Array(4),
      hint: new Float64Array(1),
      fewestDigits: Infinity,
      fewestAt: NaN,
      fewestPort: -1,
    };
    this.frequencies = freqs;
    this.values = out;
    this.plan = plan;
    this.engine = engine;
    this.complexRefs = complexRefs;
  }

  /**
   * How the points are solved (the symmetric method serves the points whose reference pivots
   * hold; a point that needs a fresh pivoting factorisation is solved by the general sweeps).
   */
  get method(): SolveMethod {
    return this.engine.method;
  }

  /**
   * Takes up new element values given to the plan (src/plan/plan.ts restampElements): the next
   * points are solved with them, in the same ordering and pivot sequence.
   */
  refresh(): void {
    this.engine.refresh();
    const L = this.loop;
    // the refiner's matrix is that of the old values
    L.refinedAt = -1;
    L.worstRcond = WARN_RCOND;
    L.worstAt = NaN;
    L.fewestDigits = Infinity;
    L.fewestAt = NaN;
    L.fewestPort = -1;
  }

  /**
   * Stamps and factors point k on its own, for work beyond the sweep's (derivatives by the direct
   * method, src/design/sensitivity.ts): {@link solveFactored} then solves with its factors. Throws
   * as {@link run} does where the system is singular.
   */
  factorPoint(k: number): void {
    const status = this.engine.stampFactor(this.frequencies, k, this.loop.vals);
    if (status !== -1) throw explainSingular(this.circuit, this.plan, this.frequencies[k]!, status >= 0 ? status : -1, this.engine);
  }

  /** Solves A·x = b (every unknown, complex interleaved) with the factors of the last {@link factorPoint}. */
  solveFactored(b: Float64Array, x: Float64Array): void {
    this.engine.solveOne(b, x);
  }

  /**
   * How port voltages become S (see {@link solveSweep}): the right-hand sides (n × p, column j
   * drives port j), and per port i the factor k_i (complex: kr, ki) with S_ij = v_ij·k_i − δij·d_i.
   */
  get waves(): { rhs: Float64Array; kr: Float64Array; ki: Float64Array } {
    const L = this.loop;
    return { rhs: L.rhs, kr: L.kr, ki: L.ki };
  }

  /** Solves the points k0 ≤ k < k1; throws {@link SingularSystemError} where the system is singular. */
  run(k0: number, k1: number): void {
    const failed = runPoints(this.loop, k0, k1);
    if (failed >= 0 && this.loop.failStatus === NON_FINITE) throw explainNonFinite(this.circuit, this.plan, this.frequencies[failed]!, this.loop.vals, true);
    if (failed >= 0) throw explainSingular(this.circuit, this.plan, this.frequencies[failed]!, this.loop.failStatus >= 0 ? this.loop.failStatus : -1, this.engine);
  }

  /**
   * The smallest condition estimate seen below {@link WARN_RCOND}, and where (NaN: none); the
   * fewest significant digits a refined reflection kept below {@link WARN_DIGITS}, where and at
   * which port (0-based; NaN: none).
   */
  get worst(): SweepWorst {
    const L = this.loop;
    return { rcond: L.worstRcond, frequency: L.worstAt, digits: L.fewestDigits, digitsAt: L.fewestAt, digitsPort: L.fewestPort };
  }

  /** The network data once every point is solved; gives the near-singularity warnings if due. */
  finish(worst = this.worst): NetworkData {
    sweepWarnings(this.onWarning, worst);
    const plan = this.plan;
    return {
      parameter: 'S',
      ports: plan.portPlus.length,
      frequencies: Float64Array.from(this.frequencies),
      references: Float64Array.from(plan.portReference),
      ...(this.complexRefs ? { referenceReactances: Float64Array.from(plan.portReactance) } : {}),
      values: this.values,
      title: this.circuit.title,
    };
  }
}

/** What a sweep (or a share of it) reports for its warnings; see {@link SweepRunner.worst}. */
export interface SweepWorst {
  rcond: number;
  frequency: number;
  digits: number;
  digitsAt: number;
  digitsPort: number;
}

/** The worse of two {@link SweepWorst} reports, field group by field group. */
export function worseOf(a: SweepWorst, b: SweepWorst): SweepWorst {
  const r = !Number.isNaN(b.frequency) && (Number.isNaN(a.frequency) || b.rcond < a.rcond) ? b : a;
  const d = !Number.isNaN(b.digitsAt) && (Number.isNaN(a.digitsAt) || b.digits < a.digits) ? b : a;
  return { rcond: r.rcond, frequency: r.frequency, digits: d.digits, digitsAt: d.digitsAt, digitsPort: d.digitsPort };
}

/**
 * Gives the sweep's warnings: that the nodal system came close to singular (at the worst point),
 * and that a small reflection kept few significant digits even after refinement — one message
 * where both happened at the same frequency.
 */
export function sweepWarnings(onWarning: SweepOptions['onWarning'], w: SweepWorst): void {
  const few = Number.isNaN(w.digitsAt) ? '' : fewDigits(w);
  if (!Number.isNaN(w.frequency)) {
    // the solve may lose about log10(condition number) of the 16 significant digits of a double
    const lost = Math.min(16, Math.max(1, Math.round(-Math.log10(w.rcond))));
    const same = w.digitsAt === w.frequency;
    onWarning?.(
      `the nodal system is nearly singular at ${formatFrequency(w.frequency)} (reciprocal condition ${w.rcond.toExponential(1)}): the results there may have lost about ${lost} of their 16 significant digits${same ? `; ${few}` : ''}`,
      w.frequency,
      w.rcond,
    );
    if (same) return;
  }
  if (few) onWarning?.(`at ${formatFrequency(w.digitsAt)}, ${few} (the system is ill-conditioned there, e.g. element values far apart in size)`, w.digitsAt, Math.pow(10, -Math.max(0, Math.floor(w.digits))));
}

/** The few-digits part of {@link sweepWarnings}. */
function fewDigits(w: SweepWorst): string {
  const i = w.digitsPort + 1;
  const kept = Math.max(0, Math.floor(w.digits));
  return `S${i}${i} (a reflection below the rounding of the ordinary solve, refined in extended precision) keeps only about ${kept} certain significant digits`;
}

/** Gives the warning that the nodal system came close to singular at `at` (Hz). */
export function nearSingularWarning(onWarning: SweepOptions['onWarning'], rcond: number, at: number): void {
  sweepWarnings(onWarning, { rcond, frequency: at, digits: Infinity, digitsAt: NaN, digitsPort: -1 });
}

/** Everything the per-point loop reads and what it reports back (one plain object per sweep). */
interface PointLoop {
  engine: LinearEngine;
  freqs: Float64Array;
  vals: Float64Array;
  rhs: Float64Array;
  x: Float64Array;
  /** The port voltages of a point, p × p complex. */
  v: Float64Array;
  out: Float64Array;
  p: number;
  invSqrtRef: Float64Array;
  complexRefs: boolean;
  kr: Float64Array;
  ki: Float64Array;
  dr: Float64Array;
  di: Float64Array;
  onProgress: ((done: number, total: number) => void) | undefined;
  /** Out: the smallest condition estimate below WARN_RCOND and its frequency (NaN: none). */
  worstRcond: number;
  worstAt: number;
  /** Out: the engine's status at the point that failed. */
  failStatus: number;
  plan: StampPlan;
  /** Made on first need: the double-double refinement of small reflections. */
  refiner: Refiner | undefined;
  /** The point whose matrix the refiner holds (−1: none). */
  refinedAt: number;
  solveOne: (b: Float64Array, x: Float64Array) => void;
  /** Scratch: a port voltage in double-double. */
  dd: Float64Array;
  /** Scratch: the engine's condition hint of the current point. */
  hint: Float64Array;
  /** Out: the fewest significant digits of a refined reflection (Infinity: none), where and which port. */
  fewestDigits: number;
  fewestAt: number;
  fewestPort: number;
}

/**
 * The per-frequency loop: stamp, factor, solve, and S from the port voltages. A function of its
 * own (not the body of solveSweep), so that the JIT optimises it once and keeps it over sweeps.
 * Solves the points k0 ≤ k < k1, two at a time where the engine can factor two together (the
 * same results to the bit as one at a time). Returns −1, or the index of the point whose system
 * could not be solved.
 */
function runPoints(L: PointLoop, k0: number, k1: number): number {
  const { engine, freqs, vals } = L;
  const total = freqs.length;
  let k = k0;
  while (k < k1) {
    if (k + 1 < k1 && engine.stampFactorTwo(freqs, k, vals)) {
      if (finishPoint(L, k) !== 0) {
        L.failStatus = NON_FINITE;
        return k;
      }
      engine.second();
      if (finishPoint(L, k + 1) !== 0) {
        L.failStatus = NON_FINITE;
        return k + 1;
      }
      if (L.onProgress) {
        L.onProgress(k + 1, total);
        L.onProgress(k + 2, total);
      }
      k += 2;
      continue;
    }
    const status = engine.stampFactor(freqs, k, vals);
    if (status !== -1) {
      L.failStatus = status;
      return k;
    }
    if (finishPoint(L, k) !== 0) {
      L.failStatus = NON_FINITE;
      return k;
    }
    if (L.onProgress) L.onProgress(k + 1, total);
    k++;
  }
  return -1;
}

/**
 * For point k, factored: notes its condition estimate, solves for the port voltages, writes S.
 * Returns 0 when every S value written is finite, else NaN (the sum of x − x over the values: one
 * subtraction and addition a value, no branch).
 */
function finishPoint(L: PointLoop, k: number): number {
  const { engine, rhs, x, v, out, p, invSqrtRef, complexRefs, kr, ki, dr, di } = L;
  if (engine.lastRcond < L.worstRcond) {
    L.worstRcond = engine.lastRcond;
    L.worstAt = L.freqs[k]!;
  }
  engine.portVoltages(rhs, x, v);
  const base = 2 * p * p * k;
  let finite = 0;
  for (let i = 0; i < p; i++) {
    const inv = invSqrtRef[i]!;
    for (let j = 0; j < p; j++) {
      const q = 2 * (i * p + j);
      const vr = v[q]!;
      const vi = v[q + 1]!;
      const o = base + q;
      let sr: number;
      let si: number;
      if (complexRefs) {
        sr = vr * kr[i]! - vi * ki[i]! - (i === j ? dr[i]! : 0);
        si = vr * ki[i]! + vi * kr[i]! - (i === j ? di[i]! : 0);
      } else {
        sr = vr * inv - (i === j ? 1 : 0);
        si = vi * inv;
      }
      out[o] = sr;
      out[o + 1] = si;
      finite += sr - sr + (si - si);
    }
  }
  if (finite !== 0) return finite;
  // small reflections whose rounding error would show: refined in double-double (seldom)
  engine.conditionHint(L.hint);
  const risk = REFINE_EPS * L.hint[0]!;
  for (let i = 0; i < p; i++) {
    const o = base + 2 * (i * p + i);
    if (risk > REFINE_ABS || risk > REFINE_TOL * (Math.abs(out[o]!) + Math.abs(out[o + 1]!))) refineReflection(L, k, i, o);
  }
  return 0;
}

/**
 * Replaces S_ii of point k (at out[o..o+1]) by its value from a double-double refinement of the
 * port's solution (solve/refine.ts), and notes how many digits it keeps. Taken only for the
 * points and ports {@link finishPoint} finds at risk.
 */
function refineReflection(L: PointLoop, k: number, i: number, o: number): void {
  const plan = L.plan;
  const refiner = (L.refiner ??= new Refiner(plan));
  if (L.refinedAt !== k) {
    refiner.assemble(2 * Math.PI * L.freqs[k]!);
    L.refinedAt = k;
  }
  if (!refiner.refine(plan.portPlus[i]!, plan.portMinus[i]!, L.solveOne, L.dd)) return;
  const out = L.out;
  const r = plan.portReference[i]!;
  const x = plan.portReactance[i]!;
  const t = plan.portTermination;
  const tl = plan.portTerminationLo;
  reflectionFromPortVoltage(L.dd, r, x, t[2 * i]!, t[2 * i + 1]!, tl[2 * i]!, tl[2 * i + 1]!, out, o);
  // the rest of the column from the refined solution: S_ji = v_j·√R_j/Zref_j, v_j = x_j·2√R_i/Zref_i
  const p = L.p;
  const xh = refiner.xh;
  const xl = refiner.xl;
  const dr = 2 * L.kr[i]!;
  const di = 2 * L.ki[i]!;
  for (let j = 0; j < p; j++) {
    if (j === i) continue;
    const pl = plan.portPlus[j]!;
    const mi = plan.portMinus[j]!;
    let vr = 0;
    let vi = 0;
    if (pl !== GROUND) {
      vr += xh[2 * pl]! + xl[2 * pl]!;
      vi += xh[2 * pl + 1]! + xl[2 * pl + 1]!;
    }
    if (mi !== GROUND) {
      vr -= xh[2 * mi]! + xl[2 * mi]!;
      vi -= xh[2 * mi + 1]! + xl[2 * mi + 1]!;
    }
    const wr = vr * dr - vi * di;
    const wi = vr * di + vi * dr;
    const q = o - 2 * (i * p + i) + 2 * (j * p + i);
    out[q] = wr * L.kr[j]! - wi * L.ki[j]!;
    out[q + 1] = wr * L.ki[j]! + wi * L.kr[j]!;
  }
  // the last correction bounds the port voltage's remaining relative error; S_ii ≈ 2R·x/Zref² − …
  const m = Math.abs(out[o]!) + Math.abs(out[o + 1]!);
  const v = Math.hypot(L.dd[0]!, L.dd[2]!) * ((2 * r) / (r * r + x * x));
  // (at least the floor of a double-double residual: about ε² times the condition, relative)
  const rel = (Math.max(refiner.lastStep, REFINE_EPS * Number.EPSILON * L.hint[0]!) * v) / m;
  const digits = rel > 0 ? -Math.log10(rel) : Infinity;
  if (digits < WARN_DIGITS && digits < L.fewestDigits && m >= WARN_FLOOR) {
    L.fewestDigits = digits;
    L.fewestAt = L.freqs[k]!;
    L.fewestPort = i;
  }
}

/** Elements with data over a limited band (measured files) must cover every frequency asked for. */
function checkRanges(circuit: Circuit, freqs: Float64Array): void {
  if (freqs.length === 0) return;
  let lo = Infinity;
  let hi = -Infinity;
  // an indexed loop: this runs once per sweep in every worker, seldom compiled, where a for-of
  // over the sweep allocates an iterator result per point (measured: 1 MB a sweep of 20,001)
  for (let k = 0; k < freqs.length; k++) {
    lo = Math.min(lo, freqs[k]!);
    hi = Math.max(hi, freqs[k]!);
  }
  const bad = outsideRange(circuit.elements, lo, hi)[0];
  if (bad) {
    throw new RangeError(`the frequencies (${formatFrequency(lo)} to ${formatFrequency(hi)}) reach outside the data of ${bad.element.name} (${formatFrequency(bad.range[0])} to ${formatFrequency(bad.range[1])})`);
  }
}

/**
 * Names what makes the system singular: the nodes with no path to ground through elements that
 * conduct at this frequency (a node between capacitors at 0 Hz, say); failing that, the unknown
 * at which elimination broke down.
 */
function explainSingular(circuit: Circuit, plan: StampPlan, f: number, pivot: number, engine: LinearEngine): SingularSystemError {
  const omega = 2 * Math.PI * f;
  // a value out of floating-point range in the matrix makes the elimination fail: say so first
  const bad = explainNonFinite(circuit, plan, f, new Float64Array(2 * plan.slotRow.length), false);
  if (bad) return bad;
  const sets = new NodeSets(circuit.nodeNames.length);
  for (const r of circuit.localReferences) sets.join(r, GROUND);
  const opened: string[] = [];
  for (const el of circuit.elements) {
    const type = ELEMENTS.get(el.type)!;
    if (type.openAt?.(el, omega)) {
      opened.push(el.name);
      continue;
    }
    for (const g of joinedNodes(el)) for (let t = 1; t < g.length; t++) sets.join(g[0]!, g[t]!);
  }
  for (const p of circuit.ports) sets.join(p.plus, p.minus);
  const floating = circuit.nodeNames.filter((_, i) => !sets.grounded(i));
  const at = formatFrequency(f);
  if (floating.length > 0) {
    const shown = floating.slice(0, 8).map((n) => `\`${n}\``);
    if (floating.length > 8) shown.push(`and ${floating.length - 8} more`);
    return new SingularSystemError(
      `the circuit cannot be solved at ${at}: ${floating.length === 1 ? 'node' : 'nodes'} ${shown.join(', ')} ${floating.length === 1 ? 'has' : 'have'} no path to ground at this frequency`,
      f,
      floating,
      opened.length > 0 && f === 0
        ? `capacitors are open at 0 Hz (${opened.slice(0, 4).join(', ')}${opened.length > 4 ? ', …' : ''}); start the sweep above 0 Hz or give the node a DC path`
        : 'give the node(s) a path to ground',
    );
  }
  const blamed: number[] = [];
  const x = pivot >= 0 ? undefined : engine.nullDirection();
  if (pivot >= 0 && pivot < plan.size) blamed.push(pivot);
  else if (x) {
    // Factored, but ill-conditioned: a solve amplifies the near-null direction, and the unknowns
    // that carry it are the ones left undetermined.
    const n = plan.size;
    let max = 0;
    for (let i = 0; i < n; i++) max = Math.max(max, Math.hypot(x[2 * i]!, x[2 * i + 1]!));
    for (let i = 0; i < n; i++) if (Math.hypot(x[2 * i]!, x[2 * i + 1]!) >= 0.3 * max) blamed.push(i);
  }
  const culprits = blamed.map((i) => plan.unknownNames[i]!);
  const labels = blamed.map((i) => (plan.unknownNode[i]! >= 0 ? `node \`${plan.unknownNames[i]}\`` : plan.unknownNames[i]!));
  const shown = labels.slice(0, 8).join(', ') + (labels.length > 8 ? ` and ${labels.length - 8} more` : '');
  // entries of extreme size make a system singular to working precision without any resonance
  const vals = new Float64Array(2 * plan.slotRow.length);
  stampAt(plan, omega, vals);
  let big = 0;
  for (let s = 0; s < plan.slotRow.length; s++) big = Math.max(big, Math.hypot(vals[2 * s]!, vals[2 * s + 1]!));
  const extreme = big > 1e100;
  return new SingularSystemError(
    `the circuit cannot be solved at ${at}: the nodal system is singular${culprits.length > 0 ? `; ${shown} ${culprits.length === 1 ? 'is' : 'are'} not determined` : ' to working precision'}`,
    f,
    culprits,
    extreme
      ? `its largest entry is ${big.toExponential(1)} (an element value or gain of extreme size); values this far apart leave floating-point range`
      : 'look for a resonance with no loss that isolates part of the circuit at this frequency',
  );
}

/**
 * Names what gave values out of floating-point range at `f` (Hz): an element whose stamp is not
 * finite, else the unknowns whose matrix entries are not. `always`: a result was not finite, so an
 * error is returned even where every matrix entry is finite (then the solve overflowed); otherwise
 * undefined in that case. `vals` is scratch of the plan's slot values' size.
 */
function explainNonFinite(circuit: Circuit, plan: StampPlan, f: number, vals: Float64Array, always: true): NonFiniteResultError;
function explainNonFinite(circuit: Circuit, plan: StampPlan, f: number, vals: Float64Array, always: boolean): NonFiniteResultError | undefined;
function explainNonFinite(circuit: Circuit, plan: StampPlan, f: number, vals: Float64Array, always: boolean): NonFiniteResultError | undefined {
  const omega = 2 * Math.PI * f;
  const at = formatFrequency(f);
  const finite = (v: Float64Array) => v.every(Number.isFinite);
  const help = 'look for an element value, length, loss or reference impedance so extreme that the numbers leave floating-point range';
  // each per-element stamper alone
  const one = new Float64Array(vals.length);
  const names: string[] = [];
  for (let e = 0; e < plan.stampers.length; e++) {
    one.fill(0);
    plan.stampers[e]!(omega, one);
    if (!finite(one)) names.push(plan.stamperNames[e]!);
  }
  const where = (name: string) => {
    const el = circuit.elements.find((x) => x.name === name);
    return el && el.span.file ? ` (${el.span.file}:${el.span.line})` : '';
  };
  if (names.length === 0) {
    // the batched and constant part: name the rows of the entries out of range
    vals.set(plan.baseValues);
    const w = Float64Array.of(omega);
    plan.batch?.stamp(w, vals);
    const rows = new Set<number>();
    for (let s = 0; s < plan.slotRow.length; s++) if (!Number.isFinite(vals[2 * s]!) || !Number.isFinite(vals[2 * s + 1]!)) rows.add(plan.slotRow[s]!);
    // the batched elements on those rows, each in a plan of its own (few: only those rows' elements)
    const badNodes = new Set<number>();
    for (const r of rows) if (plan.unknownNode[r]! >= 0) badNodes.add(plan.unknownNode[r]!);
    for (const el of circuit.elements) {
      if (names.length >= 9 || !el.nodes.some((nd) => badNodes.has(nd))) continue;
      const alone = buildPlan({ ...circuit, elements: [el], ports: [] }, { lowestFrequency: plan.lowestFrequency });
      const v = new Float64Array(2 * alone.slotRow.length);
      stampAt(alone, omega, v);
      if (!finite(v)) names.push(el.name);
    }
    if (names.length === 0) {
      for (const r of rows) names.push(plan.unknownNode[r]! >= 0 ? `node \`${plan.unknownNames[r]}\`` : plan.unknownNames[r]!);
      if (names.length > 0) {
        const shown = names.slice(0, 8).join(', ') + (names.length > 8 ? ` and ${names.length - 8} more` : '');
        return new NonFiniteResultError(`the circuit cannot be solved at ${at}: the matrix entries at ${shown} are out of floating-point range`, f, [...rows].map((r) => plan.unknownNames[r]!), help);
      }
    }
  }
  if (names.length === 0) {
    if (!always) return undefined;
    const refs = Array.from(plan.portReference);
    const extreme = refs.some((r) => r > 1e100 || r < 1e-100);
    return new NonFiniteResultError(
      `the S-parameters at ${at} are out of floating-point range (not a finite number); no element's values are, so the solve overflowed`,
      f,
      [],
      extreme ? 'a port reference impedance is extreme (above 1e100 or below 1e-100 ohm); give references of a practical size' : help,
    );
  }
  const shown = names.slice(0, 8).map((n) => `\`${n}\`${where(n)}`).join(', ') + (names.length > 8 ? ` and ${names.length - 8} more` : '');
  return new NonFiniteResultError(
    `the circuit cannot be solved at ${at}: ${names.length === 1 ? 'element' : 'elements'} ${shown} ${names.length === 1 ? 'gives' : 'give'} values out of floating-point range`,
    f,
    names,
    help,
  );
}
