/**
 * Tests for the sparse complex LU in src/solve/sparse (analyse / createFactor / factor / refactor /
 * solve / reciprocalCondition).
 *
 * Reference sources:
 * - [DENSE] the dense complex LU with partial pivoting of src/network/complex.ts (luFactor /
 *   luSolve), as the brief asks; [MATHJS] mathjs 15 (general-purpose library) math.lusolve on a
 *   complex matrix, as an outside check of both.
 * - [RESID] the residual of a backward-stable solve: LU with (threshold) partial pivoting gives the
 *   exact solution of (A + ΔA)x = b with ‖ΔA‖ ≤ c·n·ε·ρ·‖A‖, ρ the growth factor (Wilkinson; N. J.
 *   Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed. 2002, ch. 9 — chapter from
 *   memory), so ‖Ax − b‖ ≤ c·n·ε·ρ·‖A‖·‖x‖. With n ≤ 60, threshold τ = 0.1 (ρ ≤ 11 per step in
 *   principle, a few in practice) and ‖A‖‖x‖/‖b‖ ≤ κ(A), the test systems are filtered to a dense
 *   condition estimate κ₁ ≤ 1e4 (rcond ≥ 1e-4); measured residuals ‖Ax − b‖/‖b‖ stay near 1e-15, and the
 *   brief's bound 1e-12 is used.
 * - [AGREE] two backward-stable solvers agree to about κ·ε: with κ₁ ≤ 1e4, max |x − x_dense| ≤ 1e-10 ·
 *   max |x_dense| (the brief's figure).
 * - [ENVELOPE] the Cholesky fill of a symmetric pattern stays inside its envelope (the positions
 *   from the first nonzero of each row to the diagonal); for the 5-point k×k grid in natural order
 *   the envelope is k entries wide and fills completely (A. George and J. W. H. Liu, Computer
 *   Solution of Large Sparse Positive Definite Systems, 1981 — statement from memory). Minimum degree
 *   orderings need much less fill on such grids (same source; common practice).
 * - [TREE] a tree graph can be eliminated with no fill (leaves first), and minimum degree always
 *   picks a leaf (degree 1) — common practice.
 * - [HAGER] the 1-norm estimate ‖A⁻¹y‖₁/‖y‖₁ never exceeds ‖A⁻¹‖₁ (W. W. Hager, SIAM J. Sci. Stat.
 *   Comput. 5, 1984; N. J. Higham, ACM TOMS 14, 1988), and is usually within a factor 3 of it
 *   (Higham 1988, from memory); the test asks for a factor 10. κ₁ = ‖A‖₁‖A⁻¹‖₁ by definition, with
 *   A⁻¹ from the dense inverse of src/network/complex.ts.
 * - [LDLT] a symmetric matrix factored with its pivots on the diagonal has U = D·Lᵀ (uniqueness of
 *   the LU factors), so c_aᵀ·A⁻¹·c_b = (L⁻¹c_a)ᵀ·D⁻¹·(L⁻¹c_b) — common practice (the LDLᵀ form);
 *   checked against the dense inverse of src/network/complex.ts: each entry is a sum of four
 *   entries of A⁻¹, so 4 × [AGREE]'s 1e-10 of the largest.
 * - [TWIN] IEEE 754 arithmetic is deterministic: the same operations on the same operands in the
 *   same order give the same bits (IEEE Std 754-2019, correctly rounded basic operations — common
 *   practice), so two matrices eliminated in one loop must give each the factors it gets alone.
 * - [SINGULAR] a matrix with a zero column, or with two columns that are multiples of the same unit
 *   vector, is singular (rank deficient) — common practice. At 0 Hz a capacitor is open, so a node
 *   joined only through capacitors has an all-zero nodal column (common practice).
 *
 * Random systems come from a seeded generator (fast-check picks the seeds; fixed fast-check seed).
 */
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as math from 'mathjs';
import type { Complex, Matrix } from 'mathjs';

import { createLu, createMatrix, inverse, luFactor, luSolve, norm1, rcondEstimate, LU_OK } from '../src/network/complex.js';
import {
  analyse,
  approximateMinimumDegree,
  createFactor,
  factor,
  factorNonzeros,
  inverseNorm1Estimate,
  matrixNorm1,
  NEEDS_PIVOTING,
  OK,
  reciprocalCondition,
  refactor,
  refactorOrFactor,
  refactorPlacedTwo,
  refactorTwo,
  SINGULAR,
  solve,
  solveConjTransposed,
  twinFactor,
  type SparseFactor,
  type SparsePattern,
} from '../src/solve/sparse/index.js';
import { loadNetlist } from '../src/load.js';
import { buildPlan, stampAt } from '../src/plan/plan.js';
import { solveSymmetricPorts, symmetricPorts } from '../src/solve/sparse/symmetric.js';

const FC = { seed: 20240611, numRuns: 120 };

// ------------------------------------------------------------------------------------------------
// helpers
// ------------------------------------------------------------------------------------------------

/** Small deterministic generator (mulberry32), so that one fast-check integer fixes a system. */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

interface System {
  n: number;
  slotRow: Int32Array;
  slotCol: Int32Array;
  /** Slot values, complex interleaved. */
  values: Float64Array;
}

/** Dense n×n interleaved matrix from slots (repeated slots add). */
function toDense(s: System, values = s.values): Float64Array {
  const a = createMatrix(s.n);
  for (let k = 0; k < s.slotRow.length; k++) {
    const q = 2 * (s.slotRow[k]! * s.n + s.slotCol[k]!);
    a[q] += values[2 * k]!;
    a[q + 1] += values[2 * k + 1]!;
  }
  return a;
}

