/**
 * Lumped LC filters from the low-pass prototypes (src/synth/prototype.ts): low-pass, high-pass,
 * band-pass and band-stop by the usual frequency transformations and impedance scaling (common
 * practice; Matthaei, Young & Jones 1964, ch. 4), written as a netlist with design variables,
 * a sweep around the band and specs that encode the request.
 *
 * @module
 */
import type { SeriesName } from '../design/series.js';
import { formatFrequency } from '../format/frequency.js';
import { epsilonSquared, MAX_ORDER, peakGain, prototype, prototypeGain, responsePolynomial, type AllPoleResponse, type FirstElement, type Prototype } from './prototype.js';
import { columns, comment, quantity, short, snap, variableText } from './netlist.js';
import { roots } from './poly.js';

export type FilterKind = 'lowpass' | 'highpass' | 'bandpass' | 'bandstop';

export interface FilterRequest {
  kind: FilterKind;
  response: AllPoleResponse | 'elliptic';
  /** The order, or undefined to find the least order that meets the stop-band mask. */
  order?: number;
  /** Pass-band ripple, dB (Chebyshev). */
  rippleDb: number;
  /** Stop-band attenuation, dB, with `stopEdges`. */
  stopAttenDb?: number;
  /** Stop-band edge frequencies, Hz. */
  stopEdges: number[];
  /** Low-pass and high-pass: the cutoff, Hz. */
  cutoff?: number;
  /** Band-pass and band-stop: the centre (geometric) and the bandwidth, Hz. */
  center?: number;
  bandwidth?: number;
  /** Source (port 1) resistance, ohm. */
  z0: number;
  /** Load (port 2) resistance, ohm; undefined: equal to z0, or the response's own load (even-order Chebyshev). */
  load?: number;
  first: FirstElement;
  series?: SeriesName;
  /** Unloaded Q of every part, at the cutoff or centre; undefined: lossless. */
  q?: number;
  /** How it is built: lumped parts (default), stubs (low-pass: Richards and Kuroda), coupled lines (band-pass: Cohn). */
  realize?: 'lumped' | 'stubs' | 'stepped' | 'coupled-lines';
  /** Stepped-impedance low-pass: the line impedances, ohm (defaults 120 and 20 ohm, for 50 ohm ports scaled with --z0). */
  highZ?: number;
  lowZ?: number;
}

export interface Part {
  name: string;
  kind: 'capacitor' | 'inductor';
  value: number;
  /** Before snapping to a series. */
  exact: number;
  a: string;
  b: string;
  role: string;
}

export interface FilterDesign {
  request: FilterRequest;
  proto: Prototype;
  /** The order and, when it was found from the mask, how. */
  orderNote: string;
  parts: Part[];
  /** Port 2 resistance, ohm. */
  load: number;
  /** The pass-band edges (Hz): [fc] or [f1, f2]. */
  edges: number[];
  text: string;
  summary: string;
  /** |S21|² of the lossless design at f (Hz): the closed-form response at the mapped frequency. */
  gain: (f: number) => number;
}

/** A request that cannot be designed (a plain message naming the option). */
export class DesignRequestError extends RangeError {
  constructor(message: string) {
    super(message);
    this.name = 'DesignRequestError';
  }
}

/** The narrowest band-pass or band-stop, as a fraction of the centre. */
export const MIN_FRACTIONAL_BANDWIDTH = 0.001;

const RESPONSE_NAME: Record<AllPoleResponse, string> = { butterworth: 'Butterworth', chebyshev: 'Chebyshev', bessel: 'Bessel' };
const KIND_NAME: Record<FilterKind, string> = { lowpass: 'low-pass', highpass: 'high-pass', bandpass: 'band-pass', bandstop: 'band-stop' };

