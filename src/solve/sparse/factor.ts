/**
 * Numeric sparse LU of a complex matrix with a fixed pattern: P·A·Q = L·U, L unit lower triangular,
 * U upper triangular, in step numbering (step j eliminates column Q_j = `pattern.order[j]` with
 * pivot row P_j = `pivotRow[j]`).
 *
 * Two ways to compute it:
 *
 * - {@link factor}: left-looking LU with threshold partial pivoting and a pattern found on the fly
 *   (J. R. Gilbert and T. Peierls, "Sparse partial pivoting in time proportional to arithmetic
 *   operations", SIAM J. Sci. Stat. Comput. 9(5), 1988). Column j: a depth-first search through the
 *   columns of L found so far gives the pattern of the sparse triangular solve L·x = A(:, Q_j) and a
 *   topological order for it; the solve runs in a dense work vector; the pivot is then chosen among
 *   the rows not yet pivoted. The preferred row (the unknown's own row: the diagonal of the analysed
 *   order) is kept if |x_d| ≥ τ·max_i |x_i| (threshold partial pivoting, τ = 0.1 by default, common
 *   practice for sparse LU), otherwise the row of largest magnitude is taken. Magnitudes are
 *   |Re| + |Im| (within √2 of the modulus, and cheaper). The pivot sequence and patterns are recorded.
 * - {@link refactor}: the same elimination with the recorded pivot sequence, compiled once per
 *   sequence into fixed positions: the slot values are written straight into their places in the
 *   factor storage, then for every column j and every k in U(:, j) (in a topological order) the
 *   update L(:, k)·u_kj is subtracted at precomputed target positions of column j, then column j
 *   of L is scaled by 1/u_jj. Each pivot is checked: max_i |l_ij| ≤ 1/τ_r, i.e. (up to the factor
 *   √2 between |Re| + |Im| and the modulus) |u_jj| ≥ τ_r·max_i |x_ij| over the column being
 *   eliminated (τ_r = 0.01 by default, below τ so that a sweep does not flip between the two; our
 *   choice). When the check fails it returns
 *   {@link NEEDS_PIVOTING} and the caller runs {@link factor} (see {@link refactorOrFactor}).
 *   When the list of update targets would exceed `maxUpdateList` entries, refactor instead runs the
 *   left-looking scheme with a dense work vector (scatter, update, gather), which needs no list.
 *
 * - {@link refactorTwo} / {@link refactorPlacedTwo}: two matrices of one pattern refactored in one
 *   loop, the second into a {@link twinFactor} (its own values on the same sequence). Each pivot
 *   waits on a chain of dependent operations ending in a division; two independent chains keep
 *   a core busier. Each matrix gets exactly the operations it would get alone.
 *
 * Right after {@link createFactor} the recorded sequence is the analysed one (diagonal pivots), so
 * {@link refactor} may be tried before any {@link factor}.
 *
 * Storage: one array of entries for L and U together, by columns; column j holds first its U
 * entries (rows < j, topological order), then the pivot u_jj, then its L entries (rows > j). Row
 * lists of L (entry numbers) are kept as well, for the row-oriented forward solve in solve.ts.
 *
 * Non-finite values are reported (SINGULAR) when they reach a pivot column; {@link factor} also
 * checks the U entries.
 *
 * Allocation: {@link createFactor} allocates everything for the analysed pattern (with 25 % + n room
 * in every factor array). {@link refactor} and the solves never allocate. {@link factor} allocates
 * only when row swaps make the factors outgrow that room; the arrays then grow by at least half and
 * are kept, so in a sweep this happens at most a few times, early.
 *
 * Status codes are returned, not thrown.
 *
 * @module
 */

import type { SparsePattern } from './pattern.js';

/** Factorisation succeeded. */
export const OK = 0;
/** {@link refactor} found a pivot too small for the recorded sequence; call {@link factor}. */
export const NEEDS_PIVOTING = 1;
/** The matrix is singular (a whole pivot column is exactly zero) or has non-finite values. */
export const SINGULAR = 2;

export type FactorStatus = typeof OK | typeof NEEDS_PIVOTING | typeof SINGULAR;

export interface FactorOptions {
  /** τ of threshold partial pivoting in {@link factor} (0 < τ ≤ 1; default 0.1; 1 is plain partial pivoting). */
  pivotTolerance?: number;
  /** τ_r: the smallest |pivot|/max|column| {@link refactor} accepts (0 < τ_r ≤ 1, default 0.01). */
  refactorTolerance?: number;
  /** Right-hand sides {@link solve} carries per pass over the factors (default 8; any count works). */
  rhsBlock?: number;
  /** Largest number of precomputed update targets (4 bytes each) before refactor uses a work vector instead (default 2^24). */
  maxUpdateList?: number;
}

/**
 * Buffers and results of a sparse factorisation, made by {@link createFactor}. Everything is
 * read-only for callers except the two tolerances. Arrays marked "grows" may be replaced by
 * {@link factor}.
 */
export interface SparseFactor {
  readonly pattern: SparsePattern;
  readonly n: number;
  pivotTolerance: number;
  refactorTolerance: number;
  /** Status of the last factor/refactor. */
  status: FactorStatus;
  /** When status is not OK: the unknown (0-based column of A) whose pivot failed, else -1. */
  failColumn: number;
  /** Whether the storage holds a successful factorisation (solving is allowed). */
  valid: boolean;
  /** Whether a pivot sequence is recorded and compiled, so {@link refactor} may run. */
  hasSequence: boolean;
  /** Counts the {@link factor} calls, each of which may record a new pivot sequence (twins check it). */
  sequence: number;
  /** For a factor made by {@link twinFactor}: the factor whose sequence it shares. */
  readonly twinOf: SparseFactor | undefined;
  /** `pivotRow[j]`: row of A (original numbering) used as pivot at step j. */
  readonly pivotRow: Int32Array;
  /** `rowStep[r]`: step at which row r of A is the pivot row (inverse of pivotRow). */
  readonly rowStep: Int32Array;

