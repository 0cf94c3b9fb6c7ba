// Complex reference impedances with power waves (Kurokawa, "Power waves and the scattering
// matrix", IEEE Trans. MTT, 1965): a = (V + Zr·I)/(2√R), b = (V − Zr*·I)/(2√R).
import { all, create } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { renderNetwork, OutputError } from '../src/io/output.js';
import { loadNetlist } from '../src/load.js';
import { renormalizeNetwork } from '../src/network/convert.js';
import { fromComplexReferences, renormalizeComplex } from '../src/network/power-waves.js';
import { solveSweep } from '../src/solve/sweep.js';

const math = create(all, {});
const lines = (...l: string[]) => l.join('\n') + '\n';
const f = 1e9;
const w = 2 * Math.PI * f;

describe('ports with complex references', () => {
  it('a load ZL seen from a port referenced to ZL* reflects nothing (conjugate match)', () => {
    // ZL = 30 + j40 ohm at 1 GHz: 30 ohm in series with L = 40/ω
    const text = lines(`let l = 40 ohm / (2*pi*1 GHz)`, 'resistor r a=in b=x value=30 ohm', 'inductor l1 a=x b=ground value=l', 'port 1 plus=in ref=30 ohm ref_x=-40 ohm', 'sweep list freqs=1 GHz');
    const net = solveSweep(loadNetlist(text, 'cm.sbx').circuit);
    expect(Math.hypot(net.values[0]!, net.values[1]!)).toBeLessThan(1e-14);
    expect(Array.from(net.referenceReactances!)).toEqual([-40]);
  });

  it('a one-port load: S11 = (ZL − Zr*)/(ZL + Zr) (Kurokawa 1965), checked with mathjs complex arithmetic', () => {
    for (const [rl, xl, rr, xr] of [
      [10, 25, 50, 20],
      [200, -80, 35, -60],
      [75, 15, 50, 10],
    ] as const) {
      const lc = xl > 0 ? `inductor x a=m b=ground value=${xl / w}` : `capacitor x a=m b=ground value=${-1 / (w * xl)}`;
      const text = lines(`resistor r a=in b=m value=${rl} ohm`, lc, `port 1 plus=in ref=${rr} ohm ref_x=${xr} ohm`, 'sweep list freqs=1 GHz');
      const net = solveSweep(loadNetlist(text, 'one.sbx').circuit);
      const zl = math.complex(rl, xl);
      const zr = math.complex(rr, xr);
      const want = math.divide(math.subtract(zl, math.conj(zr)), math.add(zl, zr)) as unknown as { re: number; im: number };
      expect(net.values[0]).toBeCloseTo(want.re, 12);
      expect(net.values[1]).toBeCloseTo(want.im, 12);
    }
  });

  it('a two-port: S = F(Z − Zr*)(Z + Zr)⁻¹F⁻¹ from the T network Z matrix, with mathjs', () => {
    // T network: series 20 ohm, shunt 100 ohm, series 40 ohm → Z = [[120, 100], [100, 140]] (closed form)
    const text = lines('resistor a1 a=p1 b=m value=20 ohm', 'resistor sh a=m b=ground value=100 ohm', 'resistor a2 a=m b=p2 value=40 ohm', 'port 1 plus=p1 ref=50 ohm ref_x=30 ohm', 'port 2 plus=p2 ref=25 ohm ref_x=-10 ohm', 'sweep list freqs=1 GHz');
    const net = solveSweep(loadNetlist(text, 'two.sbx').circuit);
    const Z = math.matrix([[120, 100], [100, 140]]);
    const zr = [math.complex(50, 30), math.complex(25, -10)];
    const Zr = math.diag(zr);
    const Zrc = math.diag(zr.map((z) => math.conj(z)));
    const F = math.diag([1 / (2 * Math.sqrt(50)), 1 / (2 * Math.sqrt(25))]);
    const S = math.multiply(math.multiply(math.multiply(F, math.subtract(Z, Zrc)), math.inv(math.add(Z, Zr))), math.inv(F)) as unknown as { get(i: number[]): { re: number; im: number } | number };
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < 2; j++) {
        const e = math.complex(S.get([i, j]) as never) as unknown as { re: number; im: number };
        expect(net.values[2 * (i * 2 + j)]).toBeCloseTo(e.re, 12);
        expect(net.values[2 * (i * 2 + j) + 1]).toBeCloseTo(e.im, 12);
      }
    }
    // the same network solved with real 50 ohm ports and renormalised to the complex references
    const real = solveSweep(loadNetlist(text.replace(/ ref=\S+ ohm ref_x=\S+ ohm/g, ''), 'two-real.sbx').circuit);
    const moved = renormalizeComplex(real, Float64Array.of(50, 25), Float64Array.of(30, -10));
    moved.values.forEach((v, k) => expect(v).toBeCloseTo(net.values[k]!, 12));
    // and back to real references equals the real solve; to other real ones equals the real-reference renormalisation
    fromComplexReferences(net).values.forEach((v, k) => expect(v).toBeCloseTo(real.values[k]!, 12));
    const r75 = fromComplexReferences(net, Float64Array.of(75, 75));
    renormalizeNetwork(real, Float64Array.of(75, 75)).values.forEach((v, k) => expect(r75.values[k]).toBeCloseTo(v, 12));
  });

  it('files cannot carry complex references: writing is refused with a way out', () => {
    const text = lines('resistor r a=in b=ground value=50 ohm', 'port 1 plus=in ref=50 ohm ref_x=5 ohm', 'sweep list freqs=1 GHz');
    const net = solveSweep(loadNetlist(text, 'w.sbx').circuit);
    expect(() => renderNetwork(net, { format: 'touchstone' })).toThrow(OutputError);
    expect(() => renderNetwork(net, { format: 'touchstone' })).toThrow(/complex reference impedances/);
  });

  it('a reactance given in the wrong unit is a located error', () => {
    expect(() => loadNetlist(lines('resistor r a=in b=ground value=50 ohm', 'port 1 plus=in ref_x=5 nH', 'sweep list freqs=1 GHz'), 'x.sbx')).toThrow(InputError);
  });
});
