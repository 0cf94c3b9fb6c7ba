// The sparse and dense paths of the sweep agree on random circuits (to 1e-10), including
// elements with branch unknowns, one-sided stamps (controlled sources) and data-free ideal parts.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { loadNetlist } from '../src/load.js';
import { buildPlan } from '../src/plan/plan.js';
import { chooseSolver, solveSweep, SweepRunner } from '../src/solve/sweep.js';

/** One part of a random circuit: its kind, name, terminals, and u in [0, 1] setting its value. */
function partLine(kind: string, name: string, a: string, b: string, u: number): string {
  switch (kind) {
    case 'r':
      return `resistor ${name} a=${a} b=${b} value=${(10 * Math.pow(100, u)).toPrecision(6)} ohm`;
    case 'l':
      return `inductor ${name} a=${a} b=${b} value=${(1 * Math.pow(1000, u)).toPrecision(6)} nH q=50 at 1 GHz`;
    case 'c':
      return `capacitor ${name} a=${a} b=${b} value=${(0.1 * Math.pow(1000, u)).toPrecision(6)} pF esr=0.2 ohm`;
    case 'g':
      return `conductance ${name} a=${a} b=${b} value=${(1 * Math.pow(100, u)).toPrecision(6)} mS`;
    case 'gm':
      return `transconductance ${name} p=${a} n=${b} cp=${b} cn=ground gm=${(1 + 20 * u).toPrecision(4)} mS`;
    default:
      return `line ${name} a=${a} b=${b} z0=${(30 + 70 * u).toPrecision(4)} ohm theta=${(10 + 170 * u).toPrecision(4)} deg at 1 GHz`;
  }
}

/** A random connected circuit: a spanning tree to ground plus extra parts, of every lumped kind and a few active ones. */
const circuitText = fc
  .record({
    nodes: fc.integer({ min: 2, max: 40 }),
    extra: fc.array(fc.tuple(fc.nat(), fc.nat(), fc.constantFrom('r', 'l', 'c', 'g', 'gm', 'tl'), fc.double({ min: 0, max: 1, noNaN: true })), { maxLength: 60 }),
    tree: fc.array(fc.tuple(fc.nat(), fc.constantFrom('r', 'l', 'c')), { minLength: 40, maxLength: 40 }),
    ports: fc.integer({ min: 1, max: 4 }),
    f: fc.double({ min: 1e6, max: 3e9, noNaN: true }),
  })
  .map(({ nodes, extra, tree, ports, f }) => {
    const node = (i: number) => (i < 0 ? 'ground' : `n${i}`);
    const lines: string[] = [];
    let k = 0;
    const part = (kind: string, a: string, b: string, u: number) => partLine(kind, `${kind}${k++}`, a, b, u);
    for (let i = 0; i < nodes; i++) {
      const [to, kind] = tree[i]!;
      lines.push(part(kind, node(i), node(i === 0 ? -1 : to % i === 0 ? -1 : (to % i) - 1), (to % 97) / 97));
      lines.push(`resistor rg${i} a=${node(i)} b=ground value=${1000 + i} ohm`);
    }
    for (const [a, b, kind, u] of extra) {
      const na = a % nodes;
      const nb = b % (nodes + 1) - 1;
      if (na === nb) continue;
      lines.push(part(kind, node(na), node(nb), u));
    }
    for (let p = 0; p < Math.min(ports, nodes); p++) lines.push(`port ${p + 1} plus=${node(p)} ref=${50 + 10 * p} ohm`);
    lines.push(`sweep list freqs=${f.toPrecision(8)} Hz, ${(f * 1.37).toPrecision(8)} Hz`);
    return lines.join('\n') + '\n';
  });

/**
 * A random reciprocal circuit of R, L, C and conductances only: its nodal matrix is symmetric
 * (common practice: reciprocity of networks of such parts, Y = Yᵀ), so the sparse path solves
 * the port voltages by forward sweeps alone. Some ports are across two nodes.
 */
