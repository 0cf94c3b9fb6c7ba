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
  /**
   * Noise parameters of a two-port data file, as read (not used by any computation yet; the
   * writers do not write them).
   */
  noise?: NoiseParameters;
}

/** Two-port noise parameters over frequency, as a Touchstone file gives them. */
export interface NoiseParameters {
  /** Frequencies in Hz, ascending. */
  frequencies: Float64Array;
  /** Minimum noise figure, dB. */
  nfMinDb: Float64Array;
  /** Magnitude of the optimum source reflection coefficient. */
  gammaOptMagnitude: Float64Array;
  /** Angle of the optimum source reflection coefficient, degrees. */
  gammaOptAngleDeg: Float64Array;
  /** Effective noise resistance as written in the file (normalised to the reference). */
  rnNormalised: Float64Array;
}

/** Index of the real part of entry (i, j) at frequency k. */
export function entryIndex(n: number, k: number, i: number, j: number): number {
  return 2 * ((k * n + i) * n + j);
}
