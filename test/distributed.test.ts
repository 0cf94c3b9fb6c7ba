/**
 * Distributed elements — `line`, `open_stub`, `short_stub`, `coupled_lines`, `microstrip` — solved
 * through loadNetlist + solveSweep and compared with outside references.
 *
 * Sources (each check names its own beside it):
 * - [TL] transmission-line closed forms, common practice (e.g. D. M. Pozar, Microwave Engineering,
 *   ch. 2 (from memory)): a lossless line of electrical length θ between references equal to its
 *   Z0 has S11 = S22 = 0, S21 = S12 = e^(−jθ) (lossy: e^(−γℓ)); the input impedance of a line
 *   terminated in ZL is Zin = Z0·(ZL + j·Z0·tan θ)/(Z0 + j·ZL·tan θ); open stub Zin = Z0·coth(γℓ)
 *   (lossless: −j·Z0·cot θ), short stub Zin = Z0·tanh(γℓ) (lossless: +j·Z0·tan θ); the ABCD matrix
 *   of a section is [[cosh γℓ, Z0·sinh γℓ], [sinh γℓ/Z0, cosh γℓ]]; β = 2πf·√εeff/c0 = 2πf/(vf·c0).
 * - [QW] quarter-wave transformer: a λ/4 line of Z0 = √(Z1·Z2) matches Z2 to Z1 at f0 (common
 *   practice; Pozar, section on the quarter-wave transformer (from memory)).
 * - [1P] one-port reflection between a reference R: Γ = (Z − R)/(Z + R), so Z = R·(1 + S11)/(1 − S11);
 *   a series impedance Z between two ports of reference R: S21 = 2R/(2R + Z) (common practice).
 * - [WK] E. J. Wilkinson, "An N-way hybrid power divider", IRE Trans. Microwave Theory and
 *   Techniques, vol. 8, no. 1, 1960, pp. 116–118 (volume and pages (from memory)): two λ/4 lines of
 *   √2·Z0 from the input and a 2·Z0 resistor between the outputs. Its S matrix at f0 as given in
 *   Pozar, section 7.3 (from memory): S = (−j/√2)·[[0, 1, 1], [1, 0, 0], [1, 0, 0]].
 * - [BL] branch-line hybrid (λ/4 through arms of Z0/√2, λ/4 shunt arms of Z0), S at f0 as given in
 *   Pozar, section 7.5 (from memory): S = (−1/√2)·[[0, j, 1, 0], [j, 0, 0, 1], [1, 0, 0, j],
 *   [0, 1, j, 0]], ports numbered around the square (1 input, 2 through, 3 coupled, 4 isolated).
 * - [CL] coupled-line coupler (symmetric pair, TEM, even/odd modes), Pozar, section 7.6 (from
 *   memory): with Z0 = √(Z0e·Z0o) and C = (Z0e − Z0o)/(Z0e + Z0o), every port is matched and the
 *   isolated port receives nothing at all frequencies; coupled V3/V1 = j·C·tan θ/(√(1 − C²) + j·tan θ),
 *   through V2/V1 = √(1 − C²)/(√(1 − C²)·cos θ + j·sin θ); at θ = 90° these are C and −j·√(1 − C²).
 * - [CH] the chain matrix of a cascade is the product of the sections' chain matrices (common
 *   practice); src/network/algebra.ts `cascade` computes it independently of the stamps.
 * - [LOSS] conductor loss ∝ √f (skin effect), dielectric loss ∝ f (constant tan δ) (common practice).
 * - [LL] lossless reciprocal networks between real references have unitary, symmetric S (common
 *   practice).
 * - [MS] the microstrip model of src/models/microstrip.ts (Hammerstad–Jensen, Kirschning–Jansen,
 *   Jansen–Kirschning, Wheeler, see that module): a `microstrip` must equal the TEM line with the
 *   model's Z0(f), εeff(f), αc(f) and αd(f) at each frequency.
 * - [MJ] mathjs (general-purpose library) for the complex closed forms.
 *
 * Tolerances: 1e-12 absolute on S entries (|S| ≤ 1; the systems have at most 16 unknowns and the
 * measured deviations are below 1e-14), stated otherwise beside the check: 1e-11 for results that
 * pass through the S → ABCD → S conversions of the algebra module, 1e-10 dB for losses, 1e-10
 * relative for impedances recovered from S11 through (1 + S11)/(1 − S11).
 */
import { describe, expect, it } from 'vitest';
import * as math from 'mathjs';
import type { Complex } from 'mathjs';

import { InputError } from '../src/diagnostics/diagnostic.js';
import { coupledLines } from '../src/elements/coupled-lines.js';
import { line } from '../src/elements/line.js';
import { microstrip, microstripIssues } from '../src/elements/microstrip.js';
import { openStub, shortStub } from '../src/elements/stub.js';
import { loadNetlist } from '../src/load.js';
import { SPEED_OF_LIGHT } from '../src/models/line.js';
import { microstripAt, type MicrostripSpec } from '../src/models/microstrip.js';
import { cascade, toChain } from '../src/network/algebra.js';
import type { NetworkData } from '../src/network/types.js';
import { SingularSystemError, solveSweep } from '../src/solve/sweep.js';

// ------------------------------------------------------------------------------------------------
// helpers

interface C {
  re: number;
  im: number;
}

function solve(text: string): NetworkData {
  const { circuit } = loadNetlist(text, 'distributed.sbx');
  return solveSweep(circuit);
}