/** Random pattern with every diagonal present (values random, some diagonals weak). */
function randomGeneral(seed: number): System {
  const r = rng(seed);
  const n = 1 + Math.floor(r() * 50);
  const rows: number[] = [];
  const cols: number[] = [];
  const vals: number[] = [];
  const density = 1.5 + r() * 3; // off-diagonal entries per row, on average
  for (let i = 0; i < n; i++) {
    rows.push(i);
    cols.push(i);
    const weak = r() < 0.15; // a diagonal too small for threshold pivoting
    const m = weak ? 1e-3 : 1 + 2 * r();
    const phase = 2 * Math.PI * r();
    vals.push(m * Math.cos(phase), m * Math.sin(phase));
  }
  const extra = Math.floor(density * n);
  for (let k = 0; k < extra; k++) {
    rows.push(Math.floor(r() * n));
    cols.push(Math.floor(r() * n));
    vals.push(2 * r() - 1, 2 * r() - 1);
  }
  return { n, slotRow: Int32Array.from(rows), slotCol: Int32Array.from(cols), values: Float64Array.from(vals) };
}

/** Slot lists being built: `put` one entry, or the four entries of an admittance between a and b (−1: ground). */
function slotLists() {
  const rows: number[] = [];
  const cols: number[] = [];
  const vals: number[] = [];
  const put = (i: number, j: number, re: number, im: number) => {
    rows.push(i);
    cols.push(j);
    vals.push(re, im);
  };
  const admittance = (a: number, b: number, g: number, bb: number) => {
    if (a >= 0) put(a, a, g, bb);
    if (b >= 0) put(b, b, g, bb);
    if (a >= 0 && b >= 0) {
      put(a, b, -g, -bb);
      put(b, a, -g, -bb);
    }
  };
  const system = (n: number): System => ({ n, slotRow: Int32Array.from(rows), slotCol: Int32Array.from(cols), values: Float64Array.from(vals) });
  return { put, admittance, system };
}

/**
 * Nodal (MNA-like) system: `nodes` node unknowns with conductances and capacitive admittances between
 * random node pairs and to ground (a spanning tree to ground keeps it regular), plus branch unknowns
 * with ±1 incidence entries and a branch row v_a − v_b − z·i = 0 whose z is zero (an ideal short,
 * a structurally present but zero diagonal) or small, which needs pivoting.
 */
function randomNodal(seed: number): System {
  const r = rng(seed);
  const nodes = 2 + Math.floor(r() * 30);
  const branches = 1 + Math.floor(r() * Math.max(1, nodes / 2));
  const n = nodes + branches;
  const { put, admittance, system } = slotLists();
  for (let i = 0; i < nodes; i++) {
    const to = i === 0 || r() < 0.3 ? -1 : Math.floor(r() * i); // tree: to ground or an earlier node
    admittance(i, to, 0.01 + r(), (r() - 0.3) * 0.5);
  }
  const more = Math.floor(r() * nodes);
  for (let k = 0; k < more; k++) {
    const a = Math.floor(r() * nodes);
    const b = r() < 0.2 ? -1 : Math.floor(r() * nodes);
    if (a !== b) admittance(a, b, 0.01 + r(), (r() - 0.5) * 0.5);
  }
  for (let k = 0; k < branches; k++) {
    const i = nodes + k;
    const a = Math.floor(r() * nodes);
    let b = Math.floor(r() * nodes);
    if (b === a || r() < 0.3) b = -1;
    put(a, i, 1, 0);
    put(i, a, 1, 0);
    if (b >= 0) {
      put(b, i, -1, 0);
      put(i, b, -1, 0);
    }
    const z = r() < 0.5 ? 0 : 1e-3 * r();
    put(i, i, -z, -z * r());
  }
  return system(n);
}

function randomRhs(n: number, nrhs: number, seed: number): Float64Array {
  const r = rng(seed ^ 0x5bd1e995);
  const b = new Float64Array(2 * n * nrhs);
  for (let k = 0; k < b.length; k++) b[k] = 2 * r() - 1;
  return b;
}

/** Dense rcond estimate (−1 when the dense LU finds an exact zero pivot). */
function denseRcond(n: number, a: Float64Array): number {
  const lu = createLu(n);
  if (luFactor(n, a, lu, 0) !== LU_OK) return -1;
  return rcondEstimate(lu);
}

/** max over columns of ‖A·x_c − b_c‖∞ / ‖b_c‖∞ for the n×m blocks (dense A). */
function relResidual(n: number, a: Float64Array, x: Float64Array, b: Float64Array, m: number): number {
  let worst = 0;
  for (let c = 0; c < m; c++) {
    let rmax = 0;
    let bmax = 0;
    for (let i = 0; i < n; i++) {
      let sr = -b[2 * (i * m + c)]!;
      let si = -b[2 * (i * m + c) + 1]!;
      for (let j = 0; j < n; j++) {
        const ar = a[2 * (i * n + j)]!;
        const ai = a[2 * (i * n + j) + 1]!;
        const xr = x[2 * (j * m + c)]!;
        const xi = x[2 * (j * m + c) + 1]!;
        sr += ar * xr - ai * xi;
        si += ar * xi + ai * xr;
      }
      rmax = Math.max(rmax, Math.hypot(sr, si));
      bmax = Math.max(bmax, Math.hypot(b[2 * (i * m + c)]!, b[2 * (i * m + c) + 1]!));
    }
    if (bmax > 0) worst = Math.max(worst, rmax / bmax);
  }
  return worst;
}

function maxAbs(v: Float64Array): number {
  let m = 0;
  for (let k = 0; k < v.length; k += 2) m = Math.max(m, Math.hypot(v[k]!, v[k + 1]!));
  return m;
}

function maxDiff(u: Float64Array, v: Float64Array): number {
  let m = 0;
  for (let k = 0; k < u.length; k += 2) m = Math.max(m, Math.hypot(u[k]! - v[k]!, u[k + 1]! - v[k + 1]!));
  return m;
}

function denseSolve(n: number, a: Float64Array, b: Float64Array, m: number): Float64Array {
  const lu = createLu(n);
  expect(luFactor(n, a, lu, 0)).toBe(LU_OK);
  const x = new Float64Array(b.length);
  luSolve(lu, b, x, m);
  return x;
}

const KAPPA_LIMIT_RCOND = 1e-4;

