/**
 * Ideal and active elements: transformer, gyrator, transconductance, voltage_gain, current_gain,
 * transresistance, and a small-signal transistor model built from them in a block.
 *
 * Netlists are written as text, loaded with loadNetlist and solved with solveSweep; results are
 * compared with closed forms and with an independent nodal solve written with mathjs.
 *
 * Sources (each check names its own beside it):
 * - [WAVES] power-wave S-parameters for real references R_i: S = (U − Ȳ)(U + Ȳ)⁻¹ with
 *   Ȳ = √R·Y·√R, the port admittance matrix normalised (Kurokawa, "Power waves and the scattering
 *   matrix", IEEE Trans. MTT, 1965 — details (from memory)); for equal references Ȳ = Z0·Y.
 *   Wherever a port is terminated in R and driven by a source of 2√R behind R (a = 1), b = v/√R − a:
 *   common practice, the definition of the waves a = (v + R·i)/(2√R), b = (v − R·i)/(2√R).
 * - [REFL] a one-port of impedance Z against reference Z0: S11 = (Z − Z0)/(Z + Z0). Common practice.
 * - [NSQ] an ideal transformer of turns ratio n = Np/Ns loaded by R on the secondary presents n²·R
 *   at the primary, with v_p = n·v_s. Common practice.
 * - [GYR] an ideal gyrator has Y = [[0, 1/r], [−1/r, 0]]; terminated in an impedance Z it presents
 *   r²/Z, so a capacitor C looks like an inductor r²·C. Common practice.
 * - [LOSSLESS] a lossless network has a unitary S, SᴴS = U; a reciprocal one has S = Sᵀ (real,
 *   equal references). Common practice.
 * - [NORTON] source transformation: a voltage source e behind a series R equals a current source
 *   e/R in parallel with R, seen from the terminals. Common practice.
 * - [HYBRID-PI] the hybrid-π small-signal transistor: base resistance rb to an internal base bi,
 *   rπ ∥ Cπ from bi to the emitter, Cμ from bi to the collector, a current gm·v(bi, e) from collector
 *   to emitter, ro from collector to emitter (L. J. Giacoletto, "Diffusion theory of the hybrid-π
 *   transistor model", 1969 — details (from memory)); gm = IC/VT and rπ = β0/gm are common practice.
 * - [K] Rollett's K and Edwards–Sinsky μ, as documented in src/figures/twoport.ts:
 *   K = (1 − |S11|² − |S22|² + |Δ|²)/(2|S12·S21|), μ = (1 − |S11|²)/(|S22 − Δ·conj(S11)| + |S12·S21|).
 *
 * Tolerances: S entries 1e-12 absolute where |S| ≤ ~10 and the circuit has a handful of unknowns
 * (solver rounding is ~1e-15, unit scaling of values like `40 mS` by mathjs adds ~1e-16 relative);
 * gains above 1 are compared relative to their size (1e-12). The hybrid-π check against mathjs is to
 * 1e-10 relative to max |S| (the brief's figure; the nodal matrix spans 1e-4 S to 0.2 S, so rounding
 * stays far below). K and μ against the same formula on the mathjs S: 1e-9 relative (K divides by
 * |S12·S21|, which is small, so rounding is amplified).
 */
import { describe, expect, it } from 'vitest';
import * as math from 'mathjs';
import type { Complex, Matrix } from 'mathjs';

import { InputError } from '../src/diagnostics/diagnostic.js';
import { muFactor, rollettK } from '../src/figures/twoport.js';
import { loadNetlist } from '../src/load.js';
import type { NetworkData } from '../src/network/types.js';
import { solveSweep } from '../src/solve/sweep.js';

// ------------------------------------------------------------------------------------------------
// helpers

const TOL = 1e-12;

const lines = (...l: string[]) => l.join('\n') + '\n';

function solve(text: string): NetworkData {
  const { circuit } = loadNetlist(text, 'active.sbx');
  return solveSweep(circuit);
}

/** Error messages of a netlist that must not load. */
function errors(text: string): string[] {
  try {
    loadNetlist(text, 'active.sbx');
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error').map((d) => d.message);
    throw e;
  }
  throw new Error('expected the netlist to be rejected');
}

const c = (re: number, im = 0): Complex => math.complex(re, im);
const add = (a: Complex, b: Complex): Complex => math.add(a, b) as Complex;
const sub = (a: Complex, b: Complex): Complex => math.subtract(a, b) as Complex;
const mul = (a: Complex, b: Complex): Complex => math.multiply(a, b) as Complex;
const div = (a: Complex, b: Complex): Complex => math.divide(a, b) as Complex;
const cabs = (a: Complex): number => math.abs(a) as unknown as number;
const expj = (phi: number): Complex => c(Math.cos(phi), Math.sin(phi));

