/**
 * Low-pass prototypes (src/synth/prototype.ts) against published tables and against an
 * independent synthesis of the same response.
 */
import { describe, expect, it } from 'vitest';
import {
  besselCutoff,
  besselPolynomial,
  butterworthG,
  chebyshevG,
  darlington,
  epsilonSquared,
  prototype,
  prototypeGain,
  responsePolynomial,
  type Prototype,
} from '../src/synth/prototype.js';

/**
 * |S21|² of a ladder (source 1 ohm, load p.load) at ω, from its chain (ABCD) matrix — written
 * here, apart from the solver: S21 = 2·√(Rs·RL)/(A·RL + B + C·Rs·RL + D·Rs) (common practice).
 */
function ladderGain(p: Prototype, w: number): number {
  let A: [number, number] = [1, 0], B: [number, number] = [0, 0], C: [number, number] = [0, 0], D: [number, number] = [1, 0];
  const m = (a: [number, number], b: [number, number]): [number, number] => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  const ad = (a: [number, number], b: [number, number]): [number, number] => [a[0] + b[0], a[1] + b[1]];
  p.g.forEach((g, i) => {
    const shunt = (i % 2 === 0) === (p.first === 'shunt');
    if (shunt) {
      const y: [number, number] = [0, w * g]; // [[1,0],[Y,1]]
      [A, B, C, D] = [ad(A, m(B, y)), B, ad(C, m(D, y)), D];
    } else {
      const z: [number, number] = [0, w * g]; // [[1,Z],[0,1]]
      [A, B, C, D] = [A, ad(m(A, z), B), C, ad(m(C, z), D)];
    }
  });
  const rl = p.load;
  const den = ad(ad([A[0] * rl, A[1] * rl], B), ad([C[0] * rl, C[1] * rl], D));
  return (4 * rl) / (den[0] * den[0] + den[1] * den[1]);
}

// Matthaei, Young & Jones (1964), Table 4.05-2 (Chebyshev), values from memory, 4 decimals;
// the last value of each row is g(n+1). Checked to ±2e-4: the table's rounding plus a last digit
// recalled one or two off.
const CHEBYSHEV_TABLE: Record<string, number[][]> = {
  '0.01': [
    [0.096, 1],
    [0.4488, 0.4077, 1.1007],
    [0.6291, 0.9702, 0.6291, 1],
    [0.7128, 1.2003, 1.3212, 0.6476, 1.1007],
    [0.7563, 1.3049, 1.5773, 1.3049, 0.7563, 1],
  ],
  '0.1': [
    [0.3052, 1],
    [0.843, 0.622, 1.3554],
    [1.0315, 1.1474, 1.0315, 1],
    [1.1088, 1.3061, 1.7703, 0.818, 1.3554],
    [1.1468, 1.3712, 1.975, 1.3712, 1.1468, 1],
    [1.1681, 1.4039, 2.0562, 1.517, 1.9029, 0.8618, 1.3554],
    [1.1811, 1.4228, 2.0966, 1.5733, 2.0966, 1.4228, 1.1811, 1],
  ],
  '0.5': [
    [0.6986, 1],
    [1.4029, 0.7071, 1.9841],
    [1.5963, 1.0967, 1.5963, 1],
    [1.6703, 1.1926, 2.3661, 0.8419, 1.9841],
    [1.7058, 1.2296, 2.5408, 1.2296, 1.7058, 1],
  ],
  '1': [
    [1.0177, 1],
    [1.8219, 0.685, 2.6599],
    [2.0236, 0.9941, 2.0236, 1],
    [2.0991, 1.0644, 2.8311, 0.7892, 2.6599],
    [2.1349, 1.0911, 3.0009, 1.0911, 2.1349, 1],
  ],
};

// Matthaei, Young & Jones (1964), Table 4.07-1: maximally flat time delay (Bessel) prototypes,
// delay 1 s at 0 Hz, equal terminations; values from memory, 4 decimals.
const BESSEL_TABLE: number[][] = [
  [2.0],
  [1.5774, 0.4226],
  [1.255, 0.5528, 0.1922],
  [1.0598, 0.5116, 0.3181, 0.1104],
  [0.9303, 0.4577, 0.3312, 0.209, 0.0718],
  [0.8377, 0.4116, 0.3158, 0.2364, 0.148, 0.0505],
  [0.7677, 0.3744, 0.2944, 0.2378, 0.1778, 0.1104, 0.0375],
  [0.7125, 0.3446, 0.2735, 0.2297, 0.1867, 0.1387, 0.0855, 0.0289],
  [0.6678, 0.3203, 0.2547, 0.2184, 0.1859, 0.1506, 0.1111, 0.0682, 0.023],
  [0.6305, 0.3002, 0.2384, 0.2066, 0.1808, 0.1539, 0.124, 0.0911, 0.0557, 0.0187],
];

describe('Butterworth prototypes', () => {
  it('match the published values for order 5 and the closed form for orders 1-10', () => {
    // Matthaei, Young & Jones (1964), Table 4.05-1, n = 5 (from memory): 0.6180, 1.6180, 2.0000
    const g5 = butterworthG(5);
    [0.618, 1.618, 2.0, 1.618, 0.618].forEach((v, i) => expect(g5[i]!).toBeCloseTo(v, 3));
    for (let n = 1; n <= 10; n++) {
      const p = prototype({ response: 'butterworth', order: n });
      expect(p.load).toBe(1);
      // an independent synthesis of 1/(1 + ω^2n) (Darlington, 1939) gives the same ladder, to 1e-9
      const e = responsePolynomial('butterworth', n);
      const lad = darlington(e, e[0]! * e[0]!, 'shunt', 1);
      lad.g.forEach((g, i) => expect(Math.abs(g - p.g[i]!)).toBeLessThan(1e-6));
    }
  });
});

