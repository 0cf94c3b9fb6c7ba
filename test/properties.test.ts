/**
 * Property tests on random passive RLC networks (fast-check, fixed seed): netlists are generated as
 * text, loaded with loadNetlist and solved with solveSweep.
 *
 * Sources:
 * - [RECIP] a network of resistors, inductors and capacitors is reciprocal: with real, positive
 *   port references its S matrix is symmetric, S = Sᵀ. Common practice (Pozar, Microwave
 *   Engineering, ch. 4 — chapter (from memory)).
 * - [PASS] such a network is passive: it cannot deliver more power than it receives, so
 *   U − SᴴS is positive semidefinite, i.e. every eigenvalue of SᴴS is ≤ 1. Common practice (same
 *   source).
 * - [LOSSLESS] with inductors and capacitors only it is lossless: SᴴS = U. Common practice (same
 *   source).
 * - [MATHJS] an independent reference for S of a random network: Kirchhoff's current law written
 *   out as a dense nodal matrix (every element as an admittance, each port terminated in its
 *   reference and driven by a Norton source 2/√Zref, which makes the incident power wave 1), solved
 *   by mathjs (general-purpose library) in 60-digit BigNumber arithmetic, then S_ij = v_i/√Z_i − δ_ij
 *   from the power-wave definitions (Kurokawa, IEEE Trans. MTT 1965 — citation (from memory)).
 *
 * Generated networks: 2..8 nodes besides ground; a random spanning tree over ground and the nodes
 * (node i joins ground or a random earlier node), so every node has a path to ground through
 * elements and the netlist is connected, plus 0..10 extra elements between random distinct nodes or
 * ground; element kinds R, L, C (L and C only for the lossless property); 1..4 ports, plus on a
 * random node and minus on ground or another node, real references 10..200 ohm. Values are
 * log-uniform across decades, independent of the frequency: R 10 ohm..10 kohm, L 1 nH..10 µH,
 * C 0.1 pF..1 nF; one frequency per network, log-uniform 1 MHz..1 GHz (above 0 Hz). Values go into
 * the netlist as `String(x)` in SI base units (bare numbers), which reads back to the same double.
 * (Values independent of the frequency make an exactly resonant lossless sub-network — which has no
 * unique nodal solution — a probability-zero event; see the report on SingularSystemError.)
 *
 * Tolerances (absolute on S entries; a passive S has max |S_ij| ≤ 1, so these are also relative to
 * max |S|). Measured in diagnostic runs of 2000 networks per property with other seeds, for the
 * record: |S_ij − S_ji| ≤ 3.3e-15, λmax(SᴴS) − 1 ≤ 2.8e-14, LC |SᴴS − U| ≤ 1.1e-14, and distance to
 * the 60-digit reference ≤ 6.9e-13.
 * - [RECIP]: max_ij |S_ij − S_ji| ≤ 1e-12. The two entries come from different right-hand sides of
 *   one factorisation, so they differ by rounding only.
 * - [PASS]: λmax(SᴴS) ≤ 1 + 1e-12. S itself carries rounding error up to ~1e-12 for the worst
 *   networks (see the reference distance above: element admittances span up to ~10 decades, so the
 *   nodal matrix is badly scaled), and an error δS moves λmax by up to ~2‖δS‖; nearly lossless
 *   random networks sit at λmax ≈ 1, so this is the tightest figure that rounding allows.
 * - [LOSSLESS]: max_ij |(SᴴS − U)_ij| ≤ 1e-10, and every eigenvalue of SᴴS within 1e-10 of 1.
 *   Looser than passivity on purpose: a lossless network can hold internal resonances that no port
 *   load damps, and near them the nodal system is nearly singular and rounding in S grows in
 *   proportion (~100× margin over the worst reference distance seen). It still catches real loss:
 *   the control below (one 1 Mohm resistor in a 50 ohm LC two-port) gives ~7e-5.
 * - [MATHJS]: max_ij |S_ij − S_ij(reference)| ≤ 1e-10 (rounding of a double-precision solve of a
 *   badly scaled system against an essentially exact one; ~150× margin over the worst seen).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as math from 'mathjs';
import type { BigNumber, Matrix } from 'mathjs';

import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';
import { createEigenWorkspace, gramEigenvalues } from '../src/network/complex.js';
import type { NetworkData } from '../src/network/types.js';

// ------------------------------------------------------------------------------------------------
// random networks

type Kind = 'resistor' | 'inductor' | 'capacitor';

interface RandomElement {
  kind: Kind;
  /** Node indices, 0 = ground, 1..nodes. */
  a: number;
  b: number;
  /** SI value. */
  value: number;
}

