/**
 * Ideal TEM transmission-line sections as pure functions: propagation constant, two-port Y and
 * ABCD matrices, a π-equivalent, and stub input impedances/admittances.
 *
 * Model (common practice, e.g. Pozar, Microwave Engineering, ch. 2 — chapter (from memory)):
 * - a real characteristic impedance Z0 (the low-loss approximation: the small imaginary part of
 *   √((R + jωL)/(G + jωC)) that loss brings is neglected);
 * - γ = α + jβ with β = ω·√εeff/c0 = ω/(vf·c0), so the phase βℓ is proportional to f;
 * - attenuation as two separate terms given at a reference frequency fRef: a conductor term that
 *   scales as √f (skin effect) and a dielectric term that scales as f (constant loss tangent):
 *   α(f) = αc(fRef)·√(f/fRef) + αd(fRef)·(f/fRef). The model has no DC resistance: α(0) = 0.
 *
 * Complex numbers are (re, im) pairs. Every per-frequency routine writes into a caller-given
 * `Float64Array` at an offset and allocates nothing; 2×2 complex matrices use the project's layout
 * (row-major, interleaved: [m11re, m11im, m12re, m12im, m21re, m21im, m22re, m22im], see
 * src/network/complex.ts). The section's total propagation γℓ is written `z = a + jb` below,
 * a = αℓ in nepers and b = βℓ in radians.
 *
 * Numerical forms. With E = e^(−2z) and D = 1 − E = −expm1(−2z) (computed without cancellation):
 *   coth z = (2 − D)/D,  tanh z = D/(2 − D),  csch z = 2e^(−z)/D,  tanh(z/2) = D'/(2 − D'),
 *   D' = −expm1(−z).
 * For a ≥ 0 (passive) |E| ≤ 1 and e^(−z) is bounded, so nothing overflows when |γℓ| is large
 * (coth → 1, csch → 0), and expm1 keeps full relative accuracy as γℓ → 0 (coth z ≈ 1/z). For a < 0
 * the odd symmetry coth(−z) = −coth z (and the same for csch, tanh) is used. The ABCD matrix uses
 * cosh and sinh directly; its entries genuinely grow as e^(αℓ)/2 and overflow only beyond αℓ ≈ 710 Np.
 *
 * @module
 */

/** Speed of light in vacuum, m/s (exact by the SI definition of the metre). */
export const SPEED_OF_LIGHT = 299_792_458;

/** Decibels per neper: 20/ln 10 ≈ 8.685889638 (common practice: 1 Np = 20·log10(e) dB). */
export const DB_PER_NEPER = 20 / Math.LN10;

/** Converts an attenuation in nepers (or Np/m) to decibels (or dB/m). */
export function npToDb(np: number): number {
  return np * DB_PER_NEPER;
}

/** Converts an attenuation in decibels (or dB/m) to nepers (or Np/m). */
export function dbToNp(db: number): number {
  return db / DB_PER_NEPER;
}

/** Attenuation of a line per metre at a stated frequency, split into its two scaling terms. */
export interface LineLoss {
  /** Conductor attenuation at `at`, Np/m (≥ 0); scaled as √f. */
  conductor: number;
  /** Dielectric attenuation at `at`, Np/m (≥ 0); scaled as f. */
  dielectric: number;
  /** Frequency at which the two values hold, Hz (> 0). */
  at: number;
}

/** A line given by its physical length; the phase velocity from εeff or a velocity factor. */
export interface PhysicalLineSpec {
  /** Characteristic impedance, Ω (> 0, real). */
  z0: number;
  /** Physical length, m (> 0). */
  length: number;
  /** Effective relative permittivity (≥ 1). Give this or `velocityFactor`; neither means air (1). */
  eeff?: number;
  /** Phase velocity over c0, in (0, 1]. Give this or `eeff`, not both. */
  velocityFactor?: number;
  /** Attenuation per metre at a stated frequency (omit for a lossless line). */
  loss?: LineLoss;
}

/** A line given by its electrical length θ = βℓ at a stated frequency f0 (β ∝ f). */
export interface ElectricalLineSpec {
  /** Characteristic impedance, Ω (> 0, real). */
  z0: number;
  /** Electrical length at `at`, radians (> 0). */
  theta: number;
  /** Frequency at which `theta` holds, Hz (> 0). */
  at: number;
  /** Physical length, m (> 0). Optional; needed only when `loss` (given per metre) is present. */
  length?: number;
  /** Attenuation per metre at a stated frequency; requires `length`. */
  loss?: LineLoss;
}

