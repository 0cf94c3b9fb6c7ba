// Issue 14, network-data readers: resource limits, no non-finite value, noise sections warned.
// Layouts follow the Touchstone File Format Specification 1.1 (2002) and 2.0 (2009), IBIS Open
// Forum (from memory, as in src/io/touchstone.ts). Limits come from src/limits.ts.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { JsonNetworkError, formatJson, parseJson } from '../src/io/json.js';
import { parseTouchstone, TouchstoneError } from '../src/io/touchstone.js';
import { MAX_NETWORK_VALUES, MAX_PORTS, MAX_REFERENCE_OHMS } from '../src/limits.js';
import { loadNetlist } from '../src/load.js';
import type { NetworkData } from '../src/network/types.js';

const lines = (...l: string[]) => l.join('\n') + '\n';

/** Runs `fn` and returns what it throws, which must be a `type`. */
function thrown<T>(fn: () => unknown, type: abstract new (...args: never[]) => T): T {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(type);
  return caught as T;
}

/** Runs `fn`, expects a TouchstoneError at (line, column) whose message matches. */
function located(fn: () => unknown, line: number, column: number, message: RegExp): TouchstoneError {
  const err = thrown(fn, TouchstoneError);
  expect(err.message).toMatch(message);
  expect([err.line, err.column]).toEqual([line, column]);
  return err;
}

function allFinite(net: NetworkData): boolean {
  return [net.frequencies, net.values, net.references].every((a) => a.every((x) => Number.isFinite(x)));
}

describe('resource limits of the readers', () => {
  it('a .s9000p file name stops at the port limit, before any matrix is allocated', () => {
    const err = located(() => parseTouchstone(lines('# GHz S RI R 50', '1 0 0'), { fileName: 'x.s9000p' }), 2, 1, new RegExp(`9000 ports.*limit of ${MAX_PORTS}`));
    expect(err.describe()).toMatch(/^x\.s9000p:2:1: /);
  });

  it('[Number of Ports] 100000 stops at the port limit on that line', () => {
    const text = lines('[Version] 2.0', '# GHz S RI R 50', '[Number of Ports] 100000', '[Number of Frequencies] 1', '[Network Data]', '1 0 0', '[End]');
    located(() => parseTouchstone(text), 3, 19, new RegExp(`limit of ${MAX_PORTS} ports`));
  });

  it('[Number of Frequencies] whose points × ports² pass MAX_NETWORK_VALUES stops there', () => {
    // 1000 ports: 1e6 values a point, so 101 points are 1.01e8 > 1e8.
    const text = lines('[Version] 2.0', '# GHz S RI R 50', '[Number of Ports] 1000', '[Number of Frequencies] 101', '[Network Data]', '[End]');
    located(() => parseTouchstone(text), 4, 25, new RegExp(`limit of ${MAX_NETWORK_VALUES}`));
  });

  it('JSON "ports": 100000 is refused at the "ports" key, stating the limit', () => {
    const text = `{\n  "schema": "scatterbox.network/1",\n  "parameter": "S",\n  "ports": 100000,\n  "references_ohm": [],\n  "frequency_hz": [],\n  "data": []\n}\n`;
    const e = thrown(() => parseJson(text), JsonNetworkError);
    expect(e.message).toMatch(new RegExp(`"ports" is 100000, above the limit of ${MAX_PORTS}`));
    expect([e.line, e.column]).toEqual([4, 3]);
  });

  it('JSON whose points × ports² pass MAX_NETWORK_VALUES is refused before the values are allocated', () => {
    const freqs = Array.from({ length: 101 }, (_, k) => k + 1);
    const text = JSON.stringify({ schema: 'scatterbox.network/1', parameter: 'S', ports: 1000, references_ohm: new Array(1000).fill(50), frequency_hz: freqs, data: [] });
    expect(() => parseJson(text)).toThrow(new RegExp(`101000000 complex values, above the limit of ${MAX_NETWORK_VALUES}`));
  });
});

