// Overlays (issue 15, item 6): several inputs — netlists and data files — in one report or plot:
// one legend (each input its colour, each entry its dash), one spec table per netlist, every plot
// and the Smith chart overlaid, inputs with different sweeps and port counts side by side.
//
// The data are closed forms: a series resistor R between Z0 = 50 ohm ports has S11 = S22 =
// R/(R + 2·Z0) and S21 = S12 = 2·Z0/(R + 2·Z0); a one-port load R has Γ = (R − Z0)/(R + Z0)
// (common practice).
import { describe, expect, it } from 'vitest';
import { evaluateSpecs } from '../src/check/evaluate.js';
import { loadNetlist } from '../src/load.js';
import type { NetworkData } from '../src/network/types.js';
import { prepareOverlay, renderPlotSvg, renderReport, type Dataset } from '../src/report/index.js';
import { DASHES, PALETTE } from '../src/report/style.js';
import { solveSweep } from '../src/solve/sweep.js';
import { network } from './report-fixtures.js';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

const root = join(import.meta.dirname, '..');

/** A series resistor R between two 50 ohm ports at the given frequencies. */
function series(r: number, freqs: number[]): NetworkData {
  const s11 = r / (r + 100);
  const s21 = 100 / (r + 100);
  return network(freqs, () => [
    [[s11, 0], [s21, 0]],
    [[s21, 0], [s11, 0]],
  ]);
}

/** A one-port load R on 50 ohm. */
function load(r: number, freqs: number[]): NetworkData {
  return network(freqs, () => [[[(r - 50) / (r + 50), 0]]]);
}

interface ReportData {
  overlay: boolean;
  f: number[];
  inputs: { label: string; color: string; ports: number }[];
  entries: { label: string; input: number; color: string; dash: number[] | null; re: (number | null)[]; im: (number | null)[] }[];
  plots: Record<'db' | 'phase' | 'gd', number[]>;
  smith: number[];
  limits: { spec: string; pass: boolean }[];
}

function dataOf(html: string): ReportData {
  const m = /<script type="application\/json" id="sbx-data">([\s\S]*?)<\/script>/.exec(html);
  if (!m) throw new Error('no data block');
  return JSON.parse(m[1]!) as ReportData;
}

const count = (text: string, re: RegExp) => (text.match(re) ?? []).length;

const A: Dataset = { label: 'before.s2p', network: series(50, [1e9, 2e9, 3e9]) };
const B: Dataset = { label: 'load.s1p', network: load(100, [1.5e9, 2.5e9]) };

