/**
 * The Smith chart, drawn by us in SVG: the geometry of the normalised grid (constant-resistance
 * circles and constant-reactance arcs, and the admittance grid as their point reflection), and an
 * SVG fragment with the grid, traces of reflection coefficients and their labels.
 *
 * Geometry (common practice for the normalised Smith chart, z = Z/Z0, Γ = (z − 1)/(z + 1)):
 * - constant r: circle with centre (r/(1+r), 0) and radius 1/(1+r);
 * - constant x: circle with centre (1, 1/x) and radius 1/|x|, of which the arc inside |Γ| ≤ 1 is
 *   drawn; it meets the rim at Γ = (jx − 1)/(jx + 1) = ((x² − 1) + 2jx)/(x² + 1);
 * - admittance y = 1/z gives Γ = (1 − y)/(1 + y): the same circles for g and b, reflected through
 *   the centre (Γ → −Γ), so constant g has centre (−g/(1+g), 0) and constant b centre (−1, −1/b).
 *
 * @module
 */

import { coord, escapeXml } from './format.js';
import { COLORS } from './style.js';

/** A circle in the Γ plane. */
export interface GammaCircle {
  cx: number;
  cy: number;
  r: number;
}

/** Constant normalised resistance r ≥ 0. */
export function resistanceCircle(r: number): GammaCircle {
  return { cx: r / (1 + r), cy: 0, r: 1 / (1 + r) };
}

/** Constant normalised reactance x ≠ 0 (the whole circle; only its arc inside the rim is drawn). */
export function reactanceCircle(x: number): GammaCircle {
  return { cx: 1, cy: 1 / x, r: 1 / Math.abs(x) };
}

/** Where the constant-x arc meets the rim |Γ| = 1 (its other end is Γ = 1). */
export function reactanceRimPoint(x: number): [number, number] {
  const d = x * x + 1;
  return [(x * x - 1) / d, (2 * x) / d];
}

/** Constant normalised conductance g ≥ 0. */
export function conductanceCircle(g: number): GammaCircle {
  return { cx: -g / (1 + g), cy: 0, r: 1 / (1 + g) };
}

/** Constant normalised susceptance b ≠ 0. */
export function susceptanceCircle(b: number): GammaCircle {
  return { cx: -1, cy: -1 / b, r: 1 / Math.abs(b) };
}

/**
 * Z = Z0·(1 + Γ)/(1 − Γ) in ohms as [R, X] (common practice); Γ = 1 gives [Infinity, NaN]. For a
 * complex reference Z0 + jx0 (power waves, Kurokawa 1965) Z = (Zr* + Γ·Zr)/(1 − Γ), which is the
 * same less j·x0.
 */
export function gammaToImpedance(re: number, im: number, z0: number, x0 = 0): [number, number] {
  const dr = 1 - re;
  const d = dr * dr + im * im;
  if (d === 0) return [Infinity, NaN];
  return [(z0 * (1 - re * re - im * im)) / d, (z0 * 2 * im) / d - x0];
}

/** The grid values drawn: normalised resistances and (both signs of) reactances. */
export const GRID_R = [0.2, 0.5, 1, 2, 5] as const;
export const GRID_X = [0.2, 0.5, 1, 2, 5] as const;

/** A trace on the chart. */
export interface SmithTrace {
  /** Key for data attributes. */
  label: string;
  /** Legend text. */
  display: string;
  color: string;
  /** An SVG dash array (several inputs on one chart); none: solid. */
  dash?: string;
  re: ArrayLike<number>;
  im: ArrayLike<number>;
}

/** Placement of the chart: centre and rim radius in pixels. */
export interface SmithFrame {
  cx: number;
  cy: number;
  radius: number;
}

/** Γ → pixel. */
function px(frame: SmithFrame, re: number, im: number): [string, string] {
  return [coord(frame.cx + frame.radius * re), coord(frame.cy - frame.radius * im)];
}

/** The impedance grid lines (rim, real axis, r circles, x arcs) as SVG, without labels. */
function gridLines(frame: SmithFrame): string {
  const out: string[] = [];
  const [lx, ly] = px(frame, -1, 0);
  const [rx, ry] = px(frame, 1, 0);
  out.push(`<line x1="${lx}" y1="${ly}" x2="${rx}" y2="${ry}"/>`);
  for (const r of GRID_R) {
    const c = resistanceCircle(r);
    const [x, y] = px(frame, c.cx, c.cy);
    out.push(`<circle cx="${x}" cy="${y}" r="${coord(c.r * frame.radius)}" data-r="${r}"/>`);
  }
  for (const x of GRID_X) {
    for (const sign of [1, -1]) {
      const xv = sign * x;
      const c = reactanceCircle(xv);
      const [ex, ey] = reactanceRimPoint(xv);
      const [sx, sy] = px(frame, 1, 0);
      const [tx, ty] = px(frame, ex, ey);
      // the arc inside the rim is the shorter one; it turns clockwise on screen for x > 0
      out.push(`<path d="M${sx} ${sy}A${coord(c.r * frame.radius)} ${coord(c.r * frame.radius)} 0 0 ${xv > 0 ? 1 : 0} ${tx} ${ty}" data-x="${xv}"/>`);
    }
  }
  return out.join('');
}

