/**
 * Two-port network algebra: chain (ABCD), transfer (T) and hybrid (H) matrices, conversions between them
 * and S with per-port real references, and the cascade of two-port sections.
 *
 * Conventions (port currents I1, I2 flow into the network; voltages are measured from the port's
 * positive terminal to its return; a_i, b_i are the power waves of convert.ts for the real reference
 * z_i > 0 of port i: a_i = (V_i + z_i·I_i)/(2√z_i), b_i = (V_i − z_i·I_i)/(2√z_i), b = S·a):
 *
 * - Chain matrix, 'ABCD':   [V1; I1] = [A B; C D]·[V2; −I2].
 *   The second column multiplies −I2, the current leaving port 2 (the usual chain convention), so the
 *   chain matrix of two sections in cascade is the product of theirs. A and D are unitless, B is in ohms,
 *   C in siemens. It does not depend on the reference impedances.
 * - Transfer (scattering-transfer) matrix, 'T':   [b1; a1] = T·[a2; b2].
 *   Because the wave leaving port 2 of one section is the wave entering port 1 of the next, T of a
 *   cascade is also the product of the sections' T, but only when the references at each junction are
 *   equal. T is unitless and is defined for the references of the S it came from.
 * - Hybrid matrix, 'H':   [V1; I2] = [H11 H12; H21 H22]·[I1; V2].
 *   H11 in ohms, H12 and H21 unitless, H22 in siemens. It does not depend on the references.
 *
 * Formulas, with ΔS = S11·S22 − S12·S21 and r = √(z1·z2):
 *
 *   A = √(z1/z2)·((1 + S11)(1 − S22) + S12·S21)/(2·S21)
 *   B = r·((1 + S11)(1 + S22) − S12·S21)/(2·S21)
 *   C = ((1 − S11)(1 − S22) − S12·S21)/(2·S21·r)
 *   D = √(z2/z1)·((1 − S11)(1 + S22) + S12·S21)/(2·S21)
 *
 *   with N = A·z2 + B + C·z1·z2 + D·z1:
 *   S11 = (A·z2 + B − C·z1·z2 − D·z1)/N,   S12 = 2r·(AD − BC)/N,
 *   S21 = 2r/N,                            S22 = (−A·z2 + B − C·z1·z2 + D·z1)/N
 *
 *   T11 = −ΔS/S21,  T12 = S11/S21,  T21 = −S22/S21,  T22 = 1/S21
 *   S11 = T12/T22,  S12 = (T11·T22 − T12·T21)/T22,  S21 = 1/T22,  S22 = −T21/T22
 *
 * (The chain formulas follow from V_i = √z_i(a_i + b_i), I_i = (a_i − b_i)/√z_i: with
 * P(z) = [√z, √z; −1/√z, 1/√z] one has [V1; I1] = P(z1)·[b1; a1] and [V2; −I2] = P(z2)·[a2; b2], so
 * ABCD = P(z1)·T·P(z2)⁻¹.) For H, with normalised voltages v_i = V_i/√z_i and currents i_i = √z_i·I_i,
 * the normalised hybrid matrix h̄ (h̄11 = H11/z1, h̄12 = H12·√(z2/z1), h̄21 = H21·√(z2/z1), h̄22 = H22·z2)
 * relates [v1; i2] to [i1; v2] exactly as a normalised impedance matrix relates voltages to currents for
 * the waves a' = [a1; a2], b' = [b1; −b2]. Hence, with E = diag(1, −1),
 *   h̄ = (U − E·S)⁻¹(U + E·S),   S = E·(h̄ + U)⁻¹(h̄ − U),
 * which are the S → Z and Z → S conversions of convert.ts applied to E·S with unit references; those
 * are reused here, including their singularity test.
 *
 * Existence: ABCD and T need S21 ≠ 0 (a section through which nothing passes from port 1 to port 2,
 * e.g. a shunt short circuit or an ideal isolator, has neither); S from ABCD needs N ≠ 0 and S from T
 * needs T22 ≠ 0 (both only fail for active networks); H needs U − E·S invertible (fails e.g. when port 1
 * is an isolated open circuit). A conversion that does not exist throws {@link TwoPortConversionError}.
 * "Zero" means zero to working precision: the divisor's modulus relative to the data it was built from
 * (|S21|/max(1, max|S_ij|), |N|/(|A|z2 + |B| + |C|z1z2 + |D|z1), |T22|/max|T_ij|) is at most the
 * singular tolerance (default {@link DEFAULT_SINGULAR_TOLERANCE}, shared with convert.ts).
 *
 * The per-matrix functions read one 2×2 complex matrix (row-major, interleaved: entry (i, j) at
 * 2·(2i + j), as one frequency slice of {@link NetworkData}) and write into `out`, which may be the
 * input array. They allocate nothing unless they throw.
 *
 * @module
 */

import { createMatrix, multiply } from './complex.js';
import {
  ConversionError,
  DEFAULT_SINGULAR_TOLERANCE,
  convertNetwork,
  createConvertWorkspace,
  sToZMatrix,
  zToSMatrix,
  type ConvertWorkspace,
} from './convert.js';
import { formatFrequency } from '../format/frequency.js';
import type { NetworkData, ParameterKind } from './types.js';

// --- data shapes ---------------------------------------------------------------------------------

/** Which two-port matrix a {@link TwoPortData} holds (see the module comment for the conventions). */
export type TwoPortRepresentation = 'ABCD' | 'T' | 'H';

