// The README's examples must be true: its netlist solves, and the error it shows is the one the
// tool prints for that mistake.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { formatDiagnostics, InputError } from '../src/diagnostics/diagnostic.js';
import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';

const readme = readFileSync(join(import.meta.dirname, '..', 'README.md'), 'utf8');
const blocks = [...readme.matchAll(/```text\n([\s\S]*?)```/g)].map((m) => m[1]!);
const netlist = blocks.find((b) => b.startsWith('# 433 MHz'))!;

describe('README', () => {
  it('the netlist at a glance solves to a 3rd-order Butterworth response', () => {
    const { circuit, warnings } = loadNetlist(netlist, 'readme.sbx');
    expect(warnings).toEqual([]);
    const net = solveSweep(circuit, { frequencies: Float64Array.of(600e6) });
    // At the cutoff of a Butterworth low-pass |S21|² = 1/2 (−3.01 dB), common practice;
    // the lossy parts (Q 60 and 400, 0.05 ohm ESR) cost a few tenths of a dB more.
    const s21 = Math.hypot(net.values[4]!, net.values[5]!);
    const db = 20 * Math.log10(s21);
    expect(db).toBeLessThan(-3.0);
    expect(db).toBeGreaterThan(-3.6);
  });

  it('shows the error the tool really prints for a misspelt keyword', () => {
    const shown = blocks.find((b) => b.includes('unknown statement'))!.trimEnd();
    const broken = netlist.replace('inductor  l2', 'inducter  l2');
    try {
      loadNetlist(broken, 'filter.sbx');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      const text = formatDiagnostics((e as InputError).diagnostics.filter((d) => d.code === 'unknown-keyword'), (e as InputError).sources);
      expect(text).toBe(shown);
    }
  });
});