/** Factors with the sparse LU and checks residual and agreement with the dense LU. */
function checkSystem(s: System, nrhs: number, seed: number): boolean {
  const a = toDense(s);
  const rc = denseRcond(s.n, a);
  if (rc < KAPPA_LIMIT_RCOND) return false; // too ill-conditioned for the fixed tolerances
  const pattern = analyse(s.n, s.slotRow, s.slotCol);
  const f = createFactor(pattern);
  expect(factor(f, s.values)).toBe(OK);
  const b = randomRhs(s.n, nrhs, seed);
  const x = new Float64Array(b.length);
  solve(f, b, x, nrhs);
  expect(relResidual(s.n, a, x, b, nrhs)).toBeLessThanOrEqual(1e-12); // [RESID]
  const xd = denseSolve(s.n, a, b, nrhs);
  expect(maxDiff(x, xd)).toBeLessThanOrEqual(1e-10 * maxAbs(xd)); // [AGREE]
  return true;
}

// ------------------------------------------------------------------------------------------------

describe('analyse', () => {
  it('gives a permutation, slot maps that invert each other, and rejects slots outside the matrix', () => {
    const s = randomNodal(7);
    const p = analyse(s.n, s.slotRow, s.slotCol);
    const seen = new Set(p.order);
    expect(seen.size).toBe(s.n);
    for (let k = 0; k < s.n; k++) expect(p.stepOf[p.order[k]!]).toBe(k);
    for (let q = 0; q < p.slotCount; q++) expect(p.slotPos[p.entrySlot[q]!]).toBe(q);
    for (let j = 0; j < s.n; j++) {
      for (let q = p.colStart[j]!; q < p.colStart[j + 1]!; q++) expect(s.slotCol[p.entrySlot[q]!]).toBe(p.order[j]);
    }
    expect(() => analyse(3, Int32Array.of(0, 3), Int32Array.of(0, 1))).toThrow(RangeError);
    expect(() => analyse(3, Int32Array.of(0), Int32Array.of(0), { ordering: Int32Array.of(0, 0, 1) })).toThrow(RangeError);
  });

  it('eliminates a random tree with no fill [TREE]: L and U hold exactly the n−1 edges', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e9 }), (seed) => {
        const r = rng(seed);
        const n = 2 + Math.floor(r() * 200);
        const rows: number[] = [];
        const cols: number[] = [];
        for (let i = 0; i < n; i++) {
          rows.push(i);
          cols.push(i);
          if (i > 0) {
            const parent = Math.floor(r() * i);
            rows.push(i, parent);
            cols.push(parent, i);
          }
        }
        const p = analyse(n, Int32Array.from(rows), Int32Array.from(cols));
        expect(p.lNonzeros).toBe(n - 1);
        expect(p.uNonzeros).toBe(n - 1);
      }),
      { ...FC, numRuns: 40 },
    );
  });

  it('reduces fill on a 30×30 grid against natural order [ENVELOPE]', () => {
    const k = 30;
    const n = k * k;
    const rows: number[] = [];
    const cols: number[] = [];
    const id = (i: number, j: number) => i * k + j;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        rows.push(id(i, j));
        cols.push(id(i, j));
        if (i + 1 < k) rows.push(id(i, j), id(i + 1, j)), cols.push(id(i + 1, j), id(i, j));
        if (j + 1 < k) rows.push(id(i, j), id(i, j + 1)), cols.push(id(i, j + 1), id(i, j));
      }
    }
    const sr = Int32Array.from(rows);
    const sc = Int32Array.from(cols);
    const natural = analyse(n, sr, sc, { ordering: 'natural' });
    const amd = analyse(n, sr, sc);
    // natural order: row i of L spans its envelope, 1 entry in the first grid row, k after it
    const envelope = (k - 1) * 1 + (n - k) * k;
    expect(natural.lNonzeros).toBe(envelope);
    expect(natural.uNonzeros).toBe(envelope);
    // minimum degree: well under half of it (measured about a third)
    expect(amd.lNonzeros + amd.uNonzeros).toBeLessThan(0.5 * (natural.lNonzeros + natural.uNonzeros));
    expect(amd.updateCount).toBeLessThan(0.25 * natural.updateCount);
  });

  it('minimum degree ordering is a permutation also with dense rows held back', () => {
    // a star (one vertex joined to all) plus a path: the centre is dense for n ≥ 20
    const n = 400;
    const start = new Int32Array(n + 1);
    const lists: number[][] = Array.from({ length: n }, () => []);
    for (let i = 1; i < n; i++) {
      lists[0]!.push(i);
      lists[i]!.push(0);
      if (i + 1 < n) {
        lists[i]!.push(i + 1);
        lists[i + 1]!.push(i);
      }
    }
    const adj: number[] = [];
    for (let i = 0; i < n; i++) {
      start[i] = adj.length;
      adj.push(...lists[i]!);
    }
    start[n] = adj.length;
    const order = approximateMinimumDegree(n, start, Int32Array.from(adj));
    expect(new Set(order).size).toBe(n);
    expect(order[n - 1]).toBe(0); // the dense centre goes last
  });
});

