import type { ElementType } from './types.js';

/**
 * A current-controlled voltage source. The control current i_s flows through a zero-volt sense
 * branch between sp and sn (into the element at sp, out at sn); the output is an ideal voltage source
 * v(p, n) = r·i_s.
 *
 * Stamp: two branch unknowns, i_s and the output current i_o (into the element at p, out at n):
 * KCL rows sp (+i_s), sn (−i_s), p (+i_o), n (−i_o); branch rows v_sp − v_sn = 0 and
 * v_p − v_n − r·i_s = 0.
 */
export const transresistance: ElementType = {
  keyword: 'transresistance',
  summary: 'ideal transresistance amplifier: v(p,n) = r·i_s, i_s sensed by a short from sp to sn',
  example: 'transresistance h1 p=out sp=in sn=ground r=1 kohm',
  terminals: [
    { key: 'p', doc: 'output, plus' },
    { key: 'n', doc: 'output, minus', defaultNode: 'ground' },
    { key: 'sp', doc: 'sense branch, where i_s enters' },
    { key: 'sn', doc: 'sense branch, where i_s leaves', defaultNode: 'ground' },
  ],
  // the output sets v(p,n) and the sense branch is a short from sp to sn
  connections: [[0, 1], [2, 3]],
  properties: [
    { key: 'r', unit: 'ohm', quantity: 'resistance', required: true, doc: 'transresistance v(p,n)/i_s' },
  ],
  validate(el, fail) {
    if (el.nodes[0] === el.nodes[1]) fail('the output terminals `p` and `n` are on the same node, so the output voltage cannot be set', 'p', 'connect `p` and `n` to different nodes');
    if (el.nodes[2] === el.nodes[3]) fail('the sense terminals `sp` and `sn` are on the same node, so no current can be sensed', 'sp', 'put the sense branch in series with the current to be sensed');
  },
  compile(el, b) {
    const [p, n, sp, sn] = el.nodes as [number, number, number, number];
    const is = b.branch(`sensed current of ${el.name}`);
    const io = b.branch(`output current of ${el.name}`);
    const r = el.props.r!;
    const s = Int32Array.of(
      b.entry(sp, is), b.entry(sn, is), b.entry(is, sp), b.entry(is, sn),
      b.entry(p, io), b.entry(n, io), b.entry(io, p), b.entry(io, n), b.entry(io, is),
    );
    const w = Float64Array.of(1, -1, 1, -1, 1, -1, 1, -1, -r);
    return (_omega, v) => {
      for (let k = 0; k < 9; k++) {
        const q = s[k]!;
        if (q >= 0) v[2 * q] += w[k]!;
      }
    };
  },
};