  // --- factors, by columns: U part, pivot, L part ------------------------------------------
  /** Entries of column j: colPtr[j] .. colPtr[j+1]−1; the pivot is entry diagPos[j]. */
  readonly colPtr: Int32Array;
  readonly diagPos: Int32Array;
  /** Row (in steps) of each entry (grows). */
  rowIdx: Int32Array;
  /** Values of the entries, complex interleaved (grows). */
  lu: Float64Array;
  /** Number of entries (L and U off-diagonal entries plus n pivots). */
  entries: number;
  /** Reciprocals of the pivots, interleaved. */
  readonly pivotInv: Float64Array;
  /**
   * Rows of L: row i has the entries t = lRowPtr[i] .. lRowPtr[i+1]−1, stored as pairs
   * lRowIdx[2t] = column (step), lRowIdx[2t+1] = 2 × entry number (grows).
   */
  readonly lRowPtr: Int32Array;
  lRowIdx: Int32Array;

  // --- the compiled refactorisation ---------------------------------------------------------
  /** 2 × entry of each slot (its real part's place in `lu`). */
  readonly slotTarget: Int32Array;
  /** Whether every entry holds at most one slot (then values are stored, not summed). */
  slotsUnique: boolean;
  /** 2 × entry of every entry no slot covers (fill-in), zeroed before the values go in (grows). */
  zeroList: Int32Array;
  zeroCount: number;
  /** 2 × target entry of every update, in elimination order (grows); unused if `useUpdateList` is false. */
  updTarget: Int32Array;
  updCount: number;
  useUpdateList: boolean;
  readonly maxUpdateList: number;

  /** Storage for a copy of the slot values a pivoting factorisation was given. */
  readonly values: Float64Array;
  /**
   * The slot values last factored, for ‖A‖₁ in the condition estimate: the copy above after
   * {@link factor}, the caller's own array after {@link refactor} (keep it unchanged until then).
   */
  lastValues: Float64Array;
  /** Smallest and largest |Re| + |Im| of the pivots of the last successful factorisation. */
  pivotMin: number;
  pivotMax: number;
  /** Steps where {@link factor} did not take the preferred row. */
  swaps: number;
  /** Counters: pivoting factorisations, refactorisations, times storage grew. */
  factorCount: number;
  refactorCount: number;
  growCount: number;

  // --- storage of the pivoting factorisation (grows), then compiled into the above -----------
  readonly gLStart: Int32Array;
  gLRow: Int32Array;
  gLVal: Float64Array;
  readonly gUStart: Int32Array;
  gURow: Int32Array;
  gUVal: Float64Array;
  readonly gPivot: Float64Array;

  // --- workspaces ---------------------------------------------------------------------------
  readonly x: Float64Array;
  readonly mark: Int32Array;
  readonly stack: Int32Array;
  readonly childPos: Int32Array;
  readonly topo: Int32Array;
  readonly lower: Int32Array;
  readonly colMap: Int32Array;
  readonly colMapStamp: Int32Array;
  readonly rhsBlock: number;
  readonly work: Float64Array;
  readonly est1: Float64Array;
  readonly est2: Float64Array;
}

/** Allocates all numeric storage for matrices with this pattern. */
export function createFactor(pattern: SparsePattern, options: FactorOptions = {}): SparseFactor {
  const n = pattern.n;
  const tau = options.pivotTolerance ?? 0.1;
  const tauR = options.refactorTolerance ?? 0.01;
  if (!(tau > 0 && tau <= 1)) throw new RangeError(`createFactor: pivotTolerance must be in (0, 1], not ${tau}`);
  if (!(tauR > 0 && tauR <= 1)) throw new RangeError(`createFactor: refactorTolerance must be in (0, 1], not ${tauR}`);
  const block = Math.max(1, Math.floor(options.rhsBlock ?? 8));
  const lCap = Math.ceil(1.25 * pattern.lNonzeros) + n + 16;
  const uCap = Math.ceil(1.25 * pattern.uNonzeros) + n + 16;
  const eCap = lCap + uCap + n;
  const updCap = Math.ceil(1.25 * pattern.updateCount) + n + 16;
  const maxUpd = Math.max(0, Math.floor(options.maxUpdateList ?? 1 << 24));
  const f: SparseFactor = {
    pattern,
    n,
    pivotTolerance: tau,
    refactorTolerance: tauR,
    status: OK,
    failColumn: -1,
    valid: false,
    hasSequence: false,
    sequence: 0,
    twinOf: undefined,
    pivotRow: new Int32Array(n),
    rowStep: new Int32Array(n),
    colPtr: new Int32Array(n + 1),
    diagPos: new Int32Array(n),
    rowIdx: new Int32Array(eCap),
    lu: new Float64Array(2 * eCap),
    entries: 0,
    pivotInv: new Float64Array(2 * n),
    lRowPtr: new Int32Array(n + 1),
    lRowIdx: new Int32Array(2 * lCap),
    slotTarget: new Int32Array(pattern.slotCount),
    slotsUnique: true,
    zeroList: new Int32Array(eCap),
    zeroCount: 0,
    updTarget: new Int32Array(Math.min(updCap, maxUpd)),
    updCount: 0,
    useUpdateList: true,
    maxUpdateList: maxUpd,
    values: new Float64Array(2 * pattern.slotCount),
    lastValues: new Float64Array(0),
    pivotMin: NaN,
    pivotMax: NaN,
    swaps: 0,
    factorCount: 0,
    refactorCount: 0,
    growCount: 0,
    gLStart: new Int32Array(n + 1),
    gLRow: new Int32Array(lCap),
    gLVal: new Float64Array(2 * lCap),
    gUStart: new Int32Array(n + 1),
    gURow: new Int32Array(uCap),
    gUVal: new Float64Array(2 * uCap),
    gPivot: new Float64Array(2 * n),
    x: new Float64Array(2 * n),
    mark: new Int32Array(n),
    stack: new Int32Array(n),
    childPos: new Int32Array(n),
    topo: new Int32Array(n),
    lower: new Int32Array(n),
    colMap: new Int32Array(n),
    colMapStamp: new Int32Array(n).fill(-1),
    rhsBlock: block,
    work: new Float64Array(2 * n * Math.max(block, 2)),
    est1: new Float64Array(2 * n),
    est2: new Float64Array(2 * n),
  };
  // the analysed sequence: diagonal pivots
  f.pivotRow.set(pattern.order);
  f.rowStep.set(pattern.stepOf);
  compile(f, pattern.lStart, pattern.lRow, pattern.uStart, pattern.uRow, false);
  f.hasSequence = true;
  return sameShape(f);
}

