/**
 * Conversions between S, Z and Y parameters of an N-port, and renormalisation of S to new references.
 *
 * Conventions (common practice, power/pseudo waves with real references): port i has a real reference
 * impedance z_i > 0; G = diag(1/√z_i); the incident and reflected waves are a = G(V + z∘I)/2,
 * b = G(V − z∘I)/2, and b = S·a. With U the identity, the normalised matrices are
 *   Z̄ = G·Z·G,  Ȳ = G⁻¹·Y·G⁻¹ = Z̄⁻¹,
 * and
 *   S = (Z̄ + U)⁻¹(Z̄ − U) = (Z̄ − U)(Z̄ + U)⁻¹,
 *   S = (U + Ȳ)⁻¹(U − Ȳ),
 *   Z̄ = (U − S)⁻¹(U + S) = (U + S)(U − S)⁻¹,
 *   Ȳ = (U + S)⁻¹(U − S) = (U − S)(U + S)⁻¹,
 *   Y = Z⁻¹.
 * The two orders in each line agree because U ± S (or Z̄ ± U) are polynomials in one matrix and commute,
 * so every conversion here is one LU factorisation and one multi-right-hand-side solve.
 *
 * A conversion is singular when the matrix M to be factorised (U − S, U + S, Z̄ + U, …) is singular to
 * working precision: its LU has a zero pivot, or its reciprocal condition relative to the data,
 * rc = 1/((‖U‖₁ + ‖X‖₁)·‖M⁻¹‖₁) for M = U ± X (1/(‖X‖₁‖X⁻¹‖₁) for M = X), with ‖M⁻¹‖₁ from the
 * Hager/Higham estimator, is below the workspace's `singularTolerance`. Such conversions throw
 * {@link ConversionError}.
 *
 * Per-matrix functions read one n×n matrix (row-major, complex-interleaved, see complex.ts) and write
 * into `out` (which may be the input array), using only the buffers in the {@link ConvertWorkspace};
 * they allocate nothing unless they throw.
 *
 * @module
 */

import {
  LU_OK,
  createLu,
  createMatrix,
  invNorm1Estimate,
  luFactor,
  luSolve,
  norm1,
  type LuFactors,
} from './complex.js';
import type { NetworkData, ParameterKind } from './types.js';

/**
 * Default threshold on the estimated reciprocal condition number below which a conversion is declared
 * singular. Matrices that are singular in exact arithmetic come out near 1e-16 after rounding; 1e-12
 * leaves room for rounding in the input data while every accepted result keeps about four significant
 * digits or more.
 */
export const DEFAULT_SINGULAR_TOLERANCE = 1e-12;

/** Buffers for the per-matrix conversions, allocated once by {@link createConvertWorkspace}. */
export interface ConvertWorkspace {
  readonly n: number;
  /** Matrix to be factorised. */
  readonly m1: Float64Array;
  /** Right-hand sides, overwritten by the solution. */
  readonly m2: Float64Array;
  /** Per-port scratch (square roots of references, Γ, scale factors). */
  readonly p1: Float64Array;
  readonly p2: Float64Array;
  readonly lu: LuFactors;
  /** Reciprocal-condition threshold, see {@link DEFAULT_SINGULAR_TOLERANCE}. */
  readonly singularTolerance: number;
}

/** Options for {@link createConvertWorkspace}. */
export interface ConvertWorkspaceOptions {
  /** Reciprocal 1-norm condition number below which a conversion counts as singular. */
  singularTolerance?: number;
}

/** Allocates the buffers for converting n-port matrices. */
export function createConvertWorkspace(n: number, options: ConvertWorkspaceOptions = {}): ConvertWorkspace {
  const tol = options.singularTolerance ?? DEFAULT_SINGULAR_TOLERANCE;
  if (!(tol >= 0) || !Number.isFinite(tol)) throw new RangeError(`singularTolerance must be ≥ 0, got ${tol}`);
  return {
    n,
    m1: createMatrix(n),
    m2: createMatrix(n),
    p1: new Float64Array(n),
    p2: new Float64Array(n),
    lu: createLu(n),
    singularTolerance: tol,
  };
}

