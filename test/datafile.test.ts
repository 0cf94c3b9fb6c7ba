// The network-data element: a file's S-parameters as an N-port inside a netlist.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { formatTouchstone } from '../src/io/touchstone.js';
import { loadNetlist, loadNetlistFile } from '../src/load.js';
import { cascade } from '../src/network/algebra.js';
import { renormalizeNetwork } from '../src/network/convert.js';
import type { NetworkData } from '../src/network/types.js';
import { solveSweep } from '../src/solve/sweep.js';

const dir = mkdtempSync(join(tmpdir(), 'sbx-data-'));
const lines = (...l: string[]) => l.join('\n') + '\n';

function maxDiff(a: Float64Array, b: Float64Array): number {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]! - b[i]!));
  return m;
}

/** A lossy, asymmetric two-port solved by the tool itself, written as a data file. */
function writeReference(name: string, refs: string, version: '1.1' | '2.0'): NetworkData {
  const text = lines(
    'resistor r1 a=in b=mid value=12 ohm',
    'inductor l1 a=mid b=out value=8 nH q=30 at 1 GHz',
    'capacitor c1 a=mid b=ground value=1.5 pF esr=0.4 ohm',
    'resistor r2 a=out b=ground value=300 ohm',
    `port 1 plus=in ref=${refs.split(',')[0]}`,
    `port 2 plus=out ref=${refs.split(',')[1]}`,
    'sweep linear start=100 MHz stop=3 GHz points=30',
  );
  const net = solveSweep(loadNetlist(text, 'ref.sbx').circuit);
  writeFileSync(join(dir, name), formatTouchstone(net, { version, format: 'RI', digits: 17 }));
  return net;
}

const ref = writeReference('ref.s2p', '50 ohm,50 ohm', '1.1');
const ref2 = writeReference('ref-5075.s2p', '50 ohm,75 ohm', '2.0');

function solveText(text: string): NetworkData {
  const file = join(dir, `t${Math.random().toString(36).slice(2)}.sbx`);
  writeFileSync(file, text);
  return solveSweep(loadNetlistFile(file).circuit);
}

describe('a data element reproduces its file', () => {
  it('at the file frequencies, with the same references (to 1e-12)', () => {
    const net = solveText(lines('datafile d1 file="ref.s2p" p1=a p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep linear start=100 MHz stop=3 GHz points=30'));
    expect(maxDiff(net.values, ref.values)).toBeLessThan(1e-12);
  });

  it('renormalised to other circuit references: equals renormalising the data (power waves, Kurokawa 1965)', () => {
    const net = solveText(lines('datafile d1 file="ref.s2p" p1=a p2=b', 'port 1 plus=a ref=75 ohm', 'port 2 plus=b ref=25 ohm', 'sweep linear start=100 MHz stop=3 GHz points=30'));
    const expected = renormalizeNetwork(ref, Float64Array.of(75, 25));
    expect(maxDiff(net.values, expected.values)).toBeLessThan(1e-12);
  });

  it("honours per-port references read from a 2.0 file", () => {
    const net = solveText(lines('datafile d1 file="ref-5075.s2p" p1=a p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep linear start=100 MHz stop=3 GHz points=30'));
    const expected = renormalizeNetwork(ref2, Float64Array.of(50, 50));
    expect(maxDiff(net.values, expected.values)).toBeLessThan(1e-12);
  });

  it('two data blocks in a chain equal the two-port cascade of their data', () => {
    const net = solveText(lines('datafile d1 file="ref.s2p" p1=a p2=m', 'datafile d2 file="ref.s2p" p1=m p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep linear start=100 MHz stop=3 GHz points=30'));
    // cascade through the chain matrix (src/network/algebra.ts), checked there against closed forms
    expect(maxDiff(net.values, cascade(ref, ref).values)).toBeLessThan(1e-11);
  });
});