/** The band of a request: centre f0 (geometric) and fractional bandwidth, or the cutoff. */
function band(r: FilterRequest): { fc: number; f0: number; fbw: number; edges: number[] } {
  if (r.kind === 'lowpass' || r.kind === 'highpass') {
    if (r.cutoff === undefined) throw new DesignRequestError(`a ${KIND_NAME[r.kind]} filter needs --cutoff`);
    return { fc: r.cutoff, f0: r.cutoff, fbw: 1, edges: [r.cutoff] };
  }
  if (r.center === undefined || r.bandwidth === undefined) throw new DesignRequestError(`a ${KIND_NAME[r.kind]} filter needs --center and --bandwidth`);
  const f0 = r.center;
  const bw = r.bandwidth;
  if (bw < MIN_FRACTIONAL_BANDWIDTH * f0) throw new DesignRequestError(`--bandwidth (${formatFrequency(bw)}) must be at least ${MIN_FRACTIONAL_BANDWIDTH * 100} % of --center (${formatFrequency(f0)}): narrower lumped resonators need parts no one can build`);
  if (bw >= 2 * f0) throw new DesignRequestError(`--bandwidth (${formatFrequency(bw)}) must be below twice --center (${formatFrequency(f0)})`);
  // edges with f2 − f1 = bw and f1·f2 = f0² (geometric centre)
  const f1 = -bw / 2 + Math.sqrt((bw * bw) / 4 + f0 * f0);
  return { fc: f0, f0, fbw: bw / f0, edges: [f1, f1 + bw] };
}

/** The prototype frequency Ω (rad/s, cutoff 1) that frequency f maps to (its magnitude). */
export function mappedFrequency(kind: FilterKind, f: number, f0: number, fbw: number): number {
  switch (kind) {
    case 'lowpass':
      return f / f0;
    case 'highpass':
      return f0 / f;
    case 'bandpass':
      return Math.abs(f / f0 - f0 / f) / fbw;
    case 'bandstop':
      return fbw / Math.abs(f / f0 - f0 / f);
  }
}

/**
 * The least order that gives `atten` dB at the prototype frequency Ω (common-practice formulas:
 * Butterworth n ≥ log(10^(As/10) − 1)/(2·log Ω) with the 3 dB cutoff; Chebyshev
 * n ≥ acosh(√((10^(As/10) − 1)/(10^(Ap/10) − 1)))/acosh Ω; Bessel by trying each order).
 */
export function minimumOrder(response: AllPoleResponse, rippleDb: number, atten: number, omega: number): number {
  const a = Math.expm1((atten * Math.LN10) / 10);
  let n: number;
  if (response === 'butterworth') n = Math.log(a) / (2 * Math.log(omega));
  else if (response === 'chebyshev') n = Math.acosh(Math.sqrt(a / epsilonSquared(rippleDb))) / Math.acosh(omega);
  else {
    for (let k = 1; k <= 60; k++) if (-10 * Math.log10(prototypeGain('bessel', Math.min(k, MAX_ORDER), 0, omega)) >= atten || k > MAX_ORDER) return k;
    return Infinity;
  }
  return Math.max(1, Math.ceil(n - 1e-9));
}

/**
 * The largest group delay (s, prototype: 1 rad/s) over the pass band |Ω| ≤ 1, from the poles:
 * τ(Ω) = Σ −Re p/((Ω − Im p)² + Re p²) (closed form of an all-pole response).
 */
export function passbandDelay(response: AllPoleResponse, order: number, rippleDb: number): number {
  const poles = roots(responsePolynomial(response, order, rippleDb));
  let worst = 0;
  for (let k = 0; k <= 400; k++) {
    const w = k / 400;
    let t = 0;
    for (const p of poles) t += -p[0] / ((w - p[1]) ** 2 + p[0] ** 2);
    worst = Math.max(worst, t);
  }
  return worst;
}

