/**
 * Microstrip line models as pure functions (SI inputs: metres, hertz, siemens per metre).
 *
 * Notation: w strip width, h substrate height, t strip thickness, εr substrate relative
 * permittivity, u = w/h, f frequency. Conductor and ground are taken non-magnetic with the same
 * conductivity σ; the substrate is non-magnetic.
 *
 * Sources (each formula below names its own; coefficients are as recalled, so every one of them is
 * marked (from memory) until checked against the paper):
 * - [HJ] E. Hammerstad and Ø. Jensen, "Accurate models for microstrip computer-aided design",
 *   IEEE MTT-S International Microwave Symposium Digest, 1980, pp. 407–409 (pages (from memory)).
 *   Quasi-static Z0 and εeff of a zero-thickness strip, and the strip-thickness correction.
 *   Stated accuracy (from memory): air impedance Z01 better than 0.01 % for u ≤ 1 and 0.03 % for
 *   u ≤ 1000; εeff better than 0.2 % for εr ≤ 128 and 0.01 ≤ u ≤ 100.
 * - [KJ] M. Kirschning and R. H. Jansen, "Accurate model for effective dielectric constant of
 *   microstrip with validity up to millimetre-wave frequencies", Electronics Letters, vol. 18,
 *   no. 6, 1982, pp. 272–273. Dispersion of εeff. Stated range (from memory): 0.1 ≤ u ≤ 100,
 *   1 ≤ εr ≤ 20, 0 ≤ h/λ0 ≤ 0.13 (f·h up to about 39 GHz·mm), accuracy 0.6 %. (The brief for this
 *   module quoted f·h ≤ 25 GHz·mm; the two should be reconciled against the letter.)
 * - [JK] R. H. Jansen and M. Kirschning, "Arguments and an accurate model for the power-current
 *   formulation of microstrip characteristic impedance", Archiv für Elektronik und
 *   Übertragungstechnik (AEÜ), vol. 37, 1983, pp. 108–112. Dispersion of Z0 (power–current
 *   definition), the companion of [KJ]. Stated range (from memory, least sure of all the ranges
 *   here): 0.1 ≤ u ≤ 10, 1 ≤ εr ≤ 18, f·h ≤ 15 GHz·mm.
 * - [WH] H. A. Wheeler, "Formulas for the skin effect", Proc. IRE, vol. 30, 1942, pp. 412–424.
 *   Incremental-inductance rule for conductor loss (valid when the conductors are several skin
 *   depths thick and their curvature radii are large compared with the skin depth).
 * - [HB] E. Hammerstad and Ø. Bekkadal, "Microstrip Handbook", ELAB report STF44 A74169,
 *   University of Trondheim, 1975 (from memory); the surface-roughness factor, also used in [HJ].
 * - [H75] E. Hammerstad, "Equations for microstrip circuit design", Proc. 5th European Microwave
 *   Conference, 1975 (from memory); closed-form synthesis w/h(Z0, εr), accuracy about 1 %
 *   (from memory), as reproduced in D. M. Pozar, Microwave Engineering, section on microstrip
 *   (from memory).
 * - [PZ] Pozar, Microwave Engineering: dielectric loss of a quasi-TEM line (common practice).
 *
 * Allocation: the scalar functions allocate nothing; the ones that fill result objects take an
 * `out` object to reuse (created once with the `create*` helpers) and allocate only when it is
 * omitted. {@link microstripWidth} (a search, run at elaboration time), {@link microstripRangeIssues}
 * and the error paths allocate.
 *
 * @module
 */

import { DB_PER_NEPER, SPEED_OF_LIGHT } from './line.js';

/** Vacuum permeability, H/m (CODATA 2018 value 1.25663706212e-6 (from memory)). */
export const MU0 = 1.25663706212e-6;

/** Wave impedance of free space η0 = μ0·c0, Ω (≈ 376.730). */
export const ETA0 = MU0 * SPEED_OF_LIGHT;

// ------------------------------------------------------------------------------------------------
// validation

function requirePositive(where: string, name: string, v: number): void {
  if (!(Number.isFinite(v) && v > 0)) throw new RangeError(`${where}: ${name} must be a finite number above 0, got ${v}`);
}

function requireNonNegative(where: string, name: string, v: number): void {
  if (!(Number.isFinite(v) && v >= 0)) throw new RangeError(`${where}: ${name} must be a finite number ≥ 0, got ${v}`);
}

function requirePermittivity(where: string, er: number): void {
  if (!(Number.isFinite(er) && er >= 1)) throw new RangeError(`${where}: relative permittivity εr must be a finite number ≥ 1, got ${er}`);
}