describe('overlay report of inputs with different sweeps and port counts', () => {
  const html = renderReport({ datasets: [A, B] });
  const data = dataOf(html);

  it('one legend: an entry per input (its palette colour) and per entry (its dash)', () => {
    expect(count(html, /data-testid="legend-input"/g)).toBe(2);
    expect(data.inputs.map((i) => [i.label, i.color, i.ports])).toEqual([
      ['before.s2p', PALETTE[0], 2],
      ['load.s1p', PALETTE[1], 1],
    ]);
    // S11 = S22 (solid) and S21 = S12 (the second dash); the one-port's S11 shares the solid dash
    expect(count(html, /data-testid="legend-entry"/g)).toBe(2);
    expect(html).toContain('data-testid="legend-entry" data-entry="S11"');
    expect(html).toContain('data-testid="legend-entry" data-entry="S21"');
  });

  it('every input drawn: traces of both, each in its colour, values of the closed forms on their own points', () => {
    expect(data.overlay).toBe(true);
    expect(data.entries.map((e) => e.label)).toEqual(['before.s2p · S11', 'before.s2p · S21', 'load.s1p · S11']);
    expect(data.entries.map((e) => e.color)).toEqual([PALETTE[0], PALETTE[0], PALETTE[1]]);
    expect(data.entries.map((e) => e.dash)).toEqual([null, DASHES[1]!.split(' ').map(Number), null]);
    // the frequency axis holds both sweeps; each trace has values at its own points only
    expect(data.f).toEqual([1e9, 1.5e9, 2e9, 2.5e9, 3e9]);
    const third = 50 / 150; // R/(R + 2·Z0) for R = 50 ohm
    expect(data.entries[0]!.re).toEqual([third, null, third, null, third].map((x) => (x === null ? null : Number(x.toPrecision(12)))));
    expect(data.entries[2]!.re).toEqual([null, 50 / 150, null, 50 / 150, null].map((x) => (x === null ? null : Number(x.toPrecision(12))))); // Γ = (100 − 50)/(100 + 50)
    expect(data.plots.db).toEqual([0, 1, 2]);
    expect(data.smith).toEqual([0, 2]); // the reflections of both
    expect(count(html, /class="smith-trace"/g)).toBe(2);
  });

  it('says plainly that the port counts differ', () => {
    expect(html).toContain('data-testid="overlay-note">Note: the inputs have different port counts (before.s2p: 2, load.s1p: 1): each shows its own entries.');
    expect(count(html, /data-testid="input-row"/g)).toBe(2);
  });

  it('the values table takes each input at its nearest point', () => {
    const cell = /data-entry="load\.s1p · S11" data-db="([^"]+)" data-deg="[^"]+" data-frequency="([^"]+)"/.exec(html)!;
    expect(Number(cell[2])).toBe(1.5e9); // asked 1 GHz, the one-port's nearest point
    expect(Number(cell[1])).toBeCloseTo(20 * Math.log10(1 / 3), 9);
  });
});

describe('spec tables per netlist', () => {
  const file = join(root, 'circuits', 'match-50-75-915.sbx');
  const text = readFileSync(file, 'utf8');
  const inputs: Dataset[] = ['1.64 pF', '1.2 pF'].map((c) => {
    const { circuit } = loadNetlist(text, file, { set: [`cshunt=${c}`] });
    const net = solveSweep(circuit);
    return { label: `cshunt = ${c}`, network: net, circuit, specs: evaluateSpecs(circuit.specs, net), source: 'circuits/match-50-75-915.sbx' };
  });
  const html = renderReport({ datasets: [...inputs, { label: 'load.s1p', network: load(75, [0.9e9, 1e9]) }] });

  it('one table per input with specs, each with its own results, and a pass/fail matrix', () => {
    expect(count(html, /data-testid="spec-group"/g)).toBe(2);
    expect(count(html, /data-testid="spec-row"/g)).toBe(8);
    expect(count(html, /data-testid="spec-cell"/g)).toBe(8);
    // each table holds that input's own results (the same as evaluating its specs alone)
    for (const d of inputs) {
      const group = html.slice(html.indexOf(`data-testid="spec-group" data-input="${d.label}"`));
      const first = /data-spec="channel_match" data-status="(pass|fail)" data-margin="([^"]+)"/.exec(group)!;
      expect(Number(first[2])).toBe(d.specs![0]!.worstMargin);
    }
    expect(html).toMatch(/data-testid="verdict" data-status="fail">1 of 2 inputs fail a spec/);
  });

  it('a limit the inputs share is drawn once and passes only where all pass', () => {
    const data = dataOf(html);
    const match = data.limits.filter((l) => l.spec === 'channel_match');
    expect(match).toHaveLength(1);
    expect(match[0]!.pass).toBe(inputs.every((d) => d.specs![0]!.pass));
  });
});

