// Issue 14, network-data writers and conversions: nothing non-finite is ever written, --digits is
// honoured everywhere, CSV follows RFC 4180, convert keeps the title and comments, mixed-mode data
// are labelled, and no message names an internal function.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { convertData, formatTwoPortCsv, formatTwoPortJson } from '../src/io/convert-file.js';
import { csvField, csvRow, formatCsv } from '../src/io/csv.js';
import { formatJson, parseJson } from '../src/io/json.js';
import { formatFigureTable } from '../src/io/table.js';
import { formatTouchstone, parseTouchstone } from '../src/io/touchstone.js';
import { cascade, toChain, toTransfer, TwoPortConversionError } from '../src/network/algebra.js';
import { ConversionError, convertNetwork } from '../src/network/convert.js';
import { createModeTransform, isMixedMode, mixedMode, singleEnded } from '../src/network/mixed-mode.js';
import type { NetworkData } from '../src/network/types.js';

const root = join(import.meta.dirname, '..');
const run = (args: string[]) => {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'scatterbox.js'), ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};
const dir = mkdtempSync(join(tmpdir(), 'sbx-hdo-'));

function twoPort(freqs: number[], s: number[][], refs = [50, 50]): NetworkData {
  return { parameter: 'S', ports: 2, frequencies: Float64Array.from(freqs), references: Float64Array.from(refs), values: Float64Array.from(s.flat()) };
}

/** S of a series impedance Z between ports of reference z0: S11 = Z/(Z+2z0), S21 = 2z0/(Z+2z0) (closed form, common practice). */
function seriesS(zr: number, zi: number, z0 = 50): number[] {
  const dr = zr + 2 * z0;
  const di = zi;
  const d2 = dr * dr + di * di;
  const s11 = [(zr * dr + zi * di) / d2, (zi * dr - zr * di) / d2];
  const s21 = [(2 * z0 * dr) / d2, (-2 * z0 * di) / d2];
  return [...s11, ...s21, ...s21, ...s11];
}

/** Every number of a text (JSON or CSV) read back: all finite. */
function numbersOf(text: string): number[] {
  return (text.match(/-?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?|NaN|-?Infinity/gi) ?? []).map(Number);
}