/** Every kind of two-port matrix this module converts between, for error messages. */
export type TwoPortKind = ParameterKind | TwoPortRepresentation;

interface TwoPortBase {
  /** Frequencies in Hz, ascending. */
  frequencies: Float64Array;
  /**
   * 2×2 complex matrices, one per frequency, in the layout of {@link NetworkData} with n = 2: entry
   * (i, j) at frequency index k has its real part at `values[2 * ((k * 2 + i) * 2 + j)]` and its
   * imaginary part right after it. For ABCD, (0,0) = A, (0,1) = B, (1,0) = C, (1,1) = D.
   * Length 8 · frequencies.length.
   */
  values: Float64Array;
  /** Optional title, carried over from the network data. */
  title?: string;
  /** Optional free-text comment lines, carried over from the network data. */
  comments?: string[];
}

/** Chain matrices [V1; I1] = [A B; C D]·[V2; −I2] over frequency (A, D unitless, B ohms, C siemens). */
export interface ChainData extends TwoPortBase {
  representation: 'ABCD';
  /**
   * The references (ohms, length 2) of the S data these matrices were made from. The matrices do not
   * depend on them; {@link fromChain} uses them as the default references of the S it returns.
   */
  references?: Float64Array;
}

/** Hybrid matrices [V1; I2] = H·[I1; V2] over frequency (H11 ohms, H12 and H21 unitless, H22 siemens). */
export interface HybridData extends TwoPortBase {
  representation: 'H';
  /** As for {@link ChainData}: the default references for {@link fromHybrid}. */
  references?: Float64Array;
}

/** Transfer matrices [b1; a1] = T·[a2; b2] over frequency (unitless). */
export interface TransferData extends TwoPortBase {
  representation: 'T';
  /** The real references (ohms, length 2) of the waves a_i, b_i. Required: T means nothing without them. */
  references: Float64Array;
}

/** Two-port matrices over frequency in one of the representations ABCD, T or H. */
export type TwoPortData = ChainData | TransferData | HybridData;

// --- errors --------------------------------------------------------------------------------------

/** Details of a {@link TwoPortConversionError}. */
export interface TwoPortConversionErrorDetails {
  from: TwoPortKind;
  to: TwoPortKind;
  /** Human-readable explanation of why the target matrix does not exist. */
  reason: string;
  /** Modulus of the vanishing divisor relative to the data (0 for an exact zero or non-finite input). */
  rcond: number;
  /** Index of the frequency point, when known (set by the whole-network functions). */
  frequencyIndex?: number;
  /** Frequency in Hz, when known. */
  frequency?: number;
  /** 0-based index of the section among the arguments of {@link cascade}, when known. */
  section?: number;
}

/**
 * Thrown when a two-port conversion does not exist, e.g. the chain matrix of a shunt short circuit.
 * (convert.ts's ConversionError only names S, Z and Y, so this module has its own error; when the
 * failure comes from a convert.ts routine, that ConversionError is the `cause`.)
 */
export class TwoPortConversionError extends Error {
  readonly from: TwoPortKind;
  readonly to: TwoPortKind;
  readonly reason: string;
  readonly rcond: number;
  readonly frequencyIndex: number | undefined;
  readonly frequency: number | undefined;
  readonly section: number | undefined;

  constructor(details: TwoPortConversionErrorDetails, options?: { cause?: unknown }) {
    const where =
      (details.section === undefined ? '' : ` in section ${details.section + 1} of the cascade`) +
      (details.frequency === undefined ? '' : ` at ${formatFrequency(details.frequency)}`) +
      (details.frequencyIndex === undefined ? '' : ` (frequency point ${details.frequencyIndex})`);
    const plural = details.to === 'S' || details.to === 'Z' || details.to === 'Y';
    super(
      `${KIND_NAMES[details.to]} ${plural ? 'do' : 'does'} not exist${where}, converting from ${details.from}: ${details.reason}` +
        (details.rcond > 0 ? ` [relative size of the divisor ${details.rcond.toExponential(2)}]` : ''),
      options,
    );
    this.name = 'TwoPortConversionError';
    this.from = details.from;
    this.to = details.to;
    this.reason = details.reason;
    this.rcond = details.rcond;
    this.frequencyIndex = details.frequencyIndex;
    this.frequency = details.frequency;
    this.section = details.section;
  }

  /** A copy of this error that also names where it happened. */
  at(where: { frequencyIndex?: number; frequency?: number; section?: number }): TwoPortConversionError {
    const details: TwoPortConversionErrorDetails = {
      from: this.from,
      to: this.to,
      reason: this.reason,
      rcond: this.rcond,
    };
    const frequencyIndex = where.frequencyIndex ?? this.frequencyIndex;
    const frequency = where.frequency ?? this.frequency;
    const section = where.section ?? this.section;
    if (frequencyIndex !== undefined) details.frequencyIndex = frequencyIndex;
    if (frequency !== undefined) details.frequency = frequency;
    if (section !== undefined) details.section = section;
    return new TwoPortConversionError(details, { cause: this });
  }
}

/** One mismatching frequency point listed by {@link FrequencyGridError}. */
export interface GridMismatch {
  /** 0-based frequency index. */
  index: number;
  /** Frequency of the first section at that index (Hz). */
  expected: number;
  /** Frequency of the offending section at that index (Hz). */
  actual: number;
}

