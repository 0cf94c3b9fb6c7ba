/**
 * Closed-form checks of the solver: netlists written as text, loaded with loadNetlist and solved
 * with solveSweep; the S-parameters are compared with textbook closed forms of simple networks.
 *
 * Sources (each check names its own beside it):
 * - [SER] series impedance Z between two ports of equal real reference Z0:
 *     S11 = S22 = Z/(Z + 2Z0),  S21 = S12 = 2Z0/(Z + 2Z0).
 *   Common practice; it follows from the ABCD matrix [[1, Z], [0, 1]] of a series element and the
 *   ABCD-to-S table (Pozar, Microwave Engineering, ch. 4 — chapter (from memory)).
 * - [SHU] shunt admittance Y to ground between two ports of equal reference Z0:
 *     S11 = S22 = −Y·Z0/(2 + Y·Z0),  S21 = S12 = 2/(2 + Y·Z0).
 *   Common practice; same derivation with ABCD = [[1, 0], [Y, 1]].
 * - [PW] series impedance Z between references Z1 (port 1) and Z2 (port 2), power-wave
 *   normalisation a = (V + Zref·I)/(2√Zref), b = (V − Zref·I)/(2√Zref) for real Zref (Kurokawa,
 *   "Power waves and the scattering matrix", IEEE Trans. MTT, 1965 — details (from memory)):
 *     S11 = (Z + Z2 − Z1)/(Z + Z1 + Z2),  S22 = (Z + Z1 − Z2)/(Z + Z1 + Z2),
 *     S21 = S12 = 2√(Z1·Z2)/(Z + Z1 + Z2).
 *   Derivation, written out so it can be checked: drive port 1 with a1 = 1 from a source of
 *   2√Z1 behind Z1, port 2 terminated in Z2; the loop current is I = 2√Z1/(Z1 + Z + Z2), so
 *   V2 = Z2·I and b2 = V2/√Z2 gives S21; V1 = (Z + Z2)·I and b1 = V1/√Z1 − 1 gives S11. With
 *   Z1 = Z2 = Z0 it reduces to [SER].
 * - [ONE] one-port load Z: S11 = (Z − Z0)/(Z + Z0). Common practice.
 * - [LOSS] element laws as documented in .notes/syntax.md (the netlist spec we test against):
 *   capacitor q=Q at f0 → ESR = 1/(2π·f0·C·Q), inductor q=Q at f0 → Rs = 2π·f0·L/Q, both held
 *   constant over frequency; and Q = |X|/R of a series R–X pair (common practice).
 * - [CONV] Z and Y matrices of the series and shunt two-ports: a series Z has
 *   Y = (1/Z)·[[1, −1], [−1, 1]] and no Z matrix; a shunt Y has Z = (1/Y)·[[1, 1], [1, 1]] and no
 *   Y matrix. Common practice (two-port parameter definitions, open/short-circuit tests).
 *
 * The expected values are evaluated with mathjs complex arithmetic (general-purpose library), so
 * none of the project's own complex code is used to make the reference.
 *
 * Tolerances:
 * - S entries: |S_computed − S_expected| ≤ 1e-12 absolute (entries of a passive S are at most 1
 *   in modulus, so this is also relative to max |S|). The systems here have 1–4 unknowns;
 *   rounding in the solve is ~1e-15, and the unit scaling done by mathjs when it reads values like
 *   `22 nH` adds a relative error of order 1e-16; 1e-12 leaves three orders of margin.
 * - Z and Y entries from convertNetwork: relative 1e-10 of the expected entry. The conversion
 *   solves with U + S (series case) or U − S (shunt case), whose condition numbers are about
 *   |Z + 2Z0|/|Z| and |2 + Y·Z0|/|Y·Z0| (from their eigenvalues 2 and 2Z/(Z + 2Z0), resp. 2 and
 *   2YZ0/(2 + YZ0)); for the values used they stay below 1e3, so rounding stays below ~1e-13.
 * - Quality factor recovered from S: relative 1e-9 (Re Z is a small part of |Z|, so cancellation
 *   costs up to ~Q·1e-15 relative).
 */
import { describe, expect, it } from 'vitest';
import * as math from 'mathjs';
import type { Complex } from 'mathjs';