describe('no NaN or Infinity is ever written', () => {
  // Entries of 1e200: S12·S21 = 1e400 overflows IEEE 754 binary64 (max about 1.7977e308).
  const big = twoPort([1.2e9], [[1e200, 0, 1e200, 0, 1e200, 0, 1e200, 0]]);

  it('convert --to ABCD|T of large values: an error naming the frequency and the entry, no NaN in CSV or JSON', () => {
    for (const to of ['ABCD', 'T'] as const) {
      for (const path of ['x.csv', 'x.json']) {
        let caught: unknown;
        try {
          convertData(big, { to }, path);
        } catch (e) {
          caught = e;
        }
        expect(caught).toBeInstanceOf(TwoPortConversionError);
        expect((caught as Error).message).toMatch(new RegExp(`the ${to === 'ABCD' ? 'chain matrix \\(ABCD\\)' : 'transfer matrix \\(T\\)'} does not exist at 1\\.2 GHz \\(frequency point 0\\), converting from S: computing \\w+ overflows the range of double-precision numbers`));
      }
    }
  });

  it('a chain matrix that does not exist says why: S21 is zero (shunt short circuit, S = −U, common practice)', () => {
    const short = twoPort([1e9, 1.2e9], [seriesS(30, 40), [-1, 0, 0, 0, 0, 0, -1, 0]]);
    expect(() => toChain(short)).toThrow(/the chain matrix \(ABCD\) does not exist at 1\.2 GHz \(frequency point 1\), converting from S: S21 is zero/);
    expect(() => toTransfer(short)).toThrow(/the transfer matrix \(T\) does not exist at 1\.2 GHz/);
  });

  it('a large but representable series impedance (1e12 ohm) still converts: B = Z', () => {
    // series Z: B = Z (closed form). Z = 1e12 ohm converts fine to ABCD and back.
    const ok = twoPort([1e9], [seriesS(1e12, 0)]);
    const abcd = toChain(ok);
    expect(abcd.values[2]! / 1e12).toBeCloseTo(1, 6);
    expect(numbersOf(formatTwoPortCsv(abcd)).every(Number.isFinite)).toBe(true);
  });

  it('S → Z and Y → Z of extreme values: a ConversionError naming the point, never Infinity', () => {
    // Z = z0(U + S)(U − S)⁻¹ with S11 = 1e308, S22 = −1e308; Z = Y⁻¹ of Y = 1e-309·U (Z = 1e309 > max).
    const s = twoPort([1e9], [[1e308, 0, 0, 0, 0, 0, -1e308, 0]]);
    const y: NetworkData = { ...s, parameter: 'Y', values: Float64Array.of(1e-309, 0, 0, 0, 0, 0, 1e-309, 0) };
    for (const net of [s, y]) {
      let caught: unknown;
      try {
        convertNetwork(net, 'Z');
      } catch (e) {
        caught = e;
      }
      expect(caught).toBeInstanceOf(ConversionError);
      expect((caught as Error).message).toMatch(/Z-parameters do not exist \(converting from [SY]\) at frequency point 0 \(1000000000 Hz\)/);
    }
  });

  it('the writers check every number before the first byte: the MA magnitude of 1.5e308 + 1.5e308j overflows', () => {
    // |1.5e308 + 1.5e308j| = 1.5e308·√2 = 2.12e308 > 1.7977e308 (IEEE 754 binary64 maximum).
    const net = twoPort([1e9], [[1.5e308, 1.5e308, 0, 0, 0, 0, 0, 0]]);
    expect(() => formatCsv(net, { format: 'MA' })).toThrow(/S\(1,1\) at 1000000000 Hz is beyond the range of double-precision numbers in MA; nothing was written \(RI may still hold it\)/);
    expect(() => formatTouchstone(net, { format: 'MA' })).toThrow(/beyond the range/);
    expect(() => formatCsv(net, { format: 'RI' })).not.toThrow();
    // version 1.1 normalises Z to R: Z = 1e300 ohm with R = 1e-9 ohm is 1e309.
    const z: NetworkData = { ...net, parameter: 'Z', references: Float64Array.of(1e-9, 1e-9), values: Float64Array.of(1e300, 0, 0, 0, 0, 0, 1, 0) };
    expect(() => formatTouchstone(z, { version: '1.1' })).toThrow(/after the normalisation to the reference of version 1\.1/);
    expect(() => formatTouchstone(z, { version: '2.0' })).not.toThrow();
    // JSON (RFC 8259 has no NaN or Infinity): refused before any text
    const nan: NetworkData = { ...net, values: Float64Array.of(Number.NaN, 0, 0, 0, 0, 0, 0, 0) };
    expect(() => formatJson(nan)).toThrow(/not finite/);
    expect(() => formatTwoPortJson({ representation: 'ABCD', frequencies: Float64Array.of(1), values: Float64Array.of(Infinity, 0, 0, 0, 0, 0, 1, 0) })).toThrow(/A is beyond the range/);
  });

  it('a figure table in CSV writes an empty field where a figure has no finite value', () => {
    const text = formatFigureTable(Float64Array.of(1e9, 2e9), [{ name: 'mag', unit: 'dB', values: Float64Array.of(12.5, Number.NaN) }], true);
    expect(text).toBe('freq_hz,mag_dB\n1000000000,12.5\n2000000000,\n');
  });

  it('convert of large values through the CLI: exit 1, the message, no file written', () => {
    const input = join(dir, 'big.s2p');
    writeFileSync(input, formatTouchstone(big, { digits: 17 }));
    for (const out of ['big-abcd.csv', 'big-t.json']) {
      const r = run(['convert', input, '-o', join(dir, out), '--to', out.includes('abcd') ? 'ABCD' : 'T']);
      expect(r.code).toBe(1);
      expect(r.err).toMatch(/does not exist at 1\.2 GHz/);
      expect(r.err).not.toMatch(/NaN/);
      expect(existsSync(join(dir, out))).toBe(false);
    }
  });
});