/**
 * A copy of `s` made by the one object literal every factor leaves through (originals and twins
 * alike), so that all factors share one shape: the loops that take two factors at once then see
 * one shape in both arguments. (A twin made by spreading its original had a shape of its own, and
 * the compiled pair elimination, built for an earlier pair, dropped to the interpreter at the end
 * of each call, for about 1,600 calls in a row in a sweep of the 100-section ladder: measured with
 * V8's deoptimisation trace.)
 */
function sameShape(s: SparseFactor): SparseFactor {
  return {
    pattern: s.pattern, n: s.n, pivotTolerance: s.pivotTolerance,
    refactorTolerance: s.refactorTolerance, status: s.status, failColumn: s.failColumn,
    valid: s.valid, hasSequence: s.hasSequence, sequence: s.sequence, twinOf: s.twinOf,
    pivotRow: s.pivotRow, rowStep: s.rowStep, colPtr: s.colPtr, diagPos: s.diagPos,
    rowIdx: s.rowIdx, lu: s.lu, entries: s.entries, pivotInv: s.pivotInv, lRowPtr: s.lRowPtr,
    lRowIdx: s.lRowIdx, slotTarget: s.slotTarget, slotsUnique: s.slotsUnique, zeroList: s.zeroList,
    zeroCount: s.zeroCount, updTarget: s.updTarget, updCount: s.updCount,
    useUpdateList: s.useUpdateList, maxUpdateList: s.maxUpdateList, values: s.values,
    lastValues: s.lastValues, pivotMin: s.pivotMin, pivotMax: s.pivotMax, swaps: s.swaps,
    factorCount: s.factorCount, refactorCount: s.refactorCount, growCount: s.growCount,
    gLStart: s.gLStart, gLRow: s.gLRow, gLVal: s.gLVal, gUStart: s.gUStart, gURow: s.gURow,
    gUVal: s.gUVal, gPivot: s.gPivot, x: s.x, mark: s.mark, stack: s.stack, childPos: s.childPos,
    topo: s.topo, lower: s.lower, colMap: s.colMap, colMapStamp: s.colMapStamp,
    rhsBlock: s.rhsBlock, work: s.work, est1: s.est1, est2: s.est2,
  };
}

function copyValues(f: SparseFactor, values: Float64Array): void {
  const dst = f.values;
  f.lastValues = dst;
  if (values.length === dst.length) dst.set(values);
  else {
    if (values.length < dst.length) throw new RangeError(`sparse LU: ${values.length} values given, the pattern needs ${dst.length} (2 per slot)`);
    for (let k = 0; k < dst.length; k++) dst[k] = values[k]!;
  }
}

function growInt(a: Int32Array, need: number): Int32Array {
  const b = new Int32Array(Math.max(need, Math.ceil(1.5 * a.length) + 16));
  b.set(a);
  return b;
}

function growFloat(a: Float64Array, need: number): Float64Array {
  const b = new Float64Array(Math.max(need, Math.ceil(1.5 * a.length) + 32));
  b.set(a);
  return b;
}

/**
 * Lays out the factor storage for the sequence in `pivotRow`/`rowStep` and the patterns given (rows
 * in steps; U columns in a topological order), and precomputes every position refactor needs. With
 * `withValues`, also copies the values of the pivoting factorisation (g* arrays) into place.
 * Allocates only if the storage is too small.
 */
function compile(
  f: SparseFactor,
  lStart: Int32Array,
  lRow: Int32Array,
  uStart: Int32Array,
  uRow: Int32Array,
  withValues: boolean,
): void {
  const n = f.n;
  const pat = f.pattern;
  const lnz = lStart[n]!;
  const unz = uStart[n]!;
  const nnz = lnz + unz + n;
  if (f.rowIdx.length < nnz) {
    f.rowIdx = growInt(f.rowIdx, nnz);
    f.zeroList = growInt(f.zeroList, nnz);
    f.growCount++;
  }
  if (f.lu.length < 2 * nnz) f.lu = growFloat(f.lu, 2 * nnz);
  if (f.lRowIdx.length < 2 * lnz) f.lRowIdx = growInt(f.lRowIdx, 2 * lnz);
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const lu = f.lu;
  const gUVal = f.gUVal;
  const gLVal = f.gLVal;
  const gPivot = f.gPivot;
  let p = 0;
  for (let j = 0; j < n; j++) {
    colPtr[j] = p;
    for (let t = uStart[j]!; t < uStart[j + 1]!; t++) {
      rowIdx[p] = uRow[t]!;
      if (withValues) {
        lu[2 * p] = gUVal[2 * t]!;
        lu[2 * p + 1] = gUVal[2 * t + 1]!;
      }
      p++;
    }
    diagPos[j] = p;
    rowIdx[p] = j;
    if (withValues) {
      lu[2 * p] = gPivot[2 * j]!;
      lu[2 * p + 1] = gPivot[2 * j + 1]!;
    }
    p++;
    for (let t = lStart[j]!; t < lStart[j + 1]!; t++) {
      rowIdx[p] = lRow[t]!;
      if (withValues) {
        lu[2 * p] = gLVal[2 * t]!;
        lu[2 * p + 1] = gLVal[2 * t + 1]!;
      }
      p++;
    }
  }
  colPtr[n] = p;
  f.entries = p;

  // row lists of L (counting sort by row), for the forward solve
  const lRowPtr = f.lRowPtr;
  lRowPtr.fill(0);
  for (let j = 0; j < n; j++) {
    for (let q = diagPos[j]! + 1; q < colPtr[j + 1]!; q++) lRowPtr[rowIdx[q]! + 1]++;
  }
  for (let i = 0; i < n; i++) lRowPtr[i + 1] += lRowPtr[i]!;
  const cursor = f.stack; // scratch
  for (let i = 0; i < n; i++) cursor[i] = lRowPtr[i]!;
  const lRowIdx = f.lRowIdx;
  for (let j = 0; j < n; j++) {
    for (let q = diagPos[j]! + 1; q < colPtr[j + 1]!; q++) {
      const r = rowIdx[q]!;
      const at = cursor[r]!++;
      lRowIdx[2 * at] = j;
      lRowIdx[2 * at + 1] = 2 * q;
    }
  }

  // update targets, slot targets, fill-in list
  const colMap = f.colMap;
  const stamp = f.colMapStamp;
  stamp.fill(-1);
  let updates = 0;
  for (let j = 0; j < n; j++) {
    for (let q = colPtr[j]!; q < diagPos[j]!; q++) {
      const k = rowIdx[q]!;
      updates += colPtr[k + 1]! - diagPos[k]! - 1;
    }
  }
  f.updCount = updates;
  f.useUpdateList = updates <= f.maxUpdateList;
  if (f.useUpdateList && f.updTarget.length < updates) {
    f.updTarget = growInt(f.updTarget, updates);
    f.growCount++;
  }
  const updTarget = f.updTarget;
  const useList = f.useUpdateList;
  const colStart = pat.colStart;
  const entryRow = pat.entryRow;
  const entrySlot = pat.entrySlot;
  const rowStep = f.rowStep;
  const slotTarget = f.slotTarget;
  const cover = f.mark; // scratch: slots per entry of the current column
  let unique = true;
  let zeros = 0;
  const zeroList = f.zeroList;
  let u = 0;
  for (let j = 0; j < n; j++) {
    const c0 = colPtr[j]!;
    const c1 = colPtr[j + 1]!;
    for (let q = c0; q < c1; q++) {
      const r = rowIdx[q]!;
      colMap[r] = q;
      stamp[r] = j;
      cover[r] = 0;
    }
    for (let a = colStart[j]!; a < colStart[j + 1]!; a++) {
      const r = rowStep[entryRow[a]!]!;
      if (stamp[r] !== j) throw new Error('sparse LU: internal error (an entry of A is outside the factor pattern)');
      slotTarget[entrySlot[a]!] = 2 * colMap[r]!;
      if (++cover[r]! > 1) unique = false;
    }
    for (let q = c0; q < c1; q++) if (cover[rowIdx[q]!] === 0) zeroList[zeros++] = 2 * q;
    if (!useList) continue;
    for (let q = c0; q < diagPos[j]!; q++) {
      const k = rowIdx[q]!;
      for (let t = diagPos[k]! + 1; t < colPtr[k + 1]!; t++) {
        const r = rowIdx[t]!;
        if (stamp[r] !== j) throw new Error('sparse LU: internal error (an update falls outside the factor pattern)');
        updTarget[u++] = 2 * colMap[r]!;
      }
    }
  }
  f.slotsUnique = unique;
  f.zeroCount = zeros;
}