/** Thrown by {@link cascade} when the sections are not on the same frequency grid. */
export class FrequencyGridError extends RangeError {
  /** 0-based index of the first section whose grid differs from section 0's. */
  readonly section: number;
  readonly expectedPoints: number;
  readonly actualPoints: number;
  /** Number of differing points among the common indices. */
  readonly mismatchCount: number;
  /** The first differing points (at most {@link FrequencyGridError.LISTED}). */
  readonly mismatches: readonly GridMismatch[];

  static readonly LISTED = 5;

  constructor(section: number, expectedPoints: number, actualPoints: number, mismatchCount: number, mismatches: GridMismatch[]) {
    const parts: string[] = [];
    if (expectedPoints !== actualPoints) {
      parts.push(`it has ${actualPoints} frequency points, section 1 has ${expectedPoints}`);
    }
    if (mismatchCount > 0) {
      const listed = mismatches.map((m) => `point ${m.index} is ${m.actual} Hz, section 1 has ${m.expected} Hz`);
      const more = mismatchCount > mismatches.length ? ` (${mismatchCount} differing points in all)` : '';
      parts.push(listed.join('; ') + more);
    }
    super(`section ${section + 1} of the cascade is not on the frequency grid of section 1: ${parts.join('; ')}`);
    this.name = 'FrequencyGridError';
    this.section = section;
    this.expectedPoints = expectedPoints;
    this.actualPoints = actualPoints;
    this.mismatchCount = mismatchCount;
    this.mismatches = mismatches;
  }
}

/** Plain names of the matrices, for messages. */
const KIND_NAMES: Readonly<Record<TwoPortKind, string>> = {
  ABCD: 'the chain matrix (ABCD)',
  T: 'the transfer matrix (T)',
  H: 'the hybrid matrix (H)',
  S: 'S-parameters',
  Z: 'Z-parameters',
  Y: 'Y-parameters',
};

/** Entry names of each two-port matrix in storage order (11, 12, 21, 22), for messages. */
const ENTRY_NAMES: Readonly<Record<TwoPortKind, readonly string[]>> = {
  ABCD: ['A', 'B', 'C', 'D'],
  T: ['T11', 'T12', 'T21', 'T22'],
  H: ['H11', 'H12', 'H21', 'H22'],
  S: ['S11', 'S12', 'S21', 'S22'],
  Z: ['Z11', 'Z12', 'Z21', 'Z22'],
  Y: ['Y11', 'Y12', 'Y21', 'Y22'],
};

/** Why a result with a non-finite entry does not exist: that entry overflows the range of doubles. */
function overflowReason(to: TwoPortKind, m: Float64Array): string {
  let e = 0;
  while (e < 3 && Number.isFinite(m[2 * e]!) && Number.isFinite(m[2 * e + 1]!)) e++;
  return `computing ${ENTRY_NAMES[to][e]} overflows the range of double-precision numbers (about 1.8e308); the data are too large for this representation`;
}

const REASONS = {
  S21:
    'S21 is zero, so nothing passes from port 1 to port 2 and the port-2 quantities cannot determine the ' +
    'port-1 quantities (e.g. a shunt short circuit, an open series gap or an ideal isolator)',
  N:
    'A·z2 + B + C·z1·z2 + D·z1 is zero: terminated in its references the network would sustain a response ' +
    'with no incident wave (possible only for an active network)',
  T22: 'T22 is zero, so S21 = 1/T22 would be unbounded (possible only for an active network)',
  SH:
    'U − diag(1, −1)·S is singular: the input impedance with port 2 short-circuited or the output ' +
    'admittance with port 1 open-circuited is unbounded (e.g. port 1 an open circuit isolated from port 2)',
  HS:
    'h̄ + U is singular (normalised hybrid matrix h̄): some excitation makes the network present minus the ' +
    'references, so the incident waves do not determine the port quantities (possible only for an active network)',
  NONFINITE: 'the input matrix contains a non-finite value',
} as const;

// --- workspace -----------------------------------------------------------------------------------

/** Options for {@link createTwoPortWorkspace} and the whole-network functions. */
export interface TwoPortOptions {
  /** Relative divisor size at or below which a conversion counts as singular (default 1e-12). */
  singularTolerance?: number;
}

/** Buffers for the per-matrix conversions, allocated once by {@link createTwoPortWorkspace}. */
export interface TwoPortWorkspace {
  readonly singularTolerance: number;
  /** Two-port workspace of convert.ts, used for the hybrid conversions. */
  readonly convert: ConvertWorkspace;
  /** 2×2 scratch matrices (m1 for the hybrid conversions, m2 for the whole-network loops). */
  readonly m1: Float64Array;
  readonly m2: Float64Array;
}

/** Allocates the buffers for the per-matrix two-port conversions. */
export function createTwoPortWorkspace(options: TwoPortOptions = {}): TwoPortWorkspace {
  const tol = options.singularTolerance ?? DEFAULT_SINGULAR_TOLERANCE;
  if (!(tol >= 0) || !Number.isFinite(tol)) throw new RangeError(`singularTolerance must be ≥ 0, got ${tol}`);
  return {
    singularTolerance: tol,
    convert: createConvertWorkspace(2, { singularTolerance: tol }),
    m1: createMatrix(2),
    m2: createMatrix(2),
  };
}

/** Unit references for the normalised hybrid conversions. */
const UNIT_REFERENCES = new Float64Array([1, 1]);

