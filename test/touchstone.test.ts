/**
 * Touchstone writer and reader.
 *
 * Source of the layout rules checked here: Touchstone File Format Specification, version 1.1,
 * IBIS Open Forum (2002), and version 2.0, IBIS Open Forum (2009). The rules are recalled, not
 * looked up: every such check is marked "(from memory)". Expected numbers of hand-written files
 * come from mathjs (polar → rectangular, powers of ten) or are plain copies of what the file says.
 */
import { describe, expect, it } from 'vitest';
import { arg, complex, pow, type Complex } from 'mathjs';
import type { NetworkData, ParameterKind } from '../src/network/types.js';
import {
  DB_OF_ZERO,
  TouchstoneError,
  formatTouchstone,
  parseTouchstone,
  touchstoneExtension,
  type ComplexFormat,
  type FrequencyUnit,
  type TouchstoneVersion,
} from '../src/io/touchstone.js';

// ------------------------------------------------------------------------------------------
// helpers

/** mathjs: complex number from magnitude and angle in radians. */
const polar = (r: number, phi: number): Complex => complex({ r, phi });

/** Small deterministic generator for test inputs (mulberry32, common practice). */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function makeNet(ports: number, nf: number, parameter: ParameterKind, refs: number[], seed: number): NetworkData {
  const r = rng(seed);
  const freqs = new Float64Array(nf);
  let f = 1e3 + r() * 1e6;
  for (let k = 0; k < nf; k++) {
    freqs[k] = f;
    f += 1e5 + r() * 3e8;
  }
  const scale = parameter === 'Z' ? 100 : parameter === 'Y' ? 0.01 : 1;
  const values = new Float64Array(2 * ports * ports * nf);
  for (let x = 0; x < values.length; x++) {
    // magnitudes from 1e-4 to 1e2 times the scale, both signs
    values[x] = (r() < 0.5 ? -1 : 1) * scale * Math.pow(10, -4 + 6 * r());
  }
  return { parameter, ports, frequencies: freqs, references: Float64Array.from(refs), values };
}

/**
 * Same network within `rel` relative error: frequencies |Δf| <= rel·f; each complex entry
 * |Δx| <= rel·|x| + 1e-300 (the floor only matters for exact zeros).
 */
function expectClose(got: NetworkData, want: NetworkData, rel = 1e-12): void {
  expect(got.parameter).toBe(want.parameter);
  expect(got.ports).toBe(want.ports);
  expect(Array.from(got.references)).toEqual(Array.from(want.references));
  expect(got.frequencies.length).toBe(want.frequencies.length);
  for (let k = 0; k < want.frequencies.length; k++) {
    const d = Math.abs(got.frequencies[k]! - want.frequencies[k]!);
    if (!(d <= rel * want.frequencies[k]!)) {
      throw new Error(`frequency ${k}: got ${got.frequencies[k]}, want ${want.frequencies[k]}`);
    }
  }
  expect(got.values.length).toBe(want.values.length);
  for (let x = 0; x < want.values.length; x += 2) {
    const d = Math.hypot(got.values[x]! - want.values[x]!, got.values[x + 1]! - want.values[x + 1]!);
    const m = Math.hypot(want.values[x]!, want.values[x + 1]!);
    if (!(d <= rel * m + 1e-300)) {
      throw new Error(`entry ${x / 2}: got (${got.values[x]}, ${got.values[x + 1]}), want (${want.values[x]}, ${want.values[x + 1]}), |Δ|/|x| = ${d / m}`);
    }
  }
}

function expectTouchstoneError(fn: () => unknown, line: number, column: number | undefined, message: RegExp): TouchstoneError {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(TouchstoneError);
  const err = caught as TouchstoneError;
  expect(err.message).toMatch(message);
  expect(err.line).toBe(line);
  if (column !== undefined) expect(err.column).toBe(column);
  return err;
}

/** (re, im) of N(i, j) at frequency k (1-based i, j). */
function entry(net: NetworkData, k: number, i: number, j: number): [number, number] {
  const n = net.ports;
  const at = 2 * ((k * n + (i - 1)) * n + (j - 1));
  return [net.values[at]!, net.values[at + 1]!];
}

function expectComplex(got: [number, number], re: number, im: number, tol = 1e-12): void {
  expect(Math.abs(got[0] - re)).toBeLessThanOrEqual(tol);
  expect(Math.abs(got[1] - im)).toBeLessThanOrEqual(tol);
}