/**
 * Pivoting factorisation of the matrix whose slot values are `values` (complex interleaved, slot s
 * at 2s, 2s+1, as in the stamp plan). Records and compiles the pivot sequence for {@link refactor}.
 * Returns {@link OK} or {@link SINGULAR} (with `f.failColumn` the unknown whose column has no usable
 * pivot: every entry left in it is exactly zero, or one is not finite).
 */
export function factor(f: SparseFactor, values: Float64Array): FactorStatus {
  if (f.twinOf) throw new Error('sparse LU: a twin factor shares its pivot sequence and cannot record one; factor the original');
  copyValues(f, values);
  f.factorCount++;
  f.sequence++;
  const pat = f.pattern;
  const n = f.n;
  const order = pat.order;
  const colStart = pat.colStart;
  const entryRow = pat.entryRow;
  const entrySlot = pat.entrySlot;
  const pivotRow = f.pivotRow;
  const rowStep = f.rowStep;
  const lStart = f.gLStart;
  const uStart = f.gUStart;
  const gPivot = f.gPivot;
  const pivotInv = f.pivotInv;
  const x = f.x;
  const mark = f.mark;
  const stack = f.stack;
  const childPos = f.childPos;
  const topo = f.topo;
  const lower = f.lower;
  const tau = f.pivotTolerance;
  let lRow = f.gLRow;
  let lVal = f.gLVal;
  let uRow = f.gURow;
  let uVal = f.gUVal;
  rowStep.fill(-1);
  mark.fill(-1);
  f.valid = false;
  f.hasSequence = false;
  let swaps = 0;
  let lnz = 0;
  let unz = 0;
  let uFinite = true;
  lStart[0] = 0;
  uStart[0] = 0;

  for (let j = 0; j < n; j++) {
    // --- pattern of column j: depth-first search through L (Gilbert & Peierls) ----------------
    let top = n;
    let nLower = 0;
    const a0 = colStart[j]!;
    const a1 = colStart[j + 1]!;
    for (let p = a0; p < a1; p++) {
      const r = entryRow[p]!;
      if (mark[r] === j) continue;
      mark[r] = j;
      const k0 = rowStep[r]!;
      if (k0 < 0) {
        lower[nLower++] = r;
        continue;
      }
      let sp = 0;
      stack[0] = k0;
      childPos[k0] = lStart[k0]!;
      while (sp >= 0) {
        const k = stack[sp]!;
        let t = childPos[k]!;
        const end = lStart[k + 1]!;
        let down = -1;
        while (t < end) {
          const i = lRow[t++]!;
          if (mark[i] === j) continue;
          mark[i] = j;
          const s = rowStep[i]!;
          if (s < 0) {
            lower[nLower++] = i;
            continue;
          }
          down = s;
          break;
        }
        if (down >= 0) {
          childPos[k] = t;
          stack[++sp] = down;
          childPos[down] = lStart[down]!;
        } else {
          sp--;
          topo[--top] = k;
        }
      }
    }

    // --- room for the column ---------------------------------------------------------------
    const nu = n - top;
    if (unz + nu > uRow.length) {
      uRow = f.gURow = growInt(uRow, unz + nu + n);
      uVal = f.gUVal = growFloat(uVal, 2 * uRow.length);
      f.growCount++;
    }
    if (lnz + nLower > lRow.length) {
      lRow = f.gLRow = growInt(lRow, lnz + nLower + n);
      lVal = f.gLVal = growFloat(lVal, 2 * lRow.length);
      f.growCount++;
    }

    // --- numeric: x = A(:, Q_j), then x ← L⁻¹x over the pattern --------------------------------
    for (let p = a0; p < a1; p++) {
      const r2 = 2 * entryRow[p]!;
      const s2 = 2 * entrySlot[p]!;
      x[r2] += values[s2]!;
      x[r2 + 1] += values[s2 + 1]!;
    }
    for (let t = top; t < n; t++) {
      const k = topo[t]!;
      const kr = 2 * pivotRow[k]!;
      const ur = x[kr]!;
      const ui = x[kr + 1]!;
      x[kr] = 0;
      x[kr + 1] = 0;
      uRow[unz] = k;
      uVal[2 * unz] = ur;
      uVal[2 * unz + 1] = ui;
      unz++;
      if (!(Math.abs(ur) + Math.abs(ui) < Infinity)) uFinite = false;
      if (ur === 0 && ui === 0) continue;
      const q1 = lStart[k + 1]!;
      for (let q = lStart[k]!; q < q1; q++) {
        const i2 = 2 * lRow[q]!;
        const lr = lVal[2 * q]!;
        const li = lVal[2 * q + 1]!;
        x[i2] -= lr * ur - li * ui;
        x[i2 + 1] -= lr * ui + li * ur;
      }
    }
    uStart[j + 1] = unz;

    // --- pivot choice among the rows not yet pivoted ---------------------------------------
    const preferred = order[j]!;
    let best = -1;
    let bestMag = -1;
    let prefMag = -1;
    let finite = true;
    for (let t = 0; t < nLower; t++) {
      const r = lower[t]!;
      const m = Math.abs(x[2 * r]!) + Math.abs(x[2 * r + 1]!);
      if (!(m < Infinity)) finite = false;
      if (m > bestMag) {
        bestMag = m;
        best = r;
      }
      if (r === preferred) prefMag = m;
    }
    if (nLower === 0 || !(bestMag > 0) || !finite || !uFinite) {
      for (let t = 0; t < nLower; t++) {
        const r2 = 2 * lower[t]!;
        x[r2] = 0;
        x[r2 + 1] = 0;
      }
      f.status = SINGULAR;
      f.failColumn = preferred;
      return SINGULAR;
    }
    let pr = best;
    if (prefMag >= tau * bestMag) pr = preferred;
    else swaps++;
    const dr = x[2 * pr]!;
    const di = x[2 * pr + 1]!;
    x[2 * pr] = 0;
    x[2 * pr + 1] = 0;
    pivotRow[j] = pr;
    rowStep[pr] = j;
    gPivot[2 * j] = dr;
    gPivot[2 * j + 1] = di;
    const s = Math.abs(dr) + Math.abs(di);
    let qr: number;
    let qi: number;
    if (s > 1e-150 && s < 1e150) {
      const d = 1 / (dr * dr + di * di);
      qr = dr * d;
      qi = -di * d;
    } else {
      qr = smithReal(dr, di);
      qi = smithImag(dr, di);
    }
    pivotInv[2 * j] = qr;
    pivotInv[2 * j + 1] = qi;
    for (let t = 0; t < nLower; t++) {
      const r = lower[t]!;
      if (r === pr) continue;
      const r2 = 2 * r;
      const xr = x[r2]!;
      const xi = x[r2 + 1]!;
      x[r2] = 0;
      x[r2 + 1] = 0;
      lRow[lnz] = r;
      lVal[2 * lnz] = xr * qr - xi * qi;
      lVal[2 * lnz + 1] = xr * qi + xi * qr;
      lnz++;
    }
    lStart[j + 1] = lnz;
  }

  // rows of L in steps, then lay out and compile the new sequence
  for (let q = 0; q < lnz; q++) lRow[q] = rowStep[lRow[q]!]!;
  compile(f, lStart, lRow, uStart, uRow, true);
  pivotSpread(f);
  f.swaps = swaps;
  f.hasSequence = true;
  f.valid = true;
  f.status = OK;
  f.failColumn = -1;
  return OK;
}

