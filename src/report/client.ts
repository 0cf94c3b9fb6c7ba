/**
 * The script of the HTML report, as text to put inline (plain ES2017, no modules, no network).
 *
 * It reads the JSON data block, draws the rectangular plots with uPlot (cursor synchronised across
 * them, x zoom shared, legend entries toggle traces everywhere), draws spec limits, the worst point
 * of each failing spec and a marker on the canvas, lays failing intervals over the plots as
 * elements (`data-testid="fail-region"`), adds hover and toggles to the Smith chart drawn in SVG,
 * and keeps one readout of the values at the cursor or marker.
 *
 * For tests and scripting it sets `window.scatterboxReport`:
 *   readoutAt(hz)             places the marker at the sweep point nearest to hz, returns the readout text
 *   smithReadoutAt(entry, hz) shows the Smith hover of an entry (e.g. 'S11') there, returns its text
 *   setTraceVisible(entry, on), isTraceVisible(view, entry)  view: 'db' | 'phase' | 'gd' | 'smith'
 *   failRegions(kind)         the failing intervals laid over a plot: [{ spec, left, width }]
 *   setAdmittance(on), plots, data
 *   update(content)           draws a new result of the same layout in place (a live page, src/live/):
 *                             content is reportContent()'s data, verdict and parts (src/report/html.ts)
 * and `data-ready="true"` on the root element once everything is drawn.
 *
 * @module
 */