function requireGeometry(where: string, w: number, h: number, t: number, er: number): void {
  requirePositive(where, 'strip width w (m)', w);
  requirePositive(where, 'substrate height h (m)', h);
  requireNonNegative(where, 'strip thickness t (m)', t);
  requirePermittivity(where, er);
}

function requireFrequency(where: string, f: number): void {
  requireNonNegative(where, 'frequency f (Hz)', f);
}

// ------------------------------------------------------------------------------------------------
// Hammerstad & Jensen, quasi-static

/**
 * [HJ] characteristic impedance of a zero-thickness strip with the substrate replaced by air, Ω:
 *   Z01(u) = (η0/2π)·ln(F(u)/u + √(1 + (2/u)²)),  F(u) = 6 + (2π − 6)·exp(−(30.666/u)^0.7528)
 * (coefficients (from memory)). Limits: η0/u (parallel plates) as u → ∞, (η0/2π)·ln(8/u) as u → 0.
 * Range: accuracy stated for u ≤ 1000 (see module doc). `u` must be > 0 (not checked here).
 */
export function hjAirImpedance(u: number): number {
  const fu = 6 + (2 * Math.PI - 6) * Math.exp(-Math.pow(30.666 / u, 0.7528));
  return (ETA0 / (2 * Math.PI)) * Math.log(fu / u + Math.sqrt(1 + 4 / (u * u)));
}

/**
 * [HJ] effective permittivity of a zero-thickness strip (coefficients (from memory)):
 *   εeff = (εr + 1)/2 + (εr − 1)/2 · (1 + 10/u)^(−a(u)·b(εr)),
 *   a(u) = 1 + ln((u⁴ + (u/52)²)/(u⁴ + 0.432))/49 + ln(1 + (u/18.1)³)/18.7,
 *   b(εr) = 0.564·((εr − 0.9)/(εr + 3))^0.053.
 * Range: 0.01 ≤ u ≤ 100, εr ≤ 128 (stated accuracy 0.2 %). Outside it, in particular for u far
 * below 0.01, the fit leaves the physical narrow-strip limit (εr + 1)/2. Inputs not checked here.
 */
export function hjEffectivePermittivity(u: number, er: number): number {
  const u2 = u * u;
  const u4 = u2 * u2;
  const a = 1 + Math.log((u4 + u2 / 2704) / (u4 + 0.432)) / 49 + Math.log(1 + Math.pow(u / 18.1, 3)) / 18.7;
  const b = 0.564 * Math.pow((er - 0.9) / (er + 3), 0.053);
  return (er + 1) / 2 + ((er - 1) / 2) * Math.pow(1 + 10 / u, -a * b);
}

/**
 * [HJ] strip-thickness correction: the width increments, normalised to h, for the air line (Δu1)
 * and for the line on the substrate (Δur), with T = t/h (coefficients (from memory)):
 *   Δu1 = (T/π)·ln(1 + 4e/(T·coth²√(6.517·u))),
 *   Δur = ½·(1 + 1/cosh√(εr − 1))·Δu1.
 * Writes [Δu1, Δur] into out[0..1]. T = 0 gives zeros.
 */
export function hjThicknessIncrements(u: number, tOverH: number, er: number, out: Float64Array): Float64Array {
  if (tOverH === 0) {
    out[0] = 0;
    out[1] = 0;
    return out;
  }
  const th = Math.tanh(Math.sqrt(6.517 * u));
  const coth2 = 1 / (th * th);
  const du1 = (tOverH / Math.PI) * Math.log(1 + (4 * Math.E) / (tOverH * coth2));
  out[0] = du1;
  out[1] = 0.5 * (1 + 1 / Math.cosh(Math.sqrt(er - 1))) * du1;
  return out;
}

/** Quasi-static result of {@link microstripStatic}. */
export interface MicrostripStatic {
  /** Quasi-static characteristic impedance, Ω. */
  z0: number;
  /** Quasi-static effective relative permittivity. */
  eeff: number;
  /** Impedance of the same (thick) strip with the substrate replaced by air, Z01(u1), Ω. */
  z0Air: number;
  /** Effective width ratio of the air line, u1 = u + Δu1. */
  u1: number;
  /** Effective width ratio of the line on the substrate, ur = u + Δur. */
  ur: number;
}

/** Allocates a {@link MicrostripStatic} to reuse as `out`. */
export function createMicrostripStatic(): MicrostripStatic {
  return { z0: 0, eeff: 0, z0Air: 0, u1: 0, ur: 0 };
}

const incr = new Float64Array(2);

