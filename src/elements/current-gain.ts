import type { ElementType } from './types.js';

/**
 * A current-controlled current source. The control current i_s flows through a zero-volt sense
 * branch between sp and sn (into the element at sp, out at sn); the output current gain·i_s flows
 * into the element at p and out at n. The sense branch is a short between sp and sn.
 *
 * Stamp: a branch unknown i_s: KCL rows sp (+i_s), sn (−i_s), p (+gain·i_s), n (−gain·i_s), and the
 * branch row v_sp − v_sn = 0.
 */
export const currentGain: ElementType = {
  keyword: 'current_gain',
  summary: 'ideal current amplifier: current gain·i_s into p and out of n, i_s sensed by a short from sp to sn',
  example: 'current_gain f1 p=out sp=in sn=ground gain=20',
  terminals: [
    { key: 'p', doc: 'output, where the current gain·i_s enters the element' },
    { key: 'n', doc: 'output, where that current leaves the element', defaultNode: 'ground' },
    { key: 'sp', doc: 'sense branch, where i_s enters' },
    { key: 'sn', doc: 'sense branch, where i_s leaves', defaultNode: 'ground' },
  ],
  // the sense branch is a short from sp to sn; the output is an ideal current source and joins nothing
  connections: [[2, 3]],
  properties: [
    { key: 'gain', unit: null, quantity: 'current gain', required: true, doc: 'current gain i_out/i_s' },
  ],
  validate(el, fail) {
    if (el.nodes[2] === el.nodes[3]) fail('the sense terminals `sp` and `sn` are on the same node, so no current can be sensed', 'sp', 'put the sense branch in series with the current to be sensed');
  },
  compile(el, b) {
    const [p, n, sp, sn] = el.nodes as [number, number, number, number];
    const i = b.branch(`sensed current of ${el.name}`);
    const beta = el.props.gain!;
    const s = Int32Array.of(b.entry(sp, i), b.entry(sn, i), b.entry(i, sp), b.entry(i, sn), b.entry(p, i), b.entry(n, i));
    const w = Float64Array.of(1, -1, 1, -1, beta, -beta);
    return (_omega, v) => {
      for (let k = 0; k < 6; k++) {
        const q = s[k]!;
        if (q >= 0) v[2 * q] += w[k]!;
      }
    };
  },
};