/** What a conversion was asked to produce, for error messages: `'S'` from `'S'` means renormalisation. */
export interface ConversionErrorDetails {
  from: ParameterKind;
  to: ParameterKind;
  /** Human-readable explanation of why the target parameters do not exist. */
  reason: string;
  /** Estimated reciprocal condition of the factorised matrix relative to the data (0 for a zero pivot). */
  rcond: number;
  /** 0-based LU step with a zero pivot, or -1 if rejected by the condition estimate. */
  pivot: number;
  /** Index of the frequency point, when known (set by the whole-network functions). */
  frequencyIndex?: number;
  /** Frequency in Hz, when known. */
  frequency?: number;
}

/**
 * Thrown when the requested parameters do not exist (the conversion matrix is singular), e.g. Z of a
 * two-port that is a single series element, or Y of one that is a single shunt element.
 */
export class ConversionError extends Error {
  readonly from: ParameterKind;
  readonly to: ParameterKind;
  readonly reason: string;
  readonly rcond: number;
  readonly pivot: number;
  readonly frequencyIndex: number | undefined;
  readonly frequency: number | undefined;

  constructor(details: ConversionErrorDetails, options?: { cause?: unknown }) {
    const what =
      details.from === details.to
        ? `${details.to}-parameters for the new reference impedances do not exist`
        : `${details.to}-parameters do not exist (converting from ${details.from})`;
    const where =
      details.frequencyIndex === undefined
        ? ''
        : ` at frequency point ${details.frequencyIndex}` +
          (details.frequency === undefined ? '' : ` (${details.frequency} Hz)`);
    const cond =
      details.pivot >= 0
        ? ` [zero pivot at step ${details.pivot}]`
        : details.rcond > 0
          ? ` [reciprocal condition number ${details.rcond.toExponential(2)}]`
          : '';
    super(`${what}${where}: ${details.reason}${cond}`, options);
    this.name = 'ConversionError';
    this.from = details.from;
    this.to = details.to;
    this.reason = details.reason;
    this.rcond = details.rcond;
    this.pivot = details.pivot;
    this.frequencyIndex = details.frequencyIndex;
    this.frequency = details.frequency;
  }

  /** A copy of this error that also names the frequency point where it happened. */
  atFrequency(frequencyIndex: number, frequency: number): ConversionError {
    return new ConversionError(
      {
        from: this.from,
        to: this.to,
        reason: this.reason,
        rcond: this.rcond,
        pivot: this.pivot,
        frequencyIndex,
        frequency,
      },
      { cause: this },
    );
  }
}

const REASONS = {
  SZ:
    'U − S is singular, so the open-circuit impedance matrix is unbounded; this happens when open-circuiting ' +
    'all ports leaves some current path undetermined, e.g. a network that is only a series element between ports',
  SY:
    'U + S is singular, so the short-circuit admittance matrix is unbounded; this happens when short-circuiting ' +
    'all ports leaves some voltage undetermined, e.g. a network that is only a shunt element across ports',
  ZS:
    'Z̄ + U is singular, i.e. some combination of ports presents exactly minus its reference impedance, ' +
    'so the incident waves do not determine the port currents',
  YS:
    'U + Ȳ is singular, i.e. some combination of ports presents exactly minus its reference admittance, ' +
    'so the incident waves do not determine the port voltages',
  ZY:
    'Z is singular, so no finite admittance matrix exists; this happens e.g. for a network that is only a ' +
    'shunt element across ports (all port voltages are equal)',
  YZ:
    'Y is singular, so no finite impedance matrix exists; this happens e.g. for a network that is only a ' +
    'series element between ports (the port currents are forced equal and opposite)',
  SS:
    'U − S·Γ is singular, i.e. S·Γ has an eigenvalue 1: terminated in the mismatches Γ between old and new ' +
    'references the network would sustain a wave with no incident wave (impossible for a passive network)',
  NONFINITE: 'the input matrix contains a non-finite value',
} as const;

