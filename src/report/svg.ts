/**
 * Static plots as SVG (no script): |Sij| in dB, phase, group delay or the Smith chart, with axes,
 * grid, ticks in engineering units, a legend and the spec limits. The same input always gives the
 * same bytes.
 *
 * @module
 */

import type { SpecResult } from '../check/types.js';
import type { NetworkData } from '../network/types.js';
import { OutputError } from '../io/output.js';
import { coord, dbAxisFloor, delayUnit, entryLabel, escapeXml, fixed, frequencyUnit, modesOf, portReference, referenceList, ticks, type DisplayUnit } from './format.js';
import { buildModel, COLORS, entryDelay, entrySeries, prepareOverlay, type Dataset, type PlotFail, type PlotKind, type PlotLimit, type ReportModel, type TraceEntry } from './model.js';
import { smithFragment } from './smith.js';

/** What {@link renderPlotSvg} draws. */
export interface PlotSvgOptions {
  kind: 'db' | 'phase' | 'gd' | 'smith';
  /** Entries [to, from], 1-based (default: all of them up to 4 ports; the Smith chart takes the Sii). */
  entries?: [number, number][];
  /** Spec results whose limits are drawn (and failing intervals shaded). */
  specs?: SpecResult[];
  /** Size in pixels (default 760 × 420, Smith chart 560 × 460). */
  width?: number;
  height?: number;
  /** A heading above the plot. */
  title?: string;
  /** Prefix of the ids inside the SVG (clip path), for several plots in one page. Default `sbx-<kind>`. */
  idPrefix?: string;
}

const FONT = 'DejaVu Sans, Liberation Sans, Helvetica, Arial, sans-serif';

const Y_TITLES: Record<PlotKind, string> = { db: '|S| (dB)', phase: 'Phase (deg)', gd: 'Group delay' };

/** One plotted series: label, colour (and dash) and its frequencies and values on the y axis (display units). */
interface Series {
  label: string;
  display: string;
  color: string;
  dash?: string;
  f: Float64Array;
  y: Float64Array;
}

/** Failing intervals of several inputs: an interval where several fail the same spec is shaded once. */
function sharedFails(fails: readonly PlotFail[]): PlotFail[] {
  const seen = new Set<string>();
  return fails.map((fl) => {
    const intervals = fl.intervals.filter((iv) => {
      const key = `${fl.spec}\u0000${iv[0]}\u0000${iv[1]}`;
      if (seen.has(key)) return false;
      seen.add(key);
      return true;
    });
    return intervals.length === fl.intervals.length ? fl : { ...fl, intervals };
  });
}

/**
 * The limits of several inputs, each drawn once: limits of one spec that lie on the same plot
 * with the same points (the specs of a family, or of the same netlist twice) are one line, which
 * passes only where every input passes it.
 */
function sharedLimits(limits: readonly PlotLimit[]): PlotLimit[] {
  const byKey = new Map<string, PlotLimit>();
  for (const l of limits) {
    const key = `${l.spec}\u0000${l.plot}\u0000${l.bound}\u0000${JSON.stringify(l.points)}`;
    const had = byKey.get(key);
    if (had) had.pass = had.pass && l.pass;
    else byKey.set(key, { ...l });
  }
  return [...byKey.values()];
}

/**
 * A static plot of `net` as a self-contained SVG document. Frequency axes are in Hz/kHz/MHz/GHz
 * picked from the sweep; the dB and delay axes are widened to whole ticks around the data and the
 * limits; phase is wrapped into (−180°, 180°] and the line is broken at each wrap. Long sweeps are
 * thinned to the lowest and highest value per pixel column, so the outline stays exact.
 *
 * The root element carries `data-kind`, `data-x-min`/`data-x-max` (Hz) and `data-y-min`/`data-y-max`
 * (in the axis unit, `data-y-unit`; for delay `data-y-scale` seconds per unit).
 */
