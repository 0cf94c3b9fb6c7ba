import {
  createMicrostripAt,
  microstripAt,
  microstripRangeIssues,
  microstripStatic,
  type MicrostripSpec,
} from '../models/microstrip.js';
import { formatFrequency } from '../format/frequency.js';
import { addWaveStamp, chainSlots } from './line.js';
import { GROUND, type ElementInstance, type ElementType } from './types.js';

/**
 * A microstrip line section from a to b over the ground plane, from its geometry and materials.
 *
 * Model (src/models/microstrip.ts, evaluated at every frequency of the sweep): quasi-static Z0 and
 * εeff with the strip-thickness correction by Hammerstad and Jensen (1980), the dispersion of εeff
 * by Kirschning and Jansen (1982) and of Z0 by Jansen and Kirschning (1983), conductor loss by
 * Wheeler's incremental-inductance rule (1942) with the Hammerstad–Bekkadal roughness factor,
 * dielectric loss of a quasi-TEM line. The section is then the TEM line with those Z0(f),
 * γ(f) = αc(f) + αd(f) + j·2πf·√εeff(f)/c0 and the given length, stamped in the wave form of
 * `line` (src/elements/line.ts), so it is finite at 0 Hz and at every half wave. The branch
 * currents are scaled by the quasi-static Z0.
 *
 * Not modelled: the strip's DC resistance (the model's loss vanishes at 0 Hz), radiation, surface
 * waves, and the fringing at open ends, steps and junctions (separate elements, not yet written).
 */

const TWO_PI = 2 * Math.PI;

/** Copper, S/m (common practice: about 5.8e7 S/m at room temperature). */
export const COPPER_CONDUCTIVITY = 5.8e7;

/** The model's input from an elaborated element. */
export function microstripSpecOf(el: ElementInstance): MicrostripSpec {
  const p = el.props;
  return {
    w: p.w!,
    h: p.h!,
    t: p.t!,
    er: p.er!,
    tanDelta: p.tand ?? 0,
    sigma: p.sigma ?? COPPER_CONDUCTIVITY,
    roughness: p.rough ?? 0,
  };
}

/**
 * Where the element lies outside the stated ranges of the models, in words, for the highest
 * frequency of the sweep (every frequency limit of the models is an upper bound). Meant for
 * elaboration-time warnings; allocates. (Not wired in yet: element types have no warning channel.)
 */
export function microstripIssues(el: ElementInstance, maxFrequency: number): string[] {
  return microstripRangeIssues(maxFrequency, microstripSpecOf(el));
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString();
}

export const microstrip: ElementType = {
  warnings: (el, maxFrequency) => microstripIssues(el, maxFrequency),
  keyword: 'microstrip',
  summary: 'microstrip line from a to b over ground, from width, substrate and length (dispersion and losses per frequency)',
  example: 'microstrip feed a=in b=out w=1.5 mm h=0.8 mm t=35 um er=4.4 tand=0.02 length=17 mm',
  terminals: [
    { key: 'a', doc: 'first end' },
    { key: 'b', doc: 'second end' },
  ],
  properties: [
    { key: 'w', unit: 'm', quantity: 'length', required: true, sign: 'positive', doc: 'strip width' },
    { key: 'h', unit: 'm', quantity: 'length', required: true, sign: 'positive', doc: 'substrate height' },
    { key: 't', unit: 'm', quantity: 'length', required: true, sign: 'positive', doc: 'strip thickness' },
    { key: 'er', unit: null, quantity: 'relative permittivity', required: true, doc: 'substrate relative permittivity (≥ 1)' },
    { key: 'tand', unit: null, quantity: 'loss tangent', sign: 'nonnegative', defaultValue: 0, doc: 'substrate loss tangent; default 0' },
    {
      key: 'sigma',
      unit: 'S/m',
      quantity: 'conductivity',
      sign: 'positive',
      defaultValue: COPPER_CONDUCTIVITY,
      doc: 'conductivity of strip and ground; default 5.8e7 S/m (copper)',
    },
    { key: 'length', unit: 'm', quantity: 'length', required: true, sign: 'positive', doc: 'physical length' },
    { key: 'rough', unit: 'm', quantity: 'length', sign: 'nonnegative', defaultValue: 0, doc: 'rms surface roughness of the conductors; default 0 (smooth)' },
  ],
  validate(el, fail) {
    const p = el.props;
    if (!(p.er! >= 1)) fail('`er` must be 1 or more', 'er');
    if (p.t! >= p.h!) fail('the strip must be thinner than the substrate (`t` below `h`)', 't');
    if (!(p.er! >= 1) || !(p.t! < p.h!)) return;
    // Outside their stated ranges the models are only warned about, as long as they still give a
    // physical line; far outside (w/h below about 1e-9, say) the quasi-static fit itself leaves
    // the bounds 1 ≤ εeff ≤ εr, and no number it gives means anything.
    const s = microstripStatic(p.w!, p.h!, p.t!, p.er!);
    if (!(s.eeff >= 1 && s.eeff <= p.er! && s.z0 > 0 && Number.isFinite(s.z0))) {
      fail(`the microstrip model cannot be evaluated for w/h = ${fmt(p.w! / p.h!)}: its quasi-static εeff (${fmt(s.eeff)}) leaves the physical range 1…εr`, 'w', 'the models are stated for 0.01 ≤ w/h ≤ 100 (Hammerstad–Jensen); check the units of `w` and `h`');
    }
  },
  checkSweep(el, frequencies, fail) {
    const spec = microstripSpecOf(el);
    const at = createMicrostripAt();
    const n = frequencies.length;
    // every point up to 100,000 points, then an even sample of that many (with the last point)
    const stride = Math.max(1, Math.ceil(n / 100_000));
    for (let i = 0; i < n; i += i + stride < n || i === n - 1 ? stride : n - 1 - i) {
      const f = frequencies[i]!;
      let why: string | undefined;
      try {
        microstripAt(f, spec, at);
        if (![at.z0, at.eeff, at.beta, at.alphaConductor, at.alphaDielectric].every(Number.isFinite)) why = 'a value is not finite';
      } catch (e) {
        why = (e as Error).message;
      }
      if (why !== undefined) {
        fail(`the microstrip model cannot be evaluated at ${formatFrequency(f)}: ${why}`, undefined, 'the dispersion models are stated for 0.1 ≤ w/h ≤ 10, εr ≤ 18 and f·h ≤ 15 GHz·mm (Jansen–Kirschning)');
        return;
      }
    }
  },
  compile(el, b) {
    const spec = microstripSpecOf(el);
    const length = el.props.length!;
    const zs = microstripStatic(spec.w, spec.h, spec.t, spec.er).z0;
    const s = chainSlots(b, el.nodes[0]!, GROUND, el.nodes[1]!, GROUND, el.name);
    const at = createMicrostripAt();
    return (omega, v) => {
      const f = omega / TWO_PI;
      microstripAt(f, spec, at);
      addWaveStamp(v, s, at.z0, (at.alphaConductor + at.alphaDielectric) * length, at.beta * length, zs);
    };
  },
};
