import { parseFigure } from '../figures/registry.js';
import type { NetworkData } from '../network/types.js';
import type { SpecDefinition, SpecResult } from './types.js';

/** The limit of a spec at frequency f: flat, or the straight line between the band's edges. */
export function limitAt(spec: SpecDefinition, f: number): number {
  const [a, b] = spec.limit;
  const [lo, hi] = spec.band;
  if (a === b || hi === lo || !Number.isFinite(hi)) return a;
  return a + ((b - a) * (f - lo)) / (hi - lo);
}

/**
 * Evaluates every spec over the network's sweep: at each sweep point inside the band (edges
 * included), margin = limit − value for `max` and value − limit for `min`; the spec passes when
 * the smallest margin is ≥ 0. A figure that is not a number at some point (NaN) fails there.
 */
export function evaluateSpecs(specs: readonly SpecDefinition[], net: NetworkData): SpecResult[] {
  const cache = new Map<string, Float64Array>();
  return specs.map((spec) => {
    let values = cache.get(spec.figure);
    if (!values) {
      values = parseFigure(spec.figure, { ports: net.ports }).evaluate(net);
      cache.set(spec.figure, values);
    }
    const r: SpecResult = { spec, pass: false, points: 0, worstMargin: Infinity, worstFrequency: NaN, worstValue: NaN, worstLimit: NaN };
    const [lo, hi] = spec.band;
    for (let k = 0; k < net.frequencies.length; k++) {
      const f = net.frequencies[k]!;
      if (f < lo * (1 - 1e-12) || f > hi * (1 + 1e-12)) continue;
      r.points++;
      const v = values[k]!;
      const lim = limitAt(spec, f);
      let m = spec.bound === 'max' ? lim - v : v - lim;
      if (Number.isNaN(m)) m = -Infinity;
      if (m < r.worstMargin || Number.isNaN(r.worstFrequency)) {
        r.worstMargin = m;
        r.worstFrequency = f;
        r.worstValue = v;
        r.worstLimit = lim;
      }
    }
    if (r.points === 0) r.worstMargin = -Infinity;
    r.pass = r.points > 0 && r.worstMargin >= 0;
    return r;
  });
}
