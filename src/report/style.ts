/**
 * The look of the report and the static plots: the trace palette, the colours with a meaning of
 * their own, and the stylesheet of the HTML report (screen and print), as text to put inline. Our
 * own look: an ink header band, white cards on a pale stone page, a teal accent, green/red only for
 * pass and fail.
 *
 * @module
 */

/**
 * Trace colours, in the order entries are assigned them. Our own palette, found by a search over
 * sRGB for the largest smallest CIEDE2000 difference between any two of its colours, and between
 * each of them and the fail red, the limit ink, the accent and the white page, seen with normal
 * vision and with simulated deuteranopia and protanopia (the colour-vision matrices of G. M.
 * Machado, M. M. Oliveira and L. A. F. Fernandes, "A physiologically-based model for simulation of
 * color vision deficiency", IEEE TVCG 15(6), 2009, severity 1, applied in linear RGB). The search
 * also kept every colour visibly away (about 6 CIEDE2000 units or more) from the default colours of
 * the widely used plotting libraries, and the order is ours: it does not open with the blue and
 * orange pair those libraries share. Every colour has a lightness L* between 27 and 69 (readable as
 * a line on white) and a chroma of at least 32 (no greys, which read as grid or limit lines). The
 * first colours are the most different from one another, so that the two to four traces of a
 * two-port (S11, S21, S12, S22) differ the most.
 *
 * - `#6c52f1` iris: a violet-blue, the first trace (usually S11).
 * - `#2bbf77` mint: a light green, far from the iris in all three visions (light against middle,
 *   green against violet; dichromats keep the blue–yellow axis that separates them).
 * - `#841126` oxblood: a dark red, much darker than the fail red (L* 28 against 50), a difference
 *   of lightness that no colour-vision deficiency removes.
 * - `#159ca0` lagoon: a middle cyan-teal, lighter than the accent teal of the page.
 * - `#ff6e1a` flame: a light warm orange.
 * - `#208a68` pine: a middle green, darker than the mint.
 * - `#1131ad` ultramarine: a dark blue, darker than the iris.
 * - `#45a3fb` sky: a light blue, lighter than the iris.
 *
 * test/hardening-report-palette.test.ts checks that every pair (and every colour against the fail,
 * limit, accent and page colours) stays at least 15 CIEDE2000 units apart in all three visions, with
 * the CIEDE2000 formula verified on published test pairs of Sharma, Wu and Dalal (2005). Tritanopia,
 * which is rare, is not covered: lagoon and pine come within about 8 units there.
 */
export const PALETTE: readonly string[] = ['#6c52f1', '#2bbf77', '#841126', '#159ca0', '#ff6e1a', '#208a68', '#1131ad', '#45a3fb'];

/**
 * Dashes of the entries when several inputs share a plot (an overlay or a family), as SVG dash
 * arrays in pixels: there the colour tells the input and the dash the entry (the first entry
 * solid). Our own set: each differs from the others in its rhythm, and none is the spec limit's
 * even `6 3`.
 */
export const DASHES: readonly string[] = ['', '9 4', '2 3', '12 3 2 3', '5 5', '16 4 4 4'];

/** Colours with a meaning of their own. */
export const COLORS = {
  ink: '#1b2330',
  muted: '#5f6b7a',
  grid: '#e3e7ec',
  gridStrong: '#c9d0d8',
  pass: '#1f7a4a',
  fail: '#cf3a2f',
  failShade: 'rgba(207, 58, 47, 0.13)',
  limit: '#2b3340',
  accent: '#0d6e74',
  admittance: '#c08a2b',
} as const;