import { loadNetlist } from '../src/load.js';
import { solveSweep, SingularSystemError } from '../src/solve/sweep.js';
import { ConversionError, convertNetwork } from '../src/network/convert.js';
import type { NetworkData } from '../src/network/types.js';

// ------------------------------------------------------------------------------------------------
// helpers

const TOL_S = 1e-12;
const TOL_ZY = 1e-10;

function solve(text: string): NetworkData {
  const { circuit } = loadNetlist(text, 'closed-forms.sbx');
  return solveSweep(circuit);
}

/** Entry (i, j), 0-based, at frequency index k, as a mathjs complex number. */
function entry(net: NetworkData, k: number, i: number, j: number): Complex {
  const n = net.ports;
  const o = 2 * ((k * n + i) * n + j);
  return math.complex(net.values[o]!, net.values[o + 1]!);
}

function dist(a: Complex, b: Complex): number {
  return math.abs(math.subtract(a, b) as Complex) as unknown as number;
}

function expectClose(actual: Complex, expected: Complex, tol: number, what: string): void {
  const d = dist(actual, expected);
  if (!(d <= tol)) {
    throw new Error(`${what}: got ${math.format(actual, 17)}, expected ${math.format(expected, 17)} (|diff| ${d} > ${tol})`);
  }
}

function expectRelClose(actual: Complex, expected: Complex, rel: number, what: string): void {
  const scale = math.abs(expected) as unknown as number;
  expectClose(actual, expected, rel * scale, what);
}

const c = (re: number, im = 0): Complex => math.complex(re, im);
const add = (a: Complex, b: Complex): Complex => math.add(a, b) as Complex;
const sub = (a: Complex, b: Complex): Complex => math.subtract(a, b) as Complex;
const mul = (a: Complex, b: Complex): Complex => math.multiply(a, b) as Complex;
const div = (a: Complex, b: Complex): Complex => math.divide(a, b) as Complex;
const inv = (a: Complex): Complex => div(c(1), a);

/** [PW] S of a series impedance z between real references z1 (port 1) and z2 (port 2). */
function seriesS(z: Complex, z1: number, z2: number): { s11: Complex; s22: Complex; s21: Complex } {
  const den = add(z, c(z1 + z2));
  return {
    s11: div(add(z, c(z2 - z1)), den),
    s22: div(add(z, c(z1 - z2)), den),
    s21: div(c(2 * Math.sqrt(z1 * z2)), den),
  };
}

/** [SER] S of a series impedance z between equal references z0, written out on its own. */
function seriesSEqual(z: Complex, z0: number): { s11: Complex; s21: Complex } {
  const den = add(z, c(2 * z0));
  return { s11: div(z, den), s21: div(c(2 * z0), den) };
}

/** [SHU] S of a shunt admittance y between equal references z0. */
function shuntS(y: Complex, z0: number): { s11: Complex; s21: Complex } {
  const yz = mul(y, c(z0));
  const den = add(c(2), yz);
  return { s11: div(mul(c(-1), yz), den), s21: div(c(2), den) };
}

/** Checks a reciprocal two-port with S11 = S22 against [SER]/[SHU]-style expectations at point k. */
function expectSymmetricTwoPort(net: NetworkData, k: number, s11: Complex, s21: Complex, what: string): void {
  expectClose(entry(net, k, 0, 0), s11, TOL_S, `${what} S11`);
  expectClose(entry(net, k, 1, 1), s11, TOL_S, `${what} S22`);
  expectClose(entry(net, k, 1, 0), s21, TOL_S, `${what} S21`);
  expectClose(entry(net, k, 0, 1), s21, TOL_S, `${what} S12`);
}

const w = (f: number): number => 2 * Math.PI * f;

// ------------------------------------------------------------------------------------------------