/** Grid labels: r along the real axis, x just outside the rim. */
function gridLabels(frame: SmithFrame, fontSize: number): string {
  const out: string[] = [];
  for (const r of GRID_R) {
    const g = (r - 1) / (r + 1);
    const [x, y] = px(frame, g, 0);
    out.push(`<text x="${coord(Number(x) - 2)}" y="${coord(Number(y) - 3)}" text-anchor="end">${r}</text>`);
  }
  for (const x of GRID_X) {
    for (const sign of [1, -1]) {
      const [ex, ey] = reactanceRimPoint(sign * x);
      const [tx, ty] = px(frame, ex * 1.075, ey * 1.075);
      out.push(`<text x="${tx}" y="${coord(Number(ty) + fontSize * 0.35)}" text-anchor="middle">${sign > 0 ? '' : '−'}j${x}</text>`);
    }
  }
  const [zx, zy] = px(frame, -1.075, 0);
  out.push(`<text x="${zx}" y="${coord(Number(zy) + fontSize * 0.35)}" text-anchor="middle">0</text>`);
  const [ix, iy] = px(frame, 1.075, 0);
  out.push(`<text x="${ix}" y="${coord(Number(iy) + fontSize * 0.35)}" text-anchor="middle">∞</text>`);
  return `<g font-size="${fontSize}" fill="${COLORS.muted}" data-part="labels">${out.join('')}</g>`;
}

/** SVG path data of a trace; points that are not finite, or that repeat the previous pixel, are skipped. */
export function tracePath(frame: SmithFrame, re: ArrayLike<number>, im: ArrayLike<number>): string {
  const parts: string[] = [];
  let pen = false;
  let last = '';
  for (let k = 0; k < re.length; k++) {
    const a = re[k]!;
    const b = im[k]!;
    if (!Number.isFinite(a) || !Number.isFinite(b)) {
      pen = false;
      continue;
    }
    const [x, y] = px(frame, a, b);
    const here = `${x} ${y}`;
    if (pen && here === last) continue;
    parts.push(`${pen ? 'L' : 'M'}${here}`);
    pen = true;
    last = here;
  }
  return parts.join('');
}

/** Options for {@link smithFragment}. */
export interface SmithFragmentOptions {
  frame: SmithFrame;
  traces: SmithTrace[];
  /** 'none': no admittance grid; 'hidden': present but hidden (for a toggle); 'shown'. */
  admittance: 'none' | 'hidden' | 'shown';
  fontSize?: number;
  /** Data attributes and ids for the interactive report. */
  interactive?: boolean;
}

/**
 * The chart as an SVG fragment (to be put inside an <svg>): background disc, admittance grid
 * (optional), impedance grid, labels, the traces with an open circle at the first sweep point and
 * a filled one at the last.
 */
export function smithFragment(o: SmithFragmentOptions): string {
  const { frame } = o;
  const fs = o.fontSize ?? 10;
  const out: string[] = [];
  out.push(`<circle cx="${coord(frame.cx)}" cy="${coord(frame.cy)}" r="${coord(frame.radius)}" fill="#fbfcfd" stroke="none"/>`);
  if (o.admittance !== 'none') {
    const hidden = o.admittance === 'hidden' ? ' display="none"' : '';
    out.push(
      `<g data-part="admittance-grid" class="smith-admittance" fill="none" stroke="${COLORS.admittance}" stroke-width="0.8" stroke-dasharray="3 2" transform="rotate(180 ${coord(frame.cx)} ${coord(frame.cy)})"${hidden}>${gridLines(frame)}</g>`,
    );
  }
  out.push(`<g data-part="impedance-grid" fill="none" stroke="${COLORS.gridStrong}" stroke-width="0.9">${gridLines(frame)}</g>`);
  out.push(`<circle cx="${coord(frame.cx)}" cy="${coord(frame.cy)}" r="${coord(frame.radius)}" fill="none" stroke="${COLORS.muted}" stroke-width="1.4"/>`);
  out.push(`<circle cx="${coord(frame.cx)}" cy="${coord(frame.cy)}" r="2" fill="${COLORS.muted}"/>`);
  out.push(gridLabels(frame, fs));
  for (const t of o.traces) {
    const d = tracePath(frame, t.re, t.im);
    const attrs = o.interactive ? ` data-entry="${escapeXml(t.label)}" class="smith-trace"` : ` data-entry="${escapeXml(t.label)}"`;
    const ends: string[] = [];
    const first = firstFinite(t.re, t.im, 1);
    const last = firstFinite(t.re, t.im, -1);
    if (first >= 0) {
      const [x, y] = px(frame, t.re[first]!, t.im[first]!);
      ends.push(`<circle cx="${x}" cy="${y}" r="3.2" fill="#ffffff" stroke="${t.color}" stroke-width="1.5" data-end="start"/>`);
    }
    if (last >= 0) {
      const [x, y] = px(frame, t.re[last]!, t.im[last]!);
      ends.push(`<circle cx="${x}" cy="${y}" r="3.2" fill="${t.color}" stroke="${t.color}" stroke-width="1.5" data-end="stop"/>`);
    }
    const dash = t.dash ? ` stroke-dasharray="${t.dash}"` : '';
    out.push(`<g${attrs}><path d="${d}" fill="none" stroke="${t.color}" stroke-width="1.8" stroke-linejoin="round" stroke-linecap="round"${dash}/>${ends.join('')}</g>`);
  }
  return out.join('\n');
}

function firstFinite(re: ArrayLike<number>, im: ArrayLike<number>, dir: 1 | -1): number {
  const m = re.length;
  for (let q = 0; q < m; q++) {
    const k = dir === 1 ? q : m - 1 - q;
    if (Number.isFinite(re[k]!) && Number.isFinite(im[k]!)) return k;
  }
  return -1;
}