export function renderPlotSvg(net: NetworkData | readonly Dataset[], options: PlotSvgOptions): string {
  if (!isNetwork(net)) return overlaySvg(net, options);
  const specs = options.specs ?? [];
  const kind = options.kind;
  if (kind !== 'db' && kind !== 'phase' && kind !== 'gd' && kind !== 'smith') {
    throw new OutputError(`unknown plot kind ${JSON.stringify(kind)}`, 'the kinds are db, phase, gd and smith');
  }
  if (net.frequencies.length === 0) throw new OutputError('the network has no frequency points: there is nothing to plot');
  if (kind === 'smith' && options.entries) {
    const model = buildModel(net, []);
    const n = model.s.ports;
    const modes = modesOf(net);
    for (const [i, j] of options.entries) {
      if (!Number.isInteger(i) || !Number.isInteger(j) || i < 1 || j < 1 || i > n || j > n) {
        throw new OutputError(`entry (${i}, ${j}) is out of range: the network has ${n} port${n === 1 ? '' : 's'}`);
      }
      if (i === j) continue;
      const label = entryLabel(i, j, n, modes);
      const reflections = Array.from({ length: Math.min(n, 3) }, (_, q) => entryLabel(q + 1, q + 1, n, modes)).join(', ');
      throw new OutputError(
        `a Smith chart shows reflections, and ${label} is a transmission`,
        `ask for reflections (${reflections}${n > 3 ? ', …' : ''}), or plot ${label} as db, phase or gd`,
      );
    }
  }
  // entries asked for are drawn one by one (no merging of equal entries), so each is found by its ports
  const model = buildModel(net, specs, options.entries);
  const id = options.idPrefix ?? `sbx-${kind}`;
  if (kind === 'smith') return smithSvg([{ model, trace: plainTrace }], options, id);
  return rectSvg([{ model, trace: plainTrace }], kind, options, id);
}

/** How one input's entries are drawn: its model, and each entry's key, legend text, colour and dash. */
interface Part {
  model: ReportModel;
  trace: (e: TraceEntry) => { key: string; display: string; color: string; dash?: string };
}

const plainTrace: Part['trace'] = (e) => ({ key: e.label, display: e.display, color: e.color });

function isNetwork(x: NetworkData | readonly Dataset[]): x is NetworkData {
  return !Array.isArray(x);
}

/**
 * Several inputs on one plot (an overlay, or a family): each input's traces in its own colour
 * (the palette in order), each entry in its own dash (solid, dashed, dotted, …), one legend entry
 * per input and one per entry. Inputs with different port counts each show their own entries;
 * `entries` an input does not have are left out for that input (and said so in a note).
 */
function overlaySvg(datasets: readonly Dataset[], options: PlotSvgOptions): string {
  const kind = options.kind;
  if (kind !== 'db' && kind !== 'phase' && kind !== 'gd' && kind !== 'smith') {
    throw new OutputError(`unknown plot kind ${JSON.stringify(kind)}`, 'the kinds are db, phase, gd and smith');
  }
  if (datasets.some((d) => d.network.frequencies.length === 0)) throw new OutputError(`${datasets.find((d) => d.network.frequencies.length === 0)!.label} has no frequency points: there is nothing to plot`);
  if (kind === 'smith' && options.entries) {
    const t = options.entries.find(([i, j]) => i !== j);
    if (t) throw new OutputError(`a Smith chart shows reflections, and S${t[0]}${t[1]} is a transmission`, `ask for reflections (S11, S22, …), or plot S${t[0]}${t[1]} as db, phase or gd`);
  }
  const prepared = prepareOverlay(datasets, options.entries, options.specs);
  const id = options.idPrefix ?? `sbx-${kind}`;
  const parts: Part[] = prepared.parts.map((p) => ({
    model: p.model,
    trace: (e) => ({ key: `${p.label} · ${e.label}`, display: `${p.label} · ${e.display}`, color: p.color, dash: prepared.dashOf(e.label) }),
  }));
  const legend: LegendItem[] = prepared.parts.map((p) => ({ label: p.label, color: p.color, dash: '' }));
  // the entries on this plot, once each, by their dash
  const entryKeys: LegendItem[] = [];
  const seenEntries = new Set<string>();
  for (const p of prepared.parts) {
    let shown = kind === 'smith' ? p.model.smith : p.model.plots[kind];
    if (kind === 'smith' && options.entries) {
      const want = new Set(options.entries.filter(([i, j]) => i === j).map(([i]) => i));
      shown = shown.filter((k) => want.has(p.model.entries[k]!.i));
    }
    for (const k of shown) {
      const e = p.model.entries[k]!;
      if (seenEntries.has(e.label)) continue;
      for (const name of e.display.split(' = ')) seenEntries.add(name);
      entryKeys.push({ label: e.display, color: COLORS.ink, dash: prepared.dashOf(e.label) });
    }
  }
  const overlay = { legend, entryKeys, notes: prepared.notes };
  return kind === 'smith' ? smithSvg(parts, options, id, overlay) : rectSvg(parts, kind, options, id, overlay);
}