describe('series impedance between two equal ports [SER]', () => {
  it.each([
    ['10 ohm', 10],
    ['50 ohm', 50],
    ['2.2 kohm', 2200],
  ])('resistor %s', (text, r) => {
    const net = solve(`
      resistor r1 a=in b=out value=${text}
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=1 MHz, 1 GHz
    `);
    expect(net.frequencies.length).toBe(2);
    for (let k = 0; k < 2; k++) {
      const e = seriesSEqual(c(r), 50); // [SER], Z = R
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `R=${r} at ${net.frequencies[k]} Hz`);
    }
  });

  it('inductor 22 nH, Z = jωL', () => {
    const net = solve(`
      inductor l1 a=in b=out value=22 nH
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=10 MHz, 433 MHz, 2.4 GHz
    `);
    net.frequencies.forEach((f, k) => {
      const e = seriesSEqual(c(0, w(f) * 22e-9), 50); // [SER], Z = jωL
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `L at ${f} Hz`);
    });
  });

  it('capacitor 6.8 pF, Z = 1/(jωC)', () => {
    const net = solve(`
      capacitor c1 a=in b=out value=6.8 pF
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=10 MHz, 433 MHz, 2.4 GHz
    `);
    net.frequencies.forEach((f, k) => {
      const e = seriesSEqual(inv(c(0, w(f) * 6.8e-12)), 50); // [SER], Z = 1/(jωC)
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `C at ${f} Hz`);
    });
  });

  it('resistor and inductor in series, Z = R + jωL', () => {
    const net = solve(`
      resistor r1 a=in  b=mid value=33 ohm
      inductor l1 a=mid b=out value=120 nH
      port 1 plus=in
      port 2 plus=out
      sweep log start=1 MHz stop=1 GHz points=7
    `);
    expect(net.frequencies.length).toBe(7);
    net.frequencies.forEach((f, k) => {
      const e = seriesSEqual(c(33, w(f) * 120e-9), 50); // [SER], Z = R + jωL
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `R+L at ${f} Hz`);
    });
  });
});

describe('shunt admittance to ground between two equal ports [SHU]', () => {
  it('resistor 25 ohm to ground, Y = 1/R', () => {
    const net = solve(`
      resistor r1 a=n b=ground value=25 ohm
      port 1 plus=n
      port 2 plus=n
      sweep list freqs=1 MHz
    `);
    const e = shuntS(c(1 / 25), 50); // [SHU]
    expectSymmetricTwoPort(net, 0, e.s11, e.s21, 'shunt R');
  });

  it('conductance 20 mS to ground, Y = G', () => {
    const net = solve(`
      conductance g1 a=n b=ground value=20 mS
      port 1 plus=n
      port 2 plus=n
      sweep list freqs=1 MHz
    `);
    const e = shuntS(c(0.02), 50); // [SHU]; 20 mS = 1/(50 ohm): S11 = −1/3, S21 = 2/3
    expectSymmetricTwoPort(net, 0, e.s11, e.s21, 'shunt G');
  });

  it('capacitor 10 pF to ground, Y = jωC', () => {
    const net = solve(`
      capacitor c1 a=n b=ground value=10 pF
      port 1 plus=n
      port 2 plus=n
      sweep list freqs=50 MHz, 318.3 MHz, 3 GHz     # ωC·Z0 ≈ 1 near 318.3 MHz
    `);
    net.frequencies.forEach((f, k) => {
      const e = shuntS(c(0, w(f) * 10e-12), 50); // [SHU]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `shunt C at ${f} Hz`);
    });
  });

  it('inductor 47 nH to ground, Y = 1/(jωL)', () => {
    const net = solve(`
      inductor l1 a=n b=ground value=47 nH
      port 1 plus=n
      port 2 plus=n
      sweep list freqs=20 MHz, 169.3 MHz, 900 MHz
    `);
    net.frequencies.forEach((f, k) => {
      const e = shuntS(inv(c(0, w(f) * 47e-9)), 50); // [SHU]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `shunt L at ${f} Hz`);
    });
  });
});