function checkReferences(n: number, z0: Float64Array, name: string): void {
  if (z0.length < n) throw new RangeError(`need ${n} reference impedances, got ${z0.length}`);
  for (let i = 0; i < n; i++) {
    const z = z0[i]!;
    if (!(z > 0) || !Number.isFinite(z)) {
      throw new RangeError(`reference impedance of port ${i + 1} must be finite and > 0, got ${z}`);
    }
  }
}

function checkWorkspace(n: number, work: ConvertWorkspace, name: string): void {
  if (work.n !== n) throw new RangeError(`workspace is for ${work.n} ports, not ${n}`);
}

/**
 * Factorises M = work.m1 and overwrites work.m2 with M⁻¹·m2, or throws ConversionError.
 *
 * `scale` is the 1-norm of the data M is built from (‖U‖₁ + ‖X‖₁ = 1 + ‖X‖₁ for M = U ± X, ‖X‖₁ for
 * M = X), or NaN if the input had a non-finite entry. The singularity test uses the reciprocal condition
 * relative to the data, rc = 1/(scale·est‖M⁻¹‖₁) ≤ 1/κ₁(M): rounding in X of relative size ε moves M by
 * about ε·scale, so when U ± X cancels (e.g. S ≈ −U) rc still reflects how many digits of the data
 * survive, where the plain 1/κ₁(M) would not.
 */
function factorAndSolve(
  n: number,
  work: ConvertWorkspace,
  scale: number,
  from: ParameterKind,
  to: ParameterKind,
  reason: string,
): void {
  if (Number.isNaN(scale)) throw new ConversionError({ from, to, reason: REASONS.NONFINITE, rcond: 0, pivot: -1 });
  const status = luFactor(n, work.m1, work.lu);
  if (status !== LU_OK) throw new ConversionError({ from, to, reason, rcond: 0, pivot: status });
  const est = invNorm1Estimate(work.lu);
  let rc = 1 / (Math.max(scale, work.lu.norm) * est);
  if (!Number.isFinite(rc)) rc = 0;
  if (!(rc >= work.singularTolerance)) throw new ConversionError({ from, to, reason, rcond: rc, pivot: -1 });
  luSolve(work.lu, work.m2, work.m2, n);
}

/**
 * Z from S: Z̄ = (U − S)⁻¹(U + S), then Z = G⁻¹·Z̄·G⁻¹, i.e. Z_ij = √z_i · Z̄_ij · √z_j (ohms).
 * Throws {@link ConversionError} (to = 'Z') when U − S is singular, e.g. for a series-only two-port.
 */
export function sToZMatrix(
  n: number,
  s: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
): Float64Array {
  checkWorkspace(n, work, 'sToZMatrix');
  checkReferences(n, z0, 'sToZMatrix');
  const norm = loadPlusMinus(n, s, work.m2, work.m1);
  factorAndSolve(n, work, 1 + norm, 'S', 'Z', REASONS.SZ);
  const r = work.p1;
  for (let i = 0; i < n; i++) r[i] = Math.sqrt(z0[i]!);
  storeScaled(n, work.m2, r, out, false);
  return out;
}

/**
 * S from Z: Z̄ = G·Z·G (Z̄_ij = Z_ij/√(z_i z_j)), S = (Z̄ + U)⁻¹(Z̄ − U).
 * Throws {@link ConversionError} (to = 'S') when Z̄ + U is singular (not possible for a passive Z).
 */
export function zToSMatrix(
  n: number,
  z: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
): Float64Array {
  checkWorkspace(n, work, 'zToSMatrix');
  checkReferences(n, z0, 'zToSMatrix');
  const r = work.p1;
  for (let i = 0; i < n; i++) r[i] = Math.sqrt(z0[i]!);
  // m1 = Z̄ + U, m2 = Z̄ − U
  const norm = loadNormalised(n, z, r, true, work.m1, work.m2);
  factorAndSolve(n, work, 1 + norm, 'Z', 'S', REASONS.ZS);
  const m2 = work.m2;
  const len = 2 * n * n;
  for (let k = 0; k < len; k++) out[k] = m2[k]!;
  return out;
}