function checkTwoPortReferences(z0: Float64Array, name: string): void {
  if (z0.length < 2) throw new RangeError(`need 2 reference impedances, got ${z0.length}`);
  for (let i = 0; i < 2; i++) {
    const z = z0[i]!;
    if (!(z > 0) || !Number.isFinite(z)) {
      throw new RangeError(`reference impedance of port ${i + 1} must be finite and > 0, got ${z}`);
    }
  }
}

function allFinite(m: Float64Array): boolean {
  for (let k = 0; k < 8; k++) if (!Number.isFinite(m[k]!)) return false;
  return true;
}

function maxModulus(m: Float64Array): number {
  let best = 0;
  for (let k = 0; k < 8; k += 2) best = Math.max(best, Math.hypot(m[k]!, m[k + 1]!));
  return best;
}

// --- per-matrix conversions ----------------------------------------------------------------------

/**
 * ABCD from S with references z0 = [z1, z2] (formulas in the module comment). `out` may be `s`.
 * Throws {@link TwoPortConversionError} (to = 'ABCD') when S21 is zero to working precision.
 */
export function chainFromScattering(
  s: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: TwoPortWorkspace,
): Float64Array {
  checkTwoPortReferences(z0, 'chainFromScattering');
  if (!allFinite(s)) throw new TwoPortConversionError({ from: 'S', to: 'ABCD', reason: REASONS.NONFINITE, rcond: 0 });
  const s11r = s[0]!, s11i = s[1]!, s12r = s[2]!, s12i = s[3]!;
  const s21r = s[4]!, s21i = s[5]!, s22r = s[6]!, s22i = s[7]!;
  const rc = Math.hypot(s21r, s21i) / Math.max(1, maxModulus(s));
  if (!(rc > work.singularTolerance)) {
    throw new TwoPortConversionError({ from: 'S', to: 'ABCD', reason: REASONS.S21, rcond: rc });
  }
  // p = S12·S21
  const pr = s12r * s21r - s12i * s21i;
  const pi = s12r * s21i + s12i * s21r;
  // q = 1/(2·S21)
  const d2 = 2 * (s21r * s21r + s21i * s21i);
  const qr = s21r / d2;
  const qi = -s21i / d2;
  const z1 = z0[0]!;
  const z2 = z0[1]!;
  const r = Math.sqrt(z1) * Math.sqrt(z2); // not √(z1·z2), which overflows for z above 1.3e154
  const kA = Math.sqrt(z1 / z2);
  const kD = Math.sqrt(z2 / z1);
  // (1 ± S11), (1 ± S22)
  const p11r = 1 + s11r, m11r = 1 - s11r;
  const p22r = 1 + s22r, m22r = 1 - s22r;
  // nA = (1 + S11)(1 − S22) + p
  const nAr = p11r * m22r + s11i * s22i + pr;
  const nAi = s11i * m22r - p11r * s22i + pi;
  // nB = (1 + S11)(1 + S22) − p
  const nBr = p11r * p22r - s11i * s22i - pr;
  const nBi = s11i * p22r + p11r * s22i - pi;
  // nC = (1 − S11)(1 − S22) − p
  const nCr = m11r * m22r - s11i * s22i - pr;
  const nCi = -s11i * m22r - m11r * s22i - pi;
  // nD = (1 − S11)(1 + S22) + p
  const nDr = m11r * p22r + s11i * s22i + pr;
  const nDi = -s11i * p22r + m11r * s22i + pi;
  out[0] = kA * (nAr * qr - nAi * qi);
  out[1] = kA * (nAr * qi + nAi * qr);
  out[2] = r * (nBr * qr - nBi * qi);
  out[3] = r * (nBr * qi + nBi * qr);
  out[4] = (nCr * qr - nCi * qi) / r;
  out[5] = (nCr * qi + nCi * qr) / r;
  out[6] = kD * (nDr * qr - nDi * qi);
  out[7] = kD * (nDr * qi + nDi * qr);
  return out;
}

/**
 * S with references z0 = [z1, z2] from ABCD (formulas in the module comment). `out` may be `abcd`.
 * Throws {@link TwoPortConversionError} (to = 'S') when N = A·z2 + B + C·z1·z2 + D·z1 is zero to
 * working precision.
 */
