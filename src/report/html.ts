/**
 * The HTML report: one self-contained file that opens offline. Summary (title, ports and
 * references, sweep, spec results), a Smith chart of the reflections drawn in SVG, plots of |Sij|
 * in dB, phase and group delay drawn with uPlot, spec limits and failing intervals, a readout at the
 * cursor or marker, trace toggles, and a table at chosen frequencies.
 *
 * Offline guarantee: every script and style is inline (uPlot's own files are read from its package
 * at render time), the data is inline JSON, there are no fonts, images or links to load, and a
 * Content-Security-Policy in the page forbids the browser to fetch anything at all (default-src
 * 'none'; only inline scripts and styles and data: images are allowed).
 *
 * @module
 */

import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { basename } from 'node:path';
import { evaluateSpecs } from '../check/evaluate.js';
import { describeSpec, formatFrequency, formatMargin } from '../check/format.js';
import type { SpecResult } from '../check/types.js';
import type { Circuit } from '../elaborate/circuit.js';
import type { NetworkData } from '../network/types.js';
import { CLIENT_SCRIPT } from './client.js';
import { DB_AXIS_SPAN, delayUnit, escapeXml, fixed, frequencyUnit, portReference, referenceList, round } from './format.js';
import { buildModel, COLORS, entryDelay, entrySeries, PLOT_TITLES, prepareOverlay, summarizeSweep, type Dataset, type EntrySeries, type OverlayPart, type PlotFail, type PlotLimit, type ReportModel, type SweepSummary } from './model.js';
import { smithFragment } from './smith.js';
import { REPORT_CSS } from './style.js';
import { LIVE_CSS, LIVE_SCRIPT, liveSection, type LivePage } from './live.js';

/** Input of {@link renderReport}. */
export interface ReportInput {
  /** Heading (default: the circuit's or the network's title, else the source's file name). */
  title?: string;
  /** Where the data came from (a netlist or Touchstone path), shown in the header. */
  source: string;
  net: NetworkData;
  /** The circuit, for port nodes, the sweep and the spec definitions. */
  circuit?: Circuit;
  /** Spec results (default: the circuit's specs evaluated on `net`). */
  specs?: SpecResult[];
  /** Frequencies (Hz) for the table; each row shows the nearest sweep point. Default: the sweep's
   *  ends and the spec band edges inside it (at most 12), or 5 points across the sweep. */
  tableFrequencies?: number[];
  /** Entries [to, from], 1-based, for the rectangular plots (default: all up to 4 ports). */
  entries?: [number, number][];
  /** Makes the page a live one (src/live/): the tuning section and the script that talks to its server. */
  live?: LivePage;
}

/**
 * Input of {@link renderReport} for several inputs on one page: netlists and data files overlaid
 * (simulated against measured, before against after), or the members of a family.
 */
export interface OverlayReportInput {
  /** The inputs, each with its legend label (a file name, `cshunt = 1.5 pF`). */
  datasets: Dataset[];
  /** Heading (default: the labels joined). */
  title?: string;
  /** What the page is of, shown in the header (default: the inputs' sources or labels). */
  source?: string;
  /** Frequencies (Hz) for the table; each cell shows its input's nearest point. */
  tableFrequencies?: number[];
  /** Entries [to, from], 1-based, for the rectangular plots (default: each input's own, all up to 4 ports). */
  entries?: [number, number][];
}

const UPLOT_VERSION = '1.6.32';

/** uPlot's script and stylesheet, read from its installed package. */
function uplotAssets(): { js: string; css: string; version: string } {
  const require = createRequire(import.meta.url);
  const js = readFileSync(require.resolve('uplot/dist/uPlot.iife.min.js'), 'utf8');
  const css = readFileSync(require.resolve('uplot/dist/uPlot.min.css'), 'utf8');
  let version = UPLOT_VERSION;
  try {
    version = (JSON.parse(readFileSync(require.resolve('uplot/package.json'), 'utf8')) as { version?: string }).version ?? version;
  } catch {
    // the package file is optional here; the version is only shown in a comment
  }
  return { js, css, version };
}

/** Text that is safe inside a <script> element (no end tag, no comment opener). */
function scriptText(s: string): string {
  return s.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\!--');
}

/** Text that is safe inside a <style> element. */
function styleText(s: string): string {
  return s.replace(/<\/(style)/gi, '<\\/$1');
}

/** The data block: JSON with `<` escaped, so that no text in it can end the element. */
function jsonBlock(value: unknown): string {
  return JSON.stringify(value).replace(/</g, '\\u003c').replace(/\u2028/g, '\\u2028').replace(/\u2029/g, '\\u2029');
}

const SMITH_SIZE = 440;
const SMITH_FRAME = { cx: SMITH_SIZE / 2, cy: SMITH_SIZE / 2, radius: SMITH_SIZE / 2 - 34 };

/**
 * Renders the report as one HTML document (a string). Deterministic: the same input gives the
 * same bytes. Throws RangeError for a network without frequency points.
 */
export function renderReport(input: ReportInput | OverlayReportInput): string {
  if ('datasets' in input) return renderOverlayReport(input);
  const c = reportContent(input);
  const live = input.live;
  const assets = uplotAssets();
  const out: string[] = [];
  pageTop(out, { title: c.data.title, kicker: live ? 'live' : 'network report', source: input.source, verdictStatus: c.verdict.status, verdictText: c.verdict.text, css: `${styleText(REPORT_CSS)}${live ? styleText(LIVE_CSS) : ''}`, assets, live: !!live });
  if (live) out.push(liveSection(live));
  out.push('<section class="summary" data-testid="summary">', c.html.summary, '</section>');
  out.push('<section class="specs" data-testid="specs">', c.html.specs, '</section>');
  responseSection(out, { hint: '', legend: '', smith: c.html.smith, gdSub: c.gdSub });
  out.push('<section class="values" data-testid="values">', c.html.values, '</section>');
  pageEnd(out, assets, c.data, live);
  return out.join('\n') + '\n';
}