describe('no non-finite value from the Touchstone reader', () => {
  it('frequency 1e300 with unit GHz overflows: located at the number', () => {
    // 1e300 · 1e9 = 1e309 > Number.MAX_VALUE ≈ 1.7977e308 (IEEE 754 binary64).
    located(() => parseTouchstone(lines('# GHz S RI R 50', '1e300 0.5 0'), { ports: 1 }), 2, 1, /frequency 1e300 GHz is beyond the range/);
  });

  it('DB 7000 is a magnitude of 1e350: located at the dB value', () => {
    // 10^(7000/20) = 1e350 > 1.7977e308.
    located(() => parseTouchstone(lines('# GHz S DB R 50', '1 7000 0'), { ports: 1 }), 2, 3, /S11: 7000 dB is a magnitude of 10\^350/);
    // the dB value can be on a continuation line of a 3-port; the place is still that number's
    const text = lines('# GHz S DB R 50', '1 0 0 0 0 0 0', '  0 0 0 0 0 0', '  0 0 0 0 9000 90');
    located(() => parseTouchstone(text, { ports: 3 }), 4, 11, /S33: 9000 dB/);
  });

  it('version 1.1 Z normalised to R: 1e308 · 50 overflows, located at the value', () => {
    // z = Z/R, so Z = z·R = 1e308·50 = 5e309 > 1.7977e308.
    located(() => parseTouchstone(lines('# GHz Z RI R 50', '1 1e308 0'), { ports: 1 }), 2, 3, /Z11 = 1e308 0 \(RI\) times the reference normalisation R = 50 ohm/);
  });

  it('references outside the documented range are refused where they are written', () => {
    located(() => parseTouchstone(lines('# GHz S RI R 1e300', '1 0 0'), { ports: 1 }), 1, 14, new RegExp(`option-line R 1e300 ohm is outside the range.*${MAX_REFERENCE_OHMS}`));
    located(() => parseTouchstone(lines('# GHz Y RI R 1e-320', '1 1 0'), { ports: 1 }), 1, 14, /outside the range/);
    const v2 = lines('[Version] 2.0', '# GHz S RI R 50', '[Number of Ports] 2', '[Two-Port Data Order] 21_12', '[Number of Frequencies] 1', '[Reference] 50 1e300', '[Network Data]', '1 0 0 0 0 0 0 0 0', '[End]');
    located(() => parseTouchstone(v2), 6, 16, /reference impedance 1e300 ohm is outside the range/);
  });

  it('frequencies must be non-negative and strictly increasing', () => {
    located(() => parseTouchstone(lines('# Hz S RI R 50', '-1 0 0', '2 0 0'), { ports: 1 }), 2, 1, /must not be negative/);
    located(() => parseTouchstone(lines('# Hz S RI R 50', '1 0 0', '1 0 0'), { ports: 1 }), 3, 1, /must increase/);
    located(() => parseTouchstone(lines('# Hz S RI R 50', '2 0 0', '1 0 0'), { ports: 1 }), 3, 1, /must increase/);
  });

  it('the error display shows the line with a caret under the column', () => {
    const err = located(() => parseTouchstone(lines('# GHz S DB R 50', '1   7000 0'), { ports: 1, fileName: 'a.s1p' }), 2, 5, /dB/);
    expect(err.describe().split('\n')).toEqual(['a.s1p:2:5: error: ' + err.message, ' 2 | 1   7000 0', '   |     ^']);
  });

  it('a netlist datafile statement reports the overflow at its place in the data file', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sbx-hd-'));
    writeFileSync(join(dir, 'big.s2p'), lines('# GHz S DB R 50', '1 0 0 7000 0 0 0 0 0'));
    let caught: unknown;
    try {
      loadNetlist(lines('datafile d1 file="big.s2p" p1=a p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=1 GHz'), join(dir, 'x.sbx'));
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(InputError);
    const d = (caught as InputError).diagnostics.find((x) => x.span?.file.endsWith('big.s2p'));
    expect(d?.message).toMatch(/S21: 7000 dB/);
    expect([d?.span?.line, d?.span?.column]).toEqual([2, 7]);
  });
});

