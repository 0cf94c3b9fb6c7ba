/**
 * Analysis of a sparsity pattern, done once per circuit: a fill-reducing order of the unknowns,
 * the symbolic LU factors for that order (assuming every pivot is on the diagonal), and the map
 * from each stamp slot to its place in the column-ordered storage of A.
 *
 * Symbolic factorisation: column j of L and U, in the permuted matrix B = A(q, q), has the pattern
 * of the set reached from the pattern of B(:, j) in the directed graph of the columns of L found so
 * far (J. R. Gilbert and T. Peierls, "Sparse partial pivoting in time proportional to arithmetic
 * operations", SIAM J. Sci. Stat. Comput. 9(5), 1988). Rows above j form U(:, j), listed in a
 * topological order (reverse post-order of the depth-first search), rows below j form L(:, j).
 *
 * @module
 */

import { approximateMinimumDegree } from './amd.js';

/** How the unknowns are ordered for elimination. */
export type OrderingChoice = 'amd' | 'natural' | Int32Array;

export interface AnalyseOptions {
  /**
   * 'amd' (default): approximate minimum degree on the pattern of A + Aᵀ; 'natural': the unknowns
   * in their own order; or an explicit order (`order[k]` = unknown eliminated k-th).
   */
  ordering?: OrderingChoice;
  /**
   * Unknowns to eliminate last, in this order (with 'amd' or 'natural'; an explicit order is taken
   * as it is). The ports of a circuit, say: then the solves for their voltages touch only the last
   * few steps (see `solveRange`). The rest is ordered as if these unknowns were not there.
   */
  last?: ArrayLike<number>;
}

/**
 * Result of {@link analyse}: everything about the matrix that does not depend on its values.
 *
 * Steps: the unknowns are eliminated in the order `order`; "step j" is the j-th elimination, on
 * column `order[j]` of A. Unless pivoting swaps rows, step j also uses row `order[j]` as its pivot row.
 */
export interface SparsePattern {
  /** Number of unknowns (A is n×n). */
  readonly n: number;
  /** Number of slots (length of slotRow / slotCol). */
  readonly slotCount: number;
  /** `order[j]`: unknown (column of A) eliminated at step j. */
  readonly order: Int32Array;
  /** `stepOf[c]`: step at which unknown c is eliminated (inverse of `order`). */
  readonly stepOf: Int32Array;
  /**
   * The slots grouped by step: the slots of column `order[j]` are entries
   * `colStart[j] .. colStart[j+1]−1`. A slot repeated (same row and column) appears as two entries
   * whose values are added.
   */
  readonly colStart: Int32Array;
  /** Row of A (original numbering) of each entry. */
  readonly entryRow: Int32Array;
  /** Slot of each entry. */
  readonly entrySlot: Int32Array;
  /** `slotPos[s]`: entry holding slot s (inverse of `entrySlot`). */
  readonly slotPos: Int32Array;
  /**
   * Symbolic L for diagonal pivots, in steps: column j has rows `lRow[lStart[j] .. lStart[j+1]−1]`
   * (all > j; the unit diagonal is not stored).
   */
  readonly lStart: Int32Array;
  readonly lRow: Int32Array;
  /**
   * Symbolic U for diagonal pivots, in steps: column j has rows `uRow[uStart[j] .. uStart[j+1]−1]`
   * (all < j, in a topological order for the left-looking update; the diagonal is not stored).
   */
  readonly uStart: Int32Array;
  readonly uRow: Int32Array;
  /** Off-diagonal entries of L and of U (the n diagonal entries come on top). */
  readonly lNonzeros: number;
  readonly uNonzeros: number;
  /** Complex multiply-adds of one factorisation with these patterns (Σ_j Σ_{k∈U(:,j)} |L(:,k)|). */
  readonly updateCount: number;
  /** Which ordering was used. */
  readonly ordering: 'amd' | 'natural' | 'given';
}

/**
 * Analyses the n×n pattern given by the slots (slotRow[s], slotCol[s]), 0-based. Throws RangeError
 * for indices outside 0..n−1 or a bad explicit order (this is set-up code, not the hot path).
 */
