/**
 * Matching networks of `scatterbox design match` (src/synth/match.ts): matched at f0 when solved
 * by the library, transformer sections against closed forms and published examples, and no
 * broadband match beating the Bode–Fano bound (Fano, 1950).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';
import { checkDesignText } from '../src/synth/index.js';
import { binomialSections, chebyshevSections, designMatch, readImpedance, readMatchRequest, type MatchNetwork } from '../src/synth/match.js';

/** |S11| of the written one-port at the given frequencies (solved by the library). */
function reflection(text: string, sweep?: string): { f: Float64Array; g: number[] } {
  const { circuit } = loadNetlist(text, 'match.sbx', sweep ? { sweep } : {});
  const net = solveSweep(circuit);
  const g: number[] = [];
  for (let k = 0; k < net.frequencies.length; k++) g.push(Math.hypot(net.values[2 * k]!, net.values[2 * k + 1]!));
  return { f: net.frequencies, g };
}

const F0 = 915e6;
const base = { f0: F0, z0: 50, stub: 'open' as const };

describe('single-frequency matches: |S11| at f0 vanishes (1e-9) and the specs pass', () => {
  const loads: [number, number][] = [[30, 20], [100, -40], [75, 0], [20, 0], [12.5, -60], [50, 35]];
  const networks: MatchNetwork[] = ['l-lowpass', 'l-highpass', 'stub', 'double-stub'];
  for (const network of networks) {
    for (const [r, x] of loads) {
      // a double-stub tuner with stubs λ/8 apart cannot reach loads whose conductance exceeds 2·Y0 (Pozar, §5.3)
      if (network === 'double-stub' && r / (r * r + x * x) > 2 / 50) continue;
      for (const stub of network.includes('stub') ? (['open', 'short'] as const) : (['open'] as const)) {
        it(`${network}${network.includes('stub') ? ` (${stub})` : ''} into ${r}${x >= 0 ? '+' : ''}${x}j ohm`, () => {
          const d = designMatch({ ...base, network, r, x, stub });
          const { g } = reflection(d.text, `list freqs=${F0} Hz`);
          expect(g[0]!).toBeLessThan(1e-9);
          expect(checkDesignText(d.text, 'm.sbx').pass).toBe(true);
        });
      }
    }
  }
  it('the two L forms differ: low-pass form has a shunt capacitor, high-pass form a shunt inductor', () => {
    expect(designMatch({ ...base, network: 'l-lowpass', r: 75, x: 0 }).text).toMatch(/capacitor c2 +a=load b=ground/);
    expect(designMatch({ ...base, network: 'l-highpass', r: 75, x: 0 }).text).toMatch(/inductor +l2 +a=load b=ground/);
  });
  for (const network of ['pi', 'tee'] as const) {
    for (const [r, q] of [[75, 3], [200, 5], [10, 4]] as const) {
      it(`${network} from 50 ohm into ${r} ohm with loaded Q ${q}: matched at f0, end arms from the closed forms, narrower with a higher Q`, () => {
        const d = designMatch({ ...base, network, r, x: 0, loadedQ: q });
        const { g } = reflection(d.text, `list freqs=${F0} Hz`);
        expect(g[0]!).toBeLessThan(1e-9);
        expect(checkDesignText(d.text, 'm.sbx').pass).toBe(true);
        const w0 = 2 * Math.PI * F0;
        const hi = Math.max(50, r);
        const lo = Math.min(50, r);
        const { circuit } = loadNetlist(d.text, 'm.sbx');
        const value = (name: string) => circuit.variables.find((v) => v.name === name)!.value;
        if (network === 'pi') {
          // Π: the shunt capacitor at the higher resistance has B = Q/Rhigh (Bowick, RF Circuit Design; common practice)
          expect(value(hi === 50 ? 'c1' : 'c3') * w0 * hi).toBeCloseTo(q, 9);
        } else {
          // T: the series inductor at the lower resistance has X = Q·Rlow (common practice)
          expect(value(lo === 50 ? 'l1' : 'l3') * w0).toBeCloseTo(q * lo, 6);
        }
        // the band where half the power or more reaches the load narrows as the loaded Q rises
        const width = (text: string) => {
          const sw = reflection(text, `linear start=${F0 / 4} Hz stop=${F0 * 2} Hz points=2001`);
          const inBand = [...sw.f].filter((_, k) => sw.g[k]! ** 2 <= 0.5);
          return inBand[inBand.length - 1]! - inBand[0]!;
        };
        expect(width(designMatch({ ...base, network, r, x: 0, loadedQ: 2 * q }).text)).toBeLessThan(width(d.text));
      });
    }
  }
  it('a double-stub tuner refuses loads in its forbidden region, G > (1 + t²)/t²·Y0 (Pozar, §5.3), naming the way out', () => {
    // 20 ohm: G = 0.05 S above 2/50 = 0.04 S
    expect(() => designMatch({ ...base, network: 'double-stub', r: 20, x: 0 })).toThrow(/cannot match this load .* 0\.05 S is above .* 0\.04 S/);
    // just inside: 26 ohm, G = 0.0385 S
    expect(checkDesignText(designMatch({ ...base, network: 'double-stub', r: 26, x: 0 }).text, 'd.sbx').pass).toBe(true);
  });
  it('refuses a loaded Q below the least for the resistances, √(Rhigh/Rlow − 1)', () => {
    // 50 → 200 ohm: the least Q is √3 = 1.732 (common practice)
    expect(() => designMatch({ ...base, network: 'pi', r: 200, x: 0, loadedQ: 1.5 })).toThrow(/below the least .* 1\.7321/);
  });
});