export function scatteringFromChain(
  abcd: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: TwoPortWorkspace,
): Float64Array {
  checkTwoPortReferences(z0, 'scatteringFromChain');
  if (!allFinite(abcd)) {
    throw new TwoPortConversionError({ from: 'ABCD', to: 'S', reason: REASONS.NONFINITE, rcond: 0 });
  }
  const z1 = z0[0]!;
  const z2 = z0[1]!;
  const r = Math.sqrt(z1) * Math.sqrt(z2); // not √(z1·z2), which overflows for z above 1.3e154
  // terms of N: a = A·z2, b = B, c = C·z1·z2, d = D·z1
  const ar = abcd[0]! * z2, ai = abcd[1]! * z2;
  const br = abcd[2]!, bi = abcd[3]!;
  const cr = abcd[4]! * z1 * z2, ci = abcd[5]! * z1 * z2;
  const dr = abcd[6]! * z1, di = abcd[7]! * z1;
  const nr = ar + br + cr + dr;
  const ni = ai + bi + ci + di;
  const scale = Math.hypot(ar, ai) + Math.hypot(br, bi) + Math.hypot(cr, ci) + Math.hypot(dr, di);
  const rc = scale > 0 ? Math.hypot(nr, ni) / scale : 0;
  if (!(rc > work.singularTolerance)) {
    throw new TwoPortConversionError({ from: 'ABCD', to: 'S', reason: REASONS.N, rcond: rc });
  }
  // det = AD − BC (in the original units)
  const detr = abcd[0]! * abcd[6]! - abcd[1]! * abcd[7]! - (abcd[2]! * abcd[4]! - abcd[3]! * abcd[5]!);
  const deti = abcd[0]! * abcd[7]! + abcd[1]! * abcd[6]! - (abcd[2]! * abcd[5]! + abcd[3]! * abcd[4]!);
  // 1/N
  const nn = nr * nr + ni * ni;
  const qr = nr / nn;
  const qi = -ni / nn;
  const x11r = ar + br - cr - dr, x11i = ai + bi - ci - di;
  const x22r = -ar + br - cr + dr, x22i = -ai + bi - ci + di;
  const x12r = 2 * r * detr, x12i = 2 * r * deti;
  out[0] = x11r * qr - x11i * qi;
  out[1] = x11r * qi + x11i * qr;
  out[2] = x12r * qr - x12i * qi;
  out[3] = x12r * qi + x12i * qr;
  out[4] = 2 * r * qr;
  out[5] = 2 * r * qi;
  out[6] = x22r * qr - x22i * qi;
  out[7] = x22r * qi + x22i * qr;
  return out;
}

/**
 * T from S (for the references of S; the formulas do not involve them). `out` may be `s`.
 * Throws {@link TwoPortConversionError} (to = 'T') when S21 is zero to working precision.
 */
export function transferFromScattering(s: Float64Array, out: Float64Array, work: TwoPortWorkspace): Float64Array {
  if (!allFinite(s)) throw new TwoPortConversionError({ from: 'S', to: 'T', reason: REASONS.NONFINITE, rcond: 0 });
  const s11r = s[0]!, s11i = s[1]!, s12r = s[2]!, s12i = s[3]!;
  const s21r = s[4]!, s21i = s[5]!, s22r = s[6]!, s22i = s[7]!;
  const rc = Math.hypot(s21r, s21i) / Math.max(1, maxModulus(s));
  if (!(rc > work.singularTolerance)) {
    throw new TwoPortConversionError({ from: 'S', to: 'T', reason: REASONS.S21, rcond: rc });
  }
  const d = s21r * s21r + s21i * s21i;
  const qr = s21r / d; // 1/S21
  const qi = -s21i / d;
  // −ΔS = S12·S21 − S11·S22
  const mr = s12r * s21r - s12i * s21i - (s11r * s22r - s11i * s22i);
  const mi = s12r * s21i + s12i * s21r - (s11r * s22i + s11i * s22r);
  out[0] = mr * qr - mi * qi;
  out[1] = mr * qi + mi * qr;
  out[2] = s11r * qr - s11i * qi;
  out[3] = s11r * qi + s11i * qr;
  out[4] = -(s22r * qr - s22i * qi);
  out[5] = -(s22r * qi + s22i * qr);
  out[6] = qr;
  out[7] = qi;
  return out;
}

/**
 * S from T (for the references T is defined with). `out` may be `t`.
 * Throws {@link TwoPortConversionError} (to = 'S') when T22 is zero to working precision.
 */
export function scatteringFromTransfer(t: Float64Array, out: Float64Array, work: TwoPortWorkspace): Float64Array {
  if (!allFinite(t)) throw new TwoPortConversionError({ from: 'T', to: 'S', reason: REASONS.NONFINITE, rcond: 0 });
  const t11r = t[0]!, t11i = t[1]!, t12r = t[2]!, t12i = t[3]!;
  const t21r = t[4]!, t21i = t[5]!, t22r = t[6]!, t22i = t[7]!;
  const big = maxModulus(t);
  const rc = big > 0 ? Math.hypot(t22r, t22i) / big : 0;
  if (!(rc > work.singularTolerance)) {
    throw new TwoPortConversionError({ from: 'T', to: 'S', reason: REASONS.T22, rcond: rc });
  }
  const d = t22r * t22r + t22i * t22i;
  const qr = t22r / d; // 1/T22
  const qi = -t22i / d;
  // ΔT = T11·T22 − T12·T21
  const er = t11r * t22r - t11i * t22i - (t12r * t21r - t12i * t21i);
  const ei = t11r * t22i + t11i * t22r - (t12r * t21i + t12i * t21r);
  out[0] = t12r * qr - t12i * qi;
  out[1] = t12r * qi + t12i * qr;
  out[2] = er * qr - ei * qi;
  out[3] = er * qi + ei * qr;
  out[4] = qr;
  out[5] = qi;
  out[6] = -(t21r * qr - t21i * qi);
  out[7] = -(t21r * qi + t21i * qr);
  return out;
}

/**
 * H from S with references z0 = [z1, z2]: h̄ = (U − E·S)⁻¹(U + E·S) by convert.ts's S → Z conversion
 * with unit references, then H11 = z1·h̄11, H12 = √(z1/z2)·h̄12, H21 = √(z1/z2)·h̄21, H22 = h̄22/z2.
 * `out` may be `s`. Throws {@link TwoPortConversionError} (to = 'H') when U − E·S is singular.
 */
