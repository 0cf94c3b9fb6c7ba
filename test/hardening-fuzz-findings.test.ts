// Reproducers of what `npm run fuzz` found after the first round of hardening, one test each.
import { describe, expect, it } from 'vitest';
import { InputError, loadNetlist, parseTouchstone, formatTouchstone, type Diagnostic, type NetworkData } from '../src/index.js';
import { MAX_EXPANDED_ELEMENTS, MAX_EXPRESSION_DEPTH } from '../src/limits.js';

function errorsOf(text: string): Diagnostic[] {
  try {
    loadNetlist(text, 'f.sbx');
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error');
    throw e;
  }
  throw new Error('expected an InputError');
}

/** `n` blocks, each using the next twice; the last uses `last` (a statement line). */
function doubling(n: number, last: string): string[] {
  const out: string[] = [];
  for (let i = 0; i < n; i++) {
    out.push(`block b${i} terminals=x, y`);
    if (i < n - 1) out.push(`  b${i + 1} u1 x=x y=y`, `  b${i + 1} u2 x=x y=y`);
    else out.push(`  ${last}`);
    out.push('end');
  }
  return out;
}

describe('blocks whose instances run many statements', () => {
  it('a doubling chain into an unknown block stops at the limit of statements, located at the instance', () => {
    // 2^24 instances of the last block, each holding one unknown statement: no elements at all,
    // yet 2^25 statements to run
    const text = [...doubling(25, 'nothing_here u1 x=x y=y'), 'b0 top x=in y=out', 'resistor r a=in b=ground value=50 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz'].join('\n');
    const ds = errorsOf(text);
    expect(ds.some((d) => d.code === 'too-many-elements' && d.message.includes(`${MAX_EXPANDED_ELEMENTS}`) && d.span?.line === 25 * 4)).toBe(true);
  });

  it('an error in the body of a block used a million times is reported once (its instances are not all expanded)', () => {
    const text = [...doubling(21, 'resistor r a=x b=y value=50 ohmz'), 'b0 top x=in y=out', 'resistor r a=in b=ground value=50 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz'].join('\n');
    const ds = errorsOf(text);
    expect(ds).toHaveLength(1);
    expect(ds[0]!.span).toEqual(expect.objectContaining({ file: 'f.sbx', line: 20 * 4 + 2 })); // the body line of the last block
  });

  it('with an error elsewhere in the netlist, a large but valid expansion is not carried out in full', () => {
    // the mistake is found while the file is read (a line the grammar refuses), before any expansion
    const text = ['resistor rx a=in b=ground value=(50 ohm', ...doubling(21, 'resistor r a=x b=y value=50 ohm'), 'b0 top x=in y=out', 'resistor r a=in b=ground value=50 ohm', 'port 1 plus=in', 'sweep list freqs=1 GHz'].join('\n');
    const ds = errorsOf(text);
    expect(ds).toHaveLength(1);
    expect(ds[0]!.span).toEqual(expect.objectContaining({ line: 1 }));
  });
});

describe('line breaks', () => {
  it('a lone CR, a line read by the fast path, then an LF: the error on the next line has the right line (3)', () => {
    const ds = errorsOf('\re1\nrt r=lo(');
    const paren = ds.find((d) => /`\)` was expected/.test(d.message));
    expect(paren?.span).toEqual(expect.objectContaining({ line: 3, column: 9 }));
  });
});

describe('a line nested too deep by its parentheses alone', () => {
  it('is refused at the parenthesis that passes the limit, without tokenising the rest (a million of them)', () => {
    const line = `let x = ${'sqrt('.repeat(1_000_000)}1${')'.repeat(1_000_000)}`;
    const ds = errorsOf(`${line}\nresistor r a=in b=ground value=50 ohm\nport 1 plus=in\nsweep list freqs=1 GHz`);
    expect(ds).toEqual([expect.objectContaining({ code: 'too-deep', span: expect.objectContaining({ line: 1, column: 8 + 5 * (MAX_EXPRESSION_DEPTH + 1) }) })]);
  });
});