/** S_ij (1-based) at frequency index k. */
function s(net: NetworkData, k: number, i: number, j: number): C {
  const n = net.ports;
  const o = 2 * ((k * n + (i - 1)) * n + (j - 1));
  return { re: net.values[o]!, im: net.values[o + 1]! };
}

const cx = (re: number, im = 0): C => ({ re, im });
const fromMath = (z: Complex | number): C => (typeof z === 'number' ? cx(z) : cx(z.re, z.im));
const dist = (a: C, b: C): number => Math.hypot(a.re - b.re, a.im - b.im);
const abs = (a: C): number => Math.hypot(a.re, a.im);

function expectNear(actual: C, expected: C, tol: number, what = ''): void {
  const d = dist(actual, expected);
  if (!(d <= tol)) {
    throw new Error(`${what}: got ${actual.re} ${actual.im >= 0 ? '+' : '-'} j${Math.abs(actual.im)}, expected ${expected.re} ${expected.im >= 0 ? '+' : '-'} j${Math.abs(expected.im)} (|diff| ${d} > ${tol})`);
  }
}

/** e^(−j·θ) [TL]. */
const delay = (theta: number): C => cx(Math.cos(theta), -Math.sin(theta));

/** Full netlist-precision number. */
const num = (x: number): string => x.toPrecision(17);

/** Z from a one-port's S11 at reference r [1P]. */
function zFromS11(g: C, r: number): C {
  const z = math.multiply(r, math.divide(math.complex(1 + g.re, g.im), math.complex(1 - g.re, -g.im))) as Complex;
  return fromMath(z);
}

/** Checks S against an expected matrix (rows of complex entries) at frequency index k. */
function expectMatrix(net: NetworkData, k: number, expected: C[][], tol: number, what: string): void {
  for (let i = 1; i <= expected.length; i++) {
    for (let j = 1; j <= expected.length; j++) expectNear(s(net, k, i, j), expected[i - 1]![j - 1]!, tol, `${what} S${i}${j}`);
  }
}

/** max |S^H·S − U| over the entries at frequency k [LL]. */
function unitarity(net: NetworkData, k: number): number {
  const n = net.ports;
  let worst = 0;
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= n; j++) {
      let re = 0;
      let im = 0;
      for (let m = 1; m <= n; m++) {
        const a = s(net, k, m, i);
        const b = s(net, k, m, j);
        re += a.re * b.re + a.im * b.im; // conj(a)·b
        im += a.re * b.im - a.im * b.re;
      }
      worst = Math.max(worst, Math.hypot(re - (i === j ? 1 : 0), im));
    }
  }
  return worst;
}

function errorsOf(text: string): { code: string; message: string }[] {
  try {
    loadNetlist(text, 'bad.sbx');
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error');
    throw e;
  }
  return [];
}

const PORTS2 = 'port 1 plus=in\nport 2 plus=out\n';
const SQ2 = Math.SQRT2;

// ------------------------------------------------------------------------------------------------
// line