/**
 * A line section reduced to the numbers the per-frequency routines need. Build it once with
 * {@link lineFromLength} or {@link lineFromElectricalLength} (these validate and allocate), then
 * evaluate it per frequency.
 */
export interface TemLine {
  /** Characteristic impedance, Ω. */
  readonly z0: number;
  /** Phase of the whole section per hertz, rad/Hz: βℓ(f) = phasePerHz·f. */
  readonly phasePerHz: number;
  /** Conductor attenuation of the whole section at `lossRefHz`, Np (scales as √f). */
  readonly conductorNp: number;
  /** Dielectric attenuation of the whole section at `lossRefHz`, Np (scales as f). */
  readonly dielectricNp: number;
  /** Reference frequency of the two loss terms, Hz (1 when the line is lossless). */
  readonly lossRefHz: number;
  /** Physical length, m, or NaN when the line was given by electrical length alone. */
  readonly length: number;
}

// ------------------------------------------------------------------------------------------------
// validation (runs when a line is built, not per frequency)

function requirePositive(where: string, name: string, v: number): void {
  if (!(Number.isFinite(v) && v > 0)) throw new RangeError(`${where}: ${name} must be a finite number above 0, got ${v}`);
}

function requireNonNegative(where: string, name: string, v: number): void {
  if (!(Number.isFinite(v) && v >= 0)) throw new RangeError(`${where}: ${name} must be a finite number ≥ 0, got ${v}`);
}

function checkLoss(where: string, loss: LineLoss): void {
  requireNonNegative(where, 'loss.conductor (Np/m)', loss.conductor);
  requireNonNegative(where, 'loss.dielectric (Np/m)', loss.dielectric);
  requirePositive(where, 'loss.at (Hz)', loss.at);
}

/**
 * Builds a line section from its physical length and εeff (or velocity factor).
 * β = 2πf·√εeff/c0 = 2πf/(vf·c0) (common practice). Throws RangeError on invalid input.
 */
export function lineFromLength(spec: PhysicalLineSpec): TemLine {
  const where = 'lineFromLength';
  requirePositive(where, 'z0 (Ω)', spec.z0);
  requirePositive(where, 'length (m)', spec.length);
  if (spec.eeff !== undefined && spec.velocityFactor !== undefined) {
    throw new RangeError(`${where}: give either eeff or velocityFactor, not both`);
  }
  let slowness: number; // √εeff = 1/vf
  if (spec.velocityFactor !== undefined) {
    const vf = spec.velocityFactor;
    if (!(Number.isFinite(vf) && vf > 0 && vf <= 1)) {
      throw new RangeError(`${where}: velocityFactor must be in (0, 1], got ${vf}`);
    }
    slowness = 1 / vf;
  } else {
    const eeff = spec.eeff ?? 1;
    if (!(Number.isFinite(eeff) && eeff >= 1)) throw new RangeError(`${where}: eeff must be a finite number ≥ 1, got ${eeff}`);
    slowness = Math.sqrt(eeff);
  }
  const phasePerHz = (2 * Math.PI * slowness * spec.length) / SPEED_OF_LIGHT;
  if (spec.loss === undefined) {
    return { z0: spec.z0, phasePerHz, conductorNp: 0, dielectricNp: 0, lossRefHz: 1, length: spec.length };
  }
  checkLoss(where, spec.loss);
  return {
    z0: spec.z0,
    phasePerHz,
    conductorNp: spec.loss.conductor * spec.length,
    dielectricNp: spec.loss.dielectric * spec.length,
    lossRefHz: spec.loss.at,
    length: spec.length,
  };
}

/**
 * Builds a line section from its electrical length θ at f0: βℓ(f) = θ·f/f0.
 * Loss, given per metre, needs the physical `length`. Throws RangeError on invalid input.
 */