/**
 * What a single-input report shows, apart from its frame: the page's data block and the HTML of
 * its parts (summary, spec table, Smith chart, table of values) and its verdict. The report is
 * put together from it, and a live page (src/live/) sends it again for each new result, which
 * the page's script (`scatterboxReport.update`) draws in place: one code path for both.
 */
export interface ReportContent {
  data: ReportData;
  verdict: { status: 'none' | 'pass' | 'fail'; text: string };
  /** The group-delay plot's subtitle. */
  gdSub: string;
  html: { summary: string; specs: string; smith: string; smithBody: string; values: string };
}

/** The data block of a single-input page (see {@link reportContent}). */
export type ReportData = ReturnType<typeof reportData>;

/** The content of a single-input report (see {@link ReportContent}). */
export function reportContent(input: ReportInput): ReportContent {
  const net = input.net;
  if (net.frequencies.length === 0) throw new RangeError('the network has no frequency points: there is nothing to report');
  const specs = input.specs ?? (input.circuit && input.circuit.specs.length > 0 ? evaluateSpecs(input.circuit.specs, net) : []);
  const model = buildModel(net, specs, input.entries);
  const s = model.s;
  const f = s.frequencies;
  const series = model.entries.map((e) => entrySeries(s, e.i, e.j));
  const data = reportData(input, model, series);
  const passCount = specs.filter((r) => r.pass).length;
  const verdict = {
    status: specs.length === 0 ? 'none' : passCount === specs.length ? 'pass' : 'fail',
    text: specs.length === 0 ? 'no specs' : passCount === specs.length ? `all ${specs.length} specs pass` : `${specs.length - passCount} of ${specs.length} specs fail`,
  } as const;
  const smith = smithFigure(model, series);
  const gdOf = model.plots.gd.some((k) => model.entries[k]!.i !== model.entries[k]!.j) ? 'the transmissions' : 'the reflections';
  return {
    data,
    verdict,
    gdSub: `${data.gdUnit.unit}, −dφ/dω of ${gdOf}`,
    html: {
      summary: ['<h2>Summary</h2>', '<div class="cards">', portsCard(s, input.circuit), sweepCard(summarizeSweep(f)), networkCard(net, model, specs), '</div>'].join('\n'),
      specs: ['<h2>Specs</h2>', specTable(specs, model)].join('\n'),
      smith: smith.figure,
      smithBody: smith.body,
      values: ['<h2>Values at selected frequencies</h2>', frequencyTable(model, series, input.tableFrequencies ?? defaultTableFrequencies(f, specs))].join('\n'),
    },
  };
}

function reportData(input: ReportInput, model: ReportModel, series: EntrySeries[]) {
  const net = input.net;
  const s = model.s;
  const f = s.frequencies;
  const title = input.title ?? input.circuit?.title ?? net.title ?? basename(input.source);
  const sweep = summarizeSweep(f);
  const delays = model.entries.map((e, k) => (model.plots.gd.includes(k) ? entryDelay(s, e.i, e.j) : null));
  let bigDelay = 0;
  for (const d of delays) if (d) for (const v of d) if (Number.isFinite(v)) bigDelay = Math.max(bigDelay, Math.abs(v));
  const gdUnit = delayUnit(bigDelay);
  const xUnit = frequencyUnit(f[f.length - 1]!);
  const logX = sweep.spacing === 'log' && sweep.start > 0 && sweep.stop / sweep.start >= 100;
  return {
    schema: 'scatterbox.report/1',
    title,
    source: input.source,
    ports: s.ports,
    parameter: net.parameter,
    f: Array.from(f, (x) => x),
    xUnit,
    logX,
    gdUnit,
    dbSpan: DB_AXIS_SPAN,
    colors: { ink: COLORS.ink, muted: COLORS.muted, grid: COLORS.grid, gridStrong: COLORS.gridStrong, limit: COLORS.limit, fail: COLORS.fail, accent: COLORS.accent },
    entries: model.entries.map((e, k) => ({
      label: e.label,
      display: e.display,
      i: e.i,
      j: e.j,
      color: e.color,
      z0: s.references[e.i - 1]!,
      x0: s.referenceReactances?.[e.i - 1] ?? 0,
      re: Array.from(series[k]!.re, (x) => round(x, 12)),
      im: Array.from(series[k]!.im, (x) => round(x, 12)),
      db: Array.from(series[k]!.db, (x) => round(x, 9)),
      deg: Array.from(series[k]!.deg, (x) => round(x, 9)),
      gd: delays[k] ? Array.from(delays[k]!, (x) => round(x, 9)) : null,
    })),
    plots: model.plots,
    smith: model.smith,
    smithFrame: SMITH_FRAME,
    limits: model.limits,
    fails: model.fails,
  };
}

