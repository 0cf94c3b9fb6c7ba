import { addAdmittance } from './stamp.js';
import type { ElementType, StampBuilder } from './types.js';

/**
 * Slots of a transfer admittance from the voltage between unknowns cp and cn to the current into
 * unknown p and out of unknown n: [p,cp] [p,cn] [n,cp] [n,cn]. The signs of such a term are those of
 * a two-terminal admittance (+, −, −, +), so {@link addAdmittance} adds it; with cp = p and cn = n
 * it is one.
 */
export function transferSlots(b: StampBuilder, p: number, n: number, cp: number, cn: number): Int32Array {
  return Int32Array.of(b.entry(p, cp), b.entry(p, cn), b.entry(n, cp), b.entry(n, cn));
}

/**
 * A voltage-controlled current source: the current gm·v(cp, cn) flows into the element at p and
 * out of it at n. With cp = p and cn = n it is a conductance gm; for a transistor's small-signal
 * model, p = collector (drain), n = emitter (source), cp–cn = the internal base–emitter
 * (gate–source) voltage, and gm > 0.
 *
 * An optional transit time τ (`delay`) makes the transconductance gm·e^(−jωτ) (common practice in
 * small-signal transistor models); it draws no current at cp and cn.
 *
 * Stamp: row p gets +gm·(x_cp − x_cn), row n gets −gm·(x_cp − x_cn); no unknowns of its own.
 */
export const transconductance: ElementType = {
  keyword: 'transconductance',
  summary: 'current gm·v(cp,cn) into p and out of n (so with cp=p, cn=n a conductance gm), optional delay',
  example: 'transconductance g1 p=c n=ground cp=bi cn=ground gm=40 mS delay=4 ps',
  terminals: [
    { key: 'p', doc: 'output, where the current gm·v(cp,cn) enters the element' },
    { key: 'n', doc: 'output, where that current leaves the element', defaultNode: 'ground' },
    { key: 'cp', doc: 'control voltage, plus side' },
    { key: 'cn', doc: 'control voltage, minus side', defaultNode: 'ground' },
  ],
  // joins nothing: the output is an ideal current source and the control draws no current
  connections: [],
  properties: [
    { key: 'gm', unit: 'S', quantity: 'transconductance', required: true, doc: 'transconductance' },
    { key: 'delay', unit: 's', quantity: 'time', defaultValue: 0, sign: 'nonnegative', doc: 'transit time τ: the transconductance is gm·e^(−jωτ)' },
  ],
  compile(el, b) {
    const [p, n, cp, cn] = el.nodes as [number, number, number, number];
    const s = transferSlots(b, p, n, cp, cn);
    const gm = el.props.gm!;
    const tau = el.props.delay ?? 0;
    if (tau === 0) return (_omega, v) => addAdmittance(v, s, gm, 0);
    return (omega, v) => {
      const phi = omega * tau;
      addAdmittance(v, s, gm * Math.cos(phi), -gm * Math.sin(phi));
    };
  },
};
