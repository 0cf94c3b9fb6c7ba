import type { ElementType } from './types.js';

/**
 * An ideal transformer of turns ratio n = Np/Ns between a primary winding (p1, p2) and a
 * secondary winding (s1, s2); p1 and s1 are the dotted ends.
 *
 *   v(p1, p2) = n·v(s1, s2),   i_p = −i_s/n
 *
 * with i_p the current into the element at p1 (out at p2) and i_s the current into it at s1 (out
 * at s2), so that v_p·i_p + v_s·i_s = 0: it stores and dissipates nothing (common practice). A load
 * R across the secondary is seen as n²·R at the primary (common practice). A negative n is the
 * same transformer with the secondary's ends exchanged. It holds at every frequency, 0 Hz included.
 *
 * Stamp: one branch unknown i = i_p. KCL rows p1 (+i), p2 (−i), s1 (−n·i), s2 (+n·i); branch row
 * v_p1 − v_p2 − n·(v_s1 − v_s2) = 0. The matrix is symmetric, as the element is reciprocal.
 */
export const transformer: ElementType = {
  keyword: 'transformer',
  summary: 'ideal transformer, turns ratio Np/Ns, primary p1-p2, secondary s1-s2 (p1, s1 dotted)',
  example: 'transformer t1 p1=in s1=out ratio=0.5',
  terminals: [
    { key: 'p1', doc: 'primary, dotted end' },
    { key: 'p2', doc: 'primary, other end', defaultNode: 'ground' },
    { key: 's1', doc: 'secondary, dotted end' },
    { key: 's2', doc: 'secondary, other end', defaultNode: 'ground' },
  ],
  // each winding joins its own two ends; the windings are not joined to each other
  connections: [[0, 1], [2, 3]],
  properties: [
    { key: 'ratio', unit: null, quantity: 'turns ratio', required: true, sign: 'nonzero', doc: 'turns ratio n = Np/Ns, v(p1,p2) = n·v(s1,s2)' },
  ],
  compile(el, b) {
    const [p1, p2, s1, s2] = el.nodes as [number, number, number, number];
    const i = b.branch(`primary current of ${el.name}`);
    const col = Int32Array.of(b.entry(p1, i), b.entry(p2, i), b.entry(s1, i), b.entry(s2, i));
    const row = Int32Array.of(b.entry(i, p1), b.entry(i, p2), b.entry(i, s1), b.entry(i, s2));
    const n = el.props.ratio!;
    const w = Float64Array.of(1, -1, -n, n);
    return (_omega, v) => {
      for (let k = 0; k < 4; k++) {
        const c = col[k]!;
        if (c >= 0) v[2 * c] += w[k]!;
        const r = row[k]!;
        if (r >= 0) v[2 * r] += w[k]!;
      }
    };
  },
};