interface RandomPort {
  plus: number;
  /** 0 = ground. */
  minus: number;
  ref: number;
}

interface RandomNetwork {
  nodes: number;
  elements: RandomElement[];
  ports: RandomPort[];
  frequency: number;
}

/** Log-uniform range per kind, as [log10 min, log10 max] in SI units. */
const DECADES: Record<Kind, [number, number]> = {
  resistor: [1, 4], // 10 ohm .. 10 kohm
  inductor: [-9, -5], // 1 nH .. 10 µH
  capacitor: [-13, -9], // 0.1 pF .. 1 nF
};

const unit01 = fc.double({ min: 0, max: 1, noNaN: true });

function logUniform(lo: number, hi: number): fc.Arbitrary<number> {
  return unit01.map((u) => 10 ** (lo + (hi - lo) * u));
}

function elementArb(kinds: readonly Kind[], a: fc.Arbitrary<number>, b: fc.Arbitrary<number>) {
  return fc
    .record({ kind: fc.constantFrom(...kinds), a, b, u: unit01 })
    .map(({ kind, a, b, u }): RandomElement => {
      const [lo, hi] = DECADES[kind];
      return { kind, a, b, value: 10 ** (lo + (hi - lo) * u) };
    });
}

function networkArb(kinds: readonly Kind[]): fc.Arbitrary<RandomNetwork> {
  return fc.integer({ min: 2, max: 8 }).chain((nodes) => {
    // Spanning tree: node i (1..nodes) joins a random node among ground and 1..i-1.
    const tree = fc.tuple(
      ...Array.from({ length: nodes }, (_, i) => elementArb(kinds, fc.constant(i + 1), fc.integer({ min: 0, max: i }))),
    );
    const extraPair = fc
      .tuple(fc.integer({ min: 0, max: nodes }), fc.integer({ min: 1, max: nodes }))
      .filter(([x, y]) => x !== y);
    const extra = fc.array(
      extraPair.chain(([x, y]) => elementArb(kinds, fc.constant(x), fc.constant(y))),
      { minLength: 0, maxLength: 10 },
    );
    const port = fc
      .record({
        plus: fc.integer({ min: 1, max: nodes }),
        minus: fc.integer({ min: 0, max: nodes }),
        ref: fc.double({ min: 10, max: 200, noNaN: true }),
      })
      .filter((p) => p.plus !== p.minus);
    const ports = fc.array(port, { minLength: 1, maxLength: 4 });
    return fc.record({
      nodes: fc.constant(nodes),
      elements: fc.tuple(tree, extra).map(([t, e]) => [...t, ...e]),
      ports,
      frequency: logUniform(6, 9), // 1 MHz .. 1 GHz
    });
  });
}

const nodeName = (i: number): string => (i === 0 ? 'ground' : `n${i}`);

function toNetlist(net: RandomNetwork): string {
  const lines = ['title "random network"'];
  net.elements.forEach((e, k) => {
    lines.push(`${e.kind} e${k} a=${nodeName(e.a)} b=${nodeName(e.b)} value=${String(e.value)}`);
  });
  net.ports.forEach((p, k) => {
    lines.push(`port ${k + 1} plus=${nodeName(p.plus)} minus=${nodeName(p.minus)} ref=${String(p.ref)}`);
  });
  lines.push(`sweep list freqs=${String(net.frequency)}`);
  return lines.join('\n');
}

function solveRandom(net: RandomNetwork): NetworkData {
  const { circuit } = loadNetlist(toNetlist(net), 'random.sbx');
  return solveSweep(circuit);
}

// ------------------------------------------------------------------------------------------------
// checks

/** One frequency slice (k = 0) of S, interleaved n×n. */
function slice(s: NetworkData): Float64Array {
  return s.values.subarray(0, 2 * s.ports * s.ports);
}

/** max_ij |S_ij − S_ji|. */
function asymmetry(n: number, s: Float64Array): number {
  let worst = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const a = 2 * (i * n + j);
      const b = 2 * (j * n + i);
      worst = Math.max(worst, Math.hypot(s[a]! - s[b]!, s[a + 1]! - s[b + 1]!));
    }
  }
  return worst;
}

/** λ_max of SᴴS through the project's Hermitian eigen helper. */
function largestGramEigenvalue(n: number, s: Float64Array): number {
  const values = new Float64Array(n);
  gramEigenvalues(n, s, values, createEigenWorkspace(n));
  return values[n - 1]!; // ascending
}