/**
 * Y from S: Ȳ = (U + S)⁻¹(U − S), then Y = G·Ȳ·G, i.e. Y_ij = Ȳ_ij/√(z_i z_j) (siemens).
 * Throws {@link ConversionError} (to = 'Y') when U + S is singular, e.g. for a shunt-only two-port.
 */
export function sToYMatrix(
  n: number,
  s: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
): Float64Array {
  checkWorkspace(n, work, 'sToYMatrix');
  checkReferences(n, z0, 'sToYMatrix');
  const norm = loadPlusMinus(n, s, work.m1, work.m2);
  factorAndSolve(n, work, 1 + norm, 'S', 'Y', REASONS.SY);
  const r = work.p1;
  for (let i = 0; i < n; i++) r[i] = Math.sqrt(z0[i]!);
  storeScaled(n, work.m2, r, out, true);
  return out;
}

/**
 * S from Y: Ȳ = G⁻¹·Y·G⁻¹ (Ȳ_ij = Y_ij·√(z_i z_j)), S = (U + Ȳ)⁻¹(U − Ȳ).
 * Throws {@link ConversionError} (to = 'S') when U + Ȳ is singular (not possible for a passive Y).
 */
export function yToSMatrix(
  n: number,
  y: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
): Float64Array {
  checkWorkspace(n, work, 'yToSMatrix');
  checkReferences(n, z0, 'yToSMatrix');
  const r = work.p1;
  for (let i = 0; i < n; i++) r[i] = 1 / Math.sqrt(z0[i]!);
  // loadNormalised divides by r_i r_j, i.e. multiplies by √(z_i z_j): m1 = Ȳ + U, m2 = Ȳ − U
  const norm = loadNormalised(n, y, r, true, work.m1, work.m2);
  // S = (U + Ȳ)⁻¹(U − Ȳ) = −(Ȳ + U)⁻¹(Ȳ − U)
  factorAndSolve(n, work, 1 + norm, 'Y', 'S', REASONS.YS);
  const m2 = work.m2;
  const len = 2 * n * n;
  for (let k = 0; k < len; k++) out[k] = -m2[k]!;
  return out;
}

/**
 * Y from Z: Y = Z⁻¹, computed as Y = G·Z̄⁻¹·G with Z̄ = G·Z·G (the reference impedances only scale the
 * problem, so the singularity test matches the one of the S route).
 * Throws {@link ConversionError} (to = 'Y') when Z is singular, e.g. for a shunt-only two-port.
 */
export function zToYMatrix(
  n: number,
  z: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
): Float64Array {
  checkWorkspace(n, work, 'zToYMatrix');
  checkReferences(n, z0, 'zToYMatrix');
  const r = work.p1;
  for (let i = 0; i < n; i++) r[i] = Math.sqrt(z0[i]!);
  const norm = loadNormalised(n, z, r, false, work.m1, work.m2);
  loadIdentity(n, work.m2);
  factorAndSolve(n, work, norm, 'Z', 'Y', REASONS.ZY);
  storeScaled(n, work.m2, r, out, true);
  return out;
}

/**
 * Z from Y: Z = Y⁻¹, computed as Z = G⁻¹·Ȳ⁻¹·G⁻¹ with Ȳ = G⁻¹·Y·G⁻¹.
 * Throws {@link ConversionError} (to = 'Z') when Y is singular, e.g. for a series-only two-port.
 */
export function yToZMatrix(
  n: number,
  y: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
): Float64Array {
  checkWorkspace(n, work, 'yToZMatrix');
  checkReferences(n, z0, 'yToZMatrix');
  const r = work.p1;
  for (let i = 0; i < n; i++) r[i] = 1 / Math.sqrt(z0[i]!);
  const norm = loadNormalised(n, y, r, false, work.m1, work.m2);
  loadIdentity(n, work.m2);
  factorAndSolve(n, work, norm, 'Y', 'Z', REASONS.YZ);
  storeScaled(n, work.m2, r, out, true);
  return out;
}