const reciprocalText = fc
  .record({
    nodes: fc.integer({ min: 5, max: 60 }),
    tree: fc.array(fc.tuple(fc.nat(), fc.constantFrom('r', 'l', 'c', 'g'), fc.double({ min: 0, max: 1, noNaN: true })), { minLength: 60, maxLength: 60 }),
    extra: fc.array(fc.tuple(fc.nat(), fc.nat(), fc.constantFrom('r', 'l', 'c', 'g'), fc.double({ min: 0, max: 1, noNaN: true })), { maxLength: 80 }),
    ports: fc.array(fc.tuple(fc.nat(), fc.nat(), fc.boolean()), { minLength: 1, maxLength: 4 }),
    f: fc.double({ min: 1e6, max: 3e9, noNaN: true }),
  })
  .map(({ nodes, tree, extra, ports, f }) => {
    const node = (i: number) => (i < 0 ? 'ground' : `n${i}`);
    const lines: string[] = [];
    let k = 0;
    const part = (kind: string, a: string, b: string, u: number) => partLine(kind, `${kind}${k++}`, a, b, u);
    for (let i = 0; i < nodes; i++) {
      const [to, kind, u] = tree[i]!;
      lines.push(part(kind, node(i), node(i === 0 || to % 3 === 0 ? -1 : to % i), u));
    }
    for (const [a, b, kind, u] of extra) {
      const na = a % nodes;
      const nb = (b % (nodes + 1)) - 1;
      if (na !== nb) lines.push(part(kind, node(na), node(nb), u));
    }
    const used = new Set<number>();
    ports.forEach(([a, b, across], p) => {
      let plus = a % nodes;
      while (used.has(plus)) plus = (plus + 1) % nodes;
      used.add(plus);
      const minus = (plus + 1 + (b % (nodes - 1))) % nodes;
      lines.push(`port ${p + 1} plus=${node(plus)}${across && !used.has(minus) ? ` minus=${node(minus)}` : ''} ref=${50 + 10 * p} ohm`);
    });
    lines.push(`sweep list freqs=${f.toPrecision(8)} Hz, ${(f * 1.37).toPrecision(8)} Hz`);
    return lines.join('\n') + '\n';
  });

describe('points factored two at a time', () => {
  /** Every point of the sweep: all in one run (in pairs where the engine can) or one run per point (never paired). */
  const sweepBoth = (text: string) => {
    const { circuit } = loadNetlist(text, 'pairs.sbx');
    const outcome = (each: boolean) => {
      const runner = new SweepRunner(circuit, { solver: 'sparse' });
      const n = runner.frequencies.length;
      try {
        if (each) for (let k = 0; k < n; k++) runner.run(k, k + 1);
        else runner.run(0, n);
      } catch (e) {
        return { runner, error: String(e) };
      }
      return { runner, error: '' };
    };
    return [outcome(false), outcome(true)] as const;
  };

  it('give the results of points taken one at a time, to the bit, on random circuits over a wide sweep (fast-check, fixed seed)', () => {
    // IEEE 754 determinism (the same operations in the same order give the same bits — common
    // practice): the pair elimination does for each matrix what the single one does. The wide sweep
    // makes some points need a pivoting factorisation of their own, which a pair hands back.
    let pivoted = 0;
    fc.assert(
      fc.property(fc.oneof(circuitText, reciprocalText), fc.integer({ min: 2, max: 11 }), (text, points) => {
        const wide = text.replace(/^sweep .*$/m, `sweep log start=100 kHz stop=30 GHz points=${points}`);
        const [together, apart] = sweepBoth(wide);
        expect(together.error).toBe(apart.error);
        if (together.error) return;
        const a = together.runner.values;
        const b = apart.runner.values;
        for (let i = 0; i < a.length; i++) expect(Object.is(a[i], b[i])).toBe(true);
        expect(together.runner.worst).toEqual(apart.runner.worst);
        if ((together.runner as unknown as { engine: { scratch?: { factorCount: number } } }).engine.scratch?.factorCount) pivoted++;
      }),
      { numRuns: 120, seed: 20261203 },
    );
    expect(pivoted).toBeGreaterThan(3);
  });

  it('a nearly singular circuit: the condition estimates of paired points are those of single points', () => {
    // a node held to ground by 10 TΩ and reached through 0.1 fF: its pivot falls far below the others
    const text = [
      'resistor r1 a=in b=mid value=50 ohm',
      'capacitor c1 a=mid b=far value=0.1 fF',
      'resistor r2 a=far b=ground value=10 Tohm',
      'inductor l1 a=mid b=ground value=10 nH q=30 at 1 GHz',
      'capacitor c2 a=in b=ground value=2 pF',
      'port 1 plus=in',
      'port 2 plus=mid',
      'sweep log start=100 Hz stop=1 GHz points=9',
    ].join('\n');
    const [together, apart] = sweepBoth(text);
    expect(together.error).toBe('');
    expect(apart.error).toBe('');
    expect(Array.from(together.runner.values)).toEqual(Array.from(apart.runner.values));
    expect(together.runner.worst).toEqual(apart.runner.worst);
    expect(Number.isNaN(together.runner.worst.frequency)).toBe(false);
  });
});

