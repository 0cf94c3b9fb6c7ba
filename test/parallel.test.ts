// Parallel sweeps: the same numbers as the single-thread run, bit for bit.
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadNetlist, loadNetlistFile } from '../src/load.js';
import { packCircuit, unpackCircuit } from '../src/solve/transfer.js';
import { closeSweepPool, solveSweepParallel } from '../src/solve/parallel.js';
import { SingularSystemError, solveSweep } from '../src/solve/sweep.js';

function ladder(sections: number): string {
  const l: string[] = ['let l = 12 nH', 'let c = 4.7 pF'];
  for (let k = 0; k < sections; k++) {
    l.push(`inductor l${k} a=n${k} b=n${k + 1} value=l q=40 at 500 MHz`);
    l.push(`capacitor c${k} a=n${k + 1} b=ground value=c esr=0.1 ohm`);
  }
  l.push('port 1 plus=n0', `port 2 plus=n${sections}`, 'sweep linear start=1 MHz stop=2 GHz points=401');
  return l.join('\n') + '\n';
}

afterAll(closeSweepPool);

describe('circuits packed for a worker', () => {
  it('solve bit-identically to the original on every demo netlist (data blocks, lines and blocks included)', () => {
    const dir = join(import.meta.dirname, '..', 'circuits');
    const files = readdirSync(dir).filter((f) => f.endsWith('.sbx'));
    expect(files.length).toBeGreaterThan(10);
    for (const f of files) {
      const { circuit } = loadNetlistFile(join(dir, f));
      const packed = structuredClone(packCircuit(circuit));
      const again = unpackCircuit(packed);
      expect(again.elements.map((e) => [e.type, e.name, e.nodes, e.props, e.at])).toEqual(circuit.elements.map((e) => [e.type, e.name, e.nodes, e.props, e.at]));
      const one = solveSweep(circuit);
      const other = solveSweep(again, { frequencies: circuit.frequencies });
      expect(Buffer.from(other.values.buffer).equals(Buffer.from(one.values.buffer)), f).toBe(true);
    }
  });
});

describe('solveSweepParallel', () => {
  it('gives bit-identical results to the single-thread sweep', async () => {
    const { circuit } = loadNetlist(ladder(40), 'ladder.sbx');
    const one = solveSweep(circuit);
    const two = await solveSweepParallel(circuit, { jobs: 2 });
    expect(two.frequencies).toEqual(one.frequencies);
    expect(Buffer.from(two.values.buffer).equals(Buffer.from(one.values.buffer))).toBe(true);
  });

  it('a singular point found by a worker is reported with its nodes and frequency', async () => {
    const text = 'port 1 plus=in\ncapacitor c1 a=in b=mid value=1 pF\ncapacitor c2 a=mid b=ground value=1 pF\nsweep list freqs=1 MHz, 2 MHz, 3 MHz, 0 Hz\n';
    const { circuit } = loadNetlist(text, 'sing.sbx');
    await expect(solveSweepParallel(circuit, { jobs: 2 })).rejects.toBeInstanceOf(SingularSystemError);
    await expect(solveSweepParallel(circuit, { jobs: 2 })).rejects.toMatchObject({ frequency: 0, culprits: ['mid'] });
  });

  it('is bit-identical however the chunks fall: three threads, a long sweep, progress up to the total', async () => {
    const { circuit } = loadNetlist(ladder(25).replace('points=401', 'points=3001'), 'ladder.sbx');
    const one = solveSweep(circuit);
    const seen: number[] = [];
    const three = await solveSweepParallel(circuit, { jobs: 3, onProgress: (done, total) => seen.push(done / total) });
    expect(Buffer.from(three.values.buffer).equals(Buffer.from(one.values.buffer))).toBe(true);
    expect(seen[seen.length - 1]).toBe(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]!).toBeGreaterThanOrEqual(seen[i - 1]!);
  });

  it('is bit-identical with the caller left free (two workers, this thread waiting), progress included', async () => {
    const { circuit } = loadNetlist(ladder(30).replace('points=401', 'points=2001'), 'ladder.sbx');
    const one = solveSweep(circuit);
    const seen: number[] = [];
    const two = await solveSweepParallel(circuit, { jobs: 2, keepCallerFree: true, onProgress: (done, total) => seen.push(done / total) });
    expect(Buffer.from(two.values.buffer).equals(Buffer.from(one.values.buffer))).toBe(true);
    expect(seen[seen.length - 1]).toBe(1);
  });

  it('reports the lowest-indexed singular point, as the single-thread sweep does', async () => {
    // a capacitor-only node is floating at 0 Hz: two such points in a long list
    const freqs = Array.from({ length: 400 }, (_, k) => (k === 150 || k === 390 ? '0 Hz' : `${k + 1} MHz`)).join(', ');
    const { circuit } = loadNetlist(`port 1 plus=in\ncapacitor c1 a=in b=mid value=1 pF\ncapacitor c2 a=mid b=ground value=1 pF\nsweep list freqs=${freqs}\n`, 'sing.sbx');
    let single: unknown;
    try {
      solveSweep(circuit);
    } catch (e) {
      single = e;
    }
    await expect(solveSweepParallel(circuit, { jobs: 2 })).rejects.toMatchObject({ frequency: (single as SingularSystemError).frequency, culprits: ['mid'] });
  });
});