describe('no non-finite value from the JSON reader', () => {
  const base = { schema: 'scatterbox.network/1', title: null, comments: [], parameter: 'S', ports: 1, references_ohm: [50], frequency_hz: [1e9], data: [[[[0.5, 0]]]] };

  it('an overflowing number (1e400 reads as Infinity in JSON.parse) is named and located', () => {
    const text = JSON.stringify(base, null, 2).replace('1000000000', '1e400');
    const e = thrown(() => parseJson(text), JsonNetworkError);
    expect(e.message).toMatch(/frequency_hz\[0\] is 1e400, beyond the range/);
    const at = text.split('\n').findIndex((l) => l.includes('1e400'));
    expect([e.line, e.column]).toEqual([at + 1, text.split('\n')[at]!.indexOf('1e400') + 1]);

    const inData = JSON.stringify(base).replace('0.5', '-2e999');
    expect(() => parseJson(inData)).toThrow(/data\[0\]\[0\]\[0\]\[0\] is -2e999/);
  });

  it('references out of range, negative and non-increasing frequencies are refused', () => {
    expect(() => parseJson(JSON.stringify({ ...base, references_ohm: [1e300] }))).toThrow(/references_ohm\[0\].*outside the range/);
    expect(() => parseJson(JSON.stringify({ ...base, frequency_hz: [-1] }))).toThrow(/must not be negative/);
    const two = { ...base, frequency_hz: [2, 2], data: [[[[0, 0]]], [[[0, 0]]]] };
    expect(() => parseJson(JSON.stringify(two))).toThrow(/frequency_hz\[1\].*must increase/);
  });

  it('a syntax error is located from the parser position (when JSON.parse gives one)', () => {
    // Node 20's JSON.parse says "… after property value in JSON at position 25" here.
    let caught: unknown;
    try {
      parseJson('{\n  "schema": "x"\n  "ports": 1\n}');
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(JsonNetworkError);
    expect([(caught as JsonNetworkError).line, (caught as JsonNetworkError).column]).toEqual([3, 3]);
  });

  it('a well-formed file still reads, with finite numbers', () => {
    const net = parseJson(JSON.stringify(base));
    expect(allFinite(net)).toBe(true);
    expect(parseJson(formatJson(net))).toEqual(net);
  });
});

describe('noise parameters of two-port files are read, kept and warned about', () => {
  // Noise block layout: frequency, NFmin (dB), |Γopt|, ∠Γopt (deg), Rn normalised (Touchstone 1.1
  // and 2.0, from memory).
  const v11 = lines('! amplifier', '# GHz S MA R 50', '1 0.5 0 2 90 0.01 0 0.4 -30', '2 0.4 0 1.8 80 0.01 0 0.4 -40', '1 0.8 0.3 40 0.25', '2 1.0 0.32 60 0.22');

  it('version 1.1: the noise block (frequency restarting) is kept and warned at its first line', () => {
    const warnings: [string, number, number][] = [];
    const net = parseTouchstone(v11, { ports: 2, onWarning: (m, l, c) => warnings.push([m, l, c]) });
    expect(net.frequencies.length).toBe(2);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]![0]).toMatch(/noise parameters .* not used yet/);
    expect(warnings[0]!.slice(1)).toEqual([5, 1]);
    expect(Array.from(net.noise!.frequencies)).toEqual([1e9, 2e9]);
    expect(Array.from(net.noise!.nfMinDb)).toEqual([0.8, 1.0]);
    expect(Array.from(net.noise!.gammaOptMagnitude)).toEqual([0.3, 0.32]);
    expect(Array.from(net.noise!.gammaOptAngleDeg)).toEqual([40, 60]);
    expect(Array.from(net.noise!.rnNormalised)).toEqual([0.25, 0.22]);
  });

  it('version 2.0: [Noise Data] is warned at the keyword', () => {
    const text = lines(
      '[Version] 2.0', '# GHz S RI R 50', '[Number of Ports] 2', '[Two-Port Data Order] 21_12', '[Number of Frequencies] 1',
      '[Number of Noise Frequencies] 1', '[Network Data]', '1 0 0 1 0 1 0 0 0', '[Noise Data]', '1 0.8 0.3 40 0.25', '[End]',
    );
    const warnings: [string, number, number][] = [];
    const net = parseTouchstone(text, { onWarning: (m, l, c) => warnings.push([m, l, c]) });
    expect(warnings.map((w) => w.slice(1))).toEqual([[9, 1]]);
    expect(net.noise?.frequencies.length).toBe(1);
  });

  it('noise frequencies are checked like network frequencies', () => {
    located(() => parseTouchstone(lines('# GHz S MA R 50', '1 0.5 0 2 90 0.01 0 0.4 -30', '1e300 0.8 0.3 40 0.25'), { ports: 2 }), 3, 1, /frequency 1e300 GHz is beyond/);
  });

  it('a datafile statement forwards the warning, located in the data file', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sbx-hd-'));
    writeFileSync(join(dir, 'amp.s2p'), v11);
    const r = loadNetlist(lines('datafile d1 file="amp.s2p" p1=a p2=b', 'port 1 plus=a', 'port 2 plus=b', 'sweep list freqs=1.5 GHz'), join(dir, 'x.sbx'));
    const w = r.warnings.filter((d) => d.span?.file.endsWith('amp.s2p'));
    expect(w).toHaveLength(1);
    expect(w[0]!.message).toMatch(/noise parameters/);
    expect([w[0]!.span!.line, w[0]!.span!.column]).toEqual([5, 1]);
  });
});

