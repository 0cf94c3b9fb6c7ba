// Blocks (reusable sub-networks) and included files: flattening must give exactly the network
// written out by hand, and every misuse is a located error.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { loadNetlist, loadNetlistFile } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';

const lines = (...l: string[]) => l.join('\n') + '\n';

function errors(text: string, file = 'blocks.sbx'): Diagnostic[] {
  try {
    loadNetlist(text, file);
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error');
    throw e;
  }
  throw new Error('expected errors');
}

function maxDiff(a: Float64Array, b: Float64Array): number {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]! - b[i]!));
  return m;
}

const TEE = lines(
  'block tee terminals=left, right l=10 nH c=2 pF',
  '  inductor l1 a=left b=mid value=l',
  '  capacitor c1 a=mid b=ground value=c',
  '  inductor l2 a=mid b=right value=l',
  'end',
);

describe('blocks flatten to the hand-written network', () => {
  it('two instances with a default and an overridden parameter', () => {
    const withBlocks = TEE + lines('let cmid = 3 pF', 'tee t1 left=in right=x', 'tee t2 left=x right=out c=cmid', 'port 1 plus=in', 'port 2 plus=out', 'sweep linear start=100 MHz stop=3 GHz points=30');
    const flat = lines(
      'inductor a1 a=in b=m1 value=10 nH',
      'capacitor b1 a=m1 b=ground value=2 pF',
      'inductor c1 a=m1 b=x value=10 nH',
      'inductor a2 a=x b=m2 value=10 nH',
      'capacitor b2 a=m2 b=ground value=3 pF',
      'inductor c2 a=m2 b=out value=10 nH',
      'port 1 plus=in',
      'port 2 plus=out',
      'sweep linear start=100 MHz stop=3 GHz points=30',
    );
    const a = loadNetlist(withBlocks, 'b.sbx');
    expect(a.warnings).toEqual([]);
    expect(a.circuit.elements.map((e) => e.name)).toEqual(['t1.l1', 't1.c1', 't1.l2', 't2.l1', 't2.c1', 't2.l2']);
    expect(a.circuit.nodeNames).toEqual(['in', 'x', 't1.mid', 'out', 't2.mid']);
    // identical stamps → identical numbers (to rounding)
    expect(maxDiff(solveSweep(a.circuit).values, solveSweep(loadNetlist(flat, 'f.sbx').circuit).values)).toBeLessThan(1e-14);
  });

  it('nested blocks: two 25 ohm series blocks inside one block are a 50 ohm series element', () => {
    const text = lines(
      'block half terminals=p, n r=25 ohm',
      '  resistor r1 a=p b=n value=r',
      'end',
      'block whole terminals=p, n r=50 ohm',
      '  half h1 p=p n=mid r=r/2',
      '  half h2 p=mid n=n r=r/2',
      'end',
      'whole w a=in n=out'.replace('a=in', 'p=in'),
      'port 1 plus=in',
      'port 2 plus=out',
      'sweep list freqs=1 MHz',
    );
    const net = solveSweep(loadNetlist(text, 'n.sbx').circuit);
    // series impedance Z between two 50 ohm ports: S11 = Z/(Z+2Z0) = 1/3, S21 = 2/3 (closed form, common practice)
    expect(net.values[0]).toBeCloseTo(1 / 3, 14);
    expect(net.values[4]).toBeCloseTo(2 / 3, 14);
  });

  it('a block terminal may be connected to ground', () => {
    const text = TEE + lines('tee t1 left=in right=ground', 'port 1 plus=in', 'sweep list freqs=0 Hz')
    const net = solveSweep(loadNetlist(text, 'g.sbx').circuit);
    // at 0 Hz the inductors short `in` to ground: S11 = −1 (common practice)
    expect(net.values[0]).toBeCloseTo(-1, 12);
  });
});