/** The page up to its main part: head (styles inline, the content policy), header with the verdict. */
function pageTop(
  out: string[],
  o: { title: string; kicker: string; source: string; verdictStatus: string; verdictText: string; css: string; assets: { css: string; version: string }; live?: boolean },
): void {
  // a live page talks to the server it came from (its events and its requests), and to nothing else
  const csp = `default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:; font-src 'none'; connect-src ${o.live ? "'self'" : "'none'"}; media-src 'none'; object-src 'none'; frame-src 'none'; worker-src 'none'; base-uri 'none'; form-action 'none'`;
  out.push('<!doctype html>');
  out.push('<html lang="en">');
  out.push('<head>');
  out.push('<meta charset="utf-8">');
  out.push('<meta name="viewport" content="width=device-width, initial-scale=1">');
  out.push(`<meta http-equiv="Content-Security-Policy" content="${csp}">`);
  out.push('<meta name="generator" content="scatterbox">');
  out.push(`<title>${escapeXml(o.title)} · scatterbox ${o.live ? 'live' : 'report'}</title>`);
  out.push('<link rel="icon" href="data:,">');
  out.push(`<style>/* uPlot ${escapeXml(o.assets.version)} (MIT licence) */\n${styleText(o.assets.css)}</style>`);
  out.push(`<style>${o.css}</style>`);
  out.push('</head>');
  out.push('<body>');
  out.push('<header class="sbx-head">');
  out.push('<div class="sbx-titles">');
  out.push(`<p class="sbx-kicker">scatterbox · ${escapeXml(o.kicker)}</p>`);
  out.push(`<h1 data-testid="title">${escapeXml(o.title)}</h1>`);
  out.push(`<div class="sbx-source">source <code data-testid="source">${escapeXml(o.source)}</code></div>`);
  out.push('</div>');
  out.push(`<div class="verdict" data-testid="verdict" data-status="${o.verdictStatus}">${escapeXml(o.verdictText)}</div>`);
  out.push('</header>');
  out.push('<main>');
  out.push('<noscript><p>Scripts are off: the plots of magnitude, phase and group delay need them. The summary, the Smith chart and the tables are shown as they are.</p></noscript>');
}

/** The response section: toolbar, (legend,) readout, magnitude, Smith chart, phase and group delay. */
function responseSection(out: string[], o: { hint: string; legend: string; smith: string; gdSub: string }): void {
  out.push('<section class="response" data-testid="response">');
  out.push('<h2>Response</h2>');
  out.push('<div class="toolbar">');
  out.push('<label><input type="checkbox" data-testid="toggle-limits" checked> spec limits and failing bands</label>');
  out.push('<button type="button" data-testid="reset-zoom">reset zoom</button>');
  out.push(`<span class="hint">${o.hint}Drag across a plot to zoom in; click to place a marker; click a legend entry to hide or show a trace.</span>`);
  out.push('</div>');
  if (o.legend) out.push(o.legend);
  out.push('<div class="readout" data-testid="readout" aria-live="polite"></div>');
  out.push(plotFigure('db', 'Magnitude', '|S| in dB', 300));
  out.push('<div class="charts">');
  out.push(o.smith);
  out.push('<div class="stack">');
  out.push(plotFigure('phase', 'Phase', 'degrees, wrapped to ±180°', 200));
  out.push(plotFigure('gd', 'Group delay', o.gdSub, 200));
  out.push('</div>');
  out.push('</div>');
  out.push('</section>');
}

/** The end of the page: footer, the data, uPlot and the page's own script. */
function pageEnd(out: string[], assets: { js: string; version: string }, data: unknown, live?: LivePage): void {
  out.push('</main>');
  out.push(
    live
      ? `<footer>Made by scatterbox live. This page talks only to the local server that made it. Plots drawn with uPlot ${escapeXml(assets.version)}.</footer>`
      : `<footer>Made by scatterbox. Everything this page shows is inside this one file (data, scripts, styles); it makes no network requests. Plots drawn with uPlot ${escapeXml(assets.version)}.</footer>`,
  );
  out.push(`<script type="application/json" id="sbx-data">${jsonBlock(data)}</script>`);
  out.push(`<script>/* uPlot ${escapeXml(assets.version)}, MIT licence */\n${scriptText(assets.js)}</script>`);
  out.push(`<script>${scriptText(CLIENT_SCRIPT)}</script>`);
  if (live) out.push(`<script>${scriptText(LIVE_SCRIPT)}</script>`);
  out.push('</body>');
  out.push('</html>');
}

function portsCard(s: NetworkData, circuit: Circuit | undefined): string {
  const rows: string[] = [];
  for (let p = 1; p <= s.ports; p++) {
    const port = circuit?.ports.find((q) => q.number === p);
    const nodes = port ? `${escapeXml(port.plusName)} <span class="muted">/</span> ${escapeXml(port.minusName)}` : '<span class="muted">—</span>';
    const x = s.referenceReactances?.[p - 1] ?? 0;
    const xAttr = x === 0 ? '' : ` data-reactance="${x}"`;
    rows.push(`<tr data-testid="port-row" data-port="${p}" data-reference="${s.references[p - 1]}"${xAttr}><td>${p}</td><td>${nodes}</td><td class="num">${escapeXml(portReference(s, p))}</td></tr>`);
  }
  return `<div class="card" data-testid="ports"><h3>Ports</h3><table><thead><tr><th>port</th><th>nodes (+ / −)</th><th class="num">reference</th></tr></thead><tbody>${rows.join('')}</tbody></table></div>`;
}

function sweepCard(w: SweepSummary): string {
  let spacing: string;
  if (w.spacing === 'linear') spacing = `even, ${formatFrequency(w.step!)} steps`;
  else if (w.spacing === 'log') spacing = `logarithmic, ${Number(w.perDecade!.toPrecision(4))} points per decade`;
  else if (w.spacing === 'single') spacing = 'a single point';
  else spacing = `uneven, steps ${formatFrequency(w.minStep!)} to ${formatFrequency(w.maxStep!)}`;
  return (
    `<div class="card" data-testid="sweep" data-start="${w.start}" data-stop="${w.stop}" data-points="${w.points}"><h3>Sweep</h3><dl class="facts">` +
    `<dt>from</dt><dd>${formatFrequency(w.start)}</dd><dt>to</dt><dd>${formatFrequency(w.stop)}</dd>` +
    `<dt>points</dt><dd>${w.points}</dd><dt>spacing</dt><dd>${escapeXml(spacing)}</dd></dl></div>`
  );
}

