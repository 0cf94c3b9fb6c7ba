// Parallel sweeps: the same numbers as the single-thread run, bit for bit.
import { afterAll, describe, expect, it } from 'vitest';
import { loadNetlist } from '../src/load.js';
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
});