/**
 * Refactorisation with the recorded pivot sequence (no search, no allocation).
 * Returns {@link OK}; {@link NEEDS_PIVOTING} when a pivot fails |u_jj| ≥ τ_r·max|column| (or no
 * sequence is recorded because the last {@link factor} failed; then `failColumn` is −1); or
 * {@link SINGULAR} when a whole pivot column is exactly zero (singular whatever the pivots: that
 * column of A depends on the columns eliminated before it) or holds non-finite values.
 */
export function refactor(f: SparseFactor, values: Float64Array): FactorStatus {
  if (values.length < 2 * f.pattern.slotCount) throw new RangeError(`sparse LU: ${values.length} values given, the pattern needs ${2 * f.pattern.slotCount} (2 per slot)`);
  if (f.hasSequence) {
    f.lastValues = values;
    if (f.slotsUnique) placeValues(f, values);
    else addValues(f, values);
  }
  return refactorPlaced(f);
}

/**
 * {@link refactor} of a matrix whose values the caller has already written into `f.lu` in place:
 * every entry `slotTarget[s]` holding the sum of its slots' values, every other entry (fill-in)
 * zero — e.g. by copying a prepared image of the frequency-independent part over `lu` and adding
 * the rest at `slotTarget` positions. Saves the pass that places slot values. `lastValues` is not
 * set (the caller sets it before a condition estimate). The sequence must not change between
 * preparing the positions and this call (it changes only in {@link factor}).
 */
export function refactorPlaced(f: SparseFactor): FactorStatus {
  if (f.twinOf && f.sequence !== f.twinOf.sequence) throw new Error('sparse LU: this twin factor\'s original has recorded a new pivot sequence since; make a new twin');
  f.valid = false;
  if (!f.hasSequence) {
    f.status = NEEDS_PIVOTING;
    f.failColumn = -1;
    return NEEDS_PIVOTING;
  }
  f.refactorCount++;
  const j = f.useUpdateList ? eliminateByList(f) : eliminateByColumn(f);
  if (j < 0) {
    f.status = OK;
    f.failColumn = -1;
    f.valid = true;
    return OK;
  }
  return failAt(f, j);
}

/**
 * A second factor on `f`'s pivot sequence, for factoring two matrices of one pattern at once
 * ({@link refactorTwo}, {@link refactorPlacedTwo}): its own values, pivots and workspaces, while
 * the pattern, the sequence and its compiled positions are `f`'s own arrays (shared, not copied).
 * It stays usable while `f` keeps that sequence: after a {@link factor} of `f` every
 * refactorisation refuses it. {@link factor} of the twin itself throws; {@link refactor},
 * the solves and the condition estimate work on it as on any factor.
 */