/**
 * [HJ] quasi-static Z0 and εeff of a strip of thickness t (coefficients (from memory)):
 *   u1 = u + Δu1, ur = u + Δur (see {@link hjThicknessIncrements}),
 *   Z0 = Z01(ur)/√εeff(ur, εr),   εeff = εeff(ur, εr)·(Z01(u1)/Z01(ur))².
 * Consistency: Z0 = Z01(u1)/√εeff, so z0Air = Z01(u1). With t = 0 these are Z01(u)/√εeff(u) and
 * εeff(u). Range: as {@link hjEffectivePermittivity}; the correction is meant for t ≪ h.
 * Throws RangeError unless w, h > 0, t ≥ 0, εr ≥ 1.
 */
export function microstripStatic(
  w: number,
  h: number,
  t: number,
  er: number,
  out: MicrostripStatic = createMicrostripStatic(),
): MicrostripStatic {
  requireGeometry('microstrip (Hammerstad–Jensen)', w, h, t, er);
  const u = w / h;
  hjThicknessIncrements(u, t / h, er, incr);
  const u1 = u + incr[0]!;
  const ur = u + incr[1]!;
  const z1 = hjAirImpedance(u1);
  const zr = hjAirImpedance(ur);
  const er0 = hjEffectivePermittivity(ur, er);
  const ratio = z1 / zr;
  out.z0 = zr / Math.sqrt(er0);
  out.eeff = er0 * ratio * ratio;
  out.z0Air = z1;
  out.u1 = u1;
  out.ur = ur;
  return out;
}

// ------------------------------------------------------------------------------------------------
// dispersion

/** Normalised frequency f·h in GHz·mm, as [KJ] and [JK] use it. */
function fhGHzMm(f: number, h: number): number {
  return f * h * 1e-6;
}

/**
 * [KJ] effective permittivity at frequency f (coefficients (from memory)), with u = w/h and
 * fn = f·h in GHz·mm:
 *   P1 = 0.27488 + (0.6315 + 0.525/(1 + 0.0157·fn)^20)·u − 0.065683·exp(−8.7513·u)
 *   P2 = 0.33622·(1 − exp(−0.03442·εr))
 *   P3 = 0.0363·exp(−4.6·u)·(1 − exp(−(fn/38.7)^4.97))
 *   P4 = 1 + 2.751·(1 − exp(−(εr/15.916)^8))
 *   P  = P1·P2·((0.1844 + P3·P4)·fn)^1.5763
 *   εeff(f) = εr − (εr − εeff0)/(1 + P).
 * εeff(0) = εeff0 and εeff(f) → εr as f → ∞. `eeff0` is the quasi-static value (thickness-corrected
 * if wanted); u is the physical w/h. Range: 0.1 ≤ u ≤ 100, 1 ≤ εr ≤ 20, h/λ0 ≤ 0.13 (from memory).
 */
export function kjEffectivePermittivity(f: number, w: number, h: number, er: number, eeff0: number): number {
  requireFrequency('microstrip εeff(f) (Kirschning–Jansen)', f);
  requirePositive('microstrip εeff(f) (Kirschning–Jansen)', 'strip width w (m)', w);
  requirePositive('microstrip εeff(f) (Kirschning–Jansen)', 'substrate height h (m)', h);
  requirePermittivity('microstrip εeff(f) (Kirschning–Jansen)', er);
  if (!(eeff0 >= 1 && eeff0 <= er)) throw new RangeError(`microstrip εeff(f) (Kirschning–Jansen): the quasi-static εeff must lie in [1, εr], got ${eeff0}`);
  const u = w / h;
  const fn = fhGHzMm(f, h);
  const p1 = 0.27488 + (0.6315 + 0.525 / Math.pow(1 + 0.0157 * fn, 20)) * u - 0.065683 * Math.exp(-8.7513 * u);
  const p2 = 0.33622 * (1 - Math.exp(-0.03442 * er));
  const p3 = 0.0363 * Math.exp(-4.6 * u) * (1 - Math.exp(-Math.pow(fn / 38.7, 4.97)));
  const p4 = 1 + 2.751 * (1 - Math.exp(-Math.pow(er / 15.916, 8)));
  const p = p1 * p2 * Math.pow((0.1844 + p3 * p4) * fn, 1.5763);
  return er - (er - eeff0) / (1 + p);
}