describe('unequal port references (power waves) [PW]', () => {
  it('series 50 ohm between a 50 ohm and a 75 ohm port', () => {
    const net = solve(`
      resistor r1 a=in b=out value=50 ohm
      port 1 plus=in
      port 2 plus=out ref=75 ohm
      sweep list freqs=1 MHz
    `);
    expect(Array.from(net.references)).toEqual([50, 75]);
    const e = seriesS(c(50), 50, 75); // [PW]: S11 = 75/175 = 3/7, S22 = 25/175 = 1/7, S21 = 2√3750/175
    expectClose(entry(net, 0, 0, 0), e.s11, TOL_S, 'S11');
    expectClose(entry(net, 0, 1, 1), e.s22, TOL_S, 'S22');
    expectClose(entry(net, 0, 1, 0), e.s21, TOL_S, 'S21');
    expectClose(entry(net, 0, 0, 1), e.s21, TOL_S, 'S12');
    // The rational values written out by hand from [PW], as a check on the helper itself.
    expectClose(entry(net, 0, 0, 0), c(3 / 7), TOL_S, 'S11 = 3/7');
    expectClose(entry(net, 0, 1, 1), c(1 / 7), TOL_S, 'S22 = 1/7');
  });

  it('series 25 ohm from a 75 ohm port into a 50 ohm port is matched at port 1', () => {
    // [PW]: Z + Z2 − Z1 = 25 + 50 − 75 = 0, so S11 = 0 exactly; S22 = (25 + 75 − 50)/150 = 1/3.
    const net = solve(`
      resistor r1 a=in b=out value=25 ohm
      port 1 plus=in ref=75 ohm
      port 2 plus=out
      sweep list freqs=1 MHz
    `);
    expectClose(entry(net, 0, 0, 0), c(0), TOL_S, 'S11');
    expectClose(entry(net, 0, 1, 1), c(1 / 3), TOL_S, 'S22');
    expectClose(entry(net, 0, 1, 0), c((2 * Math.sqrt(75 * 50)) / 150), TOL_S, 'S21');
  });

  it.each([
    [25, 110],
    [110, 25],
    [10, 200],
  ])('series R + L between references %d ohm and %d ohm', (z1, z2) => {
    const net = solve(`
      resistor r1 a=in  b=mid value=15 ohm
      inductor l1 a=mid b=out value=68 nH
      port 1 plus=in  ref=${z1} ohm
      port 2 plus=out ref=${z2} ohm
      sweep list freqs=5 MHz, 100 MHz, 1.5 GHz
    `);
    net.frequencies.forEach((f, k) => {
      const e = seriesS(c(15, w(f) * 68e-9), z1, z2); // [PW]
      expectClose(entry(net, k, 0, 0), e.s11, TOL_S, `S11 at ${f}`);
      expectClose(entry(net, k, 1, 1), e.s22, TOL_S, `S22 at ${f}`);
      expectClose(entry(net, k, 1, 0), e.s21, TOL_S, `S21 at ${f}`);
      expectClose(entry(net, k, 0, 1), e.s21, TOL_S, `S12 at ${f}`);
    });
  });

  it('series C between references 30 ohm and 90 ohm', () => {
    const net = solve(`
      capacitor c1 a=in b=out value=4.7 pF
      port 1 plus=in  ref=30 ohm
      port 2 plus=out ref=90 ohm
      sweep list freqs=100 MHz, 1 GHz
    `);
    net.frequencies.forEach((f, k) => {
      const e = seriesS(inv(c(0, w(f) * 4.7e-12)), 30, 90); // [PW]
      expectClose(entry(net, k, 0, 0), e.s11, TOL_S, `S11 at ${f}`);
      expectClose(entry(net, k, 1, 1), e.s22, TOL_S, `S22 at ${f}`);
      expectClose(entry(net, k, 1, 0), e.s21, TOL_S, `S21 at ${f}`);
    });
  });
});