describe('line: matched lossless section [TL]', () => {
  it('gives S21 = e^(−jθ·f/f0) and S11 = 0 for theta at a frequency (tolerance 1e-12)', () => {
    const freqs = [0.3e9, 1e9, 2.7e9, 5e9];
    const net = solve(`line l1 a=in b=out z0=50 ohm theta=70 deg at 1 GHz\n${PORTS2}sweep list freqs=0.3 GHz, 1 GHz, 2.7 GHz, 5 GHz\n`);
    freqs.forEach((f, k) => {
      const theta = ((70 * Math.PI) / 180) * (f / 1e9);
      expectNear(s(net, k, 2, 1), delay(theta), 1e-12, `S21 at ${f}`);
      expectNear(s(net, k, 1, 2), delay(theta), 1e-12, `S12 at ${f}`);
      expectNear(s(net, k, 1, 1), cx(0), 1e-12, `S11 at ${f}`);
      expectNear(s(net, k, 2, 2), cx(0), 1e-12, `S22 at ${f}`);
    });
  });

  it('takes a bare theta in radians and `deg` converted (tolerance 1e-13)', () => {
    const a = solve(`line l1 a=in b=out z0=50 ohm theta=pi/3 at 1 GHz\n${PORTS2}sweep list freqs=1.3 GHz\n`);
    expectNear(s(a, 0, 2, 1), delay((Math.PI / 3) * 1.3), 1e-13, 'bare radians');
    const b = solve(`line l1 a=in b=out z0=50 ohm theta=60 deg at 1 GHz\n${PORTS2}sweep list freqs=1.3 GHz\n`);
    expectNear(s(b, 0, 2, 1), s(a, 0, 2, 1), 1e-13, '60 deg = pi/3');
  });

  it('with length: β = 2πf·√εeff/c0 and 2πf/(vf·c0); air when neither is given (tolerance 1e-12)', () => {
    const f = 1.7e9;
    const L = 0.123;
    const cases: [string, number][] = [
      ['eeff=2.25', Math.sqrt(2.25)],
      ['vf=0.66', 1 / 0.66],
      ['', 1],
    ];
    for (const [key, slowness] of cases) {
      const net = solve(`line l1 a=in b=out z0=50 ohm length=123 mm ${key}\n${PORTS2}sweep list freqs=1.7 GHz\n`);
      expectNear(s(net, 0, 2, 1), delay((2 * Math.PI * f * slowness * L) / SPEED_OF_LIGHT), 1e-12, key || 'air');
      expectNear(s(net, 0, 1, 1), cx(0), 1e-12, `${key} S11`);
    }
  });

  it('solves at 0 Hz, at a half wave and a full wave, where the admittance form does not exist (tolerance 1e-12)', () => {
    // z0 = 75 ohm between 50 ohm references: at 0 Hz and every half wave the section is invisible
    // up to sign (ABCD = ±U, [TL]); at the quarter wave Zin = Z0²/ZL = 112.5 ohm ([QW]), so the
    // same circuit does reflect there.
    const net = solve(`line l1 a=in b=out z0=75 ohm theta=180 deg at 1 GHz\n${PORTS2}sweep list freqs=0 Hz, 0.5 GHz, 1 GHz, 2 GHz\n`);
    expectMatrix(net, 0, [[cx(0), cx(1)], [cx(1), cx(0)]], 1e-12, '0 Hz');
    expectMatrix(net, 2, [[cx(0), cx(-1)], [cx(-1), cx(0)]], 1e-12, 'half wave');
    expectMatrix(net, 3, [[cx(0), cx(1)], [cx(1), cx(0)]], 1e-12, 'full wave');
    expectNear(s(net, 1, 1, 1), cx((112.5 - 50) / (112.5 + 50)), 1e-12, 'quarter wave S11');
  });

  it('as a four-terminal section: S21 = e^(−jθ) on a floating pair, −e^(−jθ) as an inverter (tolerance 1e-12)', () => {
    const theta = (50 * Math.PI) / 180;
    // a pair floating as a whole (its return conductor r is common to both ports)
    const net = solve(
      'line l1 a=p b=q a_ret=r b_ret=r z0=100 ohm theta=50 deg at 1 GHz\nsweep list freqs=1 GHz\n' +
        'port 1 plus=p minus=r ref=100 ohm\nport 2 plus=q minus=r ref=100 ohm\n',
    );
    expectMatrix(net, 0, [[cx(0), delay(theta)], [delay(theta), cx(0)]], 1e-12, 'balanced');
    // the output pair taken the other way round: b on ground, b_ret as the output
    const inv = solve(`line l1 a=in b=ground b_ret=out z0=50 ohm theta=50 deg at 1 GHz\n${PORTS2}sweep list freqs=1 GHz\n`);
    expectNear(s(inv, 0, 2, 1), cx(-Math.cos(theta), Math.sin(theta)), 1e-12, 'inverted S21');
    expectNear(s(inv, 0, 1, 1), cx(0), 1e-12, 'inverted S11');
    // explicit ground returns are the default
    const g1 = solve(`line l1 a=in b=out a_ret=ground b_ret=ground z0=30 ohm theta=50 deg at 1 GHz\n${PORTS2}sweep list freqs=1.4 GHz\n`);
    const g2 = solve(`line l1 a=in b=out z0=30 ohm theta=50 deg at 1 GHz\n${PORTS2}sweep list freqs=1.4 GHz\n`);
    expectMatrix(g1, 0, [[s(g2, 0, 1, 1), s(g2, 0, 1, 2)], [s(g2, 0, 2, 1), s(g2, 0, 2, 2)]], 1e-14, 'ground returns');
    expect(abs(s(g2, 0, 1, 1))).toBeGreaterThan(0.1); // a mismatched line does reflect
  });

  it('with two separately floating pairs, each pair gets a reference of its own: a matched line, S21 = e^(−jθ)', () => {
    // The section couples only the voltage across each pair, so nothing fixes the level of one pair
    // against the other (as with an ideal transformer's two windings); the element says so
    // (its connections), each pair becomes a group with a port, and S is that of the line
    // (matched lossless line, common practice).
    const net = solve(
      'line l1 a=p b=q a_ret=pr b_ret=qr z0=100 ohm theta=50 deg at 1 GHz\nsweep list freqs=1 GHz\n' +
        'port 1 plus=p minus=pr ref=100 ohm\nport 2 plus=q minus=qr ref=100 ohm\n',
    );
    const th = (50 * Math.PI) / 180;
    expectNear(s(net, 0, 2, 1), { re: Math.cos(th), im: -Math.sin(th) }, 1e-12, 'S21');
    expectNear(s(net, 0, 1, 1), cx(0), 1e-12, 'S11');
  });
});

describe('line: quarter-wave transformer 50 → 100 ohm [QW]', () => {
  it('has S11 = 0 at f0 with a 100 ohm reference on port 2, and follows Zin of [TL] off f0 (tolerance 1e-12)', () => {
    const zt = Math.sqrt(50 * 100);
    const freqs = [0.6e9, 1e9, 1.3e9];
    const net = solve(
      'let zt = sqrt(50 ohm * 100 ohm)\nline qw a=in b=out z0=zt theta=90 deg at 1 GHz\n' +
        'port 1 plus=in ref=50 ohm\nport 2 plus=out ref=100 ohm\nsweep list freqs=0.6 GHz, 1 GHz, 1.3 GHz\n',
    );
    expectNear(s(net, 1, 1, 1), cx(0), 1e-12, 'S11 at f0');
    expectNear(s(net, 1, 2, 2), cx(0), 1e-12, 'S22 at f0');
    expect(Math.abs(abs(s(net, 1, 2, 1)) - 1)).toBeLessThan(1e-12);
    freqs.forEach((f, k) => {
      const t = Math.tan((Math.PI / 2) * (f / 1e9));
      const zin = math.multiply(zt, math.divide(math.complex(100, zt * t), math.complex(zt, 100 * t))) as Complex; // [TL]
      const g = math.divide(math.subtract(zin, 50), math.add(zin, 50)) as Complex; // [1P]
      expectNear(s(net, k, 1, 1), fromMath(g), 1e-12, `S11 at ${f}`);
    });
    expect(abs(s(net, 0, 1, 1))).toBeGreaterThan(0.05); // off f0 it reflects
  });
});