export function lineFromElectricalLength(spec: ElectricalLineSpec): TemLine {
  const where = 'lineFromElectricalLength';
  requirePositive(where, 'z0 (Ω)', spec.z0);
  requirePositive(where, 'theta (rad)', spec.theta);
  requirePositive(where, 'at (Hz)', spec.at);
  if (spec.length !== undefined) requirePositive(where, 'length (m)', spec.length);
  const length = spec.length ?? Number.NaN;
  const phasePerHz = spec.theta / spec.at;
  if (spec.loss === undefined) {
    return { z0: spec.z0, phasePerHz, conductorNp: 0, dielectricNp: 0, lossRefHz: 1, length };
  }
  if (spec.length === undefined) {
    throw new RangeError(`${where}: loss is given per metre, so the physical length is needed as well`);
  }
  checkLoss(where, spec.loss);
  return {
    z0: spec.z0,
    phasePerHz,
    conductorNp: spec.loss.conductor * spec.length,
    dielectricNp: spec.loss.dielectric * spec.length,
    lossRefHz: spec.loss.at,
    length,
  };
}

// ------------------------------------------------------------------------------------------------
// per-frequency quantities

function checkFrequency(where: string, f: number): void {
  if (!(f >= 0 && f < Infinity)) throw new RangeError(`${where}: frequency must be a finite number ≥ 0 Hz, got ${f}`);
}

/** Conductor part of αℓ at f, Np: conductorNp·√(f/fRef). */
export function lineConductorAttenuation(line: TemLine, f: number): number {
  checkFrequency('lineConductorAttenuation', f);
  return line.conductorNp * Math.sqrt(f / line.lossRefHz);
}

/** Dielectric part of αℓ at f, Np: dielectricNp·(f/fRef). */
export function lineDielectricAttenuation(line: TemLine, f: number): number {
  checkFrequency('lineDielectricAttenuation', f);
  return line.dielectricNp * (f / line.lossRefHz);
}

/** Writes γℓ = αℓ + jβℓ of the section at f (Np, rad) into out[o], out[o + 1]. */
export function lineGammaLength(line: TemLine, f: number, out: Float64Array, o = 0): Float64Array {
  checkFrequency('lineGammaLength', f);
  const r = f / line.lossRefHz;
  out[o] = line.conductorNp * Math.sqrt(r) + line.dielectricNp * r;
  out[o + 1] = line.phasePerHz * f;
  return out;
}

/**
 * Writes the propagation constant γ = α + jβ at f (Np/m, rad/m) into out[o], out[o + 1].
 * Needs the physical length (throws RangeError for a line given by electrical length alone).
 */
export function linePropagation(line: TemLine, f: number, out: Float64Array, o = 0): Float64Array {
  if (!(line.length > 0)) throw new RangeError('linePropagation: this line has no physical length; use lineGammaLength');
  lineGammaLength(line, f, out, o);
  out[o] = out[o]! / line.length;
  out[o + 1] = out[o + 1]! / line.length;
  return out;
}

// ------------------------------------------------------------------------------------------------
// complex kernels (allocation-free; module scratch is safe because nothing here re-enters)

const scratch = new Float64Array(4);

/** out[k], out[k+1] = (ar + j·ai)/(br + j·bi), Smith's scaled division (no overflow of |b|²). */
function divInto(ar: number, ai: number, br: number, bi: number, out: Float64Array, k: number): void {
  if (Math.abs(br) >= Math.abs(bi)) {
    const r = bi / br;
    const den = br + bi * r;
    out[k] = (ar + ai * r) / den;
    out[k + 1] = (ai - ar * r) / den;
  } else {
    const r = br / bi;
    const den = br * r + bi;
    out[k] = (ar * r + ai) / den;
    out[k + 1] = (ai * r - ar) / den;
  }
}

/**
 * scratch[0..1] = 1 − e^(−s·(a + jb)) = −expm1(−s·z) for s > 0, without cancellation:
 * expm1(x + jy) = (expm1(x)·cos y − 2 sin²(y/2)) + j·e^x·sin y.
 */
function oneMinusExp(a: number, b: number, s: number): void {
  const x = -s * a;
  const y = -s * b;
  const em = Math.expm1(x);
  const h = Math.sin(0.5 * y);
  scratch[0] = -(em * Math.cos(y) - 2 * h * h);
  scratch[1] = -((em + 1) * Math.sin(y));
}

/** Below this |1 − e^(−2γℓ)| (scaled by max(1, |βℓ|)) the section is taken to sit on a pole of Y. */
const POLE_TOL = 16 * Number.EPSILON;

