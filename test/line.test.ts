/**
 * Checks of the ideal TEM line helpers in src/models/line.ts.
 *
 * Sources (each check names its own beside it):
 * - [TL] transmission-line closed forms, common practice (e.g. Pozar, Microwave Engineering,
 *   ch. 2 — chapter (from memory)): Zin = Z0·(ZL + Z0·tanh γℓ)/(Z0 + ZL·tanh γℓ); a lossless
 *   quarter-wave line gives Zin = Z0²/ZL; a lossless half-wave line gives Zin = ZL (ABCD = −U);
 *   open stub Zin = Z0·coth γℓ, short stub Zin = Z0·tanh γℓ; β = 2πf·√εeff/c0 = 2πf/(vf·c0).
 * - [ABCD] ABCD of a line [[cosh γℓ, Z0 sinh γℓ], [sinh γℓ/Z0, cosh γℓ]], determinant 1 for a
 *   reciprocal two-port; Zin of a loaded two-port (A·ZL + B)/(C·ZL + D); ABCD → Y:
 *   Y = [[D/B, −(AD − BC)/B], [−1/B, A/B]] (common practice; Pozar's table of two-port
 *   conversions (from memory)).
 * - [Y] Y of a line y11 = y22 = coth(γℓ)/Z0, y12 = y21 = −csch(γℓ)/Z0 (common practice).
 * - [AS] series expansions, Abramowitz & Stegun, Handbook of Mathematical Functions, 4.5.64–4.5.67
 *   (equation numbers (from memory)): tanh z = z − z³/3 + 2z⁵/15 − …, coth z = 1/z + z/3 − z³/45 + …,
 *   csch z = 1/z − z/6 + 7z³/360 − …
 * - [LOSS] skin-effect conductor loss ∝ √f and constant-tan δ dielectric loss ∝ f (common practice).
 * - [NP] 1 Np = 20·log10(e) dB (common practice).
 * - [MJ] mathjs complex functions (general-purpose library) as the reference for coth, csch,
 *   sinh, cosh and complex arithmetic at moderate |γℓ|. (mathjs's coth/csch lose accuracy for
 *   |γℓ| ≲ 1e-5, so [AS] is the reference there.)
 *
 * Tolerances: stated beside each check; most are 1e-12 relative (the routines do O(10) floating
 * operations on O(1) quantities, so their rounding is ~1e-15; the margin covers the reference's own
 * rounding in mathjs).
 */
import { describe, expect, it } from 'vitest';
import * as math from 'mathjs';
import type { Complex } from 'mathjs';

import {
  DB_PER_NEPER,
  SPEED_OF_LIGHT,
  dbToNp,
  lineAbcd,
  lineAbcdFromGammaLength,
  lineConductorAttenuation,
  lineDielectricAttenuation,
  lineFromElectricalLength,
  lineFromLength,
  lineGammaLength,
  lineInputImpedance,
  linePiFromGammaLength,
  linePropagation,
  lineY,
  lineYFromGammaLength,
  npToDb,
  openStubAdmittance,
  openStubImpedance,
  shortStubAdmittance,
  shortStubImpedance,
} from '../src/models/line.js';

// ------------------------------------------------------------------------------------------------
// helpers

const c = (re: number, im = 0): Complex => math.complex(re, im);
const add = (a: Complex, b: Complex): Complex => math.add(a, b) as Complex;
const sub = (a: Complex, b: Complex): Complex => math.subtract(a, b) as Complex;
const mul = (a: Complex, b: Complex): Complex => math.multiply(a, b) as Complex;
const div = (a: Complex, b: Complex): Complex => math.divide(a, b) as Complex;
const abs = (a: Complex): number => math.abs(a) as unknown as number;

/** Complex number at out[k], out[k + 1]. */
const at = (out: Float64Array, k = 0): Complex => c(out[k]!, out[k + 1]!);

function expectClose(actual: Complex, expected: Complex, tol: number, what: string): void {
  const d = abs(sub(actual, expected));
  if (!(d <= tol)) {
    throw new Error(`${what}: got ${math.format(actual, 17)}, expected ${math.format(expected, 17)} (|diff| ${d} > ${tol})`);
  }
}

function expectRel(actual: Complex, expected: Complex, rel: number, what: string): void {
  expectClose(actual, expected, rel * abs(expected), what);
}

