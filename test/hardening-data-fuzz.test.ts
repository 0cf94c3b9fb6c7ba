// Issue 14: mutated Touchstone and JSON network files through the readers, in-process. Every
// outcome is network data whose numbers are all finite, or the reader's own error (Touchstone:
// with a line and column inside the file); never another exception. Seeded, so a failure repeats.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { convertData } from '../src/io/convert-file.js';
import { formatJson, JsonNetworkError, parseJson } from '../src/io/json.js';
import { formatTouchstone, parseTouchstone, TouchstoneError } from '../src/io/touchstone.js';
import { mixedMode } from '../src/network/mixed-mode.js';
import type { NetworkData } from '../src/network/types.js';

function net(ports: number, points: number, refs?: number[]): NetworkData {
  const values = new Float64Array(2 * ports * ports * points);
  for (let x = 0; x < values.length; x++) values[x] = Math.sin(1.7 * x + 0.3) * 0.7;
  return {
    parameter: 'S',
    ports,
    frequencies: Float64Array.from({ length: points }, (_, k) => 1e8 * (k + 1)),
    references: Float64Array.from(refs ?? new Array<number>(ports).fill(50)),
    values,
  };
}

const seeds: { name: string; text: string }[] = [
  { name: 'a.s2p', text: formatTouchstone(net(2, 3), { format: 'MA' }) + '0.1 0.8 0.3 40 0.25\n0.2 0.9 0.31 45 0.24\n' },
  { name: 'b.s3p', text: formatTouchstone(net(3, 2), { format: 'DB', frequencyUnit: 'MHz' }) },
  { name: 'c.s2p', text: formatTouchstone(net(2, 2, [50, 75]), { version: '2.0' }) },
  { name: 'd.s4p', text: convertData(net(4, 2), { pairs: [[1, 3], [2, 4]] }, 'd.s4p') },
  { name: 'e.s1p', text: formatTouchstone({ ...net(1, 3), parameter: 'Z' }, { format: 'RI' }) },
];

const nasty = ['1e300', '7000', '-7000', '1e308', '-1', '0', '1e-320', 'NaN', 'Infinity', '1e400', '[Number of Ports] 100000', '[Number of Frequencies] 99999999999', '# GHz Z DB R 1e-300', '[Noise Data]', '[Mixed-Mode Order] D1,2 C1,2', '!', '', '[End]', '[Reference] 0', 'x.s9000p'];

/** A mutation of `text`: a token replaced, a line deleted, duplicated or swapped, or a character inserted. */
const mutation = (text: string) =>
  fc.tuple(fc.nat(), fc.nat(), fc.constantFrom(...nasty), fc.integer({ min: 0, max: 4 })).map(([a, b, word, kind]) => {
    const lines = text.split('\n');
    const i = a % lines.length;
    const j = b % lines.length;
    switch (kind) {
      case 0: {
        const toks = lines[i]!.split(/(\s+)/);
        toks[b % toks.length] = word;
        lines[i] = toks.join('');
        break;
      }
      case 1:
        lines.splice(i, 1);
        break;
      case 2:
        lines.splice(i, 0, lines[j]!);
        break;
      case 3:
        [lines[i], lines[j]] = [lines[j]!, lines[i]!];
        break;
      default:
        lines.splice(i, 0, word);
    }
    return lines.join('\n');
  });

function finite(n: NetworkData): boolean {
  const arrays = [n.frequencies, n.values, n.references];
  if (n.noise) arrays.push(n.noise.frequencies, n.noise.nfMinDb, n.noise.gammaOptMagnitude, n.noise.gammaOptAngleDeg, n.noise.rnNormalised);
  return arrays.every((a) => a.every((x) => Number.isFinite(x)));
}

describe('mutated data files through the readers', () => {
  for (const seed of seeds) {
    it(`Touchstone ${seed.name}: finite data or a located TouchstoneError`, () => {
      fc.assert(
        fc.property(mutation(seed.text), fc.constantFrom(seed.name, 'x.s9000p'), (text, fileName) => {
          const lineCount = text.split(/\r\n|\r|\n/).length;
          try {
            const n = parseTouchstone(text, { fileName, onWarning: () => {} });
            expect(finite(n)).toBe(true);
          } catch (e) {
            expect(e).toBeInstanceOf(TouchstoneError);
            const t = e as TouchstoneError;
            expect(t.line).toBeGreaterThanOrEqual(1);
            expect(t.line).toBeLessThanOrEqual(lineCount);
            expect(t.column).toBeGreaterThanOrEqual(1);
            expect(t.message).not.toMatch(/^[a-z][A-Za-z]+:/); // no internal function name
          }
        }),
        { numRuns: 150, seed: 14 },
      );
    });
  }

  it('JSON: finite data or a JsonNetworkError', () => {
    const text = formatJson(mixedMode(net(4, 2), [[1, 2], [3, 4]]));
    const jsonNasty = fc.constantFrom('1e400', '-1e999', '100000', '-1', '0', 'null', '"x"', '[]', '{}', '1e-400', '2.5');
    fc.assert(
      fc.property(fc.nat(), jsonNasty, (at, word) => {
        // replace the at-th number literal of the text by `word`
        const nums = [...text.matchAll(/-?\d+(?:\.\d+)?(?:e[+-]?\d+)?/gi)];
        const m = nums[at % nums.length]!;
        const mutated = text.slice(0, m.index) + word + text.slice(m.index! + m[0].length);
        try {
          expect(finite(parseJson(mutated))).toBe(true);
        } catch (e) {
          expect(e).toBeInstanceOf(JsonNetworkError);
          const j = e as JsonNetworkError;
          if (j.line !== undefined) expect(j.line).toBeLessThanOrEqual(mutated.split('\n').length);
        }
      }),
      { numRuns: 300, seed: 14 },
    );
  });
});
