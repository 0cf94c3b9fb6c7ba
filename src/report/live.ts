/**
 * The live part of the report page (src/live/ serves it): a section above the report with a
 * slider and a number field per design variable, the write-back and reset buttons, a status
 * line, and the banner where the netlist's diagnostics appear above the last good result; and
 * the script that talks to the server (server-sent events for new results, a request per slider
 * move) and hands each result to the report's own `scatterboxReport.update`.
 *
 * For tests and scripting the script sets `window.scatterboxLive`:
 *   values()            the values the page holds (SI units, in the order of the sliders)
 *   setValue(name, x)   sets a variable (SI units) as its number field does, and re-solves
 *   latencies           ms from each slider or field input to the redrawn page (after the next frame)
 *   results             the number of results drawn so far
 *   idle()              whether no request is under way or waiting
 *
 * @module
 */

import { escapeXml } from './format.js';

/** One slider: a design variable, its range and how the slider moves through it. */
export interface LiveSlider {
  name: string;
  /** The SI unit text ('F', 'H'…), or null. */
  unit: string | null;
  lower: number;
  upper: number;
  value: number;
  /**
   * `series` and `step`: the slider steps through `values`; `log`: logarithmic (the range spans
   * a decade or more); `linear`: even.
   */
  scale: 'series' | 'step' | 'log' | 'linear';
  /** The values of a `series` or `step` slider, ascending, SI units. */
  values?: number[];
  /** The number field shows value / factor in `unit` (an engineering prefix and the unit). */
  display: { factor: number; unit: string };
  /** What the slider steps through, for the label: `E24`, `step 0.1 pF`. */
  note?: string;
}

/** What makes a report page a live one. */
export interface LivePage {
  /** The path the page's requests start with (`/TOKEN/`). */
  base: string;
  sliders: LiveSlider[];
  /** A result whose layout differs (other variables, sweep or entries) reloads the page. */
  layout: string;
  /** The netlist's diagnostics (as on the terminal) when its latest version does not load. */
  diagnostics?: string;
}

/** The live section's HTML. */
export function liveSection(live: LivePage): string {
  const rows = live.sliders.map((s, i) => {
    const max = s.values ? s.values.length - 1 : 1000;
    const dv = s.value / s.display.factor;
    const range = `${String(Number((s.lower / s.display.factor).toPrecision(6)))} to ${String(Number((s.upper / s.display.factor).toPrecision(6)))} ${s.display.unit}`;
    return (
      `<div class="live-var" data-testid="live-var" data-name="${escapeXml(s.name)}" data-scale="${s.scale}">` +
      `<label for="live-slider-${i}" class="live-name">${escapeXml(s.name)}</label>` +
      `<input type="range" id="live-slider-${i}" data-testid="slider" data-name="${escapeXml(s.name)}" min="0" max="${max}" step="1" value="0">` +
      `<input type="number" data-testid="value-field" data-name="${escapeXml(s.name)}" step="any" value="${String(Number(dv.toPrecision(6)))}" aria-label="${escapeXml(s.name)} in ${escapeXml(s.display.unit || 'its unit')}">` +
      `<span class="live-unit">${escapeXml(s.display.unit)}</span>` +
      `<span class="live-range muted">${escapeXml(range)}${s.note ? ` · ${escapeXml(s.note)}` : ''}${s.scale === 'log' ? ' · log' : ''}</span></div>`
    );
  });
  const config = { base: live.base, layout: live.layout, sliders: live.sliders };
  return [
    '<section class="live" data-testid="live">',
    '<h2>Live</h2>',
    `<pre class="live-diagnostics" data-testid="diagnostics"${live.diagnostics ? '' : ' hidden'}>${escapeXml(live.diagnostics ?? '')}</pre>`,
    live.sliders.length > 0 ? `<div class="live-vars">${rows.join('')}</div>` : '<p class="muted" data-testid="no-variables">The netlist has no design variables (<code>let x = 1 pF vary 0.5 pF to 2 pF</code>): edit it and save; the page follows.</p>',
    '<div class="live-actions">',
    `<button type="button" data-testid="write-back"${live.sliders.length ? '' : ' disabled'}>write values into the netlist</button>`,
    `<button type="button" data-testid="reset"${live.sliders.length ? '' : ' disabled'}>reset to the netlist's values</button>`,
    '<span class="live-status" data-testid="live-status" aria-live="polite">watching the netlist</span>',
    '</div>',
    `<script type="application/json" id="sbx-live">${JSON.stringify(config).replace(/</g, '\\u003c')}</script>`,
    '</section>',
  ].join('\n');
}