export function analyse(n: number, slotRow: Int32Array, slotCol: Int32Array, options: AnalyseOptions = {}): SparsePattern {
  const nSlots = slotRow.length;
  if (slotCol.length !== nSlots) throw new RangeError('analyse: slotRow and slotCol differ in length');
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`analyse: bad size ${n}`);
  for (let s = 0; s < nSlots; s++) {
    const r = slotRow[s]!;
    const c = slotCol[s]!;
    if (!(r >= 0 && r < n && c >= 0 && c < n)) {
      throw new RangeError(`analyse: slot ${s} at (${r}, ${c}) is outside a ${n}×${n} matrix`);
    }
  }

  // --- order ----------------------------------------------------------------------------------
  const choice = options.ordering ?? 'amd';
  let order: Int32Array;
  let ordering: SparsePattern['ordering'];
  // the unknowns held back to the end (duplicates and out-of-range entries ignored)
  const held = new Int32Array(n).fill(-1);
  const tail: number[] = [];
  for (const u of Array.from(options.last ?? [])) {
    if (u >= 0 && u < n && held[u] === -1) {
      held[u] = tail.length;
      tail.push(u);
    }
  }
  if (choice === 'natural') {
    order = new Int32Array(n);
    let k = 0;
    for (let i = 0; i < n; i++) if (held[i] === -1) order[k++] = i;
    for (const u of tail) order[k++] = u;
    ordering = 'natural';
  } else if (choice === 'amd') {
    if (tail.length === 0) {
      const { start, adj } = symmetricGraph(n, slotRow, slotCol);
      order = approximateMinimumDegree(n, start, adj);
    } else {
      // order the others on their own graph (renumbered), then append the held unknowns
      const sub = new Int32Array(n).fill(-1);
      const back: number[] = [];
      for (let i = 0; i < n; i++) if (held[i] === -1) sub[i] = back.push(i) - 1;
      const rows: number[] = [];
      const cols: number[] = [];
      for (let s = 0; s < nSlots; s++) {
        const r = sub[slotRow[s]!]!;
        const c = sub[slotCol[s]!]!;
        if (r >= 0 && c >= 0) {
          rows.push(r);
          cols.push(c);
        }
      }
      const { start, adj } = symmetricGraph(back.length, Int32Array.from(rows), Int32Array.from(cols));
      const inner = approximateMinimumDegree(back.length, start, adj);
      order = new Int32Array(n);
      for (let k = 0; k < inner.length; k++) order[k] = back[inner[k]!]!;
      for (let k = 0; k < tail.length; k++) order[inner.length + k] = tail[k]!;
    }
    ordering = 'amd';
  } else {
    order = Int32Array.from(choice);
    ordering = 'given';
  }
  const stepOf = new Int32Array(n).fill(-1);
  if (order.length !== n) throw new RangeError('analyse: the order must list every unknown once');
  for (let k = 0; k < n; k++) {
    const c = order[k]!;
    if (!(c >= 0 && c < n) || stepOf[c] !== -1) throw new RangeError('analyse: the order must list every unknown once');
    stepOf[c] = k;
  }

  // --- slots by step ---------------------------------------------------------------------------
  const colStart = new Int32Array(n + 1);
  for (let s = 0; s < nSlots; s++) colStart[stepOf[slotCol[s]!]! + 1]++;
  for (let j = 0; j < n; j++) colStart[j + 1] += colStart[j]!;
  const fill = colStart.slice(0, n);
  const entryRow = new Int32Array(nSlots);
  const entrySlot = new Int32Array(nSlots);
  const slotPos = new Int32Array(nSlots);
  for (let s = 0; s < nSlots; s++) {
    const p = fill[stepOf[slotCol[s]!]!]!++;
    entryRow[p] = slotRow[s]!;
    entrySlot[p] = s;
    slotPos[s] = p;
  }

  // --- symbolic factorisation, diagonal pivots ----------------------------------------------
  const sym = symbolicFactor(n, colStart, entryRow, stepOf);

  return {
    n,
    slotCount: nSlots,
    order,
    stepOf,
    colStart,
    entryRow,
    entrySlot,
    slotPos,
    lStart: sym.lStart,
    lRow: sym.lRow,
    uStart: sym.uStart,
    uRow: sym.uRow,
    lNonzeros: sym.lRow.length,
    uNonzeros: sym.uRow.length,
    updateCount: sym.updates,
    ordering,
  };
}