describe('interpolation', () => {
  // a matched delay: S21 = S12 = e^(−jωτ), S11 = S22 = 0 (ideal lossless line, common practice)
  const tau = 1e-9;
  const freqs = Float64Array.from({ length: 11 }, (_, k) => 1e8 + k * 1e8); // 100 MHz steps: 36° per step
  const values = new Float64Array(freqs.length * 8);
  freqs.forEach((f, k) => {
    const ph = -2 * Math.PI * f * tau;
    values[8 * k + 2] = Math.cos(ph);
    values[8 * k + 3] = Math.sin(ph);
    values[8 * k + 4] = Math.cos(ph);
    values[8 * k + 5] = Math.sin(ph);
  });
  writeFileSync(join(dir, 'delay.s2p'), formatTouchstone({ parameter: 'S', ports: 2, frequencies: freqs, references: Float64Array.of(50, 50), values }, { digits: 17 }));

  it('polar interpolation follows a linear phase exactly between points', () => {
    const net = solveText(lines('datafile d1 file="delay.s2p" p1=a p2=b interp=polar', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=150 MHz, 555 MHz, 1.02 GHz'));
    net.frequencies.forEach((f, k) => {
      const ph = -2 * Math.PI * f * tau;
      expect(net.values[8 * k + 4]).toBeCloseTo(Math.cos(ph), 12);
      expect(net.values[8 * k + 5]).toBeCloseTo(Math.sin(ph), 12);
    });
  });

  it('real/imaginary interpolation is the straight line between neighbours (and shrinks |S21| between points)', () => {
    const net = solveText(lines('datafile d1 file="delay.s2p" p1=a p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=150 MHz'));
    const mid = (x: number) => (values[8 * 0 + x]! + values[8 * 1 + x]!) / 2;
    expect(net.values[4]).toBeCloseTo(mid(4), 12);
    expect(net.values[5]).toBeCloseTo(mid(5), 12);
    // the chord of a 36° arc: |S21| = cos(18°) (geometry)
    expect(Math.hypot(net.values[4]!, net.values[5]!)).toBeCloseTo(Math.cos(Math.PI / 10), 12);
  });

  it('a sweep outside the data is an error unless extrapolate=hold', () => {
    const file = join(dir, 'outside.sbx');
    writeFileSync(file, lines('datafile d1 file="delay.s2p" p1=a p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=50 MHz, 1 GHz'));
    try {
      loadNetlistFile(file);
      expect.unreachable();
    } catch (e) {
      const d = (e as InputError).diagnostics.find((x) => x.severity === 'error')!;
      expect(d.code).toBe('sweep-outside-data');
      expect(d.message).toBe('the sweep (50 MHz to 1 GHz) reaches outside the data of `d1` (100 MHz to 1.1 GHz)');
      expect(d.span).toMatchObject({ line: 1, column: 1 });
    }
    const held = solveText(lines('datafile d1 file="delay.s2p" p1=a p2=b extrapolate=hold', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=50 MHz'));
    expect(held.values[4]).toBeCloseTo(values[4]!, 14);
  });
});

describe('data element errors are located', () => {
  it('a malformed file is reported at its own line, and at the statement', () => {
    writeFileSync(join(dir, 'bad.s2p'), '# GHz S RI R 50\n1 0.1 0 0.9 0 0.9 0 0.1\n2 0.1 0 0.9 zero 0.9 0 0.1\n');
    const file = join(dir, 'usebad.sbx');
    writeFileSync(file, lines('datafile d1 file="bad.s2p" p1=a p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=1 GHz'));
    try {
      loadNetlistFile(file);
      expect.unreachable();
    } catch (e) {
      const ds = (e as InputError).diagnostics.filter((x) => x.code === 'bad-data-file');
      expect(ds[0]!.span).toMatchObject({ file: join(dir, 'bad.s2p'), line: 3 });
      expect(ds[1]!.span).toMatchObject({ file, line: 1, column: 18 });
      expect((e as InputError).sources?.get(join(dir, 'bad.s2p'))).toContain('zero');
    }
  });

  it('a missing file, an unknown terminal and a missing terminal', () => {
    const file = join(dir, 'terms.sbx');
    writeFileSync(file, lines('datafile d1 file="none.s2p" p1=a p2=b', 'datafile d2 file="ref.s2p" p1=a p3=b', 'datafile d3 file="ref.s2p" p1=a', 'resistor r a=b b=ground value=50 ohm', 'port 1 plus=a', 'sweep list freqs=1 GHz'));
    try {
      loadNetlistFile(file);
      expect.unreachable();
    } catch (e) {
      const ds = (e as InputError).diagnostics.filter((x) => x.severity === 'error');
      expect(ds.map((d) => [d.code, d.span?.line, d.message])).toEqual([
        ['bad-data-file', 1, 'cannot read "none.s2p": no such file'],
        ['unknown-argument', 2, '`datafile` has no argument `p3`'],
        ['missing-terminal', 3, '`datafile` `d3` needs terminal `p2` (port 2 of the data)'],
      ]);
      expect(ds[1]!.help).toBe('did you mean `p2`?');
    }
  });

  it('interp takes one of its words', () => {
    const file = join(dir, 'interp.sbx');
    writeFileSync(file, lines('datafile d1 file="ref.s2p" p1=a p2=b interp=polr', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=1 GHz'));
    expect(() => loadNetlistFile(file)).toThrow(InputError);
    try {
      loadNetlistFile(file);
    } catch (e) {
      expect((e as InputError).diagnostics[0]).toMatchObject({ code: 'bad-value', message: '`interp` is one of: ri, polar', help: 'did you mean `polar`?' });
    }
  });
});