describe('transformers', () => {
  it('quarter-wave: Z1 = √(Z0·RL) (closed form), exact match at f0', () => {
    const d = designMatch({ ...base, network: 'quarter-wave', r: 100, x: 0 });
    expect(d.sections![0]!).toBeCloseTo(Math.sqrt(5000), 9);
    expect(reflection(d.text, `list freqs=${F0} Hz`).g[0]!).toBeLessThan(1e-9);
  });
  it('binomial, 3 sections, 50 ohm load on a 100 ohm line: 91.7, 70.7, 54.5 ohm (Pozar, Microwave Engineering, example 5.6; from memory), ±0.05 ohm', () => {
    const z = binomialSections(100, 50, 3);
    [91.7, 70.7, 54.5].forEach((v, i) => expect(Math.abs(z[i]! - v)).toBeLessThan(0.05));
  });
  it('binomial, 2 sections, ratio 2: 1.1892 and 1.6818 of Z0 (2^(1/4), 2^(3/4): the closed form of the log profile)', () => {
    const z = binomialSections(1, 2, 2);
    expect(z[0]!).toBeCloseTo(2 ** 0.25, 12);
    expect(z[1]!).toBeCloseTo(2 ** 0.75, 12);
  });
  it('Chebyshev, 3 sections, 100 ohm load on 50 ohm, Γm = 0.05: 57.5, 70.7, 87.0 ohm (Pozar, example 5.7; from memory), ±0.1 ohm', () => {
    const { z, secThetaM } = chebyshevSections(50, 100, 3, { gammaMax: 0.05 });
    [57.5, 70.7, 87.0].forEach((v, i) => expect(Math.abs(z[i]! - v)).toBeLessThan(0.1));
    // sec θm = cosh(acosh(ln 2/(2·0.05))/3) = 1.408 (Pozar's value, from memory)
    expect(secThetaM).toBeCloseTo(1.408, 3);
  });
  for (const [network, n, rl, bw] of [['binomial', 3, 100, 400e6], ['binomial', 4, 20, 300e6], ['chebyshev', 3, 100, 600e6], ['chebyshev', 4, 200, 500e6], ['chebyshev', 2, 25, 400e6]] as const) {
    it(`${network} ${n} sections into ${rl} ohm over ${bw / 1e6} MHz: solved |S11| in the band equals the chain-matrix value (1e-6), within 2× of small-reflection theory; specs pass`, () => {
      const d = designMatch({ ...base, f0: 1e9, network, r: rl, x: 0, sections: n, bandwidth: bw });
      const { g } = reflection(d.text, `linear start=${1e9 - bw / 2} Hz stop=${1e9 + bw / 2} Hz points=2001`);
      expect(Math.abs(Math.max(...g) - d.exactMax!)).toBeLessThan(1e-6);
      expect(d.exactMax!).toBeLessThan(2 * d.gammaMax!);
      expect(d.exactMax!).toBeGreaterThan(0.5 * d.gammaMax!);
      expect(checkDesignText(d.text, 't.sbx').pass).toBe(true);
    });
  }
});