describe('line: loss [LOSS]', () => {
  // A lossy line of real Z0 between references equal to Z0 has S21 = e^(−γℓ) [TL], so
  // |S21| in dB is −(αc + αd)·ℓ in dB. ℓ = 0.5 m; tolerance 1e-10 dB.
  const dbS21 = (net: NetworkData, k: number) => 20 * Math.log10(abs(s(net, k, 2, 1)));
  const sweep = 'sweep list freqs=0 Hz, 1 GHz, 4 GHz\n';

  it('conductor loss doubles at 4·f0 (∝ √f)', () => {
    const net = solve(`line l1 a=in b=out z0=50 ohm length=0.5 m alpha_c=2 dB/m at 1 GHz\n${PORTS2}${sweep}`);
    expect(Math.abs(dbS21(net, 0))).toBeLessThan(1e-10); // no loss at 0 Hz in this model
    expect(Math.abs(dbS21(net, 1) - -1)).toBeLessThan(1e-10);
    expect(Math.abs(dbS21(net, 2) - -2)).toBeLessThan(1e-10);
    expectNear(s(net, 2, 1, 1), cx(0), 1e-12, 'matched');
  });

  it('dielectric loss quadruples at 4·f0 (∝ f)', () => {
    const net = solve(`line l1 a=in b=out z0=50 ohm length=0.5 m alpha_d=2 dB/m at 1 GHz\n${PORTS2}${sweep}`);
    expect(Math.abs(dbS21(net, 1) - -1)).toBeLessThan(1e-10);
    expect(Math.abs(dbS21(net, 2) - -4)).toBeLessThan(1e-10);
  });

  it('both terms at different stated frequencies add, each with its own law; the phase is unchanged', () => {
    const net = solve(
      `line l1 a=in b=out z0=50 ohm length=0.5 m eeff=4 alpha_c=2 dB/m at 1 GHz alpha_d=3 dB/m at 2 GHz\n${PORTS2}sweep list freqs=0.7 GHz, 3.1 GHz\n`,
    );
    [0.7e9, 3.1e9].forEach((f, k) => {
      const db = -0.5 * (2 * Math.sqrt(f / 1e9) + 3 * (f / 2e9));
      expect(Math.abs(dbS21(net, k) - db)).toBeLessThan(1e-10);
      const beta = (2 * Math.PI * f * 2) / SPEED_OF_LIGHT;
      const phase = Math.atan2(s(net, k, 2, 1).im, s(net, k, 2, 1).re);
      expect(Math.abs(Math.atan2(Math.sin(phase + beta * 0.5), Math.cos(phase + beta * 0.5)))).toBeLessThan(1e-12);
    });
  });

  it('theta with length: the length only scales the loss', () => {
    const net = solve(`line l1 a=in b=out z0=50 ohm theta=90 deg at 1 GHz length=0.25 m alpha_c=4 dB/m at 1 GHz\n${PORTS2}sweep list freqs=1 GHz\n`);
    const g = Math.pow(10, -1 / 20); // 4 dB/m · 0.25 m = 1 dB
    expectNear(s(net, 0, 2, 1), cx(0, -g), 1e-12, 'S21 = −j·10^(−1/20)');
  });
});

// ------------------------------------------------------------------------------------------------
// stubs

