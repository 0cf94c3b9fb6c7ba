import { convertNetwork } from '../network/convert.js';
import type { NetworkData } from '../network/types.js';
import type { ElementInstance, ElementType, TerminalSpec } from './types.js';

/** What a data element keeps after elaboration: its S data and references, ready to interpolate. */
interface Prepared {
  ports: number;
  frequencies: Float64Array;
  /** S, complex interleaved, as in NetworkData. */
  values: Float64Array;
  references: Float64Array;
  /** For `interp=polar`: |S| and the phase unwrapped along frequency, per entry (k·n² + i·n + j). */
  magnitude?: Float64Array;
  phase?: Float64Array;
}

function prepared(el: ElementInstance): Prepared {
  return el.data as Prepared;
}

/** Magnitude and phase unwrapped along frequency for every entry. */
function polarOf(s: NetworkData): { magnitude: Float64Array; phase: Float64Array } {
  const n2 = s.ports * s.ports;
  const nf = s.frequencies.length;
  const magnitude = new Float64Array(nf * n2);
  const phase = new Float64Array(nf * n2);
  for (let e = 0; e < n2; e++) {
    let prev = 0;
    for (let k = 0; k < nf; k++) {
      const re = s.values[2 * (k * n2 + e)]!;
      const im = s.values[2 * (k * n2 + e) + 1]!;
      magnitude[k * n2 + e] = Math.hypot(re, im);
      let ph = Math.atan2(im, re);
      if (k > 0) ph += 2 * Math.PI * Math.round((prev - ph) / (2 * Math.PI));
      phase[k * n2 + e] = ph;
      prev = ph;
    }
  }
  return { magnitude, phase };
}

/**
 * An N-port whose S-parameters come from a network-data file (Touchstone 1.1 or 2.0, or the
 * JSON format), interpolated over frequency: linearly in real and imaginary parts by default, or
 * in magnitude and unwrapped phase (`interp=polar`). Outside the file's band the sweep is an
 * error unless `extrapolate=hold` keeps the nearest point's values.
 *
 * Port i of the file sits between terminals `pi` and `ni` (`ni` defaults to ground). The file's
 * reference impedances are kept: each port obeys the power-wave relation b = S·a with
 * a = (v + R·i)/(2√R), b = (v − R·i)/(2√R), stamped with the port currents as unknowns:
 *
 *     (U − S)·G·v − (U + S)·G·R·i = 0,   G = diag(1/√R),
 *
 * which needs neither Z nor Y of the data to exist, and renormalises the data to whatever the
 * circuit around it presents.
 */
