/**
 * Distributed filters (src/synth/distributed.ts): the Richards–Kuroda stub low-pass against its
 * exact response and a published example, and Cohn's parallel-coupled-line band-pass against a
 * published example and its narrow-band response.
 */
import { describe, expect, it } from 'vitest';
import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';
import { checkDesignText } from '../src/synth/index.js';
import { designCoupledBandpass, designSteppedLowpass, designStubLowpass, richardsOmega } from '../src/synth/distributed.js';
import { readFilterRequest } from '../src/synth/options.js';
import type { FilterRequest } from '../src/synth/lumped.js';

function s21(text: string, sweep?: string): { f: Float64Array; g: number[] } {
  const { circuit } = loadNetlist(text, 'd.sbx', sweep ? { sweep } : {});
  const net = solveSweep(circuit);
  const g: number[] = [];
  for (let k = 0; k < net.frequencies.length; k++) g.push(Math.hypot(net.values[8 * k + 4]!, net.values[8 * k + 5]!));
  return { f: net.frequencies, g };
}

const base: FilterRequest = { kind: 'lowpass', response: 'chebyshev', rippleDb: 0.5, stopEdges: [], z0: 50, first: 'series', realize: 'stubs', cutoff: 4e9 };

describe('stub low-pass (Richards, 1948; Kuroda)', () => {
  it("Kuroda's identity UE(Zb) + series stub(Za) = shunt open stub(Zb·(Za+Zb)/Za) + UE(Za+Zb): equal chain matrices (closed form), 1e-12", () => {
    // chain matrices in Richards' variable S = j·t (the common 1/√(1−S²) of the unit elements cancels)
    const za = 1.7;
    const zb = 1;
    // UE(Z) = [[1, Z·S], [S/Z, 1]] (over √(1−S²), common to both sides), series stub = [[1, Z·S], [0, 1]],
    // shunt open stub = [[1, 0], [S/Z, 1]], S = j·t: off-diagonal entries are written without their factor S,
    // which turns into S² = −t² where two of them meet in a product
    for (const t of [0.1, 0.7, 2.3]) {
      const s2 = -t * t;
      const ue = (z: number) => [[1, z], [1 / z, 1]];
      const product = (a: number[][], b: number[][]) => [
        a[0]![0]! * b[0]![0]! + a[0]![1]! * b[1]![0]! * s2,
        a[0]![0]! * b[0]![1]! + a[0]![1]! * b[1]![1]!,
        a[1]![0]! * b[0]![0]! + a[1]![1]! * b[1]![0]!,
        a[1]![0]! * b[0]![1]! * s2 + a[1]![1]! * b[1]![1]!,
      ];
      const L = product(ue(zb), [[1, za], [0, 1]]);
      const R = product([[1, 0], [za / (zb * (za + zb)), 1]], ue(za + zb));
      L.forEach((v, i) => expect(Math.abs(v - R[i]!)).toBeLessThan(1e-12));
    }
  });
  it('Chebyshev 3 dB, order 3, 4 GHz, 50 ohm: 217.4 ohm unit elements, 64.9 ohm end stubs, 70.3 ohm middle stub (Pozar, Microwave Engineering, example 8.5; from memory), ±0.2 ohm', () => {
    const d = designStubLowpass({ ...base, rippleDb: 3, order: 3 });
    const z = (name: string) => loadNetlist(d.text, 'd.sbx').circuit.variables.find((v) => v.name === name)!.value;
    expect(Math.abs(z('zu2') - 217.4)).toBeLessThan(0.2);
    expect(Math.abs(z('zs1') - 64.9)).toBeLessThan(0.2);
    expect(Math.abs(z('zs3') - 70.3)).toBeLessThan(0.2);
    expect(d.text).not.toMatch(/short_stub/); // only shunt open stubs and lines
  });
  const cases: Partial<FilterRequest>[] = [
    { response: 'chebyshev', rippleDb: 0.5, order: 3, first: 'series' },
    { response: 'butterworth', order: 2, first: 'series', load: 100 },
    { response: 'butterworth', order: 5, first: 'shunt' },
    { response: 'bessel', order: 4, first: 'series' },
    { response: 'chebyshev', rippleDb: 0.1, order: 1, first: 'series' },
  ];
  for (const c of cases) {
    it(`${c.response} order ${c.order}, ${c.first} first${c.load ? `, load ${c.load} ohm` : ''}: |S21| = the prototype at Ω = tan(π·f/(4·fc)) to 1e-9 up to 1.9·fc, specs pass`, () => {
      const d = designStubLowpass({ ...base, ...c } as FilterRequest);
      const { f, g } = s21(d.text);
      let worst = 0;
      for (let k = 0; k < f.length; k++) worst = Math.max(worst, Math.abs(g[k]! - Math.sqrt(d.gain(f[k]!))));
      expect(worst).toBeLessThan(1e-9);
      expect(richardsOmega(4e9, 4e9)).toBeCloseTo(1, 14); // tan(π/4) = 1 at the cutoff
      expect(checkDesignText(d.text, 'd.sbx').pass).toBe(true);
    });
  }
  it('a mask picks the least order from Ω = tan(π·fs/(4·fc)), and a stop edge at 2·fc or above is refused', () => {
    const r = readFilterRequest('lowpass', { realize: 'stubs', response: 'chebyshev', ripple: '0.5', cutoff: '1 GHz', stopAtten: '30', stopEdge: '1.6 GHz', first: 'series' });
    const d = designStubLowpass(r);
    expect(checkDesignText(d.text, 's.sbx').pass).toBe(true);
    expect(() => designStubLowpass({ ...r, stopEdges: [2.1e9] })).toThrow(/at or above 2·--cutoff/);
    expect(() => designStubLowpass({ ...r, kind: 'highpass' })).toThrow(/low-pass filters only/);
  });
});