/**
 * [JK] characteristic impedance at frequency f, power–current definition (coefficients
 * (from memory)), with u = w/h, fn = f·h in GHz·mm, εe0 = quasi-static εeff, εef = εeff(f) from [KJ]:
 *   R1 = 0.03891·εr^1.4            R2 = 0.267·u^7            R3 = 4.766·exp(−3.228·u^0.641)
 *   R4 = 0.016 + (0.0514·εr)^4.524 R5 = (fn/28.843)^12       R6 = 22.2·u^1.92
 *   R7 = 1.206 − 0.3144·exp(−R1)·(1 − exp(−R2))
 *   R8 = 1 + 1.275·(1 − exp(−0.004625·R3·εr^1.674·(fn/18.365)^2.745))
 *   R9 = 5.086·R4·R5/(0.3838 + 0.386·R4) · exp(−R6)/(1 + 1.2992·R5) · (εr − 1)^6/(1 + 10·(εr − 1)^6)
 *   R10 = 0.00044·εr^2.136 + 0.0184
 *   R11 = (fn/19.47)^6/(1 + 0.0962·(fn/19.47)^6)
 *   R12 = 1/(1 + 0.00245·u²)
 *   R13 = 0.9408·εef^R8 − 0.9603
 *   R14 = (0.9408 − R9)·εe0^R8 − 0.9603
 *   R15 = 0.707·R10·(fn/12.3)^1.097
 *   R16 = 1 + 0.0503·εr²·R11·(1 − exp(−(u/15)^6))
 *   R17 = R7·(1 − 1.1241·(R12/R16)·exp(−0.026·fn^1.15656 − R15))
 *   Z0(f) = Z0(0)·(R13/R14)^R17.
 * At f = 0, R8 = 1 and R9 = 0, so Z0(0) is returned unchanged; for εr = 1 there is no dispersion.
 * Range: 0.1 ≤ u ≤ 10, 1 ≤ εr ≤ 18, f·h ≤ 15 GHz·mm (from memory). Near εeff ≈ 1.02 both R13 and
 * R14 pass through zero (εeff^R8 = 0.9603/0.9408), so for 1 < εr ≲ 1.1 the result is ill-conditioned
 * (our own observation from evaluating the formula, e.g. ±3 % swings at f·h = 15 GHz·mm), and where
 * R13/R14 ≤ 0 it is undefined: that throws.
 */
export function jkImpedance(
  f: number,
  w: number,
  h: number,
  er: number,
  eeff0: number,
  eeffF: number,
  z0Static: number,
): number {
  requireFrequency('microstrip Z0(f) (Jansen–Kirschning)', f);
  requirePositive('microstrip Z0(f) (Jansen–Kirschning)', 'strip width w (m)', w);
  requirePositive('microstrip Z0(f) (Jansen–Kirschning)', 'substrate height h (m)', h);
  requirePermittivity('microstrip Z0(f) (Jansen–Kirschning)', er);
  requirePositive('microstrip Z0(f) (Jansen–Kirschning)', 'static impedance (Ω)', z0Static);
  if (f === 0 || er === 1) return z0Static;
  const u = w / h;
  const fn = fhGHzMm(f, h);
  const r1 = 0.03891 * Math.pow(er, 1.4);
  const r2 = 0.267 * Math.pow(u, 7);
  const r3 = 4.766 * Math.exp(-3.228 * Math.pow(u, 0.641));
  const r4 = 0.016 + Math.pow(0.0514 * er, 4.524);
  const r5 = Math.pow(fn / 28.843, 12);
  const r6 = 22.2 * Math.pow(u, 1.92);
  const r7 = 1.206 - 0.3144 * Math.exp(-r1) * (1 - Math.exp(-r2));
  const r8 = 1 + 1.275 * (1 - Math.exp(-0.004625 * r3 * Math.pow(er, 1.674) * Math.pow(fn / 18.365, 2.745)));
  const e6 = Math.pow(er - 1, 6);
  const r9 = ((5.086 * r4 * r5) / (0.3838 + 0.386 * r4)) * (Math.exp(-r6) / (1 + 1.2992 * r5)) * (e6 / (1 + 10 * e6));
  const r10 = 0.00044 * Math.pow(er, 2.136) + 0.0184;
  const x11 = Math.pow(fn / 19.47, 6);
  const r11 = x11 / (1 + 0.0962 * x11);
  const r12 = 1 / (1 + 0.00245 * u * u);
  const r13 = 0.9408 * Math.pow(eeffF, r8) - 0.9603;
  const r14 = (0.9408 - r9) * Math.pow(eeff0, r8) - 0.9603;
  const r15 = 0.707 * r10 * Math.pow(fn / 12.3, 1.097);
  const r16 = 1 + 0.0503 * er * er * r11 * (1 - Math.exp(-Math.pow(u / 15, 6)));
  const r17 = r7 * (1 - 1.1241 * (r12 / r16) * Math.exp(-0.026 * Math.pow(fn, 1.15656) - r15));
  const q = r13 / r14;
  if (!(q > 0 && q < Infinity)) {
    throw new RangeError(
      `microstrip Z0(f) (Jansen–Kirschning): the Z0 dispersion model is undefined here (R13/R14 = ${q}), as happens for εr just above 1 or far outside its ranges (εr = ${er}, w/h = ${u})`,
    );
  }
  return z0Static * Math.pow(q, r17);
}

