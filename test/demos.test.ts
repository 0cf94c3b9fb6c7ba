// Every demo in circuits/ solves to a valid Touchstone file; the passive ones are reciprocal and
// passive to 1e-12 (properties of passive reciprocal networks, common practice).
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { passivityMargin, reciprocityError } from '../src/figures/index.js';
import { renderNetwork } from '../src/io/output.js';
import { parseTouchstone, touchstoneExtension } from '../src/io/touchstone.js';
import { loadNetlistFile } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';

const dir = join(import.meta.dirname, '..', 'circuits');
const demos = readdirSync(dir).filter((f) => f.endsWith('.sbx')).sort();
/** Demos with active elements (controlled sources): neither reciprocal nor passive by design. */
const ACTIVE = new Set(['lna-2g44.sbx', 'hf-feedback-amp-30m.sbx', 'optical-rx-tia-10m.sbx']);

describe('demo circuits', () => {
  it('there are at least four', () => expect(demos.length).toBeGreaterThanOrEqual(4));

  for (const demo of demos) {
    it(`${demo}: solves without warnings to a Touchstone file that reads back`, () => {
      const { circuit, warnings } = loadNetlistFile(join(dir, demo));
      expect(warnings).toEqual([]);
      const net = solveSweep(circuit);
      const name = `x${touchstoneExtension(net.ports)}`;
      const back = parseTouchstone(renderNetwork(net, {}, name), { fileName: name });
      expect(back.ports).toBe(net.ports);
      expect(back.frequencies.length).toBe(net.frequencies.length);
      for (let i = 0; i < net.values.length; i++) expect(Math.abs(back.values[i]! - net.values[i]!)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(net.values[i]!)));
      expect(readFileSync(join(dir, demo), 'utf8').startsWith('#')).toBe(true); // says what it is
      if (ACTIVE.has(demo)) return;
      let recip = 0;
      for (const e of reciprocityError(net)) recip = Math.max(recip, e);
      expect(recip).toBeLessThanOrEqual(1e-12);
      let margin = Infinity;
      for (const m of passivityMargin(net)) margin = Math.min(margin, m);
      expect(margin).toBeGreaterThanOrEqual(-1e-12);
    });
  }
});
