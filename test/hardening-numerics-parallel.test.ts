/**
 * Issue 14, accuracy, on several threads: the refinement of small reflections and the check for
 * non-finite results keep a parallel sweep bit-identical to one thread (each point depends only on
 * its own values). The workers run the compiled code: build first (`npx tsc -p tsconfig.json`).
 *
 * Reference: the single-thread sweep of the same circuit (bit for bit).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { loadNetlist } from '../src/load.js';
import { closeSweepPool, solveSweepParallel } from '../src/solve/parallel.js';
import { NonFiniteResultError, solveSweep } from '../src/solve/sweep.js';

afterAll(async () => {
  await closeSweepPool();
});

describe('refinement and the finite check on several threads', () => {
  it('a sweep whose points are refined is bit-identical on two threads, with the same warnings', async () => {
    // 1e-9 ohm in series (refined at every point) ahead of a lossy line and a ladder (sparse)
    const lines = ['resistor rs a=in b=x value=1e-9 ohm', 'line t a=x b=y z0=50 ohm length=0.3 m alpha_c=40 dB/m at 1 GHz'];
    for (let k = 0; k < 20; k++) {
      lines.push(`inductor l${k} a=y${k === 0 ? '' : k} b=y${k + 1} value=1 nH`, `capacitor c${k} a=y${k + 1} b=ground value=0.4 pF`);
    }
    lines.push('port 1 plus=in', 'port 2 plus=y20', 'sweep linear start=10 MHz stop=3 GHz points=600');
    const { circuit } = loadNetlist(lines.join('\n') + '\n', 'par.sbx');
    const w1: string[] = [];
    const w2: string[] = [];
    const one = solveSweep(circuit, { onWarning: (m) => w1.push(m) });
    const two = await solveSweepParallel(circuit, { jobs: 2, onWarning: (m) => w2.push(m) });
    expect(Buffer.from(two.values.buffer).equals(Buffer.from(one.values.buffer))).toBe(true);
    expect(w2).toEqual(w1);
    for (const x of one.values) expect(Number.isFinite(x)).toBe(true);
  });

  it('a non-finite point found by a worker is reported with its element and frequency', async () => {
    // 1e303 F: its admittance 2π·f·C overflows at every frequency from 1 MHz (0 Hz is fine)
    const freqs = Array.from({ length: 200 }, (_, k) => `${k} MHz`).join(', ');
    const { circuit } = loadNetlist(`resistor r a=in b=ground value=50 ohm\ncapacitor huge a=in b=ground value=1e303 F\nport 1 plus=in\nsweep list freqs=${freqs}\n`, 'nonfinite.sbx');
    await expect(solveSweepParallel(circuit, { jobs: 2 })).rejects.toBeInstanceOf(NonFiniteResultError);
    await expect(solveSweepParallel(circuit, { jobs: 2 })).rejects.toMatchObject({ frequency: 1e6, culprits: ['huge'] });
  });
});
