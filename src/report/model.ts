/**
 * What the report and the static plots show, worked out once from the network and the spec results:
 * which S entries go on which plot (with their colours), where each spec's limit lies on a plot, and
 * the frequency intervals where a failing spec fails.
 *
 * @module
 */

import { evaluateSpecs, limitAt } from '../check/evaluate.js';
import type { Circuit } from '../elaborate/circuit.js';
import type { SpecDefinition, SpecResult } from '../check/types.js';
import { groupDelay, magnitudeDb, phaseDeg } from '../figures/entry.js';
import { parseFigure } from '../figures/registry.js';
import { scattering } from '../figures/shared.js';
import type { NetworkData } from '../network/types.js';
import { entryLabel, modesOf } from './format.js';
import { DASHES, PALETTE } from './style.js';

/** The rectangular plots. */
export type PlotKind = 'db' | 'phase' | 'gd';

export { COLORS, DASHES, PALETTE } from './style.js';

/** One S entry (1-based ports) as drawn: label and colour. */
export interface TraceEntry {
  i: number;
  j: number;
  /** `S21`: the key of the entry in data attributes and lookups. */
  label: string;
  /** What the legend shows: the label, or `S21 = S12` when equal entries were merged. */
  display: string;
  color: string;
}

/** A spec's limit drawn on a plot, in that plot's own quantity (|S| dB, degrees, seconds). */
export interface PlotLimit {
  spec: string;
  plot: PlotKind;
  /** Label of the entry the limit applies to. */
  entry: string;
  /** Which side the plotted value must stay on. */
  bound: 'max' | 'min';
  pass: boolean;
  /** Polyline [f in Hz, value] over the part of the band inside the sweep. */
  points: [number, number][];
}

/** Where a failing spec fails: frequency intervals (Hz) on its plot, and its worst point. */
export interface PlotFail {
  spec: string;
  plot: PlotKind;
  entry: string;
  intervals: [number, number][];
  /** Worst point [f in Hz, plotted value], when it can be plotted. */
  worst: [number, number] | null;
}

/** A spec's figure mapped onto one of the plots. */
export interface SpecPlacement {
  plot: PlotKind;
  i: number;
  j: number;
  /** Which side the plotted value must stay on (flipped for losses, kept for VSWR). */
  bound: 'max' | 'min';
  /** Figure value → plotted value. */
  toPlot: (v: number) => number;
  /** Whether toPlot is affine (a straight limit stays straight). */
  affine: boolean;
}

const identity = (v: number): number => v;
const negate = (v: number): number => -v;
/** |Γ| in dB from a VSWR: |Γ| = (v − 1)/(v + 1), common practice. */
const vswrToDb = (v: number): number => (v <= 1 ? -Infinity : 20 * Math.log10((v - 1) / (v + 1)));

/**
 * Where a spec can be drawn: `db`, `il`, `rl` and `vswr` on the magnitude plot (as |Sij| in dB),
 * `phase` on the phase plot, `gd` on the group-delay plot. Other figures (stability factors,
 * impedances, unwrapped phase…) have no plot here: undefined.
 */
export function placeSpec(def: SpecDefinition, ports: number): SpecPlacement | undefined {
  let fig;
  try {
    fig = parseFigure(def.figure, { ports });
  } catch {
    return undefined;
  }
  const p = fig.ports;
  const flip = def.bound === 'max' ? 'min' : 'max';
  switch (fig.spec.name) {
    case 'db':
      return { plot: 'db', i: p[0]!, j: p[1]!, bound: def.bound, toPlot: identity, affine: true };
    case 'il':
      return { plot: 'db', i: p[0]!, j: p[1]!, bound: flip, toPlot: negate, affine: true };
    case 'rl':
      return { plot: 'db', i: p[0]!, j: p[0]!, bound: flip, toPlot: negate, affine: true };
    case 'vswr':
      return { plot: 'db', i: p[0]!, j: p[0]!, bound: def.bound, toPlot: vswrToDb, affine: false };
    case 'phase':
      return { plot: 'phase', i: p[0]!, j: p[1]!, bound: def.bound, toPlot: identity, affine: true };
    case 'gd':
      return { plot: 'gd', i: p[0]!, j: p[1]!, bound: def.bound, toPlot: identity, affine: true };
    default:
      return undefined;
  }
}