export const CLIENT_SCRIPT = String.raw`(function () {
  'use strict';
  var root = document.documentElement;
  var data = JSON.parse(document.getElementById('sbx-data').textContent);
  var F = data.f, E = data.entries, N = F.length;
  var XU = data.xUnit, GU = data.gdUnit, C = data.colors;
  var FONT = 'system-ui, "Segoe UI", "DejaVu Sans", "Liberation Sans", sans-serif';
  var KINDS = ['db', 'phase', 'gd'];
  var YTITLE = { db: '|S| (dB)', phase: 'Phase (deg)', gd: 'Group delay (' + GU.unit + ')' };
  var visible = E.map(function () { return true; });
  var markerIdx = null, hoverIdx = null, smithHot = null;
  var showLimits = true, syncing = false, fromSmith = false;
  var plots = {};

  // ---- numbers ----------------------------------------------------------------------------
  function minus(s) { return s.charAt(0) === '-' ? '\u2212' + s.slice(1) : s; }
  function fix(x, d) {
    if (x === null || x === undefined || !isFinite(x)) return '\u2014';
    var s = x.toFixed(d);
    if (/^-0(\.0*)?$/.test(s)) s = s.slice(1);
    return minus(s);
  }
  function sig(x, d) {
    if (x === null || x === undefined || !isFinite(x)) return '\u2014';
    return minus(String(Number(x.toPrecision(d))));
  }
  function fmtFreq(f) {
    if (f === 0) return '0 Hz';
    var u = [[1e9, 'GHz'], [1e6, 'MHz'], [1e3, 'kHz']];
    for (var q = 0; q < u.length; q++) if (Math.abs(f) >= u[q][0]) return String(Number((f / u[q][0]).toPrecision(6))) + ' ' + u[q][1];
    return String(Number(f.toPrecision(6))) + ' Hz';
  }
  function nearest(f) {
    var lo = 0, hi = N - 1;
    if (f <= F[0]) return 0;
    if (f >= F[hi]) return hi;
    while (hi - lo > 1) { var mid = (lo + hi) >> 1; if (F[mid] <= f) lo = mid; else hi = mid; }
    return f - F[lo] <= F[hi] - f ? lo : hi;
  }
  // Z = (Zr* + G Zr)/(1 - G) = R (1 + G)/(1 - G) - jX for the reference Zr = R + jX (power waves,
  // Kurokawa 1965); R (1 + G)/(1 - G) for a real one
  function impedance(re, im, z0, x0) {
    if (re === null || im === null) return null;
    var dr = 1 - re, d = dr * dr + im * im;
    if (d === 0) return [Infinity, NaN];
    return [z0 * (1 - re * re - im * im) / d, z0 * 2 * im / d - (x0 || 0)];
  }
  function zText(z) {
    if (!z) return '\u2014';
    if (!isFinite(z[0])) return '\u221e';
    return fix(z[0], 2) + (z[1] < 0 ? ' \u2212 j' : ' + j') + fix(Math.abs(z[1]), 2) + ' \u03a9';
  }

  // ---- readout ----------------------------------------------------------------------------
  var readout = document.querySelector('[data-testid="readout"]');
  function span(cls, text, field) {
    var s = document.createElement('span');
    s.className = cls;
    if (field) s.setAttribute('data-field', field);
    s.textContent = text;
    return s;
  }
  function put(parent, child) {
    if (parent.childNodes.length) parent.appendChild(document.createTextNode(' '));
    parent.appendChild(child);
  }
  function showIndex(k, why) {
    readout.textContent = '';
    if (k === null || k === undefined) {
      readout.removeAttribute('data-index');
      readout.setAttribute('data-mode', 'idle');
      put(readout, span('ro-hint', 'Hover over a plot or the Smith chart to read values; click to place a marker.'));
      return;
    }
    readout.setAttribute('data-index', String(k));
    readout.setAttribute('data-frequency', String(F[k]));
    readout.setAttribute('data-mode', why);
    put(readout, span('ro-f', (why === 'marker' ? '\u25c6 ' : '') + fmtFreq(F[k]), 'frequency'));
    E.forEach(function (e, q) {
      if (!visible[q]) return;
      var at = k;
      k = own(e, at);
      var item = document.createElement('span');
      item.className = 'ro-item';
      item.setAttribute('data-entry', e.label);
      item.style.setProperty('--c', e.color);
      put(item, span('ro-name', e.display));
      put(item, span('ro-v', fix(e.db[k], 3) + ' dB', 'db'));
      put(item, span('ro-v', '\u2220' + fix(e.deg[k], 2) + '\u00b0', 'deg'));
      if (e.gd) put(item, span('ro-v', '\u03c4 ' + sig(e.gd[k] === null ? null : e.gd[k] / GU.scale, 4) + ' ' + GU.unit, 'gd'));
      if (e.i === e.j) put(item, span('ro-v', 'Z ' + zText(impedance(e.re[k], e.im[k], e.z0, e.x0)), 'z'));
      if (k !== at) put(item, span('ro-v', '(at ' + fmtFreq(F[k]) + ')', 'at'));
      put(readout, item);
      k = at;
    });
  }
  function current() { return hoverIdx !== null ? hoverIdx : markerIdx; }
  // Several inputs (data.overlay) share one frequency axis that holds every input's points; an
  // entry has values only at its own input's points (null elsewhere): its nearest point to k.
  function own(e, k) {
    if (!data.overlay || e.re[k] !== null) return k;
    for (var d = 1; d < N; d++) {
      if (k - d >= 0 && e.re[k - d] !== null) return k - d;
      if (k + d < N && e.re[k + d] !== null) return k + d;
    }
    return k;
  }

  // ---- plots ------------------------------------------------------------------------------
  function niceRange(lo, hi) {
    if (lo === null || hi === null || !isFinite(lo) || !isFinite(hi)) return [0, 1];
    if (hi === lo) { var d = lo === 0 ? 1 : Math.abs(lo) * 0.1; lo -= d; hi += d; }
    var raw = (hi - lo) / 6, p = Math.pow(10, Math.floor(Math.log10(raw))), m = raw / p;
    var st = (m < 1.5 ? 1 : m < 3.5 ? 2 : m < 7.5 ? 5 : 10) * p;
    return [Math.floor(lo / st + 1e-9) * st, Math.ceil(hi / st - 1e-9) * st];
  }
  function scaleOf(kind) { return kind === 'gd' ? GU.scale : 1; }
  // The y range: the data and (when shown) the limits. A dB axis reaches at most data.dbSpan (120 dB)
  // below the largest value shown, so that numerical zeros (|S| = 1e-20 is -400 dB) do not squash
  // the data that matters; the limits are always inside.
  function yRange(kind) {
    return function (u, lo, hi) {
      if (kind === 'phase') return [-180, 180];
      var lims = [];
      if (showLimits) data.limits.forEach(function (l) {
        if (l.plot !== kind) return;
        l.points.forEach(function (p) { lims.push(p[1] / scaleOf(kind)); });
      });
      lims.forEach(function (v) { if (hi === null || v > hi) hi = v; });
      if (kind === 'db' && hi !== null && isFinite(hi) && lo !== null && lo < hi - data.dbSpan) lo = hi - data.dbSpan;
      lims.forEach(function (v) { if (lo === null || v < lo) lo = v; });
      return niceRange(lo, hi);
    };
  }
  // decimals that print every multiple of incr exactly (0.25 needs 2, 0.5 needs 1)
  function decimals(incr) {
    if (!(incr > 0)) return 0;
    for (var d = 0; d < 9; d++) {
      var m = incr * Math.pow(10, d);
      if (Math.abs(m - Math.round(m)) < 1e-6 * Math.max(1, m)) return d;
    }
    return 9;
  }
  // Phase lines: straight segments, with the pen lifted where the phase wraps (a step over 180 deg)
  function phasePaths(u, sidx, i0, i1) {
    var xs = u.data[0], ys = u.data[sidx], p = new Path2D(), pen = false, prev = null;
    for (var k = i0; k <= i1; k++) {
      var y = ys[k];
      if (y === null || y === undefined) { if (!data.overlay) { pen = false; prev = null; } continue; }
      var X = u.valToPos(xs[k], 'x', true), Y = u.valToPos(y, 'y', true);
      if (pen && prev !== null && Math.abs(y - prev) > 180) pen = false;
      if (pen) p.lineTo(X, Y); else p.moveTo(X, Y);
      pen = true;
      prev = y;
    }
    var clip = new Path2D();
    clip.rect(u.bbox.left, u.bbox.top, u.bbox.width, u.bbox.height);
    return { stroke: p, fill: null, clip: clip, band: null, gaps: null, flags: 0 };
  }
  function overlaps(boxes, b) {
    for (var q = 0; q < boxes.length; q++) {
      var o = boxes[q];
      if (o[0] < b[2] && b[0] < o[2] && o[1] < b[3] && b[1] < o[3]) return true;
    }
    return false;
  }
  function drawOverlay(kind) {
    return function (u) {
      var ctx = u.ctx, dpr = uPlot.pxRatio, b = u.bbox, sc = scaleOf(kind);
      ctx.save();
      ctx.beginPath();
      ctx.rect(b.left, b.top, b.width, b.height);
      ctx.clip();
      if (showLimits) {
        var boxes = [];
        ctx.font = (10.5 * dpr) + 'px ' + FONT;
        ctx.textAlign = 'left';
        ctx.textBaseline = 'alphabetic';
        data.limits.forEach(function (l) {
          if (l.plot !== kind || l.points.length === 0) return;
          var col = l.pass ? C.limit : C.fail;
          ctx.strokeStyle = col;
          ctx.lineWidth = 1.6 * dpr;
          ctx.setLineDash([6 * dpr, 4 * dpr]);
          ctx.beginPath();
          var xy = l.points.map(function (p) { return [u.valToPos(p[0], 'x', true), u.valToPos(p[1] / sc, 'y', true)]; });
          if (xy.length === 1) { ctx.moveTo(xy[0][0] - 5 * dpr, xy[0][1]); ctx.lineTo(xy[0][0] + 5 * dpr, xy[0][1]); }
          else xy.forEach(function (p, q) { if (q === 0) ctx.moveTo(p[0], p[1]); else ctx.lineTo(p[0], p[1]); });
          ctx.stroke();
          var w = ctx.measureText(l.spec).width, a = xy[0], z = xy[xy.length - 1], g = 4 * dpr;
          // beside the start (above, below), beside the end (above, below), past the end, before the start
          var spots = [[a[0] + g, a[1] - 5 * dpr], [a[0] + g, a[1] + 13 * dpr], [z[0] - w - g, z[1] - 5 * dpr], [z[0] - w - g, z[1] + 13 * dpr], [z[0] + g, z[1] + 4 * dpr], [a[0] - w - g, a[1] + 4 * dpr]];
          for (var t = 0; t < spots.length; t++) {
            var x = Math.min(Math.max(spots[t][0], b.left + 3 * dpr), b.left + b.width - w - 3 * dpr);
            var y = Math.min(Math.max(spots[t][1], b.top + 12 * dpr), b.top + b.height - 4 * dpr);
            var box = [x, y - 10 * dpr, x + w, y + 2 * dpr];
            if (overlaps(boxes, box)) continue;
            boxes.push(box);
            ctx.fillStyle = col;
            ctx.fillText(l.spec, x, y);
            break;
          }
        });
        ctx.setLineDash([]);
        data.fails.forEach(function (fl) {
          if (fl.plot !== kind || !fl.worst) return;
          var x = u.valToPos(fl.worst[0], 'x', true), y = u.valToPos(fl.worst[1] / sc, 'y', true), r = 4.5 * dpr;
          ctx.strokeStyle = C.fail;
          ctx.lineWidth = 2.2 * dpr;
          ctx.beginPath();
          ctx.moveTo(x - r, y - r); ctx.lineTo(x + r, y + r);
          ctx.moveTo(x - r, y + r); ctx.lineTo(x + r, y - r);
          ctx.stroke();
        });
      }
      if (markerIdx !== null) {
        var mx = u.valToPos(F[markerIdx], 'x', true);
        ctx.strokeStyle = C.accent;
        ctx.lineWidth = 1.2 * dpr;
        ctx.setLineDash([3 * dpr, 3 * dpr]);
        ctx.beginPath();
        ctx.moveTo(mx, b.top);
        ctx.lineTo(mx, b.top + b.height);
        ctx.stroke();
        ctx.setLineDash([]);
        for (var s = 1; s < u.series.length; s++) {
          var v = u.data[s][markerIdx];
          if (!u.series[s].show || v === null || v === undefined) continue;
          var my = u.valToPos(v, 'y', true);
          ctx.fillStyle = '#ffffff';
          ctx.strokeStyle = u.series[s]._stroke || C.accent;
          ctx.lineWidth = 2 * dpr;
          ctx.beginPath();
          ctx.arc(mx, my, 4 * dpr, 0, 2 * Math.PI);
          ctx.fill();
          ctx.stroke();
        }
      }
      ctx.restore();
      placeFailRegions(u, kind);
    };
  }
  function placeFailRegions(u, kind) {
    var over = u.over, old = over.querySelectorAll('.fail-region');
    for (var q = 0; q < old.length; q++) old[q].parentNode.removeChild(old[q]);
    if (!showLimits) return;
    var W = over.clientWidth;
    data.fails.forEach(function (fl) {
      if (fl.plot !== kind) return;
      fl.intervals.forEach(function (iv) {
        var a = u.valToPos(iv[0], 'x'), c = u.valToPos(iv[1], 'x');
        if (c < 0 || a > W) return;
        a = Math.max(0, a);
        c = Math.min(W, c);
        var w = Math.max(2, c - a);
        var d = document.createElement('div');
        d.className = 'fail-region';
        d.setAttribute('data-testid', 'fail-region');
        d.setAttribute('data-spec', fl.spec);
        d.setAttribute('data-f0', String(iv[0]));
        d.setAttribute('data-f1', String(iv[1]));
        d.title = fl.spec + ' fails here';
        d.style.left = (c - a < 2 ? a - 1 : a) + 'px';
        d.style.width = w + 'px';
        over.appendChild(d);
      });
    });
  }
  function onCursor(u) {
    if (fromSmith) return;
    var k = u.cursor.idx;
    if (k !== null && k !== undefined && u.cursor.left >= 0) {
      if (hoverIdx === k) return;
      hoverIdx = k;
      showIndex(k, 'cursor');
      smithDots(k, 'smith-hover');
    } else if (hoverIdx !== null) {
      hoverIdx = null;
      showIndex(markerIdx, 'marker');
      smithDots(null, 'smith-hover');
    }
  }
  function onSeries(kind) {
    return function (u, sidx, opts) {
      if (syncing || sidx === null || sidx === undefined || !opts || opts.show === undefined) return;
      setVisible(data.plots[kind][sidx - 1], opts.show);
    };
  }
  function onScale(u, key) {
    if (key !== 'x' || syncing) return;
    var mn = u.scales.x.min, mx = u.scales.x.max;
    syncing = true;
    KINDS.forEach(function (k) {
      var o = plots[k];
      if (o && o !== u && (o.scales.x.min !== mn || o.scales.x.max !== mx)) o.setScale('x', { min: mn, max: mx });
    });
    syncing = false;
  }
  function sizeOf(el) {
    return { width: Math.max(260, Math.floor(el.clientWidth)), height: Number(el.getAttribute('data-height')) || 260 };
  }
  function ysOf(kind) {
    return data.plots[kind].map(function (k) {
      var e = E[k];
      if (kind === 'db') return e.db;
      if (kind === 'phase') return e.deg;
      return e.gd.map(function (v) { return v === null ? null : v / GU.scale; });
    });
  }
  function makePlot(kind) {
    var el = document.querySelector('[data-testid="plot-' + kind + '"]');
    if (!el) return;
    var idx = data.plots[kind];
    var ys = ysOf(kind);
    var valueFmt = kind === 'db' ? function (u, v) { return v === null || v === undefined ? '\u2014' : fix(v, 2) + ' dB'; }
      : kind === 'phase' ? function (u, v) { return v === null || v === undefined ? '\u2014' : fix(v, 1) + '\u00b0'; }
      : function (u, v) { return v === null || v === undefined ? '\u2014' : sig(v, 4) + ' ' + GU.unit; };
    var axis = { stroke: C.muted, font: '11px ' + FONT, labelFont: '12px ' + FONT, grid: { stroke: C.grid, width: 1 }, ticks: { stroke: C.gridStrong, width: 1, size: 4 } };
    function ax(extra) { var o = {}; var k; for (k in axis) o[k] = axis[k]; for (k in extra) o[k] = extra[k]; return o; }
    var opts = {
      pxAlign: 0,
      width: sizeOf(el).width,
      height: sizeOf(el).height,
      scales: { x: { time: false, distr: data.logX ? 3 : 1, range: N === 1 ? function () { return [F[0] * 0.9 - 1, F[0] * 1.1 + 1]; } : undefined }, y: { range: yRange(kind) } },
      axes: [
        ax({ label: 'Frequency (' + XU.unit + ')', space: 64, size: 30, labelSize: 20, labelGap: 0, values: function (u, splits, ai, space, incr) {
          var d = data.logX ? null : decimals(incr / XU.scale);
          return splits.map(function (v) { return v === null ? '' : d === null ? sig(v / XU.scale, 3) : fix(v / XU.scale, d); });
        } }),
        ax({ label: YTITLE[kind], size: 56, space: 36, splits: kind === 'phase' ? function () { return [-180, -90, 0, 90, 180]; } : undefined,
          values: function (u, splits, ai, space, incr) { var d = decimals(incr); return splits.map(function (v) { return fix(v, d); }); } }),
      ],
      series: [{ label: 'f', value: function (u, v) { return v === null || v === undefined ? '\u2014' : fmtFreq(v); } }].concat(idx.map(function (k) {
        var s = { label: E[k].display, stroke: E[k].color, width: 1.7, points: { size: 5, fill: E[k].color }, value: valueFmt, show: visible[k] };
        if (E[k].dash) s.dash = E[k].dash;
        if (data.overlay) s.spanGaps = true;
        if (kind === 'phase') s.paths = phasePaths;
        return s;
      })),
      cursor: { sync: { key: 'sbx-' + (data.id || 'report'), setSeries: false }, drag: { x: true, y: false, setScale: true }, points: { size: 7, width: 2 }, focus: { prox: -1 } },
      legend: { live: false },
      hooks: { draw: [drawOverlay(kind)], setCursor: [onCursor], setSeries: [onSeries(kind)], setScale: [onScale] },
    };
    var u = new uPlot(opts, [F].concat(ys), el);
    plots[kind] = u;
    var down = null;
    u.over.addEventListener('mousedown', function (ev) { down = [ev.clientX, ev.clientY]; });
    u.over.addEventListener('click', function (ev) {
      if (down && Math.abs(ev.clientX - down[0]) + Math.abs(ev.clientY - down[1]) > 4) return;
      var k = u.cursor.idx;
      if (k !== null && k !== undefined) setMarker(k);
    });
    if (window.ResizeObserver) new ResizeObserver(function () {
      var s = sizeOf(el);
      if (s.width !== u.width || s.height !== u.height) u.setSize(s);
    }).observe(el);
  }

  // ---- Smith chart ------------------------------------------------------------------------
  var smith = document.querySelector('[data-testid="smith"]');
  var SF = data.smithFrame;
  var NS = 'http://www.w3.org/2000/svg';
  var smithReadout = document.querySelector('[data-testid="smith-readout"]');
  var dots = smith ? smith.querySelector('[data-part="smith-dots"]') : null;
  function smithDots(k, cls) {
    if (!dots) return;
    var old = dots.querySelectorAll('.' + cls);
    for (var q = 0; q < old.length; q++) dots.removeChild(old[q]);
    if (k === null || k === undefined) return;
    data.smith.forEach(function (q) {
      var e = E[q], j = own(e, k);
      if (!visible[q] || e.re[j] === null || e.im[j] === null) return;
      var c = document.createElementNS(NS, 'circle');
      c.setAttribute('class', cls);
      c.setAttribute('data-entry', e.label);
      c.setAttribute('cx', String(SF.cx + SF.radius * e.re[j]));
      c.setAttribute('cy', String(SF.cy - SF.radius * e.im[j]));
      c.setAttribute('r', cls === 'smith-marker' ? '5' : '4.5');
      c.setAttribute('stroke', e.color);
      dots.appendChild(c);
    });
  }
  function smithText(q, k) {
    var e = E[q], re = e.re[k], im = e.im[k];
    var m = Math.sqrt(re * re + im * im), a = Math.atan2(im, re) * 180 / Math.PI;
    return e.display + ' \u00b7 ' + fmtFreq(F[k]) + ' \u00b7 \u0393 = ' + fix(m, 4) + ' \u2220' + fix(a, 2) + '\u00b0 \u00b7 Z = ' + zText(impedance(re, im, e.z0, e.x0));
  }
  function smithHover(q, k) {
    smithHot = [q, k];
    smithDots(null, 'smith-hover');
    if (dots) {
      var old = dots.querySelectorAll('.smith-hot');
      for (var i = 0; i < old.length; i++) dots.removeChild(old[i]);
      var e = E[q], c = document.createElementNS(NS, 'circle');
      c.setAttribute('class', 'smith-hot');
      c.setAttribute('data-entry', e.label);
      c.setAttribute('cx', String(SF.cx + SF.radius * e.re[k]));
      c.setAttribute('cy', String(SF.cy - SF.radius * e.im[k]));
      c.setAttribute('r', '6');
      c.setAttribute('stroke', e.color);
      dots.appendChild(c);
    }
    if (smithReadout) {
      smithReadout.textContent = smithText(q, k);
      smithReadout.setAttribute('data-entry', E[q].label);
      smithReadout.setAttribute('data-index', String(k));
    }
  }
  function smithClear() {
    smithHot = null;
    if (dots) {
      var old = dots.querySelectorAll('.smith-hot');
      for (var i = 0; i < old.length; i++) dots.removeChild(old[i]);
    }
    if (smithReadout) {
      smithReadout.textContent = 'Hover over a trace for f, \u0393 and Z.';
      smithReadout.removeAttribute('data-entry');
      smithReadout.removeAttribute('data-index');
    }
  }
  function moveCursors(k) {
    fromSmith = true;
    KINDS.forEach(function (kind) {
      var u = plots[kind];
      if (u) u.setCursor({ left: u.valToPos(F[k], 'x'), top: u.over.clientHeight / 2 });
    });
    fromSmith = false;
  }
  if (smith) {
    smith.addEventListener('mousemove', function (ev) {
      var ctm = smith.getScreenCTM();
      if (!ctm) return;
      var pt = smith.createSVGPoint();
      pt.x = ev.clientX;
      pt.y = ev.clientY;
      var p = pt.matrixTransform(ctm.inverse());
      var gr = (p.x - SF.cx) / SF.radius, gi = -(p.y - SF.cy) / SF.radius;
      var best = null;
      data.smith.forEach(function (q) {
        if (!visible[q]) return;
        var e = E[q];
        for (var k = 0; k < N; k++) {
          if (e.re[k] === null || e.im[k] === null) continue;
          var dx = e.re[k] - gr, dy = e.im[k] - gi, d = dx * dx + dy * dy;
          if (!best || d < best[0]) best = [d, q, k];
        }
      });
      if (best && best[0] < 0.01) {
        smithHover(best[1], best[2]);
        hoverIdx = best[2];
        showIndex(best[2], 'smith');
        moveCursors(best[2]);
      } else if (smithHot) {
        smithClear();
        hoverIdx = null;
        showIndex(markerIdx, 'marker');
      }
    });
    smith.addEventListener('mouseleave', function () {
      smithClear();
      hoverIdx = null;
      showIndex(markerIdx, 'marker');
    });
    smith.addEventListener('click', function () { if (smithHot) setMarker(smithHot[1]); });
  }
  var adm = document.querySelector('[data-testid="toggle-admittance"]');
  function setAdmittance(on) {
    if (!smith) return;
    var g = smith.querySelector('[data-part="admittance-grid"]');
    if (g) { if (on) g.removeAttribute('display'); else g.setAttribute('display', 'none'); }
    smith.setAttribute('data-admittance', on ? 'shown' : 'hidden');
    if (adm) adm.checked = on;
  }
  if (adm) adm.addEventListener('change', function () { setAdmittance(adm.checked); });
  var toggles = document.querySelectorAll('[data-testid="smith-toggle"]');
  for (var t = 0; t < toggles.length; t++) (function (btn) {
    btn.addEventListener('click', function () {
      var q = E.map(function (e) { return e.label; }).indexOf(btn.getAttribute('data-entry'));
      if (q >= 0) setVisible(q, !visible[q]);
    });
  })(toggles[t]);

  // ---- shared state -----------------------------------------------------------------------
  function setVisible(q, on) {
    visible[q] = on;
    syncing = true;
    KINDS.forEach(function (kind) {
      var u = plots[kind];
      var s = data.plots[kind].indexOf(q);
      if (u && s >= 0 && u.series[s + 1].show !== on) u.setSeries(s + 1, { show: on });
    });
    syncing = false;
    if (smith) {
      var g = smith.querySelectorAll('.smith-trace');
      for (var i = 0; i < g.length; i++) if (g[i].getAttribute('data-entry') === E[q].label) g[i].style.display = on ? '' : 'none';
    }
    for (var b = 0; b < toggles.length; b++) if (toggles[b].getAttribute('data-entry') === E[q].label) toggles[b].setAttribute('aria-pressed', on ? 'true' : 'false');
    if (smithHot && smithHot[0] === q && !on) smithClear();
    smithDots(markerIdx, 'smith-marker');
    var k = current();
    showIndex(k, hoverIdx !== null ? 'cursor' : 'marker');
  }
  function setMarker(k) {
    markerIdx = k;
    KINDS.forEach(function (kind) { if (plots[kind]) plots[kind].redraw(false); });
    smithDots(k, 'smith-marker');
    showIndex(k, 'marker');
  }
  var lim = document.querySelector('[data-testid="toggle-limits"]');
  if (lim) lim.addEventListener('change', function () {
    showLimits = lim.checked;
    KINDS.forEach(function (kind) { var u = plots[kind]; if (u) u.setScale('x', { min: u.scales.x.min, max: u.scales.x.max }); });
  });
  var reset = document.querySelector('[data-testid="reset-zoom"]');
  if (reset) reset.addEventListener('click', function () {
    KINDS.forEach(function (kind) { var u = plots[kind]; if (u) { syncing = true; u.setScale('x', { min: F[0], max: F[N - 1] }); syncing = false; } });
  });
  var printWidth = null;
  window.addEventListener('beforeprint', function () {
    printWidth = 680;
    KINDS.forEach(function (kind) { var u = plots[kind]; if (u) u.setSize({ width: printWidth, height: u.height }); });
  });
  window.addEventListener('afterprint', function () {
    printWidth = null;
    KINDS.forEach(function (kind) {
      var u = plots[kind], el = document.querySelector('[data-testid="plot-' + kind + '"]');
      if (u && el) u.setSize(sizeOf(el));
    });
  });

  if (typeof uPlot === 'function' && N > 0) KINDS.forEach(makePlot);
  smithClear();
  showIndex(null);

  // A new result of the same layout (sweep, entries, plots), drawn in place: the plots keep their
  // zoom, the marker and the hidden traces; the Smith chart, the tables and the verdict are the
  // server's new HTML of the same parts the page was made of.
  var shown = {};
  function update(c) {
    var next = c.data, gdUnitChanged = next.gdUnit.unit !== GU.unit;
    ['title', 'entries', 'limits', 'fails', 'gdUnit'].forEach(function (k) { data[k] = next[k]; });
    E = data.entries;
    GU = data.gdUnit;
    YTITLE.gd = 'Group delay (' + GU.unit + ')';
    syncing = true;
    KINDS.forEach(function (kind) {
      var u = plots[kind];
      if (!u) return;
      if (kind === 'gd' && gdUnitChanged) {
        var mn = u.scales.x.min, mx = u.scales.x.max;
        u.destroy();
        makePlot('gd');
        plots.gd.setScale('x', { min: mn, max: mx });
        return;
      }
      u.setData([F].concat(ysOf(kind)), false);
      // the same x range again: y is ranged anew on the new values
      u.setScale('x', { min: u.scales.x.min, max: u.scales.x.max });
    });
    syncing = false;
    if (smith) {
      var admOn = smith.getAttribute('data-admittance') === 'shown';
      smith.innerHTML = c.html.smithBody + '<g data-part="smith-dots" class="smith-dots"></g>';
      dots = smith.querySelector('[data-part="smith-dots"]');
      setAdmittance(admOn);
      var g = smith.querySelectorAll('.smith-trace');
      for (var i = 0; i < g.length; i++) {
        var q = E.map(function (e) { return e.label; }).indexOf(g[i].getAttribute('data-entry'));
        if (q >= 0 && !visible[q]) g[i].style.display = 'none';
      }
      if (smithHot) smithClear();
      smithDots(markerIdx, 'smith-marker');
    }
    ['summary', 'specs', 'values'].forEach(function (part) {
      var el = document.querySelector('section[data-testid="' + part + '"]');
      // a part that did not change (the summary, mostly) is left as it is
      if (el && shown[part] !== c.html[part]) el.innerHTML = c.html[part];
      shown[part] = c.html[part];
    });
    var verdict = document.querySelector('[data-testid="verdict"]');
    if (verdict) { verdict.textContent = c.verdict.text; verdict.setAttribute('data-status', c.verdict.status); }
    var h1 = document.querySelector('[data-testid="title"]');
    if (h1) h1.textContent = data.title;
    var k = current();
    showIndex(k, hoverIdx !== null ? 'cursor' : 'marker');
  }

  window.scatterboxReport = {
    data: data,
    plots: plots,
    readoutAt: function (hz) { setMarker(nearest(hz)); return readout.textContent; },
    smithReadoutAt: function (entry, hz) {
      var q = E.map(function (e) { return e.label; }).indexOf(entry);
      if (q < 0 || data.smith.indexOf(q) < 0) throw new Error('not on the Smith chart: ' + entry);
      smithHover(q, nearest(hz));
      return smithReadout ? smithReadout.textContent : '';
    },
    setTraceVisible: function (entry, on) {
      var q = E.map(function (e) { return e.label; }).indexOf(entry);
      if (q >= 0) setVisible(q, !!on);
    },
    isTraceVisible: function (view, entry) {
      var q = E.map(function (e) { return e.label; }).indexOf(entry);
      if (q < 0) return false;
      if (view === 'smith') {
        var g = smith ? smith.querySelectorAll('.smith-trace') : [];
        for (var i = 0; i < g.length; i++) if (g[i].getAttribute('data-entry') === entry) return g[i].style.display !== 'none';
        return false;
      }
      var u = plots[view], s = data.plots[view] ? data.plots[view].indexOf(q) : -1;
      return !!(u && s >= 0 && u.series[s + 1].show);
    },
    failRegions: function (kind) {
      var el = document.querySelector('[data-testid="plot-' + kind + '"]');
      var r = el ? el.querySelectorAll('[data-testid="fail-region"]') : [];
      var out = [];
      for (var i = 0; i < r.length; i++) out.push({ spec: r[i].getAttribute('data-spec'), left: parseFloat(r[i].style.left), width: parseFloat(r[i].style.width) });
      return out;
    },
    setAdmittance: setAdmittance,
    update: update,
  };
  root.setAttribute('data-ready', 'true');
})();
`;