describe('factor and solve against the dense LU', () => {
  it('random sparse patterns with a nonzero diagonal, 1..3 right-hand sides [RESID][AGREE]', () => {
    let used = 0;
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 1, max: 3 }), (seed, m) => {
        if (checkSystem(randomGeneral(seed), m, seed)) used++;
      }),
      FC,
    );
    expect(used).toBeGreaterThan(FC.numRuns / 2); // the conditioning filter must not hide the test
  });

  it('nodal (MNA-like) systems with zero diagonals on branch rows, which need row swaps [RESID][AGREE]', () => {
    let used = 0;
    let swapped = 0;
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 1, max: 4 }), (seed, m) => {
        const s = randomNodal(seed);
        if (checkSystem(s, m, seed)) used++;
        const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
        if (factor(f, s.values) === OK && f.swaps > 0) swapped++;
      }),
      FC,
    );
    expect(used).toBeGreaterThan(FC.numRuns / 2);
    expect(swapped).toBeGreaterThan(FC.numRuns / 4); // pivoting really happened
  });

  it('agrees with mathjs lusolve on a nodal system [MATHJS], 1e-10 relative', () => {
    const s = randomNodal(99);
    const a = toDense(s);
    const n = s.n;
    const b = randomRhs(n, 1, 5);
    const rows: Complex[][] = [];
    for (let i = 0; i < n; i++) {
      const row: Complex[] = [];
      for (let j = 0; j < n; j++) row.push(math.complex(a[2 * (i * n + j)]!, a[2 * (i * n + j) + 1]!));
      rows.push(row);
    }
    const rhs = Array.from({ length: n }, (_, i) => [math.complex(b[2 * i]!, b[2 * i + 1]!)]);
    const ref = math.lusolve(math.matrix(rows), math.matrix(rhs)) as Matrix;
    const f = createFactor(analyse(n, s.slotRow, s.slotCol));
    expect(factor(f, s.values)).toBe(OK);
    const x = new Float64Array(2 * n);
    solve(f, b, x, 1);
    const xr = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      const z = ref.get([i, 0]) as Complex | number;
      xr[2 * i] = typeof z === 'number' ? z : z.re;
      xr[2 * i + 1] = typeof z === 'number' ? 0 : z.im;
    }
    expect(maxDiff(x, xr)).toBeLessThanOrEqual(1e-10 * maxAbs(xr));
  });

  it('repeated slots are added, as the dense matrix built from them', () => {
    const base = randomNodal(3);
    const s: System = {
      n: base.n,
      slotRow: Int32Array.from([...base.slotRow, ...base.slotRow]),
      slotCol: Int32Array.from([...base.slotCol, ...base.slotCol]),
      values: Float64Array.from([...base.values, ...base.values.map((v) => 0.5 * v)]),
    };
    expect(checkSystem(s, 2, 3)).toBe(true);
    const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
    expect(f.slotsUnique).toBe(false);
  });

  it('many right-hand sides in one call equal one-by-one solves; in-place solve works', () => {
    const s = randomNodal(11);
    const f = createFactor(analyse(s.n, s.slotRow, s.slotCol), { rhsBlock: 4 });
    expect(factor(f, s.values)).toBe(OK);
    const a = toDense(s);
    for (const m of [1, 2, 3, 5, 9, 17]) {
      const b = randomRhs(s.n, m, m);
      const x = new Float64Array(b.length);
      solve(f, b, x, m);
      expect(relResidual(s.n, a, x, b, m)).toBeLessThanOrEqual(1e-12); // [RESID]
      for (let c = 0; c < m; c++) {
        const bc = new Float64Array(2 * s.n);
        for (let i = 0; i < s.n; i++) {
          bc[2 * i] = b[2 * (i * m + c)]!;
          bc[2 * i + 1] = b[2 * (i * m + c) + 1]!;
        }
        const xc = new Float64Array(2 * s.n);
        solve(f, bc, xc, 1);
        for (let i = 0; i < s.n; i++) {
          // the same operations on the same numbers: equal up to the order of additions (2 RHS
          // at once use the same order), so compare to 1e-14 relative
          const dr = Math.abs(xc[2 * i]! - x[2 * (i * m + c)]!);
          const di = Math.abs(xc[2 * i + 1]! - x[2 * (i * m + c) + 1]!);
          expect(Math.max(dr, di)).toBeLessThanOrEqual(1e-14 * Math.max(1, maxAbs(xc)));
        }
      }
      const inPlace = Float64Array.from(b);
      solve(f, inPlace, inPlace, m);
      expect(maxDiff(inPlace, x)).toBe(0);
    }
  });

  it('solves with Aᴴ [RESID]', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const s = seed % 2 === 0 ? randomNodal(seed) : randomGeneral(seed);
        const a = toDense(s);
        if (denseRcond(s.n, a) < KAPPA_LIMIT_RCOND) return;
        const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
        expect(factor(f, s.values)).toBe(OK);
        const ah = createMatrix(s.n);
        for (let i = 0; i < s.n; i++) {
          for (let j = 0; j < s.n; j++) {
            ah[2 * (i * s.n + j)] = a[2 * (j * s.n + i)]!;
            ah[2 * (i * s.n + j) + 1] = -a[2 * (j * s.n + i) + 1]!;
          }
        }
        const b = randomRhs(s.n, 1, seed);
        const x = new Float64Array(b.length);
        solveConjTransposed(f, b, x);
        expect(relResidual(s.n, ah, x, b, 1)).toBeLessThanOrEqual(1e-12);
      }),
      { ...FC, numRuns: 60 },
    );
  });

  it('the work-vector elimination (used for very long update lists) gives the same results', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const s = randomNodal(seed);
        const a = toDense(s);
        if (denseRcond(s.n, a) < KAPPA_LIMIT_RCOND) return;
        const p = analyse(s.n, s.slotRow, s.slotCol);
        const f1 = createFactor(p);
        const f2 = createFactor(p, { maxUpdateList: 0 });
        expect(f2.useUpdateList).toBe(false);
        expect(factor(f1, s.values)).toBe(OK);
        expect(factor(f2, s.values)).toBe(OK);
        // new values, same pattern: refactor both ways
        const v2 = s.values.map((v, k) => (k % 4 === 0 ? v * 1.1 : v));
        const st1 = refactor(f1, v2);
        const st2 = refactor(f2, v2);
        expect(st2).toBe(st1);
        if (st1 !== OK) return;
        const b = randomRhs(s.n, 2, seed);
        const x1 = new Float64Array(b.length);
        const x2 = new Float64Array(b.length);
        solve(f1, b, x1, 2);
        solve(f2, b, x2, 2);
        expect(maxDiff(x1, x2)).toBeLessThanOrEqual(1e-13 * maxAbs(x1));
      }),
      { ...FC, numRuns: 40 },
    );
  });
});