/** Human name of a plot. */
export const PLOT_TITLES: Record<PlotKind, string> = { db: 'Magnitude', phase: 'Phase', gd: 'Group delay' };

/** Everything the views need, from one network and its spec results. */
export interface ReportModel {
  /** The network as S-parameters. */
  s: NetworkData;
  entries: TraceEntry[];
  /** Indexes into `entries`, per plot. */
  plots: Record<PlotKind, number[]>;
  /** Indexes into `entries` of the reflections on the Smith chart. */
  smith: number[];
  limits: PlotLimit[];
  fails: PlotFail[];
  /** Spec name → the plot it is drawn on (absent: not drawn). */
  placed: Map<string, PlotKind>;
}

/** The entries shown when none are asked for: all of them up to 4 ports, else Sii and Si1. */
export function defaultEntries(ports: number): [number, number][] {
  const out: [number, number][] = [];
  if (ports <= 4) {
    for (let j = 1; j <= ports; j++) for (let i = 1; i <= ports; i++) out.push([i, j]);
  } else {
    for (let i = 1; i <= ports; i++) out.push([i, i]);
    for (let i = 2; i <= ports; i++) out.push([i, 1]);
  }
  return out;
}

/**
 * Builds the model. `entries` (1-based [to, from]) are the traces of the rectangular plots
 * (default {@link defaultEntries}); an entry a spec needs is added to its plot. Group delay shows
 * the transmissions only (the reflection of a one-port, or the reflections asked for when no
 * transmission is). The Smith chart shows every Sii. Mixed-mode data (with `modes`) is labelled
 * by mode, `Sdd11`, `Sdc21` ({@link entryLabel}).
 *
 * With the default entries, entries equal at every point (S21 and S12 of a reciprocal network,
 * S11 and S22 of a symmetric one; equal within 1e-9 relative) are drawn once, as `S21 = S12`,
 * rather than one hidden under the other.
 */