describe('loadNetworkFile: data-file errors and warnings as located diagnostics for the commands', () => {
  it('a malformed file is an InputError rendered with the line and a caret; warnings come back located', async () => {
    const { loadNetworkFile } = await import('../src/io/read.js');
    const { formatDiagnostics } = await import('../src/diagnostics/diagnostic.js');
    const dir = mkdtempSync(join(tmpdir(), 'sbx-hd-'));
    const bad = join(dir, 'bad.s1p');
    writeFileSync(bad, lines('# GHz S DB R 50', '1 7000 0'));
    let caught: unknown;
    try {
      loadNetworkFile(bad);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(InputError);
    const text = formatDiagnostics((caught as InputError).diagnostics, (caught as InputError).sources!);
    expect(text.split('\n').slice(0, 3)).toEqual([`${bad}:2:3: error: S11: 7000 dB is a magnitude of 10^350, beyond the range of double-precision numbers (about 1.8e308)`, ' 2 | 1 7000 0', '   |   ^']);
    const amp = join(dir, 'amp.s2p');
    writeFileSync(amp, lines('# GHz S MA R 50', '1 0.5 0 2 90 0.01 0 0.4 -30', '0.5 0.8 0.3 40 0.25'));
    const r = loadNetworkFile(amp);
    expect(r.net.noise?.frequencies.length).toBe(1);
    expect(r.warnings.map((w) => [w.span?.line, w.span?.column])).toEqual([[3, 1]]);
    const json = join(dir, 'big.json');
    writeFileSync(json, '{\n  "schema": "scatterbox.network/1",\n  "parameter": "S",\n  "ports": 100000\n}\n');
    try {
      loadNetworkFile(json);
      expect.unreachable();
    } catch (e) {
      expect((e as InputError).diagnostics[0]!.span).toEqual({ file: json, line: 4, column: 3, length: 1 });
    }
  });
});

describe('a mixed-mode data file used by a datafile statement', () => {
  it('is turned back into single-ended S, so its terminals are the physical ports (S = Wᵀ·S_mm·W, Bockelman & Eisenstadt 1995)', async () => {
    const { convertData } = await import('../src/io/convert-file.js');
    const { formatTouchstone } = await import('../src/io/touchstone.js');
    const { solveSweep } = await import('../src/solve/sweep.js');
    const dir = mkdtempSync(join(tmpdir(), 'sbx-hd-'));
    // a single-ended 4-port: two different matched attenuating paths 1→3 (S31 = 0.5) and 2→4 (S42 = 0.25j)
    const v = new Float64Array(32);
    const set = (i: number, j: number, re: number, im: number) => {
      v[2 * (i * 4 + j)] = re;
      v[2 * (i * 4 + j) + 1] = im;
    };
    set(2, 0, 0.5, 0);
    set(0, 2, 0.5, 0);
    set(3, 1, 0, 0.25);
    set(1, 3, 0, 0.25);
    const se: NetworkData = { parameter: 'S', ports: 4, frequencies: Float64Array.of(1e9, 2e9), references: Float64Array.of(50, 50, 50, 50), values: Float64Array.from([...v, ...v]) };
    writeFileSync(join(dir, 'se.s4p'), formatTouchstone(se, { digits: 17 }));
    writeFileSync(join(dir, 'mm.s4p'), convertData(se, { pairs: [[1, 2], [3, 4]], digits: 17 }, 'mm.s4p'));
    const solve = (file: string) => solveSweep(loadNetlist(lines(`datafile d1 file="${file}" p1=a p2=b p3=c p4=d`, 'port 1 plus=a', 'port 2 plus=b', 'port 3 plus=c', 'port 4 plus=d', 'sweep list freqs=1.5 GHz'), join(dir, 'x.sbx')).circuit);
    const a = solve('se.s4p');
    const b = solve('mm.s4p');
    a.values.forEach((x, i) => expect(Math.abs(x - b.values[i]!)).toBeLessThan(1e-12));
    expect(a.values[2 * (2 * 4 + 0)]).toBeCloseTo(0.5, 12);
  });
});