function networkCard(net: NetworkData, model: ReportModel, specs: readonly SpecResult[]): string {
  const shown = model.plots.db.map((k) => model.entries[k]!.display).join(', ');
  const kind = net.parameter === 'S' ? 'S-parameters' : `${net.parameter}-parameters, shown as S for the port references`;
  const passed = specs.filter((r) => r.pass).length;
  return (
    `<div class="card" data-testid="network"><h3>Network</h3><dl class="facts">` +
    `<dt>ports</dt><dd>${net.ports}</dd><dt>data</dt><dd>${escapeXml(kind)}</dd>` +
    `<dt>traces</dt><dd>${escapeXml(shown)}</dd>` +
    `<dt>specs</dt><dd>${specs.length === 0 ? 'none' : `${passed} pass, ${specs.length - passed} fail`}</dd></dl></div>`
  );
}

/** Text with a true minus sign (−) before digits, for display. */
function minus(s: string): string {
  return s.replace(/-(?=[\d.∞])/g, '−');
}

function specTable(specs: readonly SpecResult[], model: ReportModel): string {
  if (specs.length === 0) return '<p class="muted" data-testid="no-specs">No specs were given.</p>';
  const rows = specs.map((r) => {
    const status = r.pass ? 'pass' : 'fail';
    const none = r.points === 0;
    const plot = model.placed.get(r.spec.name);
    const where = plot ? PLOT_TITLES[plot].toLowerCase() : '<span class="muted">not plotted</span>';
    return (
      `<tr class="spec-row" data-testid="spec-row" data-spec="${escapeXml(r.spec.name)}" data-status="${status}" data-margin="${r.worstMargin}" data-frequency="${r.worstFrequency}">` +
      `<td class="spec-name">${escapeXml(r.spec.name)}</td>` +
      `<td class="req">${escapeXml(minus(describeSpec(r.spec)))}</td>` +
      `<td><span class="chip ${status}">${r.pass ? 'PASS' : 'FAIL'}</span></td>` +
      `<td class="num" data-field="margin">${none ? 'no points in band' : escapeXml(minus(formatMargin(r.worstMargin, r.spec.unit)))}</td>` +
      `<td class="num" data-field="at">${none ? '' : escapeXml(formatFrequency(r.worstFrequency))}</td>` +
      `<td class="num" data-field="value">${none ? '' : escapeXml(minus(formatMargin(r.worstValue, r.spec.unit)))}</td>` +
      `<td class="num">${r.points}</td>` +
      `<td>${where}</td></tr>`
    );
  });
  return (
    '<div class="table-wrap"><table class="spec-table"><thead><tr><th>spec</th><th>requirement</th><th>result</th>' +
    '<th class="num">worst margin</th><th class="num">at</th><th class="num">value there</th><th class="num">points</th><th>plotted on</th></tr></thead>' +
    `<tbody>${rows.join('\n')}</tbody></table></div>`
  );
}

function plotFigure(kind: string, title: string, sub: string, height: number): string {
  return `<figure class="plot-card" data-plot="${kind}"><figcaption>${escapeXml(title)}<span class="sub">${escapeXml(sub)}</span></figcaption><div class="plot" data-testid="plot-${kind}" data-height="${height}"></div></figure>`;
}

function smithFigure(model: ReportModel, series: EntrySeries[]): { figure: string; body: string } {
  const traces = model.smith.map((k) => {
    const e = model.entries[k]!;
    return { label: e.label, display: e.display, color: e.color, re: series[k]!.re, im: series[k]!.im };
  });
  const body = smithFragment({ frame: SMITH_FRAME, traces, admittance: 'hidden', fontSize: 10.5, interactive: true });
  const svg =
    `<svg data-testid="smith" data-admittance="hidden" viewBox="0 0 ${SMITH_SIZE} ${SMITH_SIZE}" role="img" aria-label="Smith chart of the reflections" font-family="system-ui, 'DejaVu Sans', sans-serif">` +
    `${body}<g data-part="smith-dots" class="smith-dots"></g></svg>`;
  const toggles = traces
    .map((t) => `<button type="button" data-testid="smith-toggle" data-entry="${escapeXml(t.label)}" aria-pressed="true" style="--c:${t.color}"><i></i>${escapeXml(t.display)}</button>`)
    .join('');
  const list = referenceList(model.s);
  const refs = list.length === 1 ? list[0]! : Array.from(model.s.references, (_, p) => `${portReference(model.s, p + 1)} (port ${p + 1})`).join(', ');
  const figure =
    `<figure class="smith-card" data-plot="smith"><figcaption>Smith chart<span class="sub">reflections, normalised to ${escapeXml(refs)}</span></figcaption>${svg}` +
    `<div class="smith-controls">${toggles}<label><input type="checkbox" data-testid="toggle-admittance"> admittance grid</label></div>` +
    `<div class="smith-readout" data-testid="smith-readout"></div>` +
    `<div class="smith-note">○ first sweep point · ● last sweep point · grid: constant resistance and reactance</div></figure>`;
  return { figure, body };
}