describe('Chebyshev prototypes', () => {
  for (const ripple of ['0.01', '0.1', '0.5', '1']) {
    it(`${ripple} dB: the published table (4 decimals, ±2e-4) and the closed form against Darlington's synthesis, orders 1-10`, () => {
      const r = Number(ripple);
      CHEBYSHEV_TABLE[ripple]!.forEach((row, i) => {
        const n = i + 1;
        const { g, gNext } = chebyshevG(n, r);
        row.slice(0, n).forEach((v, k) => expect(Math.abs(g[k]! - v)).toBeLessThan(2e-4));
        expect(Math.abs(gNext - row[n]!)).toBeLessThan(2e-4);
      });
      for (let n = 1; n <= 10; n++) {
        const { g, gNext } = chebyshevG(n, r);
        const e = responsePolynomial('chebyshev', n, r);
        // |S21|² = 1/|E(jω)|² = 1/(1 + ε²T_n²): k0 = 1
        const load = n % 2 === 0 ? 1 / gNext : 1; // shunt capacitor first: g(n+1) is a conductance after a series inductor
        const lad = darlington(e, 1, 'shunt', load);
        // double roots of F on the jω axis cost about half the digits: ±1e-5 relative
        lad.g.forEach((x, k) => expect(Math.abs(x / g[k]! - 1)).toBeLessThan(1e-5));
        expect(Math.abs(lad.load / load - 1)).toBeLessThan(1e-6);
      }
    });
  }
});

describe('Bessel prototypes', () => {
  it('match the published table of maximally flat delay, orders 1-10 (±1e-4)', () => {
    // the reverse Bessel polynomial of order 3 is s³ + 6s² + 15s + 15 (closed form)
    expect(besselPolynomial(3)).toEqual([15, 15, 6, 1]);
    for (let n = 1; n <= 10; n++) {
      const p = prototype({ response: 'bessel', order: n });
      const w3 = besselCutoff(n); // the tables are for 1 s of delay; ours for a 3 dB point at 1 rad/s
      expect(Math.abs(p.load - 1)).toBeLessThan(1e-9);
      BESSEL_TABLE[n - 1]!.forEach((v, k) => expect(Math.abs(p.g[k]! / w3 - v)).toBeLessThan(1.01e-4));
    }
  });
  it('is 3 dB down at 1 rad/s: |S21|² = 1/2 (closed form of the cutoff), to 1e-12', () => {
    for (let n = 1; n <= 10; n++) expect(Math.abs(prototypeGain('bessel', n, 0, 1) - 0.5)).toBeLessThan(1e-12);
  });
});

describe('ladders meet their response functions', () => {
  const cases: { response: 'butterworth' | 'chebyshev' | 'bessel'; n: number; ripple: number; load?: number; first: 'shunt' | 'series' }[] = [];
  for (let n = 1; n <= 10; n++) {
    cases.push({ response: 'butterworth', n, ripple: 0, first: n % 2 ? 'shunt' : 'series' });
    cases.push({ response: 'chebyshev', n, ripple: [0.01, 0.1, 0.5, 1][n % 4]!, first: n % 2 ? 'series' : 'shunt' });
    cases.push({ response: 'bessel', n, ripple: 0, first: 'shunt' });
  }
  // unequal terminations: Butterworth and odd Chebyshev into 2 ohm; an even Chebyshev below its own load
  cases.push({ response: 'butterworth', n: 4, ripple: 0, load: 2, first: 'series' });
  cases.push({ response: 'chebyshev', n: 5, ripple: 0.5, load: 1.5, first: 'shunt' });
  cases.push({ response: 'chebyshev', n: 4, ripple: 0.1, load: 0.5, first: 'shunt' });
  cases.push({ response: 'bessel', n: 3, ripple: 0, load: 0.75, first: 'series' });
  for (const c of cases) {
    it(`${c.response} n=${c.n}${c.load ? ` into ${c.load} ohm` : ''}, ${c.first} first: the chain-matrix gain equals the closed form (1e-9 relative)`, () => {
      const p = prototype({ response: c.response, order: c.n, rippleDb: c.ripple, first: c.first, load: c.load });
      if (c.load) expect(Math.abs(p.load / c.load - 1)).toBeLessThan(1e-9);
      const r = p.load;
      const mismatch = (4 * r) / (1 + r) ** 2;
      // Butterworth peak/(1+ω^2n), Chebyshev peak/(1+ε²T_n²) (closed forms); peak = 4r/(1+r)², ×(1+ε²) for even Chebyshev
      const peak = c.response === 'chebyshev' && c.n % 2 === 0 ? mismatch * (1 + epsilonSquared(c.ripple)) : mismatch;
      for (const w of [0, 0.1, 0.37, 0.8, 0.99, 1, 1.3, 2.5, 7]) {
        const want = prototypeGain(c.response, c.n, c.ripple, w, peak);
        expect(Math.abs(ladderGain(p, w) / want - 1)).toBeLessThan(c.load || c.response === 'bessel' ? 1e-7 : 1e-9);
      }
    });
  }
  it('refuses an even-order Chebyshev with equal terminations, saying why', () => {
    expect(() => prototype({ response: 'chebyshev', order: 4, rippleDb: 0.1, load: 1 })).toThrow(/even-order Chebyshev.*g\(n\+1\)/);
    expect(() => prototype({ response: 'butterworth', order: 11 })).toThrow(/order must be a whole number from 1 to 10/);
  });
});