/**
 * Two-port Y matrix of a line section (Ω⁻¹): y11 = y22 = coth(γℓ)/Z0, y12 = y21 = −csch(γℓ)/Z0
 * (common practice, e.g. Pozar, Microwave Engineering, table of two-port conversions — (from memory)),
 * with z = γℓ = a + jb. Writes 8 numbers at out[o..o+7].
 *
 * Returns false when the section sits (to rounding) on a pole of Y, where Y does not exist:
 * γℓ = 0 (zero length or DC) and, for a lossless line, βℓ a multiple of π (the half-wave line,
 * whose ABCD is −U). The values are written anyway (huge or non-finite); use {@link lineAbcd}
 * or a branch formulation there.
 */
export function lineYFromGammaLength(z0: number, a: number, b: number, out: Float64Array, o = 0): boolean {
  let sign = 1;
  if (a < 0) {
    a = -a;
    b = -b;
    sign = -1;
  }
  oneMinusExp(a, b, 2);
  const dRe = scratch[0]!;
  const dIm = scratch[1]!;
  // coth z = (2 − D)/D
  divInto(2 - dRe, -dIm, dRe, dIm, out, o);
  // csch z = 2e^(−z)/D, e^(−z) = e^(−a)(cos b − j sin b)
  const ea = 2 * Math.exp(-a);
  divInto(ea * Math.cos(b), -ea * Math.sin(b), dRe, dIm, out, o + 2);
  const sc = sign / z0;
  const y11r = out[o]! * sc;
  const y11i = out[o + 1]! * sc;
  const y12r = -out[o + 2]! * sc;
  const y12i = -out[o + 3]! * sc;
  out[o] = y11r;
  out[o + 1] = y11i;
  out[o + 2] = y12r;
  out[o + 3] = y12i;
  out[o + 4] = y12r;
  out[o + 5] = y12i;
  out[o + 6] = y11r;
  out[o + 7] = y11i;
  return Math.hypot(dRe, dIm) > POLE_TOL * Math.max(1, Math.abs(b));
}

/** {@link lineYFromGammaLength} for a {@link TemLine} at frequency f. */
export function lineY(line: TemLine, f: number, out: Float64Array, o = 0): boolean {
  lineGammaLength(line, f, scratch, 2);
  return lineYFromGammaLength(line.z0, scratch[2]!, scratch[3]!, out, o);
}

/**
 * π-equivalent of a line section: a series admittance ys = csch(γℓ)/Z0 between the ports and a
 * shunt admittance yp = tanh(γℓ/2)/Z0 from each port to ground, so that y11 = ys + yp and
 * y12 = −ys (common practice; coth z − csch z = tanh(z/2)). Writes [ys re, ys im, yp re, yp im]
 * at out[o..o+3]. The shunt part is computed directly, accurate to full relative precision as
 * γℓ → 0, where forming y11 + y12 from the Y entries would cancel. Same poles as Y for ys.
 */
export function linePiFromGammaLength(z0: number, a: number, b: number, out: Float64Array, o = 0): Float64Array {
  let sign = 1;
  if (a < 0) {
    a = -a;
    b = -b;
    sign = -1;
  }
  oneMinusExp(a, b, 2);
  const ea = 2 * Math.exp(-a);
  divInto(ea * Math.cos(b), -ea * Math.sin(b), scratch[0]!, scratch[1]!, out, o);
  oneMinusExp(a, b, 1);
  divInto(scratch[0]!, scratch[1]!, 2 - scratch[0]!, -scratch[1]!, out, o + 2);
  const sc = sign / z0;
  for (let k = 0; k < 4; k++) out[o + k] = out[o + k]! * sc;
  return out;
}

/**
 * ABCD (chain) matrix of a line section: [[cosh γℓ, Z0·sinh γℓ], [sinh γℓ/Z0, cosh γℓ]]
 * (common practice). Writes 8 numbers at out[o..o+7]; B in Ω, C in S. Its determinant is 1
 * (reciprocity). Exists at every γℓ; entries overflow to ±Infinity only beyond αℓ ≈ 710 Np.
 */
export function lineAbcdFromGammaLength(z0: number, a: number, b: number, out: Float64Array, o = 0): Float64Array {
  const ca = Math.cosh(a);
  const sa = Math.sinh(a);
  const cb = Math.cos(b);
  const sb = Math.sin(b);
  const chr = ca * cb; // cosh(a + jb) = cosh a cos b + j sinh a sin b
  const chi = sa * sb;
  const shr = sa * cb; // sinh(a + jb) = sinh a cos b + j cosh a sin b
  const shi = ca * sb;
  out[o] = chr;
  out[o + 1] = chi;
  out[o + 2] = z0 * shr;
  out[o + 3] = z0 * shi;
  out[o + 4] = shr / z0;
  out[o + 5] = shi / z0;
  out[o + 6] = chr;
  out[o + 7] = chi;
  return out;
}