export function hybridFromScattering(
  s: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: TwoPortWorkspace,
): Float64Array {
  checkTwoPortReferences(z0, 'hybridFromScattering');
  if (!allFinite(s)) throw new TwoPortConversionError({ from: 'S', to: 'H', reason: REASONS.NONFINITE, rcond: 0 });
  const m = work.m1;
  // m = E·S: negate row 2
  m[0] = s[0]!;
  m[1] = s[1]!;
  m[2] = s[2]!;
  m[3] = s[3]!;
  m[4] = -s[4]!;
  m[5] = -s[5]!;
  m[6] = -s[6]!;
  m[7] = -s[7]!;
  try {
    sToZMatrix(2, m, UNIT_REFERENCES, m, work.convert);
  } catch (e) {
    if (e instanceof ConversionError) {
      throw new TwoPortConversionError({ from: 'S', to: 'H', reason: REASONS.SH, rcond: e.rcond }, { cause: e });
    }
    throw e;
  }
  const z1 = z0[0]!;
  const z2 = z0[1]!;
  const k = Math.sqrt(z1 / z2);
  out[0] = m[0]! * z1;
  out[1] = m[1]! * z1;
  out[2] = m[2]! * k;
  out[3] = m[3]! * k;
  out[4] = m[4]! * k;
  out[5] = m[5]! * k;
  out[6] = m[6]! / z2;
  out[7] = m[7]! / z2;
  return out;
}

/**
 * S with references z0 = [z1, z2] from H: h̄ as in {@link hybridFromScattering}, then
 * S = E·(h̄ + U)⁻¹(h̄ − U) by convert.ts's Z → S conversion with unit references. `out` may be `h`.
 * Throws {@link TwoPortConversionError} (to = 'S') when h̄ + U is singular.
 */
export function scatteringFromHybrid(
  h: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: TwoPortWorkspace,
): Float64Array {
  checkTwoPortReferences(z0, 'scatteringFromHybrid');
  if (!allFinite(h)) throw new TwoPortConversionError({ from: 'H', to: 'S', reason: REASONS.NONFINITE, rcond: 0 });
  const z1 = z0[0]!;
  const z2 = z0[1]!;
  const k = Math.sqrt(z2 / z1);
  const m = work.m1;
  m[0] = h[0]! / z1;
  m[1] = h[1]! / z1;
  m[2] = h[2]! * k;
  m[3] = h[3]! * k;
  m[4] = h[4]! * k;
  m[5] = h[5]! * k;
  m[6] = h[6]! * z2;
  m[7] = h[7]! * z2;
  try {
    zToSMatrix(2, m, UNIT_REFERENCES, m, work.convert);
  } catch (e) {
    if (e instanceof ConversionError) {
      throw new TwoPortConversionError({ from: 'H', to: 'S', reason: REASONS.HS, rcond: e.rcond }, { cause: e });
    }
    throw e;
  }
  out[0] = m[0]!;
  out[1] = m[1]!;
  out[2] = m[2]!;
  out[3] = m[3]!;
  out[4] = -m[4]!;
  out[5] = -m[5]!;
  out[6] = -m[6]!;
  out[7] = -m[7]!;
  return out;
}

// --- whole-network functions ---------------------------------------------------------------------

/** Checks a two-port NetworkData and returns it as S (converting Z or Y data with convertNetwork). */
function asTwoPortS(net: NetworkData, name: string, options: TwoPortOptions): NetworkData {
  if (net.ports !== 2) throw new RangeError(`${name} has ${net.ports} ports; the two-port matrices (ABCD, T, H) and cascades need two-ports`);
  const points = net.frequencies.length;
  if (net.values.length !== 8 * points) {
    throw new RangeError(`${name} holds ${net.values.length} numbers, expected 8·${points} = ${8 * points}`);
  }
  if (net.references.length !== 2) {
    throw new RangeError(`${name} has ${net.references.length} reference impedances, expected 2`);
  }
  checkTwoPortReferences(net.references, name);
  if (net.parameter === 'S') return net;
  const convertOptions = options.singularTolerance === undefined ? {} : { singularTolerance: options.singularTolerance };
  return convertNetwork(net, 'S', convertOptions);
}

function checkTwoPortData(data: TwoPortData, name: string): void {
  const points = data.frequencies.length;
  if (data.values.length !== 8 * points) {
    throw new RangeError(`the two-port data hold ${data.values.length} numbers, expected 8·${points} = ${8 * points}`);
  }
}

type PerMatrix = (input: Float64Array, z0: Float64Array, out: Float64Array, work: TwoPortWorkspace) => Float64Array;

const PER_MATRIX_FROM_S: Readonly<Record<TwoPortRepresentation, PerMatrix>> = {
  ABCD: chainFromScattering,
  T: (s, _z0, out, work) => transferFromScattering(s, out, work),
  H: hybridFromScattering,
};

const PER_MATRIX_TO_S: Readonly<Record<TwoPortRepresentation, PerMatrix>> = {
  ABCD: scatteringFromChain,
  T: (t, _z0, out, work) => scatteringFromTransfer(t, out, work),
  H: scatteringFromHybrid,
};

