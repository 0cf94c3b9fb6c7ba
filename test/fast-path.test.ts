// The speed work of the pipeline must not change what it computes:
// - the AST fast path (src/ast/fast.ts) gives the same AST as the grammar and its visitor;
// - plain lines left pending until elaboration give the same circuit and diagnostics as lines
//   read at once;
// - an inductor stamped as an admittance gives the same S as one stamped with a branch current;
// - the batched admittance kernels give the same S as a closed form;
// - partial sparse solves (ports ordered last) give the same port voltages as full solves.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNetlist, parseNetlistItems } from '../src/ast/visitor.js';
import { elaborate } from '../src/elaborate/elaborate.js';
import { readNetworkFile } from '../src/io/read.js';
import { DiagnosticBag } from '../src/diagnostics/diagnostic.js';
import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';
import { buildPlan, stampAt } from '../src/plan/plan.js';
import { analyse, createFactor, factor, solve, solveRange } from '../src/solve/sparse/index.js';

function bothWays(text: string, file = 'x.sbx') {
  const fastBag = new DiagnosticBag();
  const slowBag = new DiagnosticBag();
  const fast = parseNetlist(text, file, fastBag);
  const slow = parseNetlist(text, file, slowBag, { grammarOnly: true });
  return { fast, slow, fastBag, slowBag };
}

function netlists(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...netlists(p));
    else if (name.endsWith('.sbx')) out.push(p);
  }
  return out;
}

describe('AST fast path', () => {
  it('gives the same AST and diagnostics as the grammar on every demo netlist', () => {
    const files = netlists(join(import.meta.dirname, '..', 'circuits'));
    expect(files.length).toBeGreaterThan(10);
    for (const f of files) {
      const { fast, slow, fastBag, slowBag } = bothWays(readFileSync(f, 'utf8'), f);
      expect(fast).toEqual(slow);
      expect(fastBag.items).toEqual(slowBag.items);
    }
  });

  it('gives the same AST, diagnostics included, on random lines (fast-check, fixed seed)', () => {
    // pieces of lines, plain and not: the fast path must take the plain ones and leave the rest
    const word = fc.constantFrom('resistor', 'r1', 'a', 'b', 'value', 'q', 'at', 'attn', 'nH', 'pF', 'ohm', 'µH', 'Ω', 'ground', 'x_2', 'f');
    const num = fc.constantFrom('1', '4.7', '.5', '12.', '1e-3', '2E+6', '0', '1e', '3.3.3');
    const punct = fc.constantFrom('=', ',', ' ', '  ', '\t', '"file.s2p"', '"open', '(', ')', '*', '-', '+', '/', '^', '#note', '\\', '"a\\"b"', '!');
    const piece = fc.oneof({ weight: 4, arbitrary: word }, { weight: 3, arbitrary: num }, { weight: 3, arbitrary: punct });
    const line = fc.array(piece, { maxLength: 14 }).map((ps) => ps.join(' ').replace(/ = /g, '='));
    const plain = fc
      .tuple(word, fc.option(fc.oneof(word, num), { nil: undefined }), fc.array(fc.tuple(word, fc.array(fc.oneof(num.map((n) => `${n} nH`), num, word), { minLength: 1, maxLength: 3 }), fc.option(num, { nil: undefined })), { maxLength: 5 }))
      .map(([kw, label, args]) => [kw, label ?? '', ...args.map(([k, vs, at]) => `${k}=${vs.join(',')}${at ? ` at ${at} MHz` : ''}`)].join(' '));
    const file = fc.array(fc.oneof(line, plain), { minLength: 1, maxLength: 8 }).chain((ls) => fc.constantFrom('\n', '\r\n', '\r').map((br) => ls.join(br)));
    fc.assert(
      fc.property(file, (text) => {
        const { fast, slow, fastBag, slowBag } = bothWays(text);
        expect(fast).toEqual(slow);
        expect(fastBag.items).toEqual(slowBag.items);
      }),
      { numRuns: 2000, seed: 20261201 },
    );
  });

  it('keeps positions of the lines the grammar reads, continuations included', () => {
    const text = 'let z = 50 ohm\nresistor r1 a=in b=out value=z*2\nresistor r2 a=out \\\n  b=ground value=1 kohm\ncapacitor c1 a=in b=ground value=(1 pF\n';
    const { fast, slow, fastBag, slowBag } = bothWays(text);
    expect(fast).toEqual(slow);
    expect(fastBag.items).toEqual(slowBag.items);
    expect(slowBag.items.length).toBe(1); // the open parenthesis
  });
});