/** {@link lineAbcdFromGammaLength} for a {@link TemLine} at frequency f. */
export function lineAbcd(line: TemLine, f: number, out: Float64Array, o = 0): Float64Array {
  lineGammaLength(line, f, scratch, 2);
  return lineAbcdFromGammaLength(line.z0, scratch[2]!, scratch[3]!, out, o);
}

/** out[o..o+1] = Z0·tanh(z) (mul = Z0) or tanh(z)/Z0 (mul = 1/Z0); tanh z = D/(2 − D). */
function tanhTimes(a: number, b: number, mul: number, out: Float64Array, o: number): Float64Array {
  let sign = 1;
  if (a < 0) {
    a = -a;
    b = -b;
    sign = -1;
  }
  oneMinusExp(a, b, 2);
  divInto(scratch[0]!, scratch[1]!, 2 - scratch[0]!, -scratch[1]!, out, o);
  out[o] = out[o]! * mul * sign;
  out[o + 1] = out[o + 1]! * mul * sign;
  return out;
}

/** out[o..o+1] = Z0·coth(z) (mul = Z0) or coth(z)/Z0 (mul = 1/Z0); coth z = (2 − D)/D. */
function cothTimes(a: number, b: number, mul: number, out: Float64Array, o: number): Float64Array {
  let sign = 1;
  if (a < 0) {
    a = -a;
    b = -b;
    sign = -1;
  }
  oneMinusExp(a, b, 2);
  divInto(2 - scratch[0]!, -scratch[1]!, scratch[0]!, scratch[1]!, out, o);
  out[o] = out[o]! * mul * sign;
  out[o + 1] = out[o + 1]! * mul * sign;
  return out;
}

/**
 * Input impedance of an open-circuited stub, Zin = Z0·coth(γℓ) (common practice), Ω, at
 * out[o..o+1]. Infinite (non-finite values) on its poles: γℓ = 0 and lossless βℓ = nπ.
 */
export function openStubImpedance(z0: number, a: number, b: number, out: Float64Array, o = 0): Float64Array {
  return cothTimes(a, b, z0, out, o);
}

/** Input admittance of an open-circuited stub, Yin = tanh(γℓ)/Z0, S, at out[o..o+1]. */
export function openStubAdmittance(z0: number, a: number, b: number, out: Float64Array, o = 0): Float64Array {
  return tanhTimes(a, b, 1 / z0, out, o);
}

/**
 * Input impedance of a short-circuited stub, Zin = Z0·tanh(γℓ) (common practice), Ω, at
 * out[o..o+1]. Infinite on its poles: lossless βℓ = (n + ½)π.
 */
export function shortStubImpedance(z0: number, a: number, b: number, out: Float64Array, o = 0): Float64Array {
  return tanhTimes(a, b, z0, out, o);
}

/** Input admittance of a short-circuited stub, Yin = coth(γℓ)/Z0, S, at out[o..o+1]. */
export function shortStubAdmittance(z0: number, a: number, b: number, out: Float64Array, o = 0): Float64Array {
  return cothTimes(a, b, 1 / z0, out, o);
}

/**
 * Input impedance of a section terminated in ZL = zlRe + j·zlIm:
 * Zin = Z0·(ZL + Z0·tanh γℓ)/(Z0 + ZL·tanh γℓ) (common practice). Ω, at out[o..o+1].
 */
export function lineInputImpedance(
  z0: number,
  a: number,
  b: number,
  zlRe: number,
  zlIm: number,
  out: Float64Array,
  o = 0,
): Float64Array {
  tanhTimes(a, b, 1, scratch, 2);
  const tr = scratch[2]!;
  const ti = scratch[3]!;
  const nr = zlRe + z0 * tr;
  const ni = zlIm + z0 * ti;
  const dr = z0 + (zlRe * tr - zlIm * ti);
  const di = zlRe * ti + zlIm * tr;
  divInto(nr, ni, dr, di, out, o);
  out[o] = out[o]! * z0;
  out[o + 1] = out[o + 1]! * z0;
  return out;
}