/** Zin of a two-port with ABCD at out[0..7] loaded by zl: (A·ZL + B)/(C·ZL + D) [ABCD]. */
function zinFromAbcd(m: Float64Array, zl: Complex): Complex {
  return div(add(mul(at(m, 0), zl), at(m, 2)), add(mul(at(m, 4), zl), at(m, 6)));
}

/** Zin of a two-port with Y at out[0..7] loaded by zl: 1/(y11 − y12·y21/(y22 + 1/ZL)). */
function zinFromY(y: Float64Array, zl: Complex): Complex {
  const yl = div(c(1), zl);
  return div(c(1), sub(at(y, 0), div(mul(at(y, 2), at(y, 4)), add(at(y, 6), yl))));
}

const F0 = 1e9;
const Z0 = 50;

// ------------------------------------------------------------------------------------------------

describe('propagation constant and line construction', () => {
  it('physical length: β = 2πf·√εeff/c0, so ℓ = c0/(4·f0·√εeff) is a quarter wave at f0 [TL]', () => {
    const eeff = 6.5;
    const length = SPEED_OF_LIGHT / (4 * F0 * Math.sqrt(eeff));
    const line = lineFromLength({ z0: Z0, length, eeff });
    const g = lineGammaLength(line, F0, new Float64Array(2));
    // tolerance 1e-15 relative: a product and a quotient of exact-ish numbers
    expect(Math.abs(g[1]! - Math.PI / 2)).toBeLessThanOrEqual(1e-15 * Math.PI);
    expect(g[0]).toBe(0); // lossless: α = 0 exactly
    // β per metre [TL]
    const p = linePropagation(line, 3 * F0, new Float64Array(2));
    expect(Math.abs(p[1]! / ((2 * Math.PI * 3 * F0 * Math.sqrt(eeff)) / SPEED_OF_LIGHT) - 1)).toBeLessThanOrEqual(1e-15);
  });

  it('velocity factor vf = 1/√εeff gives the same phase as εeff [TL]', () => {
    const eeff = 3.3;
    const a = lineFromLength({ z0: Z0, length: 0.0123, eeff });
    const b = lineFromLength({ z0: Z0, length: 0.0123, velocityFactor: 1 / Math.sqrt(eeff) });
    // tolerance 1e-15 relative: 1/(1/√εeff) differs from √εeff by at most one rounding
    expect(Math.abs(b.phasePerHz / a.phasePerHz - 1)).toBeLessThanOrEqual(1e-15);
    // neither given: air, β = 2πf/c0 [TL]
    const air = lineFromLength({ z0: Z0, length: 1 });
    expect(Math.abs(air.phasePerHz / ((2 * Math.PI) / SPEED_OF_LIGHT) - 1)).toBeLessThanOrEqual(1e-15);
  });

  it('electrical length: βℓ = θ·f/f0 (β ∝ f) [TL]', () => {
    const line = lineFromElectricalLength({ z0: Z0, theta: 1.234, at: F0 });
    const g = new Float64Array(2);
    for (const k of [0, 0.5, 1, 2, 7.5]) {
      lineGammaLength(line, k * F0, g);
      // tolerance 2e-16·θ·k + 0: one multiplication and one division
      expect(Math.abs(g[1]! - 1.234 * k)).toBeLessThanOrEqual(4e-16 * 1.234 * Math.max(k, 1));
    }
    expect(Number.isNaN(line.length)).toBe(true);
    expect(() => linePropagation(line, F0, g)).toThrow(/no physical length/);
  });

  it('loss scaling at 4·f0: conductor term ×2 (∝ √f), dielectric term ×4 (∝ f) [LOSS]', () => {
    const length = 0.05;
    const line = lineFromLength({ z0: Z0, length, eeff: 2, loss: { conductor: 0.3, dielectric: 0.1, at: F0 } });
    // tolerance 1e-15 relative: √4 = 2 and 4·x are exact in binary, only the ℓ products round
    expect(Math.abs(lineConductorAttenuation(line, F0) - 0.3 * length)).toBeLessThanOrEqual(1e-15);
    expect(Math.abs(lineDielectricAttenuation(line, F0) - 0.1 * length)).toBeLessThanOrEqual(1e-15);
    expect(Math.abs(lineConductorAttenuation(line, 4 * F0) / lineConductorAttenuation(line, F0) - 2)).toBeLessThanOrEqual(1e-15);
    expect(Math.abs(lineDielectricAttenuation(line, 4 * F0) / lineDielectricAttenuation(line, F0) - 4)).toBeLessThanOrEqual(1e-15);
    // total αℓ is the sum of the two terms; α per metre is αℓ/ℓ
    const g = lineGammaLength(line, 4 * F0, new Float64Array(2));
    expect(Math.abs(g[0]! - (2 * 0.3 + 4 * 0.1) * length)).toBeLessThanOrEqual(1e-15);
    const p = linePropagation(line, 4 * F0, new Float64Array(2));
    expect(Math.abs(p[0]! - (2 * 0.3 + 4 * 0.1))).toBeLessThanOrEqual(1e-14);
    // no DC resistance in this model: α(0) = 0
    expect(lineGammaLength(line, 0, g)[0]).toBe(0);
  });

  it('electrical-length line with loss per metre uses the given physical length', () => {
    const line = lineFromElectricalLength({ z0: Z0, theta: Math.PI / 2, at: F0, length: 0.02, loss: { conductor: 1, dielectric: 2, at: F0 } });
    const g = lineGammaLength(line, F0, new Float64Array(2));
    expect(Math.abs(g[0]! - 3 * 0.02)).toBeLessThanOrEqual(1e-16);
    expect(() => lineFromElectricalLength({ z0: Z0, theta: 1, at: F0, loss: { conductor: 1, dielectric: 0, at: F0 } })).toThrow(
      /physical length/,
    );
  });

  it('decibels and nepers: 1 Np = 20·log10(e) dB [NP]', () => {
    const ref = 20 * (math.log10(math.e) as number);
    expect(Math.abs(DB_PER_NEPER - ref)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs(npToDb(1) - ref)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs(dbToNp(ref) - 1)).toBeLessThanOrEqual(1e-15);
  });

  it('rejects invalid input with clear errors', () => {
    expect(() => lineFromLength({ z0: 0, length: 1 })).toThrow(/z0/);
    expect(() => lineFromLength({ z0: Z0, length: -1 })).toThrow(/length/);
    expect(() => lineFromLength({ z0: Z0, length: 1, eeff: 0.5 })).toThrow(/eeff/);
    expect(() => lineFromLength({ z0: Z0, length: 1, velocityFactor: 1.2 })).toThrow(/velocityFactor/);
    expect(() => lineFromLength({ z0: Z0, length: 1, eeff: 2, velocityFactor: 0.7 })).toThrow(/not both/);
    expect(() => lineFromLength({ z0: Z0, length: 1, loss: { conductor: -1, dielectric: 0, at: F0 } })).toThrow(/conductor/);
    expect(() => lineFromLength({ z0: Z0, length: 1, loss: { conductor: 0, dielectric: 0, at: 0 } })).toThrow(/loss\.at/);
    expect(() => lineFromElectricalLength({ z0: Z0, theta: 0, at: F0 })).toThrow(/theta/);
    expect(() => lineFromElectricalLength({ z0: Z0, theta: 1, at: Number.NaN })).toThrow(/at/);
    const line = lineFromLength({ z0: Z0, length: 1 });
    expect(() => lineGammaLength(line, -1, new Float64Array(2))).toThrow(/frequency/);
  });
});

