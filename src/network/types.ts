/** Which network parameters a {@link NetworkData} holds. */
export type ParameterKind = 'S' | 'Z' | 'Y';

/**
 * Network data over frequency: an N-port's S, Z or Y matrices at each frequency point.
 *
 * Storage is flat and complex-interleaved so that the sweep can fill it without allocating:
 * entry (i, j) at frequency index k has its real part at `values[2 * ((k * n + i) * n + j)]`
 * and its imaginary part right after it (row i, column j, both 0-based, n = ports).
 */
export interface NetworkData {
  parameter: ParameterKind;
  ports: number;
  /** Frequencies in Hz, ascending. */
  frequencies: Float64Array;
  /** Per-port reference impedances in ohms (length = ports): the resistance, > 0. */
  references: Float64Array;
  /**
   * Reactances of complex reference impedances (power waves, Kurokawa 1965), when any port has
   * one; absent for real references. Writers and the S/Z/Y conversions take real references only
   * and refuse data that has these.
   */
  referenceReactances?: Float64Array;
  /** Complex values, see the interface comment for the layout. Z in ohms, Y in siemens, S unitless. */
  values: Float64Array;
  /** Optional title (from the netlist or the file read). */
  title?: string;
  /** Optional free-text comment lines carried to writers. */
  comments?: string[];
}

/** Index of the real part of entry (i, j) at frequency k. */
export function entryIndex(n: number, k: number, i: number, j: number): number {
  return 2 * ((k * n + i) * n + j);
}