/** The sweep's ends and the finite spec band edges inside it (sorted, at most 12), or 5 points across. */
export function defaultTableFrequencies(f: Float64Array, specs: readonly SpecResult[]): number[] {
  const lo = f[0]!;
  const hi = f[f.length - 1]!;
  if (specs.length === 0) {
    const out: number[] = [];
    const count = Math.min(5, f.length);
    for (let q = 0; q < count; q++) out.push(f[Math.round((q * (f.length - 1)) / Math.max(1, count - 1))]!);
    return [...new Set(out)];
  }
  const set = new Set<number>([lo, hi]);
  for (const r of specs) for (const e of r.spec.band) if (Number.isFinite(e) && e >= lo && e <= hi) set.add(e);
  const all = [...set].sort((a, b) => a - b);
  if (all.length <= 12) return all;
  // keep both ends and an even pick of the rest
  const pick: number[] = [];
  for (let q = 0; q < 12; q++) pick.push(all[Math.round((q * (all.length - 1)) / 11)]!);
  return [...new Set(pick)];
}

function nearestIndex(f: Float64Array, x: number): number {
  let best = 0;
  for (let k = 1; k < f.length; k++) if (Math.abs(f[k]! - x) < Math.abs(f[best]! - x)) best = k;
  return best;
}

function frequencyTable(model: ReportModel, series: EntrySeries[], freqs: readonly number[]): string {
  const f = model.s.frequencies;
  const cols = model.plots.db;
  const head1 = cols.map((k) => `<th colspan="2" class="entry"><span class="swatch" style="background:${model.entries[k]!.color}"></span>${escapeXml(model.entries[k]!.display)}</th>`).join('');
  const head2 = cols.map(() => '<th class="num">|S| dB</th><th class="num">∠ deg</th>').join('');
  const rows = freqs.map((want) => {
    const k = nearestIndex(f, want);
    const at = f[k]!;
    const moved = Math.abs(at - want) > 1e-9 * Math.max(Math.abs(want), 1);
    const label = moved ? `${formatFrequency(at)} <span class="muted">(asked ${formatFrequency(want)})</span>` : formatFrequency(at);
    const cells = cols
      .map((q) => {
        const e = model.entries[q]!;
        const db = series[q]!.db[k]!;
        const deg = series[q]!.deg[k]!;
        return `<td class="num" data-entry="${escapeXml(e.label)}" data-db="${db}" data-deg="${deg}">${Number.isFinite(db) ? fixed(db, 3) : '−∞'}</td><td class="num">${fixed(deg, 2)}</td>`;
      })
      .join('');
    return `<tr data-testid="freq-row" data-frequency="${at}" data-asked="${want}"><td class="freq">${label}</td>${cells}</tr>`;
  });
  return (
    `<div class="table-wrap"><table class="freq-table" data-testid="freq-table"><thead><tr><th rowspan="2" class="freq">frequency</th>${head1}</tr><tr>${head2}</tr></thead>` +
    `<tbody>${rows.join('\n')}</tbody></table></div>`
  );
}

/** One trace of an overlay page: an entry of one input. */
interface OverlayTrace {
  part: OverlayPart;
  /** Index of the input. */
  input: number;
  /** Index of the entry in the input's model. */
  entry: number;
  key: string;
  display: string;
  dash: string;
  series: EntrySeries;
}

/** The frequencies of every input merged (sorted, each once), and where each input's points fall in them. */
function mergeGrids(grids: readonly Float64Array[]): { f: Float64Array; at: Int32Array[] } {
  const all = new Set<number>();
  for (const g of grids) for (const x of g) all.add(x);
  const f = Float64Array.from([...all].sort((a, b) => a - b));
  const index = new Map<number, number>();
  f.forEach((x, k) => index.set(x, k));
  return { f, at: grids.map((g) => Int32Array.from(g, (x) => index.get(x)!)) };
}

/** Values of one input placed on the merged grid: null where the input has no point. */
function onGrid(values: ArrayLike<number>, at: Int32Array, size: number, digits: number): (number | null)[] {
  const out: (number | null)[] = new Array<number | null>(size).fill(null);
  for (let k = 0; k < at.length; k++) out[at[k]!] = round(values[k]!, digits);
  return out;
}

/**
 * The report of several inputs: one legend (each input its colour, each entry its dash), the
 * inputs listed with their sweeps and verdicts, one spec table per input that has specs, the
 * Smith chart and every plot overlaid, and the table of values with a column pair per trace.
 * Inputs with different sweeps are drawn on their own points (the page's frequency axis holds
 * every input's points; the readout shows each input's nearest point).
 */