describe('classic line transformations', () => {
  const zl = c(25, 10);

  it('lossless quarter-wave line: Zin = Z0²/ZL, from ABCD, Y and the direct formula [TL]', () => {
    const line = lineFromElectricalLength({ z0: Z0, theta: Math.PI / 2, at: F0 });
    const expected = div(c(Z0 * Z0), zl);
    const m = lineAbcd(line, F0, new Float64Array(8));
    // tolerance 1e-12 relative: cos(π/2) ≈ 6e-17 in floating point, the rest is a few roundings
    expectRel(zinFromAbcd(m, zl), expected, 1e-12, 'quarter-wave Zin from ABCD');
    const y = new Float64Array(8);
    expect(lineY(line, F0, y)).toBe(true);
    expectRel(zinFromY(y, zl), expected, 1e-12, 'quarter-wave Zin from Y');
    const zin = lineInputImpedance(Z0, 0, Math.PI / 2, zl.re, zl.im, new Float64Array(2));
    expectRel(at(zin), expected, 1e-12, 'quarter-wave Zin direct');
  });

  it('lossless half-wave line is transparent: ABCD = −U and Zin = ZL; Y does not exist there [TL]', () => {
    const line = lineFromElectricalLength({ z0: Z0, theta: Math.PI, at: F0 });
    const m = lineAbcd(line, F0, new Float64Array(8));
    // tolerance 1e-15 on A, D (cos π = −1 exactly in floating point) and 1e-14·Z0 on B (sin π ≈ 1.2e-16)
    expectClose(at(m, 0), c(-1), 1e-15, 'A');
    expectClose(at(m, 6), c(-1), 1e-15, 'D');
    expectClose(at(m, 2), c(0), 1e-14 * Z0, 'B');
    expectClose(at(m, 4), c(0), 1e-14 / Z0, 'C');
    expectRel(zinFromAbcd(m, zl), zl, 1e-12, 'half-wave Zin');
    expectRel(at(lineInputImpedance(Z0, 0, Math.PI, zl.re, zl.im, new Float64Array(2))), zl, 1e-12, 'half-wave Zin direct');
    expect(lineY(line, F0, new Float64Array(8))).toBe(false); // on the pole of Y
  });

  it('λ/8 stubs: open Zin = −jZ0, short Zin = +jZ0 [TL]', () => {
    const b = Math.PI / 4;
    const out = new Float64Array(2);
    // tolerance 1e-14·Z0: tan(π/4) is 1 to within one rounding
    expectClose(at(openStubImpedance(Z0, 0, b, out)), c(0, -Z0), 1e-14 * Z0, 'open λ/8');
    expectClose(at(shortStubImpedance(Z0, 0, b, out)), c(0, Z0), 1e-14 * Z0, 'short λ/8');
    expectClose(at(openStubAdmittance(Z0, 0, b, out)), c(0, 1 / Z0), 1e-14 / Z0, 'open λ/8 admittance');
    expectClose(at(shortStubAdmittance(Z0, 0, b, out)), c(0, -1 / Z0), 1e-14 / Z0, 'short λ/8 admittance');
  });

  it('λ/4 stubs: open is a short (Zin = 0), short is an open (Yin = 0) [TL]', () => {
    const out = new Float64Array(2);
    // tolerance 1e-14·Z0: the zero comes from sin(π) ≈ 1.2e-16
    expect(abs(at(openStubImpedance(Z0, 0, Math.PI / 2, out)))).toBeLessThanOrEqual(1e-14 * Z0);
    expect(abs(at(shortStubAdmittance(Z0, 0, Math.PI / 2, out)))).toBeLessThanOrEqual(1e-14 / Z0);
  });

  it('lossy stubs and loaded line match Z0·coth, Z0·tanh and the Zin formula [TL][MJ]', () => {
    const out = new Float64Array(2);
    for (const [a, b] of [
      [0.1, 0.7],
      [0.5, 2.9],
      [1.5, 10.2],
      [0.01, 4.0],
    ] as const) {
      const z = c(a, b);
      // tolerance 1e-12 relative
      expectRel(at(openStubImpedance(Z0, a, b, out)), mul(c(Z0), math.coth(z) as Complex), 1e-12, `open stub ${a}+j${b}`);
      expectRel(at(shortStubImpedance(Z0, a, b, out)), mul(c(Z0), math.tanh(z) as Complex), 1e-12, `short stub ${a}+j${b}`);
      const t = math.tanh(z) as Complex;
      const zin = mul(c(Z0), div(add(zl, mul(c(Z0), t)), add(c(Z0), mul(zl, t))));
      expectRel(at(lineInputImpedance(Z0, a, b, zl.re, zl.im, out)), zin, 1e-12, `loaded line ${a}+j${b}`);
    }
  });
});