/** Styles of the live section. */
export const LIVE_CSS = `
.live { border-left: 4px solid var(--accent, #0d6e74); }
.live-diagnostics { background: #fff5f3; border: 1px solid #e9b4ad; color: #5a1710; border-radius: 6px; padding: 8px 12px; font-size: 12.5px; overflow-x: auto; white-space: pre; margin: 0 0 12px; }
.live-vars { display: grid; grid-template-columns: 1fr; gap: 6px; }
.live-var { display: grid; grid-template-columns: 8em minmax(160px, 1fr) 8em 3.5em auto; gap: 10px; align-items: center; font-size: 13px; }
.live-name { font-weight: 650; font-family: ui-monospace, 'DejaVu Sans Mono', monospace; }
.live-var input[type="number"] { width: 100%; font: inherit; }
.live-var input[type="range"] { width: 100%; }
.live-actions { display: flex; gap: 10px; align-items: center; margin-top: 12px; flex-wrap: wrap; }
.live-status { font-size: 12.5px; color: var(--muted, #5f6b7a); }
.live-status[data-kind="error"] { color: var(--fail, #cf3a2f); }
`;

/** The live page's script (plain ES2017, run after the report's own). */
export const LIVE_SCRIPT = String.raw`(function () {
  'use strict';
  var root = document.documentElement;
  var report = window.scatterboxReport;
  var cfg = JSON.parse(document.getElementById('sbx-live').textContent);
  var S = cfg.sliders, base = cfg.base;
  var values = S.map(function (s) { return s.value; });
  var sliders = document.querySelectorAll('[data-testid="slider"]');
  var fields = document.querySelectorAll('[data-testid="value-field"]');
  var banner = document.querySelector('[data-testid="diagnostics"]');
  var status = document.querySelector('[data-testid="live-status"]');
  var latencies = [], results = 0;

  function say(text, kind) {
    status.textContent = text;
    if (kind) status.setAttribute('data-kind', kind); else status.removeAttribute('data-kind');
  }
  function posOf(s, v) {
    if (s.values) {
      var best = 0;
      for (var k = 1; k < s.values.length; k++) if (Math.abs(s.values[k] - v) < Math.abs(s.values[best] - v)) best = k;
      return best;
    }
    if (s.upper === s.lower) return 0;
    var t = s.scale === 'log' ? Math.log(v / s.lower) / Math.log(s.upper / s.lower) : (v - s.lower) / (s.upper - s.lower);
    return Math.round(1000 * Math.min(1, Math.max(0, t)));
  }
  function valueAt(s, p) {
    if (s.values) return s.values[Math.min(s.values.length - 1, Math.max(0, p))];
    if (p <= 0) return s.lower;
    if (p >= 1000) return s.upper;
    return s.scale === 'log' ? s.lower * Math.pow(s.upper / s.lower, p / 1000) : s.lower + (s.upper - s.lower) * p / 1000;
  }
  function show(i) {
    sliders[i].value = String(posOf(S[i], values[i]));
    if (document.activeElement !== fields[i]) fields[i].value = String(Number((values[i] / S[i].display.factor).toPrecision(6)));
  }
  S.forEach(function (s, i) { show(i); });

  function showDiagnostics(text) {
    if (text) { banner.textContent = text; banner.hidden = false; root.setAttribute('data-live-state', 'error'); }
    else { banner.textContent = ''; banner.hidden = true; root.setAttribute('data-live-state', 'ok'); }
  }
  function apply(msg, t0) {
    if (msg.layout !== cfg.layout) { location.reload(); return; }
    report.update(msg.content);
    values = msg.values.slice();
    S.forEach(function (s, i) { show(i); });
    showDiagnostics(msg.diagnostics || '');
    results++;
    root.setAttribute('data-live-results', String(results));
    if (t0 !== null && t0 !== undefined) {
      requestAnimationFrame(function () {
        var ms = performance.now() - t0;
        latencies.push(ms);
        root.setAttribute('data-live-latency', ms.toFixed(2));
      });
    }
  }

  // one request at a time; moves made meanwhile are sent together when it returns
  var busy = false, waiting = null;
  function post(path, body) {
    return fetch(base + path, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body), credentials: 'omit', cache: 'no-store' })
      .then(function (r) { return r.json().then(function (j) { if (!r.ok) throw new Error(j && j.error ? j.error : 'the server answered ' + r.status); return j; }); });
  }
  function solve(t0) {
    if (busy) { if (waiting === null) waiting = t0; return; }
    busy = true;
    post('solve', { values: values }).then(function (msg) { apply(msg, t0); say('solved'); }, function (e) { say(e.message, 'error'); })
      .then(function () {
        busy = false;
        if (waiting !== null) { var t = waiting; waiting = null; solve(t); }
      });
  }
  S.forEach(function (s, i) {
    sliders[i].addEventListener('input', function () {
      var t0 = performance.now();
      values[i] = valueAt(s, Number(sliders[i].value));
      fields[i].value = String(Number((values[i] / s.display.factor).toPrecision(6)));
      solve(t0);
    });
    fields[i].addEventListener('change', function () {
      var t0 = performance.now();
      var x = Number(fields[i].value) * s.display.factor;
      if (!isFinite(x) || fields[i].value.trim() === '') { show(i); return; }
      values[i] = Math.min(s.upper, Math.max(s.lower, x));
      show(i);
      solve(t0);
    });
  });
  var wb = document.querySelector('[data-testid="write-back"]');
  wb.addEventListener('click', function () {
    say('writing…');
    post('write-back', { values: values }).then(function (msg) { say(msg.message); }, function (e) { say(e.message, 'error'); });
  });
  var reset = document.querySelector('[data-testid="reset"]');
  reset.addEventListener('click', function () {
    post('reset', {}).then(function (msg) { apply(msg, performance.now()); say('reset to the netlist\'s values'); }, function (e) { say(e.message, 'error'); });
  });

  var events = new EventSource(base + 'events');
  events.addEventListener('result', function (ev) { apply(JSON.parse(ev.data), null); say('updated from ' + (JSON.parse(ev.data).why || 'the netlist')); });
  events.addEventListener('diagnostics', function (ev) { var m = JSON.parse(ev.data); showDiagnostics(m.text); say(m.status, 'error'); });
  events.addEventListener('error', function () { if (events.readyState === 2) say('the server has stopped', 'error'); });
  showDiagnostics(banner.textContent);
  root.setAttribute('data-live-results', '0');

  window.scatterboxLive = {
    values: function () { return values.slice(); },
    setValue: function (name, x) {
      var i = S.map(function (s) { return s.name; }).indexOf(name);
      if (i < 0) throw new Error('no variable ' + name);
      values[i] = x;
      show(i);
      solve(performance.now());
    },
    latencies: latencies,
    get results() { return results; },
    /** Whether no request is under way or waiting. */
    idle: function () { return !busy && waiting === null; },
  };
  root.setAttribute('data-live-ready', 'true');
})();
`;
