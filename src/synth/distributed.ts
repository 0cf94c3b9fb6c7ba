/**
 * Distributed filters from the low-pass prototypes:
 *
 * - a stub low-pass by Richards' transformation (1948): with lines an eighth of a wavelength
 *   long at the cutoff, Ω = tan(π·f/(4·fc)); an inductor g becomes a series short-circuited stub
 *   of impedance g·z0, a capacitor a shunt open stub of z0/g. Kuroda's identities then turn each
 *   series stub at an end of the ladder into a shunt open stub behind a unit element (a line of
 *   the same length) added at the port: UE(Zb) + series stub(Za) = shunt stub(Zb·(Za + Zb)/Za)
 *   + UE(Za + Zb). A unit element matched to its port only adds phase, so |S21| is exactly the
 *   prototype's at Ω = tan(π·f/(4·fc)).
 * - a parallel-coupled-line band-pass (Cohn, 1958; Matthaei, Young & Jones, 1964, §10.02):
 *   N + 1 quarter-wave coupled sections with J01/Y0 = √(π·Δ/(2·g0·g1)),
 *   J(k,k+1)/Y0 = π·Δ/(2·√(gk·g(k+1))), J(N,N+1)/Y0 = √(π·Δ/(2·gN·g(N+1))), and
 *   Z0e = z0·(1 + J·z0 + (J·z0)²), Z0o = z0·(1 − J·z0 + (J·z0)²) — a narrow-band design.
 *
 * @module
 */
import { formatFrequency } from '../format/frequency.js';
import { DesignRequestError, type FilterRequest } from './lumped.js';
import { MAX_ORDER, peakGain, prototype, prototypeGain, type AllPoleResponse, type Prototype } from './prototype.js';
import { columns, comment, quantity, short } from './netlist.js';
import { minimumOrder } from './lumped.js';

export interface DistributedDesign {
  proto: Prototype;
  text: string;
  summary: string;
  /** |S21|² of the design at f (Hz) — exact for the stub low-pass, the prototype's narrow-band mapping for the coupled-line band-pass. */
  gain: (f: number) => number;
  /** Coupled-line band-pass: the even- and odd-mode impedances of each section (ohm). */
  modes?: { z0e: number; z0o: number }[];
}

const RESPONSE_NAME = { butterworth: 'Butterworth', chebyshev: 'Chebyshev', bessel: 'Bessel' } as const;

/** The distributed designs take the all-pole responses. */
function allPole(r: FilterRequest, how: string): FilterRequest & { response: AllPoleResponse } {
  if (r.response === 'elliptic') throw new DesignRequestError(`--realize ${how} takes butterworth, chebyshev or bessel; an elliptic response is made with lumped parts`);
  return r as FilterRequest & { response: AllPoleResponse };
}

function orderOf(r: FilterRequest & { response: AllPoleResponse }, omegaOf: (f: number) => number): { order: number; note: string } {
  if (r.order !== undefined) return { order: r.order, note: `order ${r.order}, as given` };
  if (r.stopEdges.length === 0 || r.stopAttenDb === undefined) throw new DesignRequestError('give --order, or a mask: --stop-atten with --stop-edge');
  const w = Math.min(...r.stopEdges.map(omegaOf));
  if (!(w > 1)) throw new DesignRequestError('--stop-edge lies inside the pass band');
  const n = minimumOrder(r.response, r.rippleDb, r.stopAttenDb, w);
  if (n > MAX_ORDER) throw new DesignRequestError(`the mask needs an order above ${MAX_ORDER}: lower --stop-atten or move --stop-edge away from the pass band`);
  return { order: n, note: `order ${n}, the least that gives ${short(r.stopAttenDb)} dB at ${r.stopEdges.map((f) => formatFrequency(f)).join(', ')} (common-practice order formula)` };
}

/** Richards' frequency for lines of 45° at fc: Ω = tan(π·f/(4·fc)). */
export function richardsOmega(f: number, fc: number): number {
  return Math.tan((Math.PI * f) / (4 * fc));
}

interface Section {
  kind: 'open_stub' | 'short_stub' | 'line';
  /** Normalised impedance (source 1 ohm). */
  z: number;
  role: string;
}