/** Entry (i, j), 0-based, at frequency index k. */
function entry(net: NetworkData, k: number, i: number, j: number): Complex {
  const n = net.ports;
  const o = 2 * ((k * n + i) * n + j);
  return c(net.values[o]!, net.values[o + 1]!);
}

function expectClose(actual: Complex, expected: Complex, tol: number, what: string): void {
  const d = cabs(sub(actual, expected));
  if (!(d <= tol)) {
    throw new Error(`${what}: got ${math.format(actual, 17)}, expected ${math.format(expected, 17)} (|diff| ${d} > ${tol})`);
  }
}

/** Checks the whole 2×2 S at point k against [[s11, s12], [s21, s22]], each to `tol` times max(1, |expected|). */
function expectTwoPort(net: NetworkData, k: number, s: Complex[][], tol: number, what: string): void {
  for (let i = 0; i < 2; i++) {
    for (let j = 0; j < 2; j++) {
      const e = s[i]![j]!;
      expectClose(entry(net, k, i, j), e, tol * Math.max(1, cabs(e)), `${what} S${i + 1}${j + 1}`);
    }
  }
}

const w = (f: number): number => 2 * Math.PI * f;

/**
 * [WAVES] Independent reference: S of a network of admittances and voltage-controlled currents,
 * by a nodal solve written with mathjs. Nodes are named; `ground` is the reference. The port nodes
 * (each port from its node to ground) are kept and every other node is eliminated (Schur
 * complement Y_pp − Y_pi·Y_ii⁻¹·Y_ip); then S = (U − Ȳ)(U + Ȳ)⁻¹, Ȳ = √R·Y·√R. This is a different
 * route from the solver's (which terminates every port and solves for the port voltages).
 */
class NodalReference {
  private readonly y: Complex[][];
  private readonly index = new Map<string, number>();
  constructor(readonly nodes: string[]) {
    nodes.forEach((n, i) => this.index.set(n, i));
    this.y = nodes.map(() => nodes.map(() => c(0)));
  }
  private add(row: string, col: string, v: Complex) {
    if (row === 'ground' || col === 'ground') return;
    const r = this.index.get(row)!;
    const k = this.index.get(col)!;
    this.y[r]![k] = add(this.y[r]![k]!, v);
  }
  /** Admittance y between a and b. */
  admittance(a: string, b: string, y: Complex): this {
    return this.transfer(a, b, a, b, y);
  }
  /** Current g·v(cp, cn) leaving node p into the element and entering node n (KCL: row p gets +g·v). */
  transfer(p: string, n: string, cp: string, cn: string, g: Complex): this {
    this.add(p, cp, g);
    this.add(p, cn, mul(c(-1), g));
    this.add(n, cp, mul(c(-1), g));
    this.add(n, cn, g);
    return this;
  }
  /** S at the given port nodes with real references `refs`. */
  scattering(ports: string[], refs: number[]): Complex[][] {
    const pi = ports.map((p) => this.index.get(p)!);
    const ii = this.nodes.map((_, i) => i).filter((i) => !pi.includes(i));
    const pick = (rows: number[], cols: number[]) => math.matrix(rows.map((r) => cols.map((k) => this.y[r]![k]!)));
    let yp = pick(pi, pi);
    if (ii.length > 0) {
      const corr = math.multiply(math.multiply(pick(pi, ii), math.inv(pick(ii, ii))), pick(ii, pi)) as Matrix;
      yp = math.subtract(yp, corr) as Matrix;
    }
    const sq = math.diag(refs.map((r) => c(Math.sqrt(r))));
    const yn = math.multiply(math.multiply(sq, yp), sq) as Matrix;
    const u = math.identity(ports.length) as Matrix;
    const s = math.multiply(math.subtract(u, yn), math.inv(math.add(u, yn) as Matrix)) as Matrix;
    return (s.toArray() as (Complex | number)[][]).map((row) => row.map((x) => (typeof x === 'number' ? c(x) : x)));
  }
}

// ------------------------------------------------------------------------------------------------