export function twinFactor(f: SparseFactor): SparseFactor {
  if (f.twinOf) return twinFactor(f.twinOf);
  return sameShape({
    ...f,
    twinOf: f,
    status: OK,
    failColumn: -1,
    valid: false,
    lu: new Float64Array(f.lu.length),
    pivotInv: new Float64Array(f.pivotInv.length),
    values: new Float64Array(f.values.length),
    lastValues: new Float64Array(0),
    pivotMin: NaN,
    pivotMax: NaN,
    factorCount: 0,
    refactorCount: 0,
    growCount: 0,
    x: new Float64Array(f.x.length),
    work: new Float64Array(f.work.length),
    est1: new Float64Array(f.est1.length),
    est2: new Float64Array(f.est2.length),
  });
}

/**
 * {@link refactor} of two matrices of the pattern at once, `a` into `f` and `b` into `g` (a
 * {@link twinFactor} of `f`). See {@link refactorPlacedTwo}.
 */
export function refactorTwo(f: SparseFactor, g: SparseFactor, a: Float64Array, b: Float64Array): boolean {
  const need = 2 * f.pattern.slotCount;
  if (a.length < need || b.length < need) throw new RangeError(`sparse LU: ${Math.min(a.length, b.length)} values given, the pattern needs ${need} (2 per slot)`);
  checkTwin(f, g);
  if (f.hasSequence) {
    f.lastValues = a;
    g.lastValues = b;
    if (f.slotsUnique) {
      placeValues(f, a);
      placeValues(g, b);
    } else {
      addValues(f, a);
      addValues(g, b);
    }
  }
  return refactorPlacedTwo(f, g);
}

/**
 * {@link refactorPlaced} of two matrices at once: `f.lu` and `g.lu` (`g` a {@link twinFactor} of
 * `f`) each prepared as {@link refactorPlaced} asks. Both eliminations run in one loop: each step's
 * pivot waits on a chain of dependent multiplications and a division, and two independent chains
 * keep a core busier than one (on a 1,000-section ladder, measured: about 10 µs a matrix instead
 * of 16). Every operation on each matrix is the one {@link refactorPlaced} would do, in the same
 * order, so the factors are the same to the bit.
 *
 * Returns true when both succeeded (both then valid, status OK). False when either pivot check
 * failed, the sequence is gone, or the list of update targets is not kept: neither then holds a
 * factorisation (status NEEDS_PIVOTING, `failColumn` −1) — refactor each on its own, whose checks
 * tell which failed and why.
 */
export function refactorPlacedTwo(f: SparseFactor, g: SparseFactor): boolean {
  checkTwin(f, g);
  f.valid = false;
  g.valid = false;
  let ok = f.hasSequence && f.useUpdateList;
  if (ok) {
    f.refactorCount++;
    g.refactorCount++;
    ok = eliminateTwoByList(f, g) < 0;
  }
  settle(f, ok);
  settle(g, ok);
  return ok;
}

function settle(h: SparseFactor, ok: boolean): void {
  h.status = ok ? OK : NEEDS_PIVOTING;
  h.failColumn = -1;
  h.valid = ok;
}

function checkTwin(f: SparseFactor, g: SparseFactor): void {
  if (g.twinOf !== f || g.sequence !== f.sequence) throw new Error('sparse LU: the second factor is not a twin of the first on its current pivot sequence');
}

/** Writes the slot values into their entries and zeroes the fill-in (every entry holds at most one slot). */
function placeValues(f: SparseFactor, values: Float64Array): void {
  const lu = f.lu;
  const slotTarget = f.slotTarget;
  const nSlots = slotTarget.length | 0;
  const zl = f.zeroList;
  const nz = f.zeroCount | 0;
  for (let z = 0; z < nz; z = (z + 1) | 0) {
    const e = zl[z]! | 0;
    lu[e] = 0;
    lu[e | 1] = 0;
  }
  for (let s = 0; s < nSlots; s = (s + 1) | 0) {
    const e = slotTarget[s]! | 0;
    const s2 = s << 1;
    lu[e] = values[s2]!;
    lu[e | 1] = values[s2 | 1]!;
  }
}

/** Sets pivotMin / pivotMax from the stored pivots. */
function pivotSpread(f: SparseFactor): void {
  const lu = f.lu;
  const dp = f.diagPos;
  let lo = Infinity;
  let hi = 0;
  for (let j = 0; j < f.n; j++) {
    const q = 2 * dp[j]!;
    const m = Math.abs(lu[q]!) + Math.abs(lu[q + 1]!);
    if (m < lo) lo = m;
    if (m > hi) hi = m;
  }
  f.pivotMin = lo;
  f.pivotMax = hi;
}

/** Adds the slot values into their entries after zeroing all (some entry holds several slots). */
function addValues(f: SparseFactor, values: Float64Array): void {
  const lu = f.lu;
  const slotTarget = f.slotTarget;
  const nSlots = slotTarget.length | 0;
  lu.fill(0, 0, 2 * f.entries);
  for (let s = 0; s < nSlots; s = (s + 1) | 0) {
    const e = slotTarget[s]! | 0;
    const s2 = s << 1;
    lu[e] += values[s2]!;
    lu[e | 1] += values[s2 | 1]!;
  }
}

/** Classifies a failed pivot at step j (refactor). */
function failAt(f: SparseFactor, j: number): FactorStatus {
  const lu = f.lu;
  f.failColumn = f.pattern.order[j]!;
  const d = f.diagPos[j]!;
  const dm = Math.abs(lu[2 * d]!) + Math.abs(lu[2 * d + 1]!);
  let colMax = 0;
  let allZero = dm === 0;
  for (let q = d + 1; q < f.colPtr[j + 1]!; q++) {
    // L entries hold x_i/u_jj, or x_i itself if u_jj was 0 and scaling produced non-finite values
    const m = Math.abs(lu[2 * q]!) + Math.abs(lu[2 * q + 1]!);
    colMax = Math.max(colMax, m);
    if (m !== 0) allZero = false;
  }
  if (!(dm < Infinity) || (dm > 0 && !(colMax < Infinity)) || allZero) {
    f.status = SINGULAR;
    return SINGULAR;
  }
  f.status = NEEDS_PIVOTING;
  return NEEDS_PIVOTING;
}