describe('Bode–Fano bound (Fano, 1950; Pozar, Microwave Engineering, §5.9)', () => {
  /** ∫ h(ω)·ln(1/|Γ|) dω over the sweep (trapezoid in ω). */
  function integral(text: string, weight: (w: number) => number): number {
    const { f, g } = reflection(text, 'log start=1 kHz stop=1 THz points=20001');
    let s = 0;
    for (let k = 1; k < f.length; k++) {
      const w0 = 2 * Math.PI * f[k - 1]!;
      const w1 = 2 * Math.PI * f[k]!;
      const a = weight(w0) * Math.log(1 / g[k - 1]!);
      const b = weight(w1) * Math.log(1 / g[k]!);
      s += ((a + b) / 2) * (w1 - w0);
    }
    return s;
  }
  it('series R-L load 30 + j20 ohm: ∫ ln(1/|Γ|) dω ≤ π·R/L for both L forms', () => {
    const L = 20 / (2 * Math.PI * F0);
    for (const network of ['l-lowpass', 'l-highpass'] as const) {
      const d = designMatch({ ...base, network, r: 30, x: 20 });
      const v = integral(d.text, () => 1);
      expect(v).toBeGreaterThan(0);
      expect(v).toBeLessThanOrEqual((Math.PI * 30) / L);
    }
  });
  it('series R-C load 30 − j20 ohm: ∫ ω^−2·ln(1/|Γ|) dω ≤ π·R·C for both L forms and the stub', () => {
    const C = 1 / (2 * Math.PI * F0 * 20);
    for (const network of ['l-lowpass', 'l-highpass'] as const) {
      const d = designMatch({ ...base, network, r: 30, x: -20 });
      const v = integral(d.text, (w) => 1 / (w * w));
      expect(v).toBeGreaterThan(0);
      expect(v).toBeLessThanOrEqual(Math.PI * 30 * C);
    }
  });
});

describe('option readers', () => {
  it('reads impedances in the usual forms', () => {
    expect(readImpedance('30+20j', 'load')).toEqual({ r: 30, x: 20 });
    expect(readImpedance('30 - j20 ohm', 'load')).toEqual({ r: 30, x: -20 });
    expect(readImpedance('75 ohm', 'load')).toEqual({ r: 75, x: 0 });
    expect(readImpedance('1.2 kohm', 'load')).toEqual({ r: 1200, x: 0 });
    expect(() => readImpedance('thirty', 'load')).toThrow(/--load is an impedance such as/);
  });
  it('plain errors that name the option', () => {
    expect(() => readMatchRequest({ load: '75' })).toThrow(/needs --freq/);
    expect(() => readMatchRequest({ freq: '1 GHz' })).toThrow(/needs --load/);
    expect(() => designMatch(readMatchRequest({ freq: '1 GHz', load: '50' }))).toThrow(/nothing to match/);
    expect(() => designMatch(readMatchRequest({ freq: '1 GHz', load: '30+20j', network: 'pi' }))).toThrow(/--network pi takes a resistive --load/);
    expect(() => designMatch(readMatchRequest({ freq: '1 GHz', load: '100', network: 'chebyshev' }))).toThrow(/needs --bandwidth/);
    expect(() => readMatchRequest({ freq: '1 GHz', load: '100', network: 'gamma' })).toThrow(/--network is one of l-lowpass/);
    expect(() => readMatchRequest({ freq: '1 GHz', load: '100', order: '3' })).toThrow(/--order belongs to the filters/);
  });
  it('fuzz: any load text and network either designs a match that passes its own check, or gives a plain error', () => {
    const nets = ['l-lowpass', 'l-highpass', 'pi', 'tee', 'stub', 'quarter-wave', 'binomial', 'chebyshev', 'x'];
    fc.assert(
      fc.property(
        fc.oneof(fc.constantFrom('30+20j', '1e-9', '1e9', '-5', '0', 'j', '+j5', '50', '7-3j ohm', '1e300', 'NaN'), fc.string({ maxLength: 12 }), fc.tuple(fc.double({ min: 1e-2, max: 1e5, noNaN: true }), fc.double({ min: -1e5, max: 1e5, noNaN: true })).map(([r, x]) => `${r}${x >= 0 ? '+' : ''}${x}j`)),
        fc.constantFrom(...nets),
        fc.constantFrom('1 GHz', '915e6', '0.5 Hz', 'abc', '2.4 GHz'),
        fc.option(fc.constantFrom('1', '3', '9', 'x'), { nil: undefined }),
        (load, network, freq, sections) => {
          try {
            const d = designMatch(readMatchRequest({ load, network, freq, sections, bandwidth: network === 'binomial' || network === 'chebyshev' ? '100 MHz' : undefined }));
            expect(checkDesignText(d.text, 'fuzz.sbx').pass).toBe(true);
          } catch (e) {
            const err = e as Error;
            expect(['DesignRequestError', 'InputError']).toContain(err.name);
            expect(err.message).not.toMatch(/^[a-z]+[A-Z]\w*:/); // never an internal function's name
          }
        },
      ),
      { seed: 21, numRuns: 150 },
    );
  });
});

