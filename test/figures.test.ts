/**
 * Tests for src/figures: per-entry figures, two-port stability and gain, N-port passivity and
 * reciprocity, and the figure-name registry.
 *
 * Networks are built directly as NetworkData (no netlist, no solver), so only the figure code is tested.
 *
 * Sources (each check names its own beside it):
 * - [DEF] definitions that are common practice: RL = −20·log10|Γ|, VSWR = (1 + |Γ|)/(1 − |Γ|),
 *   Γ = (Z − Z0)/(Z + Z0), |S| in dB = 20·log10|S|, group delay τ = −dφ/dω.
 * - [LINE] a matched lossless line of length ℓ and phase velocity v has S11 = S22 = 0,
 *   S21 = S12 = e^(−jωℓ/v), hence a phase linear in ω and a group delay ℓ/v. Common practice.
 * - [BW] n-th order Butterworth low-pass with cutoff ωc: H(s) = Π(−p_k)/Π(s − p_k) with the poles
 *   p_k = ωc·exp(jπ(2k + n − 1)/(2n)), k = 1..n (left half of the circle |s| = ωc); |H(jωc)|² = 1/2;
 *   DC group delay 1/(ωc·sin(π/(2n))). Common practice (S. Butterworth, "On the theory of filter
 *   amplifiers", Wireless Engineer 7, 1930 (from memory)). Group delay of H at any ω from the poles,
 *   written out: arg H(jω) = const − Σ arg(jω − p_k), and with p_k = σ_k + jΩ_k,
 *   d/dω arg(jω − p_k) = −σ_k/((ω − Ω_k)² + σ_k²), so τ(ω) = Σ −σ_k/((ω − Ω_k)² + σ_k²)
 *   (closed form; at ω = 0 it is Σ −cos θ_k/ωc = 1/(ωc·sin(π/2n))).
 * - [ROL] J. M. Rollett, "Stability and power-gain invariants of linear twoports", IRE Trans. Circuit
 *   Theory CT-9(1), 1962 (details from memory): K = (1 − |S11|² − |S22|² + |Δ|²)/(2|S12 S21|),
 *   Δ = S11 S22 − S12 S21, MAG = |S21/S12|(K − √(K² − 1)).
 * - [ES] M. L. Edwards and J. H. Sinsky, "A new criterion for linear 2-port stability using a single
 *   geometrically derived parameter", IEEE Trans. MTT 40(12), 1992 (details from memory):
 *   μ = (1 − |S11|²)/(|S22 − Δ S11*| + |S12 S21|), μ' likewise with the ports exchanged; μ > 1 alone
 *   is necessary and sufficient for unconditional stability (equivalent to K > 1 with |Δ| < 1); μ is
 *   the distance from ΓL = 0 to the nearest load with |Γin| = 1 (μ' likewise in the source plane).
 * - [AMP] common practice for two-port amplifiers (G. Gonzalez, Microwave Transistor Amplifiers,
 *   ch. 2–3 (from memory)): Γin = S11 + S12 S21 ΓL/(1 − S22 ΓL); the transducer gain
 *   G_T = (1 − |ΓS|²)|S21|²(1 − |ΓL|²)/|(1 − S11 ΓS)(1 − S22 ΓL) − S12 S21 ΓS ΓL|²; the simultaneous
 *   conjugate match ΓMS = (B1 − √(B1² − 4|C1|²))/(2 C1), B1 = 1 + |S11|² − |S22|² − |Δ|²,
 *   C1 = S11 − Δ S22*, and ΓML likewise with 1 ↔ 2, at which G_T = MAG; MSG = |S21/S12|; the maximum
 *   unilateral transducer gain |S21|²/((1 − |S11|²)(1 − |S22|²)).
 * - [PAS] an N-port is passive iff U − SᴴS is positive semidefinite, lossless iff S is unitary;
 *   reciprocal iff S = Sᵀ (real references). Common practice. Example networks, common practice
 *   (from memory): the ideal 90° hybrid S = −(1/√2)[[0, j, 1, 0], [j, 0, 0, 1], [1, 0, 0, j],
 *   [0, 1, j, 0]]; the ideal circulator S = [[0, 0, 1], [1, 0, 0], [0, 1, 0]]; the Cayley transform
 *   (U − jH)(U + jH)⁻¹ of a Hermitian H is unitary (linear algebra).
 * - [MATH] mathjs 15 (general-purpose library) evaluates the published formulas with its own complex
 *   arithmetic, and solves the wave equations of a terminated network, as independent references.
 *
 * Tolerances are stated beside each check. Values of S are O(1); rounding in the figure code is a few
 * ulps, so "exact" checks use 1e-12 absolute (or relative, as stated).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as math from 'mathjs';
import type { Complex, Matrix } from 'mathjs';

import {
  FIGURES,
  FigureError,
  GAIN_AVAILABLE,
  GAIN_STABLE,
  computeFigure,
  deltaMagnitude,
  figureSpec,
  groupDelay,
  inputImpedance,
  inputReactance,
  inputResistance,
  insertionLoss,
  loadReflection,
  loadedReflection,
  magnitudeDb,
  magnitudeToDb,
  maxGain,
  maxGainDb,
  maxUnilateralGain,
  muFactor,
  muPrimeFactor,
  parseFigure,
  passivityMargin,
  phaseDeg,
  reciprocityError,
  returnLoss,
  returnLossFromMagnitude,
  rollettK,
  unwrappedPhaseDeg,
  vswr,
  vswrFromMagnitude,
  wrapDegrees,
} from '../src/figures/index.js';
import { convertNetwork } from '../src/network/convert.js';
import type { NetworkData, ParameterKind } from '../src/network/types.js';

// ------------------------------------------------------------------------------------------------
// helpers

type C = [number, number];

const polar = (m: number, deg: number): C => [m * Math.cos((deg * Math.PI) / 180), m * Math.sin((deg * Math.PI) / 180)];
const expj = (rad: number): C => [Math.cos(rad), Math.sin(rad)];
const abs = (z: C): number => Math.hypot(z[0], z[1]);

/** A network whose matrix at point k is `mat(k)` (rows = "to" port, columns = "from" port, 0-based arrays). */
function network(
  freqs: ArrayLike<number>,
  mat: (k: number) => C[][],
  options: { parameter?: ParameterKind; references?: number[] } = {},
): NetworkData {
  const points = freqs.length;
  const first = mat(0);
  const n = first.length;
  const values = new Float64Array(2 * n * n * points);
  for (let k = 0; k < points; k++) {
    const m = k === 0 ? first : mat(k);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const o = 2 * ((k * n + i) * n + j);
        values[o] = m[i]![j]![0];
        values[o + 1] = m[i]![j]![1];
      }
    }
  }
  return {
    parameter: options.parameter ?? 'S',
    ports: n,
    frequencies: Float64Array.from(freqs),
    references: Float64Array.from(options.references ?? new Array<number>(n).fill(50)),
    values,
  };
}

/** The same matrix at every point. */
function constant(freqs: ArrayLike<number>, m: C[][], options: { parameter?: ParameterKind; references?: number[] } = {}): NetworkData {
  return network(freqs, () => m, options);
}

const ONE_POINT = [1e9];