/** Result of {@link microstripDispersive}. */
export interface MicrostripDispersive {
  /** Characteristic impedance at f ([JK]), Ω. */
  z0: number;
  /** Effective permittivity at f ([KJ]). */
  eeff: number;
  /** Quasi-static impedance ([HJ]), Ω. */
  z0Static: number;
  /** Quasi-static effective permittivity ([HJ]). */
  eeffStatic: number;
  /** Air impedance of the thick strip, Z01(u1), Ω. */
  z0Air: number;
}

/** Allocates a {@link MicrostripDispersive} to reuse as `out`. */
export function createMicrostripDispersive(): MicrostripDispersive {
  return { z0: 0, eeff: 0, z0Static: 0, eeffStatic: 0, z0Air: 0 };
}

const stat = createMicrostripStatic();

/**
 * Z0(f) and εeff(f) of a microstrip: [HJ] quasi-static values with the thickness correction,
 * then [KJ] for εeff and [JK] for Z0 (both with the physical u = w/h). Throws RangeError on
 * invalid input (see {@link microstripStatic}) or f < 0.
 */
export function microstripDispersive(
  f: number,
  w: number,
  h: number,
  t: number,
  er: number,
  out: MicrostripDispersive = createMicrostripDispersive(),
): MicrostripDispersive {
  requireFrequency('microstrip dispersion', f);
  microstripStatic(w, h, t, er, stat);
  const eeffF = kjEffectivePermittivity(f, w, h, er, stat.eeff);
  out.z0Static = stat.z0;
  out.eeffStatic = stat.eeff;
  out.z0Air = stat.z0Air;
  out.eeff = eeffF;
  out.z0 = jkImpedance(f, w, h, er, stat.eeff, eeffF, stat.z0);
  return out;
}

// ------------------------------------------------------------------------------------------------
// losses

/** Skin depth δ = 1/√(π·f·μ0·σ), m, of a non-magnetic conductor (common practice). f > 0, σ > 0. */
export function skinDepth(f: number, sigma: number): number {
  requirePositive('skin depth', 'frequency f (Hz)', f);
  requirePositive('skin depth', 'conductivity σ (S/m)', sigma);
  return 1 / Math.sqrt(Math.PI * f * MU0 * sigma);
}

/**
 * Surface resistance Rs = √(π·f·μ0/σ) = 1/(σ·δ), Ω per square (common practice). f ≥ 0, σ > 0;
 * σ = Infinity (perfect conductor) gives 0.
 */
export function surfaceResistance(f: number, sigma: number): number {
  requireFrequency('surface resistance', f);
  if (!(sigma > 0)) throw new RangeError(`surface resistance: conductivity σ (S/m) must be above 0, got ${sigma}`);
  return Math.sqrt((Math.PI * f * MU0) / sigma);
}

/**
 * [HB] surface-roughness factor of conductor loss: Kr = 1 + (2/π)·atan(1.4·(Δ/δ)²), Δ the rms
 * surface roughness (coefficients (from memory)). 1 for a smooth surface, tends to 2 for Δ ≫ δ.
 * `rms` ≥ 0 in metres; at f = 0 (δ infinite) the factor is 1.
 */
export function roughnessFactor(f: number, sigma: number, rms: number): number {
  requireFrequency('roughness factor', f);
  requireNonNegative('roughness factor', 'rms roughness (m)', rms);
  if (rms === 0 || f === 0 || sigma === Infinity) return 1;
  const r = rms / skinDepth(f, sigma);
  return 1 + (2 / Math.PI) * Math.atan(1.4 * r * r);
}

/** Air impedance of a thick strip as a function of the three dimensions (see microstripStatic). */
function airImpedance(w: number, h: number, t: number): number {
  const u = w / h;
  hjThicknessIncrements(u, t / h, 1, incr);
  return hjAirImpedance(u + incr[0]!);
}

/**
 * Conductor attenuation of a microstrip, Np/m, by Wheeler's incremental-inductance rule [WH]
 * applied to the [HJ] air impedance with thickness correction:
 *   R' = (Rs/μ0)·∂L'/∂n = (Rs/η0)·∂Z0air/∂n,   αc = Kr·R'/(2·Z0),
 * where n is the recession of every conductor surface into the metal (w → w − 2n, t → t − 2n,
 * h → h + 2n: strip underside and ground plane both recede), L' = Z0air/c0, Z0 the quasi-static
 * impedance on the substrate, Kr the [HB] roughness factor. ∂/∂n is a central difference with
 * n = 1e-5·min(w, h, t)/2 (truncation and rounding both near 1e-10 relative).
 * Wide-strip limit: αc → Rs/(Z0·w), the parallel-plate value (common practice).
 * Range: needs t > 0 (an infinitely thin strip has unbounded edge loss in this rule) and is meant
 * for t several skin depths thick; quasi-static (no dispersion of the current distribution).
 * σ = Infinity gives 0. Throws RangeError on invalid input.
 */