describe('--digits is honoured by JSON and by the ABCD/T writers', () => {
  // 1/3 to 4 significant digits is 0.3333 (ECMAScript Number.prototype.toPrecision).
  const third = twoPort([1e9], [[1 / 3, 2 / 3, 0.5, 0, 0.5, 0, 1 / 3, 0]]);

  it('formatJson rounds the data values (not the frequencies) like the CSV writer', () => {
    const json = formatJson(third, { digits: 4 });
    const doc = JSON.parse(json) as { data: number[][][][]; frequency_hz: number[] };
    expect(doc.data[0]![0]![0]).toEqual([0.3333, 0.6667]);
    expect(json).toContain('0.3333');
    expect(formatCsv(third, { digits: 4 })).toContain(',0.3333,0.6667,');
    expect(() => formatJson(third, { digits: 0 })).toThrow(/digits must be an integer from 1 to 17/);
  });

  it('convertData passes digits to the ABCD CSV and the T JSON', () => {
    // series Z = 1/3 + 0j: B = Z = 0.3333 at 4 digits (closed form of the chain matrix, common practice)
    const net = twoPort([1e9], [seriesS(1 / 3, 0)]);
    const csv = convertData(net, { to: 'ABCD', digits: 4 }, 'a.csv');
    const row = csv.trim().split('\n')[1]!.split(',').map(Number);
    expect(row[3]).toBe(0.3333);
    const t = convertData(net, { to: 'T', digits: 3 }, 't.json');
    const doc = JSON.parse(t) as { data: number[][][][] };
    for (const x of doc.data.flat(3)) expect(x).toBe(Number(x.toPrecision(3)));
    // without digits: the shortest round-trip text of the full double
    const full = JSON.parse(convertData(net, { to: 'T' }, 't.json')) as { data: number[][][][] };
    expect(full.data.flat(3).some((x) => x !== Number(x.toPrecision(3)))).toBe(true);
  });

  it('solve --format json --digits rounds through the CLI', () => {
    const r = run(['solve', 'circuits/pad-10db-pi.sbx', '--format', 'json', '--digits', '3', '-o', join(dir, 'pad.json')]);
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(join(dir, 'pad.json'), 'utf8')) as { data: number[][][][] };
    for (const x of doc.data.flat(3)) expect(x).toBe(Number(x.toPrecision(3)));
  });
});