describe('ports across a node pair (balanced)', () => {
  it('one-port across a floating resistor: S11 = (R − Z0)/(R + Z0)', () => {
    // The pair p/n has no path to ground; the loader gives it a local reference.
    const net = solve(`
      resistor r1 a=p b=n value=100 ohm
      port 1 plus=p minus=n
      sweep list freqs=1 MHz
    `);
    expectClose(entry(net, 0, 0, 0), c(1 / 3), TOL_S, 'S11'); // [ONE]: (100 − 50)/(100 + 50)
  });

  it('one-port across two grounded capacitors: Z = 1/(jωC1) + 1/(jωC2)', () => {
    const net = solve(`
      capacitor c1 a=p b=ground value=3.3 pF
      capacitor c2 a=n b=ground value=8.2 pF
      port 1 plus=p minus=n ref=100 ohm
      sweep list freqs=100 MHz, 800 MHz
    `);
    net.frequencies.forEach((f, k) => {
      const z = add(inv(c(0, w(f) * 3.3e-12)), inv(c(0, w(f) * 8.2e-12)));
      const e = div(sub(z, c(100)), add(z, c(100))); // [ONE]
      expectClose(entry(net, k, 0, 0), e, TOL_S, `S11 at ${f}`);
    });
  });

  it('balanced two-port with a series arm in each line acts as one series Z = Z_top + Z_bottom', () => {
    // KCL on the floating group makes the same current flow through both arms, so the two-port is
    // the series element of [SER] with Z = (R1 + jωL) + R2.
    const net = solve(`
      resistor r1 a=p1 b=mid value=20 ohm
      inductor l1 a=mid b=p2 value=39 nH
      resistor r2 a=n1 b=n2 value=12 ohm
      port 1 plus=p1 minus=n1
      port 2 plus=p2 minus=n2
      sweep list freqs=10 MHz, 600 MHz
    `);
    net.frequencies.forEach((f, k) => {
      const e = seriesSEqual(c(32, w(f) * 39e-9), 50); // [SER]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `balanced series at ${f} Hz`);
    });
  });

  it('balanced port driving a grounded load: mixed single-ended and balanced ports', () => {
    // Port 1 across p/n; resistors p–ground 40 ohm, n–ground 60 ohm, and port 2 on n (single-ended).
    // Closed form for this case, derived by hand from Kirchhoff's laws: with port 2 terminated the
    // load seen by port 1 is 40 + (60 ∥ 50) ohm ([ONE]).
    const net = solve(`
      resistor r1 a=p b=ground value=40 ohm
      resistor r2 a=n b=ground value=60 ohm
      port 1 plus=p minus=n
      port 2 plus=n
      sweep list freqs=1 MHz
    `);
    const zin = 40 + (60 * 50) / (60 + 50);
    expectClose(entry(net, 0, 0, 0), c((zin - 50) / (zin + 50)), TOL_S, 'S11'); // [ONE]
  });
});