/**
 * Renormalises S from real references z (fromZ0) to real references z' (toZ0) without passing through
 * Z or Y (which may not exist). With Γ_i = (z'_i − z_i)/(z'_i + z_i) and
 * F_i = (z_i + z'_i)/(2√(z_i z'_i)) = 1/A_i, where A_i = √(z'_i/z_i)·(1 − Γ_i), the new waves are
 * a' = F(a − Γb), b' = F(b − Γa), which gives
 *   S' = A⁻¹(S − Γ)(U − ΓS)⁻¹A = F(S − Γ)(U − ΓS)⁻¹F⁻¹.
 * Solving the waves the other way round gives the equivalent left-division form used here,
 *   S' = F⁻¹(U − SΓ)⁻¹(S − Γ)F,   i.e. S'_ij = X_ij·F_j/F_i with (U − SΓ)·X = S − Γ
 * (both forms agree because F² = (U − Γ²)⁻¹). `out` may be `s`.
 * Throws {@link ConversionError} (from = to = 'S') when U − SΓ is singular (only for active networks).
 */
export function renormalizeS(
  n: number,
  s: Float64Array,
  fromZ0: Float64Array,
  toZ0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
): Float64Array {
  checkWorkspace(n, work, 'renormalizeS');
  checkReferences(n, fromZ0, 'renormalizeS (from)');
  checkReferences(n, toZ0, 'renormalizeS (to)');
  const gamma = work.p1;
  const f = work.p2;
  for (let i = 0; i < n; i++) {
    const z = fromZ0[i]!;
    const zn = toZ0[i]!;
    gamma[i] = (zn - z) / (zn + z);
    f[i] = (z + zn) / (2 * Math.sqrt(z * zn));
  }
  const m1 = work.m1;
  const m2 = work.m2;
  let finite = true;
  let maxGamma = 0;
  for (let i = 0; i < n; i++) maxGamma = Math.max(maxGamma, Math.abs(gamma[i]!));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const k = 2 * (i * n + j);
      const re = s[k]!;
      const im = s[k + 1]!;
      if (!Number.isFinite(re) || !Number.isFinite(im)) finite = false;
      const g = gamma[j]!;
      // m1 = U − S·Γ, m2 = S − Γ
      m1[k] = (i === j ? 1 : 0) - re * g;
      m1[k + 1] = -im * g;
      m2[k] = re - (i === j ? gamma[i]! : 0);
      m2[k + 1] = im;
    }
  }
  // scale bounds ‖U‖₁ + ‖SΓ‖₁
  factorAndSolve(n, work, finite ? 1 + maxGamma * norm1(n, s) : Number.NaN, 'S', 'S', REASONS.SS);
  for (let i = 0; i < n; i++) {
    const fi = f[i]!;
    for (let j = 0; j < n; j++) {
      const k = 2 * (i * n + j);
      const c = f[j]! / fi;
      out[k] = m2[k]! * c;
      out[k + 1] = m2[k + 1]! * c;
    }
  }
  return out;
}

// --- helpers -------------------------------------------------------------------------------------

/** plus = U + s, minus = U − s; returns ‖s‖₁, or NaN if s has a non-finite entry. */
function loadPlusMinus(n: number, s: Float64Array, plus: Float64Array, minus: Float64Array): number {
  let finite = true;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const k = 2 * (i * n + j);
      const re = s[k]!;
      const im = s[k + 1]!;
      if (!Number.isFinite(re) || !Number.isFinite(im)) finite = false;
      const d = i === j ? 1 : 0;
      plus[k] = d + re;
      plus[k + 1] = im;
      minus[k] = d - re;
      minus[k + 1] = -im;
    }
  }
  return finite ? norm1(n, s) : Number.NaN;
}