describe('stubs [TL], [1P]', () => {
  it('a shunt open λ/8 stub has Zin = −j·Z0, a short one +j·Z0 (tolerance 1e-10 relative)', () => {
    for (const [kw, sign] of [['open_stub', -1], ['short_stub', 1]] as const) {
      const net = solve(`${kw} s1 a=in z0=75 ohm theta=45 deg at 1 GHz\nport 1 plus=in\nsweep list freqs=1 GHz\n`);
      const z = zFromS11(s(net, 0, 1, 1), 50);
      expect(dist(z, cx(0, sign * 75)) / 75).toBeLessThan(1e-10);
    }
  });

  it('follow −j·Z0·cot θ and +j·Z0·tan θ at other frequencies, also as series stubs [1P] (tolerance 1e-12)', () => {
    const fs = [0.3e9, 0.77e9, 1.6e9];
    const sweep = 'sweep list freqs=0.3 GHz, 0.77 GHz, 1.6 GHz\n';
    const open = solve(`open_stub s1 a=in b=out z0=75 ohm theta=45 deg at 1 GHz\n${PORTS2}${sweep}`);
    const short = solve(`short_stub s1 a=in b=out z0=75 ohm theta=45 deg at 1 GHz\n${PORTS2}${sweep}`);
    fs.forEach((f, k) => {
      const th = (Math.PI / 4) * (f / 1e9);
      const zo = cx(0, -75 / Math.tan(th));
      const zs = cx(0, 75 * Math.tan(th));
      const s21 = (z: C) => fromMath(math.divide(100, math.complex(100 + z.re, z.im)) as Complex);
      expectNear(s(open, k, 2, 1), s21(zo), 1e-12, `open S21 at ${f}`);
      expectNear(s(short, k, 2, 1), s21(zs), 1e-12, `short S21 at ${f}`);
    });
  });

  it('a lossy open stub has Zin = Z0·coth(γℓ) [TL], [MJ] (tolerance 1e-10 relative)', () => {
    const net = solve(`open_stub s1 a=in z0=60 ohm length=40 mm eeff=3 alpha_c=5 dB/m at 1 GHz alpha_d=8 dB/m at 1 GHz\nport 1 plus=in\nsweep list freqs=2.2 GHz\n`);
    const f = 2.2e9;
    const alpha = ((5 * Math.sqrt(2.2) + 8 * 2.2) / (20 / Math.LN10)) * 0.04; // Np
    const beta = ((2 * Math.PI * f * Math.sqrt(3)) / SPEED_OF_LIGHT) * 0.04;
    const zin = fromMath(math.multiply(60, math.coth(math.complex(alpha, beta))) as Complex);
    expect(dist(zFromS11(s(net, 0, 1, 1), 50), zin) / abs(zin)).toBeLessThan(1e-10);
  });

  it('solve where Zin or Yin is zero or infinite: 0 Hz, λ/4, λ/2 (tolerance 1e-12)', () => {
    // θ = 90° at 1 GHz: 0 Hz, 1 GHz (λ/4), 2 GHz (λ/2). Shunt stubs between two 50 ohm ports:
    // a short across the line gives S21 = 0, S11 = −1; an open one leaves S21 = 1 [TL].
    const sweep = 'sweep list freqs=0 Hz, 1 GHz, 2 GHz\n';
    const open = solve(`open_stub s1 a=in z0=50 ohm theta=90 deg at 1 GHz\nline l0 a=in b=out z0=50 ohm theta=1 deg at 1 GHz\n${PORTS2}${sweep}`);
    const short = solve(`short_stub s1 a=in z0=50 ohm theta=90 deg at 1 GHz\nline l0 a=in b=out z0=50 ohm theta=1 deg at 1 GHz\n${PORTS2}${sweep}`);
    const thru = (k: number) => delay(((Math.PI / 180) * [0, 1, 2][k]!));
    // open stub: open at 0 Hz, short at λ/4, open at λ/2
    expectNear(s(open, 0, 2, 1), thru(0), 1e-12, 'open 0 Hz');
    expectNear(s(open, 1, 1, 1), cx(-1), 1e-12, 'open λ/4 S11');
    expectNear(s(open, 1, 2, 1), cx(0), 1e-12, 'open λ/4 S21');
    expectNear(s(open, 2, 2, 1), thru(2), 1e-12, 'open λ/2');
    // short stub: short at 0 Hz, open at λ/4, short at λ/2
    expectNear(s(short, 0, 1, 1), cx(-1), 1e-12, 'short 0 Hz S11');
    expectNear(s(short, 0, 2, 1), cx(0), 1e-12, 'short 0 Hz S21');
    expectNear(s(short, 1, 2, 1), thru(1), 1e-12, 'short λ/4');
    expectNear(s(short, 2, 1, 1), cx(-1), 1e-12, 'short λ/2 S11');
  });
});

// ------------------------------------------------------------------------------------------------
// classic circuits at f0

describe('Wilkinson divider at f0 [WK]', () => {
  it('gives S21 = S31 = −j/√2, S23 = 0 and all ports matched (tolerance 1e-12)', () => {
    const net = solve(
      'let zq = sqrt(2)*50 ohm\n' +
        'line l2 a=p1 b=p2 z0=zq theta=90 deg at 2 GHz\n' +
        'line l3 a=p1 b=p3 z0=zq theta=90 deg at 2 GHz\n' +
        'resistor r23 a=p2 b=p3 value=100 ohm\n' +
        'port 1 plus=p1\nport 2 plus=p2\nport 3 plus=p3\nsweep list freqs=2 GHz, 2.4 GHz\n',
    );
    const m = cx(0, -1 / SQ2);
    const z = cx(0);
    expectMatrix(net, 0, [[z, m, m], [m, z, z], [m, z, z]], 1e-12, 'f0');
    expect(abs(s(net, 1, 2, 3))).toBeGreaterThan(1e-3); // the isolation is a narrow-band property
  });
});

describe('branch-line hybrid at f0 [BL]', () => {
  const text =
    'let zs = 50 ohm/sqrt(2)\n' +
    'line t12 a=p1 b=p2 z0=zs     theta=90 deg at 3 GHz\n' +
    'line t43 a=p4 b=p3 z0=zs     theta=90 deg at 3 GHz\n' +
    'line t14 a=p1 b=p4 z0=50 ohm theta=90 deg at 3 GHz\n' +
    'line t23 a=p2 b=p3 z0=50 ohm theta=90 deg at 3 GHz\n' +
    'port 1 plus=p1\nport 2 plus=p2\nport 3 plus=p3\nport 4 plus=p4\nsweep list freqs=3 GHz, 3.5 GHz\n';

  it('gives S21 = −j/√2, S31 = −1/√2, S41 = 0, the whole S matrix of [BL] (tolerance 1e-12)', () => {
    const net = solve(text);
    const k = -1 / SQ2;
    const o = cx(0);
    const j = cx(0, k);
    const r = cx(k);
    expectMatrix(net, 0, [[o, j, r, o], [j, o, o, r], [r, o, o, j], [o, r, j, o]], 1e-12, 'f0');
  });

  it('stays lossless and reciprocal off f0 [LL] (tolerance 1e-12)', () => {
    const net = solve(text);
    expect(unitarity(net, 1)).toBeLessThan(1e-12);
    for (let i = 1; i <= 4; i++) for (let j = 1; j <= 4; j++) expectNear(s(net, 1, i, j), s(net, 1, j, i), 1e-12, `S${i}${j}`);
    expect(abs(s(net, 1, 4, 1))).toBeGreaterThan(1e-3);
  });
});

