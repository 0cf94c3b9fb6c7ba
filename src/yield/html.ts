/**
 * The yield run as pictures: a static HTML page (no script) with the yield and its interval, the
 * failures and drivers per spec, a histogram of every spec's worst margin, the percentile
 * envelopes of |S_ij| over the sweep (with the nominal response and the spec limits where the
 * netlist is at hand), the worst samples and the tolerances; and the envelopes as a static plot
 * (SVG, or PNG through the plot command's renderer). The page has the report's look and header.
 *
 * @module
 */
import type { NetworkData } from '../network/types.js';
import type { SpecResult } from '../check/types.js';
import { renderPlotSvg, type Dataset } from '../report/index.js';
import { COLORS, REPORT_CSS } from '../report/style.js';
import { delayUnit, escapeXml, niceStep, stepDecimals } from '../report/format.js';
import { driverText, marginHistogram, specDrivers } from './report.js';
import type { YieldResult } from './run.js';
import type { Histogram } from './stats.js';

const pct = (x: number, digits = 1) => `${(100 * x).toFixed(digits)} %`;
const FONT = 'DejaVu Sans, Liberation Sans, Helvetica, Arial, sans-serif';
const minus = (s: string) => s.replace(/-/g, '−');

/** The nominal design, where the netlist is at hand: its response and spec results. */
export interface YieldNominal {
  network: NetworkData;
  specs: SpecResult[];
}

/** The labels of the envelope curves. */
function percentileLabel(p: number): string {
  return p === 50 ? 'median' : `${p} % of builds`;
}

/**
 * The envelopes as overlay datasets of the static plotter: one network per percentile whose
 * entries hold the percentile of |S_ij| (as a real number), then the nominal network.
 */
function envelopeDatasets(r: YieldResult, nominal?: YieldNominal): Dataset[] {
  const env = r.envelope!;
  const p = env.ports;
  const F = env.frequencies.length;
  const stride = F * p * p;
  const sets: Dataset[] = env.percentiles.map((level, q) => {
    const values = new Float64Array(2 * stride);
    for (let v = 0; v < stride; v++) values[2 * v] = 10 ** (env.db[q * stride + v]! / 20);
    const network: NetworkData = { parameter: 'S', ports: p, frequencies: env.frequencies, references: new Float64Array(p).fill(50), values };
    return { label: percentileLabel(level), network, specs: [] };
  });
  if (nominal) sets.push({ label: 'nominal', network: nominal.network, specs: nominal.specs });
  return sets;
}

/**
 * The percentile envelopes of |S_ij| in dB as a static SVG (one plot; colour per curve, dash per
 * entry), with the nominal response and its spec limits when given.
 */
export function yieldEnvelopeSvg(r: YieldResult, options: { nominal?: YieldNominal; entries?: [number, number][]; title?: string; width?: number; height?: number; idPrefix?: string } = {}): string {
  if (!r.envelope) throw new RangeError('the run solved no whole sweeps: ask for envelopes (--envelopes N)');
  if (r.envelope.samples === 0) throw new RangeError('none of the envelope samples could be evaluated: there is no envelope to draw');
  return renderPlotSvg(envelopeDatasets(r, options.nominal), {
    kind: 'db',
    entries: options.entries,
    specs: options.nominal?.specs,
    title: options.title ?? `|S| percentiles of ${r.envelope.samples} builds`,
    width: options.width,
    height: options.height,
    idPrefix: options.idPrefix ?? 'sbx-envelope',
  });
}