/**
 * x̄_ij = x_ij/(r_i r_j). If `withIdentity`, writes plus = x̄ + U and minus = x̄ − U; otherwise writes
 * x̄ into plus only. Returns ‖x̄‖₁, or NaN if x has a non-finite entry.
 */
function loadNormalised(
  n: number,
  x: Float64Array,
  r: Float64Array,
  withIdentity: boolean,
  plus: Float64Array,
  minus: Float64Array,
): number {
  let finite = true;
  let norm = 0;
  for (let j = 0; j < n; j++) {
    let col = 0;
    for (let i = 0; i < n; i++) {
      const k = 2 * (i * n + j);
      col += Math.hypot(x[k]!, x[k + 1]!) / (r[i]! * r[j]!);
    }
    if (col > norm) norm = col;
  }
  for (let i = 0; i < n; i++) {
    const ri = r[i]!;
    for (let j = 0; j < n; j++) {
      const k = 2 * (i * n + j);
      const re = x[k]!;
      const im = x[k + 1]!;
      if (!Number.isFinite(re) || !Number.isFinite(im)) finite = false;
      const q = ri * r[j]!;
      const nr = re / q;
      const ni = im / q;
      if (withIdentity) {
        const d = i === j ? 1 : 0;
        plus[k] = nr + d;
        plus[k + 1] = ni;
        minus[k] = nr - d;
        minus[k + 1] = ni;
      } else {
        plus[k] = nr;
        plus[k + 1] = ni;
      }
    }
  }
  return finite ? norm : Number.NaN;
}

function loadIdentity(n: number, m: Float64Array): void {
  m.fill(0, 0, 2 * n * n);
  for (let i = 0; i < n; i++) m[2 * (i * n + i)] = 1;
}

/** out_ij = x_ij·r_i·r_j, or x_ij/(r_i·r_j) if `divide`. */
function storeScaled(n: number, x: Float64Array, r: Float64Array, out: Float64Array, divide: boolean): void {
  for (let i = 0; i < n; i++) {
    const ri = r[i]!;
    for (let j = 0; j < n; j++) {
      const k = 2 * (i * n + j);
      const q = ri * r[j]!;
      if (divide) {
        out[k] = x[k]! / q;
        out[k + 1] = x[k + 1]! / q;
      } else {
        out[k] = x[k]! * q;
        out[k + 1] = x[k + 1]! * q;
      }
    }
  }
}

// --- whole-network functions ----------------------------------------------------------------------

type MatrixConversion = (
  n: number,
  input: Float64Array,
  z0: Float64Array,
  out: Float64Array,
  work: ConvertWorkspace,
) => Float64Array;

/** Direct conversions, keyed by from + to. */
const CONVERSIONS: Readonly<Record<string, MatrixConversion>> = {
  SZ: sToZMatrix,
  ZS: zToSMatrix,
  SY: sToYMatrix,
  YS: yToSMatrix,
  ZY: zToYMatrix,
  YZ: yToZMatrix,
};

function checkNetwork(net: NetworkData, name: string): number {
  const n = net.ports;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`the port count must be a positive integer, got ${n}`);
  const points = net.frequencies.length;
  if (net.values.length !== 2 * n * n * points) {
    throw new RangeError(
      `the network data hold ${net.values.length} numbers, expected 2·${n}²·${points} = ${2 * n * n * points}`,
    );
  }
  if (net.references.length !== n) {
    throw new RangeError(`the network data have ${net.references.length} reference impedances for ${n} ports`);
  }
  checkReferences(n, net.references, name);
  if (net.referenceReactances?.some((x) => x !== 0)) {
    throw new RangeError(`the data has complex reference impedances; turn them real first (in the library: fromComplexReferences)`);
  }
  return points;
}

/**
 * Throws a {@link ConversionError} when a converted matrix (its first `size` numbers) holds a
 * non-finite number: finite data can still overflow, e.g. Z = z0·(U + S)(U − S)⁻¹ of entries near 1e308.
 */