const mc = (z: C): Complex => math.complex(z[0], z[1]);
const mabs = (z: Complex | number): number => math.abs(z as Complex) as unknown as number;
const madd = (a: Complex | number, b: Complex | number): Complex => math.add(a, b) as Complex;
const matSub = (a: Complex | number, b: Complex | number): Complex => math.subtract(a, b) as Complex;
const mmul = (a: Complex | number, b: Complex | number): Complex => math.multiply(a, b) as Complex;
const mdiv = (a: Complex | number, b: Complex | number): Complex => math.divide(a, b) as Complex;
const mconj = (a: Complex): Complex => math.conj(a) as Complex;

function expectRel(actual: number, expected: number, tol: number, what = ''): void {
  const err = Math.abs(actual - expected);
  if (!(err <= tol * Math.abs(expected))) {
    throw new Error(`${what}: got ${actual}, expected ${expected} (relative error ${err / Math.abs(expected)} > ${tol})`);
  }
}

function expectAbs(actual: number, expected: number, tol: number, what = ''): void {
  const err = Math.abs(actual - expected);
  if (!(err <= tol)) throw new Error(`${what}: got ${actual}, expected ${expected} (|error| ${err} > ${tol})`);
}

/** Integers on a fine grid mapped to [lo, hi] (keeps subnormals and NaN out of random draws). */
const unit = (lo: number, hi: number): fc.Arbitrary<number> =>
  fc.integer({ min: 0, max: 1 << 20 }).map((q) => lo + ((hi - lo) * q) / (1 << 20));
const complexDraw = (maxMag: number): fc.Arbitrary<C> =>
  fc.tuple(unit(0, maxMag), unit(-180, 180)).map(([m, a]) => polar(m, a));
const twoPortDraw = (maxMag: number): fc.Arbitrary<C[][]> =>
  fc.tuple(complexDraw(maxMag), complexDraw(maxMag), complexDraw(maxMag), complexDraw(maxMag)).map(([a, b, c, d]) => [
    [a, b],
    [c, d],
  ]);

// ------------------------------------------------------------------------------------------------
// scalar definitions

describe('scalar definitions', () => {
  it('|Γ| = 1/3 gives VSWR 2 and return loss 9.54 dB', () => {
    // [DEF] VSWR = (1 + 1/3)/(1 − 1/3) = 2; RL = −20·log10(1/3) = 20·log10 3 = 9.54 dB (common practice)
    expectAbs(vswrFromMagnitude(1 / 3), 2, 1e-15, 'VSWR');
    expectAbs(returnLossFromMagnitude(1 / 3), 9.54, 0.005, 'RL to the two decimals usually quoted');
    expectAbs(returnLossFromMagnitude(1 / 3), 20 * Math.log10(3), 1e-12, 'RL');
  });

  it('|Γ| = 1/2, 0 and 1: VSWR 3, 1, Infinity; RL 6.02 dB, Infinity, 0', () => {
    // [DEF] (1 + 1/2)/(1 − 1/2) = 3, −20·log10(1/2) = 6.0206 dB; a match has VSWR 1 and infinite RL;
    // total reflection has infinite VSWR and 0 dB RL (common practice)
    expectAbs(vswrFromMagnitude(0.5), 3, 1e-15, 'VSWR 1/2');
    expectAbs(returnLossFromMagnitude(0.5), 6.0206, 5e-5, 'RL 1/2');
    expect(vswrFromMagnitude(0)).toBe(1);
    expect(returnLossFromMagnitude(0)).toBe(Infinity);
    expect(vswrFromMagnitude(1)).toBe(Infinity);
    expect(vswrFromMagnitude(1.5)).toBe(Infinity); // |Γ| ≥ 1: defined as Infinity (our convention, documented)
    expect(returnLossFromMagnitude(1)).toBe(0);
    expectAbs(magnitudeToDb(0.1), -20, 1e-13, '20·log10 0.1'); // [DEF]
  });

  it('wraps angles into (−180, 180]', () => {
    // definition of the interval; values by hand: 180 stays, −180 → 180, 190 → −170, 540 → 180, −190 → 170
    const cases: [number, number][] = [
      [0, 0],
      [180, 180],
      [-180, 180],
      [190, -170],
      [540, 180],
      [-190, 170],
      [725, 5],
      [-179.5, -179.5],
    ];
    for (const [x, want] of cases) expectAbs(wrapDegrees(x), want, 1e-12, `wrap ${x}`);
  });

  it('reflection coefficient of a load', () => {
    // [DEF] Γ = (Z − Z0)/(Z + Z0): 100 Ω on 50 Ω → 1/3; short → −1; open → 1; match → 0
    const g100 = loadReflection(100, 0, 50);
    expectAbs(g100[0], 1 / 3, 1e-15, '100 Ω');
    expectAbs(g100[1], 0, 1e-15, '100 Ω imag');
    expect(loadReflection(0, 0, 50)).toEqual([-1, 0]);
    expect(loadReflection(Infinity, 0, 50)).toEqual([1, 0]);
    expectAbs(abs(loadReflection(50, 0, 50)), 0, 1e-15, 'match');
    // [MATH] a complex load against mathjs
    const zl = math.complex(25, -40);
    const ref = mdiv(matSub(zl, 75), madd(zl, 75));
    const g = loadReflection(25, -40, 75);
    expectAbs(g[0], ref.re, 1e-15, 'Re Γ');
    expectAbs(g[1], ref.im, 1e-15, 'Im Γ');
  });
});

// ------------------------------------------------------------------------------------------------
// per-entry figures