export const datafile: ElementType = {
  keyword: 'datafile',
  summary: 'N-port from a network-data file (Touchstone or JSON), terminals p1…pN (and n1…nN, default ground)',
  example: 'datafile saw1 file="saw-433.s2p" p1=in p2=out interp=polar',
  terminals: [],
  properties: [],
  textProperties: [
    { key: 'file', doc: 'network-data file (.sNp or .json), relative to the netlist', required: true },
    { key: 'interp', doc: 'interpolation: ri (real/imaginary, default) or polar (magnitude and unwrapped phase)', choices: ['ri', 'polar'], defaultValue: 'ri' },
    { key: 'extrapolate', doc: 'outside the data: error (default) or hold (the nearest point)', choices: ['error', 'hold'], defaultValue: 'error' },
  ],
  resolve(el, ctx) {
    const raw = ctx.readNetwork(el.text.file!);
    let s: NetworkData;
    try {
      s = raw.parameter === 'S' ? raw : convertNetwork(raw, 'S');
    } catch (e) {
      ctx.fail(`the data of ${JSON.stringify(el.text.file)} cannot be turned into S-parameters: ${(e as Error).message}`, 'file');
      return undefined;
    }
    if (s.frequencies.length === 0) {
      ctx.fail(`${JSON.stringify(el.text.file)} holds no frequency points`, 'file');
      return undefined;
    }
    const p: Prepared = { ports: s.ports, frequencies: s.frequencies, values: s.values, references: s.references };
    if (el.text.interp === 'polar') Object.assign(p, polarOf(s));
    el.data = p;
    const terminals: TerminalSpec[] = [];
    for (let i = 1; i <= s.ports; i++) terminals.push({ key: `p${i}`, doc: `port ${i} of the data` });
    for (let i = 1; i <= s.ports; i++) terminals.push({ key: `n${i}`, doc: `return of port ${i}`, defaultNode: 'ground' });
    return terminals;
  },
  frequencyRange(el) {
    if (el.text.extrapolate === 'hold') return undefined;
    const f = prepared(el).frequencies;
    return [f[0]!, f[f.length - 1]!];
  },
  compile(el, b) {
    const d = prepared(el);
    const n = d.ports;
    const n2 = n * n;
    const plus = el.nodes.slice(0, n);
    const minus = el.nodes.slice(n, 2 * n);
    const current: number[] = [];
    for (let j = 0; j < n; j++) current.push(b.branch(`current into port ${j + 1} of ${el.name}`));
    // slots: per (i, j) the branch row i against v(p_j), v(n_j) and i_j; then the KCL entries
    const sv = new Int32Array(n2 * 3);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        sv[3 * (i * n + j)] = b.entry(current[i]!, plus[j]!);
        sv[3 * (i * n + j) + 1] = b.entry(current[i]!, minus[j]!);
        sv[3 * (i * n + j) + 2] = b.entry(current[i]!, current[j]!);
      }
    }
    const kcl = new Int32Array(2 * n);
    for (let j = 0; j < n; j++) {
      kcl[2 * j] = b.entry(plus[j]!, current[j]!);
      kcl[2 * j + 1] = b.entry(minus[j]!, current[j]!);
    }
    const sqrtR = d.references.map(Math.sqrt);
    const s = new Float64Array(2 * n2);
    const F = d.frequencies;
    const nf = F.length;
    const polar = d.magnitude !== undefined;
    return (omega, v) => {
      // interpolate S at f into s
      const f = omega / (2 * Math.PI);
      let k = 0;
      let t = 0;
      if (nf > 1) {
        if (f <= F[0]!) k = 0;
        else if (f >= F[nf - 1]!) {
          k = nf - 2;
          t = 1;
        } else {
          let lo = 0;
          let hi = nf - 1;
          while (hi - lo > 1) {
            const mid = (lo + hi) >> 1;
            if (F[mid]! <= f) lo = mid;
            else hi = mid;
          }
          k = lo;
          t = (f - F[lo]!) / (F[hi]! - F[lo]!);
        }
      }
      const k1 = nf > 1 ? k + 1 : 0;
      for (let e = 0; e < n2; e++) {
        if (polar) {
          const m = d.magnitude![k * n2 + e]! * (1 - t) + d.magnitude![k1 * n2 + e]! * t;
          const ph = d.phase![k * n2 + e]! * (1 - t) + d.phase![k1 * n2 + e]! * t;
          s[2 * e] = m * Math.cos(ph);
          s[2 * e + 1] = m * Math.sin(ph);
        } else {
          s[2 * e] = d.values[2 * (k * n2 + e)]! * (1 - t) + d.values[2 * (k1 * n2 + e)]! * t;
          s[2 * e + 1] = d.values[2 * (k * n2 + e) + 1]! * (1 - t) + d.values[2 * (k1 * n2 + e) + 1]! * t;
        }
      }
      // (U − S)·G·v − (U + S)·G·R·i = 0, row by row
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const e = i * n + j;
          const sr = s[2 * e]!;
          const si = s[2 * e + 1]!;
          const dlt = i === j ? 1 : 0;
          const g = 1 / sqrtR[j]!;
          let slot = sv[3 * e]!;
          if (slot >= 0) {
            v[2 * slot] += (dlt - sr) * g;
            v[2 * slot + 1] -= si * g;
          }
          slot = sv[3 * e + 1]!;
          if (slot >= 0) {
            v[2 * slot] -= (dlt - sr) * g;
            v[2 * slot + 1] += si * g;
          }
          slot = sv[3 * e + 2]!;
          v[2 * slot] -= (dlt + sr) * sqrtR[j]!;
          v[2 * slot + 1] -= si * sqrtR[j]!;
        }
      }
      for (let j = 0; j < n; j++) {
        let slot = kcl[2 * j]!;
        if (slot >= 0) v[2 * slot] += 1;
        slot = kcl[2 * j + 1]!;
        if (slot >= 0) v[2 * slot] -= 1;
      }
    };
  },
};