function renderOverlayReport(input: OverlayReportInput): string {
  const overlay = prepareOverlay(input.datasets, input.entries);
  const parts = overlay.parts;
  const { f, at } = mergeGrids(parts.map((p) => p.model.s.frequencies));
  const title = input.title ?? parts.map((p) => p.label).join(' · ');
  const source = input.source ?? [...new Set(parts.map((p) => p.dataset.source ?? p.label))].join(', ');
  const traces: OverlayTrace[] = [];
  const traceOf = new Map<string, number>(); // `${input}:${entry}` → trace index
  parts.forEach((p, q) => {
    const used = new Set<number>([...p.model.plots.db, ...p.model.plots.phase, ...p.model.plots.gd, ...p.model.smith]);
    p.model.entries.forEach((e, k) => {
      if (!used.has(k)) return;
      traceOf.set(`${q}:${k}`, traces.length);
      traces.push({ part: p, input: q, entry: k, key: `${p.label} · ${e.label}`, display: `${p.label} · ${e.display}`, dash: overlay.dashOf(e.label), series: entrySeries(p.model.s, e.i, e.j) });
    });
  });
  const delays = traces.map((t) => (t.part.model.plots.gd.includes(t.entry) ? entryDelay(t.part.model.s, t.part.model.entries[t.entry]!.i, t.part.model.entries[t.entry]!.j) : null));
  let bigDelay = 0;
  for (const d of delays) if (d) for (const v of d) if (Number.isFinite(v)) bigDelay = Math.max(bigDelay, Math.abs(v));
  const gdUnit = delayUnit(bigDelay);
  const xUnit = frequencyUnit(f[f.length - 1]!);
  const sweep = summarizeSweep(f);
  const logX = sweep.spacing === 'log' && sweep.start > 0 && sweep.stop / sweep.start >= 100;
  const mapPlot = (q: number, list: number[]) => list.map((k) => traceOf.get(`${q}:${k}`)!);
  const plots = { db: parts.flatMap((p, q) => mapPlot(q, p.model.plots.db)), phase: parts.flatMap((p, q) => mapPlot(q, p.model.plots.phase)), gd: parts.flatMap((p, q) => mapPlot(q, p.model.plots.gd)) };
  const smith = parts.flatMap((p, q) => mapPlot(q, p.model.smith));
  // limits shared by several inputs (a family's) are drawn once, passing only where all pass
  const limits: PlotLimit[] = [];
  const limitKey = new Map<string, PlotLimit>();
  const fails: PlotFail[] = [];
  const shaded = new Set<string>();
  parts.forEach((p, q) => {
    for (const l of p.model.limits) {
      const key = `${l.spec}\u0000${l.plot}\u0000${l.bound}\u0000${JSON.stringify(l.points)}`;
      const had = limitKey.get(key);
      if (had) had.pass = had.pass && l.pass;
      else {
        const copy = { ...l, entry: traces[traceOf.get(`${q}:${p.model.entries.findIndex((e) => e.label === l.entry)}`) ?? 0]?.key ?? l.entry };
        limitKey.set(key, copy);
        limits.push(copy);
      }
    }
    for (const fl of p.model.fails) {
      // an interval where several inputs fail the same spec is shaded once (one more shade would darken it)
      const intervals = fl.intervals.filter((iv) => !shaded.has(`${fl.spec}\u0000${fl.plot}\u0000${iv[0]}\u0000${iv[1]}`));
      for (const iv of fl.intervals) shaded.add(`${fl.spec}\u0000${fl.plot}\u0000${iv[0]}\u0000${iv[1]}`);
      fails.push({ ...fl, intervals, spec: `${p.label} · ${fl.spec}`, entry: `${p.label} · ${fl.entry}` });
    }
  });
  const allSpecs = parts.flatMap((p) => p.specs);
  const data = {
    schema: 'scatterbox.report/1',
    title,
    source,
    overlay: true,
    inputs: parts.map((p) => ({ label: p.label, color: p.color, source: p.dataset.source ?? null, ports: p.model.s.ports })),
    ports: Math.max(...parts.map((p) => p.model.s.ports)),
    parameter: 'S',
    f: Array.from(f, (x) => x),
    xUnit,
    logX,
    gdUnit,
    dbSpan: DB_AXIS_SPAN,
    colors: { ink: COLORS.ink, muted: COLORS.muted, grid: COLORS.grid, gridStrong: COLORS.gridStrong, limit: COLORS.limit, fail: COLORS.fail, accent: COLORS.accent },
    entries: traces.map((t, k) => {
      const e = t.part.model.entries[t.entry]!;
      const s = t.part.model.s;
      const grid = at[t.input]!;
      return {
        label: t.key,
        display: t.display,
        input: t.input,
        i: e.i,
        j: e.j,
        color: t.part.color,
        dash: t.dash ? t.dash.split(' ').map(Number) : null,
        z0: s.references[e.i - 1]!,
        x0: s.referenceReactances?.[e.i - 1] ?? 0,
        re: onGrid(t.series.re, grid, f.length, 12),
        im: onGrid(t.series.im, grid, f.length, 12),
        db: onGrid(t.series.db, grid, f.length, 9),
        deg: onGrid(t.series.deg, grid, f.length, 9),
        gd: delays[k] ? onGrid(delays[k]!, grid, f.length, 9) : null,
      };
    }),
    plots,
    smith,
    smithFrame: SMITH_FRAME,
    limits,
    fails,
  };

  const assets = uplotAssets();
  const withSpecs = parts.filter((p) => p.specs.length > 0);
  const passingInputs = withSpecs.filter((p) => p.specs.every((r) => r.pass)).length;
  const verdictStatus = withSpecs.length === 0 ? 'none' : passingInputs === withSpecs.length ? 'pass' : 'fail';
  const verdictText =
    withSpecs.length === 0
      ? 'no specs'
      : passingInputs === withSpecs.length
        ? withSpecs.length === 1
          ? 'every spec passes'
          : `all ${withSpecs.length} inputs pass their specs`
        : `${withSpecs.length - passingInputs} of ${withSpecs.length} inputs fail a spec`;

  const out: string[] = [];
  pageTop(out, { title, kicker: parts.length === 1 ? 'network report' : `${parts.length} inputs overlaid`, source, verdictStatus, verdictText, css: `${styleText(REPORT_CSS)}${styleText(OVERLAY_CSS)}`, assets });

  // the inputs
  out.push('<section class="summary" data-testid="summary">');
  out.push('<h2>Inputs</h2>');
  out.push(inputsTable(parts));
  for (const note of overlay.notes) out.push(`<p class="overlay-note" data-testid="overlay-note">Note: ${escapeXml(note)}.</p>`);
  out.push('</section>');

  // specs: one table per input with specs
  out.push('<section class="specs" data-testid="specs">');
  out.push('<h2>Specs</h2>');
  if (withSpecs.length === 0) out.push('<p class="muted" data-testid="no-specs">No specs were given.</p>');
  if (withSpecs.length > 1) out.push(specMatrix(withSpecs));
  for (const p of withSpecs) {
    out.push(`<div class="spec-group" data-testid="spec-group" data-input="${escapeXml(p.label)}">`);
    out.push(`<h3 data-testid="spec-title"><span class="swatch" style="background:${p.color}"></span>${escapeXml(p.label)}${p.dataset.source && p.dataset.source !== p.label ? ` <span class="muted">${escapeXml(p.dataset.source)}</span>` : ''}</h3>`);
    out.push(specTable(p.specs, p.model));
    out.push('</div>');
  }
  out.push('</section>');

  // plots
  const gdOf = plots.gd.some((k) => data.entries[k]!.i !== data.entries[k]!.j) ? 'the transmissions' : 'the reflections';
  responseSection(out, { hint: 'Colour: the input; dash: the entry. ', legend: legendBlock(parts, traces, overlay.dashOf), smith: overlaySmithFigure(parts, traces, smith), gdSub: `${gdUnit.unit}, −dφ/dω of ${gdOf}` });

  // table
  out.push('<section class="values" data-testid="values">');
  out.push('<h2>Values at selected frequencies</h2>');
  out.push(overlayFrequencyTable(traces, plots.db, input.tableFrequencies ?? defaultTableFrequencies(f, allSpecs)));
  out.push('</section>');
  pageEnd(out, assets, data);
  return out.join('\n') + '\n';
}