/** Applies a per-matrix conversion at every frequency point, naming the point in errors. */
function mapPoints(
  frequencies: Float64Array,
  values: Float64Array,
  z0: Float64Array,
  convert: PerMatrix,
  work: TwoPortWorkspace,
  from: TwoPortKind,
  to: TwoPortKind,
): Float64Array {
  const points = frequencies.length;
  const result = new Float64Array(8 * points);
  const buffer = work.m2;
  for (let k = 0; k < points; k++) {
    const offset = 8 * k;
    for (let t = 0; t < 8; t++) buffer[t] = values[offset + t]!;
    try {
      convert(buffer, z0, buffer, work);
    } catch (e) {
      if (e instanceof TwoPortConversionError) throw e.at({ frequencyIndex: k, frequency: frequencies[k]! });
      throw e;
    }
    if (!allFinite(buffer)) {
      throw new TwoPortConversionError({ from, to, reason: overflowReason(to, buffer), rcond: 0, frequencyIndex: k, frequency: frequencies[k]! });
    }
    for (let t = 0; t < 8; t++) result[offset + t] = buffer[t]!;
  }
  return result;
}

/**
 * Converts two-port network data (S, or Z/Y which are first converted to S with the same references)
 * to ABCD, T or H at every frequency point. The result carries copies of the frequencies and the
 * references. Throws {@link TwoPortConversionError} naming the first frequency point where the matrix
 * does not exist, RangeError for data that is not a well-formed two-port.
 */
export function toTwoPort(net: NetworkData, representation: 'ABCD', options?: TwoPortOptions): ChainData;
export function toTwoPort(net: NetworkData, representation: 'T', options?: TwoPortOptions): TransferData;
export function toTwoPort(net: NetworkData, representation: 'H', options?: TwoPortOptions): HybridData;
export function toTwoPort(net: NetworkData, representation: TwoPortRepresentation, options?: TwoPortOptions): TwoPortData;
export function toTwoPort(
  net: NetworkData,
  representation: TwoPortRepresentation,
  options: TwoPortOptions = {},
): TwoPortData {
  const convert = PER_MATRIX_FROM_S[representation];
  if (!convert) throw new RangeError(`unknown representation ${String(representation)}`);
  const s = asTwoPortS(net, 'the network data', options);
  const work = createTwoPortWorkspace(options);
  const values = mapPoints(s.frequencies, s.values, s.references, convert, work, 'S', representation);
  const result: TwoPortData = {
    representation,
    frequencies: s.frequencies.slice(),
    values,
    references: s.references.slice(),
  } as TwoPortData;
  if (net.title !== undefined) result.title = net.title;
  if (net.comments !== undefined) result.comments = net.comments.slice();
  return result;
}

/**
 * Converts ABCD, T or H data back to S. The references of the result are `references` if given, else
 * `data.references`; T data may only be converted with its own references (pass none, or equal ones;
 * to change them, renormalise the resulting S with renormalizeNetwork). Throws
 * {@link TwoPortConversionError} naming the first singular frequency point, RangeError when no
 * references are known or the data is malformed.
 */
export function fromTwoPort(data: TwoPortData, references?: Float64Array, options: TwoPortOptions = {}): NetworkData {
  checkTwoPortData(data, 'fromTwoPort');
  const convert = PER_MATRIX_TO_S[data.representation];
  if (!convert) throw new RangeError(`unknown representation ${String(data.representation)}`);
  const z0 = references ?? data.references;
  if (z0 === undefined) {
    throw new RangeError(
      `${data.representation} data carries no references; pass the references of the S to return`,
    );
  }
  if (z0.length !== 2) throw new RangeError(`need 2 references, got ${z0.length}`);
  checkTwoPortReferences(z0, 'fromTwoPort');
  if (data.representation === 'T' && references !== undefined) {
    const own = data.references;
    if (own[0] !== references[0] || own[1] !== references[1]) {
      throw new RangeError(
        `T data is defined for references ${own[0]}, ${own[1]} ohm and gives S only for those; ` +
          'convert with them and renormalise the S data',
      );
    }
  }
  const work = createTwoPortWorkspace(options);
  const values = mapPoints(data.frequencies, data.values, z0, convert, work, data.representation, 'S');
  const result: NetworkData = {
    parameter: 'S',
    ports: 2,
    frequencies: data.frequencies.slice(),
    references: z0.slice(),
    values,
  };
  if (data.title !== undefined) result.title = data.title;
  if (data.comments !== undefined) result.comments = data.comments.slice();
  return result;
}

function expectRepresentation(data: TwoPortData, want: TwoPortRepresentation, name: string): void {
  if (data.representation !== want) {
    throw new RangeError(`${want} data are needed here, got ${data.representation}`);
  }
}

/** ABCD (chain) matrices of two-port data: `toTwoPort(net, 'ABCD')`. */
export function toChain(net: NetworkData, options?: TwoPortOptions): ChainData {
  return toTwoPort(net, 'ABCD', options);
}

/** S with the given (or the carried) references from ABCD data: `fromTwoPort` for ABCD only. */
export function fromChain(data: ChainData, references?: Float64Array, options?: TwoPortOptions): NetworkData {
  expectRepresentation(data, 'ABCD', 'fromChain');
  return fromTwoPort(data, references, options);
}

/** T (transfer) matrices of two-port data, for its references: `toTwoPort(net, 'T')`. */
export function toTransfer(net: NetworkData, options?: TwoPortOptions): TransferData {
  return toTwoPort(net, 'T', options);
}

/** S (with the references of the T data) from T data: `fromTwoPort` for T only. */
export function fromTransfer(data: TransferData, options?: TwoPortOptions): NetworkData {
  expectRepresentation(data, 'T', 'fromTransfer');
  return fromTwoPort(data, undefined, options);
}