describe('sparse and dense paths', () => {
  it('agree to 1e-10 on random circuits (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(circuitText, (text) => {
        const { circuit } = loadNetlist(text, 'random.sbx');
        const dense = solveSweep(circuit, { solver: 'dense' });
        const sparse = solveSweep(circuit, { solver: 'sparse' });
        let scale = 1;
        for (const v of dense.values) scale = Math.max(scale, Math.abs(v));
        for (let i = 0; i < dense.values.length; i++) {
          expect(Math.abs(dense.values[i]! - sparse.values[i]!)).toBeLessThanOrEqual(1e-10 * scale);
        }
      }),
      { numRuns: 150, seed: 20261201 },
    );
  });

  it('the symmetric sparse method (forward sweeps only) agrees with the dense LU to 1e-10 on random reciprocal circuits (fast-check, fixed seed)', () => {
    let symmetric = 0;
    fc.assert(
      fc.property(reciprocalText, (text) => {
        const { circuit } = loadNetlist(text, 'reciprocal.sbx');
        expect(buildPlan(circuit).symmetric).toBe(true);
        const runner = new SweepRunner(circuit, { solver: 'sparse' });
        runner.run(0, runner.frequencies.length);
        if (runner.method === 'sparse-symmetric') symmetric++;
        const sparse = runner.finish();
        const dense = solveSweep(circuit, { solver: 'dense' });
        let scale = 1;
        for (const v of dense.values) scale = Math.max(scale, Math.abs(v));
        for (let i = 0; i < dense.values.length; i++) {
          expect(Math.abs(dense.values[i]! - sparse.values[i]!)).toBeLessThanOrEqual(1e-10 * scale);
        }
      }),
      { numRuns: 150, seed: 20261202 },
    );
    // many take the symmetric method; the rest have the general sweeps estimated cheaper (ports
    // eliminated late make both short) — the symmetric solve itself is checked on every system in
    // sparse.test.ts
    expect(symmetric).toBeGreaterThan(30);
  });

  it('a circuit is symmetric only where every stamp is: controlled sources and per-element stampers are not', () => {
    const base = 'resistor r1 a=a b=b value=50 ohm\ncapacitor c1 a=b b=ground value=1 pF\ninductor l1 a=a b=ground value=10 nH\nport 1 plus=a\nport 2 plus=b\nsweep list freqs=1 GHz\n';
    expect(buildPlan(loadNetlist(base, 's.sbx').circuit).symmetric).toBe(true);
    const gm = base + 'transconductance g1 p=b n=ground cp=a cn=ground gm=20 mS\n';
    expect(buildPlan(loadNetlist(gm, 'g.sbx').circuit).symmetric).toBe(false);
    const line = base + 'line t1 a=a b=b z0=50 ohm theta=90 deg at 1 GHz\n';
    expect(buildPlan(loadNetlist(line, 't.sbx').circuit).symmetric).toBe(false);
    const rows = ['port 1 plus=n0', 'port 2 plus=n200', 'sweep linear start=1 MHz stop=1 GHz points=5'];
    for (let i = 0; i < 200; i++) rows.push(`inductor l${i} a=n${i} b=n${i + 1} value=1 nH q=40 at 500 MHz`, `capacitor c${i} a=n${i + 1} b=ground value=1 pF esr=0.1 ohm`);
    expect(new SweepRunner(loadNetlist(rows.join('\n'), 'ladder.sbx').circuit).method).toBe('sparse-symmetric');
  });

  it('auto picks dense for small systems and sparse for large sparse ones', () => {
    const small = loadNetlist('resistor r a=a b=ground value=50 ohm\nport 1 plus=a\nsweep list freqs=1 GHz\n', 's.sbx').circuit;
    expect(chooseSolver(buildPlan(small))).toBe('dense');
    const rows = ['port 1 plus=n0', 'sweep list freqs=1 GHz'];
    for (let i = 0; i < 200; i++) rows.push(`inductor l${i} a=n${i} b=n${i + 1} value=1 nH`, `capacitor c${i} a=n${i + 1} b=ground value=1 pF`);
    expect(chooseSolver(buildPlan(loadNetlist(rows.join('\n'), 'big.sbx').circuit))).toBe('sparse');
  });
});