export function buildModel(net: NetworkData, specs: readonly SpecResult[], entries?: readonly (readonly [number, number])[]): ReportModel {
  const s = scattering(net);
  const n = s.ports;
  const modes = modesOf(net);
  const list: TraceEntry[] = [];
  const index = new Map<string, number>();
  const add = (i: number, j: number): number => {
    if (!Number.isInteger(i) || !Number.isInteger(j) || i < 1 || j < 1 || i > n || j > n) {
      throw new RangeError(`entry (${i}, ${j}) is out of range: the network has ${n} port${n === 1 ? '' : 's'}`);
    }
    const label = entryLabel(i, j, n, modes);
    let k = index.get(label);
    if (k === undefined) {
      k = list.length;
      list.push({ i, j, label, display: label, color: PALETTE[k % PALETTE.length]! });
      index.set(label, k);
    }
    return k;
  };
  let chosen: number[];
  if (entries) chosen = entries.map(([i, j]) => add(i, j));
  else {
    chosen = [];
    const kept: [number, number][] = [];
    for (const [i, j] of defaultEntries(n)) {
      const twin = kept.find(([a, b]) => equalEntries(s, a, b, i, j));
      if (twin) {
        const k = add(twin[0], twin[1]);
        const e = list[k]!;
        const label = entryLabel(i, j, n, modes);
        e.display = `${e.display} = ${label}`;
        index.set(label, k);
        continue;
      }
      kept.push([i, j]);
      chosen.push(add(i, j));
    }
  }
  const plots: Record<PlotKind, number[]> = {
    db: [...chosen],
    phase: [...chosen],
    gd: chosen.filter((k) => n === 1 || list[k]!.i !== list[k]!.j),
  };
  // entries asked for that are all reflections: their own group delay, not another entry's
  if (plots.gd.length === 0) plots.gd = entries && chosen.length > 0 ? [...chosen] : n === 1 ? [add(1, 1)] : [add(2, 1)];
  const smith: number[] = [];
  for (let i = 1; i <= n; i++) {
    const k = add(i, i);
    if (!smith.includes(k)) smith.push(k);
  }

  const f = s.frequencies;
  const fLo = f.length > 0 ? f[0]! : 0;
  const fHi = f.length > 0 ? f[f.length - 1]! : 0;
  const limits: PlotLimit[] = [];
  const fails: PlotFail[] = [];
  const placed = new Map<string, PlotKind>();
  for (const r of specs) {
    const where = placeSpec(r.spec, n);
    if (!where) continue;
    const k = add(where.i, where.j);
    if (!plots[where.plot].includes(k)) plots[where.plot].push(k);
    const label = list[k]!.label;
    placed.set(r.spec.name, where.plot);
    const lo = Math.max(r.spec.band[0], fLo);
    const hi = Math.min(r.spec.band[1], fHi);
    const points: [number, number][] = [];
    if (f.length > 0 && hi >= lo) {
      const sloped = r.spec.limit[0] !== r.spec.limit[1];
      const samples = hi === lo ? 1 : sloped && !where.affine ? 33 : 2;
      for (let q = 0; q < samples; q++) {
        const fq = samples === 1 ? lo : lo + ((hi - lo) * q) / (samples - 1);
        const y = where.toPlot(limitAt(r.spec, fq));
        if (Number.isFinite(y)) points.push([fq, y]);
      }
    }
    limits.push({ spec: r.spec.name, plot: where.plot, entry: label, bound: where.bound, pass: r.pass, points });
    if (!r.pass) {
      const worst: [number, number] | null =
        Number.isFinite(r.worstFrequency) && Number.isFinite(where.toPlot(r.worstValue)) ? [r.worstFrequency, where.toPlot(r.worstValue)] : null;
      fails.push({ spec: r.spec.name, plot: where.plot, entry: label, intervals: failIntervals(s, r.spec), worst });
    }
  }
  return { s, entries: list, plots, smith, limits, fails, placed };
}

/** Whether entries (a, b) and (i, j) agree at every point within 1e-9 of the larger magnitude (+1e-15). */
function equalEntries(s: NetworkData, a: number, b: number, i: number, j: number): boolean {
  const n = s.ports;
  const v = s.values;
  for (let k = 0; k < s.frequencies.length; k++) {
    const p = 2 * ((k * n + a - 1) * n + b - 1);
    const q = 2 * ((k * n + i - 1) * n + j - 1);
    const d = Math.hypot(v[p]! - v[q]!, v[p + 1]! - v[q + 1]!);
    const size = Math.max(Math.hypot(v[p]!, v[p + 1]!), Math.hypot(v[q]!, v[q + 1]!));
    if (!(d <= 1e-9 * size + 1e-15)) return false;
  }
  return true;
}

/**
 * The frequency intervals where a spec fails: runs of neighbouring sweep points inside the band
 * whose margin is negative (or not a number), each widened to halfway to the next sweep point on
 * either side and clipped to the band, so that a single failing point still has a width.
 */