describe('per-entry figures', () => {
  it('VSWR 2 and RL 9.54 dB from |S11| = 1/3 at any phase', () => {
    // [DEF] only |Γ| matters; phases 0°, 73°, 180°, −120°
    const phases = [0, 73, 180, -120];
    const net = network([1e6, 2e6, 3e6, 4e6], (k) => [[polar(1 / 3, phases[k]!)]]);
    const w = vswr(net, 1);
    const rl = returnLoss(net, 1);
    for (let k = 0; k < 4; k++) {
      expectAbs(w[k]!, 2, 1e-14, 'VSWR');
      expectAbs(rl[k]!, 20 * Math.log10(3), 1e-12, 'RL');
    }
  });

  it('converts Z data first: a 100 Ω one-port on 50 Ω has |Γ| = 1/3', () => {
    // [DEF] Γ = (100 − 50)/(100 + 50) = 1/3 → VSWR 2
    const net = constant(ONE_POINT, [[[100, 0]]], { parameter: 'Z' });
    expectAbs(vswr(net, 1)[0]!, 2, 1e-12, 'VSWR of Z data');
    expectAbs(inputResistance(net, 1)[0]!, 100, 1e-10, 'Zin of Z data');
  });

  it('dB and insertion loss follow the (to, from) order of Sij', () => {
    // [DEF] |S21| = 0.1 → −20 dB, IL 20 dB; |S12| = 0.5 → IL 20·log10 2 = 6.0206 dB
    const net = constant(ONE_POINT, [
      [[0, 0], polar(0.5, 30)],
      [polar(0.1, -60), [0, 0]],
    ]);
    expectAbs(magnitudeDb(net, 2, 1)[0]!, -20, 1e-12, 'db(S21)');
    expectAbs(insertionLoss(net, 2, 1)[0]!, 20, 1e-12, 'il(2,1)');
    expectAbs(insertionLoss(net, 1, 2)[0]!, 20 * Math.log10(2), 1e-12, 'il(1,2)');
    expect(magnitudeDb(net, 1, 1)[0]).toBe(-Infinity); // 20·log10 0
    expect(returnLoss(net, 1)[0]).toBe(Infinity);
  });

  it('wrapped phase lies in (−180, 180], −180 reported as 180', () => {
    // [DEF] arg e^(jθ) = θ wrapped; by hand: π → 180, (−1, −0) → 180, 3π/2 → −90, −0.999π → −179.82
    const pts: [C, number][] = [
      [expj(Math.PI), 180],
      [[-1, -0], 180],
      [expj(1.5 * Math.PI), -90],
      [expj(0.75 * Math.PI), 135],
      [expj(-0.999 * Math.PI), -179.82],
      [[0, 2], 90],
    ];
    const net = network(
      pts.map((_, k) => k + 1),
      (k) => [[pts[k]![0]]],
    );
    const ph = phaseDeg(net, 1, 1);
    for (let k = 0; k < pts.length; k++) {
      expect(ph[k]!).toBeGreaterThan(-180);
      expect(ph[k]!).toBeLessThanOrEqual(180);
      expectAbs(ph[k]!, pts[k]![1], 1e-10, `phase ${k}`);
    }
  });

  it('unwrapped phase of a pure delay is linear, −360·f·τ degrees', () => {
    // [LINE] S21 = e^(−j2πfτ): phase −360·f·τ degrees; τ = 1 ns over 0..10 GHz is ten turns, with
    // 10 MHz steps the phase step is 3.6°, well inside the unwrapping limit of 180°.
    // Tolerance: 1e-9° (the phase reaches 3600°, so this is ~3e-13 relative).
    const tau = 1e-9;
    const f = Array.from({ length: 1001 }, (_, k) => k * 10e6);
    const net = network(f, (k) => {
      const t = expj(-2 * Math.PI * f[k]! * tau);
      return [
        [[0, 0], t],
        [t, [0, 0]],
      ];
    });
    const u = unwrappedPhaseDeg(net, 2, 1);
    for (let k = 0; k < f.length; k++) expectAbs(u[k]!, -360 * f[k]! * tau, 1e-9, `uphase at ${f[k]} Hz`);
    // linear: equal steps of −3.6°
    for (let k = 1; k < f.length; k++) expectAbs(u[k]! - u[k - 1]!, -3.6, 1e-9, 'step');
    // the wrapped phase does not: it stays inside (−180, 180] (so unwrapping did the work)
    const w = phaseDeg(net, 2, 1);
    expect(Math.min(...w)).toBeGreaterThan(-180);
    expect(u[f.length - 1]!).toBeLessThan(-3000);
  });

  it('unwrapped phase starts at the wrapped phase of the first point', () => {
    // [LINE] from f0 = 1.25 GHz with τ = 1 ns the true phase is −450°; its wrapped value is −90°, and the
    // unwrapped curve is the true one shifted by +360°. Tolerance 1e-9°.
    const tau = 1e-9;
    const f = Array.from({ length: 200 }, (_, k) => 1.25e9 + k * 20e6);
    const net = network(f, (k) => [[expj(-2 * Math.PI * f[k]! * tau)]]);
    const u = unwrappedPhaseDeg(net, 1, 1);
    expectAbs(u[0]!, -90, 1e-9, 'first point');
    for (let k = 0; k < f.length; k++) expectAbs(u[k]!, -360 * f[k]! * tau + 360, 1e-9, `uphase ${k}`);
  });

  it('group delay of a matched lossless line is ℓ/v on an uneven grid, ends included', () => {
    // [LINE] ℓ = 0.3 m, v = 2e8 m/s → τ = 1.5 ns. Central and one-sided differences are exact for a
    // linear phase on any grid, so the tolerance is rounding only: 1e-9 relative.
    // The uneven grid: steps 5..45 MHz from a fixed pattern (< 1/(2τ) = 333 MHz, so unwrapping holds).
    const len = 0.3;
    const v = 2e8;
    const f: number[] = [1e6];
    for (let k = 1; k < 300; k++) f.push(f[k - 1]! + 5e6 + ((k * 7919) % 41) * 1e6);
    const net = network(f, (k) => {
      const t = expj((-2 * Math.PI * f[k]! * len) / v);
      return [
        [[0, 0], t],
        [t, [0, 0]],
      ];
    });
    for (const [i, j] of [
      [2, 1],
      [1, 2],
    ] as const) {
      const gd = groupDelay(net, i, j);
      for (let k = 0; k < f.length; k++) expectRel(gd[k]!, len / v, 1e-9, `gd(S${i}${j}) at ${f[k]} Hz`);
    }
    // [PAS] the same line is lossless and reciprocal
    const pm = passivityMargin(net);
    const re = reciprocityError(net);
    for (let k = 0; k < f.length; k++) {
      expectAbs(pm[k]!, 0, 1e-12, 'lossless line passivity margin');
      expect(re[k]).toBe(0);
    }
  });

  it('group delay of one point is NaN; of two points the one-sided difference at both', () => {
    // method as documented: no derivative from one point; with two points both ends use (φ1 − φ0)/(ω1 − ω0)
    const one = constant(ONE_POINT, [[expj(0.3)]]);
    expect(Number.isNaN(groupDelay(one, 1, 1)[0]!)).toBe(true);
    const tau = 2e-9;
    const f = [1e8, 1.5e8];
    const two = network(f, (k) => [[expj(-2 * Math.PI * f[k]! * tau)]]);
    const gd = groupDelay(two, 1, 1);
    expectRel(gd[0]!, tau, 1e-9, 'first');
    expectRel(gd[1]!, tau, 1e-9, 'last');
  });

  describe('Butterworth low-pass group delay', () => {
    const fc0 = 1e9;
    const wc = 2 * Math.PI * fc0;
    /** [BW] poles p_k = ωc·exp(jπ(2k + n − 1)/(2n)), k = 1..n. */
    const poles = (n: number): C[] =>
      Array.from({ length: n }, (_, k) => {
        const th = (Math.PI * (2 * (k + 1) + n - 1)) / (2 * n);
        return [wc * Math.cos(th), wc * Math.sin(th)];
      });
    /** [BW] H(jω) = Π(−p_k)/Π(jω − p_k), evaluated with mathjs. */
    const response = (n: number, w: number): C => {
      let h: Complex = math.complex(1, 0);
      for (const p of poles(n)) h = mmul(h, mdiv(mc([-p[0], -p[1]]), matSub(math.complex(0, w), mc(p))));
      return [h.re, h.im];
    };
    const butterworth = (n: number, f: number[]): NetworkData =>
      network(f, (k) => {
        const h = response(n, 2 * Math.PI * f[k]!);
        return [
          [[0, 0], h],
          [h, [0, 0]],
        ];
      });
    // 0 .. 2 fc in 0.5 MHz steps
    const f = Array.from({ length: 4001 }, (_, k) => k * 0.5e6);

    for (let n = 1; n <= 7; n++) {
      it(`order ${n}: DC group delay 1/(ωc·sin(π/2n)), and τ(ω) from the poles across the band`, () => {
        const net = butterworth(n, f);
        // the construction: |S21(fc)| = −10·log10 2 = −3.0103 dB [BW]; tolerance 1e-9 dB
        expectAbs(magnitudeDb(net, 2, 1)[2000]!, -10 * Math.log10(2), 1e-9, '|H(jωc)|');
        const gd = groupDelay(net, 2, 1);
        // [BW] DC: the first point uses the one-sided difference over [0, Δω]; τ is even in ω, so this is
        // the mean of τ over [0, Δω], off by about τ''(0)Δω²/6 — for n = 1 exactly (Δω/ωc)²/3 = 8.3e-8
        // relative, observed ≤ 8.4e-8 for n = 1..7. Tolerance 1e-6 relative.
        expectRel(gd[0]!, 1 / (wc * Math.sin(Math.PI / (2 * n))), 1e-6, `DC group delay, n=${n}`);
        // [BW] every interior point against τ(ω) = Σ −σ_k/((ω − Ω_k)² + σ_k²); the central difference errs
        // by O(Δω²·τ''), observed ≤ 1.8e-6 of the DC value (n = 7, near the delay peak at fc).
        // Tolerance 1e-5 relative to the DC value.
        const tau0 = 1 / (wc * Math.sin(Math.PI / (2 * n)));
        const ps = poles(n);
        for (let k = 1; k < f.length - 1; k++) {
          const w = 2 * Math.PI * f[k]!;
          let t = 0;
          for (const [s, o] of ps) t += -s / ((w - o) * (w - o) + s * s);
          expectAbs(gd[k]!, t, 1e-5 * tau0, `τ at ${f[k]} Hz, n=${n}`);
        }
      });
    }
  });

  it('input impedance with the other ports in their references', () => {
    // [DEF] a one-port with S11 = Γ(ZL) has Zin = ZL; loads 25 − j40 Ω on 50 Ω and 120 + j30 Ω on 75 Ω.
    // Tolerance 1e-12 relative to |ZL|.
    for (const [zr, zi, z0] of [
      [25, -40, 50],
      [120, 30, 75],
    ] as const) {
      const net = constant(ONE_POINT, [[loadReflection(zr, zi, z0)]], { references: [z0] });
      const z = inputImpedance(net, 1);
      expectAbs(z[0]!, zr, 1e-12 * Math.hypot(zr, zi), 'Re Zin');
      expectAbs(z[1]!, zi, 1e-12 * Math.hypot(zr, zi), 'Im Zin');
      expectAbs(inputResistance(net, 1)[0]!, zr, 1e-12 * Math.hypot(zr, zi), 'inputResistance');
      expectAbs(inputReactance(net, 1)[0]!, zi, 1e-12 * Math.hypot(zr, zi), 'inputReactance');
    }
    // an open (S11 = 1): Re = Infinity, Im = NaN (documented)
    const open = inputImpedance(constant(ONE_POINT, [[[1, 0]]]), 1);
    expect(open[0]).toBe(Infinity);
    expect(Number.isNaN(open[1]!)).toBe(true);
  });

  it('input impedance of a two-port with port 2 in its reference: Z11 − Z12 Z21/(Z22 + Z02)', () => {
    // [DEF] circuit theory of a Z two-port terminated at port 2 in Z02 (common practice), evaluated with
    // mathjs [MATH]; S made from Z by the project's convertNetwork (references 50 and 75 Ω).
    // Tolerance 1e-10 relative (the conversion's rounding).
    const zm: C[][] = [
      [
        [80, 35],
        [20, -10],
      ],
      [
        [20, -10],
        [45, -60],
      ],
    ];
    const zNet = constant(ONE_POINT, zm, { parameter: 'Z', references: [50, 75] });
    const sNet = convertNetwork(zNet, 'S');
    const z = inputImpedance(sNet, 1);
    const ref = matSub(mc(zm[0]![0]!), mdiv(mmul(mc(zm[0]![1]!), mc(zm[1]![0]!)), madd(mc(zm[1]![1]!), 75)));
    const scale = mabs(ref);
    expectAbs(z[0]!, ref.re, 1e-10 * scale, 'Re Zin');
    expectAbs(z[1]!, ref.im, 1e-10 * scale, 'Im Zin');
  });

  it('reflection through a loaded port: a matched line turns ΓL by e^(−2jθ)', () => {
    // [AMP] Γin = S11 + S12 S21 ΓL/(1 − S22 ΓL); for S11 = S22 = 0, S21 = S12 = e^(−jθ): ΓL·e^(−2jθ).
    // θ = 0.7 rad, ΓL = 0.4 − 0.3j. Tolerance 1e-15.
    const t = expj(-0.7);
    const net = constant(ONE_POINT, [
      [[0, 0], t],
      [t, [0, 0]],
    ]);
    const g = loadedReflection(net, 1, 2, 0.4, -0.3);
    const want = mmul(math.complex(0.4, -0.3), math.exp(math.complex(0, -1.4)) as Complex);
    expectAbs(g[0]!, want.re, 1e-15, 'Re');
    expectAbs(g[1]!, want.im, 1e-15, 'Im');
  });

  it('reflection through a loaded port of a 3-port equals the solved wave equations', () => {
    // [MATH] drive port 1 with a1 = 1, load port 2 with ΓL (a2 = ΓL·b2), port 3 matched (a3 = 0):
    // b = S·a with a = e1 + G·b, G = diag(0, ΓL, 0), so (U − S·G)·b = S·e1, solved with mathjs; Γ = b1.
    // Tolerance 1e-12.
    const s: C[][] = [
      [polar(0.3, 20), polar(0.5, -40), polar(0.2, 100)],
      [polar(0.5, -40), polar(0.6, 70), polar(0.3, 10)],
      [polar(0.2, 100), polar(0.3, 10), polar(0.1, -150)],
    ];
    const gl: C = polar(0.7, 35);
    const S = math.matrix(s.map((row) => row.map(mc)));
    const G = math.matrix([
      [math.complex(0, 0), math.complex(0, 0), math.complex(0, 0)],
      [math.complex(0, 0), mc(gl), math.complex(0, 0)],
      [math.complex(0, 0), math.complex(0, 0), math.complex(0, 0)],
    ]);
    const A = math.subtract(math.identity(3), math.multiply(S, G)) as Matrix;
    const rhs = math.multiply(S, math.matrix([[1], [0], [0]])) as Matrix;
    const b = math.lusolve(A, rhs) as Matrix;
    const b1 = b.get([0, 0]) as Complex;
    const g = loadedReflection(constant(ONE_POINT, s), 1, 2, gl[0], gl[1]);
    expectAbs(g[0]!, b1.re, 1e-12, 'Re');
    expectAbs(g[1]!, b1.im, 1e-12, 'Im');
  });

  it('rejects ports out of range and wrong output lengths', () => {
    const net = constant(ONE_POINT, [[[0.1, 0]]]);
    expect(() => vswr(net, 2)).toThrow(RangeError);
    expect(() => magnitudeDb(net, 0, 1)).toThrow(/out of range/);
    expect(() => vswr(net, 1, new Float64Array(3))).toThrow(/length/);
  });
});