describe('Y and ABCD matrices', () => {
  const samples: ReadonlyArray<readonly [number, number]> = [
    [0, 0.3],
    [0, 2.5],
    [0.05, 1.0],
    [0.3, 4.0],
    [1.0, 0.2],
    [2.0, 17.0],
    [-0.3, 1.1], // gain (α < 0): odd symmetry coth(−z) = −coth(z)
  ];

  it('Y = [[coth, −csch], [−csch, coth]]/Z0 against mathjs [Y][MJ]', () => {
    const y = new Float64Array(8);
    for (const [a, b] of samples) {
      const z = c(a, b);
      expect(lineYFromGammaLength(Z0, a, b, y)).toBe(true);
      const y11 = div(math.coth(z) as Complex, c(Z0));
      const y12 = div(mul(c(-1), math.csch(z) as Complex), c(Z0));
      // tolerance 1e-12 relative
      expectRel(at(y, 0), y11, 1e-12, `y11 ${a}+j${b}`);
      expectRel(at(y, 2), y12, 1e-12, `y12 ${a}+j${b}`);
      expect(y[4]).toBe(y[2]); // reciprocity y21 = y12, exactly
      expect(y[5]).toBe(y[3]);
      expect(y[6]).toBe(y[0]); // symmetry y22 = y11, exactly
      expect(y[7]).toBe(y[1]);
    }
  });

  it('ABCD = [[cosh, Z0 sinh], [sinh/Z0, cosh]] against mathjs, with determinant 1 [ABCD][MJ]', () => {
    const m = new Float64Array(8);
    for (const [a, b] of samples) {
      const z = c(a, b);
      lineAbcdFromGammaLength(Z0, a, b, m);
      const ch = math.cosh(z) as Complex;
      const sh = math.sinh(z) as Complex;
      // tolerance 1e-12 relative
      expectRel(at(m, 0), ch, 1e-12, `A ${a}+j${b}`);
      expectRel(at(m, 2), mul(c(Z0), sh), 1e-12, `B ${a}+j${b}`);
      expectRel(at(m, 4), div(sh, c(Z0)), 1e-12, `C ${a}+j${b}`);
      expectRel(at(m, 6), ch, 1e-12, `D ${a}+j${b}`);
      // reciprocity: AD − BC = 1; cancellation costs |cosh|² ≤ cosh²(2) ≈ 14, tolerance 1e-13·|cosh|²
      const det = sub(mul(at(m, 0), at(m, 6)), mul(at(m, 2), at(m, 4)));
      expectClose(det, c(1), 1e-13 * Math.max(1, abs(ch) ** 2), `det ${a}+j${b}`);
    }
  });

  it('Y agrees with the ABCD → Y conversion [ABCD]', () => {
    const m = new Float64Array(8);
    const y = new Float64Array(8);
    for (const [a, b] of samples) {
      lineAbcdFromGammaLength(Z0, a, b, m);
      lineYFromGammaLength(Z0, a, b, y);
      const bb = at(m, 2);
      const det = sub(mul(at(m, 0), at(m, 6)), mul(at(m, 2), at(m, 4)));
      // tolerance 1e-12 relative
      expectRel(at(y, 0), div(at(m, 6), bb), 1e-12, `y11 ${a}+j${b}`);
      expectRel(at(y, 2), div(mul(c(-1), det), bb), 1e-12, `y12 ${a}+j${b}`);
      expectRel(at(y, 4), div(c(-1), bb), 1e-12, `y21 ${a}+j${b}`);
      expectRel(at(y, 6), div(at(m, 0), bb), 1e-12, `y22 ${a}+j${b}`);
    }
  });

  it('π-equivalent: ys = −y12 and yp = y11 + y12 = tanh(γℓ/2)/Z0 [Y][MJ]', () => {
    const p = new Float64Array(4);
    const y = new Float64Array(8);
    for (const [a, b] of samples) {
      linePiFromGammaLength(Z0, a, b, p);
      lineYFromGammaLength(Z0, a, b, y);
      // tolerance 1e-12 relative (y11 + y12 loses at most |y11|/|yp| ≈ 10 here)
      expectRel(at(p, 0), mul(c(-1), at(y, 2)), 1e-12, `ys ${a}+j${b}`);
      expectRel(at(p, 2), div(math.tanh(c(a / 2, b / 2)) as Complex, c(Z0)), 1e-12, `yp ${a}+j${b}`);
      expectRel(at(p, 2), add(at(y, 0), at(y, 2)), 1e-11, `yp = y11 + y12 ${a}+j${b}`);
    }
  });

  it('γℓ → 0: coth, csch, tanh(z/2) keep full relative accuracy (series) [AS]', () => {
    const y = new Float64Array(8);
    const p = new Float64Array(4);
    for (const s of [1e-4, 1e-7, 1e-10]) {
      const z = c(0.3 * s, s); // a lossy, very short section
      const z3 = mul(z, mul(z, z));
      // [AS] series; the first omitted terms are O(z⁵)·… ~ s⁴ relative, below 1e-16 for s ≤ 1e-4
      const coth = add(add(div(c(1), z), div(z, c(3))), div(z3, c(-45)));
      const csch = add(add(div(c(1), z), div(z, c(-6))), mul(c(7 / 360), z3));
      const th2 = sub(div(z, c(2)), div(z3, c(24)));
      expect(lineYFromGammaLength(Z0, z.re, z.im, y)).toBe(true);
      linePiFromGammaLength(Z0, z.re, z.im, p);
      // tolerance 1e-14 relative: expm1 keeps relative accuracy, a few roundings follow
      expectRel(at(y, 0), div(coth, c(Z0)), 1e-14, `y11 at |z| ~ ${s}`);
      expectRel(at(y, 2), div(mul(c(-1), csch), c(Z0)), 1e-14, `y12 at |z| ~ ${s}`);
      expectRel(at(p, 2), div(th2, c(Z0)), 1e-14, `yp at |z| ~ ${s}`);
    }
    // exactly zero length / DC: on the pole, reported as such
    expect(lineYFromGammaLength(Z0, 0, 0, y)).toBe(false);
  });

  it('large |γℓ|: no overflow, coth → 1 and csch → 2e^(−γℓ) [Y]', () => {
    const y = new Float64Array(8);
    // αℓ = 40: coth z = 1 + 2e^(−2z) + …, csch z = 2e^(−z)(1 + e^(−2z) + …); e^(−80) is far below rounding
    const a = 40;
    const b = 3.3;
    expect(lineYFromGammaLength(Z0, a, b, y)).toBe(true);
    expectRel(at(y, 0), c(1 / Z0), 1e-15, 'y11 at αℓ = 40');
    const twoExp = mul(c(2), math.exp(c(-a, -b)) as Complex);
    expectRel(at(y, 2), div(mul(c(-1), twoExp), c(Z0)), 1e-13, 'y12 at αℓ = 40');
    // αℓ = 1000: cosh and sinh overflow, Y stays finite (y12 underflows to 0)
    expect(lineYFromGammaLength(Z0, 1000, 12.3, y)).toBe(true);
    for (let k = 0; k < 8; k++) expect(Number.isFinite(y[k]!)).toBe(true);
    expect(Math.abs(y[0]! * Z0 - 1)).toBeLessThanOrEqual(1e-15); // tolerance: one rounding in 1/Z0
    expect(Math.abs(y[2]!)).toBe(0);
    // gain of 1000 Np (α < 0): the odd symmetry keeps it finite, y11 = −1/Z0 (coth(−z) = −coth z)
    expect(lineYFromGammaLength(Z0, -1000, 12.3, y)).toBe(true);
    expect(Math.abs(y[0]! * Z0 + 1)).toBeLessThanOrEqual(1e-15);
    expect(Math.abs(y[2]!)).toBe(0);
    const out = new Float64Array(2);
    expectClose(at(openStubImpedance(Z0, 1000, 12.3, out)), c(Z0), 1e-15 * Z0, 'open stub, long lossy');
    expectClose(at(shortStubImpedance(Z0, 1000, 12.3, out)), c(Z0), 1e-15 * Z0, 'short stub, long lossy');
  });

  it('writes only at the given offset and returns the output array (no allocation of results)', () => {
    const buf = new Float64Array(20).fill(7);
    const line = lineFromLength({ z0: Z0, length: 0.03, eeff: 4, loss: { conductor: 0.2, dielectric: 0.1, at: F0 } });
    expect(lineY(line, 2e9, buf, 5)).toBe(true);
    expect(lineAbcd(line, 2e9, buf, 5)).toBe(buf);
    for (let k = 0; k < 20; k++) if (k < 5 || k >= 13) expect(buf[k]).toBe(7);
    buf.fill(7);
    expect(openStubImpedance(Z0, 0.1, 0.2, buf, 3)).toBe(buf);
    for (let k = 0; k < 20; k++) if (k < 3 || k >= 5) expect(buf[k]).toBe(7);
  });
});