/** max_ij |(SᴴS − U)_ij|, computed directly. */
function unitarityDefect(n: number, s: Float64Array): number {
  let worst = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const xr = s[2 * (k * n + i)]!;
        const xi = -s[2 * (k * n + i) + 1]!;
        const yr = s[2 * (k * n + j)]!;
        const yi = s[2 * (k * n + j) + 1]!;
        re += xr * yr - xi * yi;
        im += xr * yi + xi * yr;
      }
      worst = Math.max(worst, Math.hypot(re - (i === j ? 1 : 0), im));
    }
  }
  return worst;
}

/** mathjs with 60-digit BigNumber arithmetic, for [MATHJS]. */
const big = math.create(math.all, { number: 'BigNumber', precision: 60 });

/** Typed shorthands over `big` (its typings return wide unions for these calls). */
const B = {
  of: (x: number): BigNumber => big.bignumber(x),
  add: (x: BigNumber, y: BigNumber): BigNumber => big.add(x, y),
  sub: (x: BigNumber, y: BigNumber): BigNumber => big.subtract(x, y),
  mul: (x: BigNumber, y: BigNumber): BigNumber => big.multiply(x, y) as BigNumber,
  div: (x: BigNumber, y: BigNumber): BigNumber => big.divide(x, y) as BigNumber,
  neg: (x: BigNumber): BigNumber => big.unaryMinus(x),
  sqrt: (x: BigNumber): BigNumber => big.sqrt(x as never) as unknown as BigNumber,
  /** π to the configured precision (a BigNumber at run time with this configuration). */
  pi: (): BigNumber => big.pi as unknown as BigNumber,
};

/**
 * [MATHJS] S of the random network by an independent dense nodal solve in mathjs, in 60-digit
 * arithmetic. The complex system (G + jB)·v = i is written as the real system
 * [[G, −B], [B, G]]·[vr; vi] = [ir; ii] (mathjs has no BigNumber complex type). Every element is an
 * admittance (R: 1/R, C: jωC, L: 1/(jωL) = −j/(ωL)); each port adds 1/Zref across its terminals
 * and, when driven, a current 2/√Zref into plus and out of minus. The element values are read from
 * the same decimal strings the netlist holds, so both solve the netlist as written.
 */
function referenceS(net: RandomNetwork): Float64Array {
  const nn = net.nodes;
  const zero = (): BigNumber[][] => Array.from({ length: nn }, () => Array.from({ length: nn }, () => B.of(0)));
  const g = zero();
  const sus = zero();
  const stamp = (p: number, q: number, gr: BigNumber, gi: BigNumber) => {
    for (const [m, v] of [
      [g, gr],
      [sus, gi],
    ] as const) {
      if (p > 0) m[p - 1]![p - 1] = B.add(m[p - 1]![p - 1]!, v);
      if (q > 0) m[q - 1]![q - 1] = B.add(m[q - 1]![q - 1]!, v);
      if (p > 0 && q > 0) {
        m[p - 1]![q - 1] = B.sub(m[p - 1]![q - 1]!, v);
        m[q - 1]![p - 1] = B.sub(m[q - 1]![p - 1]!, v);
      }
    }
  };
  const w = B.mul(B.mul(B.of(2), B.pi()), big.bignumber(String(net.frequency)));
  for (const e of net.elements) {
    const v = big.bignumber(String(e.value));
    if (e.kind === 'resistor') stamp(e.a, e.b, B.div(B.of(1), v), B.of(0));
    else if (e.kind === 'capacitor') stamp(e.a, e.b, B.of(0), B.mul(w, v));
    else stamp(e.a, e.b, B.of(0), B.neg(B.div(B.of(1), B.mul(w, v))));
  }
  for (const p of net.ports) stamp(p.plus, p.minus, B.div(B.of(1), big.bignumber(String(p.ref))), B.of(0));
  const rows: BigNumber[][] = [];
  for (let i = 0; i < nn; i++) rows.push([...g[i]!, ...sus[i]!.map(B.neg)]);
  for (let i = 0; i < nn; i++) rows.push([...sus[i]!, ...g[i]!]);
  const a = big.matrix(rows);
  const np = net.ports.length;
  const out = new Float64Array(2 * np * np);
  for (let j = 0; j < np; j++) {
    const rhs: BigNumber[] = Array.from({ length: 2 * nn }, () => B.of(0));
    const pj = net.ports[j]!;
    const drive = B.div(B.of(2), B.sqrt(big.bignumber(String(pj.ref))));
    if (pj.plus > 0) rhs[pj.plus - 1] = B.add(rhs[pj.plus - 1]!, drive);
    if (pj.minus > 0) rhs[pj.minus - 1] = B.sub(rhs[pj.minus - 1]!, drive);
    const x = (big.lusolve(a, big.matrix(rhs.map((r) => [r]))) as Matrix).toArray() as unknown as BigNumber[][];
    const vr = (node: number): BigNumber => (node === 0 ? B.of(0) : x[node - 1]![0]!);
    const vi = (node: number): BigNumber => (node === 0 ? B.of(0) : x[nn + node - 1]![0]!);
    for (let i = 0; i < np; i++) {
      const pi = net.ports[i]!;
      const root = B.sqrt(big.bignumber(String(pi.ref)));
      const re = B.sub(B.div(B.sub(vr(pi.plus), vr(pi.minus)), root), B.of(i === j ? 1 : 0));
      const im = B.div(B.sub(vi(pi.plus), vi(pi.minus)), root);
      out[2 * (i * np + j)] = re.toNumber();
      out[2 * (i * np + j) + 1] = im.toNumber();
    }
  }
  return out;
}