describe('pending plain lines', () => {
  // elaborated from pending lines (as loadNetlist does) and from a fully read AST
  function bothElaborations(text: string, file: string) {
    const lazyBag = new DiagnosticBag();
    const eagerBag = new DiagnosticBag();
    const items = parseNetlistItems(text, file, lazyBag);
    expect(items.items.some((it) => 'pending' in it) || items.items.length === 0).toBe(true);
    const lazy = elaborate(items, lazyBag, { readNetwork: readNetworkFile, consume: true });
    const eager = elaborate(parseNetlist(text, file, eagerBag), eagerBag, { readNetwork: readNetworkFile });
    return { lazy, eager, lazyBag, eagerBag };
  }

  it('give the same circuit and diagnostics as read statements on every demo netlist', () => {
    for (const f of netlists(join(import.meta.dirname, '..', 'circuits'))) {
      const text = readFileSync(f, 'utf8');
      if (/^\s*include\b/m.test(text)) continue; // includes are resolved by loadNetlist (tested there)
      const { lazy, eager, lazyBag, eagerBag } = bothElaborations(text, f);
      // the compiled functions of design variables are closures: compared by their values at the
      // variables' own values and at the ends of their ranges, the rest as data
      const plain = (c: typeof lazy) => ({ ...c, bindings: c.bindings.map(({ value, ...b }) => ({ ...b, deps: value.deps })) });
      expect(plain(lazy)).toEqual(plain(eager));
      for (const x of [lazy.variables.map((v) => v.value), lazy.variables.map((v) => v.lower), lazy.variables.map((v) => v.upper)]) {
        const at = Float64Array.from(x);
        expect(lazy.bindings.map((b) => b.value.fn(at))).toEqual(eager.bindings.map((b) => b.value.fn(at)));
      }
      expect(lazyBag.items).toEqual(eagerBag.items);
    }
  });

  it('keep blocks, later parameters and errors as read statements do', () => {
    const text = [
      'let z = 2*r0', // uses a parameter defined later: an error naming its line
      'let r0 = 25 ohm',
      'block tee a b level=1',
      '  resistor ra a=a b=m value=r0',
      '  resistor rb a=m b=b value=r0',
      '  capacitor c a=m b=ground value=level pF',
      'end tee',
      'tee t1 a=in b=out level=2',
      'resistor r1 a=in b=ground valu=50 ohm', // misspelt key
      'capacitor c1 a=out b=ground value=3 nH', // wrong unit
      'frobnicate x1 a=in',
      'resistor r1 a=in b=out value=1 ohm', // duplicate name
      'port 1 plus=in',
      'port 2 plus=out',
      'sweep linear start=1 MHz stop=1 GHz points=11',
      'end',
    ].join('\n');
    const { lazy, eager, lazyBag, eagerBag } = bothElaborations(text, 'blocks.sbx');
    expect(lazyBag.items.length).toBeGreaterThan(4);
    expect(lazyBag.items).toEqual(eagerBag.items);
    expect(lazy).toEqual(eager);
  });
});

