/**
 * Sparse direct complex LU for nodal matrices: analyse the pattern once, factor with pivoting when
 * needed, refactor per frequency with the recorded pivots, solve many right-hand sides at once.
 *
 *     const pattern = analyse(plan.size, plan.slotRow, plan.slotCol);   // once per circuit
 *     const f = createFactor(pattern);                                  // all storage, once
 *     // per frequency, after the stampers have filled `vals` (2 numbers per slot):
 *     const status = refactorOrFactor(f, vals);                         // or refactor / factor
 *     if (status !== OK) … f.failColumn is the unknown to blame …
 *     solve(f, rhs, x, ports);                                          // luSolve layout
 *     if (reciprocalCondition(f) < limit) … nearly singular …
 *
 * Costs, measured with .notes/sparse-timing.ts: refactor + solve is linear in the size for ladder-
 * like circuits; reciprocalCondition costs 3 to 11 solves with one right-hand side (on a long ladder
 * about 2.5× a refactor + solve), so call it only where a warning is wanted.
 *
 * @module
 */
export { analyse, type AnalyseOptions, type OrderingChoice, type SparsePattern } from './pattern.js';
export {
  createFactor,
  factor,
  refactor,
  refactorOrFactor,
  refactorPlaced,
  refactorTwo,
  refactorPlacedTwo,
  twinFactor,
  factorNonzeros,
  OK,
  NEEDS_PIVOTING,
  SINGULAR,
  type FactorStatus,
  type FactorOptions,
  type SparseFactor,
} from './factor.js';
export { solve, solveConjTransposed, solveRange, type SolveRange } from './solve.js';
export { reciprocalCondition, inverseNorm1Estimate, matrixNorm1 } from './condition.js';
export { approximateMinimumDegree } from './amd.js';