describe('0 Hz', () => {
  it('a series inductor is a short (Z = 0), a series capacitor an open', () => {
    const l = solve(`
      inductor l1 a=in b=out value=1 uH
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=0 Hz, 1 MHz
    `);
    expect(l.frequencies[0]).toBe(0);
    expectSymmetricTwoPort(l, 0, c(0), c(1), 'series L at 0 Hz'); // [SER] with Z = 0
    const e1 = seriesSEqual(c(0, w(1e6) * 1e-6), 50);
    expectSymmetricTwoPort(l, 1, e1.s11, e1.s21, 'series L at 1 MHz'); // [SER]

    const cap = solve(`
      capacitor c1 a=in b=out value=1 nF
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=0 Hz, 1 MHz
    `);
    expectSymmetricTwoPort(cap, 0, c(1), c(0), 'series C at 0 Hz'); // [SER] with Z → ∞
    const e2 = seriesSEqual(inv(c(0, w(1e6) * 1e-9)), 50);
    expectSymmetricTwoPort(cap, 1, e2.s11, e2.s21, 'series C at 1 MHz'); // [SER]
  });

  it('a shunt inductor is a short to ground, a shunt capacitor is absent', () => {
    const l = solve(`
      inductor l1 a=n b=ground value=1 uH
      port 1 plus=n
      port 2 plus=n
      sweep list freqs=0 Hz
    `);
    expectSymmetricTwoPort(l, 0, c(-1), c(0), 'shunt L at 0 Hz'); // [SHU] with Y → ∞
    const cap = solve(`
      capacitor c1 a=n b=ground value=1 nF
      port 1 plus=n
      port 2 plus=n
      sweep list freqs=0 Hz
    `);
    expectSymmetricTwoPort(cap, 0, c(0), c(1), 'shunt C at 0 Hz'); // [SHU] with Y = 0
  });

  it('a lossy inductor at 0 Hz is its series resistance; a lossy capacitor is still open', () => {
    const l = solve(`
      inductor l1 a=in b=out value=1 uH rs=2 ohm
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=0 Hz
    `);
    const e = seriesSEqual(c(2), 50); // [SER] with Z = Rs ([LOSS])
    expectSymmetricTwoPort(l, 0, e.s11, e.s21, 'lossy L at 0 Hz');
    const cap = solve(`
      capacitor c1 a=in b=out value=1 nF esr=3 ohm
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=0 Hz
    `);
    expectSymmetricTwoPort(cap, 0, c(1), c(0), 'lossy C at 0 Hz'); // Y = jωC/(1 + jωC·ESR) = 0
  });

  it('a node between two capacitors has no DC path: SingularSystemError names the node and 0 Hz', () => {
    const text = `
      capacitor c1 a=in  b=mid    value=2.2 pF
      capacitor c2 a=mid b=ground value=4.7 pF
      port 1 plus=in
      sweep list freqs=0 Hz, 1 MHz, 100 MHz
    `;
    const { circuit } = loadNetlist(text, 'closed-forms.sbx');
    let caught: unknown;
    try {
      solveSweep(circuit);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(SingularSystemError);
    const err = caught as SingularSystemError;
    expect(err.frequency).toBe(0);
    expect(err.culprits).toEqual(['mid']);
    expect(err.message).toContain('`mid`');
    expect(err.message).toContain('0 Hz');
    expect(err.help ?? '').toContain('c1');
    expect(err.help ?? '').toContain('c2');
  });

  it('the same circuit solves above 0 Hz, where Z = 1/(jωC1) + 1/(jωC2)', () => {
    const net = solve(`
      capacitor c1 a=in  b=mid    value=2.2 pF
      capacitor c2 a=mid b=ground value=4.7 pF
      port 1 plus=in
      sweep list freqs=1 MHz, 100 MHz
    `);
    net.frequencies.forEach((f, k) => {
      const z = add(inv(c(0, w(f) * 2.2e-12)), inv(c(0, w(f) * 4.7e-12)));
      expectClose(entry(net, k, 0, 0), div(sub(z, c(50)), add(z, c(50))), TOL_S, `S11 at ${f}`); // [ONE]
    });
  });
});

describe('lossy elements [LOSS]', () => {
  const f0 = 433e6;

  it('inductor q=45 at 433 MHz has Rs = 2π·f0·L/Q, checked through a series element at f0 and off f0', () => {
    const L = 22e-9;
    const Q = 45;
    const net = solve(`
      inductor l1 a=in b=out value=22 nH q=45 at 433 MHz
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=100 MHz, 433 MHz, 1 GHz
    `);
    const rs = (w(f0) * L) / Q; // [LOSS]
    net.frequencies.forEach((f, k) => {
      const e = seriesSEqual(c(rs, w(f) * L), 50); // [SER], Rs constant over frequency [LOSS]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `lossy L at ${f}`);
    });
    // At f0 the element's Q = X/R equals the Q written in the netlist. For a series element
    // S11/S21 = Z/(2·Z0) by [SER], so Z can be read back from S.
    const k0 = Array.from(net.frequencies).indexOf(f0);
    expect(k0).toBeGreaterThanOrEqual(0);
    const z = mul(div(entry(net, k0, 0, 0), entry(net, k0, 1, 0)), c(100));
    expect(Math.abs(z.im / z.re - Q)).toBeLessThanOrEqual(1e-9 * Q);
  });

  it('capacitor q=300 at 433 MHz has ESR = 1/(2π·f0·C·Q), checked through a series element at f0 and off f0', () => {
    const C = 6.8e-12;
    const Q = 300;
    const net = solve(`
      capacitor c1 a=in b=out value=6.8 pF q=300 at 433 MHz
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=100 MHz, 433 MHz, 1 GHz
    `);
    const esr = 1 / (w(f0) * C * Q); // [LOSS]
    net.frequencies.forEach((f, k) => {
      const e = seriesSEqual(add(c(esr), inv(c(0, w(f) * C))), 50); // [SER], ESR constant [LOSS]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `lossy C at ${f}`);
    });
    const k0 = Array.from(net.frequencies).indexOf(f0);
    const z = mul(div(entry(net, k0, 0, 0), entry(net, k0, 1, 0)), c(100));
    expect(Math.abs(-z.im / z.re - Q)).toBeLessThanOrEqual(1e-9 * Q);
  });

  it('explicit rs and esr are series resistances', () => {
    const net = solve(`
      inductor  l1 a=in  b=mid value=82 nH  rs=0.7 ohm
      capacitor c1 a=mid b=out value=2.7 pF esr=0.25 ohm
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=50 MHz, 338 MHz, 2 GHz
    `);
    net.frequencies.forEach((f, k) => {
      const z = add(c(0.7 + 0.25, w(f) * 82e-9), inv(c(0, w(f) * 2.7e-12))); // [LOSS]
      const e = seriesSEqual(z, 50); // [SER]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `lossy series LC at ${f}`);
    });
  });

  it('lossy shunt capacitor: Y = jωC/(1 + jωC·ESR)', () => {
    const net = solve(`
      capacitor c1 a=n b=ground value=15 pF q=120 at 433 MHz
      port 1 plus=n
      port 2 plus=n
      sweep list freqs=433 MHz, 1 GHz
    `);
    const esr = 1 / (w(f0) * 15e-12 * 120); // [LOSS]
    net.frequencies.forEach((f, k) => {
      const y = inv(add(c(esr), inv(c(0, w(f) * 15e-12))));
      const e = shuntS(y, 50); // [SHU]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `lossy shunt C at ${f}`);
    });
  });
});

describe('two-ports without a Z or a Y matrix [CONV]', () => {
  const seriesText = `
    resistor r1 a=in  b=mid value=18 ohm
    inductor l1 a=mid b=out value=56 nH
    port 1 plus=in
    port 2 plus=out
    sweep list freqs=1 MHz, 100 MHz, 1 GHz
  `;
  const shuntText = `
    resistor  r1 a=n b=x      value=8.2 ohm
    capacitor c1 a=x b=ground value=12 pF
    port 1 plus=n
    port 2 plus=n
    sweep list freqs=1 MHz, 100 MHz, 1 GHz
  `;
  const zSeries = (f: number): Complex => c(18, w(f) * 56e-9);
  const ySeries = (f: number): Complex => inv(add(c(8.2), inv(c(0, w(f) * 12e-12))));

  it('the series-only two-port solves, has no Z matrix, and its Y matrix is (1/Z)·[[1, −1], [−1, 1]]', () => {
    const net = solve(seriesText);
    net.frequencies.forEach((f, k) => {
      const e = seriesSEqual(zSeries(f), 50); // [SER]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `series at ${f}`);
    });
    let caught: unknown;
    try {
      convertNetwork(net, 'Z');
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ConversionError);
    expect((caught as ConversionError).to).toBe('Z');

    const y = convertNetwork(net, 'Y');
    expect(y.parameter).toBe('Y');
    net.frequencies.forEach((f, k) => {
      const y0 = inv(zSeries(f)); // [CONV]
      expectRelClose(entry(y, k, 0, 0), y0, TOL_ZY, `Y11 at ${f}`);
      expectRelClose(entry(y, k, 1, 1), y0, TOL_ZY, `Y22 at ${f}`);
      expectRelClose(entry(y, k, 1, 0), mul(c(-1), y0), TOL_ZY, `Y21 at ${f}`);
      expectRelClose(entry(y, k, 0, 1), mul(c(-1), y0), TOL_ZY, `Y12 at ${f}`);
    });
  });

  it('the shunt-only two-port solves, has no Y matrix, and its Z matrix is (1/Y)·[[1, 1], [1, 1]]', () => {
    const net = solve(shuntText);
    net.frequencies.forEach((f, k) => {
      const e = shuntS(ySeries(f), 50); // [SHU]
      expectSymmetricTwoPort(net, k, e.s11, e.s21, `shunt at ${f}`);
    });
    let caught: unknown;
    try {
      convertNetwork(net, 'Y');
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ConversionError);
    expect((caught as ConversionError).to).toBe('Y');

    const z = convertNetwork(net, 'Z');
    expect(z.parameter).toBe('Z');
    net.frequencies.forEach((f, k) => {
      const z0 = inv(ySeries(f)); // [CONV]
      for (const [i, j] of [
        [0, 0],
        [0, 1],
        [1, 0],
        [1, 1],
      ] as const) {
        expectRelClose(entry(z, k, i, j), z0, TOL_ZY, `Z${i + 1}${j + 1} at ${f}`);
      }
    });
  });
});