describe('transformer', () => {
  it('a 1:2 transformer (n = 0.5) from 50 ohm into a 200 ohm port is matched: S11 = S22 = 0, S21 = S12 = 1 [NSQ], 1e-12', () => {
    // [NSQ]: 200 ohm·n² = 50 ohm, so the primary is matched; the secondary likewise sees 50/n² = 200 ohm.
    // No loss, so |S21| = 1; v_s = v_p/n = 2·v_p and b2 = v_s/√200 = 2√50·(1)/√200 = 1 with v_p = √50 (a1 = 1, matched).
    const net = solve(lines('transformer t1 p1=in s1=out ratio=0.5', 'port 1 plus=in ref=50 ohm', 'port 2 plus=out ref=200 ohm', 'sweep list freqs=0 Hz, 1 MHz, 2.4 GHz'));
    for (let k = 0; k < 3; k++) expectTwoPort(net, k, [[c(0), c(1)], [c(1), c(0)]], TOL, `f#${k}`);
  });

  it.each([0.5, 2, 3.7, -1.5])('ratio %s between equal 50 ohm references: S11 = (n² − 1)/(n² + 1), S21 = S12 = 2n/(n² + 1) [NSQ], 1e-12', (n) => {
    // Derivation: port 2 terminated in Z0 is seen as n²·Z0 at port 1 [NSQ], so [REFL] gives
    // S11 = (n²Z0 − Z0)/(n²Z0 + Z0) = (n² − 1)/(n² + 1). With a1 = 1, v_p = (1 + S11)·√Z0 = 2n²/(n² + 1)·√Z0,
    // v_s = v_p/n and S21 = v_s/√Z0 = 2n/(n² + 1). From port 2 the primary load is seen as Z0/n², so
    // S22 = (1 − n²)/(1 + n²). Reciprocity [LOSSLESS] gives S12 = S21.
    const net = solve(lines(`transformer t1 p1=in s1=out ratio=${n}`, 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=10 MHz, 5 GHz'));
    const d = n * n + 1;
    for (let k = 0; k < 2; k++) {
      expectTwoPort(net, k, [[c((n * n - 1) / d), c((2 * n) / d)], [c((2 * n) / d), c((1 - n * n) / d)]], TOL, `n=${n}`);
    }
  });

  it('unequal references 50 and 75 ohm, n = 1.3: S11 = (n²Z2 − Z1)/(n²Z2 + Z1), S21 = S12 = 2n√(Z1Z2)/(n²Z2 + Z1) [NSQ][WAVES], 1e-12', () => {
    // Derivation: Z_in = n²·Z2 [NSQ] against Z1 [REFL]; v_p = (1 + S11)√Z1, v_s = v_p/n, S21 = v_s/√Z2.
    const n = 1.3;
    const z1 = 50;
    const z2 = 75;
    const net = solve(lines(`transformer t1 p1=in s1=out ratio=${n}`, 'port 1 plus=in ref=50 ohm', 'port 2 plus=out ref=75 ohm', 'sweep list freqs=100 MHz'));
    const den = n * n * z2 + z1;
    const s21 = (2 * n * Math.sqrt(z1 * z2)) / den;
    // S22 from port 2: Z = Z1/n² against Z2
    const s22 = (z1 / (n * n) - z2) / (z1 / (n * n) + z2);
    expectTwoPort(net, 0, [[c((n * n * z2 - z1) / den), c(s21)], [c(s21), c(s22)]], TOL, 'n=1.3');
    // reciprocal [LOSSLESS]: S12 = S21 exactly in exact arithmetic; here to 1e-12
    expectClose(entry(net, 0, 0, 1), entry(net, 0, 1, 0), TOL, 'S12 = S21');
  });

  it('a resistor R on the secondary is seen as n²·R at the primary, also at 0 Hz [NSQ][REFL], 1e-12', () => {
    const n = 3;
    const net = solve(lines(`transformer t1 p1=in s1=x ratio=${n}`, 'resistor rl a=x b=ground value=10 ohm', 'port 1 plus=in', 'sweep list freqs=0 Hz, 1 GHz'));
    for (let k = 0; k < 2; k++) expectClose(entry(net, k, 0, 0), c((90 - 50) / (90 + 50)), TOL, 'S11');
  });

  it('a floating primary (port across p1, p2) and the dotted end of the secondary on ground: S21 reversed [NSQ], 1e-12', () => {
    // The secondary's winding sense is set by which end is dotted: s1=ground s2=out gives v_out = −v_p/n.
    // Port 1 is across the floating primary (in, ret). A resistor from `ret` to ground carries no
    // current (the primary side has no other path to ground), so it changes nothing, whatever its value.
    const n = 2;
    const d = n * n + 1;
    const net = solve(lines(`transformer t1 p1=in p2=ret s1=ground s2=out ratio=${n}`, 'resistor rtie a=ret b=ground value=1 ohm', 'port 1 plus=in minus=ret', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    expectTwoPort(net, 0, [[c((n * n - 1) / d), c((-2 * n) / d)], [c((-2 * n) / d), c((1 - n * n) / d)]], TOL, 'swapped');
  });

  it('a fully floating secondary with a port across it solves: same S as with s2 on ground [NSQ], 1e-12', () => {
    // Nothing joins one winding to the other, so the secondary (s1, s2) is a node group of its own,
    // carrying port 2; no current can flow from it to ground, so its common level is arbitrary and
    // the answer is that of the grounded winding.
    const n = 0.8;
    const d = n * n + 1;
    const net = solve(lines(`transformer t1 p1=in s1=sp s2=sn ratio=${n}`, 'port 1 plus=in', 'port 2 plus=sp minus=sn', 'sweep list freqs=0 Hz, 1 GHz'));
    for (let k = 0; k < 2; k++) expectTwoPort(net, k, [[c((n * n - 1) / d), c((2 * n) / d)], [c((2 * n) / d), c((1 - n * n) / d)]], TOL, `f#${k}`);
  });

  it('a zero ratio is rejected', () => {
    expect(errors(lines('transformer t1 p1=in s1=out ratio=0', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz')).join('\n')).toMatch(/`ratio` must be other than zero/);
  });
});

// ------------------------------------------------------------------------------------------------

describe('gyrator', () => {
  it('r = Z0: S = [[0, −1], [1, 0]] [GYR][WAVES], 1e-12', () => {
    // Derivation: Ȳ = Z0·Y = [[0, 1], [−1, 0]] = J with J² = −U, so (U + J)⁻¹ = (U − J)/2 and
    // S = (U − J)²/2 = (U − 2J + J²)/2 = −J = [[0, −1], [1, 0]].
    const net = solve(lines('gyrator g1 a1=in b1=out r=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=0 Hz, 1 GHz'));
    for (let k = 0; k < 2; k++) expectTwoPort(net, k, [[c(0), c(-1)], [c(1), c(0)]], TOL, `f#${k}`);
  });

  it('r = 120 ohm against 50 ohm: S from mathjs (U − Ȳ)(U + Ȳ)⁻¹ and the closed form ((1 − ρ²)U − 2ρJ)/(1 + ρ²), ρ = Z0/r [GYR][WAVES], 1e-12', () => {
    const r = 120;
    const rho = 50 / r;
    const net = solve(lines(`gyrator g1 a1=in b1=out r=${r} ohm`, 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    const ref = new NodalReference(['in', 'out']).transfer('in', 'ground', 'out', 'ground', c(1 / r)).transfer('out', 'ground', 'in', 'ground', c(-1 / r)).scattering(['in', 'out'], [50, 50]);
    expectTwoPort(net, 0, ref, TOL, 'mathjs');
    const d = 1 + rho * rho;
    expectTwoPort(net, 0, [[c((1 - rho * rho) / d), c((-2 * rho) / d)], [c((2 * rho) / d), c((1 - rho * rho) / d)]], TOL, 'closed form');
  });

  it('is lossless (SᴴS = U) but not reciprocal (S12 ≠ S21) [LOSSLESS], 1e-12', () => {
    const net = solve(lines('gyrator g1 a1=in a2=ground b1=out r=33 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    const s = math.matrix([[entry(net, 0, 0, 0), entry(net, 0, 0, 1)], [entry(net, 0, 1, 0), entry(net, 0, 1, 1)]]);
    const g = (math.multiply(math.ctranspose(s), s) as Matrix).toArray() as Complex[][];
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expectClose(g[i]![j]!, c(i === j ? 1 : 0), TOL, `(SᴴS)${i + 1}${j + 1}`);
    // closed form above: S12 − S21 = −4ρ/(1 + ρ²), far from 0
    const rho = 50 / 33;
    expectClose(sub(entry(net, 0, 0, 1), entry(net, 0, 1, 0)), c((-4 * rho) / (1 + rho * rho)), TOL, 'S12 − S21');
    expect(cabs(sub(entry(net, 0, 0, 1), entry(net, 0, 1, 0)))).toBeGreaterThan(1);
  });

  it('terminated in a capacitor C it presents an inductor r²·C: same S11 as that inductor [GYR], 1e-12', () => {
    // r = 100 ohm, C = 1 pF → L = 10 nH
    const gy = solve(lines('gyrator g1 a1=in b1=tank r=100 ohm', 'capacitor c1 a=tank b=ground value=1 pF', 'port 1 plus=in', 'sweep list freqs=100 MHz, 796 MHz, 3 GHz'));
    const ind = solve(lines('inductor l1 a=in b=ground value=10 nH', 'port 1 plus=in', 'sweep list freqs=100 MHz, 796 MHz, 3 GHz'));
    for (let k = 0; k < 3; k++) {
      expectClose(entry(gy, k, 0, 0), entry(ind, k, 0, 0), TOL, `f#${k} vs inductor`);
      const z = c(0, w(gy.frequencies[k]!) * 100 * 100 * 1e-12);
      expectClose(entry(gy, k, 0, 0), div(sub(z, c(50)), add(z, c(50))), TOL, `f#${k} [REFL]`);
    }
  });
});

// ------------------------------------------------------------------------------------------------

describe('transconductance', () => {
  const GM = 0.04; // 40 mS
  const Z0 = 50;

  it('unilateral, ports open and ideal: S21 = −2·gm·Z0, S12 = 0, S11 = S22 = 1; and the mathjs nodal solve agrees [WAVES], 1e-12', () => {
    // Derivation: port Y = [[0, 0], [gm, 0]] (the current gm·v1 enters the element at `out`, so the
    // port-2 source must supply it: i2 = gm·v1). Ȳ = Z0·Y is nilpotent, (U + Ȳ)⁻¹ = U − Ȳ, so
    // S = (U − Ȳ)² = U − 2Ȳ: S21 = −2·gm·Z0 = −4, S11 = S22 = 1, S12 = 0.
    const net = solve(lines('transconductance g1 p=out n=ground cp=in cn=ground gm=40 mS', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=0 Hz, 1 GHz'));
    const ref = new NodalReference(['in', 'out']).transfer('out', 'ground', 'in', 'ground', c(GM)).scattering(['in', 'out'], [Z0, Z0]);
    for (let k = 0; k < 2; k++) {
      expectTwoPort(net, k, [[c(1), c(0)], [c(-2 * GM * Z0), c(1)]], TOL, 'closed form');
      expectTwoPort(net, k, ref, TOL, 'mathjs');
    }
  });

  it('with 50 ohm shunt resistors at both ports: S11 = S22 = 0, S21 = −gm·Z0, S12 = 0 [WAVES], 1e-12', () => {
    // Derivation: each port sees a 50 ohm resistor in parallel with an open (control input, current
    // source output), so S11 = S22 = 0. a1 = 1 gives v1 = √Z0; the current gm·v1 is drawn from
    // Z0 ∥ Z0 = Z0/2 at the output, v2 = −gm·v1·Z0/2, so S21 = v2/√Z0 = −gm·Z0/2 = −1.
    const net = solve(lines('resistor r1 a=in b=ground value=50 ohm', 'transconductance g1 p=out cp=in gm=40 mS', 'resistor r2 a=out b=ground value=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    const ref = new NodalReference(['in', 'out']).admittance('in', 'ground', c(1 / 50)).admittance('out', 'ground', c(1 / 50)).transfer('out', 'ground', 'in', 'ground', c(GM)).scattering(['in', 'out'], [Z0, Z0]);
    expectTwoPort(net, 0, [[c(0), c(0)], [c((-GM * Z0) / 2), c(0)]], TOL, 'closed form');
    expectTwoPort(net, 0, ref, TOL, 'mathjs');
  });

  it('with cp = p and cn = n it is a conductance gm: S11 = (1 − gm·Z0)/(1 + gm·Z0) [REFL], 1e-12', () => {
    const net = solve(lines('transconductance g1 p=x n=ground cp=x cn=ground gm=10 mS', 'port 1 plus=x', 'sweep list freqs=1 GHz'));
    expectClose(entry(net, 0, 0, 0), c((100 - 50) / (100 + 50)), TOL, 'S11 of 100 ohm');
  });

  it('exchanging p and n reverses the output current: S21 = +2·gm·Z0 [WAVES], 1e-12', () => {
    const net = solve(lines('transconductance g1 p=ground n=out cp=in gm=40 mS', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    expectClose(entry(net, 0, 1, 0), c(2 * GM * Z0), TOL * 4, 'S21');
  });

  it('delay τ multiplies gm by e^(−jωτ): S21 = −2·gm·Z0·e^(−jωτ), a phase of −ωτ added [WAVES], 1e-12', () => {
    const tau = 25e-12;
    const freqs = [0, 1e9, 2.4e9, 7e9];
    const text = (d: string) => lines(`transconductance g1 p=out cp=in gm=40 mS ${d}`, 'port 1 plus=in', 'port 2 plus=out', `sweep list freqs=${freqs.map((f) => `${f} Hz`).join(', ')}`);
    const net = solve(text('delay=25 ps'));
    const plain = solve(text(''));
    freqs.forEach((f, k) => {
      const phi = -w(f) * tau;
      expectClose(entry(net, k, 1, 0), mul(c(-2 * GM * Z0), expj(phi)), TOL * 4, `S21 at ${f} Hz`);
      // the ratio to the undelayed S21 is e^(−jωτ): phase −ωτ exactly, magnitude 1
      expectClose(div(entry(net, k, 1, 0), entry(plain, k, 1, 0)), expj(phi), TOL, `ratio at ${f} Hz`);
      expectClose(entry(net, k, 0, 1), c(0), TOL, 'S12');
    });
  });

  it('an output pair floating except for a port across it solves like the grounded output [WAVES], 1e-12', () => {
    // The current gm·v1 enters the element at op and leaves it at on: no net current into the pair,
    // so the pair's common level is free and only v(op, on) = −gm·Z0·v1 matters: S21 = −2·gm·Z0.
    const net = solve(lines('transconductance g1 p=op n=on cp=in gm=40 mS', 'port 1 plus=in', 'port 2 plus=op minus=on', 'sweep list freqs=1 GHz'));
    expectTwoPort(net, 0, [[c(1), c(0)], [c(-2 * GM * Z0), c(1)]], TOL, 'floating output');
  });

  it('a node reached only through control terminals or an output current is reported as floating', () => {
    // Neither the control input (which draws no current) nor the ideal current output fixes a node voltage.
    const control = errors(lines('transconductance g1 p=out cp=c1 gm=40 mS', 'resistor r1 a=c1 b=c2 value=10 ohm', 'port 1 plus=out', 'sweep list freqs=1 GHz'));
    expect(control.join('\n')).toMatch(/nodes `c1`, `c2` are connected neither to ground nor to any port/);
    const output = errors(lines('transconductance g1 p=x cp=in gm=40 mS', 'capacitor c1 a=x b=y value=1 pF', 'port 1 plus=in', 'sweep list freqs=1 GHz'));
    expect(output.join('\n')).toMatch(/nodes `x`, `y` are connected neither to ground nor to any port/);
  });

  it('a negative delay and a transconductance in ohm are rejected', () => {
    const base = (a: string) => lines(`transconductance g1 p=out cp=in ${a}`, 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz');
    expect(errors(base('gm=40 mS delay=-1 ps')).join('\n')).toMatch(/`delay` must be zero or more/);
    expect(errors(base('gm=40 ohm')).join('\n')).toMatch(/`gm` must be a transconductance \(S\)/);
    expect(errors(lines('transconductance g1 p=out gm=1 mS', 'port 1 plus=out', 'sweep list freqs=1 GHz')).join('\n')).toMatch(/needs terminal `cp`/);
  });
});

// ------------------------------------------------------------------------------------------------

describe('voltage_gain', () => {
  it('ideal, gain μ = 7: S21 = 2μ, S11 = 1 (open input), S22 = −1 (source output), S12 = 0 [WAVES], 1e-12', () => {
    // Derivation: a1 = 1 into an open port: v1 = 2√Z0; v2 = μ·v1 is forced, so S21 = v2/√Z0 = 2μ;
    // the output is a voltage source, a short to port 2's own wave: S22 = v2/√Z0 − 1 = −1 with v2 = 0.
    const net = solve(lines('voltage_gain e1 p=out cp=in gain=7', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=0 Hz, 1 GHz'));
    for (let k = 0; k < 2; k++) expectTwoPort(net, k, [[c(1), c(0)], [c(14), c(-1)]], TOL, `f#${k}`);
  });

  it('between matched ports (50 ohm shunt at the input, 50 ohm in series with the output): S11 = S22 = 0, S21 = μ/2 [WAVES], 1e-12', () => {
    // Derivation: v1 = √Z0 (matched); μ·v1 behind 50 ohm into the 50 ohm port: v2 = μ·v1/2, S21 = μ/2.
    const net = solve(lines('resistor r1 a=in b=ground value=50 ohm', 'voltage_gain e1 p=x cp=in gain=-3', 'resistor r2 a=x b=out value=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    expectTwoPort(net, 0, [[c(0), c(0)], [c(-1.5), c(0)]], TOL, 'matched');
  });

  it('behind a series R it equals a transconductance gain/R across R (p = ground, n = output), also with feedback [NORTON], 1e-12', () => {
    // Control from the output node (feedback through r3) makes the check depend on both sign conventions.
    const common = lines('resistor r1 a=in b=ground value=75 ohm', 'resistor r3 a=in b=out value=220 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz');
    const vs = solve(lines('voltage_gain e1 p=x cp=in cn=out gain=4', 'resistor rs a=x b=out value=40 ohm') + common);
    const cs = solve(lines('transconductance g1 p=ground n=out cp=in cn=out gm=0.1 S', 'resistor rs a=out b=ground value=40 ohm') + common);
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expectClose(entry(vs, 0, i, j), entry(cs, 0, i, j), TOL, `S${i + 1}${j + 1}`);
    // and the mathjs nodal solve of the Norton form
    const ref = new NodalReference(['in', 'out']).admittance('in', 'ground', c(1 / 75)).admittance('in', 'out', c(1 / 220)).admittance('out', 'ground', c(1 / 40)).transfer('ground', 'out', 'in', 'out', c(0.1)).scattering(['in', 'out'], [50, 50]);
    expectTwoPort(vs, 0, ref, TOL, 'mathjs');
  });

  it('output terminals on one node are rejected', () => {
    expect(errors(lines('voltage_gain e1 p=x n=x cp=in gain=2', 'resistor r1 a=x b=in value=1 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz')).join('\n')).toMatch(/output terminals `p` and `n` are on the same node/);
  });
});

// ------------------------------------------------------------------------------------------------

describe('current_gain', () => {
  it('ideal, gain β = 5, sense from port 1 to ground: S11 = −1 (short), S21 = −2β, S22 = 1, S12 = 0 [WAVES], 1e-12', () => {
    // Derivation: the sense branch shorts port 1, so the whole source current 2/√Z0 flows into sp:
    // i_s = 2/√Z0. The output current β·i_s enters the element at `out`, supplied by port 2's Z0:
    // v2 = −β·i_s·Z0, S21 = v2/√Z0 = −2β. Port 2 sees an ideal current source (open): S22 = 1.
    const net = solve(lines('current_gain f1 p=out sp=in sn=ground gain=5', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=0 Hz, 1 GHz'));
    for (let k = 0; k < 2; k++) expectTwoPort(net, k, [[c(-1), c(0)], [c(-10), c(1)]], TOL, `f#${k}`);
  });

  it('sensing the other way (sp = ground, sn = input) reverses S21 [WAVES], 1e-12', () => {
    const net = solve(lines('current_gain f1 p=out sp=ground sn=in gain=5', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    expectTwoPort(net, 0, [[c(-1), c(0)], [c(10), c(1)]], TOL, 'reversed');
  });

  it('matched: sense in series with 50 ohm at the input, 50 ohm shunt at the output: S21 = −β/2 [WAVES], 1e-12', () => {
    // Derivation: input impedance 50 ohm (the sense branch is a short): v1 = √Z0, i_s = v1/Z0 = 1/√Z0;
    // β·i_s out of Z0 ∥ Z0 = Z0/2: v2 = −β·√Z0/2, S21 = −β/2.
    const net = solve(lines('current_gain f1 p=out sp=in sn=x gain=3', 'resistor r1 a=x b=ground value=50 ohm', 'resistor r2 a=out b=ground value=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    expectTwoPort(net, 0, [[c(0), c(0)], [c(-1.5), c(0)]], TOL, 'matched');
  });

  it('sense terminals on one node are rejected', () => {
    expect(errors(lines('current_gain f1 p=out sp=in sn=in gain=2', 'resistor r1 a=in b=out value=1 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz')).join('\n')).toMatch(/sense terminals `sp` and `sn` are on the same node/);
  });
});

// ------------------------------------------------------------------------------------------------

describe('transresistance', () => {
  it('ideal, r = 150 ohm: S11 = −1, S21 = 2r/Z0, S22 = −1, S12 = 0 [WAVES], 1e-12', () => {
    // Derivation: i_s = 2/√Z0 as for current_gain; v2 = r·i_s, S21 = v2/√Z0 = 2r/Z0 = 6; output a voltage source: S22 = −1.
    const net = solve(lines('transresistance h1 p=out sp=in r=150 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=0 Hz, 1 GHz'));
    for (let k = 0; k < 2; k++) expectTwoPort(net, k, [[c(-1), c(0)], [c(6), c(-1)]], TOL, `f#${k}`);
  });

  it('matched (50 ohm in series with the sense branch and with the output): S21 = r/(2·Z0) [WAVES], 1e-12', () => {
    // Derivation: i_s = 1/√Z0 (matched input); r·i_s behind 50 ohm into 50 ohm: v2 = r/(2√Z0), S21 = r/(2·Z0).
    const net = solve(lines('transresistance h1 p=y sp=in sn=x r=-80 ohm', 'resistor r1 a=x b=ground value=50 ohm', 'resistor r2 a=y b=out value=50 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    expectTwoPort(net, 0, [[c(0), c(0)], [c(-0.8), c(0)]], TOL, 'matched');
  });

  it('behind a series R it equals a current_gain r/R across R, with the sense branch inside a network [NORTON], 1e-12', () => {
    const common = lines('resistor r1 a=in b=m value=30 ohm', 'resistor r4 a=m2 b=ground value=68 ohm', 'resistor r3 a=in b=out value=330 ohm', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz');
    const vs = solve(lines('transresistance h1 p=x sp=m sn=m2 r=500 ohm', 'resistor rs a=x b=out value=25 ohm') + common);
    const cs = solve(lines('current_gain f1 p=ground n=out sp=m sn=m2 gain=20', 'resistor rs a=out b=ground value=25 ohm') + common);
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expectClose(entry(vs, 0, i, j), entry(cs, 0, i, j), TOL, `S${i + 1}${j + 1}`);
    // mathjs: the sense branch is a short from m to m2, so node m2 is m; i_s = v_m/68 ohm, and the
    // Norton current 20·i_s into `out` is a transfer admittance 20/68 S from v(m) into `out`.
    const ref = new NodalReference(['in', 'out', 'm']).admittance('in', 'm', c(1 / 30)).admittance('m', 'ground', c(1 / 68)).admittance('in', 'out', c(1 / 330)).admittance('out', 'ground', c(1 / 25)).transfer('ground', 'out', 'm', 'ground', c(20 / 68)).scattering(['in', 'out'], [50, 50]);
    expectTwoPort(vs, 0, ref, TOL, 'mathjs');
  });

  it('output terminals on one node are rejected', () => {
    expect(errors(lines('transresistance h1 p=x n=x sp=in r=2 ohm', 'resistor r1 a=x b=in value=1 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz')).join('\n')).toMatch(/output terminals `p` and `n` are on the same node/);
  });
});

// ------------------------------------------------------------------------------------------------

describe('hybrid-π transistor block [HYBRID-PI]', () => {
  // Values of our own: IC = 4 mA, VT = 25.85 mV (kT/q at 300 K) → gm = IC/VT ≈ 154.7 mS; β0 = 120 →
  // rπ = β0/gm ≈ 775.5 ohm; Cπ = 1.9 pF, Cμ = 0.12 pF; ro = 12 kohm; rb = 8 ohm; transit delay 3 ps.
  const ic = 4e-3;
  const vt = 25.85e-3;
  const gm = ic / vt;
  const beta0 = 120;
  const rpi = beta0 / gm;
  const cpi = 1.9e-12;
  const cmu = 0.12e-12;
  const ro = 12e3;
  const rb = 8;
  const tau = 3e-12;
  const freqs = [100e6, 915e6, 2.44e9, 5.8e9];

  const BLOCK = lines(
    'let ic = 4 mA',
    'let vt = 25.85 mV',
    'block npn terminals=b, c, e gm=ic/vt rpi=120*vt/ic cpi=1.9 pF cmu=0.12 pF ro=12 kohm rb=8 ohm tau=3 ps',
    '  resistor         rbb a=b  b=bi value=rb',
    '  resistor         rp  a=bi b=e  value=rpi',
    '  capacitor        cp  a=bi b=e  value=cpi',
    '  capacitor        cm  a=bi b=c  value=cmu',
    '  transconductance gm1 p=c n=e cp=bi cn=e gm=gm delay=tau',
    '  resistor         ro1 a=c  b=e  value=ro',
    'end',
    'npn q1 b=in c=out e=ground',
    'port 1 plus=in',
    'port 2 plus=out',
    `sweep list freqs=${freqs.map((f) => `${f / 1e6} MHz`).join(', ')}`,
  );

  function reference(f: number): Complex[][] {
    const om = w(f);
    return new NodalReference(['in', 'out', 'bi'])
      .admittance('in', 'bi', c(1 / rb))
      .admittance('bi', 'ground', c(1 / rpi, om * cpi))
      .admittance('bi', 'out', c(0, om * cmu))
      .transfer('out', 'ground', 'bi', 'ground', mul(c(gm), expj(-om * tau)))
      .admittance('out', 'ground', c(1 / ro))
      .scattering(['in', 'out'], [50, 50]);
  }

  it('matches a nodal solve with mathjs complex matrices at four frequencies, 1e-10 relative to max |S|', () => {
    const { circuit, warnings } = loadNetlist(BLOCK, 'hybrid-pi.sbx');
    expect(warnings).toEqual([]);
    expect(circuit.elements.map((e) => e.name)).toEqual(['q1.rbb', 'q1.rp', 'q1.cp', 'q1.cm', 'q1.gm1', 'q1.ro1']);
    const net = solveSweep(circuit);
    freqs.forEach((f, k) => {
      const ref = reference(f);
      const scale = Math.max(...ref.flat().map(cabs));
      for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expectClose(entry(net, k, i, j), ref[i]![j]!, 1e-10 * scale, `S${i + 1}${j + 1} at ${f} Hz`);
      // an active, inverting stage: |S21| well above 1 at 100 MHz (gm·Z0 ≈ 7.7 before the input divider)
      if (k === 0) expect(cabs(entry(net, k, 1, 0))).toBeGreaterThan(2);
      // Cμ couples the output back: S12 ≠ 0
      expect(cabs(entry(net, k, 0, 1))).toBeGreaterThan(1e-4);
    });
  });

  it('Rollett K and μ are finite and equal the [K] formulas on the mathjs S, 1e-9 relative', () => {
    const net = solve(BLOCK);
    const k = rollettK(net);
    const mu = muFactor(net);
    freqs.forEach((f, i) => {
      const s = reference(f);
      const [s11, s12, s21, s22] = [s[0]![0]!, s[0]![1]!, s[1]![0]!, s[1]![1]!];
      const delta = sub(mul(s11, s22), mul(s12, s21));
      const kRef = (1 - cabs(s11) ** 2 - cabs(s22) ** 2 + cabs(delta) ** 2) / (2 * cabs(mul(s12, s21)));
      const muRef = (1 - cabs(s11) ** 2) / (cabs(sub(s22, mul(delta, math.conj(s11) as Complex))) + cabs(mul(s12, s21)));
      expect(Number.isFinite(k[i]!)).toBe(true);
      expect(Number.isFinite(mu[i]!)).toBe(true);
      expect(Math.abs(k[i]! - kRef)).toBeLessThanOrEqual(1e-9 * Math.abs(kRef));
      expect(Math.abs(mu[i]! - muRef)).toBeLessThanOrEqual(1e-9 * Math.abs(muRef));
    });
  });
});