// ------------------------------------------------------------------------------------------------
// two-port figures

/** [MATH] the published formulas evaluated with mathjs. */
function reference(s: C[][]) {
  const s11 = mc(s[0]![0]!);
  const s12 = mc(s[0]![1]!);
  const s21 = mc(s[1]![0]!);
  const s22 = mc(s[1]![1]!);
  const delta = matSub(mmul(s11, s22), mmul(s12, s21)); // [ROL]
  const d = mabs(delta);
  const t = mabs(mmul(s12, s21));
  const k = (1 - mabs(s11) ** 2 - mabs(s22) ** 2 + d ** 2) / (2 * t); // [ROL]
  const mu = (1 - mabs(s11) ** 2) / (mabs(matSub(s22, mmul(delta, mconj(s11)))) + t); // [ES]
  const mu2 = (1 - mabs(s22) ** 2) / (mabs(matSub(s11, mmul(delta, mconj(s22)))) + t); // [ES]
  return { s11, s12, s21, s22, delta, d, k, mu, mu2 };
}

describe('two-port stability and gain', () => {
  for (const lossDb of [6, 10, 20]) {
    it(`matched ${lossDb} dB attenuator: K = (1 + a⁴)/(2a²), |Δ| = a², μ = μ' = 1/a², MAG = a² (its loss)`, () => {
      // Derived from [ROL], [ES] with S11 = S22 = 0, S21 = S12 = a (a = 10^(−loss/20) < 1):
      //   Δ = −a², so |Δ| = a²; K = (1 + a⁴)/(2a²) > 1; μ = 1/(|0 − Δ·0| + a²) = 1/a² = μ';
      //   K² − 1 = (1 − a⁴)²/(4a⁴), so MAG = K − √(K² − 1) = a²: the maximum available gain of a matched
      //   pad is its own (loss) power ratio, MAG in dB = −loss. Tolerance 1e-12 relative.
      const a = 10 ** (-lossDb / 20);
      const net = constant(ONE_POINT, [
        [[0, 0], [a, 0]],
        [[a, 0], [0, 0]],
      ]);
      expectRel(rollettK(net)[0]!, (1 + a ** 4) / (2 * a * a), 1e-12, 'K');
      expectRel(deltaMagnitude(net)[0]!, a * a, 1e-12, '|Δ|');
      expectRel(muFactor(net)[0]!, 1 / (a * a), 1e-12, 'μ');
      expectRel(muPrimeFactor(net)[0]!, 1 / (a * a), 1e-12, "μ'");
      const kind = new Uint8Array(1);
      expectRel(maxGain(net, undefined, kind)[0]!, a * a, 1e-12, 'MAG');
      expect(kind[0]).toBe(GAIN_AVAILABLE);
      expectAbs(maxGainDb(net)[0]!, -lossDb, 1e-10, 'MAG in dB');
      // [PAS] passivity margin of the pad: SᴴS = a²·U, margin 1 − a² > 0
      expectAbs(passivityMargin(net)[0]!, 1 - a * a, 1e-12, 'passivity margin');
      expect(passivityMargin(net)[0]!).toBeGreaterThan(0);
    });
  }

  it('matched two-way amplifier (S21 = S12 = 2): K > 1 but |Δ| > 1, so μ < 1 and the gain is MSG = 1', () => {
    // Derived like the attenuator with a = 2: |Δ| = a² = 4, K = (1 + 16)/8 = 2.125 > 1, μ = μ' = 1/a² = 1/4.
    // K > 1 alone is not enough [ES], [AMP]: with |Δ| ≥ 1 our convention reports MSG = |S21/S12| = 1.
    // Tolerance 1e-12 relative.
    const net = constant(ONE_POINT, [
      [[0, 0], [2, 0]],
      [[2, 0], [0, 0]],
    ]);
    expectRel(rollettK(net)[0]!, 2.125, 1e-12, 'K');
    expectRel(deltaMagnitude(net)[0]!, 4, 1e-12, '|Δ|');
    expectRel(muFactor(net)[0]!, 0.25, 1e-12, 'μ');
    const kind = new Uint8Array(1);
    expectRel(maxGain(net, undefined, kind)[0]!, 1, 1e-12, 'MSG');
    expect(kind[0]).toBe(GAIN_STABLE);
  });

  it('unilateral two-port (S12 = 0): K = Infinity, μ = 1/|S22|, μ\' = 1/|S11|, MAG = G_TU,max', () => {
    // Derived from [ES] with S12 = 0: Δ = S11 S22, S22 − Δ S11* = S22(1 − |S11|²), so μ = 1/|S22|
    // (for |S11| < 1), μ' = 1/|S11|; [ROL] denominator 0 with numerator (1 − |S11|²)(1 − |S22|²) > 0 →
    // K = Infinity; [AMP] MAG = |S21|²/((1 − |S11|²)(1 − |S22|²)). Tolerance 1e-12 relative.
    const s11 = polar(0.3, 40);
    const s21 = polar(4, 100);
    const s22 = polar(0.6, -70);
    const net = constant(ONE_POINT, [
      [s11, [0, 0]],
      [s21, s22],
    ]);
    expect(rollettK(net)[0]).toBe(Infinity);
    expectRel(deltaMagnitude(net)[0]!, 0.18, 1e-12, '|Δ| = |S11||S22|');
    expectRel(muFactor(net)[0]!, 1 / 0.6, 1e-12, 'μ');
    expectRel(muPrimeFactor(net)[0]!, 1 / 0.3, 1e-12, "μ'");
    const gtu = 16 / ((1 - 0.09) * (1 - 0.36));
    const kind = new Uint8Array(1);
    expectRel(maxGain(net, undefined, kind)[0]!, gtu, 1e-12, 'MAG');
    expect(kind[0]).toBe(GAIN_AVAILABLE);
    expectRel(maxUnilateralGain(net)[0]!, gtu, 1e-12, 'G_TU,max');
  });

  it('S11 = 0 and S12 = 0: μ = 1/|S22| exactly', () => {
    // [ES] numerator 1, S22 − Δ·0 = S22: μ = 1/|S22|; with S22 = 0 the quotient is 1/0 = Infinity
    const net = constant([1, 2], [
      [[0, 0], [0, 0]],
      [polar(2, 10), polar(0.25, 170)],
    ]);
    expectRel(muFactor(net)[0]!, 4, 1e-12, 'μ');
    const matched = constant(ONE_POINT, [
      [[0, 0], [0, 0]],
      [polar(2, 10), [0, 0]],
    ]);
    expect(muFactor(matched)[0]).toBe(Infinity);
  });

  it('unilateral with |S22| > 1: K = −Infinity, μ < 1, gain reported as MSG = Infinity', () => {
    // [ROL] numerator (1 − 0.09)(1 − 1.44) < 0 over 0 → −Infinity; [ES] μ = 1/1.2 < 1 (unstable);
    // our convention: not unconditionally stable → MSG = |S21/S12| = Infinity for S12 = 0
    const net = constant(ONE_POINT, [
      [polar(0.3, 0), [0, 0]],
      [polar(3, 0), polar(1.2, 50)],
    ]);
    expect(rollettK(net)[0]).toBe(-Infinity);
    expectRel(muFactor(net)[0]!, 1 / 1.2, 1e-12, 'μ');
    const kind = new Uint8Array(1);
    expect(maxGain(net, undefined, kind)[0]).toBe(Infinity);
    expect(kind[0]).toBe(GAIN_STABLE);
  });

  it('matched lossless line: K = 1, |Δ| = 1, μ = μ\' = 1, MSG = 1 (0 dB)', () => {
    // Derived: S11 = S22 = 0, S21 = S12 = e^(−jθ): Δ = −e^(−2jθ), K = (1 + 1)/2 = 1, μ = 1/(0 + 1) = 1.
    // K > 1 fails, so by our convention the gain is MSG = |S21/S12| = 1. Tolerance 1e-12.
    const t = expj(-1.1);
    const net = constant(ONE_POINT, [
      [[0, 0], t],
      [t, [0, 0]],
    ]);
    expectAbs(rollettK(net)[0]!, 1, 1e-12, 'K');
    expectAbs(deltaMagnitude(net)[0]!, 1, 1e-12, '|Δ|');
    expectAbs(muFactor(net)[0]!, 1, 1e-12, 'μ');
    expectAbs(muPrimeFactor(net)[0]!, 1, 1e-12, "μ'");
    const kind = new Uint8Array(1);
    expectAbs(maxGain(net, undefined, kind)[0]!, 1, 1e-12, 'MSG');
    expect(kind[0]).toBe(GAIN_STABLE);
  });

  it('K, |Δ|, μ, μ\' agree with the published formulas evaluated by mathjs (random two-ports, fixed seed)', () => {
    // [ROL], [ES], [MATH]; entries of modulus ≤ 1.5 at any angle. Tolerance 1e-10 relative (K and μ
    // divide by |S12 S21| or sums that can be small; draws with |S12 S21| < 1e-3 are skipped).
    fc.assert(
      fc.property(twoPortDraw(1.5), (s) => {
        const r = reference(s);
        fc.pre(abs(s[0]![1]!) * abs(s[1]![0]!) > 1e-3);
        const net = constant(ONE_POINT, s);
        expectRel(rollettK(net)[0]!, r.k, 1e-10, 'K');
        expectRel(deltaMagnitude(net)[0]!, r.d, 1e-10, '|Δ|');
        expectRel(muFactor(net)[0]!, r.mu, 1e-10, 'μ');
        expectRel(muPrimeFactor(net)[0]!, r.mu2, 1e-10, "μ'");
      }),
      { seed: 20240611, numRuns: 400 },
    );
  });

  it('μ > 1 ⇔ μ\' > 1 ⇔ (K > 1 and |Δ| < 1) (Edwards & Sinsky), random two-ports, fixed seed', () => {
    // [ES] the equivalence is their main result; draws within 1e-6 of a boundary are skipped.
    let stable = 0;
    let unstable = 0;
    fc.assert(
      fc.property(twoPortDraw(1.3), (s) => {
        const net = constant(ONE_POINT, s);
        const k = rollettK(net)[0]!;
        const d = deltaMagnitude(net)[0]!;
        const mu = muFactor(net)[0]!;
        const mu2 = muPrimeFactor(net)[0]!;
        fc.pre(Math.abs(k - 1) > 1e-6 && Math.abs(d - 1) > 1e-6 && Math.abs(mu - 1) > 1e-6 && Math.abs(mu2 - 1) > 1e-6);
        const rollett = k > 1 && d < 1;
        if (rollett) stable++;
        else unstable++;
        expect(mu > 1).toBe(rollett);
        expect(mu2 > 1).toBe(rollett);
      }),
      { seed: 1992, numRuns: 2000 },
    );
    // the draw must exercise both outcomes for the check to mean anything
    expect(stable).toBeGreaterThan(20);
    expect(unstable).toBeGreaterThan(20);
  });

  it('μ is the distance from ΓL = 0 to the nearest load with |Γin| = 1 (μ\' likewise for ΓS)', () => {
    // [ES] geometric meaning; [AMP] Γin = S11 + S12 S21 ΓL/(1 − S22 ΓL), Γout = S22 + S12 S21 ΓS/(1 − S11 ΓS),
    // evaluated with mathjs. On the circle |Γ| = μ(1 − 1e-6) every point gives |Γ| < 1 (allowing 1e-9 for
    // rounding); on |Γ| = μ(1 + 1e-3) some point of 20000 gives > 1. One unconditionally stable and one
    // potentially unstable two-port, both with |S11|, |S22| < 1.
    const cases: C[][][] = [
      [
        [polar(0.6, -120), polar(0.08, 40)],
        [polar(2.5, 80), polar(0.5, -40)],
      ],
      [
        [polar(0.8, -60), polar(0.15, 50)],
        [polar(4, 100), polar(0.7, -30)],
      ],
    ];
    const worst = (s: C[][], radius: number, side: 'load' | 'source'): number => {
      const r = reference(s);
      const own = side === 'load' ? r.s11 : r.s22;
      const far = side === 'load' ? r.s22 : r.s11;
      const t = mmul(r.s12, r.s21);
      let m = 0;
      for (let q = 0; q < 20000; q++) {
        const g = mc(polar(radius, (360 * q) / 20000));
        const gin = madd(own, mdiv(mmul(t, g), matSub(1, mmul(far, g))));
        m = Math.max(m, mabs(gin));
      }
      return m;
    };
    let seenUnstable = false;
    for (const s of cases) {
      const net = constant(ONE_POINT, s);
      const mu = muFactor(net)[0]!;
      const mu2 = muPrimeFactor(net)[0]!;
      if (mu < 1) seenUnstable = true;
      expect(worst(s, mu * (1 - 1e-6), 'load')).toBeLessThan(1 + 1e-9);
      expect(worst(s, mu * (1 + 1e-3), 'load')).toBeGreaterThan(1);
      expect(worst(s, mu2 * (1 - 1e-6), 'source')).toBeLessThan(1 + 1e-9);
      expect(worst(s, mu2 * (1 + 1e-3), 'source')).toBeGreaterThan(1);
    }
    expect(seenUnstable).toBe(true);
  });

  it('MAG equals Rollett\'s form and the transducer gain at the simultaneous conjugate match', () => {
    // [ROL] MAG = |S21/S12|(K − √(K² − 1)); [AMP] G_T at ΓMS, ΓML (mathjs). A stable two-port (checked:
    // K > 1, |Δ| < 1). Tolerance 1e-12 relative for the first, 1e-9 for the second (square roots and
    // the cancellation in B − √(B² − 4|C|²)).
    const s: C[][] = [
      [polar(0.6, -120), polar(0.08, 40)],
      [polar(2.5, 80), polar(0.5, -40)],
    ];
    const r = reference(s);
    expect(r.k).toBeGreaterThan(1);
    expect(r.d).toBeLessThan(1);
    const net = constant(ONE_POINT, s);
    const kind = new Uint8Array(1);
    const g = maxGain(net, undefined, kind)[0]!;
    expect(kind[0]).toBe(GAIN_AVAILABLE);
    expectRel(g, (mabs(r.s21) / mabs(r.s12)) * (r.k - Math.sqrt(r.k * r.k - 1)), 1e-12, 'Rollett MAG');

    const b1 = 1 + mabs(r.s11) ** 2 - mabs(r.s22) ** 2 - r.d ** 2;
    const b2 = 1 + mabs(r.s22) ** 2 - mabs(r.s11) ** 2 - r.d ** 2;
    const c1 = matSub(r.s11, mmul(r.delta, mconj(r.s22)));
    const c2 = matSub(r.s22, mmul(r.delta, mconj(r.s11)));
    const gms = mdiv(b1 - Math.sqrt(b1 * b1 - 4 * mabs(c1) ** 2), mmul(2, c1));
    const gml = mdiv(b2 - Math.sqrt(b2 * b2 - 4 * mabs(c2) ** 2), mmul(2, c2));
    const den = matSub(
      mmul(matSub(1, mmul(r.s11, gms)), matSub(1, mmul(r.s22, gml))),
      mmul(mmul(r.s12, r.s21), mmul(gms, gml)),
    );
    const gt = ((1 - mabs(gms) ** 2) * mabs(r.s21) ** 2 * (1 - mabs(gml) ** 2)) / mabs(den) ** 2;
    expectRel(g, gt, 1e-9, 'G_T at the simultaneous conjugate match');
  });

  it('potentially unstable two-port: gain is MSG = |S21/S12|', () => {
    // [AMP] MSG = |S21|/|S12| = 4/0.15; the device is checked to have K < 1 [ROL]. Tolerance 1e-12.
    const s: C[][] = [
      [polar(0.8, -60), polar(0.15, 50)],
      [polar(4, 100), polar(0.7, -30)],
    ];
    expect(reference(s).k).toBeLessThan(1);
    const kind = new Uint8Array(1);
    const g = maxGain(constant(ONE_POINT, s), undefined, kind)[0]!;
    expect(kind[0]).toBe(GAIN_STABLE);
    expectRel(g, 4 / 0.15, 1e-12, 'MSG');
  });

  it('MAG is continuous into the unilateral limit (S12 → 0)', () => {
    // [AMP] as S12 → 0 the MAG tends to G_TU,max; with |S12| = 1e-9 the difference is O(|S12 S21|)
    // relative. Rollett's form K − √(K² − 1) would lose all digits here (K ≈ 1e9). Tolerance 1e-7.
    const s: C[][] = [
      [polar(0.3, 40), polar(1e-9, 10)],
      [polar(4, 100), polar(0.6, -70)],
    ];
    expectRel(maxGain(constant(ONE_POINT, s))[0]!, 16 / ((1 - 0.09) * (1 - 0.36)), 1e-7, 'near-unilateral MAG');
  });

  it('two-port figures refuse other port counts', () => {
    const three = constant(ONE_POINT, [
      [[0, 0], [0, 0], [0, 0]],
      [[0, 0], [0, 0], [0, 0]],
      [[0, 0], [0, 0], [0, 0]],
    ]);
    expect(() => rollettK(three)).toThrow(/two-port/);
    expect(() => muFactor(three)).toThrow(RangeError);
    expect(() => maxGain(three)).toThrow(RangeError);
  });
});