describe('CSV fields follow RFC 4180 §2', () => {
  it('a field with a comma, a quote, CR or LF is quoted, quotes doubled (RFC 4180 §2 rules 6 and 7)', () => {
    expect(csvField('il(2,1)_dB')).toBe('"il(2,1)_dB"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('a\nb')).toBe('"a\nb"');
    expect(csvField('a\rb')).toBe('"a\rb"');
    expect(csvField('S21_re')).toBe('S21_re');
    expect(csvRow(['a', 'b,c', ''])).toBe('a,"b,c",');
  });

  it('--figures "il(2,1),rl(1)" --format csv: the header has one field per column', () => {
    const text = formatFigureTable(Float64Array.of(1e9), [{ name: 'il(2,1)', unit: 'dB', values: Float64Array.of(0.5) }, { name: 'rl(1)', unit: 'dB', values: Float64Array.of(20) }], true);
    expect(text.split('\n')[0]).toBe('freq_hz,"il(2,1)_dB",rl(1)_dB');
    // read back with a minimal RFC 4180 field splitter: three fields
    const fields = text.split('\n')[0]!.match(/("([^"]|"")*"|[^,]*)(,|$)/g)!.filter((f) => f !== '');
    expect(fields).toHaveLength(3);
  });

  it('through the CLI', () => {
    const r = run(['solve', 'circuits/pad-10db-pi.sbx', '--figures', 'il(2,1),rl(1)', '--format', 'csv']);
    expect(r.code).toBe(0);
    expect(r.out.split('\n')[0]).toBe('freq_hz,"il(2,1)_dB",rl(1)_dB');
  });
});

describe('convert keeps the title and the comments of the input', () => {
  const net: NetworkData = { ...twoPort([1e9], [seriesS(30, 40)]), comments: ['measured on bench 3', 'fixture de-embedded'] };
  const input = join(dir, 'commented.s2p');
  writeFileSync(input, formatTouchstone(net, { digits: 17 }));

  it('Touchstone to Touchstone, to JSON and to the two-port JSON', () => {
    for (const out of ['c.s2p', 'c.json', 'c-abcd.json']) {
      const path = join(dir, out);
      const r = run(['convert', input, '-o', path, ...(out.includes('abcd') ? ['--to', 'ABCD'] : [])]);
      expect(r.code).toBe(0);
      const text = readFileSync(path, 'utf8');
      expect(text).toContain('measured on bench 3');
      expect(text).toContain('fixture de-embedded');
    }
    const back = parseJson(readFileSync(join(dir, 'c.json'), 'utf8'));
    expect(back.comments?.slice(0, 2)).toEqual(['measured on bench 3', 'fixture de-embedded']);
  });

  it('a title of the data becomes the first comment of a Touchstone file and the "title" of JSON', () => {
    const titled = { ...net, title: 'LNA board rev B' };
    expect(convertData(titled, {}, 'x.s2p').split('\n')[0]).toBe('! LNA board rev B');
    expect((JSON.parse(convertData(titled, { to: 'T' }, 'x.json')) as { title: string }).title).toBe('LNA board rev B');
  });
});

describe('mixed-mode output is labelled', () => {
  // Two uncoupled identical matched lines 1→3 and 2→4: S31 = S13 = S42 = S24 = e^(−jθ). For the
  // pairs (1, 2) and (3, 4), Sdd21 = Scc21 = e^(−jθ) and no mode conversion (Bockelman &
  // Eisenstadt 1995, eq. for uncoupled lines).
  const th = 0.7;
  const v = new Float64Array(32);
  for (const [a, b] of [[0, 2], [2, 0], [1, 3], [3, 1]]) {
    v[2 * (a! * 4 + b!)] = Math.cos(th);
    v[2 * (a! * 4 + b!) + 1] = -Math.sin(th);
  }
  const se: NetworkData = { parameter: 'S', ports: 4, frequencies: Float64Array.of(1e9), references: Float64Array.of(50, 50, 50, 50), values: v };
  const mm = mixedMode(se, [[1, 2], [3, 4]]);

  it('Touchstone 2.0 gets [Mixed-Mode Order] and the single-ended [Reference]; it reads back as the same mixed-mode data', () => {
    const text = convertData(se, { pairs: [[1, 2], [3, 4]] }, 'mm.s4p');
    expect(text).toMatch(/^\[Version\] 2\.0$/m);
    // entry Dx,y = differential mode of ports x (positive) and y (Touchstone 2.0, from memory)
    expect(text).toMatch(/^\[Mixed-Mode Order\] D1,2 D3,4 C1,2 C3,4$/m);
    expect(text).toMatch(/^\[Reference\] 50 50 50 50$/m);
    const back = parseTouchstone(text, { fileName: 'mm.s4p' });
    expect(isMixedMode(back)).toBe(true);
    expect(Array.from(back.references)).toEqual([100, 100, 25, 25]);
    back.values.forEach((x, i) => expect(x).toBeCloseTo(mm.values[i]!, 14));
    // Sdd21 (row D2, column D1) and Scc21 are the line's S21
    expect(back.values[2 * (1 * 4 + 0)]).toBeCloseTo(Math.cos(th), 14);
    expect(back.values[2 * (3 * 4 + 2) + 1]).toBeCloseTo(-Math.sin(th), 14);
    expect(() => formatTouchstone(mm, { version: '1.1' })).toThrow(/version 2\.0/);
  });

  it('a file giving the modes in another order is read into ours [D1, D2, C1, C2]', () => {
    const text = convertData(se, { pairs: [[1, 2], [3, 4]] }, 'mm.s4p');
    // swap the order to D1,2 C1,2 D3,4 C3,4 and permute the rows and columns of the data to match
    const perm = [0, 2, 1, 3]; // file row r holds our row perm[r]
    const lines = text.split('\n');
    const at = lines.findIndex((l) => l.startsWith('[Network Data]'));
    const nums = lines.slice(at + 1, at + 5).join(' ').trim().split(/\s+/).map(Number);
    const f = nums[0]!;
    const ours = nums.slice(1);
    const rows: string[] = [];
    for (let r = 0; r < 4; r++) {
      const row: number[] = [];
      for (let c = 0; c < 4; c++) row.push(ours[2 * (perm[r]! * 4 + perm[c]!)]!, ours[2 * (perm[r]! * 4 + perm[c]!) + 1]!);
      rows.push((r === 0 ? `${f} ` : '  ') + row.join(' '));
    }
    const swapped = [...lines.slice(0, at), '[Network Data]', ...rows, '[End]', ''].join('\n').replace(/^\[Mixed-Mode Order\].*$/m, '[Mixed-Mode Order] D1,2 C1,2 D3,4 C3,4');
    const back = parseTouchstone(swapped, { fileName: 'mm.s4p' });
    back.values.forEach((x, i) => expect(x).toBeCloseTo(mm.values[i]!, 14));
  });

  it('CSV columns are named by mode (Sdd11 … Scc22) and JSON carries "modes" and "pairs"', () => {
    const head = convertData(se, { pairs: [[1, 2], [3, 4]] }, 'mm.csv').split('\n')[0]!.split(',');
    expect(head.slice(0, 9)).toEqual(['freq_hz', 'Sdd11_re', 'Sdd11_im', 'Sdd12_re', 'Sdd12_im', 'Sdc11_re', 'Sdc11_im', 'Sdc12_re', 'Sdc12_im']);
    expect(head).toContain('Sdd21_re');
    expect(head).toContain('Scd21_re');
    expect(head[head.length - 1]).toBe('Scc22_im');
    const json = convertData(se, { pairs: [[1, 2], [3, 4]] }, 'mm.json');
    const doc = JSON.parse(json) as { modes: string[]; pairs: number[][] };
    expect(doc.modes).toEqual(['D1', 'D2', 'C1', 'C2']);
    expect(doc.pairs).toEqual([[1, 2], [3, 4]]);
    const back = parseJson(json);
    expect(isMixedMode(back)).toBe(true);
    expect(singleEnded(back as typeof mm).values.every((x, i) => Math.abs(x - se.values[i]!) < 1e-15)).toBe(true);
    // mixed-mode Z keeps its labels
    expect(convertData(se, { pairs: [[1, 2], [3, 4]], to: 'Y' }, 'mm.csv').split('\n')[0]).toMatch(/^freq_hz,Ydd11_re,/);
  });

  it('a bad [Mixed-Mode Order] is a located error', () => {
    const text = convertData(se, { pairs: [[1, 2], [3, 4]] }, 'mm.s4p');
    const line = text.split('\n').findIndex((l) => l.startsWith('[Mixed-Mode Order]')) + 1;
    const bad = text.replace(/^\[Mixed-Mode Order\].*$/m, '[Mixed-Mode Order] D1,2 D3,4 C1,2 S4');
    expect(() => parseTouchstone(bad, { fileName: 'mm.s4p' })).toThrow(/single-ended entries \("S4"\)/);
    try {
      parseTouchstone(text.replace(/^\[Mixed-Mode Order\].*$/m, '[Mixed-Mode Order] D1,2 D3,4 C2,1 C3,4'), { fileName: 'mm.s4p' });
      expect.unreachable();
    } catch (e) {
      expect((e as { line: number; column: number }).line).toBe(line);
      expect((e as Error).message).toMatch(/C1,2/);
    }
  });
});

describe('no message names an internal function', () => {
  const internal = /^(createModeTransform|mixedMode|singleEnded|toTwoPort|fromTwoPort|cascade|convertNetwork|renormalizeNetwork|multiply|luFactor|chainFromScattering|renormalizeComplex):/;

  it('pairing, conversion and cascade errors are plain words', () => {
    const se: NetworkData = { parameter: 'S', ports: 4, frequencies: Float64Array.of(1), references: Float64Array.of(50, 50, 50, 50), values: new Float64Array(32) };
    const three: NetworkData = { ...se, ports: 3, references: Float64Array.of(50, 50, 50), values: new Float64Array(18) };
    const attempts: (() => unknown)[] = [
      () => createModeTransform(4, [[1, 2], [2, 4]]),
      () => mixedMode(se, [[1, 2]]),
      () => mixedMode({ ...se, references: Float64Array.of(50, 75, 50, 50) }, [[1, 2], [3, 4]]),
      () => toChain(three),
      () => cascade(),
      () => cascade(three),
      () => convertNetwork({ ...se, references: Float64Array.of(50, 50, 50) }, 'Z'),
    ];
    for (const attempt of attempts) {
      let message = '';
      try {
        attempt();
      } catch (e) {
        message = (e as Error).message;
      }
      expect(message).not.toBe('');
      expect(message).not.toMatch(internal);
    }
  });
});