describe('refactor', () => {
  it('reuses the pivot sequence for new values on the same pattern [RESID][AGREE]', () => {
    let refactored = 0;
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const s = randomNodal(seed);
        const p = analyse(s.n, s.slotRow, s.slotCol);
        const f = createFactor(p);
        if (factor(f, s.values) !== OK) return;
        const r = rng(seed + 1);
        // the same circuit with every value changed by up to ±20 %
        const v2 = s.values.map((v) => v * (0.8 + 0.4 * r()));
        const a2 = toDense(s, v2);
        if (denseRcond(s.n, a2) < KAPPA_LIMIT_RCOND) return;
        const pivots = Int32Array.from(f.pivotRow);
        const status = refactor(f, v2);
        if (status === NEEDS_PIVOTING) {
          expect(factor(f, v2)).toBe(OK);
        } else {
          expect(status).toBe(OK);
          refactored++;
          expect(Array.from(f.pivotRow)).toEqual(Array.from(pivots));
        }
        const b = randomRhs(s.n, 2, seed);
        const x = new Float64Array(b.length);
        solve(f, b, x, 2);
        expect(relResidual(s.n, a2, x, b, 2)).toBeLessThanOrEqual(1e-12);
        const xd = denseSolve(s.n, a2, b, 2);
        expect(maxDiff(x, xd)).toBeLessThanOrEqual(1e-10 * maxAbs(xd));
      }),
      FC,
    );
    expect(refactored).toBeGreaterThan(FC.numRuns / 2);
  });

  it('works right after createFactor with the analysed (diagonal) sequence', () => {
    const s = randomGeneral(12345);
    // make it diagonally dominant so that the diagonal pivots pass
    const v = Float64Array.from(s.values);
    for (let k = 0; k < s.slotRow.length; k++) if (s.slotRow[k] === s.slotCol[k]) v[2 * k] += 100;
    const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
    expect(refactor(f, v)).toBe(OK);
    expect(f.factorCount).toBe(0);
    const a = toDense(s, v);
    const b = randomRhs(s.n, 1, 1);
    const x = new Float64Array(b.length);
    solve(f, b, x, 1);
    expect(relResidual(s.n, a, x, b, 1)).toBeLessThanOrEqual(1e-12);
  });

  it('reports NEEDS_PIVOTING with the unknown when a pivot collapses, and factor recovers', () => {
    // full 4×4 pattern; first well-conditioned with a dominant diagonal
    const n = 4;
    const rows: number[] = [];
    const cols: number[] = [];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) rows.push(i), cols.push(j);
    const sr = Int32Array.from(rows);
    const sc = Int32Array.from(cols);
    const p: SparsePattern = analyse(n, sr, sc);
    const v1 = new Float64Array(2 * n * n);
    for (let k = 0; k < n * n; k++) {
      v1[2 * k] = sr[k] === sc[k] ? 10 : 1 + 0.1 * k;
      v1[2 * k + 1] = 0.3 * (k % 3);
    }
    const f = createFactor(p);
    expect(factor(f, v1)).toBe(OK);
    expect(f.swaps).toBe(0);
    // now the first pivot (unknown p.order[0]) collapses to 1e-9 against entries of size ~1
    const c0 = p.order[0]!;
    const v2 = Float64Array.from(v1);
    const dslot = c0 * n + c0;
    v2[2 * dslot] = 1e-9;
    v2[2 * dslot + 1] = 0;
    expect(refactor(f, v2)).toBe(NEEDS_PIVOTING);
    expect(f.failColumn).toBe(c0);
    expect(f.valid).toBe(false);
    expect(() => solve(f, new Float64Array(2 * n), new Float64Array(2 * n), 1)).toThrow();
    expect(refactorOrFactor(f, v2)).toBe(OK);
    expect(f.swaps).toBeGreaterThan(0);
    const a2 = toDense({ n, slotRow: sr, slotCol: sc, values: v2 });
    const b = randomRhs(n, 2, 9);
    const x = new Float64Array(b.length);
    solve(f, b, x, 2);
    expect(relResidual(n, a2, x, b, 2)).toBeLessThanOrEqual(1e-12);
    expect(maxDiff(x, denseSolve(n, a2, b, 2))).toBeLessThanOrEqual(1e-10 * maxAbs(x));
    // and back: the swapped sequence still serves the first values
    expect(refactor(f, v1)).toBe(OK);
  });
});

