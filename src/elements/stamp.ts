import type { StampBuilder } from './types.js';

/** The four slots of a two-terminal admittance between unknowns a and b (ground = -1). */
export function admittanceSlots(b: StampBuilder, a: number, c: number): Int32Array {
  return Int32Array.of(b.entry(a, a), b.entry(a, c), b.entry(c, a), b.entry(c, c));
}

/** Adds admittance y = yr + j·yi between the two terminals whose slots are `s`. */
export function addAdmittance(v: Float64Array, s: Int32Array, yr: number, yi: number): void {
  let k = s[0]!;
  if (k >= 0) {
    v[2 * k] += yr;
    v[2 * k + 1] += yi;
  }
  k = s[1]!;
  if (k >= 0) {
    v[2 * k] -= yr;
    v[2 * k + 1] -= yi;
  }
  k = s[2]!;
  if (k >= 0) {
    v[2 * k] -= yr;
    v[2 * k + 1] -= yi;
  }
  k = s[3]!;
  if (k >= 0) {
    v[2 * k] += yr;
    v[2 * k + 1] += yi;
  }
}

/**
 * Slots of a branch unknown `i` carrying current from a to b through impedance z:
 * KCL rows a (+i) and b (−i), and the branch row  v_a − v_b − z·i = 0.
 * Order: [a,i] [b,i] [i,a] [i,b] [i,i].
 */
export function branchSlots(b: StampBuilder, a: number, c: number, i: number): Int32Array {
  return Int32Array.of(b.entry(a, i), b.entry(c, i), b.entry(i, a), b.entry(i, c), b.entry(i, i));
}

/** Adds the branch equations for impedance zr + j·zi on slots from {@link branchSlots}. */
export function addBranchImpedance(v: Float64Array, s: Int32Array, zr: number, zi: number): void {
  let k = s[0]!;
  if (k >= 0) v[2 * k] += 1;
  k = s[1]!;
  if (k >= 0) v[2 * k] -= 1;
  k = s[2]!;
  if (k >= 0) v[2 * k] += 1;
  k = s[3]!;
  if (k >= 0) v[2 * k] -= 1;
  k = s[4]!;
  v[2 * k] -= zr;
  v[2 * k + 1] -= zi;
}
