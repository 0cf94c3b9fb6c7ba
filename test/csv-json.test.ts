/**
 * CSV and JSON writers (our own schemas, documented in src/io/csv.ts and src/io/json.ts).
 * Expected magnitudes, angles and dB values come from mathjs; number text from the ECMAScript
 * Number-to-String rule (shortest round-trip text), which JSON.stringify also follows.
 */
import { describe, expect, it } from 'vitest';
import { abs, arg, complex, log10 } from 'mathjs';
import type { NetworkData } from '../src/network/types.js';
import { csvHeader, formatCsv } from '../src/io/csv.js';
import { JSON_SCHEMA_ID, formatJson, parseJson } from '../src/io/json.js';

function net2(): NetworkData {
  // S11 = 0.5 + 0.5j, S12 = 0.1, S21 = -0.3 - 0.4j, S22 = -0 + 0j at 1 GHz; second point 2.5 GHz
  return {
    parameter: 'S',
    ports: 2,
    frequencies: Float64Array.from([1e9, 2.5e9]),
    references: Float64Array.from([50, 75]),
    values: Float64Array.from([0.5, 0.5, 0.1, 0, -0.3, -0.4, -0, 0, 1 / 3, -2 / 3, 1e-20, 5e300, -1, 0, 0.25, 0.125]),
  };
}

const cells = (csv: string, row: number): string[] => csv.split('\n')[row]!.split(',');

describe('CSV', () => {
  it('header: freq_hz then <P><i><j>_re/_im row-major (our schema)', () => {
    const csv = formatCsv(net2());
    expect(cells(csv, 0)).toEqual(['freq_hz', 'S11_re', 'S11_im', 'S12_re', 'S12_im', 'S21_re', 'S21_im', 'S22_re', 'S22_im']);
    expect(csv.split('\n')).toHaveLength(4); // header, 2 rows, final newline
    expect(csv.endsWith('\n')).toBe(true);
  });

  it('header names for MA and DB, and for Z/Y parameters', () => {
    expect(csvHeader('Z', 1, 'MA')).toEqual(['freq_hz', 'Z11_mag', 'Z11_deg']);
    expect(csvHeader('Y', 1, 'DB')).toEqual(['freq_hz', 'Y11_db', 'Y11_deg']);
    const z: NetworkData = { ...net2(), parameter: 'Z' };
    expect(cells(formatCsv(z, { format: 'DB' }), 0)[1]).toBe('Z11_db');
  });

  it('10 ports and more: indices separated by an underscore', () => {
    const h = csvHeader('S', 10);
    expect(h).toHaveLength(1 + 2 * 100);
    expect(h[1]).toBe('S1_1_re');
    expect(h).toContain('S10_2_re');
    expect(h).toContain('S1_10_im');
    expect(h[h.length - 1]).toBe('S10_10_im');
    expect(new Set(h).size).toBe(h.length); // no two columns share a name
    expect(csvHeader('S', 9)).toContain('S99_im');
  });

  it('RI values: shortest round-trip text, -0 as 0, exact read-back', () => {
    const n = net2();
    const csv = formatCsv(n);
    const r1 = cells(csv, 1);
    expect(r1).toEqual(['1000000000', '0.5', '0.5', '0.1', '0', '-0.3', '-0.4', '0', '0']);
    const r2 = cells(csv, 2).map(Number);
    // ECMAScript Number-to-String is shortest round-trip: reading the text gives the same double
    expect(r2).toEqual([2.5e9, 1 / 3, -2 / 3, 1e-20, 5e300, -1, 0, 0.25, 0.125]);
  });

  it('MA and DB values agree with mathjs abs/arg and 20·log10 (tolerance 1e-12)', () => {
    const n = net2();
    const ma = cells(formatCsv(n, { format: 'MA' }), 1).map(Number);
    const db = cells(formatCsv(n, { format: 'DB' }), 1).map(Number);
    const entries: Array<[number, number]> = [[0.5, 0.5], [0.1, 0], [-0.3, -0.4]];
    entries.forEach(([re, im], q) => {
      const c = complex(re, im);
      const m = abs(c) as unknown as number;
      const deg = (arg(c) * 180) / Math.PI;
      expect(Math.abs(ma[1 + 2 * q]! - m)).toBeLessThanOrEqual(1e-12);
      expect(Math.abs(ma[2 + 2 * q]! - deg)).toBeLessThanOrEqual(1e-12);
      expect(Math.abs(db[1 + 2 * q]! - 20 * (log10(m) as number))).toBeLessThanOrEqual(1e-12);
      expect(Math.abs(db[2 + 2 * q]! - deg)).toBeLessThanOrEqual(1e-12);
    });
    // S11 = 0.5 + 0.5j: 45° (closed form) and |S11| = √0.5 → -3.0103 dB (20·log10(√0.5) = -10·log10 2)
    expect(Math.abs(ma[2]! - 45)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(db[1]! + 10 * Math.log10(2))).toBeLessThanOrEqual(1e-12);
  });

  it('digits rounds to that many significant digits', () => {
    const n = net2();
    n.frequencies[1] = 2.500001234e9;
    const row = cells(formatCsv(n, { digits: 4 }), 2);
    expect(row[0]).toBe('2500001234'); // frequencies are never rounded
    expect(row[1]).toBe('0.3333');
    expect(row[2]).toBe('-0.6667');
    expect(() => formatCsv(net2(), { digits: 0 })).toThrow(RangeError);
  });

  it('deterministic and refuses non-finite values', () => {
    expect(formatCsv(net2(), { format: 'DB' })).toBe(formatCsv(net2(), { format: 'DB' }));
    const bad = net2();
    bad.values[5] = Number.POSITIVE_INFINITY;
    expect(() => formatCsv(bad)).toThrow(/not finite/);
  });
});