export function microstripConductorLoss(
  f: number,
  w: number,
  h: number,
  t: number,
  er: number,
  sigma: number,
  rmsRoughness = 0,
): number {
  const where = 'microstrip conductor loss';
  requireFrequency(where, f);
  requireGeometry(where, w, h, t, er);
  requirePositive(where, 'strip thickness t (m) (the incremental-inductance rule needs t > 0)', t);
  if (!(sigma > 0)) throw new RangeError(`${where}: conductivity σ (S/m) must be above 0, got ${sigma}`);
  requireNonNegative(where, 'rms roughness (m)', rmsRoughness);
  if (f === 0 || sigma === Infinity) return 0;
  const rs = surfaceResistance(f, sigma);
  const kr = roughnessFactor(f, sigma, rmsRoughness);
  const n = 0.5e-5 * Math.min(w, h, t);
  const zIn = airImpedance(w - 2 * n, h + 2 * n, t - 2 * n);
  const zOut = airImpedance(w + 2 * n, h - 2 * n, t + 2 * n);
  const dZdn = (zIn - zOut) / (2 * n);
  microstripStatic(w, h, t, er, stat);
  return (kr * rs * dZdn) / (2 * ETA0 * stat.z0);
}

/**
 * Dielectric attenuation of a quasi-TEM line, Np/m ([PZ], common practice):
 *   αd = (π/λ0)·(εr/√εeff)·((εeff − 1)/(εr − 1))·tan δ,  λ0 = c0/f.
 * (εeff − 1)/(εr − 1) is the filling factor; for εr = 1 it is taken as 1 (so εeff must be 1 too).
 * With εeff = εr it is the plane-wave value (π/λ0)·√εr·tan δ. Pass the εeff in use (quasi-static
 * or dispersive). Requires 1 ≤ εeff ≤ εr, tan δ ≥ 0.
 */
export function dielectricLoss(f: number, er: number, eeff: number, tanDelta: number): number {
  const where = 'dielectric loss';
  requireFrequency(where, f);
  requirePermittivity(where, er);
  if (!(eeff >= 1 && eeff <= er)) throw new RangeError(`${where}: εeff must lie in [1, εr], got ${eeff}`);
  requireNonNegative(where, 'loss tangent tan δ', tanDelta);
  const fill = er === 1 ? 1 : (eeff - 1) / (er - 1);
  return ((Math.PI * f) / SPEED_OF_LIGHT) * (er / Math.sqrt(eeff)) * fill * tanDelta;
}

/** Everything about a microstrip at one frequency, for {@link microstripAt}. */
export interface MicrostripSpec {
  /** Strip width, m (> 0). */
  w: number;
  /** Substrate height, m (> 0). */
  h: number;
  /** Strip thickness, m (≥ 0; must be > 0 when `sigma` is finite). */
  t: number;
  /** Substrate relative permittivity (≥ 1). */
  er: number;
  /** Substrate loss tangent (≥ 0); omitted means 0. */
  tanDelta?: number;
  /** Conductor conductivity, S/m (> 0); omitted or Infinity means a perfect conductor. */
  sigma?: number;
  /** Rms surface roughness of the conductors, m (≥ 0); omitted means smooth. */
  roughness?: number;
}

/** Result of {@link microstripAt}. */
export interface MicrostripAt extends MicrostripDispersive {
  /** Phase constant β = 2π·f·√εeff(f)/c0, rad/m. */
  beta: number;
  /** Conductor attenuation, Np/m. */
  alphaConductor: number;
  /** Dielectric attenuation, Np/m. */
  alphaDielectric: number;
  /** Conductor attenuation, dB/m. */
  alphaConductorDb: number;
  /** Dielectric attenuation, dB/m. */
  alphaDielectricDb: number;
}

/** Allocates a {@link MicrostripAt} to reuse as `out`. */
export function createMicrostripAt(): MicrostripAt {
  return {
    z0: 0,
    eeff: 0,
    z0Static: 0,
    eeffStatic: 0,
    z0Air: 0,
    beta: 0,
    alphaConductor: 0,
    alphaDielectric: 0,
    alphaConductorDb: 0,
    alphaDielectricDb: 0,
  };
}

/**
 * Z0(f), εeff(f), β and both losses of a microstrip at frequency f. The dielectric loss uses the
 * dispersive εeff(f); the conductor loss is quasi-static (see {@link microstripConductorLoss}).
 * Allocation-free when `out` is given. Throws RangeError on invalid input.
 */
