import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { jsonSyntaxErrorAt, parseJson, JsonNetworkError } from '../src/io/json.js';

// The reference is the JavaScript engine's own JSON.parse (ECMA-262 JSON.parse, which reads the
// grammar of RFC 8259 / ECMA-404): a text is valid exactly when it parses there.
const valid = (t: string) => {
  try {
    JSON.parse(t);
    return true;
  } catch {
    return false;
  }
};

const PIECES = ['{', '}', '[', ']', ',', ':', '"a"', '"\\u00e9"', '"\\x"', '1', '-0.5e3', '01', '-', '1.', 'true', 'fals', 'null', ' ', '\n', '\t', '"', '\\'];

describe('jsonSyntaxErrorAt finds the first syntax error of a JSON text', () => {
  it('agrees with JSON.parse on whether random texts of JSON pieces are valid (fast-check, seed 1403)', () => {
    fc.assert(
      fc.property(fc.array(fc.constantFrom(...PIECES), { maxLength: 24 }), (parts) => {
        const t = parts.join('');
        expect(jsonSyntaxErrorAt(t) === -1).toBe(valid(t));
      }),
      { seed: 1403, numRuns: 4000 },
    );
  });

  it('agrees with JSON.parse on mutations of real JSON values (fast-check, seed 1404)', () => {
    fc.assert(
      fc.property(fc.json(), fc.nat(), fc.constantFrom('', ',', ']', '}', '"', 'x', ':'), fc.boolean(), (json, at, insert, cut) => {
        const i = at % (json.length + 1);
        const t = cut ? json.slice(0, i) : json.slice(0, i) + insert + json.slice(i);
        const found = jsonSyntaxErrorAt(t);
        expect(found === -1).toBe(valid(t));
        if (found >= 0) expect(valid(t.slice(0, found)) && found < t.length && valid(t)).toBe(false);
      }),
      { seed: 1404, numRuns: 3000 },
    );
  });

  it('needs no stack for deep nesting: 1,000,000 open brackets end at the end of the text', () => {
    expect(jsonSyntaxErrorAt('['.repeat(1_000_000))).toBe(1_000_000);
    expect(jsonSyntaxErrorAt('['.repeat(100_000) + ']'.repeat(100_000))).toBe(-1);
  });

  it('every syntax error of a network file is located inside the file', () => {
    const cases = ['{"schema": ,}', '{\n  "ports": 2,\n  "x": [1, 2,, 3]\n}', '{"a": "b"', '', '   ', '{"title": "a\u0001b"}'];
    for (const t of cases) {
      let caught: unknown;
      try {
        parseJson(t);
      } catch (e) {
        caught = e;
      }
      expect(caught).toBeInstanceOf(JsonNetworkError);
      const e = caught as JsonNetworkError;
      const lines = t.split(/\r\n|\r|\n/);
      expect(e.line).toBeGreaterThanOrEqual(1);
      expect(e.line).toBeLessThanOrEqual(lines.length);
      expect(e.column).toBeGreaterThanOrEqual(1);
      expect(e.column).toBeLessThanOrEqual(lines[e.line - 1]!.length + 1);
    }
  });
});