/** Styles of the overlay page only. */
const OVERLAY_CSS = `
.overlay-note { background: #fffbea; border: 1px solid #e6d48a; border-radius: 6px; padding: 6px 12px; font-size: 12.5px; margin: 10px 0 0; }
.spec-group { margin: 0 0 14px; }
.spec-group h3 { font-size: 13px; font-weight: 650; margin: 0 0 6px; display: flex; align-items: center; gap: 8px; }
.swatch { display: inline-block; width: 14px; height: 4px; border-radius: 2px; vertical-align: middle; }
.overlay-legend { display: flex; flex-wrap: wrap; gap: 4px 18px; margin: 0 0 10px; font-size: 12.5px; align-items: center; }
.overlay-legend .key { display: inline-flex; align-items: center; gap: 6px; }
.overlay-legend svg { display: block; }
.spec-matrix td.cell { text-align: center; }
.spec-matrix td.cell[data-status="pass"] { color: var(--pass); font-weight: 650; }
.spec-matrix td.cell[data-status="fail"] { color: var(--fail); font-weight: 650; background: #fff5f3; }
`;

function inputsTable(parts: readonly OverlayPart[]): string {
  const rows = parts.map((p) => {
    const s = p.model.s;
    const f = s.frequencies;
    const specs = p.specs.length === 0 ? '<span class="muted">none</span>' : `${p.specs.filter((r) => r.pass).length} pass, ${p.specs.filter((r) => !r.pass).length} fail`;
    const status = p.specs.length === 0 ? 'none' : p.specs.every((r) => r.pass) ? 'pass' : 'fail';
    return (
      `<tr data-testid="input-row" data-input="${escapeXml(p.label)}" data-ports="${s.ports}" data-points="${f.length}" data-status="${status}">` +
      `<td><span class="swatch" style="background:${p.color}"></span></td><td>${escapeXml(p.label)}</td>` +
      `<td><code>${escapeXml(p.dataset.source ?? '')}</code></td><td class="num">${s.ports}</td>` +
      `<td class="num">${escapeXml(formatFrequency(f[0]!))} – ${escapeXml(formatFrequency(f[f.length - 1]!))}</td><td class="num">${f.length}</td>` +
      `<td class="num">${escapeXml(referenceList(s).join(', '))}</td><td>${specs}</td></tr>`
    );
  });
  return (
    '<div class="table-wrap"><table data-testid="inputs"><thead><tr><th></th><th>input</th><th>file</th><th class="num">ports</th><th class="num">sweep</th><th class="num">points</th><th class="num">reference</th><th>specs</th></tr></thead>' +
    `<tbody>${rows.join('\n')}</tbody></table></div>`
  );
}

/** Pass or fail of every spec (columns) for every input (rows), with the worst margin. */
function specMatrix(parts: readonly OverlayPart[]): string {
  const names: string[] = [];
  for (const p of parts) for (const r of p.specs) if (!names.includes(r.spec.name)) names.push(r.spec.name);
  const head = names.map((n) => `<th class="num">${escapeXml(n)}</th>`).join('');
  const rows = parts.map((p) => {
    const cells = names
      .map((n) => {
        const r = p.specs.find((x) => x.spec.name === n);
        if (!r) return '<td class="cell muted">—</td>';
        const status = r.pass ? 'pass' : 'fail';
        const margin = r.points === 0 ? 'no points' : minus(formatMargin(r.worstMargin, r.spec.unit));
        return `<td class="cell" data-testid="spec-cell" data-spec="${escapeXml(n)}" data-status="${status}" data-margin="${r.worstMargin}">${r.pass ? 'pass' : 'FAIL'} <span class="muted">${escapeXml(margin)}</span></td>`;
      })
      .join('');
    return `<tr data-input="${escapeXml(p.label)}"><td><span class="swatch" style="background:${p.color}"></span> ${escapeXml(p.label)}</td>${cells}</tr>`;
  });
  return `<div class="table-wrap spec-matrix-wrap"><table class="spec-matrix" data-testid="spec-matrix"><thead><tr><th>input</th>${head}</tr></thead><tbody>${rows.join('\n')}</tbody></table></div><p class="muted">Worst margin beside each result; the tables below give each input's details.</p>`;
}

