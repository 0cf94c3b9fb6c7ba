import { addAdmittance } from './stamp.js';
import { transferSlots } from './transconductance.js';
import type { ElementType } from './types.js';

/**
 * An ideal gyrator of gyration resistance r between side a (a1, a2) and side b (b1, b2):
 *
 *   i_a = v_b/r,   i_b = −v_a/r,   i.e.  [i_a; i_b] = Y·[v_a; v_b],  Y = [[0, 1/r], [−1/r, 0]],
 *
 * with v_a = v(a1, a2), v_b = v(b1, b2) and i_a (i_b) the current into the element at a1 (b1) and out
 * at a2 (b2). Y is real and antisymmetric, so Y + Yᴴ = 0: the gyrator is lossless (it absorbs
 * v_a·i_a + v_b·i_b = 0 at every instant), and Y12 ≠ Y21: it is not reciprocal. An impedance Z across
 * one side is seen from the other as r²/Z, so a capacitor C looks like an inductor r²·C (common
 * practice). A negative r is the gyrator with the opposite direction.
 *
 * Stamp: two transfer admittances, +1/r from v_b into side a and −1/r from v_a into side b.
 */
export const gyrator: ElementType = {
  keyword: 'gyrator',
  summary: 'ideal gyrator of resistance r: i_a = v(b1,b2)/r, i_b = −v(a1,a2)/r (lossless, non-reciprocal)',
  example: 'gyrator gy1 a1=in b1=tank r=50 ohm',
  terminals: [
    { key: 'a1', doc: 'side a, plus' },
    { key: 'a2', doc: 'side a, minus', defaultNode: 'ground' },
    { key: 'b1', doc: 'side b, plus' },
    { key: 'b2', doc: 'side b, minus', defaultNode: 'ground' },
  ],
  // each side joins its own two terminals (no net current flows from one side to the other)
  connections: [[0, 1], [2, 3]],
  properties: [
    { key: 'r', unit: 'ohm', quantity: 'resistance', required: true, sign: 'nonzero', doc: 'gyration resistance' },
  ],
  compile(el, b) {
    const [a1, a2, b1, b2] = el.nodes as [number, number, number, number];
    const ab = transferSlots(b, a1, a2, b1, b2);
    const ba = transferSlots(b, b1, b2, a1, a2);
    const g = 1 / el.props.r!;
    return (_omega, v) => {
      addAdmittance(v, ab, g, 0);
      addAdmittance(v, ba, -g, 0);
    };
  },
};