/** Designs a lumped filter and writes its netlist. */
export function designFilter(req: FilterRequest): FilterDesign {
  if (req.response === 'elliptic') throw new DesignRequestError('an elliptic response has a ladder of its own (resonators in the series arms): it is designed apart from the all-pole responses');
  const r = req as FilterRequest & { response: AllPoleResponse };
  const { fc, f0, fbw, edges } = band(r);
  const isBand = r.kind === 'bandpass' || r.kind === 'bandstop';
  // the order: given, or from the mask
  let order = r.order;
  let orderNote = '';
  const stops = r.stopEdges.map((f) => ({ f, omega: mappedFrequency(r.kind, f, f0, fbw) }));
  for (const s of stops) {
    if (!(s.omega > 1)) throw new DesignRequestError(`--stop-edge ${formatFrequency(s.f)} lies inside the pass band${isBand ? ` (${formatFrequency(edges[0]!)} to ${formatFrequency(edges[1]!)})` : ''}: a stop edge must lie ${r.kind === 'lowpass' ? 'above --cutoff' : r.kind === 'highpass' ? 'below --cutoff' : r.kind === 'bandpass' ? 'outside the pass band' : 'inside the stop band, between the pass-band edges'}`);
  }
  if (stops.length > 0 && r.stopAttenDb === undefined) throw new DesignRequestError('--stop-edge needs --stop-atten (the attenuation to reach there, in dB)');
  if (r.stopAttenDb !== undefined && stops.length === 0) throw new DesignRequestError('--stop-atten needs --stop-edge (where the stop band begins)');
  if (order === undefined) {
    if (stops.length === 0) throw new DesignRequestError('give --order, or a mask: --stop-atten with --stop-edge');
    const worst = Math.min(...stops.map((s) => s.omega));
    const n = minimumOrder(r.response, r.rippleDb, r.stopAttenDb!, worst);
    if (n > MAX_ORDER) throw new DesignRequestError(`the mask needs a ${RESPONSE_NAME[r.response]} order above ${MAX_ORDER} (the largest made here): lower --stop-atten, move --stop-edge away from the pass band${r.response !== 'chebyshev' ? ', or use --response chebyshev' : ''}`);
    order = n;
    orderNote = `order ${n}, the least that gives ${short(r.stopAttenDb!)} dB at ${stops.map((s) => formatFrequency(s.f)).join(', ')} (common-practice order formula)`;
  } else orderNote = `order ${order}, as given`;
  const loadRatio = r.load === undefined ? undefined : r.load / r.z0;
  let proto: Prototype;
  try {
    proto = prototype({ response: r.response, order, rippleDb: r.rippleDb, first: r.first, load: loadRatio });
  } catch (e) {
    if (e instanceof RangeError) throw new DesignRequestError(e.message.replace(/^the load/, '--load').replace(/^this response/, `a ${RESPONSE_NAME[r.response]} response of order ${order}`));
    throw e;
  }
  const z0 = r.z0;
  const load = proto.load * z0;
  const w = 2 * Math.PI * fc;
  const w0 = 2 * Math.PI * f0;

  // element values: per arm, one part (low/high-pass) or two (band-pass/stop)
  const n = proto.g.length;
  const armShunt = (k: number) => (k % 2 === 0) === (proto.first === 'shunt');
  let lastSeries = -1;
  for (let k = 0; k < n; k++) if (!armShunt(k)) lastSeries = k;
  const parts: Part[] = [];
  let node = 'in';
  for (let k = 0; k < n; k++) {
    const g = proto.g[k]!;
    const i = k + 1;
    const shunt = armShunt(k);
    const next = shunt ? node : k === lastSeries ? 'out' : `n${i + 1}`;
    const add = (kind: Part['kind'], name: string, exact: number, a: string, b: string, role: string) =>
      parts.push({ name, kind, exact, value: snap(exact, r.series), a, b, role });
    switch (r.kind) {
      case 'lowpass':
        if (shunt) add('capacitor', `c${i}`, g / (w * z0), node, 'ground', `shunt, g${i}/(2π·fc·z0)`);
        else add('inductor', `l${i}`, (g * z0) / w, node, next, `series, g${i}·z0/(2π·fc)`);
        break;
      case 'highpass':
        if (shunt) add('inductor', `l${i}`, z0 / (w * g), node, 'ground', `shunt, z0/(2π·fc·g${i})`);
        else add('capacitor', `c${i}`, 1 / (w * g * z0), node, next, `series, 1/(2π·fc·g${i}·z0)`);
        break;
      case 'bandpass':
        if (shunt) {
          add('inductor', `l${i}`, (fbw * z0) / (w0 * g), node, 'ground', `shunt resonator, FBW·z0/(ω0·g${i})`);
          add('capacitor', `c${i}`, g / (fbw * w0 * z0), node, 'ground', `shunt resonator, g${i}/(FBW·ω0·z0)`);
        } else {
          add('inductor', `l${i}`, (g * z0) / (fbw * w0), node, `m${i}`, `series resonator, g${i}·z0/(FBW·ω0)`);
          add('capacitor', `c${i}`, fbw / (w0 * g * z0), `m${i}`, next, `series resonator, FBW/(ω0·g${i}·z0)`);
        }
        break;
      case 'bandstop':
        if (shunt) {
          add('inductor', `l${i}`, z0 / (w0 * g * fbw), node, `m${i}`, `shunt series-resonator, z0/(ω0·g${i}·FBW)`);
          add('capacitor', `c${i}`, (g * fbw) / (w0 * z0), `m${i}`, 'ground', `shunt series-resonator, g${i}·FBW/(ω0·z0)`);
        } else {
          add('inductor', `l${i}`, (g * fbw * z0) / w0, node, next, `series parallel-resonator, g${i}·FBW·z0/ω0`);
          add('capacitor', `c${i}`, 1 / (w0 * g * fbw * z0), node, next, `series parallel-resonator, 1/(ω0·g${i}·FBW·z0)`);
        }
        break;
    }
    node = next;
  }
  const outNode = lastSeries < 0 ? 'in' : 'out';

  const peak = peakGain(r.response, order, proto.rippleDb, proto.load);
  const gain = (f: number) => prototypeGain(r.response, order!, proto.rippleDb, mappedFrequency(r.kind, f, f0, fbw), peak);

  // --- the netlist ---
  const resp = RESPONSE_NAME[r.response];
  const respText = r.response === 'chebyshev' ? `${resp} ${short(r.rippleDb)} dB ripple` : resp;
  const cutoffMeaning = r.response === 'chebyshev' ? `the edge of the ${short(r.rippleDb)} dB ripple band` : 'the 3 dB point';
  const bandText = isBand
    ? `centre ${formatFrequency(f0)} (geometric), bandwidth ${formatFrequency(r.bandwidth!)} between ${r.response === 'chebyshev' ? `the ends of the ${short(r.rippleDb)} dB ripple band` : 'the 3 dB points'}: ${formatFrequency(edges[0]!)} to ${formatFrequency(edges[1]!)}`
    : `cutoff ${formatFrequency(fc)} (${cutoffMeaning})`;
  const title = `${resp} ${KIND_NAME[r.kind]}, order ${order}, ${isBand ? `${formatFrequency(f0)} centre, ${formatFrequency(r.bandwidth!)} wide` : `${formatFrequency(fc)} cutoff`}`;
  const lines: string[] = [];
  const gList = proto.g.map((g, k) => `g${k + 1} = ${short(g, 6)}`).join(', ');
  const gNextText = `g${order + 1} = ${short(proto.gNext, 6)}`;
  lines.push(
    ...comment(
      [
        `${title}: written by \`scatterbox design ${r.kind}\`.`,
        `${respText} response, ${orderNote}; ${bandText}. ${r.response === 'chebyshev' ? 'The cutoff of a Chebyshev response is the edge of its ripple band' : `The cutoff of a ${resp} response is its 3 dB point`} (common practice).`,
        `Source ${short(z0)} ohm, load ${short(load)} ohm${Math.abs(load - z0) > 1e-9 * z0 ? ` (unequal terminations: ${r.load === undefined ? 'the load an even-order Chebyshev response needs' : `a flat ${short(-10 * Math.log10(peak), 4)} dB of mismatch loss in the pass band`})` : ''}; ${proto.first} arm first.`,
        '',
        `Low-pass prototype (1 ohm, 1 rad/s): ${gList}; ${gNextText}. Values from the ${proto.method}.`,
        `Transformation (common practice): ${
          r.kind === 'lowpass'
            ? 'series L = g·z0/(2π·fc), shunt C = g/(2π·fc·z0)'
            : r.kind === 'highpass'
              ? 'each series L of the prototype becomes a series C = 1/(2π·fc·g·z0), each shunt C a shunt L = z0/(2π·fc·g)'
              : r.kind === 'bandpass'
                ? 'ω → (ω/ω0 − ω0/ω)/FBW: series arms become series LC resonators, shunt arms parallel LC resonators, all tuned to ω0'
                : 'ω → FBW/(ω0/ω − ω/ω0): series arms become parallel LC resonators, shunt arms series LC resonators to ground, all tuned to ω0'
        }.`,
        ...(isBand ? [`FBW = bandwidth/centre = ${short(fbw, 6)}, ω0 = 2π·centre.`] : []),
        `Lossless, |S21|² = ${r.response === 'butterworth' ? '1/(1 + Ω^(2n))' : r.response === 'chebyshev' ? '1/(1 + ε²·T_n(Ω)²), ε² = 10^(ripple/10) − 1' : '|B(0)/B(jΩ·w3)|², B the Bessel polynomial, w3 its 3 dB frequency'}${Math.abs(peak - 1) > 1e-12 ? ` times ${short(peak, 6)}` : ''} with Ω the mapped frequency.`,
        '',
        `The part values are design variables, from half to twice the design value${r.series ? `, snapped to the ${r.series} series` : ', not rounded'}: tune them with \`scatterbox fit\` or \`--set\`.`,
        ...(r.q !== undefined ? [`Losses: every part has Q = ${short(r.q)} at ${formatFrequency(isBand ? f0 : fc)}.`] : ['Parts are ideal (lossless).']),
      ].join('\n'),
    ),
  );
  lines.push(`title "${title}"`, '');
  lines.push(`let z0    = ${quantity(z0, 'ohm')}      # source`);
  lines.push(`let rload = ${quantity(load, 'ohm')}      # load`);
  if (isBand) {
    lines.push(`let f0    = ${quantity(f0, 'Hz')}      # centre (geometric mean of the edges)`);
    lines.push(`let f1    = ${quantity(edges[0]!, 'Hz')}      # lower edge (${cutoffMeaning})`);
    lines.push(`let f2    = ${quantity(edges[1]!, 'Hz')}      # upper edge (${cutoffMeaning})`);
  } else lines.push(`let fc    = ${quantity(fc, 'Hz')}      # cutoff: ${cutoffMeaning}`);
  lines.push('');
  for (const p of parts) {
    const unit = p.kind === 'capacitor' ? 'F' : 'H';
    const snapped = p.value !== p.exact ? `; ${quantity(p.exact, unit, 6)} before snapping` : '';
    lines.push(`let ${p.name.padEnd(4)} = ${variableText(p.value, unit, r.series)}   # ${p.role}${snapped}`);
  }
  lines.push('');
  const qText = r.q !== undefined ? ` q=${short(r.q, 8)} at ${isBand ? 'f0' : 'fc'}` : '';
  const width = Math.max(...parts.map((p) => p.name.length));
  for (const p of parts) lines.push(`${p.kind.padEnd(9)} ${p.name.padEnd(width)} a=${p.a} b=${p.b} value=${p.name}${qText}`);
  lines.push('');
  lines.push('port 1 plus=in  ref=z0');
  lines.push(`port 2 plus=${outNode} ref=rload`);
  lines.push('');

  // sweep: around the band, with the edges and the stop edges as list points
  const stopFs = stops.map((s) => s.f);
  const lo = r.kind === 'lowpass' ? fc / 100 : r.kind === 'highpass' ? Math.min(fc / 10, ...stopFs.map((f) => f / 1.5)) : Math.min(edges[0]! / 2, ...stopFs.map((f) => f / 1.2));
  const hi = r.kind === 'lowpass' ? Math.max(3 * fc, ...stopFs.map((f) => f * 1.5)) : r.kind === 'highpass' ? 3 * fc : Math.max(edges[1]! * 2, ...stopFs.map((f) => f * 1.2));
  lines.push(`sweep linear start=${quantity(lo, 'Hz', 6)} stop=${quantity(hi, 'Hz', 6)} points=401`);
  lines.push(`sweep list freqs=${[...(isBand ? ['f1', 'f2'] : ['fc']), ...(r.kind === 'bandpass' ? ['f0'] : []), ...stopFs.map((f) => quantity(f, 'Hz'))].join(', ')}`);
  lines.push('');

  // specs
  const ripple = r.response === 'chebyshev' ? r.rippleDb : 10 * Math.log10(2);
  const mismatchDb = -10 * Math.log10(Math.min(1, peak));
  const roundingRoom = 0.001;
  // Dissipation: uniform loss moves the poles by σ (s → s + σ), which costs about 8.686·σ·τ(Ω) dB
  // at a point of group delay τ (common practice; Cohn 1959 gives the same at the centre). In the
  // prototype, σ = 1/(2·Q) for parts of Q (low-pass, high-pass) and 1/(Q·FBW) for resonators of
  // two parts (band filters); the room asked for is three times that at the largest pass-band
  // delay, plus 0.1 dB (the loss also upsets the match near the edges).
  const sigma = r.q !== undefined ? (isBand ? 1 / (r.q * fbw) : 1 / (2 * r.q)) : 0;
  const tauMax = r.q !== undefined ? passbandDelay(r.response, order, proto.rippleDb) : 0;
  const dissipation = 8.686 * sigma * tauMax;
  const lossRoom = r.q !== undefined ? 3 * dissipation + 0.1 : 0;
  const passLimit = ripple + mismatchDb + roundingRoom + lossRoom;
  lines.push(
    ...comment(
      `Specs: the request. Pass band: the loss stays within ${r.response === 'chebyshev' ? 'the ripple' : 'the 3 dB of the cutoff'}${mismatchDb > 1e-9 ? ` plus the ${short(mismatchDb, 4)} dB mismatch loss of the terminations` : ''}, with ${roundingRoom} dB of room for the rounding of the written values${r.q !== undefined ? ` and ${short(lossRoom, 3)} dB for the part losses (three times the dissipation estimate 8.686·σ·τmax = ${short(dissipation, 3)} dB, σ = ${isBand ? '1/(Q·FBW)' : '1/(2Q)'}, τmax = ${short(tauMax, 4)} the largest pass-band delay of the prototype; plus 0.1 dB)` : ''}.`,
    ),
  );
  const lim = `${short(passLimit, 8)} dB`;
  switch (r.kind) {
    case 'lowpass':
      lines.push(`spec passband_loss measure=il(2,1) max=${lim} below=fc`);
      break;
    case 'highpass':
      lines.push(`spec passband_loss measure=il(2,1) max=${lim} above=fc`);
      break;
    case 'bandpass':
      lines.push(`spec passband_loss measure=il(2,1) max=${lim} over=f1, f2`);
      break;
    case 'bandstop':
      lines.push(`spec lower_passband_loss measure=il(2,1) max=${lim} below=f1`);
      lines.push(`spec upper_passband_loss measure=il(2,1) max=${lim} above=f2`);
      break;
  }
  if (r.response === 'chebyshev' && Math.abs(peak - 1) < 1e-12 && r.q === undefined) {
    // lossless and matched at the ripple peaks: |S11|² = 1 − |S21|² ≤ 1 − 10^(−ripple/10)
    const rl = -10 * Math.log10(-Math.expm1((-r.rippleDb * Math.LN10) / 10)) - 0.01;
    lines.push(...comment(`Match in the pass band: a lossless ripple of ${short(r.rippleDb)} dB gives a return loss of at least ${short(rl + 0.01, 5)} dB there (less 0.01 dB of room).`));
    const bandArg = r.kind === 'lowpass' ? 'below=fc' : r.kind === 'highpass' ? 'above=fc' : r.kind === 'bandpass' ? 'over=f1, f2' : 'below=f1';
    lines.push(`spec passband_match measure=rl(1) min=${short(rl, 8)} dB ${bandArg}`);
  }
  if (r.stopAttenDb !== undefined) {
    lines.push(`# Stop band: at least ${short(r.stopAttenDb)} dB of loss from each stop edge on.`);
    stops.forEach((s, i) => {
      const name = stops.length > 1 ? `stopband_${i + 1}` : 'stopband';
      const fText = quantity(s.f, 'Hz');
      let bandArg: string;
      if (r.kind === 'lowpass' || (r.kind === 'bandpass' && s.f > f0)) bandArg = `above=${fText}`;
      else if (r.kind === 'highpass' || r.kind === 'bandpass') bandArg = `below=${fText}`;
      else {
        // band-stop: from the stop edge to its geometric mirror, which maps to the same Ω
        const mirror = (f0 * f0) / s.f;
        bandArg = s.f < mirror ? `over=${fText}, ${quantity(mirror, 'Hz')}` : `over=${quantity(mirror, 'Hz')}, ${fText}`;
      }
      lines.push(`spec ${name} measure=il(2,1) min=${short(r.stopAttenDb!, 8)} dB ${bandArg}`);
    });
  }
  const text = lines.join('\n') + '\n';

  const unitOf = (p: Part) => (p.kind === 'capacitor' ? 'F' : 'H');
  const summary =
    `${title}\n${respText}, ${orderNote}; ${bandText}\nsource ${short(z0)} ohm, load ${short(load)} ohm; ${proto.first} arm first${r.q !== undefined ? `; Q = ${short(r.q)}` : ''}\n\n` +
    columns([
      ['part', 'arm', 'value', ...(r.series ? [`before ${r.series}`] : [])],
      ...parts.map((p) => [p.name, p.role.split(',')[0]!, quantity(p.value, unitOf(p), 6), ...(r.series ? [quantity(p.exact, unitOf(p), 6)] : [])]),
    ]);
  return { request: r, proto, orderNote, parts, load, edges, text, summary, gain };
}