export const REPORT_CSS = `
:root {
  --ink: ${COLORS.ink};
  --muted: ${COLORS.muted};
  --line: #dde2e7;
  --page: #f3f4f1;
  --card: #ffffff;
  --accent: ${COLORS.accent};
  --pass: ${COLORS.pass};
  --fail: ${COLORS.fail};
  --fail-shade: ${COLORS.failShade};
  --mono: ui-monospace, "DejaVu Sans Mono", "Liberation Mono", Menlo, Consolas, monospace;
  --sans: system-ui, "Segoe UI", "DejaVu Sans", "Liberation Sans", sans-serif;
}
* { box-sizing: border-box; }
html { background: var(--page); }
body { margin: 0; color: var(--ink); font: 14px/1.45 var(--sans); }
.sbx-head { background: var(--ink); color: #f5f7f9; padding: 18px 28px 16px; display: flex; flex-wrap: wrap; align-items: flex-end; gap: 6px 24px; }
.sbx-head .sbx-titles { flex: 1 1 420px; min-width: 0; }
.sbx-kicker { font-size: 11px; letter-spacing: .14em; text-transform: uppercase; color: #9fd3d6; margin: 0 0 4px; }
.sbx-head h1 { margin: 0; font-size: 22px; font-weight: 650; line-height: 1.25; }
.sbx-source { margin-top: 6px; font-size: 12.5px; color: #c4ccd5; overflow-wrap: anywhere; }
.sbx-source code { font-family: var(--mono); color: #ffffff; }
.verdict { font-size: 13px; font-weight: 600; padding: 6px 14px; border-radius: 999px; border: 1.5px solid currentColor; white-space: nowrap; }
.verdict[data-status="pass"] { color: #7ee2a8; }
.verdict[data-status="fail"] { color: #ff9a8f; }
.verdict[data-status="none"] { color: #c4ccd5; }
main { padding: 20px 28px 28px; max-width: 1320px; margin: 0 auto; }
section { margin: 0 0 22px; }
h2 { font-size: 12px; font-weight: 700; letter-spacing: .12em; text-transform: uppercase; color: var(--accent); margin: 0 0 10px; padding-bottom: 5px; border-bottom: 1px solid var(--line); }
.cards { display: grid; grid-template-columns: repeat(auto-fit, minmax(250px, 1fr)); gap: 14px; }
.card, figure.plot-card, figure.smith-card { background: var(--card); border: 1px solid var(--line); border-radius: 8px; padding: 14px 16px; margin: 0; }
.card h3, figure figcaption { font-size: 13px; font-weight: 650; margin: 0 0 8px; color: var(--ink); }
figure figcaption .sub { font-weight: 400; color: var(--muted); margin-left: 6px; }
dl.facts { display: grid; grid-template-columns: auto 1fr; gap: 3px 14px; margin: 0; font-size: 13px; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; font-variant-numeric: tabular-nums; }
table { border-collapse: collapse; width: 100%; font-size: 13px; font-variant-numeric: tabular-nums; }
th { text-align: left; font-weight: 600; color: var(--muted); font-size: 11.5px; letter-spacing: .03em; border-bottom: 1.5px solid var(--line); padding: 5px 8px; }
td { padding: 5px 8px; border-bottom: 1px solid #edf0f2; vertical-align: top; }
td.num, th.num { text-align: right; white-space: nowrap; }
.table-wrap { background: var(--card); border: 1px solid var(--line); border-radius: 8px; overflow-x: auto; }
.table-wrap table th:first-child, .table-wrap table td:first-child { padding-left: 14px; }
tr.spec-row[data-status="fail"] td { background: #fff5f3; }
tr.spec-row[data-status="fail"] td:first-child { box-shadow: inset 3px 0 0 var(--fail); }
tr.spec-row[data-status="pass"] td:first-child { box-shadow: inset 3px 0 0 var(--pass); }
.chip { display: inline-block; min-width: 44px; text-align: center; font-size: 11px; font-weight: 700; letter-spacing: .06em; padding: 1px 8px; border-radius: 4px; color: #fff; }
.chip.pass { background: var(--pass); }
.chip.fail { background: var(--fail); }
.spec-name { font-family: var(--mono); font-size: 12.5px; }
.req { color: var(--ink); }
.muted { color: var(--muted); }
.toolbar { display: flex; flex-wrap: wrap; align-items: center; gap: 8px 18px; margin: 0 0 10px; font-size: 12.5px; color: var(--muted); }
.toolbar label { display: inline-flex; align-items: center; gap: 6px; cursor: pointer; color: var(--ink); }
.toolbar button, .smith-controls button { font: inherit; font-size: 12.5px; border: 1px solid var(--line); background: #fff; color: var(--ink); border-radius: 6px; padding: 3px 10px; cursor: pointer; }
.toolbar button:hover, .smith-controls button:hover { border-color: var(--accent); }
.readout { position: sticky; top: 0; z-index: 5; background: #ffffffee; border: 1px solid var(--line); border-left: 4px solid var(--accent); border-radius: 8px; padding: 8px 12px; margin: 0 0 14px; font-size: 12.5px; min-height: 38px; display: flex; flex-wrap: wrap; gap: 4px 16px; align-items: baseline; font-variant-numeric: tabular-nums; }
.readout .ro-f { font-weight: 700; color: var(--accent); min-width: 96px; }
.readout .ro-item { white-space: nowrap; }
.readout .ro-name { font-weight: 650; color: var(--c); }
.readout .ro-v { margin-left: 2px; }
.readout .ro-hint { color: var(--muted); }
.charts { display: grid; grid-template-columns: minmax(320px, 460px) minmax(0, 1fr); gap: 14px; margin-top: 14px; }
.stack { display: grid; gap: 14px; min-width: 0; }
.plot { min-width: 0; overflow: hidden; }
figure.smith-card svg { display: block; width: 100%; height: auto; }
.smith-controls { display: flex; flex-wrap: wrap; gap: 6px 8px; align-items: center; margin-top: 8px; font-size: 12.5px; }
.smith-controls button[aria-pressed] { display: inline-flex; align-items: center; gap: 6px; }
.smith-controls button[aria-pressed] i { width: 14px; height: 3px; border-radius: 2px; background: var(--c); display: inline-block; }
.smith-controls button[aria-pressed="false"] { opacity: .45; text-decoration: line-through; }
.smith-controls label { display: inline-flex; align-items: center; gap: 6px; margin-left: auto; cursor: pointer; }
.smith-readout { margin-top: 8px; font-size: 12px; color: var(--ink); min-height: 18px; font-variant-numeric: tabular-nums; }
.smith-note { margin-top: 4px; font-size: 11.5px; color: var(--muted); }
.smith-dots circle { fill: #fff; stroke-width: 2.2; pointer-events: none; }
.smith-dots circle.smith-marker { fill: ${COLORS.accent}; stroke: #fff !important; stroke-width: 1.5; }
.smith-dots circle.smith-hot { stroke-width: 2.6; }
.fail-region { position: absolute; top: 0; bottom: 0; background: var(--fail-shade); border-left: 1px solid ${COLORS.fail}55; border-right: 1px solid ${COLORS.fail}55; pointer-events: none; }
.uplot { font-family: var(--sans); }
.u-legend { font-size: 12px; margin-top: 2px; }
.u-legend .u-series { cursor: pointer; }
.u-legend .u-series.u-off > * { opacity: .4; }
.u-legend .u-series > * { padding: 2px 4px; }
.u-legend .u-marker { border-radius: 2px; }
.u-legend .u-series:first-child .u-label { color: var(--muted); }
.u-select { background: rgba(13, 110, 116, 0.10); }
.freq-table td.num { font-family: var(--mono); font-size: 12px; }
.freq-table td.freq, .freq-table th.freq { text-align: left; white-space: nowrap; width: 1%; padding-right: 28px; }
.freq-table td.freq { font-family: var(--sans); font-size: 13px; }
.freq-table th.entry { text-align: center; border-bottom: none; color: var(--ink); }
.freq-table .swatch { display: inline-block; width: 10px; height: 3px; border-radius: 2px; margin-right: 6px; vertical-align: middle; }
footer { color: var(--muted); font-size: 11.5px; padding: 0 28px 24px; max-width: 1320px; margin: 0 auto; }
noscript p { background: #fff5f3; border: 1px solid var(--fail); border-radius: 6px; padding: 8px 12px; }
@media (max-width: 900px) {
  .charts { grid-template-columns: minmax(0, 1fr); }
  main, .sbx-head { padding-left: 14px; padding-right: 14px; }
}
@media print {
  @page { size: A4; margin: 14mm 12mm; }
  html, body { background: #fff; }
  body { font-size: 10pt; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  .sbx-head { background: #fff; color: var(--ink); border-bottom: 2px solid var(--ink); padding: 0 0 8px; }
  .sbx-kicker { color: var(--accent); }
  .sbx-source, .sbx-source code { color: var(--ink); }
  .verdict[data-status="pass"] { color: var(--pass); }
  .verdict[data-status="fail"] { color: var(--fail); }
  main { padding: 12px 0 0; max-width: none; }
  footer { padding: 0; }
  .toolbar, .readout, .smith-controls, .smith-readout, .smith-dots, .u-cursor-x, .u-cursor-y, .u-cursor-pt, .u-select, .u-legend .u-value { display: none !important; }
  .cards { grid-template-columns: repeat(3, minmax(0, 1fr)); gap: 8px; }
  .card { padding: 8px 10px; }
  table { font-size: 8.5pt; }
  th { font-size: 7.5pt; padding: 3px 5px; }
  td { padding: 3px 5px; }
  .spec-table .req { width: 34%; }
  .spec-name { font-size: 8pt; }
  .charts { display: block; }
  .stack { display: block; }
  figure.plot-card, figure.smith-card, .card { break-inside: avoid; page-break-inside: avoid; margin: 0 0 10px; border-color: #c9d0d8; }
  figure.smith-card svg { max-width: 120mm; margin: 0 auto; }
  section.response { break-before: page; page-break-before: always; }
  section.values { break-before: page; page-break-before: always; }
  .table-wrap { overflow: visible; border: none; }
  thead { display: table-header-group; }
  tr { break-inside: avoid; page-break-inside: avoid; }
  h2 { break-after: avoid; page-break-after: avoid; }
}
`;