// ------------------------------------------------------------------------------------------------
// N-port figures

describe('passivity and reciprocity', () => {
  const r = Math.SQRT1_2;
  const hybrid: C[][] = [
    [[0, 0], [0, -r], [-r, 0], [0, 0]],
    [[0, -r], [0, 0], [0, 0], [-r, 0]],
    [[-r, 0], [0, 0], [0, 0], [0, -r]],
    [[0, 0], [-r, 0], [0, -r], [0, 0]],
  ];

  it('ideal 90° hybrid: lossless (margin 0) and reciprocal (error 0)', () => {
    // [PAS] unitary and symmetric; tolerance 1e-12 for the margin (eigenvalue rounding), 0 for reciprocity
    // (the symmetric entries are the same numbers)
    const net = constant(ONE_POINT, hybrid);
    expectAbs(passivityMargin(net)[0]!, 0, 1e-12, 'margin');
    expect(reciprocityError(net)[0]).toBe(0);
  });

  it('ideal circulator: lossless (margin 0) but not reciprocal (error 1)', () => {
    // [PAS] a permutation matrix is unitary; |S21 − S12| = |1 − 0| = 1. Tolerance 1e-12.
    const net = constant(ONE_POINT, [
      [[0, 0], [0, 0], [1, 0]],
      [[1, 0], [0, 0], [0, 0]],
      [[0, 0], [1, 0], [0, 0]],
    ]);
    expectAbs(passivityMargin(net)[0]!, 0, 1e-12, 'margin');
    expectAbs(reciprocityError(net)[0]!, 1, 1e-15, 'reciprocity');
  });

  it('an amplifier with |S21| = 10 has margin 1 − 100 = −99', () => {
    // [PAS] SᴴS = diag(100, 0); tolerance 1e-12 relative
    const net = constant(ONE_POINT, [
      [[0, 0], [0, 0]],
      [[0, 10], [0, 0]],
    ]);
    expectRel(passivityMargin(net)[0]!, -99, 1e-12, 'margin');
    expectAbs(reciprocityError(net)[0]!, 10, 1e-15, '|S21 − S12|');
  });

  it('lossy networks: margin 1 − σmax², from mathjs eigenvalues of SᴴS (random 1..5-ports, fixed seed)', () => {
    // [PAS] definition; [MATH] math.eigs of the Hermitian SᴴS as the reference. A diagonal example by
    // hand: S = diag(0.6, 0.8j) has SᴴS = diag(0.36, 0.64), margin 0.36. Tolerance 1e-12 absolute.
    expectAbs(passivityMargin(constant(ONE_POINT, [[[0.6, 0], [0, 0]], [[0, 0], [0, 0.8]]]))[0]!, 0.36, 1e-12, 'diag');
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.array(complexDraw(0.7), { minLength: 25, maxLength: 25 }), (n, zs) => {
        const s: C[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => zs[i * n + j]!));
        const S = math.matrix(s.map((row) => row.map(mc)));
        const G = math.multiply(math.ctranspose(S), S) as Matrix;
        const eig = math.eigs(G).values as Matrix | (number | Complex)[];
        const list = (Array.isArray(eig) ? eig : (eig.toArray() as (number | Complex)[])).map((x) =>
          typeof x === 'number' ? x : x.re,
        );
        expectAbs(passivityMargin(constant(ONE_POINT, s))[0]!, 1 - Math.max(...list), 1e-12, `margin n=${n}`);
      }),
      { seed: 4242, numRuns: 100 },
    );
  });

  it('Cayley transforms of random Hermitian matrices are lossless: margin 0 (n = 1..6)', () => {
    // [PAS] (U − jH)(U + jH)⁻¹ is unitary for Hermitian H, built with mathjs [MATH]; tolerance 1e-12
    let seed = 12345;
    const rnd = (): number => {
      seed = (seed * 1103515245 + 12345) % 2147483648; // linear congruential, fixed seed
      return seed / 2147483648 - 0.5;
    };
    for (let n = 1; n <= 6; n++) {
      const h: Complex[][] = Array.from({ length: n }, () => new Array<Complex>(n));
      for (let i = 0; i < n; i++) {
        h[i]![i] = math.complex(2 * rnd(), 0);
        for (let j = i + 1; j < n; j++) {
          const z = math.complex(2 * rnd(), 2 * rnd());
          h[i]![j] = z;
          h[j]![i] = mconj(z);
        }
      }
      const H = math.matrix(h);
      const jH = math.multiply(math.complex(0, 1), H) as Matrix;
      const I = math.identity(n) as Matrix;
      const S = math.multiply(math.subtract(I, jH), math.inv(math.add(I, jH) as Matrix)) as Matrix;
      const arr = S.toArray() as unknown as (Complex | number)[][];
      const s: C[][] = arr.map((row) => row.map((z) => (typeof z === 'number' ? [z, 0] : [z.re, z.im]) as C));
      expectAbs(passivityMargin(constant(ONE_POINT, s))[0]!, 0, 1e-12, `margin n=${n}`);
    }
  });

  it('reciprocity error is max|Sij − Sji| (symmetric: 0; one pair off by 0.3 + 0.4j: 0.5)', () => {
    // definition; |0.3 + 0.4j| = 0.5. Tolerance 1e-15.
    const sym: C[][] = [
      [[0.1, 0.2], [0.3, -0.1], [0.05, 0.4]],
      [[0.3, -0.1], [0.2, 0], [-0.2, 0.1]],
      [[0.05, 0.4], [-0.2, 0.1], [0, -0.3]],
    ];
    expect(reciprocityError(constant(ONE_POINT, sym))[0]).toBe(0);
    const off = sym.map((row) => row.map((z) => [z[0], z[1]] as C));
    off[2]![1] = [-0.2 + 0.3, 0.1 + 0.4];
    expectAbs(reciprocityError(constant(ONE_POINT, off))[0]!, 0.5, 1e-15, 'error');
    expect(reciprocityError(constant(ONE_POINT, [[[0.5, 0.5]]]))[0]).toBe(0); // one-port
  });
});