export function microstripAt(f: number, spec: MicrostripSpec, out: MicrostripAt = createMicrostripAt()): MicrostripAt {
  microstripDispersive(f, spec.w, spec.h, spec.t, spec.er, out);
  const sigma = spec.sigma ?? Infinity;
  out.beta = (2 * Math.PI * f * Math.sqrt(out.eeff)) / SPEED_OF_LIGHT;
  out.alphaConductor =
    sigma === Infinity ? 0 : microstripConductorLoss(f, spec.w, spec.h, spec.t, spec.er, sigma, spec.roughness ?? 0);
  out.alphaDielectric = dielectricLoss(f, spec.er, out.eeff, spec.tanDelta ?? 0);
  out.alphaConductorDb = out.alphaConductor * DB_PER_NEPER;
  out.alphaDielectricDb = out.alphaDielectric * DB_PER_NEPER;
  return out;
}

// ------------------------------------------------------------------------------------------------
// synthesis

/**
 * [H75] closed-form width ratio w/h for a target Z0 on εr (zero thickness, quasi-static;
 * coefficients (from memory)):
 *   A = (Z0/60)·√((εr + 1)/2) + ((εr − 1)/(εr + 1))·(0.23 + 0.11/εr),   B = 377π/(2·Z0·√εr),
 *   w/h = 8·e^A/(e^(2A) − 2)                                     when that is below 2,
 *   w/h = (2/π)·[B − 1 − ln(2B − 1) + ((εr − 1)/(2εr))·(ln(B − 1) + 0.39 − 0.61/εr)]  otherwise.
 * Used as the starting point of {@link microstripWidth}; stated accuracy about 1 % (from memory).
 */
export function hammerstadWidthRatio(z0: number, er: number): number {
  requirePositive('microstrip synthesis (Hammerstad)', 'target impedance Z0 (Ω)', z0);
  requirePermittivity('microstrip synthesis (Hammerstad)', er);
  const a = (z0 / 60) * Math.sqrt((er + 1) / 2) + ((er - 1) / (er + 1)) * (0.23 + 0.11 / er);
  const narrow = (8 * Math.exp(a)) / (Math.exp(2 * a) - 2);
  if (narrow > 0 && narrow < 2) return narrow;
  const b = (377 * Math.PI) / (2 * z0 * Math.sqrt(er));
  return (2 / Math.PI) * (b - 1 - Math.log(2 * b - 1) + ((er - 1) / (2 * er)) * (Math.log(b - 1) + 0.39 - 0.61 / er));
}

/**
 * Brent's method (R. P. Brent, "Algorithms for Minimization without Derivatives", 1973, ch. 4:
 * inverse quadratic interpolation, secant and bisection) for g(x) = 0 on [a, b] with
 * g(a)·g(b) < 0; stops when the bracket is below 4ε|x| + xtol.
 */
function brentZero(g: (x: number) => number, a: number, b: number, fa: number, fb: number, xtol: number): number {
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 0; iter < 200; iter++) {
    if ((fb > 0 && fc > 0) || (fb < 0 && fc < 0)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 0.5 * xtol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = g(b);
  }
  return b;
}

/** Widest and narrowest w/h the synthesis searches. */
const U_MIN = 1e-6;
const U_MAX = 1e6;

/**
 * Strip width w, m, for a target characteristic impedance: inverts the analysis numerically.
 * With f = 0 the target is the [HJ] quasi-static Z0 (with thickness t); with f > 0 it is the
 * dispersive Z0(f) of [JK]. Starts from {@link hammerstadWidthRatio}, brackets the root in ln(w/h)
 * by expanding steps (w/h within [1e-6, 1e6]) and refines it with Brent's method to 1e-14 in
 * ln(w/h), so the width is exact to ~1e-14 relative and Z0(w) matches the target far inside 1e-9.
 * Throws RangeError on invalid input or when no width in that range gives the target.
 */