describe('overlay plots (SVG)', () => {
  it('magnitude: every trace of every input, colour per input, dash per entry, one legend', () => {
    const svg = renderPlotSvg([A, B], { kind: 'db' });
    expect(svg).toContain('data-inputs="2"');
    const paths = [...svg.matchAll(/<path d="[^"]*" fill="none" stroke="([^"]+)" stroke-width="1.7" stroke-linejoin="round"(?: stroke-dasharray="([^"]+)")? data-entry="([^"]+)"/g)];
    expect(paths.map((p) => [p[3], p[1], p[2] ?? ''])).toEqual([
      ['before.s2p · S11', PALETTE[0], ''],
      ['before.s2p · S21', PALETTE[0], DASHES[1]],
      ['load.s1p · S11', PALETTE[1], ''],
    ]);
    expect(count(svg, /data-legend="input"/g)).toBe(2);
    expect(count(svg, /data-legend="entry"/g)).toBe(2);
    expect(svg).toContain('note: the inputs have different port counts');
    // the x axis spans both sweeps
    expect(svg).toMatch(/data-x-min="1000000000" data-x-max="3000000000"/);
  });

  it('an entry an input does not have is left out for that input, with a note', () => {
    const svg = renderPlotSvg([A, B], { kind: 'db', entries: [[2, 1]] });
    expect(count(svg, /data-entry="/g)).toBe(1);
    expect(svg).toContain('note: load.s1p: S21 left out (it has 1 port)');
  });

  it('Smith chart: the reflections of every input, each in its colour', () => {
    const svg = renderPlotSvg([A, B], { kind: 'smith' });
    // S11 = S22 of the symmetric two-port is one trace, and the one-port's S11 another
    expect([...svg.matchAll(/<g data-entry="([^"]+)"><path d="[^"]*" fill="none" stroke="([^"]+)"/g)].map((m) => [m[1], m[2]])).toEqual([
      ['before.s2p · S11', PALETTE[0]],
      ['load.s1p · S11', PALETTE[1]],
    ]);
    expect(count(svg, /data-legend="input"/g)).toBe(2);
    expect(() => renderPlotSvg([A, B], { kind: 'smith', entries: [[2, 1]] })).toThrow(/a Smith chart shows reflections/);
  });

  it('the single-input call is unchanged: no overlay legend or attributes', () => {
    const one = renderPlotSvg(A.network, { kind: 'db' });
    expect(one).not.toContain('data-inputs');
    expect(one).not.toContain('data-legend');
    const page = renderReport({ source: 'a.s2p', net: A.network });
    expect(page).not.toContain('legend-input');
    expect(dataOf(page).overlay).toBeUndefined();
  });
});

describe('labels are text, never markup', () => {
  it('a label with markup is escaped in the page, its data block and the SVG', () => {
    const evil = '</script><b onmouseover="x">&amp;';
    const html = renderReport({ datasets: [{ label: evil, network: A.network }, B] });
    expect(html).not.toContain('</script><b');
    expect(html).not.toContain('<b onmouseover');
    expect(dataOf(html).inputs[0]!.label).toBe(evil); // the data block reads back as the label
    const svg = renderPlotSvg([{ label: evil, network: A.network }, B], { kind: 'db' });
    expect(svg).not.toContain('<b onmouseover');
    expect(svg).toContain('&lt;/script&gt;&lt;b onmouseover=&quot;x&quot;&gt;&amp;amp;');
  });
});

describe('prepareOverlay', () => {
  it('makes labels unique, cycles the palette after its last colour, and refuses empty inputs', () => {
    const many = Array.from({ length: PALETTE.length + 2 }, (_, k) => ({ label: 'same.s2p', network: series(10 * (k + 1), [1e9, 2e9]) }));
    const o = prepareOverlay(many);
    expect(o.parts.map((p) => p.label).slice(0, 3)).toEqual(['same.s2p', 'same.s2p (2)', 'same.s2p (3)']);
    expect(o.parts[PALETTE.length]!.color).toBe(PALETTE[0]);
    expect(o.parts[1]!.color).toBe(PALETTE[1]);
    expect(o.notes).toContain(`${PALETTE.length + 2} inputs share ${PALETTE.length} colours: the colours repeat from input ${PALETTE.length + 1} on (the legend and the readout name each input)`);
    expect(() => prepareOverlay([])).toThrow('there are no inputs to show');
    expect(() => prepareOverlay([{ label: 'empty', network: series(1, []) }])).toThrow('empty has no frequency points');
  });
});