function checkFiniteResult(m: Float64Array, size: number, from: ParameterKind, to: ParameterKind, k: number, f: number): void {
  for (let t = 0; t < size; t++) {
    if (!Number.isFinite(m[t]!)) {
      throw new ConversionError({
        from,
        to,
        reason: 'the result is beyond the range of double-precision numbers (about 1.8e308); the data are too large for these parameters',
        rcond: 0,
        pivot: -1,
        frequencyIndex: k,
        frequency: f,
      });
    }
  }
}

function copyNetwork(net: NetworkData, parameter: ParameterKind, values: Float64Array): NetworkData {
  const result: NetworkData = {
    parameter,
    ports: net.ports,
    frequencies: net.frequencies.slice(),
    references: net.references.slice(),
    values,
  };
  if (net.title !== undefined) result.title = net.title;
  if (net.comments !== undefined) result.comments = net.comments.slice();
  return result;
}

/**
 * Converts every frequency point of `net` to S, Z or Y with the same reference impedances, using the
 * per-matrix functions above (formulas there). Returns a new NetworkData (arrays copied; a copy even
 * when `to` equals the current kind). Throws {@link ConversionError} naming the first frequency point
 * where the conversion is singular, RangeError for malformed data.
 */
export function convertNetwork(
  net: NetworkData,
  to: ParameterKind,
  options: ConvertWorkspaceOptions = {},
): NetworkData {
  const points = checkNetwork(net, 'convertNetwork');
  const n = net.ports;
  const values = new Float64Array(net.values.length);
  if (net.parameter === to) {
    values.set(net.values);
    return copyNetwork(net, to, values);
  }
  const convert = CONVERSIONS[net.parameter + to];
  if (!convert) throw new RangeError(`unknown conversion ${net.parameter} → ${to}`);
  const work = createConvertWorkspace(n, options);
  const size = 2 * n * n;
  const buffer = createMatrix(n);
  for (let k = 0; k < points; k++) {
    const offset = k * size;
    for (let t = 0; t < size; t++) buffer[t] = net.values[offset + t]!;
    try {
      convert(n, buffer, net.references, buffer, work);
    } catch (e) {
      if (e instanceof ConversionError) throw e.atFrequency(k, net.frequencies[k]!);
      throw e;
    }
    checkFiniteResult(buffer, size, net.parameter, to, k, net.frequencies[k]!);
    for (let t = 0; t < size; t++) values[offset + t] = buffer[t]!;
  }
  return copyNetwork(net, to, values);
}

/**
 * Returns `net` re-expressed for the reference impedances `toZ0` (length = ports, all > 0).
 * S data is renormalised point by point with {@link renormalizeS}; Z and Y do not depend on the
 * references, so their values are copied and only the references change.
 * Throws {@link ConversionError} naming the first singular frequency point.
 */
export function renormalizeNetwork(
  net: NetworkData,
  toZ0: Float64Array,
  options: ConvertWorkspaceOptions = {},
): NetworkData {
  const points = checkNetwork(net, 'renormalizeNetwork');
  const n = net.ports;
  if (toZ0.length !== n) throw new RangeError(`need ${n} new references, got ${toZ0.length}`);
  checkReferences(n, toZ0, 'renormalizeNetwork');
  const values = new Float64Array(net.values.length);
  if (net.parameter !== 'S') {
    values.set(net.values);
  } else {
    const work = createConvertWorkspace(n, options);
    const size = 2 * n * n;
    const buffer = createMatrix(n);
    for (let k = 0; k < points; k++) {
      const offset = k * size;
      for (let t = 0; t < size; t++) buffer[t] = net.values[offset + t]!;
      try {
        renormalizeS(n, buffer, net.references, toZ0, buffer, work);
      } catch (e) {
        if (e instanceof ConversionError) throw e.atFrequency(k, net.frequencies[k]!);
        throw e;
      }
      checkFiniteResult(buffer, size, 'S', 'S', k, net.frequencies[k]!);
      for (let t = 0; t < size; t++) values[offset + t] = buffer[t]!;
    }
  }
  const result = copyNetwork(net, net.parameter, values);
  result.references = toZ0.slice();
  return result;
}
