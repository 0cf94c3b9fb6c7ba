/**
 * Exact derivatives of the figures of one S entry along a change dS of S: the chain rule through
 * each figure's closed form, so that a figure whose change is small beside its value (the input
 * resistance as a series inductance moves) keeps every digit a difference of the figure would
 * lose. Figures of the whole network (K, μ, MAG, passivity…) are not covered here: their
 * derivatives are taken as differences of the figure along dS (src/design/model.ts).
 *
 * With s = S_ij and ds = dS_ij at a point (common practice, from the definitions in
 * src/figures/entry.ts):
 *   d|s| = Re(s̄·ds)/|s|,  d(20·log10|s|) = (20/ln 10)·Re(s̄·ds)/|s|²,  d(arg s) = Im(s̄·ds)/|s|²,
 *   d VSWR = 2·d|s|/(1 − |s|)²,  d Zin = 2R·ds/(1 − s)²  (Zin = R(1 + s)/(1 − s) − jX),
 * and the group delay τ = −Δφ/Δω over the same neighbours as its value takes dτ = −Δ(dφ)/Δω.
 *
 * @module
 */
import type { NetworkData } from '../network/types.js';
import type { ParsedFigure } from '../figures/registry.js';

const DB = 20 / Math.LN10;
const DEG = 180 / Math.PI;

/** s̄·ds at point k of entry (i, j) (1-based), as [Re, Im], and |s|². */
function parts(net: NetworkData, dS: Float64Array, k: number, i: number, j: number, out: Float64Array): void {
  const n = net.ports;
  const o = 2 * ((k * n + i - 1) * n + j - 1);
  const sr = net.values[o]!;
  const si = net.values[o + 1]!;
  const dr = dS[o]!;
  const di = dS[o + 1]!;
  out[0] = sr * dr + si * di;
  out[1] = sr * di - si * dr;
  out[2] = sr * sr + si * si;
  out[3] = sr;
  out[4] = si;
  out[5] = dr;
  out[6] = di;
}

/**
 * The derivative of the figure at point k along dS (the layout of net.values), or undefined where
 * no closed form is used here (the caller then differences the figure).
 */
export function entryFigureDerivative(fig: ParsedFigure, net: NetworkData, dS: Float64Array, k: number): number | undefined {
  if (net.parameter !== 'S') return undefined;
  const p = new Float64Array(7);
  const [a, b] = fig.spec.args === 'port' ? [fig.ports[0]!, fig.ports[0]!] : fig.spec.args === 'entry' ? [fig.ports[0]!, fig.ports[1]!] : [0, 0];
  if (a === 0) return undefined;
  const dPhase = (q: number) => {
    parts(net, dS, q, a, b, p);
    return p[1]! / p[2]!;
  };
  switch (fig.spec.name) {
    case 'db':
      parts(net, dS, k, a, b, p);
      return (DB * p[0]!) / p[2]!;
    case 'rl':
    case 'il':
      parts(net, dS, k, a, b, p);
      return (-DB * p[0]!) / p[2]!;
    case 'vswr': {
      parts(net, dS, k, a, b, p);
      const m = Math.sqrt(p[2]!);
      if (!(m < 1)) return undefined;
      return (2 * (p[0]! / m)) / ((1 - m) * (1 - m));
    }
    case 'phase':
    case 'uphase':
      return DEG * dPhase(k);
    case 'gd': {
      const f = net.frequencies;
      const last = f.length - 1;
      if (last < 1) return undefined;
      const lo = k === 0 ? 0 : k === last ? last - 1 : k - 1;
      const hi = k === 0 ? 1 : k === last ? last : k + 1;
      return -(dPhase(hi) - dPhase(lo)) / (2 * Math.PI * (f[hi]! - f[lo]!));
    }
    case 'zin_re':
    case 'zin_im': {
      parts(net, dS, k, a, b, p);
      const r = net.references[a - 1]!;
      // 2R·ds/(1 − s)²
      const ur = 1 - p[3]!;
      const ui = -p[4]!;
      const qr = ur * ur - ui * ui;
      const qi = 2 * ur * ui;
      const den = qr * qr + qi * qi;
      if (den === 0) return undefined;
      const nr = 2 * r * p[5]!;
      const ni = 2 * r * p[6]!;
      return fig.spec.name === 'zin_re' ? (nr * qr + ni * qi) / den : (ni * qr - nr * qi) / den;
    }
    default:
      return undefined;
  }
}