/** The legend of the page: each input by its colour, each entry by its dash. */
function legendBlock(parts: readonly OverlayPart[], traces: readonly OverlayTrace[], dashOf: (entry: string) => string): string {
  const line = (color: string, dash: string) =>
    `<svg width="26" height="8" aria-hidden="true"><line x1="1" y1="4" x2="25" y2="4" stroke="${color}" stroke-width="2.4"${dash ? ` stroke-dasharray="${dash}"` : ''}/></svg>`;
  const inputs = parts.map((p) => `<span class="key" data-testid="legend-input" data-input="${escapeXml(p.label)}">${line(p.color, '')}${escapeXml(p.label)}</span>`);
  const seen = new Set<string>();
  const entries: string[] = [];
  for (const t of traces) {
    const e = t.part.model.entries[t.entry]!;
    if (seen.has(e.label)) continue;
    for (const name of e.display.split(' = ')) seen.add(name);
    entries.push(`<span class="key" data-testid="legend-entry" data-entry="${escapeXml(e.label)}">${line(COLORS.ink, dashOf(e.label))}${escapeXml(e.display)}</span>`);
  }
  return `<div class="overlay-legend" data-testid="legend">${inputs.join('')}<span class="muted">·</span>${entries.join('')}</div>`;
}

function overlaySmithFigure(parts: readonly OverlayPart[], traces: readonly OverlayTrace[], smith: readonly number[]): string {
  const shown = smith.map((k) => {
    const t = traces[k]!;
    return { label: t.key, display: t.display, color: t.part.color, dash: t.dash || undefined, re: t.series.re, im: t.series.im };
  });
  const body = smithFragment({ frame: SMITH_FRAME, traces: shown, admittance: 'hidden', fontSize: 10.5, interactive: true });
  const svg =
    `<svg data-testid="smith" data-admittance="hidden" viewBox="0 0 ${SMITH_SIZE} ${SMITH_SIZE}" role="img" aria-label="Smith chart of the reflections" font-family="system-ui, 'DejaVu Sans', sans-serif">` +
    `${body}<g data-part="smith-dots" class="smith-dots"></g></svg>`;
  const toggles = shown
    .map((t) => `<button type="button" data-testid="smith-toggle" data-entry="${escapeXml(t.label)}" aria-pressed="true" style="--c:${t.color}"><i></i>${escapeXml(t.display)}</button>`)
    .join('');
  // the references as the single report words them, when every input has the same
  const words = (s: NetworkData) => {
    const list = referenceList(s);
    return list.length === 1 ? list[0]! : Array.from(s.references, (_, p) => `${portReference(s, p + 1)} (port ${p + 1})`).join(', ');
  };
  const refs = [...new Set(parts.map((p) => words(p.model.s)))];
  const sub = refs.length === 1 ? `reflections, normalised to ${refs[0]!}` : 'reflections, each input normalised to its own references';
  return (
    `<figure class="smith-card" data-plot="smith"><figcaption>Smith chart<span class="sub">${escapeXml(sub)}</span></figcaption>${svg}` +
    `<div class="smith-controls">${toggles}<label><input type="checkbox" data-testid="toggle-admittance"> admittance grid</label></div>` +
    `<div class="smith-readout" data-testid="smith-readout"></div>` +
    `<div class="smith-note">○ first sweep point · ● last sweep point · grid: constant resistance and reactance</div></figure>`
  );
}

/** The table of values: a column pair per trace of the magnitude plot, each at its input's nearest point. */
function overlayFrequencyTable(traces: readonly OverlayTrace[], cols: readonly number[], freqs: readonly number[]): string {
  const head1 = cols
    .map((k) => `<th colspan="2" class="entry"><span class="swatch" style="background:${traces[k]!.part.color}"></span>${escapeXml(traces[k]!.display)}</th>`)
    .join('');
  const head2 = cols.map(() => '<th class="num">|S| dB</th><th class="num">∠ deg</th>').join('');
  let anyMoved = false;
  const rows = freqs.map((want) => {
    const cells = cols
      .map((q) => {
        const t = traces[q]!;
        const own = t.part.model.s.frequencies;
        const k = nearestIndex(own, want);
        const moved = Math.abs(own[k]! - want) > 1e-9 * Math.max(Math.abs(want), 1);
        anyMoved ||= moved;
        const db = t.series.db[k]!;
        const deg = t.series.deg[k]!;
        const note = moved ? ` title="at ${escapeXml(formatFrequency(own[k]!))}, the input's nearest point"` : '';
        return `<td class="num" data-entry="${escapeXml(t.key)}" data-db="${db}" data-deg="${deg}" data-frequency="${own[k]}"${note}>${Number.isFinite(db) ? fixed(db, 3) : '−∞'}${moved ? '*' : ''}</td><td class="num">${fixed(deg, 2)}</td>`;
      })
      .join('');
    return `<tr data-testid="freq-row" data-asked="${want}"><td class="freq">${formatFrequency(want)}</td>${cells}</tr>`;
  });
  return (
    `<div class="table-wrap"><table class="freq-table" data-testid="freq-table"><thead><tr><th rowspan="2" class="freq">frequency</th>${head1}</tr><tr>${head2}</tr></thead>` +
    `<tbody>${rows.join('\n')}</tbody></table></div>${anyMoved ? '<p class="muted">* the input has no point at that frequency: its nearest point is shown.</p>' : ''}`
  );
}