describe('two matrices at once [TWIN]', () => {
  /** The numbers a later solve reads, copied: the entries, the pivot reciprocals, the pivot spread. */
  const snapshot = (f: SparseFactor) => ({
    lu: Array.from(f.lu.subarray(0, 2 * f.entries)),
    pivotInv: Array.from(f.pivotInv),
    spread: [f.pivotMin, f.pivotMax],
  });

  it('refactorTwo gives each matrix the factors refactor gives it alone, to the bit; false exactly when either alone fails', () => {
    let both = 0;
    let declined = 0;
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.boolean(), (seed, general) => {
        // general patterns have weak diagonals, so that some refactorisations fail their pivots
        const s = general ? randomGeneral(seed) : randomNodal(seed);
        const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
        if (factor(f, s.values) !== OK) return;
        const g = twinFactor(f);
        const r = rng(seed ^ 0x5bd1e995);
        const spread = general ? 4 : 0.4; // general: factors from −1 to 3, signs flip
        const va = s.values.map((v) => v * (1 - spread / 2 + spread * r()));
        const vb = s.values.map((v) => v * (1 - spread / 2 + spread * r()));
        const alone = [va, vb].map((v) => {
          const status = refactor(f, v);
          return { status, ...snapshot(f) };
        });
        const ok = refactorTwo(f, g, va, vb);
        expect(ok).toBe(alone[0]!.status === OK && alone[1]!.status === OK);
        expect(f.valid).toBe(ok);
        expect(g.valid).toBe(ok);
        if (!ok) {
          declined++;
          expect(f.status).toBe(NEEDS_PIVOTING);
          expect(() => solve(g, new Float64Array(2 * s.n), new Float64Array(2 * s.n), 1)).toThrow();
          return;
        }
        both++;
        expect(snapshot(f)).toEqual({ lu: alone[0]!.lu, pivotInv: alone[0]!.pivotInv, spread: alone[0]!.spread });
        expect(snapshot(g)).toEqual({ lu: alone[1]!.lu, pivotInv: alone[1]!.pivotInv, spread: alone[1]!.spread });
        // the twin solves and estimates its condition as the original does with the same values
        const b = randomRhs(s.n, 2, seed);
        const x = new Float64Array(b.length);
        solve(g, b, x, 2);
        const rg = reciprocalCondition(g);
        expect(refactor(f, vb)).toBe(OK);
        const y = new Float64Array(b.length);
        solve(f, b, y, 2);
        expect(Array.from(x)).toEqual(Array.from(y));
        expect(rg).toBe(reciprocalCondition(f));
      }),
      FC,
    );
    expect(both).toBeGreaterThan(FC.numRuns / 3);
    expect(declined).toBeGreaterThan(5);
  });

  it('values already in place (refactorPlacedTwo) as refactorTwo; a twin is refused once the original records a new sequence', () => {
    const s = randomNodal(4242);
    const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
    expect(factor(f, s.values)).toBe(OK);
    const g = twinFactor(f);
    const vb = s.values.map((v, k) => v * (1 + 0.01 * (k % 7)));
    expect(refactorTwo(f, g, s.values, vb)).toBe(true);
    const want = [snapshot(f), snapshot(g)];
    // lay the entries out as refactorTwo does (their values in place, fill-in zero), then eliminate
    expect(refactor(f, s.values)).toBe(OK);
    f.lu.fill(0);
    g.lu.fill(0);
    for (let k = 0; k < f.slotTarget.length; k++) {
      const e = f.slotTarget[k]!;
      f.lu[e] += s.values[2 * k]!;
      f.lu[e + 1] += s.values[2 * k + 1]!;
      g.lu[e] += vb[2 * k]!;
      g.lu[e + 1] += vb[2 * k + 1]!;
    }
    expect(refactorPlacedTwo(f, g)).toBe(true);
    expect([snapshot(f), snapshot(g)]).toEqual(want);
    expect(() => factor(g, vb)).toThrow(/twin/);
    expect(twinFactor(g).twinOf).toBe(f);
    expect(factor(f, vb)).toBe(OK);
    expect(() => refactorTwo(f, g, s.values, vb)).toThrow(/twin/);
    expect(() => refactor(g, vb)).toThrow(/twin/);
    expect(refactorTwo(f, twinFactor(f), s.values, vb)).toBe(true);
  });

  it("a twin shares its original's hidden class (one shape for the pair loops)", () => {
    // V8's own test intrinsic (%HaveSameMap, behind --allow-natives-syntax), on the compiled
    // build in a child process: a twin of a shape of its own sent the compiled pair elimination
    // back to the interpreter at the end of every call, for a stretch of a sweep
    const factorJs = pathToFileURL(join(import.meta.dirname, '..', 'dist', 'src', 'solve', 'sparse', 'index.js')).href;
    const script = `const m = await import(${JSON.stringify(factorJs)});
      const rows = Int32Array.from([0, 0, 1, 1, 2, 2, 1, 2]), cols = Int32Array.from([0, 1, 0, 1, 2, 1, 2, 0]);
      const v = Float64Array.from({ length: 16 }, (_, k) => (k % 2 ? 0.1 : 1 + (k % 5)));
      const f = m.createFactor(m.analyse(3, rows, cols));
      m.factor(f, v);
      const g = m.twinFactor(f), f2 = m.createFactor(m.analyse(3, rows, cols));
      console.log(JSON.stringify([%HaveSameMap(f, g), %HaveSameMap(f, f2), %HaveSameMap(g, m.twinFactor(f2))]));`;
    const out = execFileSync(process.execPath, ['--allow-natives-syntax', '--input-type=module', '-e', script], { encoding: 'utf8' });
    expect(JSON.parse(out)).toEqual([true, true, true]);
  });
});

describe('singular systems [SINGULAR]', () => {
  it('a zero column is named by factor and by refactor', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const s = randomNodal(seed);
        const c = Math.floor(rng(seed)() * s.n);
        const v = Float64Array.from(s.values);
        for (let k = 0; k < s.slotCol.length; k++) {
          if (s.slotCol[k] === c) {
            v[2 * k] = 0;
            v[2 * k + 1] = 0;
          }
        }
        const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
        expect(factor(f, v)).toBe(SINGULAR);
        expect(f.failColumn).toBe(c);
        expect(f.valid).toBe(false);
        // refactor after a failed factor has no sequence: it asks for pivoting, then factor fails again
        expect(refactor(f, v)).toBe(NEEDS_PIVOTING);
        expect(refactorOrFactor(f, v)).toBe(SINGULAR);
        expect(f.failColumn).toBe(c);
        // with a good sequence recorded first, refactor itself names the column
        const g = createFactor(analyse(s.n, s.slotRow, s.slotCol));
        if (factor(g, s.values) !== OK) return;
        const st = refactor(g, v);
        expect(st).toBe(SINGULAR);
        expect(g.failColumn).toBe(c);
      }),
      { ...FC, numRuns: 60 },
    );
  });

  it('two columns holding one entry in the same row: the later one in the order is named', () => {
    const n = 5;
    // columns 1 and 3 each have a single entry, both in row 2; the rest is diagonal
    const sr = Int32Array.of(0, 2, 2, 4, 1, 3);
    const sc = Int32Array.of(0, 1, 3, 4, 2, 2);
    const v = Float64Array.of(1, 0, 2, 0, 3, 1, 4, 0, 1, 1, 1, -1);
    const p = analyse(n, sr, sc);
    const f = createFactor(p);
    expect(factor(f, v)).toBe(SINGULAR);
    const later = p.stepOf[1]! > p.stepOf[3]! ? 1 : 3;
    expect(f.failColumn).toBe(later);
  });

  it('a node joined only through capacitors is named at 0 Hz', () => {
    const { circuit } = loadNetlist(
      [
        'resistor r1 a=in b=ground value=50 ohm',
        'capacitor c1 a=in b=mid value=1 pF',
        'capacitor c2 a=mid b=ground value=1 pF',
        'inductor l1 a=in b=out value=10 nH',
        'resistor r2 a=out b=ground value=50 ohm',
        'port 1 plus=in',
        'sweep list freqs=1 MHz',
      ].join('\n'),
      'floating.sbx',
    );
    const plan = buildPlan(circuit);
    const mid = plan.nodeUnknown[circuit.nodeNames.indexOf('mid')]!;
    const vals = new Float64Array(2 * plan.slotRow.length);
    stampAt(plan, 0, vals);
    const f = createFactor(analyse(plan.size, plan.slotRow, plan.slotCol));
    expect(refactorOrFactor(f, vals)).toBe(SINGULAR);
    expect(f.failColumn).toBe(mid);
    expect(plan.unknownNames[f.failColumn]).toContain('mid');
    // at 1 MHz it is regular again
    stampAt(plan, 2 * Math.PI * 1e6, vals);
    expect(refactorOrFactor(f, vals)).toBe(OK);
  });
});

