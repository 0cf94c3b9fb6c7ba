/**
 * Elliptic (Cauer) filters (src/synth/elliptic.ts, src/synth/elliptic-filter.ts): the Jacobi
 * machinery against closed forms, the response against the defining properties of the elliptic
 * rational function, and the written netlists against the response.
 */
import { describe, expect, it } from 'vitest';
import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';
import { checkDesignText, designAnyFilter } from '../src/synth/index.js';
import { cde, ellipK, ellipticGain, ellipticLadder, ellipticResponse, sne, acde } from '../src/synth/elliptic.js';
import { designEllipticFilter, ellipticOrder } from '../src/synth/elliptic-filter.js';
import { readFilterRequest } from '../src/synth/options.js';
import type { FilterRequest } from '../src/synth/lumped.js';

/** K(k) by Gauss's arithmetic–geometric mean: π/(2·AGM(1, √(1 − k²))) (closed form). */
function kAgm(k: number): number {
  let a = 1;
  let b = Math.sqrt(1 - k * k);
  for (let i = 0; i < 40; i++) [a, b] = [(a + b) / 2, Math.sqrt(a * b)];
  return Math.PI / (2 * a);
}

describe('Jacobi elliptic functions', () => {
  it('K(k) equals the arithmetic–geometric mean form, and K(0.5) = 1.68575 (from memory), 1e-12', () => {
    for (const k of [0.1, 0.5, 0.9, 0.999]) expect(Math.abs(ellipK(k) - kAgm(k))).toBeLessThan(1e-12);
    expect(ellipK(0.5)).toBeCloseTo(1.68575, 5);
  });
  it('sn(K/2, k) = 1/√(1 + k′) and cd(0) = 1, sn(K) = 1 (closed forms), 1e-12; acde inverts cde', () => {
    for (const k of [0.2, 0.6, 0.95]) {
      expect(Math.abs(sne([0.5, 0], k)[0] - 1 / Math.sqrt(1 + Math.sqrt(1 - k * k)))).toBeLessThan(1e-12);
      expect(Math.abs(cde([0, 0], k)[0] - 1)).toBeLessThan(1e-12);
      expect(Math.abs(sne([1, 0], k)[0] - 1)).toBeLessThan(1e-12);
      const w = cde([0.3, 0.2], k);
      const u = acde(w, k);
      expect(Math.abs(u[0] - 0.3) + Math.abs(u[1] - 0.2)).toBeLessThan(1e-9);
    }
  });
});

describe('elliptic responses: equal ripple in both bands (the defining property)', () => {
  for (const [n, rp, ws] of [[3, 0.1, 1.5], [5, 0.5, 1.2], [5, 0.01, 2], [7, 0.1, 1.1], [9, 1, 1.05]] as const) {
    it(`order ${n}, ${rp} dB, Ωs = ${ws}: pass band within the ripple and touching it, stop band at least As and touching it at Ωs, zeros of transmission`, () => {
      const r = ellipticResponse(n, rp, ws);
      const il = (w: number) => -10 * Math.log10(ellipticGain(r, w));
      let passMax = 0;
      for (let k = 0; k <= 2000; k++) passMax = Math.max(passMax, il(k / 2000));
      expect(Math.abs(il(1) - rp)).toBeLessThan(1e-9); // the ripple edge
      expect(passMax).toBeLessThan(rp + 1e-9);
      for (const z of r.reflectionZeros) expect(il(z)).toBeLessThan(1e-9); // |S21| = 1 at the reflection zeros
      expect(Math.abs(il(ws) - r.stopAttenDb)).toBeLessThan(1e-6); // the stop edge
      for (let k = 0; k <= 4000; k++) {
        const w = ws * Math.exp((k / 4000) * Math.log(100));
        expect(il(w)).toBeGreaterThan(r.stopAttenDb - 1e-6);
      }
      for (const z of r.zeros) expect(ellipticGain(r, z)).toBeLessThan(1e-20);
      // the ladder between 1-ohm terminations
      const lad = ellipticLadder(r);
      expect(Math.abs(lad.load - 1)).toBeLessThan(1e-6);
      // each series resonator resonates at its transmission zero: ω = 1/√(LC)
      for (const a of lad.arms) if (a.kind === 'series') expect(Math.abs(1 / Math.sqrt(a.l * a.c) / a.zero - 1)).toBeLessThan(1e-9);
    });
  }
  it('the least odd order for a mask', () => {
    const n = ellipticOrder(0.1, 50, 1.5);
    expect(n % 2).toBe(1);
    expect(ellipticResponse(n, 0.1, 1.5).stopAttenDb).toBeGreaterThanOrEqual(50);
    expect(ellipticResponse(n - 2, 0.1, 1.5).stopAttenDb).toBeLessThan(50);
  });
});

describe('elliptic filters written as netlists', () => {
  const base: FilterRequest = { kind: 'lowpass', response: 'elliptic', rippleDb: 0.1, stopEdges: [1.5e9], z0: 50, first: 'shunt', cutoff: 1e9 };
  const cases: Partial<FilterRequest>[] = [
    { order: 3 },
    { order: 5, first: 'series' },
    { order: 7, rippleDb: 0.5, stopEdges: [1.2e9] },
    { kind: 'highpass', order: 5, stopEdges: [6e8] },
    { kind: 'highpass', order: 3, first: 'series', stopEdges: [5e8], z0: 75 },
  ];
  for (const c of cases) {
    it(`${JSON.stringify(c)}: |S21| within 1e-9 of 1/(1 + ε²·R_N²) at the mapped frequency; specs pass`, () => {
      const d = designEllipticFilter({ ...base, ...c } as FilterRequest);
      const { circuit } = loadNetlist(d.text, 'e.sbx');
      const net = solveSweep(circuit);
      let worst = 0;
      for (let k = 0; k < net.frequencies.length; k++) worst = Math.max(worst, Math.abs(Math.hypot(net.values[8 * k + 4]!, net.values[8 * k + 5]!) - Math.sqrt(d.gain(net.frequencies[k]!))));
      expect(worst).toBeLessThan(1e-9);
      expect(checkDesignText(d.text, 'e.sbx').pass).toBe(true);
    });
  }
  it('with lossy parts and with a mask, the specs still pass', () => {
    expect(checkDesignText(designEllipticFilter({ ...base, order: 5, q: 100 }).text, 'q.sbx').pass).toBe(true);
    const d = designAnyFilter(readFilterRequest('lowpass', { response: 'elliptic', ripple: '0.1', cutoff: '1 GHz', stopEdge: '1.3 GHz', stopAtten: '50 dB' }));
    expect(checkDesignText(d.text, 'm.sbx').pass).toBe(true);
  });
  it('plain errors', () => {
    expect(() => designAnyFilter(readFilterRequest('lowpass', { response: 'elliptic', order: '4', cutoff: '1 GHz', stopEdge: '2 GHz' }))).toThrow(/odd --order/);
    expect(() => designAnyFilter(readFilterRequest('bandpass', { response: 'elliptic', order: '3', center: '1 GHz', bandwidth: '100 MHz', stopEdge: '2 GHz' }))).toThrow(/low-pass and high-pass/);
    expect(() => designAnyFilter(readFilterRequest('lowpass', { response: 'elliptic', order: '3', cutoff: '1 GHz' }))).toThrow(/needs one --stop-edge/);
    expect(() => designAnyFilter(readFilterRequest('lowpass', { response: 'elliptic', order: '3', cutoff: '1 GHz', stopEdge: '2 GHz', realize: 'stubs' }))).toThrow(/made with lumped parts/);
  });
});