describe('coupled_lines: quarter-wave coupler [CL]', () => {
  // z0e = 80, z0o = 31.25 ohm: Z0 = √(z0e·z0o) = 50 ohm, C = 48.75/111.25.
  const C = (80 - 31.25) / (80 + 31.25);
  const q = Math.sqrt(1 - C * C);
  const text = (len: string, sweep: string) =>
    `coupled_lines k a1=p1 b1=p2 a2=p3 b2=p4 z0e=80 ohm z0o=31.25 ohm ${len}\n` +
    `port 1 plus=p1\nport 2 plus=p2\nport 3 plus=p3\nport 4 plus=p4\n${sweep}`;

  it('couples (Z0e − Z0o)/(Z0e + Z0o) at f0, through −j·√(1 − C²), matched and isolated (tolerance 1e-12)', () => {
    const net = solve(text('theta=90 deg at 2 GHz', 'sweep list freqs=2 GHz\n'));
    expectNear(s(net, 0, 3, 1), cx(C), 1e-12, 'coupled S31');
    expectNear(s(net, 0, 2, 1), cx(0, -q), 1e-12, 'through S21');
    expectNear(s(net, 0, 1, 1), cx(0), 1e-12, 'S11');
    expectNear(s(net, 0, 4, 1), cx(0), 1e-12, 'isolated S41');
    // the pair is symmetric end to end and line to line: driven at port 4, port 2 is coupled
    expectNear(s(net, 0, 2, 4), cx(C), 1e-12, 'S24');
    expectNear(s(net, 0, 3, 4), cx(0, -q), 1e-12, 'S34');
  });

  it('follows the closed forms of [CL] at other electrical lengths and stays matched and isolated (tolerance 1e-12)', () => {
    const fs = [0.5e9, 1.3e9, 2.9e9, 4e9];
    const net = solve(text('theta=90 deg at 2 GHz', 'sweep list freqs=0.5 GHz, 1.3 GHz, 2.9 GHz, 4 GHz\n'));
    fs.forEach((f, k) => {
      const th = (Math.PI / 2) * (f / 2e9);
      const j = math.complex(0, 1);
      const cpl = math.divide(math.multiply(j, C * Math.tan(th)), math.add(q, math.multiply(j, Math.tan(th)))) as Complex;
      const thru = math.divide(q, math.complex(q * Math.cos(th), Math.sin(th))) as Complex;
      expectNear(s(net, k, 3, 1), fromMath(cpl), 1e-12, `S31 at ${f}`);
      expectNear(s(net, k, 2, 1), fromMath(thru), 1e-12, `S21 at ${f}`);
      expectNear(s(net, k, 1, 1), cx(0), 1e-12, `S11 at ${f}`);
      expectNear(s(net, k, 4, 1), cx(0), 1e-12, `S41 at ${f}`);
    });
    // 4 GHz is the half wave: no coupling, both lines pass straight through with S21 = −1.
    expectNear(s(net, 3, 3, 1), cx(0), 1e-12, 'S31 at λ/2');
    expectNear(s(net, 3, 2, 1), cx(-1), 1e-12, 'S21 at λ/2');
  });

  it('solves at 0 Hz: two separate through lines (tolerance 1e-12)', () => {
    const net = solve(text('theta=90 deg at 2 GHz', 'sweep list freqs=0 Hz\n'));
    const o = cx(0);
    const one = cx(1);
    expectMatrix(net, 0, [[o, one, o, o], [one, o, o, o], [o, o, o, one], [o, o, one, o]], 1e-12, '0 Hz');
  });

  it('with length and eeff_e = eeff_o equals the theta form with θ = 2πf·√εeff·ℓ/c0 [TL] (tolerance 1e-12)', () => {
    const L = 0.02;
    const ee = 2.5;
    const f0 = SPEED_OF_LIGHT / (4 * L * Math.sqrt(ee)); // quarter wave
    const a = solve(text(`length=20 mm eeff_e=2.5 eeff_o=2.5`, `sweep list freqs=${num(f0)} Hz\n`));
    expectNear(s(a, 0, 3, 1), cx(C), 1e-12, 'S31');
    expectNear(s(a, 0, 2, 1), cx(0, -q), 1e-12, 'S21');
  });

  it('with unequal mode velocities stays lossless and reciprocal [LL], and isolation degrades (tolerance 1e-12)', () => {
    const net = solve(text('length=20 mm eeff_e=3.3 eeff_o=2.6', 'sweep list freqs=2.1 GHz\n'));
    expect(unitarity(net, 0)).toBeLessThan(1e-12);
    for (let i = 1; i <= 4; i++) for (let j = 1; j <= 4; j++) expectNear(s(net, 0, i, j), s(net, 0, j, i), 1e-12, `S${i}${j}`);
    expect(abs(s(net, 0, 4, 1))).toBeGreaterThan(1e-3); // the inhomogeneous pair is not perfectly isolated
  });
});

// ------------------------------------------------------------------------------------------------
// cascade