/** H (hybrid) matrices of two-port data: `toTwoPort(net, 'H')`. */
export function toHybrid(net: NetworkData, options?: TwoPortOptions): HybridData {
  return toTwoPort(net, 'H', options);
}

/** S with the given (or the carried) references from H data: `fromTwoPort` for H only. */
export function fromHybrid(data: HybridData, references?: Float64Array, options?: TwoPortOptions): NetworkData {
  expectRepresentation(data, 'H', 'fromHybrid');
  return fromTwoPort(data, references, options);
}

// --- cascade -------------------------------------------------------------------------------------

/** Relative tolerance for two frequencies to count as the same grid point in {@link cascade}. */
export const GRID_TOLERANCE = 1e-12;

function sameFrequency(a: number, b: number): boolean {
  return a === b || Math.abs(a - b) <= GRID_TOLERANCE * Math.max(Math.abs(a), Math.abs(b));
}

function checkGrid(first: Float64Array, other: Float64Array, section: number): void {
  const common = Math.min(first.length, other.length);
  let count = 0;
  const listed: GridMismatch[] = [];
  for (let k = 0; k < common; k++) {
    if (!sameFrequency(first[k]!, other[k]!)) {
      count++;
      if (listed.length < FrequencyGridError.LISTED) listed.push({ index: k, expected: first[k]!, actual: other[k]! });
    }
  }
  if (count > 0 || first.length !== other.length) {
    throw new FrequencyGridError(section, first.length, other.length, count, listed);
  }
}

/**
 * Cascade of two-port sections: port 2 of each section is connected to port 1 of the next. All
 * sections must be two-ports on the same frequency grid (equal to {@link GRID_TOLERANCE} relative;
 * otherwise {@link FrequencyGridError} lists the differing points). Z or Y data is first converted to S.
 *
 * Computed through the chain matrices: the chain matrix of a cascade is the product of the sections'
 * chain matrices, in order, and because it relates port voltages and currents it does not depend on
 * any reference impedance. Voltage and current are continuous at a junction whatever references the
 * two sections' S data use, so the references at an interface need not be equal and nothing is
 * renormalised: each section's S is turned into its chain matrix with that section's own references,
 * and the product is turned back into S with the outer references (port 1 of the first section, port 2
 * of the last). (The T product would need equal references at every junction.)
 *
 * Returns new S data on the first section's frequencies. Throws {@link TwoPortConversionError} with
 * `section` and the frequency point set when a section has no chain matrix (S21 = 0: nothing passes
 * through it, e.g. a shunt short circuit) or when the result has no S (active networks only).
 */
export function cascade(...nets: NetworkData[]): NetworkData {
  if (nets.length === 0) throw new RangeError('a cascade needs at least one section');
  const options: TwoPortOptions = {};
  const sections = nets.map((net, i) => {
    try {
      return asTwoPortS(net, `section ${i + 1} of the cascade`, options);
    } catch (e) {
      if (e instanceof ConversionError) {
        const details: TwoPortConversionErrorDetails = { from: e.from, to: 'S', reason: e.reason, rcond: e.rcond, section: i };
        if (e.frequencyIndex !== undefined) details.frequencyIndex = e.frequencyIndex;
        if (e.frequency !== undefined) details.frequency = e.frequency;
        throw new TwoPortConversionError(details, { cause: e });
      }
      throw e;
    }
  });
  const first = sections[0]!;
  for (let i = 1; i < sections.length; i++) checkGrid(first.frequencies, sections[i]!.frequencies, i);
  const last = sections[sections.length - 1]!;
  const outer = new Float64Array([first.references[0]!, last.references[1]!]);
  const points = first.frequencies.length;
  const values = new Float64Array(8 * points);
  const work = createTwoPortWorkspace(options);
  let acc = createMatrix(2);
  let tmp = createMatrix(2);
  const chain = createMatrix(2);
  for (let k = 0; k < points; k++) {
    const offset = 8 * k;
    for (let i = 0; i < sections.length; i++) {
      const section = sections[i]!;
      const target = i === 0 ? acc : chain;
      for (let t = 0; t < 8; t++) target[t] = section.values[offset + t]!;
      try {
        chainFromScattering(target, section.references, target, work);
        if (!allFinite(target)) {
          throw new TwoPortConversionError({ from: 'S', to: 'ABCD', reason: overflowReason('ABCD', target), rcond: 0 });
        }
      } catch (e) {
        if (e instanceof TwoPortConversionError) {
          throw e.at({ section: i, frequencyIndex: k, frequency: first.frequencies[k]! });
        }
        throw e;
      }
      if (i > 0) {
        multiply(2, acc, chain, tmp);
        const swap = acc;
        acc = tmp;
        tmp = swap;
      }
    }
    try {
      scatteringFromChain(acc, outer, acc, work);
      if (!allFinite(acc)) throw new TwoPortConversionError({ from: 'ABCD', to: 'S', reason: overflowReason('S', acc), rcond: 0 });
    } catch (e) {
      if (e instanceof TwoPortConversionError) throw e.at({ frequencyIndex: k, frequency: first.frequencies[k]! });
      throw e;
    }
    for (let t = 0; t < 8; t++) values[offset + t] = acc[t]!;
  }
  return {
    parameter: 'S',
    ports: 2,
    frequencies: first.frequencies.slice(),
    references: outer,
    values,
  };
}
