// Systems at the edge of solvability: what is defined must solve, what is not must name its nodes.
import { describe, expect, it } from 'vitest';
import { loadNetlist } from '../src/load.js';
import { SingularSystemError, solveSweep } from '../src/solve/sweep.js';

function solve(text: string) {
  return solveSweep(loadNetlist(text, 'edge.sbx').circuit);
}

describe('0 Hz where the network is defined', () => {
  it('two ideal inductors in parallel to ground are a short: S11 = −1 (common practice)', () => {
    const net = solve('inductor l1 a=in b=ground value=1 uH\ninductor l2 a=in b=ground value=3 uH\nport 1 plus=in\nsweep list freqs=0 Hz\n');
    expect(net.values[0]).toBeCloseTo(-1, 12);
    expect(net.values[1]).toBe(0);
  });

  it('a series inductor feeding two parallel inductors to ground: S21 = 0 and S11 = −1 at 0 Hz', () => {
    const net = solve(
      'inductor l1 a=in b=x value=1 uH\ninductor l2 a=x b=ground value=2 uH\ninductor l3 a=x b=ground value=5 uH\nresistor r a=x b=out value=10 ohm\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=0 Hz\n',
    );
    expect(net.values[0]).toBeCloseTo(-1, 12); // S11
    expect(Math.hypot(net.values[4]!, net.values[5]!)).toBeLessThan(1e-12); // S21
    // port 2 sees 10 ohm to a short: S22 = (10 − 50)/(10 + 50) (reflection coefficient, common practice)
    expect(net.values[6]).toBeCloseTo(-40 / 60, 12);
  });
});

describe('singular systems name what is undetermined', () => {
  it('an isolated lossless tank at resonance names its node', () => {
    const text = [
      'let f0 = 1 MHz',
      'let l = 1 uH',
      'resistor r1 a=in b=ground value=50 ohm',
      'inductor l1 a=t b=ground value=l',
      'capacitor c1 a=t b=ground value=1/((2*pi*f0)^2*l)',
      'port 1 plus=in',
      'sweep list freqs=f0',
      '',
    ].join('\n');
    let caught: unknown;
    try {
      solve(text);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(SingularSystemError);
    const e = caught as SingularSystemError;
    expect(e.frequency).toBe(1e6);
    expect(e.culprits).toContain('t');
    expect(e.message).toMatch(/node `t`/);
  });
});

describe('nearly singular systems warn with their condition estimate', () => {
  // Node `mid` hangs on 1e13 ohm resistors: its conductance (2e-13 S) against the 50 ohm terminations
  // (0.04 S on `in`) gives a reciprocal condition near 5e-12, below the warning level (1e-11) and
  // above the singular one (1e-15) — the ratio of the conductances, common practice.
  const text = 'resistor r1 a=in b=ground value=50 ohm\nresistor rx a=in b=mid value=1e13 ohm\nresistor rl a=mid b=ground value=1e13 ohm\nport 1 plus=in\nsweep list freqs=1 MHz, 2 MHz\n';

  it('solveSweep calls onWarning once, with the frequency and an estimate in the warning band', () => {
    const seen: { message: string; f: number; rcond: number }[] = [];
    const net = solveSweep(loadNetlist(text, 'near.sbx').circuit, { solver: 'sparse', onWarning: (message, f, rcond) => seen.push({ message, f, rcond }) });
    expect(seen.length).toBe(1);
    expect(seen[0]!.rcond).toBeLessThan(1e-11);
    expect(seen[0]!.rcond).toBeGreaterThan(1e-15);
    expect(seen[0]!.message).toMatch(/nearly singular/);
    // S11 of 50 ohm || (2e13 ohm) against 50 ohm: (Z − 50)/(Z + 50) ≈ −1.25e-12 (closed form)
    expect(net.values[0]).toBeCloseTo(-1.25e-12, 15);
  });
});
