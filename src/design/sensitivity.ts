/**
 * Derivatives of S with respect to the design variables, by the direct method on each point's
 * factorisation.
 *
 * With A·X = B the terminated nodal system of a point (X: one column per driven port) and the
 * port voltages V = C·X, a change of variable θ gives A·dX = −(dA/dθ)·X, so
 *   dV/dθ = −C·A⁻¹·(dA/dθ)·X,
 * one solve per driven port and variable on the factors already computed for the point — the
 * system is never factored again at moved values, so the derivatives do not suffer the rounding
 * of a difference of two solves. S_ij = V_ij·k_i − δij·d_i (src/solve/sweep.ts) then gives
 * dS_ij/dθ = dV_ij/dθ·k_i.
 *
 * dA/dθ is the sum over the elements whose numbers depend on θ of the derivative of each one's
 * own stamp. That derivative is taken as a fourth-order central difference of the element's stamp
 * alone (not of the solved system): f' ≈ [8(f(θ+h) − f(θ−h)) − (f(θ+2h) − f(θ−2h))]/(12h), error
 * O(h⁴) (common practice; e.g. Abramowitz & Stegun 25.3.6, from memory), with h = 10⁻³ of the
 * value: about 1e-12 relative truncation and 1e-13 rounding for the smooth stamps of the elements.
 * The chain through the parameters in between is part of the same difference (the variable itself
 * moves, and the compiled parameter graph carries the move to the element).
 *
 * @module
 */
import type { Circuit, Variable } from '../elaborate/circuit.js';
import { ParameterGraph } from '../params/graph.js';
import { addCaptured, captureElement, type CapturedStamp, type StampPlan } from '../plan/plan.js';
import type { SweepRunner } from '../solve/sweep.js';
import { GROUND } from '../elements/types.js';

/** The offsets and weights of the fourth-order central difference, in steps of h. */
const OFFSETS = [-2, -1, 1, 2] as const;
const WEIGHTS = [1 / 12, -8 / 12, 8 / 12, -1 / 12] as const;

/** The relative step of the stamp difference. */
export const STAMP_STEP = 1e-3;

/** The step for variable v at value x: relative to the value, or to the range where the value is near zero. */
export function stepFor(v: Variable, x: number): number {
  return STAMP_STEP * Math.max(Math.abs(x), 1e-3 * (v.upper - v.lower));
}

/** Per variable, the stamps of its elements at the four moved values (see the module comment). */
export interface StampDifferences {
  /** Per variable: h, and per offset the captured stamps of the elements that depend on it. */
  perVariable: { h: number; moved: CapturedStamp[][] }[];
}

/**
 * Captures the stamps needed for dA/dθ at the variable values x: for every variable, its elements
 * compiled at x ± h and x ± 2h (in `scratch`, a working copy of the circuit the graph may change,
 * kept by a caller that differentiates often; the plan is not changed).
 */
export function stampDifferences(plan: StampPlan, circuit: Circuit, graph: ParameterGraph, variables: readonly Variable[], x: Float64Array, scratch = graph.workingCopy(circuit)): StampDifferences {
  const moved = Float64Array.from(x);
  const perVariable = variables.map((v, i) => {
    const h = stepFor(v, x[i]!);
    const elements = graph.elementsOf(i);
    const stamps = OFFSETS.map((t) => {
      moved.set(x);
      moved[i] = x[i]! + t * h;
      graph.apply(scratch, moved, undefined, undefined);
      return elements.map((e) => captureElement(plan, scratch, e));
    });
    return { h, moved: stamps };
  });
  return { perVariable };
}

/**
 * dS/dθ for every variable over the runner's points, into `out[v]` (the layout of the runner's S
 * values: 2·p·p per point, complex interleaved), at every point or at the given point indices.
 * The runner must hold the plan at the values the differences were captured at.
 */
export function sweepDerivatives(runner: SweepRunner, diffs: StampDifferences, out: Float64Array[], points?: ArrayLike<number>): void {
  const plan = runner.plan;
  const n = plan.size;
  const p = plan.portPlus.length;
  const nSlots = plan.slotRow.length;
  const { rhs, kr, ki } = runner.waves;
  const freqs = runner.frequencies;
  const rows = plan.slotRow;
  const cols = plan.slotCol;
  const plus = plan.portPlus;
  const minus = plan.portMinus;
  // scratch, allocated once for the sweep
  const X = new Float64Array(2 * n * p);
  const b = new Float64Array(2 * n);
  const z = new Float64Array(2 * n);
  const dA = new Float64Array(2 * nSlots);
  const tmp = new Float64Array(2 * nSlots);
  const w = new Float64Array(1);
  const y = new Float64Array(2);
  const count = points ? points.length : freqs.length;
  for (let q = 0; q < count; q++) {
    const k = points ? points[q]! : q;
    runner.factorPoint(k);
    w[0] = 2 * Math.PI * freqs[k]!;
    // the solution for each driven port, every unknown
    for (let j = 0; j < p; j++) {
      for (let r = 0; r < n; r++) {
        b[2 * r] = rhs[2 * (r * p + j)]!;
        b[2 * r + 1] = rhs[2 * (r * p + j) + 1]!;
      }
      runner.solveFactored(b, z);
      X.set(z, 2 * n * j);
    }
    diffs.perVariable.forEach(({ h, moved }, v) => {
      dA.fill(0);
      for (let t = 0; t < OFFSETS.length; t++) {
        tmp.fill(0);
        for (const c of moved[t]!) addCaptured(c, w, y, tmp);
        const c = WEIGHTS[t]! / h;
        for (let s = 0; s < tmp.length; s++) dA[s] += c * tmp[s]!;
      }
      const target = out[v]!;
      const base = 2 * p * p * k;
      for (let j = 0; j < p; j++) {
        // b = −dA·X_j
        b.fill(0);
        const xo = 2 * n * j;
        for (let s = 0; s < nSlots; s++) {
          const ar = dA[2 * s]!;
          const ai = dA[2 * s + 1]!;
          if (ar === 0 && ai === 0) continue;
          const row = rows[s]!;
          const col = cols[s]!;
          const xr = X[xo + 2 * col]!;
          const xi = X[xo + 2 * col + 1]!;
          b[2 * row] -= ar * xr - ai * xi;
          b[2 * row + 1] -= ar * xi + ai * xr;
        }
        runner.solveFactored(b, z);
        for (let i = 0; i < p; i++) {
          let vr = 0;
          let vi = 0;
          if (plus[i] !== GROUND) {
            vr += z[2 * plus[i]!]!;
            vi += z[2 * plus[i]! + 1]!;
          }
          if (minus[i] !== GROUND) {
            vr -= z[2 * minus[i]!]!;
            vi -= z[2 * minus[i]! + 1]!;
          }
          const o = base + 2 * (i * p + j);
          target[o] = vr * kr[i]! - vi * ki[i]!;
          target[o + 1] = vr * ki[i]! + vi * kr[i]!;
        }
      }
    });
  }
}