export function failIntervals(s: NetworkData, spec: SpecDefinition): [number, number][] {
  let values: Float64Array;
  try {
    values = parseFigure(spec.figure, { ports: s.ports }).evaluate(s);
  } catch {
    return [];
  }
  const f = s.frequencies;
  const [lo, hi] = spec.band;
  const inBand = (k: number) => {
    const x = f[k]!;
    return !(x < lo * (1 - 1e-12) || x > hi * (1 + 1e-12));
  };
  const failing = (k: number) => {
    const lim = limitAt(spec, f[k]!);
    const m = spec.bound === 'max' ? lim - values[k]! : values[k]! - lim;
    return !(m >= 0);
  };
  const out: [number, number][] = [];
  let k = 0;
  while (k < f.length) {
    if (!inBand(k) || !failing(k)) {
      k++;
      continue;
    }
    const a = k;
    while (k + 1 < f.length && inBand(k + 1) && failing(k + 1)) k++;
    const b = k;
    const left = a > 0 ? (f[a - 1]! + f[a]!) / 2 : f[a]!;
    const right = b + 1 < f.length ? (f[b]! + f[b + 1]!) / 2 : f[b]!;
    out.push([Math.max(left, Math.min(lo, f[a]!)), Math.min(right, Math.max(hi, f[b]!))]);
    k++;
  }
  return out;
}

/** Per-entry series over the sweep. */
export interface EntrySeries {
  re: Float64Array;
  im: Float64Array;
  db: Float64Array;
  deg: Float64Array;
}

/** Real and imaginary parts, |S| in dB and phase in degrees of one entry. */
export function entrySeries(s: NetworkData, i: number, j: number): EntrySeries {
  const m = s.frequencies.length;
  const n = s.ports;
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const o = 2 * ((k * n + i - 1) * n + j - 1);
    re[k] = s.values[o]!;
    im[k] = s.values[o + 1]!;
  }
  return { re, im, db: magnitudeDb(s, i, j), deg: phaseDeg(s, i, j) };
}

/** Group delay of one entry in seconds. */
export function entryDelay(s: NetworkData, i: number, j: number): Float64Array {
  return groupDelay(s, i, j);
}

/** The sweep in words: first and last frequency, point count and spacing. */
export interface SweepSummary {
  start: number;
  stop: number;
  points: number;
  /** 'linear' (even steps of `step` Hz), 'log' (even ratio, `perDecade`), 'single' or 'uneven'. */
  spacing: 'linear' | 'log' | 'single' | 'uneven';
  step?: number;
  perDecade?: number;
  minStep?: number;
  maxStep?: number;
}

/** Classifies the sweep spacing (relative tolerance 1e-6 on steps or ratios). */
export function summarizeSweep(f: Float64Array): SweepSummary {
  const m = f.length;
  const start = m > 0 ? f[0]! : NaN;
  const stop = m > 0 ? f[m - 1]! : NaN;
  if (m < 2) return { start, stop, points: m, spacing: 'single' };
  let minStep = Infinity;
  let maxStep = 0;
  for (let k = 1; k < m; k++) {
    const d = f[k]! - f[k - 1]!;
    minStep = Math.min(minStep, d);
    maxStep = Math.max(maxStep, d);
  }
  if (maxStep - minStep <= 1e-6 * maxStep) return { start, stop, points: m, spacing: 'linear', step: (stop - start) / (m - 1) };
  if (start > 0) {
    let minR = Infinity;
    let maxR = 0;
    for (let k = 1; k < m; k++) {
      const r = Math.log(f[k]! / f[k - 1]!);
      minR = Math.min(minR, r);
      maxR = Math.max(maxR, r);
    }
    if (maxR - minR <= 1e-6 * maxR) return { start, stop, points: m, spacing: 'log', perDecade: Math.LN10 / ((minR + maxR) / 2) };
  }
  return { start, stop, points: m, spacing: 'uneven', minStep, maxStep };
}

/**
 * One input of an overlay or a family: a label for the legend (a file name, or `cshunt = 1.5 pF`),
 * its network, and its spec results (default: the circuit's specs evaluated on the network).
 */
export interface Dataset {
  label: string;
  network: NetworkData;
  specs?: SpecResult[];
  /** The circuit, for port nodes and (when `specs` is not given) the spec definitions. */
  circuit?: Circuit;
  /** The file the input came from, shown beside its label. */
  source?: string;
}