describe('edge cases', () => {
  it('empty and 1×1 systems; a non-finite value is reported as SINGULAR, not solved', () => {
    const f0 = createFactor(analyse(0, new Int32Array(0), new Int32Array(0)));
    expect(factor(f0, new Float64Array(0))).toBe(OK);
    solve(f0, new Float64Array(0), new Float64Array(0), 3);
    expect(reciprocalCondition(f0)).toBe(1);
    // 1×1: (2 + 1j)·x = 1 + 1j  →  x = (1 + 1j)/(2 + 1j) = (3 + 1j)/5 (complex division, closed form)
    const f1 = createFactor(analyse(1, Int32Array.of(0), Int32Array.of(0)));
    expect(factor(f1, Float64Array.of(2, 1))).toBe(OK);
    const x = new Float64Array(2);
    solve(f1, Float64Array.of(1, 1), x, 1);
    expect(Math.abs(x[0]! - 0.6)).toBeLessThanOrEqual(4e-16); // a few ulps
    expect(Math.abs(x[1]! - 0.2)).toBeLessThanOrEqual(4e-16);
    expect(refactor(f1, Float64Array.of(0, 0))).toBe(SINGULAR);
    expect(f1.failColumn).toBe(0);
    // NaN in an off-diagonal entry of a 3×3 system
    const s = { n: 3, slotRow: Int32Array.of(0, 1, 2, 0, 1), slotCol: Int32Array.of(0, 1, 2, 2, 0) };
    const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
    expect(factor(f, Float64Array.of(1, 0, 1, 0, 1, 0, Number.NaN, 0, 1, 0))).toBe(SINGULAR);
    expect(f.valid).toBe(false);
    expect(factor(f, Float64Array.of(1, 0, 1, 0, 1, 0, 1, 0, Number.POSITIVE_INFINITY, 0))).toBe(SINGULAR);
  });
});

describe('condition estimate [HAGER]', () => {
  it('never above the true ‖A⁻¹‖₁ and within a factor 10 of it; ‖A‖₁ exact', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const s = seed % 2 === 0 ? randomNodal(seed) : randomGeneral(seed);
        const a = toDense(s);
        if (denseRcond(s.n, a) < 1e-8) return;
        const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
        expect(factor(f, s.values)).toBe(OK);
        const aInv = createMatrix(s.n);
        inverse(s.n, a, aInv, createLu(s.n));
        const exact = norm1(s.n, aInv);
        const est = inverseNorm1Estimate(f);
        expect(est).toBeLessThanOrEqual(exact * (1 + 1e-10));
        expect(est).toBeGreaterThanOrEqual(exact / 10);
        const an = norm1(s.n, a);
        expect(Math.abs(matrixNorm1(f) - an)).toBeLessThanOrEqual(1e-14 * an);
        const rc = reciprocalCondition(f);
        expect(rc).toBeGreaterThanOrEqual((1 / (an * exact)) * (1 - 1e-10));
        expect(rc).toBeLessThanOrEqual((10 / (an * exact)) * (1 + 1e-10));
      }),
      { ...FC, numRuns: 80 },
    );
  });

  it('is tiny for a nearly singular matrix: two columns equal but for 1e-13', () => {
    const s = randomGeneral(4242);
    const n = s.n;
    if (n < 3) return;
    const a = toDense(s);
    // dense pattern so that the two columns can be made equal everywhere
    for (let i = 0; i < n; i++) a[2 * (i * n + i)] += 3;
    const rows: number[] = [];
    const cols: number[] = [];
    const vals: number[] = [];
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        rows.push(i);
        cols.push(j);
        const src = j === 1 ? 0 : j; // column 1 is a copy of column 0 ...
        const eps = j === 1 && i === 0 ? 1e-13 : 0; // ... but for 1e-13 in one entry
        vals.push(a[2 * (i * n + src)]! + eps, a[2 * (i * n + src) + 1]!);
      }
    }
    const f = createFactor(analyse(n, Int32Array.from(rows), Int32Array.from(cols)));
    const st = factor(f, Float64Array.from(vals));
    if (st === OK) expect(reciprocalCondition(f)).toBeLessThan(1e-10);
    else expect(st).toBe(SINGULAR);
  });
});

/** A random symmetric nodal system: admittances between node pairs and to ground (no branch rows). */
function randomSymmetric(seed: number): System {
  const r = rng(seed);
  const n = 1 + Math.floor(r() * 45);
  const { admittance, system } = slotLists();
  for (let i = 0; i < n; i++) admittance(i, i === 0 || r() < 0.3 ? -1 : Math.floor(r() * i), 0.01 + r(), (r() - 0.3) * 0.5);
  const more = Math.floor(r() * 2 * n);
  for (let k = 0; k < more; k++) {
    const a = Math.floor(r() * n);
    const b = Math.floor(r() * n);
    if (a !== b) admittance(a, b, 0.01 + r(), (r() - 0.5) * 0.5);
  }
  return system(n);
}