/**
 * Elimination with the precomputed update targets. Returns −1, or the step whose pivot failed
 * (its L entries are then left unscaled when the pivot is zero).
 *
 * Index arithmetic is written with `<<` and `| 0` so that the compiler keeps it in 32-bit integers
 * without overflow checks (every index is below 2^30 here: storage that large could not be
 * allocated as typed arrays anyway).
 */
function eliminateByList(f: SparseFactor): number {
  const n = f.n | 0;
  const lu = f.lu;
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const upd = f.updTarget;
  const pivotInv = f.pivotInv;
  const limit = 1 / f.refactorTolerance;
  let t = 0;
  let c0 = colPtr[0]! | 0;
  // the pivot spread as it goes (as pivotSpread would find it afterwards)
  let lo = Infinity;
  let hi = 0;
  for (let j = 0; j < n; j = (j + 1) | 0) {
    const dp = diagPos[j]! | 0;
    for (let p = c0; p < dp; p = (p + 1) | 0) {
      const k = rowIdx[p]! | 0;
      const p2 = p << 1;
      const ur = lu[p2]!;
      const ui = lu[p2 | 1]!;
      const q1 = colPtr[(k + 1) | 0]! << 1;
      for (let q2 = (diagPos[k]! + 1) << 1; q2 < q1; q2 = (q2 + 2) | 0) {
        const e = upd[t]! | 0;
        t = (t + 1) | 0;
        const lr = lu[q2]!;
        const li = lu[q2 | 1]!;
        lu[e] -= lr * ur - li * ui;
        lu[e | 1] -= lr * ui + li * ur;
      }
    }
    const c1 = colPtr[(j + 1) | 0]! | 0;
    // pivot: reciprocal, scale L(:, j), check max |l_ij| ≤ 1/τ_r
    const d2 = dp << 1;
    const dr = lu[d2]!;
    const di = lu[d2 | 1]!;
    const s = Math.abs(dr) + Math.abs(di);
    if (s < lo) lo = s;
    if (s > hi) hi = s;
    let qr: number;
    let qi: number;
    if (s > 1e-150 && s < 1e150) {
      const d = 1 / (dr * dr + di * di);
      qr = dr * d;
      qi = -di * d;
    } else if (s > 0 && s < Infinity) {
      qr = smithReal(dr, di);
      qi = smithImag(dr, di);
    } else {
      return j;
    }
    const j2 = j << 1;
    pivotInv[j2] = qr;
    pivotInv[j2 | 1] = qi;
    // (a flag, not a running maximum: a number carried round the loop was boxed on every column)
    let bad = false;
    const e1 = c1 << 1;
    for (let q2 = (d2 + 2) | 0; q2 < e1; q2 = (q2 + 2) | 0) {
      const xr = lu[q2]!;
      const xi = lu[q2 | 1]!;
      const lr = xr * qr - xi * qi;
      const li = xr * qi + xi * qr;
      lu[q2] = lr;
      lu[q2 | 1] = li;
      if (!(Math.abs(lr) + Math.abs(li) <= limit)) bad = true;
    }
    if (bad) return j;
    c0 = c1;
  }
  f.pivotMin = lo;
  f.pivotMax = hi;
  return -1;
}

/**
 * {@link eliminateByList} of `f.lu` and `g.lu` in one loop (same sequence, same update list).
 * Returns −1, or the step where either pivot failed (then both are left part-way). Written out
 * beside the single loop on purpose: the single one serves the points taken alone, and what
 * makes this one fast is both matrices' values in registers at once.
 */
function eliminateTwoByList(f: SparseFactor, g: SparseFactor): number {
  const n = f.n | 0;
  const lu = f.lu;
  const lv = g.lu;
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const upd = f.updTarget;
  const pivotInv = f.pivotInv;
  const pivotInvB = g.pivotInv;
  const limit = 1 / f.refactorTolerance;
  let t = 0;
  let c0 = colPtr[0]! | 0;
  // the pivot spreads as it goes (as pivotSpread would find them afterwards)
  let loA = Infinity;
  let hiA = 0;
  let loB = Infinity;
  let hiB = 0;
  for (let j = 0; j < n; j = (j + 1) | 0) {
    const dp = diagPos[j]! | 0;
    for (let p = c0; p < dp; p = (p + 1) | 0) {
      const k = rowIdx[p]! | 0;
      const p2 = p << 1;
      const ur = lu[p2]!;
      const ui = lu[p2 | 1]!;
      const vr = lv[p2]!;
      const vi = lv[p2 | 1]!;
      const q1 = colPtr[(k + 1) | 0]! << 1;
      for (let q2 = (diagPos[k]! + 1) << 1; q2 < q1; q2 = (q2 + 2) | 0) {
        const e = upd[t]! | 0;
        t = (t + 1) | 0;
        const lr = lu[q2]!;
        const li = lu[q2 | 1]!;
        const mr = lv[q2]!;
        const mi = lv[q2 | 1]!;
        lu[e] -= lr * ur - li * ui;
        lu[e | 1] -= lr * ui + li * ur;
        lv[e] -= mr * vr - mi * vi;
        lv[e | 1] -= mr * vi + mi * vr;
      }
    }
    const c1 = colPtr[(j + 1) | 0]! | 0;
    const d2 = dp << 1;
    const dr = lu[d2]!;
    const di = lu[d2 | 1]!;
    const er = lv[d2]!;
    const ei = lv[d2 | 1]!;
    const s = Math.abs(dr) + Math.abs(di);
    const sb = Math.abs(er) + Math.abs(ei);
    if (s < loA) loA = s;
    if (s > hiA) hiA = s;
    if (sb < loB) loB = sb;
    if (sb > hiB) hiB = sb;
    let qr: number;
    let qi: number;
    let pr: number;
    let pi: number;
    if (s > 1e-150 && s < 1e150) {
      const d = 1 / (dr * dr + di * di);
      qr = dr * d;
      qi = -di * d;
    } else if (s > 0 && s < Infinity) {
      qr = smithReal(dr, di);
      qi = smithImag(dr, di);
    } else {
      return j;
    }
    if (sb > 1e-150 && sb < 1e150) {
      const d = 1 / (er * er + ei * ei);
      pr = er * d;
      pi = -ei * d;
    } else if (sb > 0 && sb < Infinity) {
      pr = smithReal(er, ei);
      pi = smithImag(er, ei);
    } else {
      return j;
    }
    const j2 = j << 1;
    pivotInv[j2] = qr;
    pivotInv[j2 | 1] = qi;
    pivotInvB[j2] = pr;
    pivotInvB[j2 | 1] = pi;
    let bad = false;
    const e1 = c1 << 1;
    for (let q2 = (d2 + 2) | 0; q2 < e1; q2 = (q2 + 2) | 0) {
      const xr = lu[q2]!;
      const xi = lu[q2 | 1]!;
      const lr = xr * qr - xi * qi;
      const li = xr * qi + xi * qr;
      lu[q2] = lr;
      lu[q2 | 1] = li;
      const yr = lv[q2]!;
      const yi = lv[q2 | 1]!;
      const mr = yr * pr - yi * pi;
      const mi = yr * pi + yi * pr;
      lv[q2] = mr;
      lv[q2 | 1] = mi;
      if (!(Math.abs(lr) + Math.abs(li) <= limit) || !(Math.abs(mr) + Math.abs(mi) <= limit)) bad = true;
    }
    if (bad) return j;
    c0 = c1;
  }
  f.pivotMin = loA;
  f.pivotMax = hiA;
  g.pivotMin = loB;
  g.pivotMax = hiB;
  return -1;
}