/** One input of an overlay, prepared: its model, colour and spec results. */
export interface OverlayPart {
  /** The label, made unique among the inputs (a second `a.s2p` becomes `a.s2p (2)`). */
  label: string;
  color: string;
  model: ReportModel;
  specs: SpecResult[];
  dataset: Dataset;
}

/** Inputs of an overlay, prepared for the report and the plots. */
export interface Overlay {
  parts: OverlayPart[];
  /** The dash of an entry (`S21`) as an SVG dash array; '' is solid. */
  dashOf: (entry: string) => string;
  /** Plain-words notes: inputs with different port counts, entries an input does not have. */
  notes: string[];
}

/**
 * Prepares several inputs for one view: input k gets the k-th colour of the palette (repeating
 * after {@link PALETTE}.length inputs), each entry a dash of {@link DASHES} in the order the entries
 * first appear. `entries` asked for that an input does not have (a one-port beside a two-port) are
 * left out for that input, with a note; inputs with different port counts each show their own
 * entries, also with a note. Throws RangeError for no inputs or an input without frequency points.
 */
export function prepareOverlay(datasets: readonly Dataset[], entries?: readonly (readonly [number, number])[], extraSpecs?: readonly SpecResult[]): Overlay {
  if (datasets.length === 0) throw new RangeError('there are no inputs to show');
  const notes: string[] = [];
  const seen = new Map<string, number>();
  const dashes = new Map<string, string>();
  const parts: OverlayPart[] = datasets.map((d, k) => {
    if (d.network.frequencies.length === 0) throw new RangeError(`${d.label} has no frequency points: there is nothing to show`);
    let label = d.label;
    const times = (seen.get(label) ?? 0) + 1;
    seen.set(d.label, times);
    if (times > 1) label = `${d.label} (${times})`;
    const specs = d.specs ?? (d.circuit && d.circuit.specs.length > 0 ? evaluateSpecs(d.circuit.specs, d.network) : k === 0 && extraSpecs ? [...extraSpecs] : []);
    const n = d.network.ports;
    let own: [number, number][] | undefined;
    if (entries) {
      own = entries.filter(([i, j]) => i >= 1 && j >= 1 && i <= n && j <= n).map(([i, j]) => [i, j] as [number, number]);
      const left = entries.filter(([i, j]) => !(i >= 1 && j >= 1 && i <= n && j <= n));
      if (left.length > 0) notes.push(`${label}: ${left.map(([i, j]) => `S${i}${i > 9 || j > 9 ? ',' : ''}${j}`).join(', ')} left out (it has ${n} port${n === 1 ? '' : 's'})`);
    }
    const model = buildModel(d.network, specs, own && own.length > 0 ? own : undefined);
    if (own && own.length === 0) {
      model.plots = { db: [], phase: [], gd: [] };
      model.smith = [];
    }
    // an entry drawn as `S11 = S22` gives S22 the dash of S11 in every input
    for (const e of model.entries) {
      if (dashes.has(e.label)) continue;
      const dash = DASHES[new Set(dashes.values()).size % DASHES.length]!;
      for (const name of e.display.split(' = ')) if (!dashes.has(name)) dashes.set(name, dash);
    }
    return { label, color: PALETTE[k % PALETTE.length]!, model, specs, dataset: d };
  });
  const counts = [...new Set(parts.map((p) => p.model.s.ports))];
  if (counts.length > 1) {
    notes.unshift(`the inputs have different port counts (${parts.map((p) => `${p.label}: ${p.model.s.ports}`).join(', ')}): each shows its own entries`);
  }
  if (parts.length > PALETTE.length) notes.push(`${parts.length} inputs share ${PALETTE.length} colours: the colours repeat from input ${PALETTE.length + 1} on (the legend and the readout name each input)`);
  return { parts, dashOf: (entry) => dashes.get(entry) ?? '', notes };
}