describe('cascade of sections equals the solved chain [CH]', () => {
  const sections = [
    'line a1 a=in b=out z0=50 ohm theta=40 deg at 1 GHz',
    'open_stub a2 a=in z0=60 ohm theta=65 deg at 1 GHz\nline a2t a=in b=out z0=50 ohm theta=5 deg at 1 GHz',
    'line a3 a=in b=out z0=35 ohm length=70 mm vf=0.7 alpha_c=3 dB/m at 1 GHz alpha_d=2 dB/m at 1 GHz',
    'short_stub a4 a=in b=out z0=90 ohm theta=30 deg at 1 GHz',
    'coupled_lines a5 a1=in b1=out a2=o1 b2=o2 z0e=70 ohm z0o=40 ohm theta=80 deg at 1 GHz\nresistor r5 a=o1 b=ground value=50 ohm\nresistor r6 a=o2 b=ground value=20 ohm',
  ];
  const sweep = 'sweep list freqs=0.2 GHz, 0.9 GHz, 1.7 GHz, 2.6 GHz\n';

  it('for lines, stubs and a terminated coupled pair (tolerance 1e-11)', () => {
    // Each section alone between ports on `in` and `out`; in the whole chain they are joined at
    // n1…n4 (the shunt stub's section carries a short line so that its two ports are distinct).
    const parts = sections.map((t) => solve(`${t}\n${PORTS2}${sweep}`));
    const chained = cascade(...parts);
    const nodes = ['in', 'n1', 'n2', 'n3', 'n4', 'out'];
    const whole = sections
      .map((t, i) =>
        t
          .replace(/\ba=in\b/g, `a=${nodes[i]}`)
          .replace(/\ba1=in\b/g, `a1=${nodes[i]}`)
          .replace(/\bb=out\b/g, `b=${nodes[i + 1]}`)
          .replace(/\bb1=out\b/g, `b1=${nodes[i + 1]}`),
      )
      .join('\n');
    const net = solve(`${whole}\n${PORTS2}${sweep}`);
    for (let k = 0; k < 4; k++) {
      for (let i = 1; i <= 2; i++) {
        for (let j = 1; j <= 2; j++) expectNear(s(net, k, i, j), s(chained, k, i, j), 1e-11, `k=${k} S${i}${j}`);
      }
    }
  });

  it('a solved line has the chain matrix [[cosh γℓ, Z0·sinh γℓ], [sinh γℓ/Z0, cosh γℓ]] [TL], [MJ] (tolerance 1e-10 relative)', () => {
    const net = solve(`line l1 a=in b=out z0=35 ohm length=70 mm vf=0.7 alpha_c=3 dB/m at 1 GHz alpha_d=2 dB/m at 1 GHz\n${PORTS2}${sweep}`);
    const abcd = toChain(net);
    [0.2e9, 0.9e9, 1.7e9, 2.6e9].forEach((f, k) => {
      const a = ((3 * Math.sqrt(f / 1e9) + 2 * (f / 1e9)) / (20 / Math.LN10)) * 0.07;
      const b = ((2 * Math.PI * f) / (0.7 * SPEED_OF_LIGHT)) * 0.07;
      const g = math.complex(a, b);
      const want = [math.cosh(g), math.multiply(35, math.sinh(g)), math.divide(math.sinh(g), 35), math.cosh(g)] as Complex[];
      const scale = [1, 35, 1 / 35, 1];
      for (let e = 0; e < 4; e++) {
        const got = cx(abcd.values[8 * k + 2 * e]!, abcd.values[8 * k + 2 * e + 1]!);
        expect(dist(got, fromMath(want[e]!)) / scale[e]!).toBeLessThan(1e-10);
      }
    });
  });
});

// ------------------------------------------------------------------------------------------------
// microstrip

describe('microstrip equals the TEM line of its model [MS]', () => {
  const spec: MicrostripSpec = { w: 1.5e-3, h: 0.8e-3, t: 35e-6, er: 4.4, tanDelta: 0.02, sigma: 5.8e7, roughness: 1e-6 };
  const msLine = 'microstrip m1 a=in b=out w=1.5 mm h=0.8 mm t=35 um er=4.4 tand=0.02 sigma=5.8e7 S/m rough=1 um length=23 mm';

  /** The same section as a `line`, from the model's values at f. */
  function idealAt(f: number): string {
    const m = microstripAt(f, spec);
    return (
      `line l1 a=in b=out z0=${num(m.z0)} ohm length=23 mm eeff=${num(m.eeff)} ` +
      `alpha_c=${num(m.alphaConductorDb)} dB/m at ${num(f)} Hz alpha_d=${num(m.alphaDielectricDb)} dB/m at ${num(f)} Hz`
    );
  }

  it('at 2.45 GHz and at 9 GHz, each against the line with the model values there (tolerance 1e-12)', () => {
    for (const f of [2.45e9, 9e9]) {
      const sweep = `sweep list freqs=${num(f)} Hz\n`;
      const a = solve(`${msLine}\n${PORTS2}${sweep}`);
      const b = solve(`${idealAt(f)}\n${PORTS2}${sweep}`);
      for (let i = 1; i <= 2; i++) for (let j = 1; j <= 2; j++) expectNear(s(a, 0, i, j), s(b, 0, i, j), 1e-12, `${f} S${i}${j}`);
    }
    // the check can tell the frequencies apart: the line built for 2.45 GHz differs at 9 GHz
    const sweep = 'sweep list freqs=9 GHz\n';
    const at9 = solve(`${msLine}\n${PORTS2}${sweep}`);
    const wrong = solve(`${idealAt(2.45e9)}\n${PORTS2}${sweep}`);
    expect(dist(s(at9, 0, 2, 1), s(wrong, 0, 2, 1))).toBeGreaterThan(1e-3);
  });

  it('between references equal to its Z0(f) gives S11 = 0 and S21 = e^(−γℓ) [TL] (tolerance 1e-12)', () => {
    const f = 2.45e9;
    const m = microstripAt(f, spec);
    const net = solve(`${msLine}\nport 1 plus=in ref=${num(m.z0)} ohm\nport 2 plus=out ref=${num(m.z0)} ohm\nsweep list freqs=2.45 GHz\n`);
    const a = (m.alphaConductor + m.alphaDielectric) * 0.023;
    const b = m.beta * 0.023;
    expectNear(s(net, 0, 1, 1), cx(0), 1e-12, 'S11');
    expectNear(s(net, 0, 2, 1), cx(Math.exp(-a) * Math.cos(b), -Math.exp(-a) * Math.sin(b)), 1e-12, 'S21');
  });

  it('solves at 0 Hz (no DC loss in the model: a plain through) (tolerance 1e-12)', () => {
    const net = solve(`${msLine}\n${PORTS2}sweep list freqs=0 Hz, 1 GHz\n`);
    expectMatrix(net, 0, [[cx(0), cx(1)], [cx(1), cx(0)]], 1e-12, '0 Hz');
  });

  it('lists the model range issues for the sweep top (helper for warnings)', () => {
    const { circuit } = loadNetlist(
      'microstrip m1 a=in b=out w=0.05 mm h=1.5 mm t=35 um er=4.4 length=10 mm\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=1 GHz, 12 GHz\n',
      'x.sbx',
    );
    const issues = microstripIssues(circuit.elements[0]!, 12e9);
    // w/h = 0.033 is below 0.1 (Kirschning–Jansen) and f·h = 18 GHz·mm above 15 (Jansen–Kirschning),
    // ranges as listed in src/models/microstrip.ts.
    expect(issues.some((m) => /Kirschning–Jansen/.test(m))).toBe(true);
    expect(issues.some((m) => /GHz·mm/.test(m))).toBe(true);
    expect(microstripIssues(loadNetlist(`${msLine}\n${PORTS2}sweep list freqs=1 GHz\n`, 'y.sbx').circuit.elements[0]!, 3e9)).toEqual([]);
  });
});