export function microstripWidth(z0Target: number, h: number, t: number, er: number, f = 0): number {
  const where = 'microstrip synthesis';
  requirePositive(where, 'target impedance Z0 (Ω)', z0Target);
  requirePositive(where, 'substrate height h (m)', h);
  requireNonNegative(where, 'strip thickness t (m)', t);
  requirePermittivity(where, er);
  requireFrequency(where, f);
  const disp = createMicrostripDispersive();
  const g = (x: number): number => {
    const w = h * Math.exp(x);
    const z = f === 0 ? microstripStatic(w, h, t, er, stat).z0 : microstripDispersive(f, w, h, t, er, disp).z0;
    return z - z0Target;
  };
  const lo = Math.log(U_MIN);
  const hi = Math.log(U_MAX);
  let guess = hammerstadWidthRatio(z0Target, er);
  if (!(guess > 0 && Number.isFinite(guess))) guess = 1;
  let x0 = Math.min(hi, Math.max(lo, Math.log(guess)));
  let g0 = g(x0);
  if (!Number.isFinite(g0)) throw new RangeError(`${where}: the model cannot be evaluated at the starting width`);
  if (g0 === 0) return h * Math.exp(x0);
  // Z0 falls as the strip widens: too high an impedance means go wider.
  const dir = g0 > 0 ? 1 : -1;
  let step = 0.05;
  for (;;) {
    const x1 = Math.min(hi, Math.max(lo, x0 + dir * step));
    const g1 = g(x1);
    if (!Number.isFinite(g1)) throw new RangeError(`${where}: the model cannot be evaluated at w/h = ${Math.exp(x1)}`);
    if (g1 === 0) return h * Math.exp(x1);
    if (g1 > 0 !== g0 > 0) {
      const x = x1 > x0 ? brentZero(g, x0, x1, g0, g1, 1e-14) : brentZero(g, x1, x0, g1, g0, 1e-14);
      return h * Math.exp(x);
    }
    if (x1 === lo || x1 === hi) {
      throw new RangeError(
        `${where}: no strip width with ${U_MIN} ≤ w/h ≤ ${U_MAX} gives Z0 = ${z0Target} Ω on εr = ${er}`,
      );
    }
    x0 = x1;
    g0 = g1;
    step *= 2;
  }
}

// ------------------------------------------------------------------------------------------------
// validity ranges

/**
 * Lists, in words, where the given microstrip lies outside the stated range of a model used for it
 * (empty when all are inside). Meant for elaboration-time warnings; allocates. Ranges (from memory,
 * see the module doc): [HJ] εeff 0.01 ≤ u ≤ 100, εr ≤ 128; [HJ] Z01 u ≤ 1000; [KJ] 0.1 ≤ u ≤ 100,
 * εr ≤ 20, h/λ0 ≤ 0.13; [JK] 0.1 ≤ u ≤ 10, εr ≤ 18, f·h ≤ 15 GHz·mm; and our own thresholds, not
 * from the sources: thickness correction t < h, conductor loss t ≥ 3δ, [JK] not for 1 < εr < 1.1.
 * Inputs are validated as in {@link microstripAt}; `sigma` may be omitted.
 */
export function microstripRangeIssues(f: number, spec: MicrostripSpec): string[] {
  const { w, h, t, er } = spec;
  requireGeometry('microstrip ranges', w, h, t, er);
  requireFrequency('microstrip ranges', f);
  const u = w / h;
  const issues: string[] = [];
  if (u < 0.01 || u > 100) issues.push(`w/h = ${u} is outside 0.01…100, the range of the Hammerstad–Jensen εeff`);
  if (u > 1000) issues.push(`w/h = ${u} is above 1000, the range of the Hammerstad–Jensen impedance`);
  if (er > 128) issues.push(`εr = ${er} is above 128, the range of the Hammerstad–Jensen εeff`);
  if (t >= h) issues.push(`t = ${t} m is not below h = ${h} m; the thickness correction is meant for thin strips`);
  if (f > 0) {
    const hl = (h * f) / SPEED_OF_LIGHT;
    if (u < 0.1 || u > 100) issues.push(`w/h = ${u} is outside 0.1…100, the range of the Kirschning–Jansen εeff(f)`);
    if (er > 20) issues.push(`εr = ${er} is above 20, the range of the Kirschning–Jansen εeff(f)`);
    if (hl > 0.13) issues.push(`h/λ0 = ${hl} is above 0.13, the range of the Kirschning–Jansen εeff(f)`);
    if (u < 0.1 || u > 10) issues.push(`w/h = ${u} is outside 0.1…10, the range of the Jansen–Kirschning Z0(f)`);
    if (er > 18) issues.push(`εr = ${er} is above 18, the range of the Jansen–Kirschning Z0(f)`);
    if (er > 1 && er < 1.1) {
      issues.push(`εr = ${er} is just above 1, where the Jansen–Kirschning Z0(f) is ill-conditioned (our own observation)`);
    }
    const fn = fhGHzMm(f, h);
    if (fn > 15) issues.push(`f·h = ${fn} GHz·mm is above 15, the range of the Jansen–Kirschning Z0(f)`);
    if (spec.sigma !== undefined && spec.sigma !== Infinity && t > 0) {
      const d = skinDepth(f, spec.sigma);
      if (t < 3 * d) issues.push(`t = ${t} m is under 3 skin depths (δ = ${d} m); the conductor loss assumes a thick conductor`);
    }
  }
  return issues;
}