function maxDiff(a: Float64Array, b: Float64Array): number {
  let worst = 0;
  for (let k = 0; k < a.length; k += 2) worst = Math.max(worst, Math.hypot(a[k]! - b[k]!, a[k + 1]! - b[k + 1]!));
  return worst;
}

// ------------------------------------------------------------------------------------------------

const RUNS = 200;
const SEED = 20240611;

describe('random RLC networks', () => {
  it('are reciprocal: S = Sᵀ to 1e-12 [RECIP]', () => {
    fc.assert(
      fc.property(networkArb(['resistor', 'inductor', 'capacitor']), (net) => {
        const s = solveRandom(net);
        expect(s.ports).toBe(net.ports.length);
        const d = asymmetry(s.ports, slice(s));
        expect(d, toNetlist(net)).toBeLessThanOrEqual(1e-12);
      }),
      { seed: SEED, numRuns: RUNS },
    );
  });

  it('are passive: eigenvalues of SᴴS ≤ 1 + 1e-12 [PASS]', () => {
    fc.assert(
      fc.property(networkArb(['resistor', 'inductor', 'capacitor']), (net) => {
        const s = solveRandom(net);
        const lmax = largestGramEigenvalue(s.ports, slice(s));
        expect(lmax, toNetlist(net)).toBeLessThanOrEqual(1 + 1e-12);
      }),
      { seed: SEED + 1, numRuns: RUNS },
    );
  });

  it('match an independent 60-digit nodal solve in mathjs to 1e-10 [MATHJS]', () => {
    fc.assert(
      fc.property(networkArb(['resistor', 'inductor', 'capacitor']), (net) => {
        const s = solveRandom(net);
        const d = maxDiff(slice(s), referenceS(net));
        expect(d, toNetlist(net)).toBeLessThanOrEqual(1e-10);
      }),
      { seed: SEED + 2, numRuns: 100 },
    );
  });
});

describe('random LC networks', () => {
  it('are lossless: SᴴS = U to 1e-10 [LOSSLESS]', () => {
    fc.assert(
      fc.property(networkArb(['inductor', 'capacitor']), (net) => {
        const s = solveRandom(net);
        const d = unitarityDefect(s.ports, slice(s));
        expect(d, toNetlist(net)).toBeLessThanOrEqual(1e-10);
        // and, through the eigen helper, every eigenvalue of SᴴS is 1 [LOSSLESS]
        const values = new Float64Array(s.ports);
        gramEigenvalues(s.ports, slice(s), values, createEigenWorkspace(s.ports));
        for (const v of values) expect(Math.abs(v - 1), toNetlist(net)).toBeLessThanOrEqual(1e-10);
      }),
      { seed: SEED + 3, numRuns: RUNS },
    );
  });
});

describe('the checks themselves can fail', () => {
  // Controls: the same measures applied to networks that break each property must flag them.
  it('a lossy network is not unitary, by far more than the tolerance', () => {
    const { circuit } = loadNetlist(
      `
      inductor  l1 a=n1 b=n2     value=10 nH
      capacitor c1 a=n2 b=ground value=2 pF
      resistor  r1 a=n2 b=ground value=1 Mohm
      port 1 plus=n1
      port 2 plus=n2
      sweep list freqs=500 MHz
    `,
      'control.sbx',
    );
    const s = solveSweep(circuit);
    expect(unitarityDefect(2, slice(s))).toBeGreaterThan(1e-6);
  });

  it('a non-symmetric or gain matrix is flagged by the reciprocity and passivity measures', () => {
    // S = [[0, 0], [1.5, 0]] (an amplifier-like matrix, written by hand): asymmetric, λmax(SᴴS) = 2.25.
    const s = Float64Array.of(0, 0, 0, 0, 1.5, 0, 0, 0);
    expect(asymmetry(2, s)).toBeCloseTo(1.5, 12);
    expect(largestGramEigenvalue(2, s)).toBeCloseTo(2.25, 12);
  });
});