describe('symmetric port solve [LDLT]', () => {
  it('gives c_aᵀ·A⁻¹·c_b for 1 to 6 ports (c = e_plus − e_minus), after factor and after refactor [AGREE]', () => {
    let checked = 0;
    fc.assert(
      fc.property(fc.integer(), fc.integer({ min: 1, max: 6 }), (seed, m) => {
        const s = randomSymmetric(seed);
        const a = toDense(s);
        if (denseRcond(s.n, a) < KAPPA_LIMIT_RCOND) return;
        const r = rng(seed ^ 0x2545f491);
        // ports to ground and across two unknowns; a terminal may be shared between ports
        const plus = Int32Array.from({ length: m }, () => Math.floor(r() * s.n));
        const minus = Int32Array.from(plus, (u) => {
          const w = Math.floor(r() * s.n);
          return r() < 0.5 || w === u ? -1 : w;
        });
        const f = createFactor(analyse(s.n, s.slotRow, s.slotCol));
        expect(factor(f, s.values)).toBe(OK);
        const sp = symmetricPorts(f, plus, minus);
        if (!sp) {
          expect(f.swaps).toBeGreaterThan(0); // only a row swap stops it
          return;
        }
        expect(sp.m).toBe(m);
        const check = (values: Float64Array) => {
          const inv = inverse(s.n, toDense(s, values), createMatrix(s.n), createLu(s.n));
          solveSymmetricPorts(f, sp);
          const at = (u: number, w: number) => (u < 0 || w < 0 ? [0, 0] : [inv[2 * (u * s.n + w)]!, inv[2 * (u * s.n + w) + 1]!]);
          let scale = 0;
          for (let i = 0; i < inv.length; i += 2) scale = Math.max(scale, Math.hypot(inv[i]!, inv[i + 1]!));
          for (let p = 0; p < m; p++) {
            for (let q = 0; q < m; q++) {
              // c_pᵀ·A⁻¹·c_q from the dense inverse
              const terms = [at(plus[p]!, plus[q]!), at(minus[p]!, minus[q]!)];
              const cross = [at(plus[p]!, minus[q]!), at(minus[p]!, plus[q]!)];
              const er = terms[0]![0]! + terms[1]![0]! - cross[0]![0]! - cross[1]![0]!;
              const ei = terms[0]![1]! + terms[1]![1]! - cross[0]![1]! - cross[1]![1]!;
              const g = 2 * (p * m + q);
              expect(Math.hypot(sp.g[g]! - er, sp.g[g + 1]! - ei)).toBeLessThanOrEqual(4e-10 * scale);
              expect(sp.g[g]).toBe(sp.g[2 * (q * m + p)]); // symmetric by construction
            }
          }
        };
        check(s.values);
        // the same pivots with the values scaled and rotated (still symmetric): a refactor
        const rot = Float64Array.from(s.values);
        for (let k = 0; k < rot.length; k += 2) {
          const [re, im] = [s.values[k]!, s.values[k + 1]!];
          rot[k] = 2 * (0.6 * re - 0.8 * im);
          rot[k + 1] = 2 * (0.8 * re + 0.6 * im);
        }
        expect(refactor(f, rot)).toBe(OK);
        check(rot);
        checked++;
      }),
      FC,
    );
    expect(checked).toBeGreaterThan(60);
  });

  it('declines a factor whose pivoting swapped rows (U is then not D·Lᵀ)', () => {
    // [[0, 1], [1, 0]] needs a swap at the first step
    const f = createFactor(analyse(2, Int32Array.from([0, 1, 0, 1]), Int32Array.from([1, 0, 0, 1])));
    expect(factor(f, Float64Array.from([1, 0, 1, 0, 0, 0, 0, 0]))).toBe(OK);
    expect(f.swaps).toBeGreaterThan(0);
    expect(symmetricPorts(f, [0, 1], [-1, -1])).toBeUndefined();
  });
});

describe('a circuit from the stamp plan over a sweep', () => {
  it('an LC ladder: refactorOrFactor + solve agree with the dense LU at every point [AGREE]', () => {
    const lines: string[] = [];
    const N = 40;
    for (let k = 1; k <= N; k++) {
      lines.push(`inductor l${k} a=n${k - 1} b=n${k} value=10 nH q=50 at 1 GHz`);
      lines.push(`capacitor c${k} a=n${k} b=ground value=4 pF`);
    }
    lines.push('port 1 plus=n0', `port 2 plus=n${N}`, 'sweep list freqs=1 GHz');
    const { circuit } = loadNetlist(lines.join('\n'), 'ladder.sbx');
    const plan = buildPlan(circuit);
    const n = plan.size;
    const sys: System = { n, slotRow: plan.slotRow, slotCol: plan.slotCol, values: new Float64Array(2 * plan.slotRow.length) };
    const f = createFactor(analyse(n, plan.slotRow, plan.slotCol));
    const storage = [f.lu, f.rowIdx, f.updTarget, f.work];
    let refactors = 0;
    for (let k = 0; k < 60; k++) {
      const freq = 1e6 * Math.pow(3000, k / 59);
      stampAt(plan, 2 * Math.PI * freq, sys.values);
      const before = f.factorCount;
      expect(refactorOrFactor(f, sys.values)).toBe(OK);
      if (f.factorCount === before) refactors++;
      const b = randomRhs(n, 2, k);
      const x = new Float64Array(b.length);
      solve(f, b, x, 2);
      const a = toDense(sys);
      const xd = denseSolve(n, a, b, 2);
      // this ladder is a resonant network (κ up to ~1e6 near its band edge); agreement to κ·ε
      const rc = denseRcond(n, a);
      expect(maxDiff(x, xd)).toBeLessThanOrEqual(Math.max(1e-10, 1e-14 / rc) * maxAbs(xd));
    }
    expect(refactors).toBeGreaterThan(50); // the recorded pivots serve almost the whole sweep
    // no storage was replaced after the first factorisation
    expect([f.lu, f.rowIdx, f.updTarget, f.work]).toEqual(storage);
    expect(factorNonzeros(f).l).toBeGreaterThan(0);
  });
});