/** Network whose entry (i, j) at point k is (10i + j + 100k, -(10i + j)) — easy to spot in text. */
function labelledNet(ports: number, nf: number, parameter: ParameterKind = 'S', refs?: number[]): NetworkData {
  const values = new Float64Array(2 * ports * ports * nf);
  for (let k = 0; k < nf; k++)
    for (let i = 1; i <= ports; i++)
      for (let j = 1; j <= ports; j++) {
        const at = 2 * ((k * ports + (i - 1)) * ports + (j - 1));
        values[at] = 10 * i + j + 100 * k;
        values[at + 1] = -(10 * i + j);
      }
  const frequencies = new Float64Array(nf);
  for (let k = 0; k < nf; k++) frequencies[k] = (k + 1) * 1e9;
  return { parameter, ports, frequencies, references: Float64Array.from(refs ?? new Array<number>(ports).fill(50)), values };
}

/** Lines of the network data (no comments, option line or keywords). */
function dataLines(text: string): string[] {
  return text.split('\n').filter((l) => l.trim() !== '' && !/^\s*[!#[]/.test(l));
}

const nums = (line: string): number[] => line.trim().split(/\s+/).map(Number);

// ------------------------------------------------------------------------------------------

describe('round trips write → read', () => {
  const formats: ComplexFormat[] = ['RI', 'MA', 'DB'];
  const versions: TouchstoneVersion[] = ['1.1', '2.0'];
  const units: FrequencyUnit[] = ['Hz', 'kHz', 'MHz', 'GHz'];
  for (let ports = 1; ports <= 5; ports++) {
    for (const version of versions) {
      for (const format of formats) {
        it(`${ports}-port S, v${version}, ${format}: equal within 1e-12 relative`, () => {
          const refs = version === '1.1' ? new Array<number>(ports).fill(75) : [50, 75, 25.5, 100, 33.3].slice(0, ports);
          const unit = units[(ports + format.length) % units.length]!;
          const net = makeNet(ports, 7, 'S', refs, 1000 * ports + format.charCodeAt(0));
          const text = formatTouchstone(net, { version, format, frequencyUnit: unit });
          const back = parseTouchstone(text, { fileName: `dut${touchstoneExtension(ports)}` });
          expectClose(back, net, 1e-12);
        });
      }
    }
  }

  for (const unit of units) {
    it(`frequency unit ${unit}: option line names it and frequencies come back in Hz`, () => {
      const net = makeNet(2, 4, 'S', [50, 50], 77);
      const text = formatTouchstone(net, { frequencyUnit: unit });
      expect(text).toContain(`# ${unit} S RI R 50\n`);
      const scale = { Hz: 1, kHz: 1e3, MHz: 1e6, GHz: 1e9 }[unit];
      // first data token is f / scale (within the 15 significant digits written)
      const f0 = nums(dataLines(text)[0]!)[0]!;
      expect(Math.abs(f0 * scale - net.frequencies[0]!)).toBeLessThanOrEqual(1e-14 * net.frequencies[0]!);
      expectClose(parseTouchstone(text, { ports: 2 }), net);
    });
  }

  for (const parameter of ['Z', 'Y'] as const) {
    for (const version of versions) {
      for (const format of formats) {
        it(`3-port ${parameter}, v${version}, ${format}: values come back in ${parameter === 'Z' ? 'ohms' : 'siemens'}`, () => {
          const refs = version === '1.1' ? [50, 50, 50] : [50, 75, 10];
          const net = makeNet(3, 5, parameter, refs, parameter.charCodeAt(0) + format.charCodeAt(1));
          const back = parseTouchstone(formatTouchstone(net, { version, format }), { ports: 3 });
          expectClose(back, net, 1e-12);
        });
      }
    }
  }

  it('exact zeros survive DB (written as 20·log10 of the smallest double) and MA', () => {
    const net = makeNet(2, 3, 'S', [50, 50], 5);
    net.values[2] = 0; // S(1,2) real part at k = 0 ...
    net.values[3] = 0; // ... and imaginary part: an exact zero
    for (const format of ['DB', 'MA'] as const) {
      const text = formatTouchstone(net, { format });
      const back = parseTouchstone(text, { ports: 2 });
      expectClose(back, net, 1e-12);
      expect(Math.hypot(back.values[2]!, back.values[3]!)).toBeLessThanOrEqual(1e-300);
    }
    // the dB value of that zero: the smallest positive double is 2^-1074 (IEEE 754 binary64
    // subnormal), so 20·log10(2^-1074) = -1074·20·log10(2) ≈ -6466.12; tolerance 1e-9
    expect(Math.abs(DB_OF_ZERO - -1074 * 20 * Math.log10(2))).toBeLessThanOrEqual(1e-9);
  });

  it('digits rounds data values, never frequencies', () => {
    const net = labelledNet(1, 2);
    net.frequencies[0] = 1.000000001e9;
    net.frequencies[1] = 1.000000002e9;
    const lines = dataLines(formatTouchstone(net, { digits: 3, frequencyUnit: 'GHz' }));
    expect(lines[0]!.split(/\s+/)[0]).toBe('1.000000001');
    expect(lines[1]!.split(/\s+/)[0]).toBe('1.000000002');
    expect(lines[0]!.trim().split(/\s+/)[1]).toBe('1.10e+01'); // 11 with 3 significant digits
  });

  it('18 significant digits are refused; digits 17 still round-trips', () => {
    const net = makeNet(2, 2, 'S', [50, 50], 9);
    expect(() => formatTouchstone(net, { digits: 18 })).toThrow(RangeError);
    expectClose(parseTouchstone(formatTouchstone(net, { digits: 17, format: 'MA' }), { ports: 2 }), net, 1e-12);
  });
});

describe('writer layout', () => {
  it('option line is "# <unit> <param> <format> R <ref>" (Touchstone 1.1, from memory)', () => {
    const text = formatTouchstone(labelledNet(1, 1, 'S', [75]), { frequencyUnit: 'MHz', format: 'MA' });
    expect(text.split('\n')[0]).toBe('# MHz S MA R 75');
  });

  it('two-port data order is N11 N21 N12 N22 on one line (Touchstone 1.1, from memory)', () => {
    const text = formatTouchstone(labelledNet(2, 1), { format: 'RI', frequencyUnit: 'GHz' });
    const lines = dataLines(text);
    expect(lines).toHaveLength(1);
    // labelledNet: N(i,j) = (10i + j, -(10i + j)) at k = 0
    expect(nums(lines[0]!)).toEqual([1, 11, -11, 21, -21, 12, -12, 22, -22]);
  });

  it('3-port: one matrix row per line, row-major, three pairs each (Touchstone 1.1, from memory)', () => {
    const text = formatTouchstone(labelledNet(3, 2), {});
    const lines = dataLines(text);
    expect(lines).toHaveLength(6);
    expect(nums(lines[0]!)).toEqual([1, 11, -11, 12, -12, 13, -13]);
    expect(nums(lines[1]!)).toEqual([21, -21, 22, -22, 23, -23]);
    expect(nums(lines[2]!)).toEqual([31, -31, 32, -32, 33, -33]);
    expect(nums(lines[3]!)).toEqual([2, 111, -11, 112, -12, 113, -13]);
    // continuation lines are indented (our choice), the frequency line is not
    expect(lines[1]!.startsWith(' ')).toBe(true);
    expect(lines[3]!.startsWith(' ')).toBe(false);
  });

  it('4-port: one row of four pairs per line (Touchstone 1.1, from memory)', () => {
    const lines = dataLines(formatTouchstone(labelledNet(4, 1), {}));
    expect(lines).toHaveLength(4);
    expect(nums(lines[0]!)).toEqual([1, 11, -11, 12, -12, 13, -13, 14, -14]);
    expect(nums(lines[3]!)).toEqual([41, -41, 42, -42, 43, -43, 44, -44]);
  });

  it('5- and 6-port: rows wrap after four pairs, each row starts a new line (Touchstone 1.1, from memory)', () => {
    const lines5 = dataLines(formatTouchstone(labelledNet(5, 1), {}));
    expect(lines5).toHaveLength(10); // 5 rows × (4 + 1 pairs)
    expect(nums(lines5[0]!)).toEqual([1, 11, -11, 12, -12, 13, -13, 14, -14]);
    expect(nums(lines5[1]!)).toEqual([15, -15]);
    expect(nums(lines5[2]!)).toEqual([21, -21, 22, -22, 23, -23, 24, -24]);
    expect(nums(lines5[9]!)).toEqual([55, -55]);
    const lines6 = dataLines(formatTouchstone(labelledNet(6, 1), {}));
    expect(lines6).toHaveLength(12);
    expect(nums(lines6[1]!)).toEqual([15, -15, 16, -16]);
    for (const l of [...lines5, ...lines6]) expect(nums(l).length).toBeLessThanOrEqual(9);
  });

  it('v2.0 keywords in order, 21_12 order matching the N11 N21 N12 N22 data (Touchstone 2.0, from memory)', () => {
    const net = labelledNet(2, 2, 'S', [50, 75]);
    net.comments = ['made for a test'];
    const text = formatTouchstone(net, { version: '2.0', frequencyUnit: 'GHz', format: 'RI' });
    const lines = text.split('\n');
    expect(lines.slice(0, 10)).toEqual([
      '! made for a test',
      '[Version] 2.0',
      '# GHz S RI R 50',
      '[Number of Ports] 2',
      '[Two-Port Data Order] 21_12',
      '[Number of Frequencies] 2',
      '[Reference] 50 75',
      '[Matrix Format] Full',
      '[Network Data]',
      lines[9],
    ]);
    expect(nums(lines[9]!)).toEqual([1, 11, -11, 21, -21, 12, -12, 22, -22]);
    expect(lines[lines.length - 2]).toBe('[End]');
    expect(lines[lines.length - 1]).toBe(''); // file ends with a newline
  });

  it('v2.0 with 3 ports has no [Two-Port Data Order]', () => {
    const text = formatTouchstone(labelledNet(3, 1), { version: '2.0' });
    expect(text).not.toContain('[Two-Port Data Order]');
    expect(text).toContain('[Number of Ports] 3\n[Number of Frequencies] 1\n[Reference] 50 50 50\n');
  });

  it('v1.1 refuses different port references and suggests 2.0', () => {
    expect(() => formatTouchstone(labelledNet(2, 1, 'S', [50, 75]), { version: '1.1' })).toThrow(/2\.0/);
  });

  it('v1.1 normalises Z to R, v2.0 writes ohms (1.1 and 2.0, from memory)', () => {
    // Z11 = 50 + 25j ohm with R = 50: normalised z11 = 1 + 0.5j
    const net: NetworkData = {
      parameter: 'Z', ports: 1, frequencies: Float64Array.from([1e9]),
      references: Float64Array.from([50]), values: Float64Array.from([50, 25]),
    };
    expect(nums(dataLines(formatTouchstone(net, { version: '1.1' }))[0]!)).toEqual([1, 1, 0.5]);
    expect(nums(dataLines(formatTouchstone(net, { version: '2.0' }))[0]!)).toEqual([1, 50, 25]);
    // Y11 = 0.02 - 0.01j S with R = 50: normalised y11 = 1 - 0.5j
    const y: NetworkData = { ...net, parameter: 'Y', values: Float64Array.from([0.02, -0.01]) };
    const [, yr, yi] = nums(dataLines(formatTouchstone(y, { version: '1.1' }))[0]!);
    expect(Math.abs(yr! - 1)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs(yi! + 0.5)).toBeLessThanOrEqual(1e-14);
  });

  it('DB is 20·log10|x| and degrees, MA is magnitude and degrees (common practice; mathjs for the angle)', () => {
    // S11 = 0.1j: |S11| = 0.1 → -20 dB, angle 90°
    const net: NetworkData = {
      parameter: 'S', ports: 1, frequencies: Float64Array.from([2e9]),
      references: Float64Array.from([50]), values: Float64Array.from([0, 0.1]),
    };
    const db = nums(dataLines(formatTouchstone(net, { format: 'DB' }))[0]!);
    expect(Math.abs(db[1]! + 20)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(db[2]! - 90)).toBeLessThanOrEqual(1e-12);
    const ma = nums(dataLines(formatTouchstone(net, { format: 'MA' }))[0]!);
    expect(Math.abs(ma[1]! - 0.1)).toBeLessThanOrEqual(1e-15);
    // -0.3 - 0.4j: |.| = 0.5 (3-4-5 triangle), angle from mathjs arg() in degrees (third quadrant)
    const net2 = { ...net, values: Float64Array.from([-0.3, -0.4]) };
    const ma2 = nums(dataLines(formatTouchstone(net2, { format: 'MA' }))[0]!);
    expect(Math.abs(ma2[1]! - 0.5)).toBeLessThanOrEqual(1e-14);
    const wantDeg = (arg(complex(-0.3, -0.4)) * 180) / Math.PI;
    expect(wantDeg).toBeLessThan(-90); // sanity: third quadrant
    expect(Math.abs(ma2[2]! - wantDeg)).toBeLessThanOrEqual(1e-12);
  });

  it('deterministic: fixed text for simple values, same bytes on every call', () => {
    const net: NetworkData = {
      parameter: 'S', ports: 2, frequencies: Float64Array.from([1.5e9, 2e9]),
      references: Float64Array.from([50, 50]),
      values: Float64Array.from([0.5, -0.25, 0.125, 0, -0, 1, 0.75, -0.5, 0.5, 0.25, 0, 0, 0, 0, 1, -1]),
      title: 'fixture',
    };
    const text = formatTouchstone(net, { digits: 4, comments: ['two lines', 'of comment'] });
    // Expected text follows our documented number rule (exponent form, `digits` significant
    // digits, two-digit exponent, a space in place of the sign of non-negative values,
    // -0 written as 0); data order N11 N21 N12 N22.
    expect(text).toBe(
      '! fixture\n! two lines\n! of comment\n# GHz S RI R 50\n' +
        '1.5  5.000e-01 -2.500e-01  0.000e+00  1.000e+00  1.250e-01  0.000e+00  7.500e-01 -5.000e-01\n' +
        '2  5.000e-01  2.500e-01  0.000e+00  0.000e+00  0.000e+00  0.000e+00  1.000e+00 -1.000e+00\n',
    );
    const big = makeNet(4, 20, 'S', [50, 50, 50, 50], 3);
    const a = formatTouchstone(big, { format: 'DB' });
    const b = formatTouchstone(big, { format: 'DB' });
    expect(a).toBe(b);
    // 15 significant digits by default
    expect(dataLines(a)[0]!.trim().split(/\s+/)[1]).toMatch(/^-?\d\.\d{14}e[+-]\d{2,3}$/);
  });

  it('refuses malformed data', () => {
    const net = labelledNet(2, 2);
    net.values[3] = Number.NaN;
    expect(() => formatTouchstone(net, {})).toThrow(/not finite/);
    const net2 = labelledNet(2, 2);
    net2.frequencies[1] = net2.frequencies[0]!;
    expect(() => formatTouchstone(net2, {})).toThrow(/increase/);
    const net3 = labelledNet(2, 1);
    net3.values = new Float64Array(6);
    expect(() => formatTouchstone(net3, {})).toThrow(/values/);
  });

  it('touchstoneExtension gives .sNp', () => {
    expect(touchstoneExtension(1)).toBe('.s1p');
    expect(touchstoneExtension(2)).toBe('.s2p');
    expect(touchstoneExtension(12)).toBe('.s12p');
    expect(() => touchstoneExtension(0)).toThrow(RangeError);
  });
});

describe('reading hand-written files', () => {
  // Our own 2-port file in the style of the 1.1 specification's examples (from memory):
  // comment lines, option line, one line per frequency N11 N21 N12 N22, then noise data.
  const file2p = [
    '! our own test amplifier, values invented for this test',
    '# ghz s ma r 50          ! lower case on purpose',
    '1.0  0.90 -20.0  3.00 150.0  0.05 60.0  0.80 -30.0',
    '2.0  0.80 -45.0  2.50 120.0  0.07 50.0  0.70 -55.0 ! trailing comment',
    '',
    '! noise: f NFmin |Gopt| ang(Gopt) Rn/R',
    '1.0  1.2 0.50 30.0 0.40',
    '2.0  1.5 0.45 60.0 0.35',
  ].join('\n');

  it('1.1 2-port, MA, with noise block skipped (mathjs polar → rectangular)', () => {
    const net = parseTouchstone(file2p, { fileName: 'amp.S2P' });
    expect(net.parameter).toBe('S');
    expect(net.ports).toBe(2);
    expect(Array.from(net.frequencies)).toEqual([1e9, 2e9]);
    expect(Array.from(net.references)).toEqual([50, 50]);
    const deg = Math.PI / 180;
    // the file says S11 = 0.9∠-20°, S21 = 3∠150°, S12 = 0.05∠60°, S22 = 0.8∠-30° at 1 GHz
    const want: Array<[number, number, number, number]> = [
      [1, 1, 0.9, -20], [2, 1, 3.0, 150], [1, 2, 0.05, 60], [2, 2, 0.8, -30],
    ];
    for (const [i, j, m, a] of want) {
      const c = polar(m, a * deg);
      expectComplex(entry(net, 0, i, j), c.re, c.im, 1e-14);
    }
    const c = polar(2.5, 120 * deg); // S21 at 2 GHz
    expectComplex(entry(net, 1, 2, 1), c.re, c.im, 1e-14);
    expect(net.comments?.[0]).toBe('our own test amplifier, values invented for this test');
    expect(net.comments).toContain('trailing comment');
  });

  it('option-line defaults GHz S MA R 50 (Touchstone 1.1, from memory)', () => {
    const net = parseTouchstone('#\n2.5 0.5 90\n', { ports: 1 });
    expect(net.parameter).toBe('S');
    expect(Array.from(net.frequencies)).toEqual([2.5e9]);
    expect(Array.from(net.references)).toEqual([50]);
    const c = polar(0.5, Math.PI / 2); // MA: 0.5∠90°
    expectComplex(entry(net, 0, 1, 1), c.re, c.im, 1e-15);
    // fields in another order, only some given
    const n2 = parseTouchstone('# R 75 kHz\n1.5 0.5 0\n', { ports: 1 });
    expect(Array.from(n2.frequencies)).toEqual([1500]);
    expect(Array.from(n2.references)).toEqual([75]);
  });

  it('DB format: -20 dB at 90° is 0.1j (mathjs pow for 10^(dB/20))', () => {
    const net = parseTouchstone('# Hz S DB R 50\n100 -20 90\n200 -6 -180\n', { ports: 1 });
    const m = pow(10, -20 / 20) as number;
    const c = polar(m, Math.PI / 2);
    expectComplex(entry(net, 0, 1, 1), c.re, c.im, 1e-15);
    const m2 = pow(10, -6 / 20) as number;
    expectComplex(entry(net, 1, 1, 1), -m2, 0, 1e-15);
    expect(Array.from(net.frequencies)).toEqual([100, 200]);
  });

  it('1.1 3-port RI, one matrix row per line (Touchstone 1.1, from memory)', () => {
    const text = [
      '# MHz S RI R 50',
      '100  0.11 -0.01  0.12 -0.02  0.13 -0.03',
      '     0.21 -0.04  0.22 -0.05  0.23 -0.06',
      '     0.31 -0.07  0.32 -0.08  0.33 -0.09',
      '200  1.11 -1.01  1.12 -1.02  1.13 -1.03',
      '     1.21 -1.04  1.22 -1.05  1.23 -1.06',
      '     1.31 -1.07  1.32 -1.08  1.33 -1.09',
    ].join('\r\n'); // CRLF on purpose
    const net = parseTouchstone(text, { fileName: 'x.s3p' });
    expect(Array.from(net.frequencies)).toEqual([1e8, 2e8]);
    expect(entry(net, 0, 1, 2)).toEqual([0.12, -0.02]);
    expect(entry(net, 0, 2, 1)).toEqual([0.21, -0.04]);
    expect(entry(net, 0, 3, 3)).toEqual([0.33, -0.09]);
    expect(entry(net, 1, 2, 3)).toEqual([1.23, -1.06]);
  });

  it('1.1 Z and Y are denormalised with R (Touchstone 1.1, from memory)', () => {
    const z = parseTouchstone('# GHz Z RI R 50\n1 1 0.5\n', { ports: 1 });
    expect(z.parameter).toBe('Z');
    expect(entry(z, 0, 1, 1)).toEqual([50, 25]);
    const y = parseTouchstone('# GHz Y RI R 50\n1 1 -0.5\n', { ports: 1 });
    expect(y.parameter).toBe('Y');
    expectComplex(entry(y, 0, 1, 1), 0.02, -0.01, 1e-17);
  });

  it('2.0 2-port with 12_21 order, per-port references over two lines, information block and noise data', () => {
    const text = [
      '! our own 2.0 file',
      '[Version] 2.0',
      '# MHz Z RI R 50',
      '[Number of Ports] 2',
      '[Two-Port Data Order] 12_21',
      '[Number of Frequencies] 2',
      '[Number of Noise Frequencies] 1',
      '[Reference] 50',
      '75',
      '[Begin Information]',
      '# this is not an option line, it is inside the information block',
      '[End Information]',
      '[Network Data]',
      '10  50 1  20 2  30 3  60 4',
      '20  51 1  21 2  31 3  61 4',
      '[Noise Data]',
      '10 1.2 0.5 30 0.4',
      '[End]',
    ].join('\n');
    const net = parseTouchstone(text);
    expect(net.ports).toBe(2);
    expect(Array.from(net.references)).toEqual([50, 75]);
    expect(Array.from(net.frequencies)).toEqual([1e7, 2e7]);
    // 12_21 means N11 N12 N21 N22 (Touchstone 2.0, from memory); 2.0 Z is not normalised
    expect(entry(net, 0, 1, 1)).toEqual([50, 1]);
    expect(entry(net, 0, 1, 2)).toEqual([20, 2]);
    expect(entry(net, 0, 2, 1)).toEqual([30, 3]);
    expect(entry(net, 0, 2, 2)).toEqual([60, 4]);
    expect(entry(net, 1, 1, 2)).toEqual([21, 2]);
  });

  it('2.0 21_12 order and case-insensitive keywords', () => {
    const text = [
      '[VERSION] 2.0',
      '# GHz S RI R 50',
      '[number of  PORTS] 2',
      '[two-port data order] 21_12',
      '[Number Of Frequencies] 1',
      '[network data]',
      '1  0.1 0  0.2 0  0.3 0  0.4 0',
      '[end]',
    ].join('\n');
    const net = parseTouchstone(text);
    expect(entry(net, 0, 2, 1)).toEqual([0.2, 0]);
    expect(entry(net, 0, 1, 2)).toEqual([0.3, 0]);
  });

  it('2.0 Lower and Upper matrix formats fill the mirror entries (Touchstone 2.0, from memory)', () => {
    const head = (fmt: string): string[] => [
      '[Version] 2.0', '# GHz Y RI R 50', '[Number of Ports] 3', '[Number of Frequencies] 1',
      `[Matrix Format] ${fmt}`, '[Network Data]',
    ];
    const lower = parseTouchstone([...head('Lower'), '1 11 1', '21 2 22 2', '31 3 32 3 33 3', '[End]'].join('\n'));
    expect(lower.parameter).toBe('Y');
    expect(entry(lower, 0, 1, 1)).toEqual([11, 1]); // 2.0 Y is in siemens, not normalised
    expect(entry(lower, 0, 2, 1)).toEqual([21, 2]);
    expect(entry(lower, 0, 1, 2)).toEqual([21, 2]);
    expect(entry(lower, 0, 1, 3)).toEqual([31, 3]);
    expect(entry(lower, 0, 3, 2)).toEqual([32, 3]);
    expect(entry(lower, 0, 2, 3)).toEqual([32, 3]);
    const upper = parseTouchstone([...head('upper'), '1 11 1 12 1 13 1', '22 2 23 2', '33 3', '[End]'].join('\n'));
    expect(entry(upper, 0, 1, 2)).toEqual([12, 1]);
    expect(entry(upper, 0, 2, 1)).toEqual([12, 1]);
    expect(entry(upper, 0, 3, 1)).toEqual([13, 1]);
    expect(entry(upper, 0, 3, 2)).toEqual([23, 2]);
    expect(entry(upper, 0, 3, 3)).toEqual([33, 3]);
  });

  it('port count for 1.1 from the ports option, which wins over the file name', () => {
    const text = '# GHz S RI R 50\n1 0.1 0.2\n2 0.3 0.4\n';
    expect(parseTouchstone(text, { fileName: 'a.s2p', ports: 1 }).ports).toBe(1);
    expect(parseTouchstone(text, { fileName: 'dir.s2p/a.S1P' }).ports).toBe(1);
  });
});

describe('reader errors carry file, line and column', () => {
  const s2p = (lines: string[]): string => lines.join('\n');

  it('a 2-port point with a number missing: error at the line of that point', () => {
    const text = s2p([
      '# GHz S RI R 50',
      '1 0.1 0 0.2 0 0.3 0 0.4 0',
      '2 0.1 0 0.2 0 0.3 0 0.4', // 8 numbers, 9 needed
      '3 0.1 0 0.2 0 0.3 0 0.4 0',
    ]);
    const err = expectTouchstoneError(() => parseTouchstone(text, { fileName: 'f.s2p' }), 3, 1, /wrong count of numbers/);
    expect(err.file).toBe('f.s2p');
    expect(err.describe()).toMatch(/^f\.s2p:3:1: /);
  });

  it('too many numbers on a line: error at the first extra number', () => {
    const text = s2p(['# GHz S RI R 50', '1 0.1 0 0.2 0 0.3 0 0.4 0 9']);
    expectTouchstoneError(() => parseTouchstone(text, { ports: 2 }), 2, 27, /too many numbers/);
  });

  it('last point cut short at the end of the file', () => {
    const text = s2p(['# GHz S RI R 50', '1 0.1 0 0.2 0 0.3 0', '         0.4']);
    expectTouchstoneError(() => parseTouchstone(text, { ports: 2 }), 2, 1, /has 8, needs 9/);
  });

  it('non-numeric token', () => {
    const text = s2p(['! header', '# GHz S RI R 50', '1 0.1 0 0.2 O.3']);
    expectTouchstoneError(() => parseTouchstone(text, { ports: 2 }), 3, 13, /"O\.3" is not a number/);
  });

  it('frequencies not increasing (1-port, and 2.0 2-port where noise has its own section)', () => {
    expectTouchstoneError(() => parseTouchstone('# GHz S RI R 50\n1 0 0\n1 0 0\n', { ports: 1 }), 3, 1, /must increase/);
    const v2 = s2p([
      '[Version] 2.0', '# GHz S RI R 50', '[Number of Ports] 2', '[Two-Port Data Order] 12_21',
      '[Number of Frequencies] 2', '[Network Data]', '2 0 0 0 0 0 0 0 0', '1 0 0 0 0 0 0 0 0', '[End]',
    ]);
    expectTouchstoneError(() => parseTouchstone(v2), 8, 1, /must increase/);
  });

  it('1.1 2-port: a falling frequency starts the noise block, whose lines have 5 numbers', () => {
    const text = s2p(['# GHz S RI R 50', '1 0 0 0 0 0 0 0 0', '2 0 0 0 0 0 0 0 0', '1 0 0 0 0 0 0 0 0']);
    expectTouchstoneError(() => parseTouchstone(text, { ports: 2 }), 4, 11, /noise data line has 5 numbers/);
  });

  it('missing option line', () => {
    expectTouchstoneError(() => parseTouchstone('! no option line\n1 0 0\n', { ports: 1 }), 2, 1, /missing option line/);
    expectTouchstoneError(() => parseTouchstone('! nothing\n', { ports: 1 }), 1, 1, /missing option line/);
  });

  it('unknown option-line field, and H parameters', () => {
    expectTouchstoneError(() => parseTouchstone('# GHz S XY R 50\n', { ports: 1 }), 1, 9, /unknown option-line field "XY"/);
    expectTouchstoneError(() => parseTouchstone('# GHz H RI\n', { ports: 2 }), 1, 7, /not supported/);
    expectTouchstoneError(() => parseTouchstone('# GHz S RI R\n', { ports: 1 }), 1, 12, /R needs a resistance/);
  });

  it('unknown keyword in 2.0; 2.0 keyword in a 1.1 file; [Version] not first', () => {
    const v2 = s2p(['[Version] 2.0', '# GHz S RI R 50', '[Number of Ports] 1', '  [Number of Widgets] 3']);
    expectTouchstoneError(() => parseTouchstone(v2), 4, 3, /unknown keyword \[Number of Widgets\]/);
    expectTouchstoneError(() => parseTouchstone('# GHz S RI R 50\n[Number of Ports] 1\n', { ports: 1 }), 2, 1, /belongs to Touchstone 2\.0/);
    expectTouchstoneError(() => parseTouchstone('# GHz S RI R 50\n[Version] 2.0\n'), 2, 1, /must be the first line/);
  });

  it('2.0 structure: count mismatch, missing [Two-Port Data Order], missing [End], [Reference] count', () => {
    const base = ['[Version] 2.0', '# GHz S RI R 50', '[Number of Ports] 2', '[Two-Port Data Order] 21_12'];
    const fewer = s2p([...base, '[Number of Frequencies] 3', '[Network Data]', '1 0 0 0 0 0 0 0 0', '2 0 0 0 0 0 0 0 0', '[End]']);
    expectTouchstoneError(() => parseTouchstone(fewer), 9, 1, /says 3, but \[Network Data\] has 2/);
    const more = s2p([...base, '[Number of Frequencies] 1', '[Network Data]', '1 0 0 0 0 0 0 0 0', '2 0 0 0 0 0 0 0 0', '[End]']);
    expectTouchstoneError(() => parseTouchstone(more), 8, 1, /more frequency points/);
    const noOrder = s2p([...base.slice(0, 3), '[Number of Frequencies] 1', '[Network Data]', '1 0 0 0 0 0 0 0 0', '[End]']);
    expectTouchstoneError(() => parseTouchstone(noOrder), 5, 1, /\[Two-Port Data Order\] is required/);
    const noEnd = s2p([...base, '[Number of Frequencies] 1', '[Network Data]', '1 0 0 0 0 0 0 0 0']);
    expectTouchstoneError(() => parseTouchstone(noEnd), 7, 1, /missing \[End\]/);
    const refs = s2p([...base, '[Reference] 50 50 50']);
    expectTouchstoneError(() => parseTouchstone(refs), 5, 19, /one too many/);
    const version = s2p(['[Version] 3.0']);
    expectTouchstoneError(() => parseTouchstone(version), 1, 11, /unsupported Touchstone version/);
  });

  it('1.1 without a port count', () => {
    expectTouchstoneError(() => parseTouchstone('# GHz S RI R 50\n1 0 0\n', { fileName: 'data.txt' }), 2, 1, /unknown port count/);
  });
});