describe('parallel-coupled-line band-pass (Cohn, 1958)', () => {
  it('0.5 dB Chebyshev, order 3, 2 GHz, 10 %: Z0e 70.61, 56.64 ohm and Z0o 39.24, 44.77 ohm (Pozar, example 8.8; from memory), ±0.1 ohm', () => {
    const d = designCoupledBandpass({ ...base, kind: 'bandpass', realize: 'coupled-lines', order: 3, center: 2e9, bandwidth: 200e6, cutoff: undefined });
    const m = d.modes!;
    expect(m).toHaveLength(4);
    [70.61, 56.64, 56.64, 70.61].forEach((v, i) => expect(Math.abs(m[i]!.z0e - v)).toBeLessThan(0.1));
    [39.24, 44.77, 44.77, 39.24].forEach((v, i) => expect(Math.abs(m[i]!.z0o - v)).toBeLessThan(0.1));
  });
  for (const [response, order, ripple, frac] of [['chebyshev', 3, 0.5, 0.05], ['butterworth', 4, 0, 0.1], ['chebyshev', 5, 0.1, 0.08]] as const) {
    it(`${response} order ${order}, ${frac * 100} % wide: passes its specs; |S21| within 0.25 dB of the prototype over the inner half of the band (a narrow-band method)`, () => {
      const d = designCoupledBandpass({ ...base, kind: 'bandpass', realize: 'coupled-lines', response, order, rippleDb: ripple || 0.1, center: 2e9, bandwidth: 2e9 * frac, cutoff: undefined });
      expect(checkDesignText(d.text, 'c.sbx').pass).toBe(true);
      const { f, g } = s21(d.text, `linear start=${2e9 * (1 - frac / 4)} Hz stop=${2e9 * (1 + frac / 4)} Hz points=101`);
      for (let k = 0; k < f.length; k++) expect(Math.abs(20 * Math.log10(g[k]!) - 10 * Math.log10(d.gain(f[k]!)))).toBeLessThan(0.25);
    });
  }
  it('refuses wide bands, even Chebyshev orders and unequal loads', () => {
    const r = { ...base, kind: 'bandpass' as const, realize: 'coupled-lines' as const, order: 3, center: 2e9, bandwidth: 600e6, cutoff: undefined };
    expect(() => designCoupledBandpass(r)).toThrow(/narrow-band design/);
    expect(() => designCoupledBandpass({ ...r, bandwidth: 100e6, order: 4 })).toThrow(/odd order/);
    expect(() => designCoupledBandpass({ ...r, bandwidth: 100e6, load: 75 })).toThrow(/equal terminations/);
  });
});

describe('stepped-impedance low-pass (Matthaei, Young & Jones 1964, §7.03)', () => {
  it('maximally flat, order 6, 2.5 GHz, 120 and 20 ohm lines: 11.8°, 33.8°, 44.3°, 46.1°, 32.4°, 12.3° (Pozar, Microwave Engineering, example 8.6; from memory), ±0.1°', () => {
    const d = designSteppedLowpass({ ...base, response: 'butterworth', realize: 'stepped', order: 6, first: 'shunt', cutoff: 2.5e9 }, 120, 20);
    const { circuit } = loadNetlist(d.text, 's.sbx');
    [11.8, 33.8, 44.3, 46.1, 32.4, 12.3].forEach((v, k) => {
      const th = circuit.variables.find((x) => x.name === `th${k + 1}`)!.value; // radians
      expect(Math.abs((th * 180) / Math.PI - v)).toBeLessThan(0.1);
    });
    expect(checkDesignText(d.text, 's.sbx').pass).toBe(true);
    // an approximation: the loss at the cutoff within 1 dB of the 3 dB of the lumped prototype
    const { g } = s21(d.text, 'list freqs=2.5 GHz');
    expect(Math.abs(-20 * Math.log10(g[0]!) - 3.0103)).toBeLessThan(1);
  });
  it('refuses sections too long for the approximation, and impedances on the wrong side of z0', () => {
    const r = { ...base, response: 'butterworth' as const, realize: 'stepped' as const, order: 5, first: 'shunt' as const, cutoff: 1e9 };
    expect(() => designSteppedLowpass(r, 60, 45)).toThrow(/too long for the stepped-impedance approximation/);
    expect(() => designSteppedLowpass(r, 40, 20)).toThrow(/--high-z .* must be above --z0/);
  });
});