/** The stub low-pass of Richards and Kuroda. */
export function designStubLowpass(req: FilterRequest): DistributedDesign {
  const r = allPole(req, 'stubs');
  if (r.kind !== 'lowpass') throw new DesignRequestError('--realize stubs makes low-pass filters only');
  if (r.series !== undefined || r.q !== undefined) throw new DesignRequestError('--series and --q apply to lumped parts; --realize stubs is made of lines');
  const fc = r.cutoff!;
  const { order, note } = orderOf(r, (f) => (f >= 2 * fc ? Infinity : richardsOmega(f, fc)));
  const proto = prototype({ response: r.response, order, rippleDb: r.rippleDb, first: r.first, load: r.load === undefined ? undefined : r.load / r.z0 });
  const n = proto.g.length;
  const shunt = (k: number) => (k % 2 === 0) === (proto.first === 'shunt');
  const secs: Section[] = proto.g.map((g, k) => (shunt(k) ? { kind: 'open_stub', z: 1 / g, role: `shunt open stub, z0/g${k + 1}` } : { kind: 'short_stub', z: g, role: `series short stub, g${k + 1}·z0` }));
  const out: Section[] = [...secs];
  const kuroda: string[] = [];
  // Kuroda at the source end: UE(1) + series stub(g1) = shunt stub((g1 + 1)/g1) + UE(g1 + 1)
  if (!shunt(0)) {
    const za = secs[0]!.z;
    const zb = 1;
    out.splice(0, 1, { kind: 'open_stub', z: (zb * (za + zb)) / za, role: 'shunt open stub (Kuroda, from series stub 1)' }, { kind: 'line', z: za + zb, role: 'unit element (Kuroda)' });
    kuroda.push('the series stub at the source end');
  }
  // at the load end: series stub(gn) + UE(RL) = UE(gn + RL) + shunt stub(RL·(gn + RL)/gn)
  if (!shunt(n - 1) && n > 1) {
    const za = secs[n - 1]!.z;
    const zb = proto.load;
    out.splice(out.length - 1, 1, { kind: 'line', z: za + zb, role: 'unit element (Kuroda)' }, { kind: 'open_stub', z: (zb * (za + zb)) / za, role: `shunt open stub (Kuroda, from series stub ${n})` });
    kuroda.push('the series stub at the load end');
  }
  const seriesLeft = out.filter((s) => s.kind === 'short_stub').length;
  const z0 = r.z0;
  const load = proto.load * z0;
  const peak = peakGain(r.response, order, proto.rippleDb, proto.load);
  const gain = (f: number) => prototypeGain(r.response, order, proto.rippleDb, richardsOmega(f, fc), peak);

  const resp = RESPONSE_NAME[r.response];
  const title = `${resp} stub low-pass, order ${order}, ${formatFrequency(fc)} cutoff`;
  const lines: string[] = [];
  lines.push(
    ...comment(
      [
        `${title}: written by \`scatterbox design lowpass --realize stubs\`.`,
        `${r.response === 'chebyshev' ? `${resp} ${short(r.rippleDb)} dB ripple` : resp} response, ${note}; cutoff ${formatFrequency(fc)} (${r.response === 'chebyshev' ? 'the edge of the ripple band' : 'the 3 dB point'}, common practice). Source ${short(z0)} ohm, load ${short(load)} ohm.`,
        `Prototype: ${proto.g.map((g, k) => `g${k + 1} = ${short(g, 6)}`).join(', ')} (${proto.method}).`,
        `Richards' transformation (1948): every line is 45° long at fc, Ω = tan(π·f/(4·fc)); an inductor g becomes a series short stub of g·z0, a capacitor a shunt open stub of z0/g. The response repeats: total rejection at 2·fc, a pass band again around 4·fc.`,
        kuroda.length > 0
          ? `Kuroda's identities turned ${kuroda.join(' and ')} into a shunt open stub behind a unit element (UE(Zb) + series stub(Za) = shunt stub(Zb·(Za + Zb)/Za) + UE(Za + Zb)).${seriesLeft > 0 ? ` ${seriesLeft} series stub${seriesLeft > 1 ? 's remain' : ' remains'} inside the ladder (Kuroda's identities reach only the ends; use --first series and an order of 3 or less for shunt stubs only).` : ' Only shunt stubs remain.'}`
          : seriesLeft > 0
            ? `${seriesLeft} series short stub${seriesLeft > 1 ? 's' : ''} remain${seriesLeft > 1 ? '' : 's'} (use --first series and an order of 3 or less to have Kuroda's identities leave shunt stubs only).`
            : 'Only shunt stubs.',
        'Lossless, |S21|² is exactly the prototype response at Ω = tan(π·f/(4·fc)). The stub and line impedances are design variables.',
      ].join('\n'),
    ),
  );
  lines.push(`title "${title}"`, '');
  lines.push(`let z0    = ${quantity(z0, 'ohm')}      # source`);
  lines.push(`let rload = ${quantity(load, 'ohm')}      # load`);
  lines.push(`let fc    = ${quantity(fc, 'Hz')}      # cutoff`, '');
  const names = out.map((s, i) => `${s.kind === 'line' ? 'u' : s.kind === 'open_stub' ? 's' : 'l'}${i + 1}`);
  out.forEach((s, i) => lines.push(`let z${names[i]} = ${quantity(s.z * z0, 'ohm')} vary ${quantity((s.z * z0) / 2, 'ohm', 6)} to ${quantity(s.z * z0 * 2, 'ohm', 6)}   # ${s.role}`));
  lines.push('');
  let node = 'in';
  let k = 1;
  const lastSeries = out.reduce((a, s, i) => (s.kind !== 'open_stub' ? i : a), -1);
  out.forEach((s, i) => {
    if (s.kind === 'open_stub') lines.push(`open_stub  ${names[i]} a=${node} z0=z${names[i]} theta=45 deg at fc`);
    else {
      const next = i === lastSeries ? 'out' : `n${++k}`;
      lines.push(`${s.kind.padEnd(10)} ${names[i]} a=${node} b=${next} z0=z${names[i]} theta=45 deg at fc`);
      node = next;
    }
  });
  const outNode = node;
  lines.push('', 'port 1 plus=in ref=z0', `port 2 plus=${outNode} ref=rload`, '');
  const stops = r.stopEdges;
  lines.push(`sweep linear start=${quantity(fc / 100, 'Hz', 6)} stop=${quantity(1.9 * fc, 'Hz', 6)} points=401`);
  lines.push(`sweep list freqs=fc${stops.map((f) => `, ${quantity(f, 'Hz')}`).join('')}`, '');
  const ripple = r.response === 'chebyshev' ? r.rippleDb : 10 * Math.log10(2);
  const mismatchDb = -10 * Math.log10(Math.min(1, peak));
  lines.push(...comment(`Specs: the pass band within ${r.response === 'chebyshev' ? 'the ripple' : '3 dB'}${mismatchDb > 1e-9 ? ` plus ${short(mismatchDb, 4)} dB of mismatch loss` : ''}, with 0.001 dB of room for rounding.`));
  lines.push(`spec passband_loss measure=il(2,1) max=${short(ripple + mismatchDb + 0.001, 8)} dB below=fc`);
  if (r.stopAttenDb !== undefined) {
    // the response of a Richards filter comes back above 2·fc: the stop band spec ends short of 4·fc − edge
    stops.forEach((f, i) => {
      if (f >= 2 * fc) throw new DesignRequestError(`--stop-edge ${formatFrequency(f)} lies at or above 2·--cutoff, where a Richards filter's response turns back toward its next pass band`);
      lines.push(`spec stopband${stops.length > 1 ? `_${i + 1}` : ''} measure=il(2,1) min=${short(r.stopAttenDb!, 8)} dB over=${quantity(f, 'Hz')}, ${quantity(1.9 * fc, 'Hz')}`);
    });
  }
  const text = lines.join('\n') + '\n';
  const summary = `${title}\n${note}\n\n` + columns([['element', 'what', 'impedance'], ...out.map((s, i) => [names[i]!, s.role, quantity(s.z * z0, 'ohm', 6)])]);
  return { proto, text, summary, gain };
}

/** The largest J·z0 of a coupled section the narrow-band design accepts (its formulas assume loose coupling). */
export const MAX_COUPLING = 0.7;

/** The parallel-coupled-line band-pass of Cohn (1958). */
export function designCoupledBandpass(req: FilterRequest): DistributedDesign {
  const r = allPole(req, 'coupled-lines');
  if (r.kind !== 'bandpass') throw new DesignRequestError('--realize coupled-lines makes band-pass filters only');
  if (r.series !== undefined || r.q !== undefined) throw new DesignRequestError('--series and --q apply to lumped parts; --realize coupled-lines is made of lines');
  if (r.load !== undefined && Math.abs(r.load - r.z0) > 1e-9 * r.z0) throw new DesignRequestError('--realize coupled-lines takes equal terminations (leave out --load)');
  const f0 = r.center!;
  const delta = r.bandwidth! / f0;
  if (delta > 0.2) throw new DesignRequestError(`--realize coupled-lines is a narrow-band design: --bandwidth must be at most 20 % of --center, not ${short(delta * 100, 3)} %`);
  const omega = (f: number) => (2 / delta) * Math.abs((f - f0) / f0);
  const { order, note } = orderOf(r, omega);
  if (r.response === 'chebyshev' && order % 2 === 0) throw new DesignRequestError('--realize coupled-lines with a Chebyshev response needs an odd order (equal terminations)');
  const proto = prototype({ response: r.response, order, rippleDb: r.rippleDb, first: 'shunt' });
  const g = [1, ...proto.g, proto.gNext];
  const z0 = r.z0;
  const modes: { z0e: number; z0o: number; j: number }[] = [];
  for (let k = 0; k <= order; k++) {
    const j = k === 0 || k === order ? Math.sqrt((Math.PI * delta) / (2 * g[k]! * g[k + 1]!)) : (Math.PI * delta) / (2 * Math.sqrt(g[k]! * g[k + 1]!));
    modes.push({ j, z0e: z0 * (1 + j + j * j), z0o: z0 * (1 - j + j * j) });
  }
  const tight = modes.findIndex((m) => m.j > MAX_COUPLING);
  if (tight >= 0) throw new DesignRequestError(`section ${tight + 1} would need J·z0 = ${short(modes[tight]!.j, 4)}, too tight a coupling for the narrow-band method (at most ${MAX_COUPLING}): narrow --bandwidth or lower --order`);
  const peak = 1;
  // Matthaei, Young & Jones: the band-pass maps to the prototype by Ω = (2/Δ)·(f − f0)/f0 near f0
  const gain = (f: number) => prototypeGain(r.response, order, proto.rippleDb, omega(f), peak);
  const resp = RESPONSE_NAME[r.response];
  const title = `${resp} coupled-line band-pass, order ${order}, ${formatFrequency(f0)} centre, ${formatFrequency(r.bandwidth!)} wide`;
  const lines: string[] = [];
  lines.push(
    ...comment(
      [
        `${title}: written by \`scatterbox design bandpass --realize coupled-lines\`.`,
        `${r.response === 'chebyshev' ? `${resp} ${short(r.rippleDb)} dB ripple` : resp} response, ${note}; fractional bandwidth Δ = ${short(delta, 5)}. Source and load ${short(z0)} ohm.`,
        `Prototype: ${proto.g.map((x, k) => `g${k + 1} = ${short(x, 6)}`).join(', ')} (${proto.method}).`,
        `${order + 1} coupled sections, each a quarter wave at f0 (Cohn, 1958; Matthaei, Young & Jones, 1964, §10.02): J01·z0 = √(π·Δ/(2·g1)), J(k,k+1)·z0 = π·Δ/(2·√(gk·g(k+1))), J(N,N+1)·z0 = √(π·Δ/(2·gN·g(N+1))); Z0e = z0·(1 + J·z0 + (J·z0)²), Z0o = z0·(1 − J·z0 + (J·z0)²).`,
        'A narrow-band design: near f0 the response is the prototype at Ω = (2/Δ)·(f − f0)/f0; the band edges move a little and the response repeats around 3·f0. The specs below ask only for what the method promises near the centre.',
      ].join('\n'),
    ),
  );
  lines.push(`title "${title}"`, '');
  lines.push(`let z0 = ${quantity(z0, 'ohm')}      # source and load`);
  lines.push(`let f0 = ${quantity(f0, 'Hz')}      # centre`, '');
  modes.forEach((m, k) => {
    lines.push(`let ze${k + 1} = ${quantity(m.z0e, 'ohm')} vary ${quantity(m.z0e / 1.5, 'ohm', 6)} to ${quantity(m.z0e * 1.5, 'ohm', 6)}   # section ${k + 1}: even mode, J·z0 = ${short(m.j, 5)}`);
    lines.push(`let zo${k + 1} = ${quantity(m.z0o, 'ohm')} vary ${quantity(m.z0o / 1.5, 'ohm', 6)} to ${quantity(m.z0o * 1.5, 'ohm', 6)}   # section ${k + 1}: odd mode`);
  });
  lines.push('');
  let node = 'in';
  modes.forEach((_, k) => {
    const next = k === order ? 'out' : `r${k + 1}`;
    // in at a1, out at b2; b1 and a2 left open
    lines.push(`coupled_lines k${k + 1} a1=${node} b1=open${k + 1}b a2=open${k + 1}a b2=${next} z0e=ze${k + 1} z0o=zo${k + 1} theta=90 deg at f0`);
    node = next;
  });
  lines.push('', 'port 1 plus=in ref=z0', 'port 2 plus=out ref=z0', '');
  lines.push(`sweep linear start=${quantity(f0 * 0.5, 'Hz', 6)} stop=${quantity(f0 * 1.5, 'Hz', 6)} points=401`);
  lines.push('sweep list freqs=f0', '');
  // near the centre: the inner half of the band, ripple plus 0.2 dB for the narrow-band approximations
  const ripple = r.response === 'chebyshev' ? r.rippleDb : 10 * Math.log10(2);
  const inner = [f0 * (1 - delta / 4), f0 * (1 + delta / 4)];
  const innerLimit = prototypeGain(r.response, order, proto.rippleDb, 0.5);
  const innerDb = -10 * Math.log10(Math.min(innerLimit, prototypeGain(r.response, order, proto.rippleDb, 0)));
  const lim = Math.max(innerDb, r.response === 'chebyshev' ? ripple : 0) + 0.2;
  lines.push(...comment(`Specs: over the inner half of the band the loss stays within ${short(lim, 4)} dB (the prototype's worst there, ${short(innerDb, 4)} dB, plus 0.2 dB for the narrow-band approximations)${r.stopAttenDb !== undefined ? '; the stop band as asked' : ''}.`));
  lines.push(`spec centre_loss measure=il(2,1) max=${short(lim, 6)} dB over=${quantity(inner[0]!, 'Hz')}, ${quantity(inner[1]!, 'Hz')}`);
  if (r.stopAttenDb !== undefined) {
    r.stopEdges.forEach((f, i) => {
      const arg = f < f0 ? `over=${quantity(f0 * 0.5, 'Hz')}, ${quantity(f, 'Hz')}` : `over=${quantity(f, 'Hz')}, ${quantity(f0 * 1.5, 'Hz')}`;
      lines.push(`spec stopband${r.stopEdges.length > 1 ? `_${i + 1}` : ''} measure=il(2,1) min=${short(r.stopAttenDb!, 8)} dB ${arg}`);
    });
  }
  const text = lines.join('\n') + '\n';
  const summary = `${title}\n${note}\n\n` + columns([['section', 'J·z0', 'Z0e', 'Z0o'], ...modes.map((m, k) => [`k${k + 1}`, short(m.j, 5), quantity(m.z0e, 'ohm', 6), quantity(m.z0o, 'ohm', 6)])]);
  return { proto, text, summary, gain, modes };
}

/**
 * The stepped-impedance low-pass (common practice; Matthaei, Young & Jones 1964, §7.03; Pozar,
 * §8.6): each series inductor g becomes a short high-impedance line of βl = g·z0/Zhigh, each
 * shunt capacitor a short low-impedance line of βl = g·Zlow/z0, at the cutoff. An approximation
 * that holds while every section stays short (βl below about 45°).
 */
export function designSteppedLowpass(req: FilterRequest, zHigh: number, zLow: number): DistributedDesign {
  const r = allPole(req, 'stepped');
  if (r.kind !== 'lowpass') throw new DesignRequestError('--realize stepped makes low-pass filters only');
  if (r.series !== undefined || r.q !== undefined) throw new DesignRequestError('--series and --q apply to lumped parts; --realize stepped is made of lines');
  if (r.load !== undefined && Math.abs(r.load - r.z0) > 1e-9 * r.z0) throw new DesignRequestError('--realize stepped takes equal terminations (leave out --load)');
  const z0 = r.z0;
  if (!(zHigh > z0 && zLow < z0)) throw new DesignRequestError(`--high-z (${short(zHigh)} ohm) must be above --z0 and --low-z (${short(zLow)} ohm) below it (${short(z0)} ohm)`);
  const fc = r.cutoff!;
  const { order, note } = orderOf(r, (f) => f / fc);
  if (r.response === 'chebyshev' && order % 2 === 0) throw new DesignRequestError('--realize stepped with a Chebyshev response needs an odd order (equal terminations)');
  const proto = prototype({ response: r.response, order, rippleDb: r.rippleDb, first: r.first });
  const shunt = (k: number) => (k % 2 === 0) === (proto.first === 'shunt');
  const secs = proto.g.map((g, k) => (shunt(k) ? { z: zLow, theta: (g * zLow) / z0, role: `low-impedance line for C${k + 1}: βl = g${k + 1}·Zlow/z0` } : { z: zHigh, theta: (g * z0) / zHigh, role: `high-impedance line for L${k + 1}: βl = g${k + 1}·z0/Zhigh` }));
  const longest = Math.max(...secs.map((x) => x.theta));
  const deg = (x: number) => (x * 180) / Math.PI;
  if (longest > Math.PI / 2) throw new DesignRequestError(`a section would be ${short(deg(longest), 3)}° long at the cutoff, too long for the stepped-impedance approximation: raise --high-z or lower --low-z`);
  const peak = 1;
  const gain = (f: number) => prototypeGain(r.response, order, proto.rippleDb, f / fc, peak);
  const resp = RESPONSE_NAME[r.response];
  const title = `${resp} stepped-impedance low-pass, order ${order}, ${formatFrequency(fc)} cutoff`;
  const ripple = r.response === 'chebyshev' ? r.rippleDb : 10 * Math.log10(2);
  const lines: string[] = [];
  lines.push(
    ...comment(
      [
        `${title}: written by \`scatterbox design lowpass --realize stepped\`.`,
        `${r.response === 'chebyshev' ? `${resp} ${short(r.rippleDb)} dB ripple` : resp} response, ${note}; cutoff ${formatFrequency(fc)}. Source and load ${short(z0)} ohm; lines of ${short(zHigh)} and ${short(zLow)} ohm.`,
        `Prototype: ${proto.g.map((x, k) => `g${k + 1} = ${short(x, 6)}`).join(', ')} (${proto.method}).`,
        'Each series inductor is a short high-impedance line, βl = g·z0/Zhigh; each shunt capacitor a short low-impedance line, βl = g·Zlow/z0 (common practice; Matthaei, Young & Jones 1964, §7.03). An approximation for short sections: the written specs ask for the pass band below 0.8·fc within the response plus 0.5 dB, and the cutoff region is left to the check of the solved response.',
      ].join('\n'),
    ),
  );
  lines.push(`title "${title}"`, '');
  lines.push(`let z0 = ${quantity(z0, 'ohm')}      # source and load`);
  lines.push(`let fc = ${quantity(fc, 'Hz')}      # cutoff`, '');
  secs.forEach((x, k) => lines.push(`let th${k + 1} = ${quantity(deg(x.theta), 'deg')} vary ${quantity(deg(x.theta) / 2, 'deg', 6)} to ${quantity(Math.min(deg(x.theta) * 2, 180), 'deg', 6)}   # ${x.role}`));
  lines.push('');
  let node = 'in';
  secs.forEach((x, k) => {
    const next = k === secs.length - 1 ? 'out' : `n${k + 1}`;
    lines.push(`line t${k + 1} a=${node} b=${next} z0=${quantity(x.z, 'ohm')} theta=th${k + 1} at fc`);
    node = next;
  });
  lines.push('', 'port 1 plus=in ref=z0', 'port 2 plus=out ref=z0', '');
  lines.push(`sweep linear start=${quantity(fc / 100, 'Hz', 6)} stop=${quantity(2 * fc, 'Hz', 6)} points=401`);
  lines.push(`sweep list freqs=fc${r.stopEdges.map((f) => `, ${quantity(f, 'Hz')}`).join('')}`, '');
  const inner = Math.max(-10 * Math.log10(prototypeGain(r.response, order, proto.rippleDb, 0.8)), r.response === 'chebyshev' ? ripple : 0);
  lines.push(`spec passband_loss measure=il(2,1) max=${short(inner + 0.5, 6)} dB below=${quantity(0.8 * fc, 'Hz')}`);
  if (r.stopAttenDb !== undefined) {
    r.stopEdges.forEach((f, i) => lines.push(`spec stopband${r.stopEdges.length > 1 ? `_${i + 1}` : ''} measure=il(2,1) min=${short(r.stopAttenDb!, 8)} dB over=${quantity(f, 'Hz')}, ${quantity(Math.max(f, 1.2 * f), 'Hz')}`));
  }
  const text = lines.join('\n') + '\n';
  const summary = `${title}\n${note}\n\n` + columns([['line', 'impedance', 'length at fc'], ...secs.map((x, k) => [`t${k + 1}`, quantity(x.z, 'ohm', 6), `${short(deg(x.theta), 4)} deg`])]);
  return { proto, text, summary, gain };
}
