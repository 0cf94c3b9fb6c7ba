/**
 * Lumped elliptic low-pass and high-pass filters (odd order, equal terminations) from the
 * ladders of src/synth/elliptic.ts, written as netlists like the other lumped filters.
 *
 * @module
 */
import type { SeriesName } from '../design/series.js';
import { formatFrequency } from '../format/frequency.js';
import { DesignRequestError, type FilterRequest, type Part } from './lumped.js';
import { ellipticGain, ellipticLadder, ellipticResponse, type EllipticResponse } from './elliptic.js';
import { MAX_ORDER } from './prototype.js';
import { columns, comment, quantity, short, snap, variableText } from './netlist.js';
import { roots } from './poly.js';

export interface EllipticDesign {
  response: EllipticResponse;
  parts: Part[];
  text: string;
  summary: string;
  /** |S21|² of the lossless design at f (Hz). */
  gain: (f: number) => number;
}

/** The least odd order whose elliptic response gives `atten` dB beyond Ωs. */
export function ellipticOrder(rippleDb: number, atten: number, omegaS: number): number {
  for (let n = 3; n <= MAX_ORDER; n += 2) if (ellipticResponse(n, rippleDb, omegaS).stopAttenDb >= atten) return n;
  return Infinity;
}

export function designEllipticFilter(r: FilterRequest): EllipticDesign {
  if (r.kind !== 'lowpass' && r.kind !== 'highpass') throw new DesignRequestError('--response elliptic makes low-pass and high-pass filters here (band filters: not yet)');
  if (r.load !== undefined && Math.abs(r.load - r.z0) > 1e-9 * r.z0) throw new DesignRequestError('--response elliptic takes equal terminations (leave out --load)');
  if (r.cutoff === undefined) throw new DesignRequestError(`a ${r.kind === 'lowpass' ? 'low' : 'high'}-pass filter needs --cutoff`);
  if (r.stopEdges.length !== 1) throw new DesignRequestError('--response elliptic needs one --stop-edge: the edge of the stop band sets the response');
  const fc = r.cutoff;
  const fs = r.stopEdges[0]!;
  const omegaS = r.kind === 'lowpass' ? fs / fc : fc / fs;
  if (!(omegaS > 1.0001)) throw new DesignRequestError(`--stop-edge ${formatFrequency(fs)} must lie ${r.kind === 'lowpass' ? 'above' : 'below'} --cutoff`);
  let order = r.order;
  let note: string;
  if (order === undefined) {
    if (r.stopAttenDb === undefined) throw new DesignRequestError('give --order, or --stop-atten for the least order');
    order = ellipticOrder(r.rippleDb, r.stopAttenDb, omegaS);
    if (order > MAX_ORDER) throw new DesignRequestError(`the mask needs an elliptic order above ${MAX_ORDER}: lower --stop-atten or move --stop-edge away from --cutoff`);
    note = `order ${order}, the least odd order that gives ${short(r.stopAttenDb)} dB beyond ${formatFrequency(fs)}`;
  } else note = `order ${order}, as given`;
  if (order % 2 === 0 || order < 3) throw new DesignRequestError('--response elliptic takes an odd --order from 3 on (equal terminations)');
  let resp: EllipticResponse;
  let ladder: ReturnType<typeof ellipticLadder>;
  try {
    resp = ellipticResponse(order, r.rippleDb, omegaS);
    ladder = ellipticLadder(resp);
  } catch (e) {
    if (e instanceof RangeError) throw new DesignRequestError(`an elliptic ladder of order ${order} with this --ripple and --stop-edge: ${e.message}`);
    throw e;
  }
  if (r.stopAttenDb !== undefined && resp.stopAttenDb < r.stopAttenDb) throw new DesignRequestError(`order ${order} gives ${short(resp.stopAttenDb, 4)} dB beyond ${formatFrequency(fs)}, less than --stop-atten ${short(r.stopAttenDb)} dB: raise --order or leave it out`);
  const z0 = r.z0;
  const w = 2 * Math.PI * fc;
  const series: SeriesName | undefined = r.series;
  const parts: Part[] = [];
  const dual = r.first === 'series';
  let node = 'in';
  let idx = 0;
  const lastSeriesArm = ladder.arms.length - 2;
  const add = (kind: Part['kind'], name: string, exact: number, a: string, b: string, role: string) => parts.push({ name, kind, exact, value: snap(exact, series), a, b, role });
  ladder.arms.forEach((arm, k) => {
    idx++;
    if (arm.kind === 'shunt') {
      // a shunt capacitor c (dual: a series inductor c)
      if (!dual) {
        if (r.kind === 'lowpass') add('capacitor', `c${idx}`, arm.c / (w * z0), node, 'ground', `shunt, c${idx}/(2π·fc·z0)`);
        else add('inductor', `l${idx}`, z0 / (w * arm.c), node, 'ground', `shunt, z0/(2π·fc·c${idx})`);
      } else {
        const next = k === ladder.arms.length - 1 ? 'out' : `n${idx + 1}`;
        if (r.kind === 'lowpass') add('inductor', `l${idx}`, (arm.c * z0) / w, node, next, `series, g·z0/(2π·fc)`);
        else add('capacitor', `c${idx}`, 1 / (w * arm.c * z0), node, next, `series, 1/(2π·fc·g·z0)`);
        node = next;
      }
    } else {
      const fz = formatFrequency(r.kind === 'lowpass' ? arm.zero * fc : fc / arm.zero);
      if (!dual) {
        // a series arm: L ∥ C resonating at the transmission zero
        const next = k === lastSeriesArm ? 'out' : `n${idx + 1}`;
        if (r.kind === 'lowpass') {
          add('inductor', `l${idx}`, (arm.l * z0) / w, node, next, `series resonator (zero at ${fz}), l·z0/(2π·fc)`);
          add('capacitor', `c${idx}`, arm.c / (w * z0), node, next, `series resonator (zero at ${fz}), c/(2π·fc·z0)`);
        } else {
          add('capacitor', `c${idx}`, 1 / (w * arm.l * z0), node, next, `series resonator (zero at ${fz}), 1/(2π·fc·l·z0)`);
          add('inductor', `l${idx}`, z0 / (w * arm.c), node, next, `series resonator (zero at ${fz}), z0/(2π·fc·c)`);
        }
        node = next;
      } else {
        // the dual: a shunt series L-C to ground, L from c and C from l
        if (r.kind === 'lowpass') {
          add('inductor', `l${idx}`, (arm.c * z0) / w, node, `m${idx}`, `shunt resonator (zero at ${fz})`);
          add('capacitor', `c${idx}`, arm.l / (w * z0), `m${idx}`, 'ground', `shunt resonator (zero at ${fz})`);
        } else {
          add('capacitor', `c${idx}`, 1 / (w * arm.c * z0), node, `m${idx}`, `shunt resonator (zero at ${fz})`);
          add('inductor', `l${idx}`, z0 / (w * arm.l), `m${idx}`, 'ground', `shunt resonator (zero at ${fz})`);
        }
      }
    }
  });
  const outNode = node;
  const mapped = (f: number) => (r.kind === 'lowpass' ? f / fc : fc / f);
  const gain = (f: number) => ellipticGain(resp, mapped(f));
  const title = `Elliptic ${r.kind === 'lowpass' ? 'low' : 'high'}-pass, order ${order}, ${formatFrequency(fc)} cutoff`;
  const lines: string[] = [];
  lines.push(
    ...comment(
      [
        `${title}: written by \`scatterbox design ${r.kind} --response elliptic\`.`,
        `Elliptic (Cauer) response, ${short(r.rippleDb)} dB ripple, ${note}; cutoff ${formatFrequency(fc)}, the edge of the ripple band (common practice); stop band from ${formatFrequency(fs)} with at least ${short(resp.stopAttenDb, 5)} dB. Source and load ${short(z0)} ohm.`,
        `|S21|² = 1/(1 + ε²·R_N(Ω)²), R_N the elliptic rational function (zeros, poles and degree equation after Orfanidis' notes on elliptic filter design); transmission zeros at Ω = ${resp.zeros.map((z) => short(z, 6)).join(', ')}. The ladder by zero shifting from the input admittance (E − F)/(E + F).`,
        `The part values are design variables, from half to twice the design value${series ? `, snapped to the ${series} series` : ', not rounded'}.${r.q !== undefined ? ` Every part has Q = ${short(r.q)} at fc.` : ' Parts are ideal (lossless).'}`,
      ].join('\n'),
    ),
  );
  lines.push(`title "${title}"`, '');
  lines.push(`let z0 = ${quantity(z0, 'ohm')}      # source and load`);
  lines.push(`let fc = ${quantity(fc, 'Hz')}      # cutoff: the edge of the ${short(r.rippleDb)} dB ripple band`, '');
  for (const p of parts) {
    const unit = p.kind === 'capacitor' ? 'F' : 'H';
    lines.push(`let ${p.name.padEnd(4)} = ${variableText(p.value, unit, series)}   # ${p.role}${p.value !== p.exact ? `; ${quantity(p.exact, unit, 6)} before snapping` : ''}`);
  }
  lines.push('');
  const qText = r.q !== undefined ? ` q=${short(r.q, 8)} at fc` : '';
  for (const p of parts) lines.push(`${p.kind.padEnd(9)} ${p.name.padEnd(4)} a=${p.a} b=${p.b} value=${p.name}${qText}`);
  lines.push('', 'port 1 plus=in  ref=z0', `port 2 plus=${outNode} ref=z0`, '');
  const lo = r.kind === 'lowpass' ? fc / 100 : Math.min(fs / 2, fc / 10);
  const hi = r.kind === 'lowpass' ? Math.max(3 * fc, 2 * fs) : 3 * fc;
  lines.push(`sweep linear start=${quantity(lo, 'Hz', 6)} stop=${quantity(hi, 'Hz', 6)} points=401`);
  lines.push(`sweep list freqs=fc, ${quantity(fs, 'Hz')}`, '');
  // with lossy parts: three times the dissipation estimate 8.686·σ·τmax (σ = 1/(2Q)), plus 0.1 dB, as for the other lumped filters
  let room = 0.001;
  if (r.q !== undefined) {
    const poles = roots(resp.e);
    let tau = 0;
    for (let k = 0; k <= 400; k++) {
      let t = 0;
      for (const p of poles) t += -p[0] / ((k / 400 - p[1]) ** 2 + p[0] ** 2);
      tau = Math.max(tau, t);
    }
    room = Number((3 * 8.686 * tau / (2 * r.q) + 0.1).toPrecision(4));
  }
  lines.push(...comment(`Specs: the pass band within the ripple (${room} dB of room${r.q !== undefined ? ' for the part losses' : ' for rounding'}), the stop band at least the attenuation this order gives${r.stopAttenDb !== undefined ? ' (and the one asked for)' : ''}, less ${r.q !== undefined ? 'the same room' : '0.01 dB'}.`));
  lines.push(`spec passband_loss measure=il(2,1) max=${short(r.rippleDb + room, 8)} dB ${r.kind === 'lowpass' ? 'below' : 'above'}=fc`);
  // lossy parts fill the stop band in a little near its edge: the same room again there
  const stopMin = Math.floor((resp.stopAttenDb - (r.q !== undefined ? room : 0.01)) * 1000) / 1000;
  lines.push(`spec stopband measure=il(2,1) min=${short(stopMin, 8)} dB ${r.kind === 'lowpass' ? 'above' : 'below'}=${quantity(fs, 'Hz')}`);
  const text = lines.join('\n') + '\n';
  const summary = `${title}\n${note}; stop band from ${formatFrequency(fs)}: ${short(resp.stopAttenDb, 5)} dB\n\n` + columns([['part', 'arm', 'value', ...(series ? [`before ${series}`] : [])], ...parts.map((p) => [p.name, p.role.split(/[,(]/)[0]!.trim(), quantity(p.value, p.kind === 'capacitor' ? 'F' : 'H', 6), ...(series ? [quantity(p.exact, p.kind === 'capacitor' ? 'F' : 'H', 6)] : [])])]);
  return { response: resp, parts, text, summary, gain };
}