describe('inductor formulations', () => {
  // A ladder through the same plan built for 0 Hz (branch currents) and for the sweep's own lowest
  // frequency (admittances): the same network, so the same S to rounding (1e-12; common practice).
  it('admittance and branch-current stamps give the same S', () => {
    const rows = ['port 1 plus=n0', 'port 2 plus=n6', 'sweep linear start=10 MHz stop=3 GHz points=61'];
    for (let k = 0; k < 6; k++) rows.push(`inductor l${k} a=n${k} b=n${k + 1} value=${10 + k} nH q=35 at 400 MHz`, `capacitor c${k} a=n${k + 1} b=ground value=${3 + k / 3} pF`);
    rows.push('inductor lpar a=n2 b=n4 value=47 nH', 'inductor lsh a=n3 b=ground value=100 nH rs=0.2 ohm');
    const { circuit } = loadNetlist(rows.join('\n') + '\n', 'l.sbx');
    const asAdmittance = solveSweep(circuit);
    const asBranch = solveSweep(circuit, { plan: buildPlan(circuit, { lowestFrequency: 0 }) });
    expect(buildPlan(circuit, { lowestFrequency: 0 }).size).toBeGreaterThan(buildPlan(circuit).size);
    for (let i = 0; i < asBranch.values.length; i++) expect(Math.abs(asAdmittance.values[i]! - asBranch.values[i]!)).toBeLessThan(1e-12);
  });

  it('a plan is not used below the frequency it was built for', () => {
    const { circuit } = loadNetlist('inductor l a=a b=ground value=1 nH\nport 1 plus=a\nsweep linear start=1 MHz stop=1 GHz points=3\n', 'l.sbx');
    const plan = buildPlan(circuit);
    expect(() => solveSweep(circuit, { plan, frequencies: Float64Array.of(0, 1e6) })).toThrow(/below/);
  });

  it('a series RLC through the kernels matches its closed form S21 = 2Z0/(2Z0 + Z) (common practice), 1e-13', () => {
    const { circuit } = loadNetlist(
      'resistor r a=p1 b=m1 value=12 ohm\ninductor l a=m1 b=m2 value=33 nH\ncapacitor c a=m2 b=p2 value=2.2 pF esr=0.3 ohm\nport 1 plus=p1\nport 2 plus=p2\nsweep linear start=50 MHz stop=2 GHz points=40\n',
      's.sbx',
    );
    const net = solveSweep(circuit, { solver: 'sparse' });
    net.frequencies.forEach((f, k) => {
      const w = 2 * Math.PI * f;
      // Z = 12.3 + j(ωL − 1/(ωC))
      const zr = 12.3;
      const zi = w * 33e-9 - 1 / (w * 2.2e-12);
      const dr = 100 + zr;
      const d = dr * dr + zi * zi;
      const s21r = (100 * dr) / d;
      const s21i = (-100 * zi) / d;
      const o = 8 * k + 2 * 2; // S21 is entry (1, 0) of 2×2
      expect(Math.abs(net.values[o]! - s21r)).toBeLessThan(1e-13);
      expect(Math.abs(net.values[o + 1]! - s21i)).toBeLessThan(1e-13);
    });
  });
});

describe('partial sparse solves', () => {
  it('with the ports ordered last, the port voltages equal those of a full solve (1e-12 relative)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 4, max: 40 }), fc.integer({ min: 1, max: 1e9 }), (nodes, seed) => {
        let s = seed;
        const r = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
        const rows: string[] = [];
        for (let i = 1; i < nodes; i++) rows.push(`resistor r${i} a=n${i} b=n${Math.floor(r() * i)} value=${10 + 100 * r()} ohm`);
        for (let i = 0; i < nodes; i++) rows.push(`capacitor c${i} a=n${i} b=ground value=${1 + 5 * r()} pF`);
        for (let i = 0; i < nodes / 3; i++) rows.push(`inductor l${i} a=n${Math.floor(r() * nodes)} b=n${Math.floor(r() * nodes)} value=${5 + 20 * r()} nH`);
        const ports = [0, nodes - 1, Math.floor(nodes / 2)];
        ports.forEach((n, k) => rows.push(`port ${k + 1} plus=n${n}`));
        rows.push('sweep list freqs=0.9 GHz');
        const { circuit } = loadNetlist(rows.join('\n') + '\n', 'r.sbx');
        const plan = buildPlan(circuit);
        const vals = new Float64Array(2 * plan.slotRow.length);
        stampAt(plan, 2 * Math.PI * 0.9e9, vals);
        const portUnknowns = Int32Array.from(plan.portPlus);
        const full = createFactor(analyse(plan.size, plan.slotRow, plan.slotCol));
        const held = createFactor(analyse(plan.size, plan.slotRow, plan.slotCol, { last: portUnknowns }));
        expect(factor(full, vals)).toBe(0);
        expect(factor(held, vals)).toBe(0);
        const p = portUnknowns.length;
        const rhs = new Float64Array(2 * plan.size * p);
        portUnknowns.forEach((u, j) => (rhs[2 * (u * p + j)] = 1));
        const x1 = new Float64Array(rhs.length);
        const x2 = new Float64Array(rhs.length);
        solve(full, rhs, x1, p);
        const range = solveRange(held, portUnknowns, portUnknowns);
        expect(range.lastStep).toBeGreaterThanOrEqual(plan.size - p);
        solve(held, rhs, x2, p, range);
        let scale = 0;
        for (const u of portUnknowns) for (let j = 0; j < 2 * p; j++) scale = Math.max(scale, Math.abs(x1[2 * u * p + j]!));
        for (const u of portUnknowns) for (let j = 0; j < 2 * p; j++) expect(Math.abs(x1[2 * u * p + j]! - x2[2 * u * p + j]!)).toBeLessThanOrEqual(1e-12 * scale);
      }),
      { numRuns: 60, seed: 20261202 },
    );
  });
});