// ------------------------------------------------------------------------------------------------
// registry and parser (our own syntax: checked against the library functions above)

describe('figure registry', () => {
  const s: C[][] = [
    [polar(0.3, 40), polar(0.1, 20)],
    [polar(2, 100), polar(0.5, -70)],
  ];
  const f = [1e9, 1.1e9, 1.2e9];
  const net = network(f, (k) => s.map((row) => row.map(([re, im]) => [re * (1 + 0.1 * k), im] as C)));

  it('every named figure computes the library function it names', () => {
    const same: [string, Float64Array][] = [
      ['db(S21)', magnitudeDb(net, 2, 1)],
      ['rl(1)', returnLoss(net, 1)],
      ['il(2,1)', insertionLoss(net, 2, 1)],
      ['vswr(2)', vswr(net, 2)],
      ['phase(S21)', phaseDeg(net, 2, 1)],
      ['uphase(S12)', unwrappedPhaseDeg(net, 1, 2)],
      ['gd(S21)', groupDelay(net, 2, 1)],
      ['zin_re(1)', inputResistance(net, 1)],
      ['zin_im(2)', inputReactance(net, 2)],
      ['k', rollettK(net)],
      ['delta', deltaMagnitude(net)],
      ['mu_load', muFactor(net)],
      ['mu_source', muPrimeFactor(net)],
      ['mag', maxGainDb(net)],
      ['passivity', passivityMargin(net)],
      ['reciprocity', reciprocityError(net)],
    ];
    const covered = new Set<string>();
    for (const [name, want] of same) {
      expect(Array.from(computeFigure(net, name)), name).toEqual(Array.from(want));
      covered.add(parseFigure(name).spec.name);
    }
    // every figure in the table is covered above
    expect([...covered].sort()).toEqual(FIGURES.map((x) => x.name).sort());
  });

  it('reads Sij, S(i,j), i,j and port forms, in any case, and gives the canonical name', () => {
    const forms: [string, string, number[]][] = [
      ['db(S21)', 'db(S21)', [2, 1]],
      ['DB(s21)', 'db(S21)', [2, 1]],
      [' db ( S21 ) ', 'db(S21)', [2, 1]],
      ['db(S(2,1))', 'db(S21)', [2, 1]],
      ['db(2, 1)', 'db(S21)', [2, 1]],
      ['gd(S(12,3))', 'gd(S(12,3))', [12, 3]],
      ['il(S21)', 'il(2,1)', [2, 1]],
      ['rl(S11)', 'rl(1)', [1]],
      ['VSWR(2)', 'vswr(2)', [2]],
      ['K', 'k', []],
    ];
    for (const [text, canonical, ports] of forms) {
      const p = parseFigure(text);
      expect(p.canonical, text).toBe(canonical);
      expect([...p.ports], text).toEqual(ports);
    }
    for (const spec of FIGURES) expect(parseFigure(spec.example).canonical).toBe(spec.example);
    expect(figureSpec('MU_SOURCE')?.name).toBe('mu_source');
    expect(figureSpec('mu2')).toBeUndefined();
  });

  const fails = (text: string, ports?: number): FigureError => {
    try {
      parseFigure(text, ports === undefined ? {} : { ports });
    } catch (e) {
      expect(e).toBeInstanceOf(FigureError);
      return e as FigureError;
    }
    throw new Error(`\`${text}\` parsed without error`);
  };

  it('unknown figures get a did-you-mean', () => {
    const e = fails('vswt(1)');
    expect(e.code).toBe('unknown-figure');
    expect(e.help).toBe('did you mean `vswr`?');
    expect(e.message).toContain('unknown figure `vswt`');
    expect(fails('uphsae(S21)').help).toBe('did you mean `uphase`?');
    expect(fails('rl1').help).toBe('did you mean `rl(1)`?');
    expect(fails('db21').help).toBe('did you mean `db(S21)`?');
    expect(fails('S21').help).toContain('db(S21)');
    expect(fails('xyzzy').help).toContain('known figures: db, rl');
    const d = fails('vswt(1)').toDiagnostic();
    expect(d).toEqual({ severity: 'error', code: 'unknown-figure', message: 'unknown figure `vswt`', help: 'did you mean `vswr`?' });
  });

  it('malformed names and wrong arguments are rejected with a reason', () => {
    expect(fails('db(S21').code).toBe('figure-syntax');
    expect(fails('').code).toBe('figure-syntax');
    expect(fails('1db').code).toBe('figure-syntax');
    expect(fails('db(S21) x').code).toBe('figure-syntax');
    expect(fails('k(1)').code).toBe('figure-arguments');
    expect(fails('rl').code).toBe('figure-arguments');
    expect(fails('db(1)').code).toBe('figure-arguments');
    expect(fails('rl(S21)').message).toContain('transmission entry');
    const il = fails('il(1,1)');
    expect(il.code).toBe('figure-arguments');
    expect(il.help).toBe('for the reflection at port 1 use `rl(1)`');
    const amb = fails('db(S123)');
    expect(amb.message).toContain('ambiguous');
    expect(amb.help).toContain('S(1,23)');
    expect(fails('db(S2x)').code).toBe('figure-arguments');
  });

  it('ports out of range and two-port figures on other networks', () => {
    const e = fails('rl(3)', 2);
    expect(e.code).toBe('port-out-of-range');
    expect(e.message).toContain('the network has 2 ports');
    expect(fails('rl(0)').code).toBe('port-out-of-range');
    expect(fails('db(S(1,12))', 9).code).toBe('port-out-of-range');
    expect(fails('mu_load', 3).code).toBe('needs-two-port');
    // checked again at evaluation time, against the network given
    const parsed = parseFigure('vswr(2)');
    const onePort = constant(ONE_POINT, [[[0.2, 0]]]);
    expect(() => parsed.evaluate(onePort)).toThrow(FigureError);
    expect(() => computeFigure(onePort, 'k')).toThrow(/two-ports only/);
  });
});