describe('JSON', () => {
  it('follows the documented schema, keys in fixed order', () => {
    const n = { ...net2(), title: 'our filter', comments: ['a', 'b "quoted"'] };
    const text = formatJson(n);
    const doc = JSON.parse(text) as Record<string, unknown>;
    expect(Object.keys(doc)).toEqual(['schema', 'title', 'comments', 'parameter', 'ports', 'references_ohm', 'frequency_hz', 'data']);
    expect(doc['schema']).toBe(JSON_SCHEMA_ID);
    expect(doc['schema']).toBe('scatterbox.network/1');
    expect(doc['title']).toBe('our filter');
    expect(doc['comments']).toEqual(['a', 'b "quoted"']);
    expect(doc['parameter']).toBe('S');
    expect(doc['ports']).toBe(2);
    expect(doc['references_ohm']).toEqual([50, 75]);
    expect(doc['frequency_hz']).toEqual([1e9, 2.5e9]);
    const data = doc['data'] as number[][][][];
    expect(data).toHaveLength(2);
    expect(data[0]).toEqual([[[0.5, 0.5], [0.1, 0]], [[-0.3, -0.4], [0, 0]]]); // rows i, entries j
    expect(data[1]![0]![1]).toEqual([1e-20, 5e300]); // S12 at 2.5 GHz
    // one frequency point per line
    expect(text.split('\n').filter((l) => l.startsWith('    [[[')).length).toBe(2);
    expect(text.endsWith('}\n')).toBe(true);
  });

  it('absent title and comments: null and []', () => {
    const doc = JSON.parse(formatJson(net2())) as Record<string, unknown>;
    expect(doc['title']).toBeNull();
    expect(doc['comments']).toEqual([]);
  });

  it('round trip formatJson → parseJson is exact (JSON numbers are shortest round-trip text)', () => {
    const n = { ...net2(), title: 't', comments: ['c'] };
    const back = parseJson(formatJson(n));
    expect(back.parameter).toBe('S');
    expect(back.ports).toBe(2);
    expect(back.title).toBe('t');
    expect(back.comments).toEqual(['c']);
    expect(Array.from(back.references)).toEqual([50, 75]);
    expect(Array.from(back.frequencies)).toEqual(Array.from(n.frequencies));
    // bit-exact except the sign of zero (JSON writes -0 as 0)
    expect(Array.from(back.values)).toEqual(Array.from(n.values).map((v) => (v === 0 ? 0 : v)));
    expect(formatJson(back)).toBe(formatJson(n));
  });

  it('a network with no points is written, but read back as an error at frequency_hz (no command can use it; the Touchstone reader refuses a file without data too)', () => {
    const n: NetworkData = { parameter: 'Y', ports: 1, frequencies: new Float64Array(0), references: Float64Array.from([50]), values: new Float64Array(0) };
    const text = formatJson(n);
    expect(() => parseJson(text)).toThrow(/frequency_hz is empty/);
  });

  it('parseJson names what is wrong', () => {
    const good = JSON.parse(formatJson(net2())) as Record<string, unknown>;
    const variant = (patch: Record<string, unknown>): string => JSON.stringify({ ...good, ...patch });
    expect(() => parseJson('{')).toThrow(/not valid JSON/);
    expect(() => parseJson(variant({ schema: 'other/1' }))).toThrow(/schema/);
    expect(() => parseJson(variant({ parameter: 'H' }))).toThrow(/parameter/);
    expect(() => parseJson(variant({ ports: 2.5 }))).toThrow(/ports/);
    expect(() => parseJson(variant({ references_ohm: [50] }))).toThrow(/references_ohm/);
    expect(() => parseJson(variant({ frequency_hz: [1e9, 'x'] }))).toThrow(/frequency_hz\[1\]/);
    expect(() => parseJson(variant({ data: [good['data'] as unknown[]][0]!.slice(0, 1) }))).toThrow(/one entry per frequency/);
    const data = JSON.parse(JSON.stringify(good['data'])) as unknown[][][][];
    data[1]![1]![0] = [1];
    expect(() => parseJson(variant({ data }))).toThrow(/data\[1\]\[1\]\[0\] must have 2 entries/);
    expect(() => parseJson(variant({ frequency_hz: [2e9, 1e9] }))).toThrow(/increase/);
  });

  it('deterministic and refuses non-finite values', () => {
    expect(formatJson(net2())).toBe(formatJson(net2()));
    const bad = net2();
    bad.values[0] = Number.NaN;
    expect(() => formatJson(bad)).toThrow(/not finite/);
  });
});