// ------------------------------------------------------------------------------------------------
// netlist checks

describe('element checks at elaboration', () => {
  const bad: [string, RegExp][] = [
    ['line l a=x b=y z0=50 ohm', /either as `theta`/],
    ['line l a=x b=y z0=50 ohm theta=90 deg at 1 GHz length=1 m', /not both/],
    ['line l a=x b=y z0=50 ohm theta=90 deg at 1 GHz alpha_c=1 dB/m at 1 GHz', /needs `length`/],
    ['line l a=x b=y z0=50 ohm theta=90 deg at 1 GHz eeff=2', /with `theta`/],
    ['line l a=x b=y z0=50 ohm length=1 m eeff=2 vf=0.7', /either `eeff` or `vf`/],
    ['line l a=x b=y z0=50 ohm length=1 m vf=1.2', /at most 1/],
    ['line l a=x b=y z0=50 ohm length=1 m eeff=0.5', /1 or more/],
    ['open_stub s a=x z0=50 ohm length=1 m alpha_d=1 dB/m at 0 Hz', /above 0 Hz/],
    ['coupled_lines k a1=x b1=y a2=u b2=v z0e=30 ohm z0o=60 ohm theta=90 deg at 1 GHz', /at least `z0o`/],
    ['coupled_lines k a1=x b1=y a2=u b2=v z0e=60 ohm z0o=30 ohm theta=90 deg at 1 GHz eeff_e=3', /with `theta`/],
    ['microstrip m a=x b=y w=1 mm h=0.8 mm t=1 mm er=4 length=1 cm', /thinner/],
    ['microstrip m a=x b=y w=1 mm h=0.8 mm t=35 um er=0.5 length=1 cm', /1 or more/],
  ];
  for (const [text, why] of bad) {
    it(`rejects: ${text}`, () => {
      const errs = errorsOf(`${text}\nport 1 plus=x\nsweep list freqs=1 GHz\n`);
      expect(errs.some((e) => why.test(e.message))).toBe(true);
    });
  }

  it('rejects an angle with the wrong dimension and a loss without a unit it can read', () => {
    expect(errorsOf('line l a=x b=y z0=50 ohm theta=90 ohm at 1 GHz\nport 1 plus=x\nsweep list freqs=1 GHz\n').some((e) => e.code === 'wrong-unit')).toBe(true);
    expect(errorsOf('line l a=x b=y z0=50 ohm length=1 m alpha_c=1 dB at 1 GHz\nport 1 plus=x\nsweep list freqs=1 GHz\n').some((e) => e.code === 'wrong-unit')).toBe(true);
  });

  it('accepts the example line of every distributed element (the grammar reference shows them)', () => {
    for (const type of [line, openStub, shortStub, coupledLines, microstrip]) {
      const nodes = [...type.example.matchAll(/\b(?:a|b|a1|b1|a2|b2)=(\w+)/g)].map((m) => m[1]!).filter((n) => n !== 'ground');
      const ports = nodes.map((n, i) => `port ${i + 1} plus=${n}`).join('\n');
      expect(errorsOf(`${type.example}\n${ports}\nsweep list freqs=1 GHz\n`)).toEqual([]);
    }
  });

  it('accepts a valid netlist of every element without errors', () => {
    expect(
      errorsOf(
        'line l a=x b=y z0=50 ohm theta=90 deg at 1 GHz\nopen_stub s a=y z0=50 ohm length=1 cm\nshort_stub s2 a=y b=z z0=50 ohm length=1 cm vf=0.8\n' +
          'coupled_lines k a1=z b1=u a2=v b2=w z0e=60 ohm z0o=40 ohm length=2 cm eeff_e=3 eeff_o=2.5\n' +
          'microstrip m a=u b=q w=1 mm h=0.8 mm t=35 um er=4 length=1 cm\nport 1 plus=x\nport 2 plus=q\nsweep list freqs=1 GHz\n',
      ),
    ).toEqual([]);
  });
});