describe('block errors are located', () => {
  it('an unknown terminal or parameter at instantiation, with a suggestion', () => {
    const text = TEE + lines('tee t1 left=in rigth=out', 'tee t2 left=in right=out cc=1 pF', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz');
    const ds = errors(text);
    expect(ds).toHaveLength(2);
    expect(ds[0]).toMatchObject({ code: 'unknown-argument', message: 'block `tee` has no argument `rigth`', span: { line: 6, column: 16, length: 5 }, help: 'did you mean `right`?' });
    expect(ds[1]).toMatchObject({ code: 'unknown-argument', message: 'block `tee` has no argument `cc`', span: { line: 7, column: 26 }, help: 'did you mean `c`?' });
  });

  it('a missing terminal', () => {
    const ds = errors(TEE + lines('tee t1 left=in', 'port 1 plus=in', 'sweep list freqs=1 GHz'));
    expect(ds).toEqual([expect.objectContaining({ code: 'missing-terminal', message: 'instance `t1` of block `tee` needs terminal `right`', span: expect.objectContaining({ line: 6, column: 5 }) })]);
  });

  it('a recursive definition shows the chain', () => {
    const text = lines(
      'block a terminals=p',
      '  b inner p=p',
      'end',
      'block b terminals=p',
      '  a again p=p',
      'end',
      'a top p=x',
      'resistor r a=x b=ground value=50 ohm',
      'port 1 plus=x',
      'sweep list freqs=1 GHz',
    );
    const ds = errors(text);
    expect(ds).toEqual([expect.objectContaining({ code: 'recursive-block', message: 'block `a` contains itself: a → b → a', span: expect.objectContaining({ line: 5, column: 3 }) })]);
  });

  it('an error in a block body is reported once, however many instances', () => {
    const text = lines('block bad terminals=p', '  resistor r a=p b=ground value=zz', 'end', 'bad u1 p=in', 'bad u2 p=in', 'port 1 plus=in', 'sweep list freqs=1 GHz');
    const ds = errors(text);
    expect(ds).toEqual([expect.objectContaining({ code: 'unknown-parameter', message: 'unknown parameter `zz`', span: expect.objectContaining({ line: 2, column: 33 }) })]);
  });

  it('an error in a block body names the (first) instance it came from', () => {
    const text = lines('block pad terminals=p r=10 ohm', '  resistor r1 a=p b=ground value=r', 'end', 'pad u1 p=in', 'pad u2 p=in r=1 pF', 'port 1 plus=in', 'sweep list freqs=1 GHz');
    const ds = errors(text);
    expect(ds).toHaveLength(1);
    expect(ds[0]).toMatchObject({ code: 'wrong-unit', span: { line: 2 } });
    expect(ds[0]!.help).toMatch(/in instance `u2` of block `pad` \(line 5\)$/);
  });

  it('ports, sweeps and nested definitions are not allowed inside a block; a block needs `end`', () => {
    const ds = errors(lines('block x terminals=p', '  port 1 plus=p', 'end', 'x u p=in', 'resistor r a=in b=ground value=1 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz', 'block y terminals=q'));
    expect(ds.map((d) => [d.code, d.span?.line]).sort((x, y) => Number(x[1]) - Number(y[1]))).toEqual([
      ['not-in-block', 2],
      ['bad-block', 8],
    ]);
  });

  it('a block may not take the name of an element keyword', () => {
    const ds = errors(lines('block resistor terminals=p', 'end', 'port 1 plus=in', 'sweep list freqs=1 GHz'));
    expect(ds[0]).toMatchObject({ code: 'duplicate-name', message: '`resistor` is a keyword of the language and cannot name a block' });
  });

  it('warnings name the instance path of internal nodes, and unused blocks', () => {
    const text = lines(
      'block stub terminals=p',
      '  resistor r a=p b=tip value=50 ohm',
      'end',
      'block spare terminals=p',
      '  resistor r a=p b=ground value=1 ohm',
      'end',
      'stub s1 p=in',
      'resistor load a=in b=ground value=50 ohm',
      'port 1 plus=in',
      'sweep list freqs=1 GHz',
    );
    const w = loadNetlist(text, 'w.sbx').warnings;
    expect(w.map((d) => d.message)).toEqual(['node `s1.tip` has a single connection (s1.r)', 'block `spare` is never used']);
  });
});

describe('include', () => {
  const dir = mkdtempSync(join(tmpdir(), 'sbx-inc-'));
  writeFileSync(join(dir, 'parts.sbx'), TEE);
  writeFileSync(join(dir, 'loop-a.sbx'), 'include "loop-b.sbx"\n');
  writeFileSync(join(dir, 'loop-b.sbx'), 'include "loop-a.sbx"\n');

  it('an included file brings its blocks; its errors point into it', () => {
    writeFileSync(join(dir, 'main.sbx'), lines('include "parts.sbx"', 'tee t1 left=in right=out', 'port 1 plus=in', 'port 2 plus=out', 'sweep list freqs=1 GHz'));
    const r = loadNetlistFile(join(dir, 'main.sbx'));
    expect(r.circuit.elements).toHaveLength(3);
    writeFileSync(join(dir, 'broken.sbx'), lines('resistor r a=in b=ground value=5 pF'));
    writeFileSync(join(dir, 'main2.sbx'), lines('include "broken.sbx"', 'port 1 plus=in', 'sweep list freqs=1 GHz'));
    try {
      loadNetlistFile(join(dir, 'main2.sbx'));
      expect.unreachable();
    } catch (e) {
      const d = (e as InputError).diagnostics.find((x) => x.severity === 'error')!;
      expect(d.code).toBe('wrong-unit');
      expect(d.span).toMatchObject({ file: join(dir, 'broken.sbx'), line: 1, column: 32 });
      expect((e as InputError).sources?.get(join(dir, 'broken.sbx'))).toContain('5 pF');
    }
  });

  it('an include cycle shows the chain of files', () => {
    writeFileSync(join(dir, 'top.sbx'), lines('include "loop-a.sbx"', 'resistor r a=in b=ground value=1 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz'));
    try {
      loadNetlistFile(join(dir, 'top.sbx'));
      expect.unreachable();
    } catch (e) {
      const d = (e as InputError).diagnostics.find((x) => x.code === 'include-cycle')!;
      expect(d.message).toBe(`this file is already being included: ${join(dir, 'loop-a.sbx')} → ${join(dir, 'loop-b.sbx')} → ${join(dir, 'loop-a.sbx')}`);
      expect(d.span).toMatchObject({ file: join(dir, 'loop-b.sbx'), line: 1, column: 9 });
    }
  });

  it('a missing included file is a located error', () => {
    writeFileSync(join(dir, 'missing.sbx'), lines('include "nowhere.sbx"', 'resistor r a=in b=ground value=1 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz'));
    try {
      loadNetlistFile(join(dir, 'missing.sbx'));
      expect.unreachable();
    } catch (e) {
      expect((e as InputError).diagnostics[0]).toMatchObject({ code: 'bad-include', message: 'cannot read "nowhere.sbx": no such file', span: { line: 1, column: 9 } });
    }
  });
});