/** A histogram of one spec's worst margins as an inline SVG: bars below 0 (failing) in the fail colour. */
export function marginHistogramSvg(h: Histogram, o: { unit: string; title: string; width?: number; height?: number }): string {
  const W = o.width ?? 360;
  const H = o.height ?? 190;
  const left = 44;
  const right = 12;
  const top = 26;
  const bottom = 36;
  const pw = W - left - right;
  const ph = H - top - bottom;
  const bins = h.counts.length;
  const lo = h.edges[0]!;
  const hi = h.edges[bins]!;
  let most = 0;
  for (const c of h.counts) most = Math.max(most, c);
  const x = (v: number) => left + ((v - lo) / (hi - lo)) * pw;
  // a margin in seconds is shown in ps, ns, µs or ms
  const display = o.unit === 's' ? delayUnit(Math.max(Math.abs(lo), Math.abs(hi))) : { scale: 1, unit: o.unit };
  const yStep = niceStep(Math.max(most, 1), 4);
  const yMax = Math.max(yStep, Math.ceil(Math.max(most, 1) / yStep) * yStep);
  const y = (c: number) => top + ph - (c / yMax) * ph;
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="${FONT}" role="img" aria-label="${escapeXml(o.title)}">`);
  out.push(`<rect width="${W}" height="${H}" fill="#ffffff"/>`);
  out.push(`<text x="${left}" y="16" font-size="12" font-weight="600" fill="${COLORS.ink}">${escapeXml(o.title)}</text>`);
  for (let c = 0; c <= yMax + 1e-9; c += yStep) {
    out.push(`<line x1="${left}" x2="${left + pw}" y1="${y(c).toFixed(1)}" y2="${y(c).toFixed(1)}" stroke="${COLORS.grid}"/>`);
    out.push(`<text x="${left - 5}" y="${(y(c) + 4).toFixed(1)}" font-size="10" text-anchor="end" fill="${COLORS.muted}">${c}</text>`);
  }
  for (let b = 0; b < bins; b++) {
    const c = h.counts[b]!;
    if (c === 0) continue;
    const x0 = x(h.edges[b]!);
    const x1 = x(h.edges[b + 1]!);
    const failing = h.edges[b + 1]! <= 0;
    out.push(`<rect x="${x0.toFixed(1)}" y="${y(c).toFixed(1)}" width="${Math.max(0.5, x1 - x0 - 1).toFixed(1)}" height="${(y(0) - y(c)).toFixed(1)}" fill="${failing ? COLORS.fail : COLORS.accent}"><title>${escapeXml(minus(`${fmt(h.edges[b]! / display.scale)} to ${fmt(h.edges[b + 1]! / display.scale)} ${display.unit}`))}: ${c} samples</title></rect>`);
  }
  const xStep = niceStep((hi - lo) / display.scale, 5) * display.scale;
  const dec = stepDecimals(xStep / display.scale);
  for (let n = Math.ceil(lo / xStep); n * xStep <= hi + 1e-9 * xStep; n++) {
    const v = n * xStep;
    const label = n === 0 ? '0' : minus((v / display.scale).toFixed(dec));
    out.push(`<text x="${x(v).toFixed(1)}" y="${top + ph + 14}" font-size="10" text-anchor="middle" fill="${COLORS.muted}">${label}</text>`);
  }
  if (lo <= 0 && hi >= 0) out.push(`<line x1="${x(0).toFixed(1)}" x2="${x(0).toFixed(1)}" y1="${top - 4}" y2="${top + ph}" stroke="${COLORS.limit}" stroke-dasharray="6 3"/>`);
  out.push(`<line x1="${left}" x2="${left + pw}" y1="${top + ph}" y2="${top + ph}" stroke="${COLORS.gridStrong}"/>`);
  out.push(`<text x="${left + pw / 2}" y="${H - 6}" font-size="10.5" text-anchor="middle" fill="${COLORS.ink}">worst margin${display.unit ? ` (${escapeXml(display.unit)})` : ''}; failing below 0</text>`);
  out.push('</svg>');
  return out.join('');
}

function fmt(v: number): string {
  return Number(v.toPrecision(3)).toString();
}

/** Extra styles of the yield page. */
const YIELD_CSS = `
.hists { display: grid; grid-template-columns: repeat(auto-fill, minmax(370px, 1fr)); gap: 14px; }
.hists figure, .envelope figure { margin: 0; background: var(--card); border: 1px solid var(--line); border-radius: 8px; padding: 8px; }
.envelope svg, .hists svg { max-width: 100%; height: auto; }
.drivers { font-size: 12px; }
`;

/** The yield page (see the module comment). */
export function renderYieldReport(r: YieldResult, file: string, options: { minYield?: number; nominal?: YieldNominal; title?: string } = {}): string {
  const iv = r.interval;
  const target = options.minYield;
  const status = target === undefined ? 'none' : iv.estimate >= target ? 'pass' : 'fail';
  const verdict = `yield ${pct(iv.estimate)}${target === undefined ? '' : iv.estimate >= target ? ` ≥ target ${pct(target)}` : ` < target ${pct(target)}`}`;
  const title = options.title ?? options.nominal?.network.title ?? file;
  const out: string[] = [];
  const csp = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'";
  out.push('<!doctype html>', '<html lang="en">', '<head>', '<meta charset="utf-8">', '<meta name="viewport" content="width=device-width, initial-scale=1">');
  out.push(`<meta http-equiv="Content-Security-Policy" content="${csp}">`, '<meta name="generator" content="scatterbox">');
  out.push(`<title>${escapeXml(title)} · scatterbox yield</title>`, '<link rel="icon" href="data:,">');
  out.push(`<style>${REPORT_CSS}${YIELD_CSS}</style>`, '</head>', '<body>');
  out.push('<header class="sbx-head">', '<div class="sbx-titles">', '<p class="sbx-kicker">scatterbox · yield</p>');
  out.push(`<h1 data-testid="title">${escapeXml(title)}</h1>`);
  out.push(`<div class="sbx-source">source <code data-testid="source">${escapeXml(file)}</code></div>`, '</div>');
  out.push(`<div class="verdict" data-testid="verdict" data-status="${status}">${escapeXml(verdict)}</div>`, '</header>', '<main>');

  out.push('<section class="summary" data-testid="summary"><h2>Summary</h2><div class="cards">');
  out.push(
    `<div class="card"><h3>Yield</h3><p data-testid="yield" data-yield="${iv.estimate}">${pct(iv.estimate)} — ${r.passed} of ${r.samples} samples pass every spec</p>` +
      `<p>${pct(iv.confidence, 0)} interval ${pct(iv.lower)} to ${pct(iv.upper)} (Wilson score)</p>` +
      (r.errors > 0 ? `<p>${r.errors} sample${r.errors === 1 ? '' : 's'} could not be evaluated (counted as failing)</p>` : '') +
      '</div>',
  );
  const lots = new Set(r.tolerances.flatMap((t) => (t.lot ? [t.lot] : []))).size;
  out.push(`<div class="card"><h3>Samples</h3><p>samples ${r.first} to ${r.first + r.samples - 1}, seed ${r.seed}</p><p>${r.tolerances.length} tolerances${lots ? `, ${lots} lot${lots === 1 ? '' : 's'}` : ''}</p></div>`);
  out.push('</div></section>');

  out.push('<section class="specs" data-testid="specs"><h2>Specs</h2><div class="table-wrap"><table>');
  out.push('<thead><tr><th>spec</th><th class="num">failures</th><th class="num">passes</th><th>drivers (correlation of a draw, or of its size |…|, with the margin)</th></tr></thead><tbody>');
  r.specs.forEach((sp, s) => {
    const d = specDrivers(r, s).map(driverText).join(', ') || '—';
    out.push(`<tr data-testid="yield-spec" data-spec="${escapeXml(sp.name)}" data-failures="${sp.failures}"><td>${escapeXml(sp.name)}</td><td class="num">${sp.failures}</td><td class="num">${pct(1 - sp.failures / r.samples)}</td><td class="drivers">${escapeXml(d)}</td></tr>`);
  });
  out.push('</tbody></table></div></section>');

  out.push('<section class="margins" data-testid="histograms"><h2>Worst margin per spec</h2><div class="hists">');
  r.specs.forEach((sp, s) => {
    const h = marginHistogram(r, s);
    out.push(`<figure data-testid="histogram" data-spec="${escapeXml(sp.name)}">${h ? marginHistogramSvg(h, { unit: sp.unit, title: sp.name }) : '<p class="muted">no sample could be evaluated</p>'}</figure>`);
  });
  out.push('</div></section>');

  out.push('<section class="envelope" data-testid="envelope"><h2>Response envelopes</h2>');
  if (r.envelope && r.envelope.samples > 0) {
    out.push(`<p class="muted">Percentiles ${r.envelope.percentiles.join(', ')} % of |S| over the first ${r.envelope.samples} evaluated samples${options.nominal ? ', with the nominal design and its spec limits' : ''}.</p>`);
    out.push(`<figure data-testid="envelope-plot">${yieldEnvelopeSvg(r, { nominal: options.nominal, title: '|S| in dB', height: 440, width: 900 })}</figure>`);
  } else {
    out.push('<p class="muted" data-testid="no-envelope">No whole sweeps were solved in this run: give <code>--envelopes N</code> to see the spread of the response.</p>');
  }
  out.push('</section>');

  if (r.worst.length > 0) {
    out.push('<section data-testid="worst"><h2>Worst samples</h2><div class="table-wrap"><table><thead><tr><th class="num">sample</th><th>fails</th></tr></thead><tbody>');
    for (const w of r.worst) out.push(`<tr><td class="num">#${w.sample}</td><td>${escapeXml(w.error ? `not evaluated (${w.error})` : w.failing.join(', '))}</td></tr>`);
    out.push('</tbody></table></div></section>');
  }
  out.push('</main>');
  out.push('<footer>Made by scatterbox. Everything this page shows is inside this one file; it makes no network requests.</footer>');
  out.push('</body>', '</html>');
  return out.join('\n') + '\n';
}