describe('numbers at the edge of double range', () => {
  it('the largest double, written with fewer digits, still reads back (it is not rounded up past the range)', () => {
    // IEEE 754 binary64: the largest finite value is (2 − 2^−52)·2^1023 = 1.7976931348623157e308
    const max = Number.MAX_VALUE;
    const net: NetworkData = { parameter: 'S', ports: 1, frequencies: Float64Array.from([1e9]), references: Float64Array.from([50]), values: Float64Array.from([max, -max]) };
    for (const digits of [1, 2, 9, 15, undefined]) {
      const text = formatTouchstone(net, { digits });
      const back = parseTouchstone(text, { ports: 1 });
      expect(Number.isFinite(back.values[0]!) && Number.isFinite(back.values[1]!)).toBe(true);
      // within the rounding of `digits` significant digits (cut toward zero where rounding would overflow)
      expect(Math.abs(back.values[0]! - max) / max).toBeLessThanOrEqual(10 ** (1 - (digits ?? 15))); // the default is 15 significant digits or the shortest exact text
      expect(back.values[1]!).toBe(-back.values[0]!);
    }
  });
});

describe('a Touchstone token of 100,000 digits', () => {
  it('is refused at its place, the message quoting only its start (the number test does not backtrack)', () => {
    const token = `1${'0'.repeat(100_000)}x`;
    let caught: unknown;
    try {
      parseTouchstone(`# GHz S RI R 50\n1 ${token} 0\n`, { ports: 1, fileName: 'long.s1p' });
    } catch (e) {
      caught = e;
    }
    const e = caught as { line: number; column: number; message: string };
    expect(e.line).toBe(2);
    expect(e.column).toBe(3);
    expect(e.message.length).toBeLessThan(200);
  });
});

describe('terminal tables of long sweeps', () => {
  it('come in pieces of at most 256 lines, each ending a line, whose join is the whole table', async () => {
    const { tableChunks, formatTable } = await import('../src/index.js');
    const n = 1000;
    const net: NetworkData = {
      parameter: 'S',
      ports: 1,
      frequencies: Float64Array.from({ length: n }, (_, k) => 1e6 * (k + 1)),
      references: Float64Array.from([50]),
      values: Float64Array.from({ length: 2 * n }, (_, x) => (x % 2 === 0 ? 0.5 : -0.25)),
    };
    const pieces = [...tableChunks(net)];
    expect(pieces.length).toBe(Math.ceil(n / 256));
    for (const p of pieces) {
      expect(p.endsWith('\n')).toBe(true);
      expect(p.split('\n').length - 1).toBeLessThanOrEqual(257); // the heading rides with the first piece
    }
    expect(pieces.join('')).toBe(formatTable(net));
    expect(formatTable(net).split('\n').length - 1).toBe(n + 1);
  });
});

describe('dB output at the edge of double range', () => {
  it('a magnitude whose dB text would decode past the largest double is refused before writing (RI holds it)', async () => {
    const { renderNetwork, OutputError } = await import('../src/index.js');
    // |S| = 1.7976931348623157e308 (IEEE 754 binary64 maximum) is 6165.094311198341 dB; rounded
    // to 15 digits and decoded as 10^(dB/20) it lies past the range
    const net: NetworkData = { parameter: 'S', ports: 1, frequencies: Float64Array.from([1e9]), references: Float64Array.from([50]), values: Float64Array.from([Number.MAX_VALUE, 0]) };
    expect(() => renderNetwork(net, { format: 'touchstone', data: 'DB' })).toThrow(OutputError);
    const ri = renderNetwork(net, { format: 'touchstone', data: 'RI' });
    const back = parseTouchstone(ri, { ports: 1 }).values[0]!;
    expect(Number.isFinite(back) && Math.abs(back - Number.MAX_VALUE) / Number.MAX_VALUE < 1e-14).toBe(true); // 15 digits, cut toward zero
  });
});