/** Adjacency lists of the graph of A + Aᵀ (off-diagonal entries only, duplicates removed). */
function symmetricGraph(n: number, slotRow: Int32Array, slotCol: Int32Array): { start: Int32Array; adj: Int32Array } {
  const nSlots = slotRow.length;
  const count = new Int32Array(n + 1);
  for (let s = 0; s < nSlots; s++) {
    const r = slotRow[s]!;
    const c = slotCol[s]!;
    if (r === c) continue;
    count[r + 1]++;
    count[c + 1]++;
  }
  for (let i = 0; i < n; i++) count[i + 1] += count[i]!;
  const raw = new Int32Array(count[n]!);
  const fill = count.slice(0, n);
  for (let s = 0; s < nSlots; s++) {
    const r = slotRow[s]!;
    const c = slotCol[s]!;
    if (r === c) continue;
    raw[fill[r]!++] = c;
    raw[fill[c]!++] = r;
  }
  // remove duplicates
  const seen = new Int32Array(n).fill(-1);
  const start = new Int32Array(n + 1);
  let w = 0;
  for (let i = 0; i < n; i++) {
    start[i] = w;
    for (let t = count[i]!; t < count[i + 1]!; t++) {
      const j = raw[t]!;
      if (seen[j] === i) continue;
      seen[j] = i;
      raw[w++] = j;
    }
  }
  start[n] = w;
  return { start, adj: raw.slice(0, w) };
}

/**
 * Structural LU of B = A(q, q) with diagonal pivots, column by column (Gilbert & Peierls, 1988): the
 * pattern of column j is the set reached from the rows of B(:, j) through the columns of L already
 * known; the diagonal is always included.
 */
function symbolicFactor(
  n: number,
  colStart: Int32Array,
  entryRow: Int32Array,
  stepOf: Int32Array,
): { lStart: Int32Array; lRow: Int32Array; uStart: Int32Array; uRow: Int32Array; updates: number } {
  const lStart = new Int32Array(n + 1);
  const uStart = new Int32Array(n + 1);
  let lRow: Int32Array = new Int32Array(Math.max(16, 2 * entryRow.length));
  let uRow: Int32Array = new Int32Array(Math.max(16, 2 * entryRow.length));
  let lnz = 0;
  let unz = 0;
  let updates = 0;
  const mark = new Int32Array(n).fill(-1);
  const stack = new Int32Array(n);
  const childPos = new Int32Array(n);
  const topo = new Int32Array(n);
  const lower = new Int32Array(n);
  for (let j = 0; j < n; j++) {
    let top = n;
    let nLower = 0;
    for (let p = colStart[j]!; p < colStart[j + 1]!; p++) {
      const i0 = stepOf[entryRow[p]!]!;
      if (mark[i0] === j) continue;
      mark[i0] = j;
      if (i0 >= j) {
        lower[nLower++] = i0;
        continue;
      }
      // depth-first search from step i0 through the columns of L
      let sp = 0;
      stack[0] = i0;
      childPos[i0] = lStart[i0]!;
      while (sp >= 0) {
        const k = stack[sp]!;
        let t = childPos[k]!;
        const end = lStart[k + 1]!;
        let down = -1;
        while (t < end) {
          const c = lRow[t++]!;
          if (mark[c] === j) continue;
          mark[c] = j;
          if (c >= j) {
            lower[nLower++] = c;
            continue;
          }
          down = c;
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
    if (mark[j] !== j) {
      mark[j] = j;
      lower[nLower++] = j;
    }
    // store
    const nu = n - top;
    if (unz + nu > uRow.length) uRow = grow(uRow, unz + nu);
    for (let t = top; t < n; t++) {
      const k = topo[t]!;
      uRow[unz++] = k;
      updates += lStart[k + 1]! - lStart[k]!;
    }
    uStart[j + 1] = unz;
    if (lnz + nLower > lRow.length) lRow = grow(lRow, lnz + nLower);
    // rows below the diagonal, ascending (for memory locality in the numeric phase)
    const first = lnz;
    for (let t = 0; t < nLower; t++) {
      const r = lower[t]!;
      if (r !== j) lRow[lnz++] = r;
    }
    if (lnz - first > 1) lRow.subarray(first, lnz).sort();
    lStart[j + 1] = lnz;
  }
  return { lStart, lRow: lRow.slice(0, lnz), uStart, uRow: uRow.slice(0, unz), updates };
}

function grow(a: Int32Array, need: number): Int32Array {
  const b = new Int32Array(Math.max(need, 2 * a.length));
  b.set(a);
  return b;
}