/** A legend line of an overlay: an input (colour) or an entry (dash). */
interface LegendItem {
  label: string;
  color: string;
  dash: string;
}

/** The legend of an overlay: the inputs, the entries by dash, and notes shown in the plot. */
interface OverlayLegend {
  legend: LegendItem[];
  entryKeys: LegendItem[];
  notes: string[];
}

/** Why a series has nothing to draw, in words. */
function emptyReason(kind: PlotKind, points: number): string {
  if (kind === 'gd' && points < 2) return 'group delay needs at least two sweep points';
  if (kind === 'db') return 'exactly 0 at every point (−∞ dB)';
  return 'no finite value at any point';
}

function rectSvg(parts: Part[], kind: PlotKind, options: PlotSvgOptions, id: string, overlay?: OverlayLegend): string {
  const width = options.width ?? 760;
  const height = options.height ?? 420;
  // the x axis spans every input's sweep
  let fLo = Infinity;
  let fHi = -Infinity;
  let m = 0;
  for (const p of parts) {
    const pf = p.model.s.frequencies;
    fLo = Math.min(fLo, pf[0]!);
    fHi = Math.max(fHi, pf[pf.length - 1]!);
    m = Math.max(m, pf.length);
  }

  // series in display units
  const series: Series[] = [];
  let yUnit: DisplayUnit = { scale: 1, unit: kind === 'db' ? 'dB' : 'deg' };
  const raw: { label: string; display: string; color: string; dash?: string; f: Float64Array; y: Float64Array }[] = [];
  for (const p of parts) {
    const model = p.model;
    for (const k of model.plots[kind]) {
      const e = model.entries[k]!;
      const y = kind === 'gd' ? entryDelay(model.s, e.i, e.j) : kind === 'db' ? entrySeries(model.s, e.i, e.j).db : entrySeries(model.s, e.i, e.j).deg;
      const t = p.trace(e);
      raw.push({ label: t.key, display: t.display, color: t.color, dash: t.dash, f: model.s.frequencies, y });
    }
  }
  const limits = sharedLimits(parts.flatMap((p) => p.model.limits.filter((l) => l.plot === kind)));
  const fails = sharedFails(parts.flatMap((p) => p.model.fails.filter((l) => l.plot === kind)));
  if (kind === 'gd') {
    let big = 0;
    for (const r of raw) for (const v of r.y) if (Number.isFinite(v)) big = Math.max(big, Math.abs(v));
    yUnit = delayUnit(big);
  }
  for (const r of raw) {
    const y = new Float64Array(r.y.length);
    for (let q = 0; q < y.length; q++) y[q] = r.y[q]! / yUnit.scale;
    series.push({ label: r.label, display: r.display, color: r.color, dash: r.dash, f: r.f, y });
  }

  // a series with nothing to draw is named in the plot; a plot with nothing at all is an error
  const empty = series.filter((s) => !s.y.some((v) => Number.isFinite(v)));
  if (series.length > 0 && empty.length === series.length) {
    const names = series.map((s) => s.display).join(', ');
    throw new OutputError(`nothing to plot: ${names} ${series.length === 1 ? 'has' : 'have'} no value to draw (${emptyReason(kind, Math.max(...series.map((q) => q.f.length)))})`);
  }

  // y range: data and limits; a dB axis reaches at most DB_AXIS_SPAN below the largest value shown,
  // so that numerical zeros (|S| = 1e-20 is −400 dB) do not squash the data that matters
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of series) for (const v of s.y) if (Number.isFinite(v)) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
  for (const l of limits) for (const [, v] of l.points) hi = Math.max(hi, v / yUnit.scale);
  if (kind === 'db' && Number.isFinite(hi)) lo = Math.max(lo, dbAxisFloor(hi));
  for (const l of limits) for (const [, v] of l.points) lo = Math.min(lo, v / yUnit.scale);
  const yt = kind === 'phase' ? { min: -180, max: 180, step: 90, values: [-180, -90, 0, 90, 180], decimals: 0 } : ticks(lo, hi, 6, true);
  const xUnit = frequencyUnit(fHi);
  const xt = ticks(fLo / xUnit.scale, fHi / xUnit.scale, 8, false);

  // layout
  const legendItems: { label: string; color: string; kind: 'line'; dash?: string }[] = overlay
    ? [...overlay.legend.map((it) => ({ label: it.label, color: it.color, kind: 'line' as const })), ...overlay.entryKeys.map((it) => ({ label: it.label, color: it.color, kind: 'line' as const, dash: it.dash }))]
    : [...series.map((s) => ({ label: s.display, color: s.color, kind: 'line' as const }))];
  if (limits.length > 0) legendItems.push({ label: 'spec limit', color: COLORS.limit, kind: 'line' });
  if (fails.length > 0) legendItems.push({ label: 'failing', color: COLORS.fail, kind: 'line' });
  const left = 66;
  const right = 18;
  const titleH = options.title ? 24 : 0;
  const itemW = overlay ? Math.max(96, Math.ceil(30 + 6.6 * Math.max(...legendItems.map((it) => it.label.length)))) : 96;
  const perRow = Math.max(1, Math.floor((width - left - right) / itemW));
  const rows = Math.ceil(legendItems.length / perRow);
  const top = 14 + titleH + rows * 18;
  const bottom = 48;
  const pw = width - left - right;
  const ph = height - top - bottom;
  if (pw < 40 || ph < 40) throw new OutputError(`a plot of ${width} × ${height} pixels leaves no room for the axes and the data`, 'make it larger (at least about 200 × 200)');
  const X = (hz: number) => left + ((hz / xUnit.scale - xt.min) / (xt.max - xt.min || 1)) * pw;
  const Y = (v: number) => top + (1 - (v - yt.min) / (yt.max - yt.min || 1)) * ph;

  const out: string[] = [];
  const yAttr = kind === 'gd' ? ` data-y-unit="${yUnit.unit}" data-y-scale="${yUnit.scale}"` : ` data-y-unit="${yUnit.unit}"`;
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="${FONT}" data-kind="${kind}" data-x-min="${fLo}" data-x-max="${fHi}" data-y-min="${yt.min}" data-y-max="${yt.max}"${yAttr}${overlay ? ` data-inputs="${parts.length}"` : ''}>`,
  );
  out.push(`<rect width="${width}" height="${height}" fill="#ffffff"/>`);
  if (options.title) out.push(`<text x="${left}" y="18" font-size="14" font-weight="600" fill="${COLORS.ink}">${escapeXml(options.title)}</text>`);
  // legend
  legendItems.forEach((it, q) => {
    const x = left + (q % perRow) * itemW;
    const y = 14 + titleH + Math.floor(q / perRow) * 18;
    if (it.label === 'failing') {
      out.push(`<rect x="${x}" y="${y - 5}" width="18" height="10" fill="${COLORS.failShade}" stroke="${COLORS.fail}" stroke-width="0.8"/>`);
    } else {
      const dash = it.label === 'spec limit' && q >= legendItems.length - 2 ? ' stroke-dasharray="5 3"' : it.dash ? ` stroke-dasharray="${it.dash}"` : '';
      out.push(`<line x1="${x}" y1="${y}" x2="${x + 18}" y2="${y}" stroke="${it.color}" stroke-width="2.2"${dash}/>`);
    }
    const part = overlay ? (q < overlay.legend.length ? ' data-legend="input"' : q < overlay.legend.length + overlay.entryKeys.length ? ' data-legend="entry"' : '') : '';
    out.push(`<text x="${x + 24}" y="${y + 4}" font-size="11.5" fill="${COLORS.ink}"${part}>${escapeXml(it.label)}</text>`);
  });
  // frame, grid, ticks
  out.push(`<rect x="${left}" y="${top}" width="${pw}" height="${ph}" fill="#fcfcfd" stroke="${COLORS.gridStrong}"/>`);
  const grid: string[] = [];
  const labels: string[] = [];
  for (const v of xt.values) {
    const x = coord(left + ((v - xt.min) / (xt.max - xt.min || 1)) * pw);
    grid.push(`<line x1="${x}" y1="${top}" x2="${x}" y2="${top + ph}"/>`);
    labels.push(`<text x="${x}" y="${top + ph + 16}" text-anchor="middle">${fixed(v, xt.decimals)}</text>`);
  }
  for (const v of yt.values) {
    const y = coord(Y(v));
    grid.push(`<line x1="${left}" y1="${y}" x2="${left + pw}" y2="${y}"/>`);
    labels.push(`<text x="${left - 6}" y="${coord(Y(v) + 4)}" text-anchor="end">${fixed(v, yt.decimals)}</text>`);
  }
  out.push(`<g stroke="${COLORS.grid}" stroke-width="1" data-part="grid">${grid.join('')}</g>`);
  out.push(`<g font-size="11" fill="${COLORS.muted}" data-part="ticks">${labels.join('')}</g>`);
  out.push(`<text x="${coord(left + pw / 2)}" y="${height - 10}" font-size="12" text-anchor="middle" fill="${COLORS.ink}" data-part="x-title">Frequency (${xUnit.unit})</text>`);
  const yTitle = kind === 'gd' ? `${Y_TITLES.gd} (${yUnit.unit})` : Y_TITLES[kind];
  out.push(`<text transform="translate(16 ${coord(top + ph / 2)}) rotate(-90)" font-size="12" text-anchor="middle" fill="${COLORS.ink}" data-part="y-title">${escapeXml(yTitle)}</text>`);
  out.push(`<clipPath id="${id}-clip"><rect x="${left}" y="${top}" width="${pw}" height="${ph}"/></clipPath>`);
  // failing intervals under the data
  const body: string[] = [];
  for (const fl of fails) {
    for (const [a, b] of fl.intervals) {
      const x0 = X(a);
      const w = Math.max(2, X(b) - x0);
      body.push(`<rect x="${coord(x0 - (X(b) - x0 < 2 ? 1 : 0))}" y="${top}" width="${coord(w)}" height="${ph}" fill="${COLORS.failShade}" data-fail="${escapeXml(fl.spec)}"/>`);
    }
  }
  // data; a sweep of one point is a dot (a path of one point draws nothing)
  for (const s of series) {
    const dash = s.dash ? ` stroke-dasharray="${s.dash}"` : '';
    body.push(`<path d="${linePath(s.f, s.y, X, Y, pw, kind === 'phase')}" fill="none" stroke="${s.color}" stroke-width="1.7" stroke-linejoin="round"${dash} data-entry="${escapeXml(s.label)}"/>`);
    if (s.f.length === 1 && Number.isFinite(s.y[0]!)) body.push(`<circle cx="${coord(X(s.f[0]!))}" cy="${coord(Y(s.y[0]!))}" r="3.5" fill="${s.color}" data-point="${escapeXml(s.label)}"/>`);
  }
  // limits on top
  for (const l of limits) {
    if (l.points.length === 0) continue;
    const d = l.points.map(([hz, v], q) => `${q === 0 ? 'M' : 'L'}${coord(X(hz))} ${coord(Y(v / yUnit.scale))}`).join('');
    const single = l.points.length === 1 ? `M${coord(X(l.points[0]![0]) - 4)} ${coord(Y(l.points[0]![1] / yUnit.scale))}h8` : '';
    const color = l.pass ? COLORS.limit : COLORS.fail;
    body.push(`<path d="${single || d}" fill="none" stroke="${color}" stroke-width="1.6" stroke-dasharray="6 3" data-limit="${escapeXml(l.spec)}"/>`);
  }
  for (const fl of fails) {
    if (!fl.worst) continue;
    const x = X(fl.worst[0]);
    const y = Y(fl.worst[1] / yUnit.scale);
    body.push(`<path d="M${coord(x - 4)} ${coord(y - 4)}L${coord(x + 4)} ${coord(y + 4)}M${coord(x - 4)} ${coord(y + 4)}L${coord(x + 4)} ${coord(y - 4)}" stroke="${COLORS.fail}" stroke-width="2" data-worst="${escapeXml(fl.spec)}"/>`);
  }
  out.push(`<g clip-path="url(#${id}-clip)">${body.join('\n')}</g>`);
  // limit names beside an end of each line, inside the plot; a name that would overlap one already
  // placed tries the other places, and is left out if none is free (the line stays)
  const names: string[] = [];
  const boxes: [number, number, number, number][] = [];
  for (const l of limits) {
    if (l.points.length === 0) continue;
    const w = 6 * l.spec.length;
    const a = l.points[0]!;
    const z = l.points[l.points.length - 1]!;
    const ax = X(a[0]);
    const ay = Y(a[1] / yUnit.scale);
    const zx = X(z[0]);
    const zy = Y(z[1] / yUnit.scale);
    // beside the start (above, below), beside the end (above, below), past the end, before the start
    const spots: [number, number][] = [
      [ax + 3, ay - 4],
      [ax + 3, ay + 12],
      [zx - w - 3, zy - 4],
      [zx - w - 3, zy + 12],
      [zx + 4, zy + 4],
      [ax - w - 4, ay + 4],
    ];
    let spot: [number, number] | undefined;
    for (const [sx, sy] of spots) {
      const x = Math.min(Math.max(sx, left + 2), left + pw - w - 2);
      const y = Math.min(Math.max(sy, top + 10), top + ph - 3);
      const box: [number, number, number, number] = [x, y - 9, x + w, y + 2];
      if (boxes.some((b) => b[0] < box[2] && box[0] < b[2] && b[1] < box[3] && box[1] < b[3])) continue;
      spot = [x, y];
      boxes.push(box);
      break;
    }
    if (spot) names.push(`<text x="${coord(spot[0])}" y="${coord(spot[1])}" fill="${l.pass ? COLORS.limit : COLORS.fail}">${escapeXml(l.spec)}</text>`);
  }
  if (names.length > 0) out.push(`<g font-size="10" data-part="limit-names">${names.join('')}</g>`);
  if (empty.length > 0 || (overlay && overlay.notes.length > 0)) {
    const notes = empty.map((s, q) => `<text x="${left + 8}" y="${coord(top + 16 + 14 * q)}" data-empty="${escapeXml(s.label)}">${escapeXml(`${s.display}: not drawn, ${emptyReason(kind, s.f.length)}`)}</text>`);
    for (const note of overlay?.notes ?? []) notes.push(`<text x="${left + 8}" y="${coord(top + 16 + 14 * notes.length)}" data-note="overlay">${escapeXml(`note: ${note}`)}</text>`);
    out.push(`<g font-size="11" fill="${COLORS.muted}" data-part="notes">${notes.join('')}</g>`);
  }
  out.push('</svg>');
  return out.join('\n') + '\n';
}

/**
 * Path data of one series. Non-finite values and (for phase) wraps of more than 180° between
 * neighbours break the line. When there are more points than 4 per pixel column, each column keeps
 * its first, lowest, highest and last value.
 */
function linePath(f: Float64Array, y: Float64Array, X: (hz: number) => number, Y: (v: number) => number, pw: number, wraps: boolean): string {
  const m = f.length;
  const parts: string[] = [];
  let pen = false;
  let prev = NaN;
  const put = (hz: number, v: number) => {
    parts.push(`${pen ? 'L' : 'M'}${coord(X(hz))} ${coord(Y(v))}`);
    pen = true;
  };
  const thin = m > 4 * pw;
  if (!thin) {
    for (let k = 0; k < m; k++) {
      const v = y[k]!;
      if (!Number.isFinite(v)) {
        pen = false;
        prev = NaN;
        continue;
      }
      if (wraps && Number.isFinite(prev) && Math.abs(v - prev) > 180) pen = false;
      put(f[k]!, v);
      prev = v;
    }
    return parts.join('');
  }
  let k = 0;
  while (k < m) {
    const col = Math.floor(X(f[k]!));
    let q = k;
    let lo = k;
    let hi = k;
    let broken = false;
    while (q < m && Math.floor(X(f[q]!)) === col) {
      const v = y[q]!;
      if (!Number.isFinite(v) || (wraps && q > k && Math.abs(v - y[q - 1]!) > 180)) broken = true;
      if (Number.isFinite(v)) {
        if (!(y[lo]! <= v)) lo = q;
        if (!(y[hi]! >= v)) hi = q;
      }
      q++;
    }
    if (broken) {
      // keep every point of a column with a break, so the break lands where it is
      for (let r = k; r < q; r++) {
        const v = y[r]!;
        if (!Number.isFinite(v)) {
          pen = false;
          prev = NaN;
          continue;
        }
        if (wraps && Number.isFinite(prev) && Math.abs(v - prev) > 180) pen = false;
        put(f[r]!, v);
        prev = v;
      }
    } else {
      const picks = [...new Set([k, Math.min(lo, hi), Math.max(lo, hi), q - 1])];
      for (const r of picks) {
        const v = y[r]!;
        if (wraps && Number.isFinite(prev) && Math.abs(v - prev) > 180) pen = false;
        put(f[r]!, v);
        prev = v;
      }
    }
    k = q;
  }
  return parts.join('');
}

function smithSvg(parts: Part[], options: PlotSvgOptions, id: string, overlay?: OverlayLegend): string {
  const width = options.width ?? 560;
  const height = options.height ?? 460;
  const titleH = options.title ? 24 : 0;
  const longest = overlay ? Math.max(...[...overlay.legend, ...overlay.entryKeys].map((it) => it.label.length)) : 0;
  const legendW = overlay ? Math.min(Math.max(130, Math.ceil(34 + 6.6 * longest)), Math.floor(width / 2)) : 130;
  const pad = 30;
  const diameter = Math.min(width - legendW - 2 * pad, height - titleH - 2 * pad);
  if (diameter < 60) throw new OutputError(`a Smith chart of ${width} × ${height} pixels leaves no room for the chart`, 'make it larger (at least about 250 × 150)');
  const frame = { cx: pad + diameter / 2, cy: titleH + pad + diameter / 2, radius: diameter / 2 };
  const traces = parts.flatMap((p) => {
    const model = p.model;
    let picks = model.smith;
    if (options.entries) {
      const want = new Set(options.entries.filter(([i, j]) => i === j).map(([i]) => i));
      picks = picks.filter((k) => want.has(model.entries[k]!.i));
    }
    return picks.map((k) => {
      const e = model.entries[k]!;
      const s = entrySeries(model.s, e.i, e.j);
      const t = p.trace(e);
      return { label: t.key, display: t.display, color: t.color, dash: t.dash, re: s.re, im: s.im };
    });
  });
  const model = parts[0]!.model;
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="${FONT}" data-kind="smith" data-id="${escapeXml(id)}"${overlay ? ` data-inputs="${parts.length}"` : ''}>`);
  out.push(`<rect width="${width}" height="${height}" fill="#ffffff"/>`);
  if (options.title) out.push(`<text x="${pad}" y="18" font-size="14" font-weight="600" fill="${COLORS.ink}">${escapeXml(options.title)}</text>`);
  out.push(smithFragment({ frame, traces, admittance: 'none', fontSize: 10 }));
  const lx = width - legendW + 6;
  let ly = titleH + pad + 6;
  const leg: string[] = [];
  const items = overlay
    ? [...overlay.legend.map((it) => ({ ...it, part: 'input' })), ...overlay.entryKeys.map((it) => ({ ...it, part: 'entry' }))]
    : traces.map((t) => ({ label: t.display, color: t.color, dash: '', part: '' }));
  for (const t of items) {
    const dash = t.dash ? ` stroke-dasharray="${t.dash}"` : '';
    const part = t.part ? ` data-legend="${t.part}"` : '';
    leg.push(`<line x1="${lx}" y1="${ly}" x2="${lx + 18}" y2="${ly}" stroke="${t.color}" stroke-width="2.2"${dash}/><text x="${lx + 24}" y="${ly + 4}"${part}>${escapeXml(t.label)}</text>`);
    ly += 18;
  }
  ly += 8;
  leg.push(`<circle cx="${lx + 9}" cy="${ly}" r="3.2" fill="#ffffff" stroke="${COLORS.muted}" stroke-width="1.5"/><text x="${lx + 24}" y="${ly + 4}">first point</text>`);
  ly += 18;
  leg.push(`<circle cx="${lx + 9}" cy="${ly}" r="3.2" fill="${COLORS.muted}"/><text x="${lx + 24}" y="${ly + 4}">last point</text>`);
  ly += 24;
  const fLo = Math.min(...parts.map((p) => p.model.s.frequencies[0] ?? Infinity));
  const fHi = Math.max(...parts.map((p) => p.model.s.frequencies[p.model.s.frequencies.length - 1] ?? -Infinity));
  if (Number.isFinite(fLo) && Number.isFinite(fHi)) {
    const u = frequencyUnit(fHi);
    const lo = Number((fLo / u.scale).toPrecision(6));
    const hi = Number((fHi / u.scale).toPrecision(6));
    leg.push(`<text x="${lx}" y="${ly}" fill="${COLORS.muted}">${lo}–${hi} ${u.unit}</text>`);
    ly += 16;
  }
  // one reference a line (R + jX for a complex one), so that a long list stays inside the legend
  const refs = referenceList(model.s);
  const refLines = refs.length === 1 ? [`Z0 = ${refs[0]!}`] : Array.from(model.s.references, (_, p) => `port ${p + 1}: ${portReference(model.s, p + 1)}`);
  refLines.forEach((line, q) => {
    leg.push(`<text x="${lx}" y="${ly + 16 * q}" fill="${COLORS.muted}" data-part="reference">${escapeXml(line)}</text>`);
  });
  if (overlay) {
    ly += 16 * refLines.length + 8;
    const sameRefs = parts.every((p) => referenceList(p.model.s).join() === referenceList(model.s).join());
    const notes = [...(sameRefs ? [] : ['the inputs have different references: each is drawn against its own']), ...overlay.notes];
    notes.forEach((note, q) => leg.push(`<text x="${lx}" y="${ly + 14 * q}" fill="${COLORS.muted}" font-size="10" data-note="overlay">${escapeXml(`note: ${note}`)}</text>`));
  }
  out.push(`<g font-size="11.5" fill="${COLORS.ink}" data-part="legend">${leg.join('')}</g>`);
  out.push('</svg>');
  return out.join('\n') + '\n';
}