describe('a load read from a data file over a band', () => {
  const dir = mkdtempSync(join(tmpdir(), 'synth-match-'));
  mkdirSync(join(dir, 'out'));
  // a series R-L-C load (25 ohm, 5 nH, resonant at 2.3 GHz) as a Touchstone one-port, 2.2 to 2.7 GHz
  const L = 5e-9;
  const C = 1 / ((2 * Math.PI * 2.3e9) ** 2 * L);
  const zAt = (f: number) => ({ r: 25, x: 2 * Math.PI * f * L - 1 / (2 * Math.PI * f * C) });
  let text = '! series R-L-C\n# GHz S RI R 50\n';
  for (let k = 0; k <= 50; k++) {
    const f = 2.2e9 + k * 10e6;
    const { r, x } = zAt(f);
    // Γ = (Z − 50)/(Z + 50)
    const d = (r + 50) ** 2 + x * x;
    text += `${f / 1e9} ${((r - 50) * (r + 50) + x * x) / d} ${(x * (r + 50) - (r - 50) * x) / d}\n`;
  }
  const file = join(dir, 'load.s1p');
  writeFileSync(file, text);
  const out = join(dir, 'out', 'm.sbx');
  for (const network of ['l-lowpass', 'l-highpass', 'stub', 'double-stub'] as const) {
    it(`${network}: the load at the centre is read from the file, matched there (|S11| < 1e-9, with the file as the load element), band spec checked`, () => {
      const req = readMatchRequest({ loadFile: file, band: '2.4 GHz, 2.5 GHz', network });
      const f0 = Math.sqrt(2.4e9 * 2.5e9);
      // at a file point's neighbours the load is interpolated linearly in S; the R-L-C closed form agrees to 1e-3 ohm on this 10 MHz grid
      expect(Math.abs(req.r - zAt(f0).r)).toBeLessThan(1e-3);
      expect(Math.abs(req.x - zAt(f0).x)).toBeLessThan(0.05);
      const d = designMatch(req, out);
      expect(d.text).toMatch(/datafile rload file="\.\.\/load\.s1p" p1=load/);
      const { circuit } = loadNetlist(d.text, out, { sweep: `list freqs=${f0} Hz` });
      const net = solveSweep(circuit);
      expect(Math.hypot(net.values[0]!, net.values[1]!)).toBeLessThan(1e-9);
      const { pass, results } = checkDesignText(d.text, out);
      expect(results.map((r) => r.spec.name)).toEqual(['match_at_f0', 'band_match']);
      expect(pass).toBe(true);
    });
  }
  it('a return loss the network cannot give over the band fails the check (and says so through the spec)', () => {
    const d = designMatch(readMatchRequest({ loadFile: file, band: '2.2 GHz, 2.7 GHz', minReturnLoss: '30 dB' }), out);
    const { pass, results } = checkDesignText(d.text, out);
    expect(pass).toBe(false);
    expect(results.find((r) => r.spec.name === 'band_match')!.pass).toBe(false);
  });
  it('plain errors: band outside the data, a two-port file, both loads, a missing band', () => {
    expect(() => readMatchRequest({ loadFile: file, band: '2 GHz, 2.5 GHz' })).toThrow(/--band .* reaches outside the data/);
    expect(() => readMatchRequest({ loadFile: file })).toThrow(/needs --band with two frequencies/);
    expect(() => readMatchRequest({ loadFile: file, load: '50', band: '2.4 GHz, 2.5 GHz' })).toThrow(/give --load or --load-file, not both/);
    const two = join(dir, 'two.s2p');
    writeFileSync(two, '# GHz S RI R 50\n2.4 0 0 1 0 1 0 0 0\n2.5 0 0 1 0 1 0 0 0\n');
    expect(() => readMatchRequest({ loadFile: two, band: '2.4 GHz, 2.5 GHz' })).toThrow(/must hold a one-port/);
    expect(() => readMatchRequest({ freq: '1 GHz', load: '30', band: '1 GHz, 2 GHz' })).toThrow(/--band and --min-return-loss belong to a load read from a file/);
  });
});