/**
 * Real part of 1/(dr + j·di) by Smith's method (R. L. Smith, "Algorithm 116: Complex division",
 * Comm. ACM 5(8), 1962 — reference from memory), safe from overflow and underflow far out.
 */
function smithReal(dr: number, di: number): number {
  if (Math.abs(dr) >= Math.abs(di)) {
    const r = di / dr;
    return 1 / (dr + di * r);
  }
  const r = dr / di;
  return r / (di + dr * r);
}

/** Imaginary part of 1/(dr + j·di) by Smith's method. */
function smithImag(dr: number, di: number): number {
  if (Math.abs(dr) >= Math.abs(di)) {
    const r = di / dr;
    return -r / (dr + di * r);
  }
  const r = dr / di;
  return -1 / (di + dr * r);
}

/**
 * Elimination with a dense work vector (left-looking: scatter column j, update, gather); used when
 * the update list would be too long. Same results and checks as {@link eliminateByList}.
 */
function eliminateByColumn(f: SparseFactor): number {
  const n = f.n;
  const lu = f.lu;
  const x = f.x;
  const colPtr = f.colPtr;
  const diagPos = f.diagPos;
  const rowIdx = f.rowIdx;
  const pivotInv = f.pivotInv;
  const limit = 1 / f.refactorTolerance;
  for (let j = 0; j < n; j++) {
    const c0 = colPtr[j]!;
    const c1 = colPtr[j + 1]!;
    const dp = diagPos[j]!;
    for (let q = c0; q < c1; q++) {
      const r2 = 2 * rowIdx[q]!;
      x[r2] = lu[2 * q]!;
      x[r2 + 1] = lu[2 * q + 1]!;
    }
    for (let p = c0; p < dp; p++) {
      const k2 = 2 * rowIdx[p]!;
      const ur = x[k2]!;
      const ui = x[k2 + 1]!;
      x[k2] = 0;
      x[k2 + 1] = 0;
      lu[2 * p] = ur;
      lu[2 * p + 1] = ui;
      const k = k2 >> 1;
      const q1 = colPtr[k + 1]!;
      for (let q = diagPos[k]! + 1; q < q1; q++) {
        const i2 = 2 * rowIdx[q]!;
        const lr = lu[2 * q]!;
        const li = lu[2 * q + 1]!;
        x[i2] -= lr * ur - li * ui;
        x[i2 + 1] -= lr * ui + li * ur;
      }
    }
    for (let q = dp; q < c1; q++) {
      const r2 = 2 * rowIdx[q]!;
      lu[2 * q] = x[r2]!;
      lu[2 * q + 1] = x[r2 + 1]!;
      x[r2] = 0;
      x[r2 + 1] = 0;
    }
    if (scalePivot(lu, pivotInv, j, dp, c1, limit)) return j;
  }
  pivotSpread(f);
  return -1;
}

/**
 * Takes entry dp of `lu` as the pivot of step j: stores its reciprocal and scales the L entries
 * dp+1 .. c1−1 by it. Returns true when the pivot fails: zero, not finite, or some |l_ij| > limit
 * (i.e. |u_jj| < τ_r·|a_ij|), all in |Re| + |Im|.
 */
function scalePivot(lu: Float64Array, pivotInv: Float64Array, j: number, dp: number, c1: number, limit: number): boolean {
  const dr = lu[2 * dp]!;
  const di = lu[2 * dp + 1]!;
  const s = Math.abs(dr) + Math.abs(di);
  let qr: number;
  let qi: number;
  if (s > 1e-150 && s < 1e150) {
    const d = 1 / (dr * dr + di * di);
    qr = dr * d;
    qi = -di * d;
  } else if (s > 0 && s < Infinity) {
    qr = smithReal(dr, di);
    qi = smithImag(dr, di);
  } else {
    return true; // zero or not finite; the L entries are left unscaled
  }
  pivotInv[2 * j] = qr;
  pivotInv[2 * j + 1] = qi;
  let big = 0;
  for (let q = dp + 1; q < c1; q++) {
    const xr = lu[2 * q]!;
    const xi = lu[2 * q + 1]!;
    const lr = xr * qr - xi * qi;
    const li = xr * qi + xi * qr;
    lu[2 * q] = lr;
    lu[2 * q + 1] = li;
    big = Math.max(big, Math.abs(lr) + Math.abs(li));
  }
  return !(big <= limit);
}

/**
 * {@link refactor}, falling back to {@link factor} when the recorded pivots no longer fit.
 * Returns the final status (OK or SINGULAR).
 */
export function refactorOrFactor(f: SparseFactor, values: Float64Array): FactorStatus {
  const s = refactor(f, values);
  if (s === NEEDS_PIVOTING) return factor(f, values);
  return s;
}

/** Current off-diagonal counts of L and U (they change with the pivot sequence). */
export function factorNonzeros(f: SparseFactor): { l: number; u: number } {
  return { l: f.lRowPtr[f.n]!, u: f.entries - f.lRowPtr[f.n]! - f.n };
}
